"""Clearance: copper of two different nets on one layer closer than IPC-2221B asks for.

Units: millimetres, volts.

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

import numpy as np
import shapely
from shapely.geometry import Polygon, box

from ..findings import Finding
from ..physics.spacing import ipc2221b_column, ipc2221b_spacing, load_table
from ..units import DISTANCE_RESOLUTION_MM
from . import CheckContext
from .connectivity import graph_of

RULE_IDS = ("clearance",)
SUMMARY = ("copper of different nets closer than IPC-2221B Table 6-1 requires for the "
           "voltage between them")
ORDER = 20

#: Copper within this distance (mm) of a termination is judged as the termination.
SLIVER_MM = 0.01
#: A gap is a violation when it falls short of the requirement by more than this (mm).
TOLERANCE_MM = DISTANCE_RESOLUTION_MM / 2
#: Buffers used to find places: quad_segs and the factor that makes the flattened buffer
#: cover the true offset curve (chord sagitta r (1 - cos(pi / (4 q)))).
_QUAD_SEGS = 4
_COVER = 1.0 / math.cos(math.pi / (4 * _QUAD_SEGS))


def run(ctx: CheckContext) -> list[Finding]:
    """Clearance findings for every layer (see the module docstring)."""
    g = graph_of(ctx)
    board = ctx.board
    env = ctx.project.environment
    volts: dict[str, tuple] = {}

    def voltage(net):
        if net not in volts:
            volts[net] = ctx.project.voltage_of(net)
        return volts[net][0]

    working_voltage = ctx.project.working_voltage

    used: dict[tuple[str, str], list[str]] = {}
    out: list[Finding] = []
    for layer in g.layers:
        ids = np.array([i for i in g.islands_on(layer) if g.island_net[i] is not None],
                       dtype=np.int64)
        nets = sorted({g.island_net[i] for i in ids})
        if len(nets) < 2:
            continue
        outer = board.is_outer(layer)
        col_c, why_c = ipc2221b_column(outer, env.coating, env.altitude_m, False)
        col_t, why_t = ipc2221b_column(outer, env.coating, env.altitude_m, True)
        terms = _terminations(board, g, ids)
        used.setdefault((col_c, "conductors: " + why_c), []).append(layer)
        if terms:
            used.setdefault((col_t, "component terminations: " + why_t), []).append(layer)
        out.extend(_layer_findings(g, layer, ids, terms, col_c, col_t, voltage,
                                   working_voltage))

    for (col, why), layers in sorted(used.items()):
        ctx.assume("clearance", f"IPC-2221B Table 6-1 column {col} on {', '.join(layers)}, "
                                f"for {why}")
    if used and not load_table("ipc2221b").verified:
        ctx.assume("clearance", (
            "the IPC-2221B Table 6-1 spacings are recalled from memory and have not been "
            "checked against the standard (nor has the rule above 500 V, taken as the "
            "500 V value plus the per-volt value for each volt above 500)"))
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


def _layer_findings(g, layer, ids, terms, col_c, col_t, voltage,
                    working_voltage) -> list[Finding]:
    nets = sorted({g.island_net[i] for i in ids.tolist()})
    net_code = {n: k for k, n in enumerate(nets)}
    ranges = [voltage(n) for n in nets]
    vmax = max(0.0, max(r.hi for r in ranges) - min(r.lo for r in ranges))
    reach = ipc2221b_spacing(vmax, col_c).mm
    if terms:
        reach = max(reach, ipc2221b_spacing(vmax, col_t).mm)

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
    by_volt: dict[float, tuple] = {}
    for k, pc in enumerate(uniq.tolist()):
        a, b = nets[pc // n], nets[pc % n]
        v = working_voltage(a, b)
        if v not in by_volt:
            by_volt[v] = (ipc2221b_spacing(v, col_c), ipc2221b_spacing(v, col_t))
        rc, rt = by_volt[v]
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


def _finding(layer, net_a, net_b, cls, d, r, v, p, q, closest, also) -> Finding:
    at = " at a component termination" if cls == "termination" else ""
    ref = load_table("ipc2221b").reference
    msg = (f"{net_a} and {net_b} are {_mm(d)} mm apart on {layer}{at}; {_mm(r.mm)} mm "
           f"required at {v:g} V ({ref} {r.column}, {r.row})")
    extra = {"class": cls, "column": r.column, "row": r.row, "closest_mm": round(closest, 7)}
    if also:
        o_cls, o_r, o_d = also[0]
        what = "a component termination" if o_cls == "termination" else "conductor copper"
        msg += (f"; here {what} is also {_mm(o_d)} mm away ({_mm(o_r.mm)} mm required, "
                f"{o_r.column})")
        extra["also"] = [{"class": c, "column": rr.column, "measured_mm": round(dd, 7),
                          "required_mm": rr.mm} for c, rr, dd in also]
    return Finding(
        rule="clearance", severity="error", message=msg + ".", layer=layer,
        nets=[net_a, net_b], measured_mm=round(d, 7), required_mm=r.mm, voltage_v=v,
        basis=r.basis, where=p, to=q, extra=extra)
