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

Switching and parts (power-loop rule)::

    [switching]
    di_dt_a_per_ns = 1.0      # or current_a + switch_time_ns (A, ns)
    derating = 0.8            # peak voltage / switch rating allowed (fraction)
    warn_nh = 20              # warn above this loop inductance (nH)
    all_loops = false         # report every capacitor's loop, not only each leg's smallest
    [parts.Q1]
    kind = "mosfet"           # mosfet | igbt | capacitor | resistor | diode | driver | other
    package = "TO-247"        # looked up in rules/packages.toml
    pins = { G = "1", D = "2", S = "3" }   # role -> pad (IGBT: G, C, E; capacitor: +, -)
    vds_max_v = 600           # switch voltage rating, V
    coss_pf = 110             # output capacitance at the bus voltage, pF
    internal_nh = 0           # overrides the package table, nH
    [legs.A]                  # name the legs instead of finding them
    capacitor = "C3"          # optional: every capacitor across the bus when left out
    high = "Q1"
    low = "Q2"
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
PART_KINDS = ("mosfet", "igbt", "capacitor", "resistor", "diode", "driver", "other")
#: Pin roles a ``[parts.<ref>] pins`` table may name, per kind (``None``: kind not given).
PIN_ROLES = {"mosfet": ("G", "D", "S"), "igbt": ("G", "C", "E"), "capacitor": ("+", "-"),
             None: ("G", "D", "S", "C", "E", "+", "-")}
#: Default derating of a switch's voltage rating: the peak may reach 80 % of it
#: (power-layout notes VD-1 / PL-1 [N], common practice).
DEFAULT_DERATING = 0.8
#: Default loop inductance above which the power-loop rule warns (nH).  Common practice:
#: the notes (PL-1 [A, M]) put TO-220/247 loops on two-layer boards at 20-70 nH and
#: D2PAK loops at 5-15 nH, so 20 nH marks where a through-hole layout starts to cost.
DEFAULT_WARN_NH = 20.0


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
class Switching:
    """``[switching]``: how fast the current commutates and how much margin is wanted.

    di_dt_a_per_ns: A/ns, or ``current_a`` (A) over ``switch_time_ns`` (ns).
    derating: fraction of the switch rating the peak may reach.  warn_nh: nH.
    ``explicit`` holds the keys the file actually gave.
    """

    di_dt_a_per_ns: float | None = None
    current_a: float | None = None
    switch_time_ns: float | None = None
    derating: float = DEFAULT_DERATING
    warn_nh: float = DEFAULT_WARN_NH
    all_loops: bool = False
    explicit: set[str] = field(default_factory=set)

    def di_dt(self) -> float | None:
        """The commutation di/dt in A/ns the file gives (directly or as current / time),
        or ``None`` when it gives none."""
        if self.di_dt_a_per_ns is not None:
            return self.di_dt_a_per_ns
        if self.current_a is not None and self.switch_time_ns is not None:
            return self.current_a / self.switch_time_ns
        return None


@dataclass
class PartSpec:
    """``[parts.<ref>]``: what the files may not say about one part.

    kind: one of :data:`PART_KINDS`.  pins: role (``G``/``D``/``S``, ``G``/``C``/``E``,
    ``+``/``-``) -> pad number.  vds_max_v: V.  coss_pf: pF.  internal_nh: nH.
    line: the line of the table in the project file, for messages.
    """

    ref: str
    kind: str | None = None
    package: str | None = None
    pins: dict[str, str] = field(default_factory=dict)
    vds_max_v: float | None = None
    coss_pf: float | None = None
    internal_nh: float | None = None
    line: int | None = None


@dataclass
class LegSpec:
    """``[legs.<name>]``: a half-bridge leg named in the project file (part references)."""

    name: str
    high: str
    low: str
    capacitor: str | None = None
    line: int | None = None


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
    switching: Switching = field(default_factory=Switching)
    parts: dict[str, PartSpec] = field(default_factory=dict)
    legs: dict[str, LegSpec] = field(default_factory=dict)
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
    for key, attr, lo, hi, what in (
            ("thickness_mm", "stackup_thickness_mm", 0.05, 20, "a board thickness in mm"),
            ("copper_um", "stackup_copper_um", 1, 1000, "a copper thickness in micrometres")):
        if key in stack:
            t = stack[key]
            if not _in_range(t, lo, hi):
                fail(f"[stackup] {key} must be {what} ({lo:g}..{hi:g})", key)
            setattr(proj, attr, float(t))

    rules = _table(data, "rules", fail)
    if "ignore" in rules:
        v = rules["ignore"]
        if not isinstance(v, list) or not all(isinstance(x, str) for x in v):
            fail("[rules] ignore must be a list of rule ids", "ignore")
        proj.ignore_rules = list(v)
    _switching_keys(data, proj, where, text)
    return proj


