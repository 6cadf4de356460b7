"""Regenerate the sample boards: ``python sample_boards/make_samples.py``.

Writes ``fullbridge-rev-a/`` and ``fullbridge-rev-b/`` beside this file: Gerber X2 copper
and profile layers, the plated and non-plated NC drill files and ``layoutcheck.toml``
(``fullbridge.PROJECT_TEXT``, the same text for both revisions).  Rev-a is also written
in the other input formats (:func:`make_other_formats`): ``fullbridge-rev-a-plain/`` (plain
Gerber + NC drill + IPC-D-356A netlist) and ``fullbridge-rev-a.xml`` (IPC-2581).
Before writing, the spacing of each revision is checked with shapely against the design's
own clearance and creepage targets (see ``spacing_check``): rev-a must show exactly the
five planted spacing problems (four clearance, one creepage), rev-b none.  (Planted problem
6, leg A's commutation loop, is no spacing problem; ``tests/test_writers.py`` checks it
against the package's review.)  Output is byte-for-byte deterministic.

Invented demo data.
"""
from __future__ import annotations

import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

import fullbridge  # noqa: E402
import spacing_check  # noqa: E402
from layoutcheck.writers.drill import write_drill  # noqa: E402
from layoutcheck.writers.gerber import write_gerbers  # noqa: E402


def check(design, rev: str) -> None:
    """Raise ``SystemExit`` unless rev-a shows exactly the planted spacing problems and
    rev-b none (:func:`spacing_check.check`)."""
    errors = spacing_check.check(design, rev)
    if errors:
        raise SystemExit("\n".join(errors))


def make(rev: str, root: Path = HERE) -> list[Path]:
    """Build, check and write one revision; returns the files written (sorted)."""
    design = fullbridge.build(rev)
    check(design, rev)
    out = root / design.name
    out.mkdir(parents=True, exist_ok=True)
    for old in list(out.glob("*.gbr")) + list(out.glob("*.drl")):
        old.unlink()
    paths = write_gerbers(design, out) + write_drill(design, out)
    toml = out / "layoutcheck.toml"
    toml.write_text(fullbridge.PROJECT_TEXT, encoding="utf-8", newline="\n")
    return sorted(paths + [toml])


def make_other_formats(rev: str = "a", root: Path = HERE) -> list[Path]:
    """The same revision in the other input formats; returns the files written (sorted).

    * ``<name>-plain/``: plain Gerber (no X2 attributes) copper and profile, the NC drill
      files, the IPC-D-356A netlist ``<name>.ipc`` (CUST 1, millimetres) that names the
      nets, and the same ``layoutcheck.toml``;
    * ``<name>.xml``: the IPC-2581 (revision C, millimetres) file of the revision.
    """
    from layoutcheck.writers.ipc2581 import write_ipc2581
    from layoutcheck.writers.ipc356 import write_ipc356

    design = fullbridge.build(rev)
    check(design, rev)
    out = root / f"{design.name}-plain"
    out.mkdir(parents=True, exist_ok=True)
    for old in list(out.glob("*.gbr")) + list(out.glob("*.drl")) + list(out.glob("*.ipc")):
        old.unlink()
    paths = write_gerbers(design, out, x2=False) + write_drill(design, out)
    paths.append(write_ipc356(design, out))
    toml = out / "layoutcheck.toml"
    toml.write_text(fullbridge.PROJECT_TEXT, encoding="utf-8", newline="\n")
    paths.append(toml)
    paths.append(write_ipc2581(design, root / f"{design.name}.xml"))
    return sorted(paths)


def main() -> None:
    for rev in ("a", "b"):
        for p in make(rev):
            print(p.relative_to(HERE))
    for p in make_other_formats("a"):
        print(p.relative_to(HERE))


if __name__ == "__main__":
    main()
