"""The path a current takes on one net between two pads, across layers and through vias.

Units: millimetres (coordinates, lengths, widths, thicknesses, z heights).

The conductor
    On each copper layer the net's copper is ``graph.net_geometry(net, layer)``, plus the
    footprints of the plated holes that join this net's copper on that layer (the plated
    barrel carries current across its own hole), minus the footprints of non-plated holes
    (the drill removes copper it passes through).  Only the polygons of that layer that
    hold a start, end or via node are searched.

    A *via* is any plated hole (or plated slot) that touches the net's copper, within
    :data:`layoutcheck.netgraph.HOLE_CONTACT_MM`, on at least two copper layers of its
    span.  It is a node at its centre on each of those layers; nodes on layers next to each
    other in that list are joined by a vertical piece of length ``|dz|`` (z from
    :func:`copper_z`).

The shortest path (:func:`current_path`)
    Inside one layer the shortest path between two points of a polygon with holes is a
    polyline that bends only at reflex vertices of the polygon (corners pointing into the
    copper: inner corners of bends, convex corners of holes), and at each bend both legs
    support the polygon there (both ring neighbours of the vertex on one side of the leg).
    The nodes are therefore the start, the end, the via nodes and the reflex vertices of
    each layer; two nodes of one copper polygon are joined when the straight segment
    between them lies in it and is tangent at each end that is a reflex vertex -- the same
    tangent visibility graph as :mod:`layoutcheck.geometry.paths`, whose ring helpers are
    reused.  "Lies in it" is decided exactly, vectorised, ring by ring: the outer ring's
    polygon covers the segment and no hole's interior meets it (STRtree query, prepared
    ``intersects``, then ``relate`` on the few holes touched), which keeps each test to
    the few hundred vertices nearby instead of the whole pour.  A* search (Dijkstra
    ordered by ``g + h``, with ``h`` the straight 3-D distance to the nearest end node,
    which never overestimates) finds the path; a node's edges are worked out only when
    the search reaches it, so a large pour is explored only as far as needed.  Node ties
    are broken by node number, so the same input gives the same path.  The answer is exact
    for the polygons given (arcs reach here flattened to chords within 0.5 um).

Local width of an in-plane piece
    At :data:`WIDTH_SAMPLES` points along the piece (at fractions 0.1, 0.3 .. 0.9) a line
    is cast perpendicular to the piece across the whole layer; its intersection with the
    layer's conductor polygon is cut into intervals, touching intervals are merged, and
    the interval holding the sample point is that point's width.  The piece gets the
    median of the samples, capped at :data:`WIDTH_CAP_MM`.  On a straight track whose
    piece runs along it this is exactly the track width; a piece crossing a track at an
    angle ``a`` to its axis gets ``width / cos(a)``; on a pour it is the pour's extent
    across the path (capped).  Thickness is ``board.stackup.copper(layer)``.

Vias
    A via piece has the hole's diameter as ``width`` and :data:`PLATING_MM` as
    ``thickness`` (the barrel wall).  A through-hole pad given with ``layer=None`` is
    entered on any layer whose conductor holds the point; the component lead is taken to
    carry the current between layers there, so no vertical piece is added for it.

Limits
    * A path does not pass between two polygons of one layer that touch only at a point
      (the net graph counts them as joined): such pads are reported as not connected.
    * Cost: each node the search reaches tests its segments to the other nodes of its
      polygon; a finely flattened curve gives many nodes.  About 2 s for a 100 x 80 mm
      pour with 80 round clearances (20,000 vertices) and 320 vias on two layers.
    * The current is a single line (the shortest one), not a spread over the copper: the
      width only says how wide the copper is around it.
"""
from __future__ import annotations

import heapq
import math
from dataclasses import dataclass

import numpy as np
import shapely
from shapely.geometry import Point, Polygon
from shapely.geometry.base import BaseGeometry

from ..errors import UsageError
from ..model import Board
from ..netgraph import HOLE_CONTACT_MM, NetGraph
from ..physics.inductance import Segment
from .paths import _cross, _rings, _segments, _tangent