# -- [switching], [parts.<ref>], [legs.<name>] ----------------------------------------------

_SWITCHING_KEYS = ("di_dt_a_per_ns", "current_a", "switch_time_ns", "derating", "warn_nh",
                   "all_loops")
_PART_KEYS = ("kind", "package", "pins", "vds_max_v", "coss_pf", "internal_nh")
_LEG_KEYS = ("capacitor", "high", "low")


def table_key_line(text: str, table: tuple[str, ...], key: str | None = None) -> int | None:
    """1-based line of ``key`` inside the TOML table ``table`` (e.g. ``("parts", "Q1")``),
    or of the table's header when ``key`` is ``None`` or not found there.

    Looks for a ``[a.b]`` header (names bare or quoted), then for ``key =`` before the next
    header; falls back to the first line that mentions the table's last name.
    """
    if not text:
        return None
    lines = text.splitlines()
    name = r"\s*\.\s*".join(r'(?:"%s"|\'%s\'|%s)' % (re.escape(t), re.escape(t), re.escape(t))
                            for t in table)
    head = re.compile(r"^\s*\[\s*" + name + r"\s*\]")
    start = next((n for n, ln in enumerate(lines) if head.match(ln)), None)
    if start is None:
        last = table[-1]
        for n, ln in enumerate(lines):
            if re.search(r"(^|[\s.\"'])" + re.escape(last) + r"([\s.\"'=]|$)", ln):
                return n + 1
        return None
    if key is None:
        return start + 1
    kre = re.compile(r'^\s*(?:"%s"|%s)\s*=' % (re.escape(key), re.escape(key)))
    for n in range(start + 1, len(lines)):
        if re.match(r"^\s*\[", lines[n]):
            break
        if kre.match(lines[n]):
            return n + 1
    return start + 1


def _number(v, lo=None, lo_open=True, hi=None) -> bool:
    if isinstance(v, bool) or not isinstance(v, (int, float)) or v != v:
        return False
    if lo is not None and (v <= lo if lo_open else v < lo):
        return False
    return hi is None or v <= hi


