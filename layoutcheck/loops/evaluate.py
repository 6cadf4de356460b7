"""Evaluate commutation loops: inductance, area, stacked-return estimate, consequences.

Units: millimetres, henries, volts, A/ns (di/dt), farads, hertz inside; the JSON entries of
:meth:`LoopResult.entry` use nH, mm, mm^2, V and MHz as their key names say.

Inductance: ``L = sum_i sum_j Lp_ij`` over the closed chain of copper paths and part pieces
(:func:`layoutcheck.physics.inductance.loop_inductance`; partial inductances after Ruehli
1972), plus the parts' internal inductance in series.

Stacked-return estimate: what the same copper would give laid as a go-and-return pair, the
return directly under the path on the next layer: half the copper track length as the
pair's length, their mean width, the dielectric under the top layer as the separation
(:func:`layoutcheck.physics.inductance.stacked_return_inductance`, notes PL-4, with its
fringing correction), plus the same internal inductance of the parts.  It shows what good
layout of the same parts would reach; the parts' own pieces are not in it.
"""
from __future__ import annotations

from dataclasses import dataclass, field

from ..errors import LayoutcheckError, UsageError
from ..model import Assumption, Board
from ..physics.inductance import loop_inductance, stacked_return_inductance
from ..project import Project
from .assemble import LoopGeometry, assemble, default_provider, plan_steps
from .consequences import Consequences, consequences, grade
from .finder import Leg, find_legs, leg_loop_pads
from .pads import PadIndex, PadRef, parse_pad_list
from .roles import part_roles

#: di/dt assumed when the project gives none (A/ns): power-layout notes, section 0, Si
#: MOSFET or IGBT 0.5-2 A/ns (from memory [M]).
DEFAULT_DI_DT_A_PER_NS = 1.0


@dataclass
class Settings:
    """di/dt (A/ns), derating (fraction) and warning threshold (nH) in force."""

    di_dt_a_per_ns: float
    derating: float
    warn_nh: float
    all_loops: bool


def settings_of(project: Project) -> tuple[Settings, list[Assumption]]:
    """The ``[switching]`` values, with an assumption for each default that matters."""
    sw = project.switching
    notes = []
    di_dt = sw.di_dt()
    if di_dt is None:
        di_dt = DEFAULT_DI_DT_A_PER_NS
        notes.append(Assumption("switching", (
            f"no di/dt in [switching]: assumed {di_dt:g} A/ns, common practice for silicon "
            "MOSFETs and IGBTs (power-layout notes: Si 0.5-2, SiC 2-10, GaN 5-20 A/ns, from "
            "memory); set [switching] di_dt_a_per_ns, or current_a and switch_time_ns")))
    if "derating" not in sw.explicit:
        notes.append(Assumption("switching", (
            "switch voltage derating not given: the peak may reach "
            f"{100 * sw.derating:.0f} % of the rating (common practice, power-layout notes "
            "VD-1 [N])")))
    if "warn_nh" not in sw.explicit:
        notes.append(Assumption("switching", (
            f"loop inductance warning threshold not given: {sw.warn_nh:g} nH (common "
            "practice: TO-220/247 loops on two-layer boards run 20-70 nH, D2PAK 5-15 nH, "
            "notes PL-1)")))
    return Settings(di_dt, sw.derating, sw.warn_nh, sw.all_loops), notes


