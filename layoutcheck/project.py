"""The project file ``layoutcheck.toml``: load, validate, defaults, and what they assume.

Contract shape (keys may be added, never changed)::

    [board]
    files = "."               # folder, zip or file, relative to this file
    [voltages]                # volts: a number, or "lo..hi" for a node that swings
    "HV_BUS" = 340            # exact net name
    "SW_*" = "0..340"         # shell-style glob
    "*" = "0..15"             # fallback for every other net
    [environment]
    altitude_m = 0
    coating = "none"          # none | solder-mask | conformal

An exact name beats a glob; among globs the first in the file wins.  Without a ``"*"`` key
undeclared nets get 0..15 V and each is listed as an assumption.

A net that rides on another (a bootstrap supply or high-side gate on the switch node) may be
declared relative to it: ``"VB_A" = { on = "SW_A", volts = 15 }`` or
``"HO_A" = { on = "SW_A", volts = "0..15" }``.  Its absolute range is the other net's
range plus ``volts``; between two nets that ride on the same node the working voltage is
the difference of their offsets, not of their absolute ranges.

Further keys read here: ``[board] netlist``, ``[board] layers`` (file name -> layer, for
files that do not say what they are), ``[board] plated`` / ``non_plated`` (drill file names),
``[board] size_mm`` (used when there is no profile layer), ``[stackup] thickness_mm``,
``copper_um``; ``[rules] ignore`` (rule ids not to run).
"""
from __future__ import annotations

import fnmatch
import re
import tomllib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from .errors import ProjectFileError
from .model import Assumption
from .units import VoltageRange, parse_voltage

PROJECT_FILE_NAME = "layoutcheck.toml"
DEFAULT_UNDECLARED = VoltageRange(0.0, 15.0)
COATINGS = ("none", "solder-mask", "conformal")


STANDARDS = ("ipc2221b", "iec60664-1", "both")
MATERIAL_GROUPS = ("I", "II", "IIIa", "IIIb")
OVERVOLTAGE_CATEGORIES = ("I", "II", "III", "IV")
INSULATION_KINDS = ("functional", "basic", "supplementary", "reinforced")


@dataclass
class Environment:
    """Where the board will live and which spacing standard applies.

    altitude_m: metres above sea level.  pollution_degree: 1..3 (IEC 60664-1).
    material_group: I, II, IIIa, IIIb (from ``material_group`` or ``cti``).
    ``explicit`` holds the keys the file actually gave; the others are defaults and become
    assumptions when a rule uses them.
    """

    altitude_m: float = 0.0
    coating: str = "none"
    standard: str = "ipc2221b"
    pollution_degree: int = 2
    material_group: str = "IIIa"
    cti: float | None = None
    overvoltage_category: str = "II"
    interpolate: bool = False
    creepage_columns: str = "material-group"
    explicit: set[str] = field(default_factory=set)  # keys the file actually gave


@dataclass
class InsulationRule:
    """``[[insulation]]``: the insulation kind required between two groups of nets."""

    between: list[str]
    and_: list[str]
    kind: str

    def matches(self, a: str, b: str) -> bool:
        def hit(net, pats):
            return any(fnmatch.fnmatchcase(net, p) for p in pats)
        return (hit(a, self.between) and hit(b, self.and_)) or \
               (hit(b, self.between) and hit(a, self.and_))


@dataclass
class Earth:
    """``[earth]``: 0 V conductors outside the copper (enclosure at the board edge, earthed
    mounting hardware).  ``edge``: the board edge is earthed metal; ``mounting_holes``: every
    non-plated hole of at least ``hole_min_mm`` carries earthed hardware."""

    edge: bool = False
    mounting_holes: bool = False
    hole_min_mm: float = 2.5
    kind: str = "basic"


@dataclass
class VoltageRule:
    pattern: str
    voltage: VoltageRange          # absolute range, or the offset when ``on`` is set
    is_glob: bool
    order: int
    on: str | None = None          # the net this one rides on