#: Plating thickness of a via barrel wall (mm): 25 um, a common nominal value for
#: plated-through holes (common practice).
PLATING_MM = 0.025
#: Widths of in-plane pieces are capped here (mm): a pour wider than this around a path
#: does not carry the current evenly across its full extent anyway.
WIDTH_CAP_MM = 50.0
#: Sample points along each in-plane piece for its width.
WIDTH_SAMPLES = 5
#: Smallest width reported (mm), for a piece squeezed through a pinch of zero width.
MIN_WIDTH_MM = 0.001
#: Collinearity tolerance (sine of the angle) when joining consecutive pieces.
_COLLINEAR = 1e-9
_EPS = 1e-12


@dataclass
class PathPiece:
    """One straight piece of a current path (mm).

    start, end: ``(x, y, z)`` mm; current flows from start to end.  z from :func:`copper_z`.
    layer:      copper layer of an in-plane piece; ``None`` for a via barrel.
    width:      local copper width (mm) for a trace; the hole diameter for a via.
    thickness:  copper thickness (mm) for a trace; :data:`PLATING_MM` for a via.
    kind:       ``"trace"`` or ``"via"``.
    span:       for a via, the copper layers at its start and end; ``None`` for a trace.
    hole:       for a via, the index into ``board.holes``; ``None`` for a trace.
    """

    start: tuple[float, float, float]
    end: tuple[float, float, float]
    layer: str | None
    width: float
    thickness: float
    kind: str
    span: tuple[str, str] | None = None
    hole: int | None = None

    @property
    def length(self) -> float:
        """Length of the piece (mm)."""
        return math.dist(self.start, self.end)


@dataclass
class CurrentPath:
    """The current path of ``net`` between two pads.

    pieces:    straight pieces in order, each ending where the next starts (mm).
    length_mm: total length (mm), in-plane plus vertical.
    start, end: the points used, ``(x, y, layer)`` mm (the layer chosen when the caller
               gave ``None``).
    """

    net: str
    pieces: list[PathPiece]
    length_mm: float
    start: tuple[float, float, str] | None = None
    end: tuple[float, float, str] | None = None

    def segments(self) -> list[Segment]:
        """The pieces as :class:`layoutcheck.physics.inductance.Segment` s (mm), current
        from start to end: traces as bars (width x thickness), vias as tubes (diameter)."""
        out = []
        for p in self.pieces:
            if p.kind == "via":
                out.append(Segment(p.start, p.end, p.width, p.thickness, "tube"))
            else:
                out.append(Segment(p.start, p.end, p.width, p.thickness, "bar"))
        return out

    def points(self) -> list[tuple[float, float, str]]:
        """The path as a polyline ``[(x, y, layer)]`` (mm) for reports; a via shows as two
        points at the same (x, y) on the two layers it joins."""
        out: list[tuple[float, float, str]] = []

        def add(x, y, layer):
            item = (float(x), float(y), layer)
            if not out or out[-1] != item:
                out.append(item)

        if not self.pieces and self.start is not None:
            add(*self.start)
        for p in self.pieces:
            if p.kind == "via":
                add(p.start[0], p.start[1], p.span[0])
                add(p.end[0], p.end[1], p.span[1])
            else:
                add(p.start[0], p.start[1], p.layer)
                add(p.end[0], p.end[1], p.layer)
        return out

    @property
    def holes(self) -> list[int]:
        """Indices into ``board.holes`` of the vias the path goes through, in path order."""
        out: list[int] = []
        for p in self.pieces:
            if p.kind == "via" and (not out or out[-1] != p.hole):
                out.append(p.hole)
        return out


# -- stackup heights -------------------------------------------------------------------------

