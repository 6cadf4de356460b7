"""IEC 60664-1 clearance and creepage look-ups over ``rules/iec60664-1.toml``.

Units: volts in (V peak for impulses and steady-state peaks, V rms for creepage; a DC
working voltage counts as its RMS value), millimetres out, metres for altitude.

The TOML file (installed as ``layoutcheck/_rules/``) holds Tables F.1 (impulse voltage),
F.2 (clearance), F.7a (steady-state clearance), F.4 / ed. 3.0 F.5 (creepage), groove width
X, altitude factors and CTI groups, with the provenance of every value: the standard was not
at hand, so each value was read in a second-hand reproduction or is recalled from memory,
and every basis line says which.  Each look-up returns a small dataclass with the value, a
``basis`` line naming table, row, column and source, and the chained ``steps``.  Options
given as strings are checked against their lists (:func:`check_option`).
"""
from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass, replace
from functools import lru_cache
from pathlib import Path

from ..errors import LayoutcheckError, UsageError
from .spacing import rules_dir

POLLUTION_DEGREES = (1, 2, 3)
FIELDS = ("inhomogeneous", "homogeneous")
INSULATIONS = ("functional", "basic", "supplementary", "reinforced")
OVERVOLTAGE_CATEGORIES = ("I", "II", "III", "IV")
MATERIAL_GROUPS = ("I", "II", "IIIa", "IIIb")
_TOL = 1e-9


# -- results ---------------------------------------------------------------------------
@dataclass(frozen=True)
class Spacing:
    """A required distance.

    mm:          the minimum distance in millimetres.
    basis:       one line naming the table, row, column, value and source that governs.
    steps:       every basis line, in order, when several steps are chained.
    warnings:    things the user should know (a material not recommended, ...).
    from_memory: True when any value used is recalled from memory, not read in a source.
    """

    mm: float
    basis: str
    steps: tuple[str, ...] = ()
    warnings: tuple[str, ...] = ()
    from_memory: bool = False


@dataclass(frozen=True)
class Impulse:
    """A rated impulse voltage ``volts`` (V peak) from Table F.1, with its basis."""

    volts: float
    basis: str
    row_v: float
    category: str
    from_memory: bool = False


@dataclass(frozen=True)
class Factor:
    """A dimensionless factor (the altitude correction) with its basis."""

    factor: float
    basis: str
    from_memory: bool = False


@dataclass(frozen=True)
class Group:
    """A material group (``I``, ``II``, ``IIIa``, ``IIIb``) with its basis."""

    group: str
    basis: str


# -- the tables ------------------------------------------------------------------------
@dataclass(frozen=True)
class Prov:
    """Where a value came from: from memory or read, which sources, how sure."""

    from_memory: bool
    sources: tuple[str, ...]
    confidence: str

    def text(self) -> str:
        if self.from_memory:
            head = "from memory" + (", confirmed in part by " + "; ".join(self.sources)
                                    if self.sources else "")
        else:
            head = "second-hand: " + "; ".join(self.sources)
        return f"[{head}; confidence {self.confidence}]"


@dataclass(frozen=True)
class Row:
    key: float            # the row's voltage (V or kV), altitude (m) or pollution degree
    values: dict          # column -> value (None where the table has no value)
    prov: Prov
    note: str = ""


@dataclass(frozen=True)
class IecTables:
    """The loaded ``iec60664-1.toml`` (see that file for the meaning of each part)."""

    path: Path
    verified: bool
    titles: dict          # part -> table citation
    impulse: tuple
    preferred_v: tuple
    clearance: tuple
    pwb_floor_mm: float
    pwb_prov: Prov
    steady: tuple
    creepage: tuple
    iiib: tuple           # (text, above_v, Prov)
    rules: dict           # name -> (rule text, Prov, raw table)
    groove: dict          # pd -> x mm
    groove_rule: tuple    # (below_mm, fraction)
    groove_prov: Prov
    altitude: tuple
    altitude_prov: Prov
    groups: tuple         # ((group, min_cti), ...) highest first
    groups_prov: Prov