@dataclass
class LoopResult:
    """One evaluated loop.

    name: its name; leg / capacitor: set for a half-bridge leg's loop.  pads: the pad
    sequence.  inductance_h: geometry plus internal (H).  stacked_h: the stacked-return
    estimate (H) or ``None``.  numbers: the consequences.  severity: error / warning / info.
    smallest: the leg's smallest loop (always True outside legs).
    """

    name: str
    pads: list[PadRef]
    geometry: LoopGeometry
    inductance_h: float
    stacked_h: float | None
    numbers: Consequences
    severity: str
    leg: str | None = None
    capacitor: str | None = None
    switches: list[str] = field(default_factory=list)
    smallest: bool = True

    def entry(self) -> dict:
        """JSON-ready data (nH, mm, mm^2, V, MHz; not rounded)."""
        c = self.numbers
        return {
            "name": self.name,
            "parts": list(self.geometry.parts),
            "pads": [p.text() for p in self.pads],
            "nets": list(self.geometry.nets),
            "leg": self.leg,
            "capacitor": self.capacitor,
            "smallest": self.smallest,
            "severity": self.severity,
            "inductance_nh": self.inductance_h * 1e9,
            "internal_nh": self.geometry.internal_h * 1e9,
            "area_mm2": self.geometry.area_mm2,
            "length_mm": self.geometry.length_mm,
            "stacked_return_nh": None if self.stacked_h is None else self.stacked_h * 1e9,
            "di_dt_a_per_ns": c.di_dt_a_per_ns,
            "overshoot_v": c.overshoot_v,
            "bus_v": c.bus_v,
            "peak_v": c.peak_v,
            "rating_v": c.rating_v,
            "derating": c.derating,
            "rating_pct": None if c.ratio is None else 100.0 * c.ratio,
            "max_inductance_nh": (None if c.max_inductance_h is None
                                  else c.max_inductance_h * 1e9),
            "coss_pf": None if c.coss_f is None else c.coss_f * 1e12,
            "ringing_mhz": None if c.ringing_hz is None else c.ringing_hz / 1e6,
            "path": [[x, y, layer] for x, y, layer in self.geometry.path],
        }


def separation_mm(board: Board) -> float | None:
    """Dielectric (mm) between the first copper layer and the next, ``None`` with one layer."""
    layers = board.copper_layers
    if len(layers) < 2:
        return None
    st = board.stackup
    d = st.dielectric_mm.get(layers[0])
    if d is None or d <= 0:
        d = st.thickness_mm - sum(st.copper(n) for n in layers) if len(layers) == 2 else None
    return d if d is not None and d > 0 else None


def stacked_estimate(board: Board, geo: LoopGeometry) -> float | None:
    """The stacked-return estimate (H) of ``geo``'s copper (module docstring)."""
    h = separation_mm(board)
    if h is None or geo.copper_width_mm is None or geo.copper_length_mm <= 0:
        return None
    t = board.stackup.copper(board.copper_layers[0])
    return stacked_return_inductance(geo.copper_length_mm / 2, geo.copper_width_mm, h,
                                     thickness=t) + geo.internal_h