def copper_z(board: Board) -> dict[str, float]:
    """Height (mm) of the mid-plane of each copper layer above the bottom of the board.

    Bottom copper sits at ``t_bottom / 2``, top copper at ``thickness_mm - t_top / 2``
    (``t`` from ``board.stackup.copper``).  Inner layers are placed from the top down
    through ``stackup.dielectric_mm`` (the dielectric below each layer); a missing
    dielectric gets an equal share of what the given ones leave, and all dielectrics are
    scaled together so that the stack adds up to ``thickness_mm``.  A single copper layer
    named ``bottom`` sits at ``t / 2``, any other single layer at the top.

    Raises
    ------
    UsageError
        When the board is not thicker than its copper.
    """
    return _copper_z(list(board.copper_layers), board)


def _copper_z(layers: list[str], board: Board) -> dict[str, float]:
    st = board.stackup
    T = float(st.thickness_mm)
    if not layers:
        return {}
    t = [float(st.copper(name)) for name in layers]
    if len(layers) == 1:
        name = layers[0]
        return {name: t[0] / 2 if name == "bottom" else T - t[0] / 2}
    diel_total = T - sum(t)
    if not diel_total > 0:
        raise UsageError(f"stackup thickness {T:g} mm is not more than its copper "
                         f"({sum(t):g} mm over {len(layers)} layers); expected a board "
                         "thicker than its copper")
    gaps = [st.dielectric_mm.get(name) for name in layers[:-1]]
    given = [g for g in gaps if g is not None and g > 0]
    missing = len(gaps) - len(given)
    if missing:
        share = (diel_total - sum(given)) / missing
        if not share > 0:
            share = diel_total / len(gaps)
        gaps = [g if (g is not None and g > 0) else share for g in gaps]
    scale = diel_total / sum(gaps)
    gaps = [g * scale for g in gaps]
    z = {layers[0]: T - t[0] / 2}
    for k in range(1, len(layers)):
        z[layers[k]] = z[layers[k - 1]] - t[k - 1] / 2 - gaps[k - 1] - t[k] / 2
    z[layers[-1]] = t[-1] / 2  # the same value up to rounding; pinned exactly
    return z


# -- the conductor of one layer ----------------------------------------------------------------

@dataclass
class _LayerDomain:
    full: BaseGeometry          # conductor polygon of the whole layer (for widths)
    search: BaseGeometry        # the parts holding a node
    V: np.ndarray               # reflex vertices (k x 2)
    PREV: np.ndarray
    NEXT: np.ndarray
    vis: "_Visibility"


class _Visibility:
    """Exact "segment lies in the closed polygon" tests, split by rings.

    A segment between two points of one part lies in that part when its outer ring's
    polygon covers it and it meets the interior of none of that part's holes.  The holes
    are tested one by one (``relate``, interior with interior) after an STRtree query, so
    each test sees a few hundred vertices instead of the whole pour: a segment that
    touches the boundary (every bend does) makes ``covers`` fall back to a full relate
    of the polygon it is given.
    """

    def __init__(self, geom: BaseGeometry):
        parts = shapely.get_parts(geom)
        self.parts = parts[shapely.get_type_id(parts) == 3]
        self.shells = shapely.polygons(shapely.get_exterior_ring(self.parts))
        shapely.prepare(self.shells)
        rings, owner = shapely.get_rings(self.parts, return_index=True)
        first = np.r_[True, owner[1:] != owner[:-1]] if len(owner) else np.zeros(0, bool)
        self.holes = shapely.polygons(rings[~first])
        shapely.prepare(self.holes)
        self.hole_part = owner[~first]
        self.hole_tree = shapely.STRtree(self.holes)
        self.part_tree = shapely.STRtree(self.parts)

    def part_of(self, pts: np.ndarray) -> np.ndarray:
        """Index of the part holding each point (the first one; -1 if none)."""
        out = np.full(len(pts), -1, dtype=np.int64)
        if len(pts) and len(self.parts):
            qi, pi = self.part_tree.query(shapely.points(pts), predicate="intersects")
            order = np.lexsort((pi, qi))
            qi, pi = qi[order], pi[order]
            first = np.r_[True, qi[1:] != qi[:-1]]
            out[qi[first]] = pi[first]
        return out

    def visible(self, p: np.ndarray, Q: np.ndarray, part: int) -> np.ndarray:
        """Whether each segment from point ``p`` to a row of ``Q`` lies in part ``part``."""
        if part < 0:
            return np.zeros(len(Q), dtype=bool)
        segs = _segments(np.repeat(p[None, :], len(Q), axis=0), Q)
        ok = shapely.covers(self.shells[part], segs)
        k = np.flatnonzero(ok)
        if len(k) and len(self.holes):
            si, hi = self.hole_tree.query(segs[k])            # boxes overlap
            same = self.hole_part[hi] == part
            si, hi = si[same], hi[same]
            meet = shapely.intersects(self.holes[hi], segs[k[si]])   # prepared holes
            si, hi = si[meet], hi[meet]
            if len(si):
                hit = shapely.relate_pattern(self.holes[hi], segs[k[si]], "T********")
                ok[k[si[hit]]] = False
        return ok