@lru_cache(maxsize=None)
def tables() -> IecTables:
    """Load and check ``iec60664-1.toml`` (cached).

    Raises :class:`layoutcheck.errors.LayoutcheckError` naming the file when it is missing
    or malformed (a broken installation, not a user input).
    """
    path = rules_dir() / "iec60664-1.toml"
    try:
        return _build(tomllib.loads(path.read_text(encoding="utf-8")), path)
    except OSError as e:
        raise LayoutcheckError(f"cannot read the IEC 60664-1 tables: {e.strerror}",
                               file=str(path)) from e
    except (tomllib.TOMLDecodeError, KeyError, TypeError, ValueError, IndexError) as e:
        raise LayoutcheckError(f"malformed IEC 60664-1 tables: {type(e).__name__}: {e!s}",
                               file=str(path)) from e


def _build(d: dict, path: Path) -> IecTables:
    short = {k: str(v["short"]) for k, v in d["sources"].items()}

    def prov(t: dict, memory_default: bool | None = None) -> Prov:
        mem = t.get("from_memory", memory_default)
        srcs = t.get("sources", t.get("confirmed_by", []))
        return Prov(bool(mem), tuple(short[s] for s in srcs), str(t["confidence"]))

    def rows(part: dict, key: str, vals: str, columns, memory_default=None,
             conf=None) -> tuple:
        out = []
        for r in part["rows"]:
            if len(r[vals]) != len(columns):
                raise ValueError(f"row {r[key]} has {len(r[vals])} values for "
                                 f"{len(columns)} columns")
            v = {c: (None if x == "-" else float(x)) for c, x in zip(columns, r[vals])}
            p = prov({**({"confidence": conf} if conf else {}), **r}, memory_default)
            out.append(Row(float(r[key]), v, p, str(r.get("note", ""))))
        keys = [r.key for r in out]
        if any(b <= a for a, b in zip(keys, keys[1:])):
            raise ValueError(f"rows of {part['table']} must rise strictly")
        for c in columns:
            seq = [r.values[c] for r in out if r.values[c] is not None]
            if any(x < 0 for x in seq) or any(b < a for a, b in zip(seq, seq[1:])):
                raise ValueError(f"column {c} of {part['table']} must never decrease")
        return tuple(out)

    imp, clr, st, cr = d["impulse"], d["clearance"], d["steady_state"], d["creepage"]
    alt, grv, mg = d["altitude"], d["groove"], d["material_groups"]
    n = d["creepage"]["iiib_pd3_note"]
    groups = sorted(((str(g["group"]), float(g["min_cti"])) for g in mg["groups"]),
                    key=lambda g: -g[1])
    if tuple(sorted(g for g, _ in groups)) != tuple(sorted(MATERIAL_GROUPS)):
        raise ValueError("material groups must be I, II, IIIa, IIIb")
    alt_rows = tuple(Row(float(r["m"]), {"factor": float(r["factor"])}, prov(alt))
                     for r in alt["rows"])
    if alt_rows[0].values["factor"] != 1.0 or any(
            b.key <= a.key or b.values["factor"] < a.values["factor"]
            for a, b in zip(alt_rows, alt_rows[1:])):
        raise ValueError("altitude rows must start at factor 1.00 and rise")
    return IecTables(
        path=path, verified=bool(d["standard"].get("verified", False)),
        titles={"F.1": imp["table"], "F.2": clr["table"], "F.7a": st["table"],
                "F.4": cr["table"], "groove": grv["table"], "altitude": alt["table"],
                "groups": mg["table"]},
        impulse=rows(imp, "upto_v", "v", imp["columns"]),
        preferred_v=tuple(float(v) for v in imp["preferred_v"]),
        clearance=rows(clr, "kv", "mm", clr["columns"], clr["from_memory"]),
        pwb_floor_mm=float(clr["printed_wiring_pd2"]["floor_mm"]),
        pwb_prov=prov(clr["printed_wiring_pd2"]),
        steady=rows(st, "kv", "mm", st["columns"], st["from_memory"], st["confidence"]),
        creepage=rows(cr, "v", "mm", cr["columns"]),
        iiib=(str(n["text"]), float(n["above_v"]), prov(n)),
        rules={k: (str(v["rule"]), prov(v), v) for k, v in d["rules"].items()},
        groove={int(r["pd"]): float(r["x_mm"]) for r in grv["rows"]},
        groove_rule=(float(grv["small_clearance_below_mm"]),
                     float(grv["small_clearance_fraction"])),
        groove_prov=prov(grv), altitude=alt_rows, altitude_prov=prov(alt),
        groups=tuple(groups), groups_prov=prov(mg))


