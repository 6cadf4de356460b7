"""The package table ``rules/packages.toml``: common pin numberings and internal inductance.

Units: nanohenries in the file, henries and millimetres out.  Every entry carries its
source ("common practice", the power-layout notes, or "from memory"); see the file.
"""
from __future__ import annotations

import fnmatch
import re
import tomllib
from dataclasses import dataclass, field
from functools import lru_cache

from ..errors import LayoutcheckError
from ..physics.spacing import rules_dir

TABLE_FILE = "packages.toml"


@dataclass(frozen=True)
class PackageInfo:
    """One entry of the package table.

    name:        display name.
    match:       globs over the normalised package name (see :func:`normalise`).
    pins:        kind (``mosfet`` / ``igbt``) -> role -> candidate pads (first present wins).
    pins_source: where the numbering comes from.
    internal_h:  series inductance the straight pad-to-pad piece leaves out (H).
    internal_source: where that value comes from.
    lead_mm:     conductor size used for the part's straight piece and its leads (mm).
    """

    name: str
    match: tuple[str, ...]
    pins: dict[str, dict[str, tuple[str, ...]]] = field(default_factory=dict)
    pins_source: str = ""
    internal_h: float = 0.0
    internal_source: str = ""
    lead_mm: float = 0.8


def normalise(package: str) -> str:
    """Upper case, letters and digits only: ``"TO-247-3"`` -> ``"TO2473"``."""
    return re.sub(r"[^A-Z0-9]", "", package.upper())


@lru_cache(maxsize=None)
def load_packages() -> tuple[PackageInfo, ...]:
    """The package table, in file order (cached).

    Raises :class:`LayoutcheckError` naming the file when it is missing or malformed (a
    broken installation, not a user input).
    """
    path = rules_dir() / TABLE_FILE
    try:
        data = tomllib.loads(path.read_text(encoding="utf-8"))
    except OSError as e:
        raise LayoutcheckError(f"cannot read the package table: {e.strerror}",
                               file=str(path)) from e
    except tomllib.TOMLDecodeError as e:
        raise LayoutcheckError(f"package table is not valid TOML: {e}", file=str(path)) from e
    out = []
    for k, entry in enumerate(data.get("package", [])):
        try:
            pins = {}
            for kind in ("mosfet", "igbt"):
                table = entry.get(f"pins_{kind}")
                if table:
                    pins[kind] = {role: tuple([pad] if isinstance(pad, str) else pad)
                                  for role, pad in table.items()}
            out.append(PackageInfo(
                name=str(entry["name"]), match=tuple(entry["match"]), pins=pins,
                pins_source=str(entry.get("pins_source", "")),
                internal_h=float(entry["internal_nh"]) * 1e-9,
                internal_source=str(entry["internal_source"]),
                lead_mm=float(entry.get("lead_mm", 0.8))))
        except (KeyError, TypeError, ValueError) as e:
            raise LayoutcheckError(f"package entry {k + 1} is malformed ({e!r}); expected "
                                   "name, match, internal_nh, internal_source",
                                   file=str(path)) from e
    return tuple(out)


def find_package(package: str | None) -> PackageInfo | None:
    """The first table entry whose globs fit ``package`` (normalised), or ``None``."""
    if not package:
        return None
    key = normalise(package)
    if not key:
        return None
    for info in load_packages():
        if any(fnmatch.fnmatchcase(key, pat) for pat in info.match):
            return info
    return None
