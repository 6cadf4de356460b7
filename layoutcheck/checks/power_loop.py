"""power-loop: the commutation loop of each half-bridge leg, its overshoot and ringing.

Units: henries inside; messages in nH, V, MHz, mm^2.

For each leg (found, or named in ``[legs]``) and each capacitor across its bus, the loop
``cap+ -> high D -> high S -> low D -> low S -> cap-`` is traced through the copper and
the parts (:mod:`layoutcheck.loops`), and the smallest (lowest inductance) is judged:

* ``error``: the peak ``V_bus + L di/dt`` exceeds ``derating x`` the switch rating
  (power-layout notes PL-1 / VD-1: 80 % [N], common practice);
* ``warning``: the loop inductance is above ``[switching] warn_nh`` (default 20 nH,
  common practice; see :data:`layoutcheck.project.DEFAULT_WARN_NH`);
* ``info`` otherwise, always with the numbers.

A leg with no capacitor across its bus gets a warning (notes PL-3: the local HF capacitor
closes the fast loop).  With ``[switching] all_loops = true`` every other capacitor's loop
is reported too, as ``info`` (the smallest loop carries the fast current).  Each finding
leaves the loop's data in ``extra["loop"]``; the JSON report lists them under ``loops``.
"""
from __future__ import annotations

from ..errors import UsageError
from ..findings import Finding
from ..loops import LoopContext, LoopResult, evaluate_legs
from ..loops.finder import find_legs
from . import CheckContext

RULE_IDS = ("power-loop",)
SUMMARY = ("commutation loop of each half-bridge leg: inductance, overshoot against the "
           "derated switch rating, ringing")
ORDER = 60

BASIS = ("power-layout notes PL-1: dV = L di/dt, V_pk = V_bus + dV, V_pk <= derating x "
         "V_rating (80 % [N]); PL-2: f = 1/(2 pi sqrt(L C_oss)); L = sum of the partial "
         "inductances of the loop's copper and part pieces (Ruehli 1972, Hoer & Love 1965) "
         "plus the parts' internal inductance (rules/packages.toml, values from memory or "
         "the notes)")


def _context(ctx: CheckContext) -> LoopContext:
    return LoopContext(ctx.board, ctx.graph, ctx.project,
                       getattr(ctx, "path_provider", None))


def applies(ctx: CheckContext) -> str | None:
    """``None`` when the board has a half-bridge leg to check, else why not."""
    try:
        lc = _context(ctx)
    except UsageError as e:
        return e.message
    if ctx.project.legs:
        return None
    legs, _ = find_legs(ctx.project, lc.roles, lc.index)
    if legs:
        return None
    n = sum(r.has_terminals for r in lc.roles.values())
    return ("no half-bridge leg found (two switches in series, the high one's source on "
            f"the low one's drain; {n} switch(es) with known pins on the board); name legs "
            "in [legs] or parts in [parts]")


def _xy(lc: LoopContext, ref: str, role: str):
    r = lc.roles.get(ref)
    pad = r.pad(role) if r is not None else None
    info = lc.index.get(ref, pad) if pad is not None else None
    return info.position if info is not None else None


def _loop_finding(res: LoopResult, lc: LoopContext, leg, severity: str) -> Finding:
    c = res.numbers
    nh = res.inductance_h * 1e9
    parts = "-".join([res.capacitor, leg.high, leg.low])
    inside = (f", {res.geometry.internal_h * 1e9:.1f} nH of it inside the parts"
              if res.geometry.internal_h > 0 else "")
    msg = (f"Leg {leg.name}: the commutation loop {parts} has {nh:.1f} nH "
           f"({res.geometry.area_mm2:.0f} mm^2 enclosed, {res.geometry.length_mm:.0f} mm "
           f"long{inside}). At {c.di_dt_a_per_ns:g} A/ns it overshoots by "
           f"{c.overshoot_v:.0f} V, so the {c.bus_v:.0f} V bus peaks at {c.peak_v:.0f} V")
    if c.rating_v is not None:
        verdict = "above" if c.exceeds_rating else "within"
        msg += (f", {100 * c.ratio:.0f} % of the {c.rating_v:.0f} V switch rating, "
                f"{verdict} the {100 * c.derating:.0f} % allowed")
        if c.max_inductance_h is not None:
            msg += (f" (largest loop allowed: {c.max_inductance_h * 1e9:.1f} nH)"
                    if c.max_inductance_h > 0 else
                    " (the bus alone is above the derated rating)")
    else:
        msg += " (no switch rating known, so the peak is not judged)"
    msg += "."
    if c.ringing_hz is not None:
        band = " in the 30-300 MHz radiated-emission band" if c.rings_in_radiated_band else ""
        msg += (f" With C_oss {c.coss_f * 1e12:.0f} pF it rings at "
                f"{c.ringing_hz / 1e6:.0f} MHz{band}, Z0 {c.z0_ohm:.0f} ohm.")
    if res.stacked_h is not None:
        msg += (f" The same copper over a return directly beneath would be about "
                f"{res.stacked_h * 1e9:.1f} nH.")
    if severity != "info":
        msg += " Shrink the capacitor-switch-switch loop area."
    if not res.smallest:
        msg += " Not the leg's smallest loop."
    return Finding(rule="power-loop", severity=severity, message=msg, nets=leg.nets,
                   voltage_v=c.bus_v, basis=BASIS, where=_xy(lc, leg.high, "S"),
                   extra={"loop": res.entry()})


def run(ctx: CheckContext) -> list[Finding]:
    """Findings for each leg's commutation loop (see the module docstring)."""
    lc = _context(ctx)
    out: list[Finding] = []
    for ll in evaluate_legs(lc):
        leg = ll.leg
        where = _xy(lc, leg.high, "S")
        for cap, problem in ll.problems:
            out.append(Finding(
                rule="power-loop", severity="warning", nets=leg.nets, where=where,
                message=(f"Leg {leg.name}: the loop through capacitor {cap} could not be "
                         f"traced: {problem}"), basis=BASIS))
        if not ll.loops:
            if not ll.problems:
                out.append(Finding(
                    rule="power-loop", severity="warning", nets=leg.nets, where=where,
                    message=(f"Leg {leg.name} ({leg.high}/{leg.low}) has no capacitor across "
                             f"{leg.bus_net} and {leg.return_net}, so nothing closes its "
                             "fast commutation loop; add 100-470 nF of film or ceramic "
                             "capacitance at the leg"),
                    basis="power-layout notes PL-3 (local HF decoupling capacitor)"))
            continue
        best = ll.loops[0]
        out.append(_loop_finding(best, lc, leg, best.severity))
        if lc.settings.all_loops:
            for res in ll.loops[1:]:
                out.append(_loop_finding(res, lc, leg, "info"))
    for a in lc.assumptions:
        ctx.assume(a.topic, a.text)
    return out