# -- option checks ---------------------------------------------------------------------
_OPTIONS = {"pollution degree": POLLUTION_DEGREES, "material group": MATERIAL_GROUPS,
            "insulation": INSULATIONS, "overvoltage category": OVERVOLTAGE_CATEGORIES,
            "field": FIELDS}


def check_option(name: str, value):
    """``value`` of option ``name`` in its canonical spelling, or UsageError naming the
    valid choices.  Options: ``"pollution degree"`` (1, 2, 3; "2" is accepted),
    ``"material group"`` (I, II, IIIa, IIIb), ``"insulation"`` (functional, basic,
    supplementary, reinforced), ``"overvoltage category"`` (I-IV), ``"field"``
    (inhomogeneous = case A, homogeneous = case B).  Words are matched without case."""
    choices = _OPTIONS[name]
    if not isinstance(value, bool):
        for c in choices:
            if isinstance(c, int) and (value == c or (isinstance(value, str)
                                                      and value.strip() == str(c))):
                return c
            if isinstance(c, str) and isinstance(value, str) \
                    and value.strip().lower() == c.lower():
                return c
    raise UsageError(f"{name} must be one of {', '.join(str(c) for c in choices)}; "
                     f"got {value!r}")


def _number(name: str, v) -> float:
    try:
        x = float(v)
    except (TypeError, ValueError):
        x = math.nan
    if isinstance(v, bool) or not math.isfinite(x):
        raise UsageError(f"{name} must be a finite number; got {v!r}")
    return x


def _g(x: float) -> str:
    return f"{round(x, 6):g}"


def _mm(x: float) -> str:
    """A length for a basis line: ``0.04``, ``1.5``, ``8.0`` (at least one decimal)."""
    s = _g(x)
    return s if ("." in s or "e" in s) else s + ".0"


def _pick(rows: tuple, x: float, interpolate: bool, what: str, table: str,
          unit: str, col: str | None = None) -> tuple:
    """(lo row, hi row, t, how): the next row up, or the two rows to interpolate between."""
    usable = [r for r in rows if col is None or r.values[col] is not None]
    top = usable[-1].key
    if x > top * (1 + _TOL):
        raise UsageError(f"{what} {_g(x)} {unit} is above the last row of {table} "
                         f"({_g(top)} {unit}); no value can be given")
    first = usable[0]
    if x <= first.key * (1 + _TOL):
        how = ("the row itself" if abs(x - first.key) <= _TOL * max(1.0, x)
               else f"first row; {_g(x)} {unit} is below it")
        return first, first, 0.0, how
    for i, r in enumerate(usable):
        if x <= r.key * (1 + _TOL):
            if abs(x - r.key) <= _TOL * max(1.0, x):
                return r, r, 0.0, "the row itself"
            if not interpolate:
                return r, r, 0.0, f"next row up from {_g(x)} {unit}"
            lo = usable[i - 1]
            return lo, r, (x - lo.key) / (r.key - lo.key), "interpolated"
    raise AssertionError("unreachable")


# -- Table F.1 -------------------------------------------------------------------------
def rated_impulse_v(nominal_v: float, ovc: str = "II") -> Impulse:
    """Rated impulse voltage (V peak) from Table F.1.

    Parameters
    ----------
    nominal_v:
        Line-to-neutral (or line-to-earth) voltage derived from the nominal AC or DC supply,
        volts (taken by magnitude).  The row is the first whose voltage is at or above it
        ("up to and including").  Above 1000 V: UsageError (the ed. 3.0 1500 V DC rows are
        not known).
    ovc:
        Overvoltage category ``I``, ``II``, ``III`` or ``IV``.
    """
    t = tables()
    ovc = check_option("overvoltage category", ovc)
    v = abs(_number("nominal voltage", nominal_v))
    lo, _, _, how = _pick(t.impulse, v, False, "nominal line-to-neutral voltage",
                          t.titles["F.1"], "V")
    volts = lo.values[ovc]
    note = f"; {lo.note}" if lo.note else ""
    basis = (f"{t.titles['F.1']}, row up to {_g(lo.key)} V ({how}), overvoltage category "
             f"{ovc}: rated impulse {_g(volts)} V {lo.prov.text()}{note}")
    return Impulse(volts, basis, lo.key, ovc, lo.prov.from_memory)


def preferred_impulse_series() -> tuple[float, ...]:
    """The preferred series of rated impulse voltages (V peak), lowest first."""
    return tables().preferred_v


