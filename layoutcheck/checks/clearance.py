"""Clearance: copper of two different nets on one layer closer than the standard asks for.

Units: millimetres, volts.

Standards (``[environment] standard``):

* ``"ipc2221b"`` (default): IPC-2221B Table 6-1 with the termination and conductor classes
  described below; the output is what it always was.
* ``"iec60664-1"``: the required clearance is
  ``required_spacing(profile, V, rms_v=V, layer_outer=...).clearance_mm``
  (:mod:`layoutcheck.physics.requirements`) with the insulation kind of the pair
  (``[[insulation]]``, default functional).  IEC 60664-1 makes no termination/conductor
  distinction, so there is one class.
* ``"both"``: the larger of the two for each class, the basis saying which governs.

Clearance is the straight air gap: a slot between two conductors does not lengthen it
(standards notes s.2d).  It is shortened by floating copper, though: floating islands,
unconnected pads and bare plated holes in the gap are zero-length stepping stones, and the
shortest chain net -> stone ... -> net (:func:`layoutcheck.conductors.shortest_chains`)
is reported when it falls short, naming the stones in ``extra["via"]`` and giving its legs
in ``extra["path"]``; in the place where it beats a direct finding it replaces it.  With
``[earth]`` declared, the board edge and earthed mounting holes are 0 V conductors checked
against every net (``EARTH:edge``, ``EARTH:hole@x,y``).  Under IPC-2221B a chain's or an
earth pair's requirement is the larger of the conductor and termination columns (what the
far ends are is not known, so the safe one is taken).

For every copper layer and every pair of nets on it (floating copper excluded, nets we
named ``N1``... included) the working voltage is ``Project.working_voltage(a, b)``: the
largest difference between the two nets' ranges, or between their offsets when both ride on
the same node (``{ on = "SW_A", volts = 15 }`` in the project file).  The required spacing comes from IPC-2221B Table 6-1
(:mod:`layoutcheck.physics.spacing`, values from memory) in two classes:

* **termination** -- a component termination (``CopperShape.is_termination``) is one of the
  two features: the termination column (A6 / A7 / B3 / B1);
* **conductor** -- neither feature is a termination: the conductor column (B2 / B3 / B4 /
  A5 / B1).

Formulation.  Per net pair, with ``A``, ``B`` the copper of each net and ``TA``, ``TB`` the
union of its terminations, a pair of points ``p`` in ``A``, ``q`` in ``B`` is judged by the
termination column when ``p`` is in ``TA`` or ``q`` in ``TB``, else by the conductor column.
So the termination class compares ``TA`` with ``B`` and ``A`` with ``TB``, and the conductor
class compares ``CA = A - buffer(TA, SLIVER_MM)`` with ``CB`` likewise.  Taking the
termination out *with a small margin* is what makes this sound: without it, copper that
merely touches a pad (a track end poking a few nanometres out of the pad, a pour drawn to
the pad edge, flattening noise) would leave slivers at the pad edge that count as
"conductor" and pull the pad's distance into the conductor class.  With the margin, copper
within :data:`SLIVER_MM` of a termination is judged as the termination; any conductor
copper farther from the pad keeps its own class, and its distance is measured exactly.

Places.  For each class, the copper of the first net (in name order) that lies within
the required distance of the other net is found with a buffer enlarged just enough that
its flattened arcs cover the true offset curve (so no shortfall is missed; the enlargement
only lets in copper that the exact distances below then clear).  These zones are merged
when closer than about the largest required distance (a buffer by half of it); each
merged part is one *place* and gives at most one finding.  Inside a place the distance
from that net's copper in the place to the other net's copper is measured exactly with
``shapely.distance``; the place is a violation when a class's distance falls short of its
requirement by more than half of :data:`layoutcheck.units.DISTANCE_RESOLUTION_MM`.  When
both classes fall short in one place the larger shortfall is reported and the other
class's numbers go into the message and ``extra["also"]``.  ``measured_mm`` is the
reported class's minimum copper-to-copper distance, which is the true minimum in the place
whenever only one class is present; ``extra["closest_mm"]`` always holds the true minimum
in the place.

Candidate pairs come from an STRtree of islands queried with ``predicate="dwithin"`` and
the largest requirement possible on the layer, then filtered with vectorised distances.
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import shapely
from shapely.geometry import Polygon, box

from ..conductors import (PairRules, close_pairs, close_places, end_conductors,
                          pair_insulation, pair_voltage, shortest_chains, stepping_stones,
                          straight_gaps, supersede, voltage_span)
from ..findings import Finding
from ..physics.requirements import Requirement
from ..physics.spacing import ipc2221b_column, ipc2221b_spacing, load_table
from ..units import DISTANCE_RESOLUTION_MM
from . import CheckContext
from .connectivity import graph_of

RULE_IDS = ("clearance",)
SUMMARY = ("copper of different nets closer than IPC-2221B Table 6-1 or IEC 60664-1 "
           "requires for the voltage between them, also through floating copper")
ORDER = 20

#: Copper within this distance (mm) of a termination is judged as the termination.
SLIVER_MM = 0.01
#: A gap is a violation when it falls short of the requirement by more than this (mm).
TOLERANCE_MM = DISTANCE_RESOLUTION_MM / 2
#: Buffers used to find places: quad_segs and the factor that makes the flattened buffer
#: cover the true offset curve (chord sagitta r (1 - cos(pi / (4 q)))).
_QUAD_SEGS = 4
_COVER = 1.0 / math.cos(math.pi / (4 * _QUAD_SEGS))


@dataclass(frozen=True)
class Need:
    """A required clearance under IEC 60664-1 (``standard = "iec60664-1"``) or the larger of
    IEC 60664-1 and IPC-2221B (``"both"``): ``mm``, the joined ``basis`` lines, the
    governing standard ``by`` and the ``insulation`` kind."""

    mm: float
    basis: str
    by: str
    insulation: str

    @classmethod
    def of(cls, req: Requirement, kind: str) -> "Need":
        return cls(req.clearance_mm, req.brief("clearance"), req.clearance_by, kind)


class _IpcNeeds:
    """IPC-2221B Table 6-1 requirements for one layer: conductor and termination columns."""

    def __init__(self, col_c: str, col_t: str):
        self.col_c, self.col_t = col_c, col_t
        self._by_volt: dict[float, tuple] = {}

    def pair(self, a: str, b: str, v: float) -> tuple:
        if v not in self._by_volt:
            self._by_volt[v] = (ipc2221b_spacing(v, self.col_c),
                                ipc2221b_spacing(v, self.col_t))
        return self._by_volt[v]

    def reach(self, vmax: float, terms: bool) -> float:
        r = ipc2221b_spacing(vmax, self.col_c).mm
        return max(r, ipc2221b_spacing(vmax, self.col_t).mm) if terms else r


class _IecNeeds:
    """IEC 60664-1 (or both standards) requirements for one layer, by insulation kind."""

    def __init__(self, project, rules: PairRules, outer: bool, classes: bool):
        self.project, self.rules, self.outer, self.classes = project, rules, outer, classes
        self.used: list[Requirement] = []

    def pair(self, a: str, b: str, v: float) -> tuple:
        kind, _ = pair_insulation(self.project, a, b)
        rc = self.rules.get(kind, v, self.outer, False)
        rt = self.rules.get(kind, v, self.outer, True) if self.classes else rc
        self.used.extend((rc, rt))
        return Need.of(rc, kind), Need.of(rt, kind)

    def reach(self, vmax: float, terms: bool) -> float:
        return self.rules.reach(vmax, "clearance_mm", self.outer)


def run(ctx: CheckContext) -> list[Finding]:
    """Clearance findings for every layer (see the module docstring)."""
    return findings(ctx)


def findings(ctx: CheckContext, rules=None) -> list[Finding]:
    """Clearance findings.  Under IEC 60664-1 (or both standards) ``rules`` replaces the
    requirement source (see :func:`layoutcheck.checks.creepage.findings`); default
    :class:`layoutcheck.conductors.PairRules` of the project."""
    g = graph_of(ctx)
    board = ctx.board
    env = ctx.project.environment
    std = env.standard
    if std == "ipc2221b":
        rules = None
    elif rules is None:
        rules = PairRules(ctx.project)
    volts: dict[str, tuple] = {}

    def voltage(net):
        if net not in volts:
            volts[net] = ctx.project.voltage_of(net)
        return volts[net][0]

    working_voltage = ctx.project.working_voltage

    used: dict[tuple[str, str], list[str]] = {}
    iec_used: list[Requirement] = []
    out: list[Finding] = []
    for layer in g.layers:
        ids = np.array([i for i in g.islands_on(layer) if g.island_net[i] is not None],
                       dtype=np.int64)
        nets = sorted({g.island_net[i] for i in ids})
        if len(nets) < 2:
            continue
        outer = board.is_outer(layer)
        if std == "ipc2221b":
            col_c, why_c = ipc2221b_column(outer, env.coating, env.altitude_m, False)
            col_t, why_t = ipc2221b_column(outer, env.coating, env.altitude_m, True)
            terms = _terminations(board, g, ids)
            used.setdefault((col_c, "conductors: " + why_c), []).append(layer)
            if terms:
                used.setdefault((col_t, "component terminations: " + why_t),
                                []).append(layer)
            needs = _IpcNeeds(col_c, col_t)
        else:
            # IEC 60664-1 makes no termination/conductor distinction; with "both" the
            # IPC-2221B column still depends on it, so the classes are kept then
            terms = _terminations(board, g, ids) if std == "both" else {}
            needs = _IecNeeds(ctx.project, rules, outer, std == "both")
        out.extend(_layer_findings(g, layer, ids, terms, needs, voltage, working_voltage))
        if std != "ipc2221b":
            iec_used.extend(needs.used)

    out = _earth_and_chains(ctx, g, out, rules)

    for (col, why), layers in sorted(used.items()):
        ctx.assume("clearance", f"IPC-2221B Table 6-1 column {col} on {', '.join(layers)}, "
                                f"for {why}")
    if used and not load_table("ipc2221b").verified:
        ctx.assume("clearance", (
            "the IPC-2221B Table 6-1 spacings are recalled from memory and have not been "
            "checked against the standard (nor has the rule above 500 V, taken as the "
            "500 V value plus the per-volt value for each volt above 500)"))
    for req in iec_used:
        for line in req.assumptions:
            ctx.assume("clearance", line)
    if iec_used:
        for key, text in (("pollution_degree", f"pollution degree {env.pollution_degree}"),
                          ("overvoltage_category",
                           f"overvoltage category {env.overvoltage_category}")):
            if key not in env.explicit:
                ctx.assume("environment", f"{key.replace('_', ' ')} not given in "
                                          f"[environment]: {text} assumed for IEC 60664-1")
    return out


def _terminations(board, g, ids) -> dict[int, list]:
    """Island id -> geometries of the termination shapes on it (islands that have any)."""
    found: dict[int, list] = {}
    for i in ids.tolist():
        for s in g.islands[i].shapes:
            shape = board.shapes[s]
            if shape.is_termination:
                found.setdefault(i, []).append(shape.geometry)
    return found


def _termination_parts(g, found: dict[int, list], keys) -> dict[int, tuple]:
    """Island id -> (termination union, the island's copper less the terminations grown by
    :data:`SLIVER_MM`) for the islands ``keys`` that carry terminations."""
    keys = sorted(k for k in keys if k in found)
    if not keys:
        return {}
    t = np.array([_union(found[i]) for i in keys], dtype=object)
    isl = np.array([g.islands[i].geometry for i in keys], dtype=object)
    c = shapely.difference(isl, shapely.buffer(t, SLIVER_MM, quad_segs=_QUAD_SEGS))
    return {i: (t[k], c[k]) for k, i in enumerate(keys)}


def _layer_findings(g, layer, ids, terms, needs, voltage, working_voltage) -> list[Finding]:
    nets = sorted({g.island_net[i] for i in ids.tolist()})
    net_code = {n: k for k, n in enumerate(nets)}
    ranges = [voltage(n) for n in nets]
    vmax = max(0.0, max(r.hi for r in ranges) - min(r.lo for r in ranges))
    reach = needs.reach(vmax, bool(terms))

    geoms = np.array([g.islands[i].geometry for i in ids.tolist()], dtype=object)
    code = np.array([net_code[g.island_net[i]] for i in ids.tolist()], dtype=np.int64)
    has_t = np.array([i in terms for i in ids.tolist()], dtype=bool)
    qa, qb = shapely.STRtree(geoms).query(geoms, predicate="dwithin", distance=reach)
    keep = (qa < qb) & (code[qa] != code[qb])
    qa, qb = qa[keep], qb[keep]
    if not len(qa):
        return []
    lo = np.minimum(code[qa], code[qb])
    hi = np.maximum(code[qa], code[qb])
    n = len(nets)
    pair_code = lo * n + hi
    uniq, inv = np.unique(pair_code, return_inverse=True)
    req: dict[int, tuple] = {}
    r_cond = np.empty(len(uniq))
    r_t_arr = np.empty(len(uniq))
    r_any = np.empty(len(uniq))
    for k, pc in enumerate(uniq.tolist()):
        a, b = nets[pc // n], nets[pc % n]
        v = working_voltage(a, b)
        rc, rt = needs.pair(a, b, v)
        req[pc] = (v, rc, rt)
        r_cond[k], r_t_arr[k], r_any[k] = rc.mm, rt.mm, max(rc.mm, rt.mm)
    # exact prefilter per class: the conductor class can only fall short where the islands
    # are closer than its requirement; the termination class where a termination is.
    # Prepared dwithin (indexed) with the larger geometry first keeps planes cheap.
    shapely.prepare(geoms)
    close_any = _within(geoms[qa], geoms[qb], r_any[inv] - TOLERANCE_MM)
    close = close_any.copy()
    close[close_any] = _within(geoms[qa[close_any]], geoms[qb[close_any]],
                               r_cond[inv[close_any]] - TOLERANCE_MM)
    tq = np.flatnonzero(~close & close_any & (has_t[qa] | has_t[qb]))
    if len(tq):
        ta, tb = qa[tq], qb[tq]
        tgeom = np.empty(len(ids), dtype=object)
        tgeom[:] = Polygon()
        for k in np.unique(np.concatenate([ta, tb])).tolist():
            tgeom[k] = _union(terms.get(int(ids[k]), []))
        shapely.prepare(tgeom)
        rt_q = r_t_arr[inv[tq]] - TOLERANCE_MM
        close[tq] = _within(tgeom[ta], geoms[tb], rt_q) | _within(geoms[ta], tgeom[tb], rt_q)
    groups: dict[int, tuple[set, set]] = {}
    for a_i, b_i, pc in zip(qa[close].tolist(), qb[close].tolist(),
                            pair_code[close].tolist()):
        lo_net = nets[pc // n]
        side_a, side_b = (a_i, b_i) if nets[code[a_i]] == lo_net else (b_i, a_i)
        ga, gb = groups.setdefault(pc, (set(), set()))
        ga.add(int(ids[side_a]))
        gb.add(int(ids[side_b]))

    parts = _termination_parts(g, terms, set().union(*(a | b for a, b in groups.values()))
                               if groups else ())
    out = []
    for pc in sorted(groups, key=lambda c: (nets[c // n], nets[c % n])):
        ia, ib = groups[pc]
        v, rc, rt = req[pc]
        out.extend(_pair_findings(g, layer, nets[pc // n], nets[pc % n], sorted(ia),
                                  sorted(ib), parts, v, rc, rt))
    return out


def _within(a, b, dist) -> np.ndarray:
    """Vectorised ``distance(a, b) <= dist`` (mm); empty geometries are never within."""
    big_first = shapely.get_num_coordinates(a) >= shapely.get_num_coordinates(b)
    x, y = np.where(big_first, a, b), np.where(big_first, b, a)
    return shapely.dwithin(x, y, dist) & ~shapely.is_empty(a) & ~shapely.is_empty(b)


def _grow(bounds, r):
    x0, y0, x1, y1 = bounds
    return box(x0 - r, y0 - r, x1 + r, y1 + r)


#: Geometries with more vertices than this are clipped to the other net's neighbourhood
#: before buffering (planes); smaller ones are cheaper to use whole.
_CLIP_ABOVE = 64


def _near(geom, window):
    """``geom`` clipped to ``window`` when that is worth it (big geometry sticking out)."""
    if geom.is_empty or shapely.get_num_coordinates(geom) <= _CLIP_ABOVE:
        return geom
    if shapely.contains_properly(window, geom):
        return geom
    return shapely.intersection(geom, window)


def _union(geoms):
    if not geoms:
        return Polygon()
    if len(geoms) == 1:
        return geoms[0]
    return shapely.union_all(geoms)


def _pair_findings(g, layer, net_a, net_b, ia, ib, terms, v, rc, rt) -> list[Finding]:
    """Findings for one net pair on one layer, from the islands that come close."""
    A = _union([g.islands[i].geometry for i in ia])
    B = _union([g.islands[i].geometry for i in ib])
    has_terms = any(i in terms for i in ia) or any(i in terms for i in ib)
    reach = (max(rc.mm, rt.mm) if has_terms else rc.mm) * _COVER + 1e-6
    # only the neighbourhood of the other net matters
    box_a, box_b = _grow(A.bounds, reach), _grow(B.bounds, reach)
    A, B = _near(A, box_b), _near(B, box_a)
    if A.is_empty or B.is_empty:
        return []

    # classes: (name, requirement, [(a-side geometry, b-side geometry), ...])
    if not has_terms:
        classes = [("conductor", rc, [(A, B)])]
    else:
        TA = _near(_union([terms[i][0] for i in ia if i in terms]), box_b)
        TB = _near(_union([terms[i][0] for i in ib if i in terms]), box_a)
        CA = _near(_union([terms[i][1] if i in terms else g.islands[i].geometry
                           for i in ia]), box_b)
        CB = _near(_union([terms[i][1] if i in terms else g.islands[i].geometry
                           for i in ib]), box_a)
        classes = [(name, r, [(x, y) for x, y in pairs if not (x.is_empty or y.is_empty)])
                   for name, r, pairs in (("conductor", rc, [(CA, CB)]),
                                          ("termination", rt, [(TA, B), (A, TB)]))]

    # zones: a-side copper within the (covering) required distance of the b side
    zones = []
    for _, r, pairs in classes:
        for x, y in pairs:
            z = shapely.intersection(x, shapely.buffer(y, r.mm * _COVER + 1e-6,
                                                       quad_segs=_QUAD_SEGS))
            if not z.is_empty:
                zones.append(z)
    if not zones:
        return []
    merged = shapely.buffer(shapely.geometrycollections(zones), 0.5 * reach, quad_segs=4)
    places = shapely.get_parts(merged)
    if len(places) > 1:
        b = shapely.bounds(places)
        places = places[np.lexsort((b[:, 1], b[:, 0]))]

    out = []
    for place in places:
        single = len(places) == 1
        short = []   # (shortfall, class, requirement, (distance, a-side, b-side))
        for name, r, pairs in classes:
            found = None
            for x, y in pairs:
                # b-side copper is left whole: its nearest points to the a-side copper of
                # this place are wherever they are
                xp = x if single else shapely.intersection(x, place)
                if xp.is_empty:
                    continue
                line = shapely.shortest_line(xp, y)   # its length is the distance
                d = float(shapely.length(line))
                if found is None or d < found[0]:
                    found = (d, line)
            if found is not None and found[0] < r.mm - TOLERANCE_MM:
                short.append((r.mm - found[0], name, r, found))
        if not short:
            continue
        # the larger shortfall is reported; on a tie the termination class (listed last)
        short.sort(key=lambda t: (-t[0], t[1] != "termination"))
        _, cls, r, (d, line) = short[0]
        p, q = shapely.get_coordinates(line)[:2]
        if has_terms:
            ap = A if single else shapely.intersection(A, place)
            closest = float(shapely.distance(ap, B))
        else:
            closest = d
        also = [(o_cls, o_r, o_found[0]) for _, o_cls, o_r, o_found in short[1:]]
        out.append(_finding(layer, net_a, net_b, cls, d, r, v, tuple(map(float, p)),
                            tuple(map(float, q)), closest, also))
    return out


def _mm(x: float) -> str:
    s = f"{x:.3f}".rstrip("0")
    whole, _, frac = s.partition(".")
    return f"{whole}.{frac.ljust(2, '0')}"


def _finding(layer, net_a, net_b, cls, d, r, v, p, q, closest, also, via=None,
             path=None) -> Finding:
    at = " at a component termination" if cls == "termination" else ""
    through = (f" through {', '.join(via)} (no potential of its own: zero length)"
               if via else "")
    if isinstance(r, Need):
        label = f"{r.by}, {r.insulation} insulation"
        extra = {"class": cls, "standard": r.by, "insulation": r.insulation}
    else:
        label = f"{load_table('ipc2221b').reference} {r.column}, {r.row}"
        extra = {"class": cls, "column": r.column, "row": r.row}
    msg = (f"{net_a} and {net_b} are {_mm(d)} mm apart on {layer}{at}{through}; "
           f"{_mm(r.mm)} mm required at {v:g} V ({label})")
    extra["closest_mm"] = round(closest, 7)
    if also:
        o_cls, o_r, o_d = also[0]
        what = "a component termination" if o_cls == "termination" else "conductor copper"
        o_label = o_r.by if isinstance(o_r, Need) else o_r.column
        msg += (f"; here {what} is also {_mm(o_d)} mm away ({_mm(o_r.mm)} mm required, "
                f"{o_label})")
        key = "standard" if isinstance(o_r, Need) else "column"
        extra["also"] = [{"class": c, key: (rr.by if isinstance(rr, Need) else rr.column),
                          "measured_mm": round(dd, 7), "required_mm": rr.mm}
                         for c, rr, dd in also]
    if via:
        extra["via"] = list(via)
    if path is not None:
        extra["path"] = [[round(float(x), 6), round(float(y), 6)] for x, y in path]
    return Finding(
        rule="clearance", severity="error", message=msg + ".", layer=layer,
        nets=[net_a, net_b], measured_mm=round(d, 7), required_mm=r.mm, voltage_v=v,
        basis=r.basis, where=p, to=q, extra=extra)


# -- earth conductors and chains through floating copper ---------------------------------

def _earth_and_chains(ctx: CheckContext, g, direct: list[Finding],
                      rules: PairRules | None) -> list[Finding]:
    """Add net-to-earth findings and chain findings (see the module docstring) to
    ``direct``; a chain replaces the direct findings it beats in the same place."""
    board, project = ctx.board, ctx.project
    env = project.environment
    out = list(direct)
    for layer in g.layers:
        ends = end_conductors(board, g, project, layer)
        earth = [c for c in ends if c.kind == "earth"]
        stones = stepping_stones(board, g, layer)
        if not earth and not stones:
            continue
        outer = board.is_outer(layer)
        if rules is None:
            col_c, _ = ipc2221b_column(outer, env.coating, env.altitude_m, False)
            col_t, _ = ipc2221b_column(outer, env.coating, env.altitude_m, True)

            def need(a, b, v):
                rc, rt = ipc2221b_spacing(v, col_c), ipc2221b_spacing(v, col_t)
                return (rt, "termination") if rt.mm > rc.mm else (rc, "conductor")
        else:
            def need(a, b, v):
                kind, _ = pair_insulation(project, a.name, b.name)
                req = rules.get(kind, v, outer, a.terminations or b.terminations)
                for line in req.assumptions:
                    ctx.assume("clearance", line)
                return Need.of(req, kind), "conductor"
        vmax = voltage_span(project, ends)
        if rules is None:
            reach = max(ipc2221b_spacing(vmax, col_c).mm, ipc2221b_spacing(vmax, col_t).mm)
        else:
            reach = rules.reach(vmax, "clearance_mm", outer)
        ends = sorted(ends, key=lambda c: c.name)

        # nets to earth, place by place
        if earth:
            needs: dict[tuple[int, int], tuple] = {}

            def pair_need(i, j):
                if (i, j) not in needs:
                    v = pair_voltage(project, ends[i].name, ends[j].name)
                    needs[(i, j)] = (v,) + tuple(need(ends[i], ends[j], v))
                return needs[(i, j)]

            def earth_pair(i, j):
                return (ends[i].kind == "earth") != (ends[j].kind == "earth")

            for i, j, A, B in close_pairs(ends, reach, lambda i, j: pair_need(i, j)[1].mm,
                                          TOLERANCE_MM, earth_pair):
                v, r, cls = pair_need(i, j)
                for place in close_places(A, B, r.mm):
                    line = shapely.shortest_line(place, B)
                    d = float(shapely.length(line))
                    if d < r.mm - TOLERANCE_MM:
                        p, q = shapely.get_coordinates(line)[:2]
                        out.append(_finding(layer, ends[i].name, ends[j].name, cls, d, r, v,
                                            tuple(map(float, p)), tuple(map(float, q)), d,
                                            []))

        # chains through floating copper
        chains = shortest_chains(ends, stones, straight_gaps, reach)
        for ch in chains:
            a, b = ends[ch.a], ends[ch.b]
            v = pair_voltage(project, a.name, b.name)
            r, cls = need(a, b, v)
            if ch.length >= r.mm - TOLERANCE_MM:
                continue
            path = ch.path()
            f = _finding(layer, a.name, b.name, cls, ch.length, r, v,
                         tuple(map(float, path[0])), tuple(map(float, path[-1])), ch.length,
                         [], via=[stones[k].name for k in ch.stones], path=path)
            same = [x for x in out if x.layer == layer and x.nets == f.nets]
            keep, removed = supersede(same, f, r.mm, TOLERANCE_MM)
            if keep:
                gone = {id(x) for x in removed}
                out = [x for x in out if id(x) not in gone]
                out.append(f)
    return out