def _polygonal(g: BaseGeometry) -> BaseGeometry:
    if g.is_empty:
        return Polygon()
    if not g.is_valid:
        g = shapely.make_valid(g)
    if shapely.get_type_id(g) in (3, 6):
        return g
    parts = shapely.get_parts(g)
    parts = parts[np.isin(shapely.get_type_id(parts), (3, 6))]
    return shapely.union_all(parts) if len(parts) else Polygon()


def _layer_conductor(copper: BaseGeometry, plated_geoms: list, npth_tree, npth_geoms
                     ) -> BaseGeometry:
    g = copper
    if plated_geoms:
        g = shapely.union_all([g, *plated_geoms])
    if npth_tree is not None and not g.is_empty:
        hit = np.sort(npth_tree.query(g, predicate="intersects"))
        if len(hit):
            g = shapely.difference(g, shapely.union_all(npth_geoms[hit]))
    return _polygonal(g)


def _search_parts(full: BaseGeometry, nodes: np.ndarray) -> BaseGeometry:
    """The parts (polygons) of ``full`` that hold any of ``nodes``; a path cannot leave the
    part it starts in (see the limits in the module docstring)."""
    parts = shapely.get_parts(full)
    parts = parts[shapely.get_type_id(parts) == 3]
    if not len(parts) or not len(nodes):
        return Polygon()
    _, hit = shapely.STRtree(parts).query(shapely.points(nodes), predicate="intersects")
    keep = np.unique(hit)
    return shapely.multipolygons(parts[keep]) if len(keep) else Polygon()


def _reflex(geom: BaseGeometry):
    V, ip, inx = _rings(geom)
    if not len(V):
        return V, V, V
    PREV, NEXT = V[ip], V[inx]
    turn = _cross(V[:, 0] - PREV[:, 0], V[:, 1] - PREV[:, 1],
                  NEXT[:, 0] - V[:, 0], NEXT[:, 1] - V[:, 1])
    sel = turn < 0
    return V[sel], PREV[sel], NEXT[sel]


# -- the search -------------------------------------------------------------------------------

def _check_point(p, what: str, layers: list[str]) -> tuple[float, float, str | None]:
    try:
        x, y, layer = p
        x, y = float(x), float(y)
    except (TypeError, ValueError):
        raise UsageError(f"{what} must be (x, y, layer) with x, y in mm and layer a copper "
                         f"layer name or None, got {p!r}") from None
    if not (math.isfinite(x) and math.isfinite(y)):
        raise UsageError(f"{what} ({x}, {y}) must be finite coordinates in mm")
    if layer is not None and layer not in layers:
        raise UsageError(f"{what} layer {layer!r} is not a copper layer of this board; "
                         f"expected one of {', '.join(layers)} or None")
    return x, y, layer


def _fmt(x, y, layer) -> str:
    x, y = round(x, 3) + 0.0, round(y, 3) + 0.0
    return f"({x:.3f}, {y:.3f}) on {layer if layer is not None else 'any layer'}"