# -- clearance -------------------------------------------------------------------------
def _reinforced_impulse(u: float, steps: list) -> float:
    t = tables()
    pref = t.preferred_v
    i = next((k for k, p in enumerate(pref) if abs(p - u) <= _TOL * p), None)
    if i is not None and i + 1 < len(pref):
        rule, p, _ = t.rules["reinforced_clearance_step"]
        steps.append(f"reinforced insulation: {_g(u)} V is a preferred impulse value, the "
                     f"next higher step {_g(pref[i + 1])} V is used ({rule}) {p.text()}")
        return pref[i + 1]
    rule, p, raw = t.rules["reinforced_clearance_percent"]
    why = ("is the top of the preferred series" if i is not None
           else "is not a preferred impulse value")
    out = u * float(raw["percent"]) / 100.0
    steps.append(f"reinforced insulation: {_g(u)} V {why}; {_g(float(raw['percent']))} % "
                 f"of it = {_g(out)} V is used ({rule}) {p.text()}")
    return out


def _lookup(rows, x, interpolate, col, what, table, unit) -> tuple[float, str, Row, Row]:
    """(value, how it was read, lower row, upper row) from column ``col``."""
    lo, hi, tt, how = _pick(rows, x, interpolate, what, table, unit, col)
    if lo is hi:
        return lo.values[col], f"row {_g(lo.key)} {unit} ({how})", lo, hi
    a, b = lo.values[col], hi.values[col]
    val = a + tt * (b - a)
    text = (f"linear interpolation between rows {_g(lo.key)} {unit} ({_mm(a)} mm) and "
            f"{_g(hi.key)} {unit} ({_mm(b)} mm) at {_g(x)} {unit}")
    return val, text, lo, hi


def _impulse_part(u: float, pd: int, case: str, printed_wiring: bool, kind: str,
                  interpolate: bool, steps: list) -> tuple[float, str, bool]:
    t = tables()
    if kind == "functional":
        steps.append(f"functional insulation: dimensioned for the impulse expected across "
                     f"the gap, {_g(u)} V as given")
    if kind == "reinforced":
        u = _reinforced_impulse(u, steps)
    pwb = printed_wiring and pd == 2
    col = f"{case}-PD{1 if pwb else pd}"
    cdesc = (f"case {case}, pollution degree "
             + ("1 column for printed wiring in pollution degree 2" if pwb else str(pd)))
    val, how, lo, hi = _lookup(t.clearance, u / 1000.0, interpolate, col,
                              "impulse voltage", t.titles["F.2"], "kV")
    line = (f"{t.titles['F.2']}, impulse {_g(u)} V: {how}, {cdesc}: {_mm(val)} mm "
            f"{hi.prov.text()}" + (f"; {hi.note}" if hi.note else ""))
    steps.append(line)
    memory = hi.prov.from_memory or lo.prov.from_memory or kind == "reinforced"
    if pwb and val < t.pwb_floor_mm:
        steps.append(f"printed wiring in pollution degree 2: the pollution degree 1 value "
                     f"{_mm(val)} mm is raised to the {_mm(t.pwb_floor_mm)} mm floor (Table "
                     f"F.2 footnote) {t.pwb_prov.text()}")
        val = t.pwb_floor_mm
    if interpolate:
        steps.append("interpolation of clearances is allowed only for circuits not "
                     "directly exposed to mains transients (Table F.2 footnote)")
    return val, line, memory


def _steady_part(pk: float, case: str, kind: str, interpolate: bool,
                 steps: list) -> tuple[float, str, bool]:
    t = tables()
    if kind == "reinforced":
        _, p, raw = t.rules["reinforced_clearance_percent"]
        new = pk * float(raw["percent"]) / 100.0
        steps.append(f"reinforced insulation: steady-state peak {_g(pk)} V x "
                     f"{_g(float(raw['percent']))} % = {_g(new)} V {p.text()}")
        pk = new
    val, how, lo, hi = _lookup(t.steady, pk / 1000.0, interpolate, case,
                               "peak working voltage", t.titles["F.7a"], "kV")
    line = (f"{t.titles['F.7a']}, steady-state peak {_g(pk)} V: {how}, case {case}: "
            f"{_mm(val)} mm {hi.prov.text()}")
    steps.append(line)
    return val, line, lo.prov.from_memory or hi.prov.from_memory


