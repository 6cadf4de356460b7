"""Creepage: the shortest path along the board surface between two conductors is shorter
than IEC 60664-1 asks for.

Units: millimetres, volts.

Runs when ``[environment] standard`` is ``"iec60664-1"`` or ``"both"``.  Creepage is a
surface matter, so only the outer layers (``top``, ``bottom``) are looked at; between inner
layers the laminate is solid insulation and there is no surface path.

On each outer layer (:mod:`layoutcheck.conductors`):

1. The ends are the nets with copper on the layer and the declared earth conductors; the
   floating copper, unconnected pads and bare plated holes are stepping stones.
2. The surface is the board outline minus the non-plated holes, slots and cut-outs, each
   opened by the groove width X of the pollution degree
   (:func:`layoutcheck.physics.iec60664.groove_width_x_mm`): parts narrower than X are
   crossed straight, wider ones must be gone around
   (:mod:`layoutcheck.geometry.paths`).  X is not reduced for clearances under 3 mm: the
   full X bridges more grooves, which can only make the path found shorter (safe side).
3. For each pair of ends whose straight distance is already below the required creepage
   (:func:`layoutcheck.physics.requirements.required_spacing` with the pair's working
   voltage as its RMS value and the insulation kind of ``[[insulation]]`` or
   ``[earth] kind``), the places where they come that close are found as in the clearance
   rule, and in each place the surface geodesic is measured.  A place whose geodesic is
   shorter than required by more than :data:`TOLERANCE_MM` is a finding with the path.
4. Chains through stepping stones: the shortest chain of surface gaps
   ``a -> stone ... -> b``; when it is shorter than required, and shorter than what the
   direct findings show in the same place, it is reported (``extra["via"]`` names the
   stones), replacing a direct finding there.

Copper of a third net is not an obstacle to a path: a path that crosses it is the pairwise
problem of that conductor with each of the two.
"""
from __future__ import annotations

import numpy as np
import shapely

from ..conductors import (Chain, Conductor, PairRules, board_surface, close_pairs,
                          close_places, end_conductors, pair_insulation, pair_voltage,
                          shortest_chains, stepping_stones, supersede, voltage_span)
from ..findings import Finding
from ..geometry.paths import Geodesic, SurfaceDomain, geodesic
from ..physics.iec60664 import groove_width_x_mm
from ..units import DISTANCE_RESOLUTION_MM
from . import CheckContext
from .connectivity import graph_of

RULE_IDS = ("creepage",)
SUMMARY = ("surface path between conductors, around slots at least X wide, shorter than "
           "IEC 60664-1 asks for")
ORDER = 30

#: A path is a violation when it falls short of the requirement by more than this (mm).
TOLERANCE_MM = DISTANCE_RESOLUTION_MM / 2
#: Bridged obstacles named one by one in the assumptions, per layer.
_LIST_BRIDGED = 10


def applies(ctx: CheckContext) -> str | None:
    """``None`` when the rule applies, else why not (creepage is an IEC 60664-1 measure)."""
    if ctx.project.environment.standard in ("iec60664-1", "both"):
        return None
    return ('the spacing standard is IPC-2221B alone, which has no creepage rule; set '
            '[environment] standard = "iec60664-1" or "both" to check creepage')


def run(ctx: CheckContext) -> list[Finding]:
    """Creepage findings on the outer layers (see the module docstring)."""
    return findings(ctx)


