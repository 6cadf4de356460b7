"""Stripboard findings: problems of a hand-built plan, each with a fix a builder can do.

Units: millimetres, volts.  Runs only on boards read from a plan
(:mod:`layoutcheck.readers.plan`, ``board.source_kind == "plan"``).

* ``strip-spacing`` -- a strip piece on one net runs beside a strip piece on another net
  (strips between them either removed or left as floating copper) closer than the spacing
  the voltage between them needs.  The gap is ``(k + 1) * pitch - width`` for ``k`` strips
  between, less the width of each of them that still has copper (floating copper bridges
  the path: power-layout notes CU-2, from memory).  The requirement is the clearance rule's:
  IPC-2221B Table 6-1 external conductor column, or under IEC 60664-1 / both the larger of
  clearance and creepage (:class:`layoutcheck.conductors.PairRules`).  The finding names
  the strips and how many strips to cut away between them.
* ``strip-cut`` -- a cut after which the copper either side is still one piece (cutter
  narrower than the strip), or a lead in a hole with no copper around it.
* ``pin-on-other-net`` -- two pins of one part on one net (a strip not cut between them),
  or a pin on a net other than the one the plan's ``nets`` says.
* ``link-bridges-cut`` -- a link or wire joining the two sides of a cut of one strip.
"""
from __future__ import annotations

import math

from ..conductors import PairRules, pair_insulation
from ..findings import Finding
from ..physics.spacing import ipc2221b_column, ipc2221b_spacing
from ..units import DISTANCE_RESOLUTION_MM
from . import CheckContext

RULE_IDS = ("stripboard", "strip-spacing", "strip-cut", "pin-on-other-net",
            "link-bridges-cut")
SUMMARY = ("stripboard plans: high-voltage strips beside low-voltage ones, cuts that do "
           "not separate, pins on the wrong strip, links across cuts")
ORDER = 60


def applies(ctx: CheckContext) -> str | None:
    """``None`` for a board read from a plan, else why the rule does not apply."""
    if getattr(ctx.board, "source_kind", None) == "plan" and ctx.board.plan is not None:
        return None
    return "the board is not a stripboard or pad-per-hole plan"


def run(ctx: CheckContext) -> list[Finding]:
    """Every stripboard finding of the plan board (see the module docstring)."""
    plan = ctx.board.plan
    out: list[Finding] = []
    out += _spacing(ctx, plan)
    out += _cuts(ctx, plan)
    out += _pins(ctx, plan)
    out += _links(ctx, plan)
    return out


def _net_of_shape(ctx: CheckContext, idx: int) -> str | None:
    g = ctx.graph
    isl = int(g.shape_island[idx])
    return g.island_net[isl] if isl >= 0 else None


def _extent(plan, seg) -> tuple[float, float]:
    """Interval (mm) a strip piece covers along its strip."""
    b = seg.bounds
    return (b[0], b[2]) if plan.kind == "rows" else (b[1], b[3])


def required(ctx: CheckContext, a: str, b: str, volts: float) -> tuple[float, str]:
    """Spacing (mm) nets ``a`` and ``b`` need on the copper side at ``volts`` (V), and its
    basis: the clearance rule's sources (IPC-2221B conductor column; under IEC 60664-1 or
    both standards the larger of clearance and creepage)."""
    env = ctx.project.environment
    if env.standard == "ipc2221b":
        col, _ = ipc2221b_column(True, env.coating, env.altitude_m, False)
        req = ipc2221b_spacing(volts, col)
        return req.mm, req.basis
    kind, _ = pair_insulation(ctx.project, a, b)
    req = PairRules(ctx.project).get(kind, volts, True, False)
    if req.creepage_mm >= req.clearance_mm:
        return req.creepage_mm, "creepage: " + req.brief("creepage")
    return req.clearance_mm, "clearance: " + req.brief("clearance")


def _spacing(ctx: CheckContext, plan) -> list[Finding]:
    if plan.kind == "pads":
        return []
    shapes = ctx.board.shapes
    by_strip: dict[str, list[tuple[tuple[float, float], str | None, int]]] = {}
    for seg in plan.segments:
        geom = shapes[seg.shape].geometry
        by_strip.setdefault(seg.strip, []).append(
            (_extent(plan, geom), _net_of_shape(ctx, seg.shape), seg.shape))
    names = plan.strips
    pairs: dict[tuple, tuple[float, float]] = {}
    for i, name in enumerate(names):
        for (lo, hi), net, shp in by_strip.get(name, []):
            if net is None:
                continue
            floating = 0
            for j in range(i + 1, len(names)):
                over = [(e, n, s) for e, n, s in by_strip.get(names[j], [])
                        if min(hi, e[1]) - max(lo, e[0]) > 0]
                nets_here = [(e, n, s) for e, n, s in over if n is not None]
                if nets_here:
                    for e, other, _ in nets_here:
                        if other == net:
                            continue
                        key = (name, names[j], net, other, j - i - 1, floating)
                        a, b = max(lo, e[0]), min(hi, e[1])
                        old = pairs.get(key, (a, b))
                        pairs[key] = (min(a, old[0]), max(b, old[1]))
                    break
                if over:
                    floating += 1
    out = []
    for key in sorted(pairs):
        f = _pair(ctx, plan, *key, pairs[key])
        if f:
            out.append(f)
    return out


