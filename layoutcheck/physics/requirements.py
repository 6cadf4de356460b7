"""Required clearance and creepage between two conductors under IPC-2221B, IEC 60664-1 or both.

Units: volts in, millimetres out, metres for altitude.

A :class:`SpacingProfile` says which standard applies and the conditions the standards ask
for (pollution degree, material group, overvoltage category, kind of insulation, altitude,
coating).  :func:`required_spacing` turns a working voltage into a :class:`Requirement`:

* ``"ipc2221b"`` -- IPC-2221B Table 6-1 (values from memory, see
  :mod:`layoutcheck.physics.spacing`).  IPC-2221B has one spacing and no separate creepage
  figure, so its value is used as both the clearance and the creepage.
* ``"iec60664-1"`` -- IEC 60664-1 (see :mod:`layoutcheck.physics.iec60664`):

  - clearance: the larger of the impulse requirement (Table F.2) and the steady-state
    requirement for the working-voltage peak (ed. 2.0 Table F.7a), times the altitude
    factor.  Unless the caller gives the impulse voltage, it is taken from Table F.1 with
    the working (DC bus) voltage as the nominal line-to-neutral voltage and the profile's
    overvoltage category -- **our default reading, an assumption** listed in the result.
    The steady-state peak is the working voltage.
  - creepage: Table F.4 (ed. 3.0 F.5) for the RMS working voltage (the working voltage when
    no RMS value is given; a DC voltage counts as its RMS value), never less than the
    clearance.
* ``"both"`` -- the larger of the two for each distance, naming which governs.
"""
from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import UsageError
from . import iec60664 as iec
from .spacing import COATINGS, ipc2221b_column, ipc2221b_spacing

STANDARDS = ("iec60664-1", "ipc2221b", "both")
IEC = "IEC 60664-1"
IPC = "IPC-2221B"


CREEPAGE_COLUMNS = ("material-group", "printed-wiring")


@dataclass(frozen=True)
class SpacingProfile:
    """Which standard applies and under what conditions.

    standard:             ``"iec60664-1"`` (default), ``"ipc2221b"`` or ``"both"``.
    pollution_degree:     1, 2 (default) or 3 (IEC 60664-1).
    material_group:       ``I``, ``II``, ``IIIa`` (default, usual FR-4) or ``IIIb``.
    overvoltage_category: ``I``, ``II`` (default), ``III`` or ``IV`` (IEC Table F.1).
    insulation:           ``functional``, ``basic`` (default), ``supplementary``,
                          ``reinforced``.
    altitude_m:           operating altitude in metres (default 0, up to 20000).
    coating:              ``none`` (default), ``solder-mask`` or ``conformal``; chooses the
                          IPC-2221B column, not credited under IEC 60664-1.
    interpolate:          interpolate between table rows instead of taking the next row up.
    field:                ``inhomogeneous`` (case A, default) or ``homogeneous`` (case B).
    printed_wiring:       the surface is printed wiring material (default True): the
                          Table F.2 printed-wiring footnote applies to clearances.
    creepage_columns:     ``material-group`` (default) or ``printed-wiring``: which columns
                          of Table F.4 (ed. 3.0 F.5) give creepage on printed wiring.  The
                          material-group columns are our conservative default; the
                          printed-wiring columns (smaller in pollution degree 2) are the
                          user's choice where the end-product standard allows them.

    Every option is checked on construction; a wrong one raises
    :class:`layoutcheck.errors.UsageError` naming the valid choices.
    """

    standard: str = "iec60664-1"
    pollution_degree: int = 2
    material_group: str = "IIIa"
    overvoltage_category: str = "II"
    insulation: str = "basic"
    altitude_m: float = 0.0
    coating: str = "none"
    interpolate: bool = False
    field: str = "inhomogeneous"
    printed_wiring: bool = True
    creepage_columns: str = "material-group"

    def __post_init__(self):
        if self.creepage_columns not in CREEPAGE_COLUMNS:
            raise UsageError(f"creepage columns must be one of {', '.join(CREEPAGE_COLUMNS)}; "
                             f"got {self.creepage_columns!r}")
        std = self.standard.strip().lower() if isinstance(self.standard, str) else None
        if std not in STANDARDS:
            raise UsageError(f"standard must be one of {', '.join(STANDARDS)}; got "
                             f"{self.standard!r}")
        if self.coating not in COATINGS:
            raise UsageError(f"coating must be one of {', '.join(COATINGS)}; got "
                             f"{self.coating!r}")
        alt = self.altitude_m
        if isinstance(alt, bool) or not isinstance(alt, (int, float)) \
                or not math.isfinite(alt) or not -500 <= alt <= 20000:
            raise UsageError(f"altitude must be a number of metres between -500 and 20000; "
                             f"got {alt!r}")
        fix = {
            "standard": std,
            "pollution_degree": iec.check_option("pollution degree", self.pollution_degree),
            "material_group": iec.check_option("material group", self.material_group),
            "overvoltage_category": iec.check_option("overvoltage category",
                                                     self.overvoltage_category),
            "insulation": iec.check_option("insulation", self.insulation),
            "field": iec.check_option("field", self.field),
            "altitude_m": float(alt),
        }
        for k, v in fix.items():
            object.__setattr__(self, k, v)