def _switching_keys(data: dict, proj: Project, where: str, text: str) -> None:
    """Parse and check ``[switching]``, ``[parts.<ref>]`` and ``[legs.<name>]``."""

    def fail(msg, table, key=None):
        raise ProjectFileError(msg, file=where, line=table_key_line(text, table, key))

    sw = data.get("switching", {})
    if not isinstance(sw, dict):
        fail("[switching] must be a table", ("switching",))
    extra = sorted(set(sw) - set(_SWITCHING_KEYS))
    if extra:
        fail(f"[switching] unknown key(s) {', '.join(extra)}; expected "
             f"{', '.join(_SWITCHING_KEYS)}", ("switching",), extra[0])
    s = proj.switching
    for key, lo, unit in (("di_dt_a_per_ns", 0, "A/ns"), ("current_a", 0, "A"),
                          ("switch_time_ns", 0, "ns"), ("warn_nh", 0, "nH")):
        if key in sw:
            if not _number(sw[key], lo):
                fail(f"[switching] {key} must be a number > 0 ({unit}); got {sw[key]!r}",
                     ("switching",), key)
            setattr(s, key, float(sw[key]))
            s.explicit.add(key)
    if "derating" in sw:
        if not _number(sw["derating"], 0, hi=1):
            fail("[switching] derating must be a fraction of the rating, 0 < derating <= 1 "
                 f"(0.8 for 80 %); got {sw['derating']!r}", ("switching",), "derating")
        s.derating = float(sw["derating"])
        s.explicit.add("derating")
    if "all_loops" in sw:
        if not isinstance(sw["all_loops"], bool):
            fail("[switching] all_loops must be true or false", ("switching",), "all_loops")
        s.all_loops = sw["all_loops"]
        s.explicit.add("all_loops")
    if "di_dt_a_per_ns" in sw and ({"current_a", "switch_time_ns"} & set(sw)):
        fail("[switching] give di_dt_a_per_ns, or current_a with switch_time_ns, not both",
             ("switching",), "current_a")
    if ("current_a" in sw) != ("switch_time_ns" in sw):
        missing = "switch_time_ns" if "current_a" in sw else "current_a"
        fail(f"[switching] current_a and switch_time_ns go together; {missing} is missing",
             ("switching",), "current_a" if "current_a" in sw else "switch_time_ns")

    parts = data.get("parts", {})
    if not isinstance(parts, dict) or not all(isinstance(v, dict) for v in parts.values()):
        fail("[parts] must hold one table per part reference, e.g. [parts.Q1]", ("parts",))
    for ref, entry in parts.items():
        tb = ("parts", ref)
        extra = sorted(set(entry) - set(_PART_KEYS))
        if extra:
            fail(f"[parts.{ref}] unknown key(s) {', '.join(extra)}; expected "
                 f"{', '.join(_PART_KEYS)}", tb, extra[0])
        spec = PartSpec(ref, line=table_key_line(text, tb))
        if "kind" in entry:
            if entry["kind"] not in PART_KINDS:
                fail(f"[parts.{ref}] kind must be one of {', '.join(PART_KINDS)}; got "
                     f"{entry['kind']!r}", tb, "kind")
            spec.kind = entry["kind"]
        if "package" in entry:
            if not isinstance(entry["package"], str) or not entry["package"].strip():
                fail(f"[parts.{ref}] package must be a package name such as \"TO-247\"",
                     tb, "package")
            spec.package = entry["package"]
        if "pins" in entry:
            pins = entry["pins"]
            roles = PIN_ROLES.get(spec.kind, ())
            if not isinstance(pins, dict) or not pins:
                fail(f"[parts.{ref}] pins must map roles to pads, e.g. "
                     '{ G = "1", D = "2", S = "3" }', tb, "pins")
            for role, pad in pins.items():
                if role not in roles:
                    allowed = ", ".join(roles) if roles else "none (pins are not used for " \
                        f"kind {spec.kind!r})"
                    fail(f"[parts.{ref}] pins: role {role!r} is not one of {allowed}", tb,
                         "pins")
                if isinstance(pad, bool) or not isinstance(pad, (str, int)) or \
                        not str(pad).strip():
                    fail(f"[parts.{ref}] pins: role {role} must name a pad (a string such "
                         f'as "2"); got {pad!r}', tb, "pins")
            pads = [str(p) for p in pins.values()]
            if len(set(pads)) != len(pads):
                fail(f"[parts.{ref}] pins: one pad is given two roles", tb, "pins")
            spec.pins = {r: str(p) for r, p in pins.items()}
        for key, lo_open, unit in (("vds_max_v", True, "V"), ("coss_pf", True, "pF"),
                                   ("internal_nh", False, "nH")):
            if key in entry:
                if not _number(entry[key], 0, lo_open=lo_open):
                    rel = "> 0" if lo_open else ">= 0"
                    fail(f"[parts.{ref}] {key} must be a number {rel} ({unit}); got "
                         f"{entry[key]!r}", tb, key)
                setattr(spec, key, float(entry[key]))
        proj.parts[ref] = spec

    legs = data.get("legs", {})
    if not isinstance(legs, dict) or not all(isinstance(v, dict) for v in legs.values()):
        fail("[legs] must hold one table per leg, e.g. [legs.A] with high, low and "
             "optionally capacitor", ("legs",))
    for name, entry in legs.items():
        tb = ("legs", name)
        extra = sorted(set(entry) - set(_LEG_KEYS))
        if extra:
            fail(f"[legs.{name}] unknown key(s) {', '.join(extra)}; expected "
                 f"{', '.join(_LEG_KEYS)}", tb, extra[0])
        for key in ("high", "low"):
            if key not in entry:
                fail(f"[legs.{name}] needs {key} = \"<part reference>\"", tb)
        for key in _LEG_KEYS:
            if key in entry and (not isinstance(entry[key], str) or not entry[key].strip()):
                fail(f"[legs.{name}] {key} must be a part reference (a string); got "
                     f"{entry[key]!r}", tb, key)
        if entry["high"] == entry["low"]:
            fail(f"[legs.{name}] high and low are the same part {entry['high']!r}", tb, "low")
        proj.legs[name] = LegSpec(name, entry["high"], entry["low"], entry.get("capacitor"),
                                  table_key_line(text, tb))


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


def _in_range(v, lo: float, hi: float) -> bool:
    """True for a real number (not a bool) with lo <= v <= hi."""
    return not isinstance(v, bool) and isinstance(v, (int, float)) and lo <= v <= hi


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