@dataclass
class Project:
    """A loaded project file (or the defaults when there is none).

    path:        the project file, or ``None`` for defaults.
    board_files: what ``[board] files`` points at (absolute), or ``None``.
    data:        the raw TOML tables, for later rules that read their own keys.
    """

    path: Path | None = None
    board_files: Path | None = None
    netlist: Path | None = None
    voltage_rules: list[VoltageRule] = field(default_factory=list)
    environment: Environment = field(default_factory=Environment)
    layer_map: dict[str, str] = field(default_factory=dict)
    plated_files: list[str] = field(default_factory=list)
    non_plated_files: list[str] = field(default_factory=list)
    size_mm: tuple[float, float] | None = None
    stackup_thickness_mm: float | None = None
    stackup_copper_um: float | None = None
    ignore_rules: list[str] = field(default_factory=list)
    insulation: list[InsulationRule] = field(default_factory=list)
    earth: Earth = field(default_factory=Earth)
    data: dict[str, Any] = field(default_factory=dict)
    assumptions: list[Assumption] = field(default_factory=list)

    # -- voltages ---------------------------------------------------------------------
    def _rule_for(self, net: str) -> tuple[VoltageRule | None, str]:
        for rule in self.voltage_rules:
            if not rule.is_glob and rule.pattern == net:
                return rule, "exact"
        fallback = None
        for rule in self.voltage_rules:
            if rule.is_glob:
                if rule.pattern == "*":
                    if fallback is None:
                        fallback = rule
                    continue
                if fnmatch.fnmatchcase(net, rule.pattern):
                    return rule, f"glob {rule.pattern}"
        if fallback is not None:
            return fallback, "fallback *"
        return None, "undeclared"

    def _chain(self, net: str) -> tuple[str, VoltageRange, VoltageRange]:
        """(root net, offset of ``net`` above the root, absolute range of the root)."""
        lo = hi = 0.0
        seen = [net]
        cur = net
        while True:
            rule, _ = self._rule_for(cur)
            if rule is None:
                return cur, VoltageRange(lo, hi), DEFAULT_UNDECLARED
            if rule.on is None:
                return cur, VoltageRange(lo, hi), rule.voltage
            lo += rule.voltage.lo
            hi += rule.voltage.hi
            cur = rule.on
            if cur in seen:
                raise ProjectFileError(
                    "[voltages] nets ride on each other in a circle: " +
                    " -> ".join(seen + [cur]), file=str(self.path or "<project>"))
            seen.append(cur)

    def voltage_of(self, net: str) -> tuple[VoltageRange, str]:
        """The absolute voltage range (V) of ``net`` and how it was found.

        The second value is ``"exact"``, ``"glob <pattern>"``, ``"fallback *"`` or
        ``"undeclared"``; the last two mean the voltage is an assumption.
        """
        rule, how = self._rule_for(net)
        if rule is None:
            return DEFAULT_UNDECLARED, how
        if rule.on is None:
            return rule.voltage, how
        _, off, root = self._chain(net)
        return VoltageRange(root.lo + off.lo, root.hi + off.hi), how

    def insulation_between(self, a: str, b: str) -> tuple[str, str]:
        """Insulation kind required between nets ``a`` and ``b`` and why.

        The first ``[[insulation]]`` entry that matches wins; otherwise ``functional``.
        """
        for k, rule in enumerate(self.insulation):
            if rule.matches(a, b):
                return rule.kind, f"[[insulation]] entry {k + 1}"
        return "functional", "default (no [[insulation]] entry names this pair)"

    def working_voltage(self, a: str, b: str) -> float:
        """Largest voltage (V) between nets ``a`` and ``b``.

        Nets riding on the same node (``on = ...``) differ by their offsets only; any other
        pair by the largest difference between their absolute ranges.
        """
        ra, oa, _ = self._chain(a)
        rb, ob, _ = self._chain(b)
        if ra == rb:
            return oa.difference_to(ob)
        return self.voltage_of(a)[0].difference_to(self.voltage_of(b)[0])

    def voltage_assumptions(self, nets) -> list[Assumption]:
        """One assumption per net whose voltage came from ``"*"`` or the built-in default."""
        out = []
        for net in sorted(nets):
            v, how = self.voltage_of(net)
            if how == "fallback *":
                out.append(Assumption("voltage", f"net {net}: no voltage declared; the "
                                      f"project's \"*\" fallback gives {v.text()}"))
            elif how == "undeclared":
                out.append(Assumption("voltage", f"net {net}: no voltage declared and no "
                                      f"\"*\" fallback; assumed {v.text()}"))
        return out