class LoopContext:
    """Board, net graph, project, roles, pads and the path provider shared by loops."""

    def __init__(self, board: Board, graph, project: Project, provider=None):
        self.board, self.graph, self.project = board, graph, project
        self.provider = provider if provider is not None else default_provider()
        if self.provider is None:
            raise UsageError("no copper current-path module in this installation "
                             "(layoutcheck.geometry.current_path); loops cannot be traced")
        self.index = PadIndex(board, graph)
        self.roles, self.assumptions = part_roles(board, graph, project, self.index)
        self.settings, more = settings_of(project)
        self.assumptions += more
        self.cache: dict = {}

    def assume(self, topic: str, text: str) -> None:
        a = Assumption(topic, text)
        if a not in self.assumptions:
            self.assumptions.append(a)

    def note_parts(self, refs) -> None:
        """Record the assumptions behind the roles of ``refs``."""
        for ref in refs:
            role = self.roles.get(ref)
            for a in (role.notes if role is not None else ()):
                self.assume(a.topic, a.text)

    def bus_voltage(self, nets) -> float:
        """The largest absolute voltage (V) of ``nets`` from ``[voltages]``."""
        best = 0.0
        for net in nets:
            v, how = self.project.voltage_of(net)
            if how in ("fallback *", "undeclared"):
                self.assume("voltage", f"bus voltage of net {net}: not declared in "
                            f"[voltages]; {v.text()} used for the overshoot")
            best = max(best, abs(v.lo), abs(v.hi))
        return best

    def evaluate(self, pads: list[PadRef], name: str, bus_nets=None, leg: Leg | None = None,
                 capacitor: str | None = None) -> LoopResult:
        """Evaluate the loop through ``pads`` (see the module docstring)."""
        steps = plan_steps(pads, self.index)
        self.note_parts(p.ref for p in pads)
        geo = assemble(self.board, self.graph, self.index, steps, self.roles, self.provider,
                       self.cache)
        L = loop_inductance(geo.segments) + geo.internal_h
        switches = [r for r in geo.parts if self.roles.get(r) and self.roles[r].is_switch]
        ratings = [self.roles[r].rating_v for r in switches
                   if self.roles[r].rating_v is not None]
        for r in switches:
            if self.roles[r].rating_v is None:
                self.assume("rating", f"{r}: no voltage rating known, so its peak is not "
                            f"checked against it; set [parts.{r}] vds_max_v")
        coss = [self.roles[r].coss_f for r in switches if self.roles[r].coss_f is not None]
        bus_v = self.bus_voltage(bus_nets if bus_nets is not None else geo.nets)
        s = self.settings
        c = consequences(L, s.di_dt_a_per_ns, bus_v, min(ratings) if ratings else None,
                         s.derating, max(coss) if coss else None)
        return LoopResult(name, list(pads), geo, L, stacked_estimate(self.board, geo), c,
                          grade(c, s.warn_nh), leg=leg.name if leg else None,
                          capacitor=capacitor, switches=switches)


@dataclass
class LegLoops:
    """The loops of one leg, smallest inductance first; ``problems`` holds loops that
    could not be traced (capacitor, message)."""

    leg: Leg
    loops: list[LoopResult] = field(default_factory=list)
    problems: list[tuple[str, str]] = field(default_factory=list)


def evaluate_legs(lc: LoopContext) -> list[LegLoops]:
    """Every leg's loops (one per capacitor across its bus), smallest first."""
    lc.note_parts(ref for ref, r in lc.roles.items() if r.is_switch)
    legs, notes = find_legs(lc.project, lc.roles, lc.index)
    for a in notes:
        lc.assume(a.topic, a.text)
    out = []
    for leg in legs:
        ll = LegLoops(leg)
        for cap in leg.capacitors:
            pads = leg_loop_pads(leg, cap, lc.roles, lc.index)
            try:
                res = lc.evaluate(pads, f"{leg.name}: {cap}-{leg.high}-{leg.low}",
                                  [leg.bus_net], leg, cap)
            except LayoutcheckError as e:
                ll.problems.append((cap, str(e)))
                continue
            ll.loops.append(res)
        ll.loops.sort(key=lambda r: (r.inductance_h, r.capacitor or ""))
        for k, r in enumerate(ll.loops):
            r.smallest = k == 0
        out.append(ll)
    return out


@dataclass
class ThroughResult:
    """A loop given as a pad sequence, and the assumptions behind its numbers."""

    loops: list[LoopResult]
    assumptions: list[Assumption]

    @property
    def errors(self) -> int:
        return sum(r.severity == "error" for r in self.loops)


def evaluate_through(board: Board, graph, project: Project, through: str,
                     provider=None) -> ThroughResult:
    """Evaluate the loop ``through`` (``"C3.1,Q1.2,Q1.3,Q2.2,Q2.3,C3.2"``).

    Consecutive pads on one net are joined through copper, consecutive pads of one part
    through the part, the last pad joins the first.  The bus voltage is the largest
    absolute voltage of the loop's nets.  Raises :class:`UsageError` naming a bad item.
    """
    pads = parse_pad_list(through)
    lc = LoopContext(board, graph, project, provider)
    for p in pads:
        lc.index.require(p)
    res = lc.evaluate(pads, ",".join(p.text() for p in pads))
    return ThroughResult([res], list(lc.assumptions))