def clearance_mm(impulse_v: float | None = None, peak_working_v: float | None = None,
                 pollution_degree: int = 2, field: str = "inhomogeneous",
                 printed_wiring: bool = True, insulation: str = "basic",
                 altitude_m: float = 0.0, interpolate: bool = False) -> Spacing:
    """Minimum clearance (mm) per IEC 60664-1: ``max(F.2, F.7a) x altitude factor``.

    * impulse part, Table F.2 for ``impulse_v`` (V peak): the next row up unless
      ``interpolate`` (allowed for circuits not directly exposed to mains transients).
      Reinforced: the next higher preferred impulse step, or 160 % when the impulse is not
      a preferred value (from memory).  Functional insulation: pass the impulse expected
      across the gap.  Printed wiring in pollution degree 2: the pollution degree 1 column,
      not less than 0.04 mm (Table F.2 footnote).
    * steady-state part, ed. 2.0 Table F.7a (from memory, low-medium confidence) for
      ``peak_working_v``: the peak (V) of the working voltage, temporary overvoltage or
      recurring peak; reinforced 160 %.
    * altitude factor (:func:`altitude_factor`) for ``altitude_m`` metres.

    At least one voltage must be given.  ``pollution_degree`` 1-3; ``field``
    ``"inhomogeneous"`` (case A, default; no impulse test needed) or ``"homogeneous"``
    (case B, to be verified by an impulse test); ``printed_wiring`` True for a gap on
    printed wiring material; ``insulation`` functional, basic, supplementary or reinforced.
    """
    t = tables()
    pd = check_option("pollution degree", pollution_degree)
    case = "A" if check_option("field", field) == "inhomogeneous" else "B"
    kind = check_option("insulation", insulation)
    alt = _number("altitude", altitude_m)
    if impulse_v is None and peak_working_v is None:
        raise UsageError("clearance needs an impulse voltage or a peak working voltage (V)")
    steps: list[str] = [f"case {case} = {'in' if case == 'A' else ''}homogeneous field"]
    parts = []
    if impulse_v is not None:
        u = abs(_number("impulse voltage", impulse_v))
        parts.append(_impulse_part(u, pd, case, printed_wiring, kind, interpolate, steps))
    if peak_working_v is not None:
        pk = abs(_number("peak working voltage", peak_working_v))
        parts.append(_steady_part(pk, case, kind, interpolate, steps))
    gov_mm, gov_line, _ = max(parts, key=lambda p: p[0])
    if len(parts) == 2:
        _, p, _ = t.rules["clearance_selection"]
        which = "impulse" if parts[0][0] >= parts[1][0] else "steady-state"
        steps.append(f"clearance = larger of the impulse ({_mm(parts[0][0])} mm) and "
                     f"steady-state ({_mm(parts[1][0])} mm) requirements: {_mm(gov_mm)} mm, "
                     f"{which} governs {p.text()}")
    f = altitude_factor(alt)
    mm = round(gov_mm * f.factor, 6)
    steps.append(f.basis)
    tail = ""
    if f.factor != 1.0:
        tail = f"; x altitude factor {_g(f.factor)} = {_mm(mm)} mm"
        steps.append(f"clearance {_mm(gov_mm)} mm x altitude factor {_g(f.factor)} = "
                     f"{_mm(mm)} mm")
    memory = any(p[2] for p in parts) or (f.from_memory and f.factor != 1.0)
    return Spacing(mm, gov_line + tail, tuple(steps), (), memory)


# -- creepage --------------------------------------------------------------------------
def _creepage_column(pd: int, grp: str, printed_wiring: bool, v: float,
                     steps: list) -> tuple[str, str]:
    """(column, words for it): the printed-wiring column where it applies, else general."""
    t = tables()
    base = "III" if grp.startswith("III") else grp
    general = "PD1" if pd == 1 else f"PD{pd}-{base}"
    words = ("pollution degree 1, all material groups" if pd == 1 else
             f"pollution degree {pd}, material group {base}"
             + (f", here {grp}" if base == "III" else ""))
    why = None
    if printed_wiring and pd == 3:
        why = ("printed wiring in pollution degree 3: the table has no printed-wiring "
               "column, the general pollution degree 3 column is used")
    elif printed_wiring and pd == 2 and grp == "IIIb":
        why = ("printed wiring in pollution degree 2 with material group IIIb: the printed-"
               "wiring column excludes IIIb, so the general pollution degree 2 group III "
               "column is used")
    elif printed_wiring:
        pwb = f"PWB-PD{pd}"
        top = max(r.key for r in t.creepage if r.values[pwb] is not None)
        if v <= top * (1 + _TOL):
            return pwb, (f"printed wiring material, pollution degree {pd}, all material "
                         f"groups" + (" except IIIb" if pd == 2 else ""))
        why = (f"printed wiring: the printed-wiring column stops at {_g(top)} V; above it "
               f"the general column {general} is used (our reading)")
    if why:
        steps.append(why)
    return general, words