def toml_error_line(e: Exception) -> int | None:
    """The line number a TOML decode error points at, if it says."""
    line = getattr(e, "lineno", None)
    if line is None:
        m = re.search(r"at line (\d+)", str(e))
        line = int(m.group(1)) if m else None
    return line


def find_project_file(folder: Path) -> Path | None:
    p = folder / PROJECT_FILE_NAME
    return p if p.is_file() else None


def load_project(path: Path | None) -> Project:
    """Load and validate a project file; ``None`` gives the defaults (with assumptions)."""
    if path is None:
        proj = Project()
        proj.assumptions.append(Assumption(
            "project", "no project file: every net is assumed to be 0..15 V and the "
                       "environment sea level, uncoated; declare the voltages in "
                       f"{PROJECT_FILE_NAME} (`layoutcheck init` writes a starter)"))
        _environment_assumptions(proj)
        return proj
    path = Path(path)
    try:
        raw = path.read_bytes()
    except OSError as e:
        raise ProjectFileError(f"cannot read the project file: {e.strerror}", file=str(path)) from e
    try:
        text = raw.decode("utf-8")
        data = tomllib.loads(text)
    except UnicodeDecodeError as e:
        raise ProjectFileError("the project file is not UTF-8 text", file=str(path)) from e
    except tomllib.TOMLDecodeError as e:
        raise ProjectFileError(f"not valid TOML: {e}", file=str(path),
                               line=toml_error_line(e)) from e
    return project_from_data(data, path, text)