@dataclass(frozen=True)
class Requirement:
    """Required distances for one pair of conductors.

    clearance_mm, creepage_mm: the minimum distances in millimetres.
    basis:        every basis line, in order (tables, rows, columns, sources, choices).
    clearance_by: the standard that governs the clearance (``"IEC 60664-1"`` /
                  ``"IPC-2221B"``; ``"IEC 60664-1 = IPC-2221B"`` when they agree).
    creepage_by:  the same for the creepage.
    assumptions:  readings of ours that a user should confirm.
    warnings:     things the user should know (a material not recommended, ...).
    from_memory:  True when any value used is recalled from memory.
    """

    clearance_mm: float
    creepage_mm: float
    basis: tuple[str, ...]
    clearance_by: str
    creepage_by: str
    assumptions: tuple[str, ...] = ()
    warnings: tuple[str, ...] = ()
    from_memory: bool = False

    def brief(self, what: str) -> str:
        """The basis lines a reviewer quotes for ``what`` (``"clearance"`` or
        ``"creepage"``): the table, column and row lines and the governing choice, joined
        with "; ".  :attr:`basis` keeps the whole chain."""
        if what == "clearance":
            keys = ("Table F.1", "Table F.2", "Table F.7a", "Table 6-1", "next higher step",
                    "160 %")
            alt = [b for b in self.basis if "Table A.2" in b and "factor 1.00" not in b]
        elif what == "creepage":
            keys = ("Table F.4", "raised", "twice", "Table 6-1")
            alt = []
        else:
            raise UsageError(f"brief() takes 'clearance' or 'creepage', not {what!r}")
        picked = [b for b in self.basis
                  if (any(k in b for k in keys) and "creepage columns" not in b)
                  or b.startswith(f"{what}:")] + alt
        return "; ".join(picked or self.basis)


def _g(x: float) -> str:
    return f"{round(x, 6):g}"


def _mm(x: float) -> str:
    s = _g(x)
    return s if ("." in s or "e" in s) else s + ".0"


def _volts(name: str, v) -> float:
    try:
        x = float(v)
    except (TypeError, ValueError):
        x = math.nan
    if isinstance(v, bool) or not math.isfinite(x):
        raise UsageError(f"{name} must be a finite number of volts; got {v!r}")
    return abs(x)


def _ipc(profile: SpacingProfile, working_v: float, layer_outer: bool,
         termination: bool) -> tuple[float, list[str], bool]:
    col, why = ipc2221b_column(layer_outer, profile.coating, profile.altitude_m, termination)
    r = ipc2221b_spacing(working_v, col)
    lines = [f"{IPC} column: {why}", r.basis,
             f"{IPC} gives one spacing and no separate creepage figure: its value is used "
             f"for both the clearance and the creepage"]
    return r.mm, lines, "from memory" in r.basis