def creepage_mm(rms_v: float, pollution_degree: int = 2, material_group: str = "IIIa",
                printed_wiring: bool = True, insulation: str = "basic",
                interpolate: bool = False) -> Spacing:
    """Minimum creepage distance (mm) per IEC 60664-1 ed. 2.0 Table F.4 (ed. 3.0 F.5).

    Row: the RMS working voltage ``rms_v`` (V, by magnitude, up to 10000 V; a DC working
    voltage counts as its RMS value).  By default the next row up (our tool default); with
    ``interpolate`` linear interpolation between the two nearest rows, rounded up to the
    next 0.1 mm as product standards do (never above the next row's value, which is always
    allowed).  Column: printed wiring in pollution degree 1 or 2 uses the printed-wiring
    columns (group IIIb in pollution degree 2 cannot: general group III column); otherwise
    the pollution degree (1-3) and material group (I, II, IIIa, IIIb; III covers IIIa and
    IIIb) column.  ``insulation``: reinforced = 2 x basic; supplementary = basic;
    functional = the basic value (our default reading).
    """
    t = tables()
    pd = check_option("pollution degree", pollution_degree)
    grp = check_option("material group", material_group)
    kind = check_option("insulation", insulation)
    v = abs(_number("RMS working voltage", rms_v))
    dc_rule, dc_prov, _ = t.rules["dc_as_rms"]
    steps = [f"creepage row chosen by the RMS working voltage {_g(v)} V ({dc_rule} "
             f"{dc_prov.text()})"]
    col, words = _creepage_column(pd, grp, printed_wiring, v, steps)
    lo, hi, tt, how = _pick(t.creepage, v, interpolate, "RMS working voltage",
                            t.titles["F.4"], "V", col)
    memory = lo.prov.from_memory or hi.prov.from_memory
    head = f"{t.titles['F.4']}, column {col} ({words})"
    if lo is hi:
        mm = lo.values[col]
        line = f"{head}, row {_g(lo.key)} V ({how}): {_mm(mm)} mm {lo.prov.text()}"
        steps.append(line)
    else:
        a, b = lo.values[col], hi.values[col]
        raw = a + tt * (b - a)
        _, p, rr = t.rules["creepage_interpolation"]
        step = float(rr["round_up_mm"])
        up = math.ceil(raw / step - 1e-6) * step
        mm = round(min(max(up, raw), b), 6)
        line = (f"{head}: linear interpolation at {_g(v)} V between rows {_g(lo.key)} V "
                f"({_mm(a)} mm) and {_g(hi.key)} V ({_mm(b)} mm) = {raw:.4f} mm "
                f"{lo.prov.text()}")
        what = f"rounded up to the next {_mm(step)} mm: {_mm(up)} mm" + (
            f", capped at the next row's value {_mm(b)} mm, which is always allowed (our "
            f"reading)" if up > b + _TOL else "")
        steps += [line, f"interpolation (asked for; the default is the next row up): "
                        f"{rr['where']}",
                  f"{what}; the round-up follows product-standard practice "
                  f"({rr['practice']}) {p.text()}"]
        memory = True
    basis = line
    if kind == "reinforced":
        rule, p, rr = t.rules["reinforced_creepage"]
        new = round(mm * float(rr["factor"]), 6)
        steps.append(f"reinforced insulation: {_g(float(rr['factor']))} x {_mm(mm)} mm = "
                     f"{_mm(new)} mm ({rule}) {p.text()}")
        basis += f"; reinforced x {_g(float(rr['factor']))} = {_mm(new)} mm"
        mm, memory = new, True
    elif kind != "basic":
        steps.append(f"{kind} insulation: the basic-insulation value is used"
                     + (" (our default reading)" if kind == "functional" else ""))
    warnings = []
    text, above, p = t.iiib
    if pd == 3 and grp == "IIIb" and v > above:
        warnings.append(f"{text} (working voltage {_g(v)} V) {p.text()}")
        steps.append("warning: " + warnings[-1])
    return Spacing(mm, basis, tuple(steps), tuple(warnings), memory)