def current_path(board: Board, graph: NetGraph, net: str, start, end) -> CurrentPath:
    """Shortest current path (mm) on ``net`` from ``start`` to ``end``.

    Parameters
    ----------
    board:
        The board (holes and stackup are used).
    graph:
        Its net graph (:func:`layoutcheck.netgraph.build_netgraph`).
    net:
        Net name, a key of ``graph.nets``.
    start, end:
        Pad positions ``(x, y, layer)``, x and y in mm.  ``layer`` is a copper layer name,
        or ``None`` for "any layer whose copper of this net holds the point" (a
        through-hole pad).

    Returns
    -------
    CurrentPath
        Pieces in order from start to end (see the module docstring for the method).

    Raises
    ------
    UsageError
        Unknown net or layer, a point not on the net's copper, or the two points not
        connected through the net's copper; the message names the net and both points.
    """
    layers = list(graph.layers or board.copper_layers)
    if net not in graph.nets:
        raise UsageError(f"net {net!r} is not a net of board {board.name!r}")
    sx, sy, slayer = _check_point(start, "start", layers)
    ex, ey, elayer = _check_point(end, "end", layers)
    zmap = _copper_z(layers, board)

    # holes: plated ones joining the net's copper, non-plated ones removing copper
    holes = board.holes
    plated_idx = np.array([h for h, hole in enumerate(holes) if hole.plated], dtype=np.int64)
    npth_idx = [h for h, hole in enumerate(holes) if not hole.plated]
    plated_geoms = np.array([holes[h].geometry for h in plated_idx], dtype=object)
    npth_geoms = np.array([holes[h].geometry for h in npth_idx], dtype=object)
    plated_tree = shapely.STRtree(plated_geoms) if len(plated_geoms) else None
    npth_tree = shapely.STRtree(npth_geoms) if len(npth_geoms) else None
    rank = {name: k for k, name in enumerate(layers)}
    touches: dict[int, list[int]] = {}   # hole -> layer ranks it joins
    copper = {name: graph.net_geometry(net, name) for name in layers}
    for name in layers:
        if plated_tree is None or copper[name].is_empty:
            continue
        hit = plated_tree.query(copper[name], predicate="dwithin", distance=HOLE_CONTACT_MM)
        for k in np.sort(hit).tolist():
            h = int(plated_idx[k])
            lo, hi = _span(holes[h].span, rank, len(layers))
            if lo <= rank[name] <= hi:
                touches.setdefault(h, []).append(rank[name])
    vias = {h: r for h, r in sorted(touches.items()) if len(r) >= 2}

    # nodes: terminals per layer (start, end, vias), reflex vertices added per layer below
    xy: list[tuple[float, float]] = []
    lay: list[int] = []
    hole_of: list[int] = []
    starts: list[int] = []
    ends: list[int] = []
    domains: list[_LayerDomain | None] = []
    term_range: list[tuple[int, int]] = []
    vert_range: list[tuple[int, int]] = []
    for r, name in enumerate(layers):
        plated_here = [holes[h].geometry for h in vias if r in vias[h]]
        full = _layer_conductor(copper[name], plated_here, npth_tree, npth_geoms)
        t0 = len(xy)
        if not full.is_empty:
            shapely.prepare(full)
            for (px, py, pl), bucket in (((sx, sy, slayer), starts), ((ex, ey, elayer), ends)):
                if (pl == name or pl is None) and full.covers(Point(px, py)):
                    bucket.append(len(xy))
                    xy.append((px, py))
                    lay.append(r)
                    hole_of.append(-1)
            for h in vias:
                if r in vias[h]:
                    xy.append(holes[h].centre)
                    lay.append(r)
                    hole_of.append(h)
        t1 = len(xy)
        term_range.append((t0, t1))
        if t1 == t0:
            domains.append(None)
            vert_range.append((t1, t1))
            continue
        search = _search_parts(full, np.array(xy[t0:t1]))
        V, PREV, NEXT = _reflex(search)
        domains.append(_LayerDomain(full, search, V, PREV, NEXT, _Visibility(search)))
        vert_range.append((t1, t1 + len(V)))
        xy.extend(map(tuple, V.tolist()))
        lay.extend([r] * len(V))
        hole_of.extend([-1] * len(V))

    s_txt, e_txt = _fmt(sx, sy, slayer), _fmt(ex, ey, elayer)
    if not starts or not ends:
        which = "start" if not starts else "end"
        p = (sx, sy, slayer) if not starts else (ex, ey, elayer)
        raise UsageError(f"{which} point {_fmt(*p)} is not on the copper of net {net!r}; "
                         f"expected a pad of that net (current path from {s_txt} to "
                         f"{e_txt})")

    XY = np.array(xy, dtype=float)
    LAY = np.array(lay, dtype=np.int64)
    Z = np.array([zmap[layers[r]] for r in lay])
    HOLE = np.array(hole_of, dtype=np.int64)
    PART = np.full(len(XY), -1, dtype=np.int64)
    for r, dom in enumerate(domains):
        if dom is not None:
            a, b = term_range[r][0], vert_range[r][1]
            PART[a:b] = dom.vis.part_of(XY[a:b])
    path_nodes = _astar(XY, LAY, Z, HOLE, PART, starts, ends, domains, term_range,
                        vert_range)
    if path_nodes is None:
        raise UsageError(f"net {net!r}: {s_txt} and {e_txt} are not connected through "
                         "the net's copper and vias; expected two pads joined by copper")
    pieces = _pieces(path_nodes, XY, LAY, Z, HOLE, layers, board, domains)
    total = math.fsum(p.length for p in pieces)
    first, last = path_nodes[0], path_nodes[-1]
    return CurrentPath(net, pieces, total,
                       (float(XY[first, 0]), float(XY[first, 1]), layers[LAY[first]]),
                       (float(XY[last, 0]), float(XY[last, 1]), layers[LAY[last]]))