def _iec(profile: SpacingProfile, working_v: float, rms_v: float | None,
         impulse_v: float | None, layer_outer: bool):
    lines: list[str] = []
    assumptions: list[str] = []
    if impulse_v is None:
        try:
            imp = iec.rated_impulse_v(working_v, profile.overvoltage_category)
        except UsageError as e:
            raise UsageError(f"{e.message}; give the impulse voltage across the gap "
                             f"instead") from e
        a = (f"{IEC} impulse voltage: Table F.1 with the working (DC bus) voltage "
             f"{_g(working_v)} V taken as the nominal line-to-neutral voltage and "
             f"overvoltage category {profile.overvoltage_category} (our default reading, "
             f"an assumption)")
        assumptions.append(a)
        lines += [a, imp.basis]
        if profile.insulation == "functional":
            f = (f"{IEC} functional insulation is dimensioned for the impulse expected across "
                 f"the gap; none was given, so the Table F.1 value is used (assumption)")
            assumptions.append(f)
            lines.append(f)
        u = imp.volts
    else:
        u = _volts("impulse voltage", impulse_v)
        lines.append(f"{IEC} impulse voltage {_g(u)} V, as given")
    if rms_v is None:
        rms = working_v
        lines.append(f"{IEC} creepage voltage: no RMS value given, the working voltage "
                     f"{_g(working_v)} V is used (a DC working voltage counts as its RMS "
                     f"value)")
    else:
        rms = _volts("RMS working voltage", rms_v)
        lines.append(f"{IEC} creepage voltage: {_g(rms)} V rms, as given")
    lines.append(f"{IEC} steady-state peak: the working voltage {_g(working_v)} V")
    clr = iec.clearance_mm(impulse_v=u, peak_working_v=working_v,
                           pollution_degree=profile.pollution_degree, field=profile.field,
                           printed_wiring=profile.printed_wiring,
                           insulation=profile.insulation, altitude_m=profile.altitude_m,
                           interpolate=profile.interpolate)
    pwb_columns = profile.printed_wiring and profile.creepage_columns == "printed-wiring"
    lines.append(f"{IEC} creepage columns: " + (
        "printed-wiring material columns of Table F.4 (chosen in the profile)" if pwb_columns
        else "material-group columns of Table F.4 (our conservative default; the "
             "printed-wiring columns are smaller in pollution degree 2 and may be chosen "
             "where the end-product standard allows them)"))
    crp = iec.creepage_mm(rms, pollution_degree=profile.pollution_degree,
                          material_group=profile.material_group,
                          printed_wiring=pwb_columns,
                          insulation=profile.insulation, interpolate=profile.interpolate)
    crp = iec.creepage_at_least_clearance(crp, clr)
    lines.append(f"{IEC} clearance {_mm(clr.mm)} mm ({profile.insulation} insulation):")
    lines += list(clr.steps)
    lines.append(f"{IEC} creepage {_mm(crp.mm)} mm ({profile.insulation} insulation):")
    lines += list(crp.steps)
    if not layer_outer:
        a = (f"{IEC}: between conductors inside the laminate there is no surface path; the "
             f"standard treats that as solid insulation, which these tables do not cover. "
             f"The surface values are used as a conservative stand-in (our reading)")
        assumptions.append(a)
        lines.append(a)
    if profile.coating != "none":
        lines.append(f"{IEC}: the {profile.coating} coating is not credited (coatings are the "
                     f"subject of IEC 60664-3, not covered here; from memory)")
    return clr, crp, lines, assumptions


def _governs(iec_mm: float, ipc_mm: float, what: str) -> tuple[float, str, str]:
    if iec_mm > ipc_mm:
        by = IEC
    elif ipc_mm > iec_mm:
        by = IPC
    else:
        by = f"{IEC} = {IPC}"
    mm = max(iec_mm, ipc_mm)
    return mm, by, (f"{what}: {IEC} {_mm(iec_mm)} mm, {IPC} {_mm(ipc_mm)} mm; the larger "
                    f"governs: {_mm(mm)} mm ({by})")


def required_spacing(profile: SpacingProfile, working_v: float, rms_v: float | None = None,
                     impulse_v: float | None = None, layer_outer: bool = True,
                     termination: bool = False) -> Requirement:
    """Required clearance and creepage (mm) between two conductors.

    Parameters
    ----------
    profile:
        The standard and conditions (:class:`SpacingProfile`).
    working_v:
        Working voltage between the conductors in volts, DC or peak (by magnitude).  For
        IEC 60664-1 it is the steady-state peak and, unless ``impulse_v`` is given, the
        nominal voltage that selects the Table F.1 row.
    rms_v:
        RMS working voltage for the IEC creepage row (V); default ``working_v``.
    impulse_v:
        Impulse voltage across the gap (V peak) for the IEC clearance; default from
        Table F.1 (see the module docstring).
    layer_outer:
        True for copper on an external layer.
    termination:
        True when a component lead or termination is one of the two features (IPC-2221B
        column choice).
    """
    if not isinstance(profile, SpacingProfile):
        raise UsageError("required_spacing needs a SpacingProfile")
    v = _volts("working voltage", working_v)
    std = profile.standard
    if std == "ipc2221b":
        mm, lines, mem = _ipc(profile, v, layer_outer, termination)
        return Requirement(mm, mm, tuple(lines), IPC, IPC, (), (), mem)
    clr, crp, lines, assumptions = _iec(profile, v, rms_v, impulse_v, layer_outer)
    warnings = tuple(crp.warnings) + tuple(clr.warnings)
    mem = clr.from_memory or crp.from_memory
    if std == "iec60664-1":
        return Requirement(clr.mm, crp.mm, tuple(lines), IEC, IEC, tuple(assumptions),
                           warnings, mem)
    ipc_mm, ipc_lines, ipc_mem = _ipc(profile, v, layer_outer, termination)
    c_mm, c_by, c_line = _governs(clr.mm, ipc_mm, "clearance")
    k_mm, k_by, k_line = _governs(crp.mm, ipc_mm, "creepage")
    lines = lines + ipc_lines + [c_line, k_line]
    return Requirement(c_mm, k_mm, tuple(lines), c_by, k_by, tuple(assumptions), warnings,
                       mem or ipc_mem)