def creepage_at_least_clearance(creepage: Spacing, clearance: Spacing) -> Spacing:
    """``creepage`` raised to ``clearance`` (mm) when smaller: a creepage distance may not
    be smaller than the associated clearance (IEC 60664-1, second-hand and from memory)."""
    if creepage.mm >= clearance.mm:
        return creepage
    rule, p, _ = tables().rules["creepage_at_least_clearance"]
    line = (f"creepage raised from {_mm(creepage.mm)} mm to the clearance "
            f"{_mm(clearance.mm)} mm: {rule} {p.text()}")
    return replace(creepage, mm=clearance.mm, basis=creepage.basis + "; " + line,
                   steps=creepage.steps + (line,),
                   from_memory=creepage.from_memory or clearance.from_memory)


# -- groove, altitude, material group --------------------------------------------------
def groove_width_x_mm(pollution_degree: int, clearance_mm: float | None = None) -> Spacing:
    """Minimum groove width X (mm): narrower grooves are bridged when measuring creepage.

    X by pollution degree (1: 0.25, 2: 1.0, 3: 1.5 mm); when the associated clearance
    ``clearance_mm`` (mm) is under 3 mm, X may be reduced to one third of it.
    """
    t = tables()
    pd = check_option("pollution degree", pollution_degree)
    x = t.groove[pd]
    line = (f"{t.titles['groove']}, pollution degree {pd}: X = {_mm(x)} mm "
            f"{t.groove_prov.text()}")
    steps = [line]
    if clearance_mm is not None:
        c = _number("clearance", clearance_mm)
        below, frac = t.groove_rule
        if 0 < c < below and c * frac < x:
            x = round(c * frac, 6)
            steps.append(f"the associated clearance {_mm(c)} mm is under {_mm(below)} mm: X "
                         f"reduced to one third of it, {_mm(x)} mm {t.groove_prov.text()}")
    return Spacing(x, "; ".join(steps), tuple(steps), (), t.groove_prov.from_memory)


def altitude_factor(altitude_m: float) -> Factor:
    """Clearance multiplier for altitude ``altitude_m`` (m); creepage is not corrected.

    1.00 at and below 2000 m; linear between the rows of ed. 2.0 Table A.2 (ed. 3.0
    Table F.10, values unverified) up to 20000 m; above: UsageError.
    """
    t = tables()
    a = _number("altitude", altitude_m)
    rows = t.altitude
    prov = t.altitude_prov.text()
    if a <= rows[0].key:
        return Factor(1.0, f"{t.titles['altitude']}: altitude {_g(a)} m is at or below "
                           f"{_g(rows[0].key)} m, clearance factor 1.00 {prov}", False)
    lo, hi, tt, how = _pick(rows, a, True, "altitude", t.titles["altitude"], "m", "factor")
    if lo is hi:
        f = lo.values["factor"]
        text = f"row {_g(lo.key)} m: clearance factor {f:.2f}"
    else:
        fa, fb = lo.values["factor"], hi.values["factor"]
        f = round(fa + tt * (fb - fa), 9)
        text = (f"altitude {_g(a)} m, linear between {_g(lo.key)} m ({fa:.2f}) and "
                f"{_g(hi.key)} m ({fb:.2f}): clearance factor {_g(f)} (interpolation is our "
                f"reading)")
    return Factor(f, f"{t.titles['altitude']}, {text}; clearances only {prov}",
                  t.altitude_prov.from_memory)


def material_group_from_cti(cti: float) -> Group:
    """Material group for a comparative tracking index ``cti`` (volts, IEC 60112).

    600 <= CTI: I; 400 <= CTI < 600: II; 175 <= CTI < 400: IIIa; 100 <= CTI < 175: IIIb.
    Below 100: UsageError (outside every group).
    """
    t = tables()
    c = _number("CTI", cti)
    for g, lo in t.groups:
        if c >= lo:
            return Group(g, f"{t.titles['groups']}: CTI {_g(c)} >= {_g(lo)}: material "
                            f"group {g} {t.groups_prov.text()}")
    raise UsageError(f"CTI {_g(c)} is below {_g(t.groups[-1][1])}, the lowest material "
                     f"group (IIIb); such a material is outside the creepage table")