def project_from_data(data: dict, path: Path | None, text: str = "") -> Project:
    """Build a :class:`Project` from parsed TOML ``data`` (``path`` for messages)."""
    where = str(path) if path else "<project>"
    base = path.parent if path else Path(".")
    proj = Project(path=path, data=data)

    def line_of(key: str) -> int | None:
        if not text:
            return None
        for n, line in enumerate(text.splitlines(), 1):
            s = line.strip()
            if s.startswith(key) or s.startswith(f'"{key}"'):
                return n
        return None

    def fail(msg, key=None):
        raise ProjectFileError(msg, file=where, line=line_of(key) if key else None)

    board = _table(data, "board", fail)
    if "files" in board:
        if not isinstance(board["files"], str):
            fail("[board] files must be a string (a folder, zip or file relative to the "
                 "project file)", "files")
        proj.board_files = (base / board["files"]).resolve()
    if "netlist" in board:
        if not isinstance(board["netlist"], str):
            fail("[board] netlist must be a string (a file relative to the project file)",
                 "netlist")
        proj.netlist = (base / board["netlist"]).resolve()
    if "layers" in board:
        if not isinstance(board["layers"], dict) or not all(
                isinstance(v, str) for v in board["layers"].values()):
            fail("[board] layers must map file names to layer names "
                 "(top, in1.., bottom, profile, drill, soldermask-top, ...)", "layers")
        proj.layer_map = dict(board["layers"])
    for key, attr in (("plated", "plated_files"), ("non_plated", "non_plated_files")):
        if key in board:
            v = board[key]
            if isinstance(v, str):
                v = [v]
            if not isinstance(v, list) or not all(isinstance(x, str) for x in v):
                fail(f"[board] {key} must be a file name or a list of file names", key)
            setattr(proj, attr, list(v))
    if "size_mm" in board:
        v = board["size_mm"]
        if (not isinstance(v, list) or len(v) != 2
                or not all(isinstance(x, (int, float)) and x > 0 for x in v)):
            fail("[board] size_mm must be [width, height] in millimetres, both > 0", "size_mm")
        proj.size_mm = (float(v[0]), float(v[1]))

    volts = _table(data, "voltages", fail)
    for order, (name, value) in enumerate(volts.items()):
        on = None
        if isinstance(value, dict):
            if set(value) - {"on", "volts"} or not isinstance(value.get("on"), str) \
                    or "volts" not in value:
                fail(f"[voltages] {name!r}: a relative voltage is written "
                     '{ on = "<net>", volts = <number or "lo..hi"> }', name)
            on = value["on"]
            value = value["volts"]
        try:
            vr = parse_voltage(value)
        except ValueError as e:
            fail(f"[voltages] {name!r}: {e}", name)
        is_glob = any(ch in name for ch in "*?[")
        proj.voltage_rules.append(VoltageRule(name, vr, is_glob, order, on))
    for rule in proj.voltage_rules:
        if rule.on is not None:
            proj._chain(rule.pattern if not rule.is_glob else rule.on)
    if not any(r.pattern == "*" for r in proj.voltage_rules):
        proj.assumptions.append(Assumption(
            "voltage", 'no "*" fallback in [voltages]: every undeclared net is assumed '
                       "0..15 V and listed"))

    env = _table(data, "environment", fail)
    if "altitude_m" in env:
        a = env["altitude_m"]
        if isinstance(a, bool) or not isinstance(a, (int, float)) or not (-500 <= a <= 20000):
            fail("[environment] altitude_m must be a number of metres between -500 and "
                 f"20000, got {a!r}", "altitude_m")
        proj.environment.altitude_m = float(a)
        proj.environment.explicit.add("altitude_m")
    if "coating" in env:
        c = env["coating"]
        if c not in COATINGS:
            fail(f"[environment] coating must be one of {', '.join(COATINGS)}; got {c!r}",
                 "coating")
        proj.environment.coating = c
        proj.environment.explicit.add("coating")
    _more_environment(env, proj.environment, fail)
    _environment_assumptions(proj)

    ins = data.get("insulation", [])
    if not isinstance(ins, list) or not all(isinstance(x, dict) for x in ins):
        fail("[[insulation]] must be an array of tables with between, and, kind", "[[insulation]]")
    for k, entry in enumerate(ins):
        def pats(key):
            v = entry.get(key)
            if isinstance(v, str):
                v = [v]
            if not isinstance(v, list) or not v or not all(isinstance(x, str) for x in v):
                fail(f"[[insulation]] entry {k + 1}: {key!r} must be a net name, glob or list "
                     "of them", "[[insulation]]")
            return list(v)
        kind = entry.get("kind", "functional")
        if kind not in INSULATION_KINDS:
            fail(f"[[insulation]] entry {k + 1}: kind must be one of "
                 f"{', '.join(INSULATION_KINDS)}; got {kind!r}", "kind")
        extra = set(entry) - {"between", "and", "kind"}
        if extra:
            fail(f"[[insulation]] entry {k + 1}: unknown key(s) {', '.join(sorted(extra))}; "
                 "expected between, and, kind", "[[insulation]]")
        proj.insulation.append(InsulationRule(pats("between"), pats("and"), kind))

    earth = _table(data, "earth", fail)
    for key in ("edge", "mounting_holes"):
        if key in earth:
            if not isinstance(earth[key], bool):
                fail(f"[earth] {key} must be true or false", key)
            setattr(proj.earth, key, earth[key])
    if "hole_min_mm" in earth:
        v = earth["hole_min_mm"]
        if isinstance(v, bool) or not isinstance(v, (int, float)) or v <= 0:
            fail("[earth] hole_min_mm must be a diameter in mm > 0", "hole_min_mm")
        proj.earth.hole_min_mm = float(v)
    if "kind" in earth:
        if earth["kind"] not in INSULATION_KINDS:
            fail(f"[earth] kind must be one of {', '.join(INSULATION_KINDS)}", "kind")
        proj.earth.kind = earth["kind"]

    stack = _table(data, "stackup", fail)
    if "thickness_mm" in stack:
        t = stack["thickness_mm"]
        if isinstance(t, bool) or not isinstance(t, (int, float)) or not 0.05 <= t <= 20:
            fail("[stackup] thickness_mm must be a board thickness in mm (0.05..20)",
                 "thickness_mm")
        proj.stackup_thickness_mm = float(t)
    if "copper_um" in stack:
        t = stack["copper_um"]
        if isinstance(t, bool) or not isinstance(t, (int, float)) or not 1 <= t <= 1000:
            fail("[stackup] copper_um must be a copper thickness in micrometres (1..1000)",
                 "copper_um")
        proj.stackup_copper_um = float(t)

    rules = _table(data, "rules", fail)
    if "ignore" in rules:
        v = rules["ignore"]
        if not isinstance(v, list) or not all(isinstance(x, str) for x in v):
            fail("[rules] ignore must be a list of rule ids", "ignore")
        proj.ignore_rules = list(v)
    return proj