def findings(ctx: CheckContext, rules=None) -> list[Finding]:
    """Creepage findings; ``rules`` replaces the requirement source (an object with
    ``get(kind, volts, outer, termination)`` returning a
    :class:`layoutcheck.physics.requirements.Requirement`, and ``reach(volts, what,
    outer)``), default :class:`layoutcheck.conductors.PairRules` of the project."""
    env = ctx.project.environment
    if env.standard not in ("iec60664-1", "both"):
        return []
    g = graph_of(ctx)
    board = ctx.board
    x = groove_width_x_mm(env.pollution_degree)
    rules = rules if rules is not None else PairRules(ctx.project)
    out: list[Finding] = []
    ran = False
    for layer in [name for name in g.layers if board.is_outer(name)]:
        ends = end_conductors(board, g, ctx.project, layer)
        if len(ends) < 2:
            continue
        ran = True
        domain = board_surface(board, g, layer, x.mm)
        _assume_bridged(ctx, layer, domain)
        out.extend(layer_findings(ctx, layer, ends, stepping_stones(board, g, layer),
                                  domain, rules))
    if ran:
        _assume_setup(ctx, env, x)
    return out


def _assume_setup(ctx: CheckContext, env, x) -> None:
    ctx.assume("creepage", (
        f"groove width X = {x.mm:g} mm ({x.basis}): slots, holes and cut-outs narrower than "
        f"X are crossed straight, wider ones are gone around; the reduction of X for "
        f"clearances under 3 mm is not used (it would only lengthen paths)"))
    ctx.assume("creepage", (
        "obstacles are opened by a disc of diameter X: sharp convex corners of slots and "
        "cut-outs are rounded to radius X/2, which shortens a path wrapping a right-angled "
        "corner by up to 0.21 X (the safe side)"))
    ctx.assume("creepage", (
        "creepage paths run on the bare outer surfaces; copper of a third net on the way "
        "is not an obstacle (each conductor's own spacing is checked pairwise), and paths "
        "over slot walls or the board edge to the other side are not followed"))
    defaults = {"pollution_degree": f"pollution degree {env.pollution_degree}",
                "material_group": f"material group {env.material_group}",
                "overvoltage_category": f"overvoltage category {env.overvoltage_category}"}
    for key, text in defaults.items():
        if key not in env.explicit:
            ctx.assume("environment", f"{key.replace('_', ' ')} not given in [environment]: "
                                      f"{text} assumed for IEC 60664-1")


def _assume_bridged(ctx: CheckContext, layer: str, domain: SurfaceDomain) -> None:
    names = sorted({domain.bridged_label(k) for k in range(len(domain.bridged))})
    if not names:
        return
    shown = names[:_LIST_BRIDGED]
    more = f" and {len(names) - len(shown)} more" if len(names) > len(shown) else ""
    ctx.assume("creepage", (
        f"on {layer}, narrower than X = {domain.x_mm:g} mm and crossed straight: "
        f"{'; '.join(shown)}{more}"))


def geodesic_gaps(domain: SurfaceDomain):
    """A :data:`layoutcheck.conductors.GapFn` measuring surface paths on ``domain``."""
    def gaps(X, Y, limit):
        out = []
        for a, b in zip(X, Y):
            geo = geodesic(domain, a, b, limit)
            out.append(None if geo is None else (geo.length, geo.path, geo))
        return out
    return gaps