def _span(span, rank: dict, n: int) -> tuple[int, int]:
    try:
        a, b = rank[span[0]], rank[span[1]]
    except (KeyError, IndexError, TypeError):
        return 0, n - 1
    return min(a, b), max(a, b)


def _astar(XY, LAY, Z, HOLE, PART, starts, ends, domains, term_range, vert_range):
    """A* over the lazily built visibility graph; node list from a start to an end, or
    ``None`` when no end can be reached."""
    n = len(XY)
    EXY, EZ = XY[ends], Z[ends]
    h = np.full(n, np.inf)
    for k in range(len(ends)):  # a handful of end nodes (one per layer at most)
        h = np.minimum(h, np.hypot(XY[:, 0] - EXY[k, 0], XY[:, 1] - EXY[k, 1])
                       + np.abs(Z - EZ[k]))
    g = np.full(n, np.inf)
    parent = np.full(n, -1, dtype=np.int64)
    done = np.zeros(n, dtype=bool)
    is_end = np.zeros(n, dtype=bool)
    is_end[ends] = True
    # via nodes of each hole by layer rank, for the vertical edges
    via_nodes: dict[int, list[int]] = {}
    for i in np.flatnonzero(HOLE >= 0).tolist():
        via_nodes.setdefault(int(HOLE[i]), []).append(i)
    for hh in via_nodes:
        via_nodes[hh].sort(key=lambda i: LAY[i])
    heap = []
    for s in starts:
        g[s] = 0.0
        heapq.heappush(heap, (float(h[s]), s))
    while heap:
        f, u = heapq.heappop(heap)
        if done[u] or f > g[u] + h[u] + _EPS:
            continue
        done[u] = True
        if is_end[u]:
            path = [u]
            while parent[path[-1]] >= 0:
                path.append(int(parent[path[-1]]))
            return path[::-1]
        best = float(np.min(g[ends]))   # a path to an end is already known: prune beyond
        nb, w = _neighbours(u, XY, LAY, PART, g, h, best, done, domains, term_range,
                            vert_range)
        if HOLE[u] >= 0:
            chain = via_nodes[int(HOLE[u])]
            k = chain.index(u)
            extra = [chain[j] for j in (k - 1, k + 1) if 0 <= j < len(chain)]
            nb = np.concatenate([nb, np.array(extra, dtype=np.int64)])
            w = np.concatenate([w, np.abs(Z[extra] - Z[u])])
        for v, wt in zip(nb.tolist(), w.tolist()):
            nd = g[u] + wt
            if nd < g[v] - _EPS:
                g[v] = nd
                parent[v] = u
                heapq.heappush(heap, (nd + float(h[v]), v))
    return None