def _more_environment(env: dict, e: Environment, fail) -> None:
    """The IEC 60664-1 keys of ``[environment]`` (issue 3 profile)."""
    if "standard" in env:
        if env["standard"] not in STANDARDS:
            fail(f"[environment] standard must be one of {', '.join(STANDARDS)}; got "
                 f"{env['standard']!r}", "standard")
        e.standard = env["standard"]
        e.explicit.add("standard")
    if "pollution_degree" in env:
        v = env["pollution_degree"]
        if isinstance(v, bool) or v not in (1, 2, 3):
            fail(f"[environment] pollution_degree must be 1, 2 or 3; got {v!r}",
                 "pollution_degree")
        e.pollution_degree = int(v)
        e.explicit.add("pollution_degree")
    if "material_group" in env and "cti" in env:
        fail("[environment] give material_group or cti, not both", "cti")
    if "material_group" in env:
        v = env["material_group"]
        if v not in MATERIAL_GROUPS:
            fail(f"[environment] material_group must be one of {', '.join(MATERIAL_GROUPS)}; "
                 f"got {v!r}", "material_group")
        e.material_group = v
        e.explicit.add("material_group")
    if "cti" in env:
        v = env["cti"]
        if isinstance(v, bool) or not isinstance(v, (int, float)) or not 0 < v <= 1000:
            fail(f"[environment] cti must be a comparative tracking index (V, 100..600); got "
                 f"{v!r}", "cti")
        if v < 100:
            fail("[environment] cti below 100 is outside the material groups of IEC 60664-1",
                 "cti")
        e.cti = float(v)
        e.material_group = ("I" if v >= 600 else "II" if v >= 400 else
                            "IIIa" if v >= 175 else "IIIb")
        e.explicit.add("material_group")
    if "overvoltage_category" in env:
        v = env["overvoltage_category"]
        if v not in OVERVOLTAGE_CATEGORIES:
            fail("[environment] overvoltage_category must be one of "
                 f"{', '.join(OVERVOLTAGE_CATEGORIES)}; got {v!r}", "overvoltage_category")
        e.overvoltage_category = v
        e.explicit.add("overvoltage_category")
    if "interpolate" in env:
        if not isinstance(env["interpolate"], bool):
            fail("[environment] interpolate must be true or false", "interpolate")
        e.interpolate = env["interpolate"]
        e.explicit.add("interpolate")
    if "creepage_columns" in env:
        if env["creepage_columns"] not in ("material-group", "printed-wiring"):
            fail("[environment] creepage_columns must be material-group or printed-wiring; "
                 f"got {env['creepage_columns']!r}", "creepage_columns")
        e.creepage_columns = env["creepage_columns"]
        e.explicit.add("creepage_columns")
    known = {"altitude_m", "coating", "standard", "pollution_degree", "material_group", "cti",
             "overvoltage_category", "interpolate", "creepage_columns"}
    extra = set(env) - known
    if extra:
        fail(f"[environment] unknown key(s) {', '.join(sorted(extra))}; expected "
             f"{', '.join(sorted(known))}", sorted(extra)[0])


def _table(data: dict, name: str, fail) -> dict:
    v = data.get(name, {})
    if not isinstance(v, dict):
        fail(f"[{name}] must be a table", name)
    return v


def _environment_assumptions(proj: Project) -> None:
    env = proj.environment
    if "altitude_m" not in env.explicit:
        proj.assumptions.append(Assumption(
            "environment", "altitude not given: assumed 0 m (sea level)"))
    if "coating" not in env.explicit:
        proj.assumptions.append(Assumption(
            "environment", "coating not given: assumed none (bare copper)"))