def layer_findings(ctx: CheckContext, layer: str, ends: list[Conductor],
                   stones: list[Conductor], domain: SurfaceDomain,
                   rules: PairRules) -> list[Finding]:
    """Creepage findings on one outer layer between ``ends`` (through ``stones`` too)."""
    project = ctx.project
    vmax = voltage_span(project, ends)
    reach = rules.reach(vmax, "creepage_mm")
    if reach <= 0:
        return []
    ends = sorted(ends, key=lambda c: c.name)
    reqs: dict[tuple[int, int], tuple] = {}

    def requirement(i, j):
        if (i, j) not in reqs:
            reqs[(i, j)] = _requirement(project, rules, ends[i], ends[j])
            for line in reqs[(i, j)][2].assumptions:
                ctx.assume("creepage", line)
        return reqs[(i, j)]

    direct: dict[tuple[str, str], list[Finding]] = {}
    for i, j, A, B in close_pairs(ends, reach, lambda i, j: requirement(i, j)[2].creepage_mm,
                                  TOLERANCE_MM):
        v, kind, req = requirement(i, j)
        need = req.creepage_mm
        a, b = ends[i], ends[j]
        for place in close_places(A, B, need):
            geo = geodesic(domain, place, B, need)
            if geo is None or geo.length >= need - TOLERANCE_MM:
                continue
            straight = float(shapely.distance(place, B))
            f = _finding(layer, a.name, b.name, geo.length, req, v, kind, geo.path, [geo],
                         [], domain, straight)
            direct.setdefault((a.name, b.name), []).append(f)

    extra: list[Finding] = []
    for ch in shortest_chains(ends, stones, geodesic_gaps(domain), reach):
        v, kind, req = requirement(ch.a, ch.b)
        need = req.creepage_mm
        if ch.length >= need - TOLERANCE_MM:
            continue
        a, b = ends[ch.a], ends[ch.b]
        f = _chain_finding(layer, a, b, ch, stones, req, v, kind, domain)
        same = direct.setdefault((a.name, b.name), [])
        keep, removed = supersede(same, f, need, TOLERANCE_MM)
        if keep:
            direct[(a.name, b.name)] = [x for x in same if all(x is not y for y in removed)]
            extra.append(f)
    return [f for fs in direct.values() for f in fs] + extra


def _requirement(project, rules: PairRules, a: Conductor, b: Conductor):
    v = pair_voltage(project, a.name, b.name)
    kind, _ = pair_insulation(project, a.name, b.name)
    req = rules.get(kind, v, True, a.terminations or b.terminations)
    return v, kind, req


def _mm(x: float) -> str:
    return f"{x:.2f}"


def _labels(domain: SurfaceDomain, geos: list[Geodesic]) -> tuple[list[str], list[str]]:
    around, bridged = [], []
    for geo in geos:
        for k, at in geo.around:
            lab = domain.kept_label(k, at)
            if lab not in around:
                around.append(lab)
        for k in geo.bridged:
            lab = domain.bridged_label(k)
            if lab not in bridged:
                bridged.append(lab)
    return around, bridged


def _finding(layer, a, b, length, req, v, kind, path, geos, via, domain, straight,
             ) -> Finding:
    around, bridged = _labels(domain, geos)
    msg = (f"{a} and {b}: the surface path on {layer} is {_mm(length)} mm; "
           f"{_mm(req.creepage_mm)} mm creepage required at {v:g} V ({kind} insulation, "
           f"{req.creepage_by})")
    if via:
        msg += f"; it runs through {', '.join(via)} (no potential of its own: zero length)"
    if around:
        msg += f"; path goes around {', '.join(around)}"
    if bridged:
        msg += (f"; it crosses {', '.join(bridged)} straight (narrower than X = "
                f"{domain.x_mm:g} mm)")
    pts = np.asarray(path, dtype=float)
    extra = {"path": [[round(float(x), 6), round(float(y), 6)] for x, y in pts],
             "insulation": kind, "standard": req.creepage_by, "groove_x_mm": domain.x_mm}
    if straight is not None:
        extra["straight_mm"] = round(straight, 7)
    if via:
        extra["via"] = list(via)
    if around:
        extra["around"] = around
    if bridged:
        extra["bridged"] = bridged
    return Finding(
        rule="creepage", severity="error", message=msg + ".", layer=layer, nets=[a, b],
        measured_mm=round(length, 7), required_mm=req.creepage_mm, voltage_v=v,
        basis=req.brief("creepage"), where=(float(pts[0][0]), float(pts[0][1])),
        to=(float(pts[-1][0]), float(pts[-1][1])), extra=extra)


def _chain_finding(layer, a: Conductor, b: Conductor, ch: Chain, stones, req, v, kind,
                   domain) -> Finding:
    via = [stones[s].name for s in ch.stones]
    geos = [info for _, info in ch.legs if info is not None]
    return _finding(layer, a.name, b.name, ch.length, req, v, kind, ch.path(), geos, via,
                    domain, None)