def _neighbours(u, XY, LAY, PART, g, h, best, done, domains, term_range, vert_range):
    """Nodes of ``u``'s layer visible from ``u`` along tangent segments that could improve
    their cost and could still lead to an end within ``best``: (node ids, lengths)."""
    r = int(LAY[u])
    dom = domains[r]
    empty = (np.empty(0, dtype=np.int64), np.empty(0))
    if dom is None:
        return empty
    t0 = term_range[r][0]
    v0, v1 = vert_range[r]
    if v0 <= u < v1:
        # leaving a bend: the leg must be tangent there (a narrow cone of directions on a
        # finely flattened curve), which rules out most nodes cheaply
        k = u - v0
        d = XY[t0:v1] - XY[u]
        cand = np.flatnonzero(_tangent(dom.V[k][None], dom.PREV[k][None],
                                       dom.NEXT[k][None], d)) + t0
    else:
        cand = np.arange(t0, v1)
    d = XY[cand] - XY[u]
    ln = np.hypot(d[:, 0], d[:, 1])
    nd = g[u] + ln
    ok = ((cand != u) & ~done[cand] & (PART[cand] == PART[u]) & (nd < g[cand] - _EPS)
          & (nd + h[cand] < best - _EPS))
    cand, d, ln = cand[ok], d[ok], ln[ok]
    # arriving at a bend: tangent there too
    isv = cand >= v0
    if isv.any():
        k = cand[isv] - v0
        ok = np.ones(len(cand), dtype=bool)
        ok[np.flatnonzero(isv)] = _tangent(dom.V[k], dom.PREV[k], dom.NEXT[k], d[isv])
        cand, d, ln = cand[ok], d[ok], ln[ok]
    if not len(cand):
        return empty
    zero = ln <= _EPS
    vis = zero.copy()
    if (~zero).any():
        vis[~zero] = dom.vis.visible(XY[u], XY[cand[~zero]], int(PART[u]))
    return cand[vis], ln[vis]


# -- pieces -----------------------------------------------------------------------------------

def _pieces(nodes, XY, LAY, Z, HOLE, layers, board, domains) -> list[PathPiece]:
    raw = []  # (layer rank or None for via, p, q, hole)
    for a, b in zip(nodes, nodes[1:]):
        pa, pb = XY[a], XY[b]
        if LAY[a] == LAY[b]:
            if math.hypot(*(pb - pa)) > _EPS:
                raw.append((int(LAY[a]), a, b))
        else:
            raw.append((None, a, b))
    # join consecutive collinear pieces of one kind on one layer (or one via)
    merged: list[list] = []
    for item in raw:
        if merged:
            prev = merged[-1]
            same = prev[0] == item[0] and (item[0] is not None or HOLE[prev[2]] ==
                                           HOLE[item[1]])
            if same and item[0] is not None:
                d1 = XY[prev[2]] - XY[prev[1]]
                d2 = XY[item[2]] - XY[item[1]]
                n1, n2 = math.hypot(*d1), math.hypot(*d2)
                same = (abs(_cross(d1[0], d1[1], d2[0], d2[1])) <= _COLLINEAR * n1 * n2
                        and float(d1 @ d2) > 0)
            elif same:
                same = (Z[prev[2]] - Z[prev[1]]) * (Z[item[2]] - Z[item[1]]) > 0
            if same:
                prev[2] = item[2]
                continue
        merged.append(list(item))

    widths = _widths([(m[0], XY[m[1]], XY[m[2]]) for m in merged if m[0] is not None],
                     domains)
    out, wk = [], 0
    for r, a, b in merged:
        s = (float(XY[a, 0]), float(XY[a, 1]), float(Z[a]))
        e = (float(XY[b, 0]), float(XY[b, 1]), float(Z[b]))
        if r is None:
            hole = int(HOLE[a])
            out.append(PathPiece(s, e, None, float(board.holes[hole].diameter), PLATING_MM,
                                 "via", (layers[LAY[a]], layers[LAY[b]]), hole))
        else:
            name = layers[r]
            out.append(PathPiece(s, e, name, widths[wk], float(board.stackup.copper(name)),
                                 "trace"))
            wk += 1
    return out