def _pair(ctx, plan, sa, sb, na, nb, between, floating, span) -> Finding | None:
    volts = ctx.project.working_voltage(na, nb)
    need, basis = required(ctx, na, nb, volts)
    gap = (between + 1) * plan.pitch - plan.width - floating * plan.width
    if gap >= need - DISTANCE_RESOLUTION_MM / 2:
        return None
    # strips to cut away so that (k + 1) * pitch - width >= need
    k = max(1, math.ceil((need + plan.width) / plan.pitch - 1 - 1e-9))
    mid = (span[0] + span[1]) / 2
    ia, ib = plan.strips.index(sa), plan.strips.index(sb)
    if plan.kind == "rows":
        ya = (plan.rows - ia - 0.5) * plan.pitch
        yb = (plan.rows - ib - 0.5) * plan.pitch
        where, to = (mid, ya - plan.width / 2), (mid, yb + plan.width / 2)
    else:
        xa, xb = (ia + 0.5) * plan.pitch, (ib + 0.5) * plan.pitch
        where, to = (xa + plan.width / 2, mid), (xb - plan.width / 2, mid)
    how = ("side by side" if between == 0 else
           f"with {between} strip(s) between" +
           (f", {floating} of them left in place as floating copper, which bridges the gap"
            if floating else " cut away"))
    fix = (f"leave {k} strip(s) between them empty and cut them away, or slot the board "
           f"between them (a gap of {(k + 1) * plan.pitch - plan.width:.2f} mm)")
    if floating:
        fix = "cut away the unused strip(s) between them; " + fix
    msg = (f"strip {sa} ({na}) and strip {sb} ({nb}) are {how}: {gap:.2f} mm of bare "
           f"board for {volts:g} V, {need:.2f} mm needed; {fix}.")
    return Finding("strip-spacing", "error", msg, layer="bottom", nets=[na, nb],
                   measured_mm=round(gap, 6), required_mm=need, voltage_v=volts,
                   basis=basis, where=where, to=to,
                   extra={"strips": [sa, sb], "strips_to_remove": k,
                          "floating_between": floating})


def _cuts(ctx, plan) -> list[Finding]:
    from ..readers.plan import hole_name

    out = []
    for cut in plan.cuts:
        if not cut.separates:
            out.append(Finding(
                "strip-cut", "error",
                f"cut {cut.text} (plan line {cut.line}) leaves strip {cut.strip} in one "
                "piece: the cutter is narrower than the strip; cut right across the strip "
                "(a wider cutter, or two knife cuts between holes) and check it with a "
                "meter.", layer="bottom", where=cut.where,
                extra={"cut": cut.text, "line": cut.line}))
    for lead in plan.leads:
        if not lead.shapes:
            out.append(Finding(
                "strip-cut", "error",
                f"{lead.ref} {'pin ' + lead.pin if lead.ref in ctx.board.components else 'end'} "
                f"is in hole {hole_name(lead.hole)} (plan line {lead.line}), where the copper "
                "is cut or removed: it connects to nothing; move it one hole along.",
                layer="bottom", where=plan.xy(lead.hole),
                extra={"hole": hole_name(lead.hole), "line": lead.line}))
    return out


def _pins(ctx, plan) -> list[Finding]:
    from ..readers.plan import hole_name

    out = []
    by_part: dict[str, dict[str, list]] = {}
    for lead in plan.leads:
        if lead.ref not in ctx.board.components or not lead.shapes:
            continue
        net = _net_of_shape(ctx, lead.shapes[0])
        if net is None:
            continue
        by_part.setdefault(lead.ref, {}).setdefault(net, []).append(lead)
        if lead.expected_net and lead.expected_net != net:
            out.append(Finding(
                "pin-on-other-net", "error",
                f"{lead.ref} pin {lead.pin} in hole {hole_name(lead.hole)} (plan line "
                f"{lead.line}) is on strip {plan.strip_of(lead.hole)}, which carries {net}; "
                f"the plan says it belongs on {lead.expected_net}: move the part or cut the "
                "strip.", layer="bottom", nets=[net], where=plan.xy(lead.hole),
                extra={"ref": lead.ref, "pin": lead.pin, "expected": lead.expected_net}))
    for ref in sorted(by_part):
        for net, leads in sorted(by_part[ref].items()):
            if len(leads) < 2:
                continue
            holes = ", ".join(f"{ld.pin} at {hole_name(ld.hole)}" for ld in leads)
            out.append(Finding(
                "pin-on-other-net", "error",
                f"{ref} has pins {holes} all on {net} (the strip is not cut between them): "
                "the part is shorted; cut the strip between its pins.",
                layer="bottom", nets=[net], where=plan.xy(leads[0].hole),
                to=plan.xy(leads[1].hole),
                extra={"ref": ref, "pins": [ld.pin for ld in leads]}))
    return out


def _links(ctx, plan) -> list[Finding]:
    from ..readers.plan import hole_name

    out = []
    for link in plan.links:
        if link.b is None or plan.kind == "pads":
            continue
        if plan.strip_of(link.a) != plan.strip_of(link.b):
            continue
        lo, hi = sorted((plan.along(link.a), plan.along(link.b)))
        for cut in plan.cuts:
            if cut.strip != plan.strip_of(link.a) or not cut.separates:
                continue
            pos = [plan.along(h) for h in cut.holes]
            if lo <= min(pos) and max(pos) <= hi and not (len(pos) == 1 and pos[0] in (lo, hi)):
                out.append(Finding(
                    "link-bridges-cut", "warning",
                    f"{link.kind} {link.ref} ({hole_name(link.a)} to {hole_name(link.b)}, "
                    f"plan line {link.line}) joins strip {cut.strip} across its cut "
                    f"{cut.text}: the cut separates nothing; move the link or drop the cut.",
                    layer="bottom", where=cut.where,
                    extra={"link": link.ref, "cut": cut.text}))
    return out