def _widths(pieces, domains) -> list[float]:
    """Local copper width (mm) of each in-plane piece ``(layer rank, p, q)``: median over
    :data:`WIDTH_SAMPLES` perpendicular cuts (module docstring), capped."""
    if not pieces:
        return []
    out = [0.0] * len(pieces)
    frac = (np.arange(WIDTH_SAMPLES) + 0.5) / WIDTH_SAMPLES
    by_layer: dict[int, list[int]] = {}
    for k, (r, _, _) in enumerate(pieces):
        by_layer.setdefault(r, []).append(k)
    for r in sorted(by_layer):
        ks = by_layer[r]
        full = domains[r].full
        x0, y0, x1, y1 = full.bounds
        half = math.hypot(x1 - x0, y1 - y0) + 1.0
        P = np.array([pieces[k][1] for k in ks])
        Q = np.array([pieces[k][2] for k in ks])
        D = Q - P
        U = D / np.hypot(D[:, 0], D[:, 1])[:, None]
        N = np.column_stack([-U[:, 1], U[:, 0]])
        S = P[:, None, :] + frac[None, :, None] * D[:, None, :]        # (m, k, 2)
        S = S.reshape(-1, 2)
        NN = np.repeat(N, WIDTH_SAMPLES, axis=0)
        lines = _segments(S - half * NN, S + half * NN)
        cut = shapely.intersection(full, lines)
        parts, owner = shapely.get_parts(cut, return_index=True)
        keep = shapely.get_type_id(parts) == 1
        parts, owner = parts[keep], owner[keep]
        coords, cidx = shapely.get_coordinates(parts, return_index=True)
        # positions along each cut line, relative to its sample point
        t = np.einsum("ij,ij->i", coords - S[owner[cidx]], NN[owner[cidx]])
        lo = np.full(len(parts), np.inf)
        hi = np.full(len(parts), -np.inf)
        np.minimum.at(lo, cidx, t)
        np.maximum.at(hi, cidx, t)
        w = np.zeros(len(S))
        order = np.lexsort((lo, owner))
        for smp, grp in _groups(owner[order], order):
            w[smp] = _holding_interval(lo[grp], hi[grp])
        w = w.reshape(len(ks), WIDTH_SAMPLES)
        med = np.median(w, axis=1)
        for j, k in enumerate(ks):
            out[k] = float(min(max(med[j], MIN_WIDTH_MM), WIDTH_CAP_MM))
    return out


def _groups(keys: np.ndarray, idx: np.ndarray):
    """(key, indices) for each run of equal ``keys`` (already sorted)."""
    if not len(keys):
        return
    cuts = np.flatnonzero(np.diff(keys)) + 1
    for a, b in zip(np.r_[0, cuts], np.r_[cuts, len(keys)]):
        yield int(keys[a]), idx[a:b]


def _holding_interval(lo: np.ndarray, hi: np.ndarray, tol: float = 1e-9) -> float:
    """Length of the merged interval (intervals sorted by ``lo``) that holds 0."""
    a, b = lo[0], hi[0]
    for x, y in zip(lo[1:].tolist(), hi[1:].tolist()):
        if x <= b + tol:
            b = max(b, y)
            continue
        if a - tol <= 0.0 <= b + tol:
            return b - a
        a, b = x, y
    return b - a if a - tol <= 0.0 <= b + tol else 0.0
