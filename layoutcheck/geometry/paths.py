"""Shortest paths along a board surface around slots and cut-outs (geodesics).

Units: millimetres.

The surface
    A :class:`SurfaceDomain` is one side of the board (creepage runs on the outer surfaces
    only): the board outline minus the *obstacles* -- non-plated holes and slots, the
    outline's cut-outs and the outside of the board.  The obstacles are first merged and
    then *opened* by a disc of diameter X (``buffer(-X/2)`` then ``buffer(+X/2)``): the
    opening keeps exactly the points of an obstacle that lie in some disc of diameter X
    inside it, so every part narrower than X (a groove or slot the IEC 60664-1 groove rule
    bridges, standards notes s.2d) disappears and is crossed straight, and the rest stays.
    The opening also rounds the *convex* corners of what stays to radius X/2 (a routed
    slot's round end is unchanged; a drawn rectangular cut-out loses its sharp corners).
    A path wrapping such a corner is then at most (2 - pi/2) X/2 ~ 0.21 X shorter per right
    angle than around the sharp corner: the safe side for a creepage check.  An obstacle
    the opening leaves unchanged (within 1 um) is kept exactly as drawn.

The geodesic (:func:`geodesic`)
    The shortest path between two copper geometries A and B in the closed domain.  If the
    straight segment between their nearest points lies in the domain, that segment is the
    answer.  Otherwise the path is found on a *tangent visibility graph*:

    * Shortest paths among polygonal obstacles are polylines that bend only at obstacle
      vertices, and only at *convex* corners of obstacles (reflex vertices of the domain),
      with both segments at a bend supporting the obstacle there (both neighbouring
      vertices on one side of the segment's line).  Nodes are those vertices; an edge joins
      two of them when the segment meets both conditions and lies in the domain
      (``shapely.covers``, vectorised over all candidate segments).
    * The first leg leaves A at a point where moving along A's boundary cannot shorten it:
      the foot of the perpendicular on an edge facing the bend vertex, or a vertex of A in
      whose normal cone the bend vertex lies.  All such local feet are candidates (so
      non-convex copper is handled), and the same for the last leg into B and for a direct
      A-to-B leg (vertex of one to foot or vertex on the other).  A foot whose segment is
      blocked cannot start a shortest leg: such a leg would graze an obstacle vertex, which
      is then a bend of its own.
    * Dijkstra (heapq) from A to B over this graph.

    Every candidate segment is a genuine path in the closed domain, so the result is never
    shorter than the true geodesic; the true geodesic's legs are all among the candidates,
    so it is never longer.  The answer is exact for the polygons given.

    Pruning keeps it fast without changing the answer below ``limit``: a path of length at
    most ``limit`` stays within ``limit`` of both A and B, so only the part of the domain in
    that window is looked at, and a vertex ``v`` can be on such a path only if
    ``d(A, v) + d(v, B) <= limit`` (straight-line lower bounds).  Paths longer than
    ``limit`` are not needed (a creepage check only asks whether the path is shorter than
    required), and :func:`geodesic` returns ``None`` for them.

Limits
    * Arcs reach this module flattened to chords within 0.5 um
      (:data:`layoutcheck.units.CHORD_TOLERANCE_MM`): lengths are exact for those polygons
      and within about a micrometre of the true curves.
    * Copper of other nets is not an obstacle: a path that crosses a third conductor is the
      pairwise problem of that conductor (and of floating copper, see
      :mod:`layoutcheck.conductors`).
    * A path stays on one side: routes that go down a slot wall or the board edge to the
      other side and back are not followed.
    * V-grooves: the opening bridges a narrowing groove where a disc of diameter X no longer
      fits, which is slightly deeper than where IEC 60664-1 places its X-long link.
"""
from __future__ import annotations

import heapq
import math
from dataclasses import dataclass, field

import numpy as np
import shapely
from shapely.geometry import Polygon, box
from shapely.geometry.base import BaseGeometry

from ..units import CHORD_TOLERANCE_MM
from .arcs import quad_segs_for

#: An obstacle whose opening moves no point by more than this (mm) is kept as drawn.
UNCHANGED_MM = 2 * CHORD_TOLERANCE_MM
#: Margin (mm) around everything when the board has no outline (the domain must be finite).
NO_OUTLINE_MARGIN_MM = 1000.0
#: Rows of the vertex-pair matrices handled at once (bounds memory on big windows).
_CHUNK = 256
_EPS = 1e-9


def _at(p) -> str:
    """``(x, y)`` to 0.01 mm, without a minus sign on zero."""
    x, y = (round(float(v), 2) + 0.0 for v in p)
    return f"({x:.2f}, {y:.2f})"


@dataclass
class Obstacle:
    """One obstacle before opening: ``kind`` is ``"slot"``, ``"hole"``, ``"cut-out"`` or
    ``"board edge"``; ``where`` (x, y) mm names it in messages (``None`` for the edge)."""

    geometry: BaseGeometry
    kind: str
    where: tuple[float, float] | None = None

    def label(self, at: tuple[float, float] | None = None) -> str:
        p = self.where if self.where is not None else at
        if p is None:
            return f"the {self.kind}"
        return f"the {self.kind} at {_at(p)}"


@dataclass
class SurfaceDomain:
    """One board surface with its obstacles opened by X (see the module docstring).

    x_mm:      the groove width X used (mm).
    polygon:   the closed surface, mm (board minus the kept obstacles).
    kept:      obstacle parts paths must go around (array of polygons).
    kept_from: index into ``obstacles`` of the original each kept part came from.
    bridged:   grooves and slots narrower than X, crossed straight (array of polygons);
               the slivers the opening takes off convex corners are not listed.
    bridged_from: index into ``obstacles`` for each bridged part.
    obstacles: the originals, in the order given.
    """

    x_mm: float
    polygon: BaseGeometry
    kept: np.ndarray
    kept_from: list[int]
    bridged: np.ndarray
    bridged_from: list[int]
    obstacles: list[Obstacle]
    _kept_tree: shapely.STRtree = field(init=False, repr=False)
    _bridged_tree: shapely.STRtree = field(init=False, repr=False)

    def __post_init__(self):
        self._kept_tree = shapely.STRtree(self.kept)
        self._bridged_tree = shapely.STRtree(self.bridged)
        shapely.prepare(self.polygon)

    def bridged_label(self, k: int) -> str:
        """Words for bridged part ``k``: the obstacle it belongs to and where it is."""
        p = shapely.point_on_surface(self.bridged[k])
        return self.obstacles[self.bridged_from[k]].label((float(p.x), float(p.y)))

    def kept_label(self, k: int, at: tuple[float, float]) -> str:
        """Words for kept part ``k`` (``at``: a point of it, used for the board edge)."""
        return self.obstacles[self.kept_from[k]].label(at)


@dataclass
class Geodesic:
    """A shortest surface path.

    length:   mm.  path: (k, 2) array of (x, y) mm from A to B.
    straight: True when the straight segment between the nearest points lies on the surface.
    around:   indices into ``domain.kept`` of the obstacles the path bends at, with the
              first bend point at each (in path order).
    bridged:  indices into ``domain.bridged`` of the narrow parts the path crosses.
    """

    length: float
    path: np.ndarray
    straight: bool
    around: list[tuple[int, tuple[float, float]]] = field(default_factory=list)
    bridged: list[int] = field(default_factory=list)


# -- the domain -----------------------------------------------------------------------------

def open_obstacles(geoms, x_mm: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Open each polygon of ``geoms`` by a disc of diameter ``x_mm`` (mm), vectorised.

    Returns ``(kept, bridged, unchanged)``: per input the part that stays (the input itself
    when the opening moves nothing by more than :data:`UNCHANGED_MM`), the part removed
    (narrower than X; empty when unchanged) and whether it was unchanged.
    """
    geoms = np.asarray(geoms, dtype=object)
    if not len(geoms) or x_mm <= 0:
        empty = np.array([Polygon()] * len(geoms), dtype=object)
        return geoms.copy(), empty, np.ones(len(geoms), dtype=bool)
    r = x_mm / 2.0
    q = quad_segs_for(r)
    opened = shapely.buffer(shapely.buffer(geoms, -r, quad_segs=q), r, quad_segs=q)
    opened = shapely.make_valid(opened)
    # the opening lies inside the original; a small drift from re-flattening is clipped
    opened = shapely.intersection(opened, geoms)
    same = shapely.hausdorff_distance(shapely.boundary(geoms), shapely.boundary(opened))
    unchanged = ~shapely.is_empty(opened) & (np.nan_to_num(same, nan=np.inf) <= UNCHANGED_MM)
    kept = np.where(unchanged, geoms, _polygonal(opened))
    removed = shapely.difference(geoms, opened)
    bridged = np.where(unchanged, Polygon(), _polygonal(removed))
    return kept, bridged, unchanged


def _polygonal(geoms: np.ndarray) -> np.ndarray:
    """Keep only the polygonal parts of each geometry (overlay may leave slivers of lines)."""
    out = np.empty(len(geoms), dtype=object)
    for k, g in enumerate(geoms):
        t = shapely.get_type_id(g)
        if t in (3, 6) or shapely.is_empty(g):
            out[k] = g if t in (3, 6) else Polygon()
            continue
        parts = shapely.get_parts(g)
        parts = parts[np.isin(shapely.get_type_id(parts), (3, 6))]
        out[k] = shapely.union_all(parts) if len(parts) else Polygon()
    return out


def surface_domain(outline: BaseGeometry | None, obstacles: list[Obstacle], x_mm: float,
                   bounds: tuple[float, float, float, float] | None = None) -> SurfaceDomain:
    """Build the surface of one board side (mm).

    Parameters
    ----------
    outline:
        The board outline (cut-outs as interior rings), or ``None`` when unknown: then the
        surface is unbounded in practice (``bounds`` grown by
        :data:`NO_OUTLINE_MARGIN_MM`).
    obstacles:
        Non-plated holes and slots (:class:`Obstacle`); the outside of the board and the
        outline's cut-outs are added here.
    x_mm:
        Groove width X (mm): obstacle parts narrower than X are bridged.
    bounds:
        (x0, y0, x1, y1) mm of everything of interest, used without an outline.
    """
    obstacles = list(obstacles)
    if outline is not None and not outline.is_empty:
        ox0, oy0, ox1, oy1 = outline.bounds
        m = max(ox1 - ox0, oy1 - oy0, 10.0 * x_mm, 1.0)
        frame = box(ox0 - m, oy0 - m, ox1 + m, oy1 + m)
        parts = shapely.get_parts(outline)
        outside = frame.difference(shapely.union_all(
            [Polygon(p.exterior) for p in parts]))
        obstacles.append(Obstacle(outside, "board edge"))
        for p in parts:
            for ring in p.interiors:
                cut = Polygon(ring)
                c = cut.centroid
                obstacles.append(Obstacle(cut, "cut-out", (float(c.x), float(c.y))))
    else:
        b = bounds or (0.0, 0.0, 0.0, 0.0)
        if obstacles:
            ob = shapely.total_bounds([o.geometry for o in obstacles])
            b = (min(b[0], ob[0]), min(b[1], ob[1]), max(b[2], ob[2]), max(b[3], ob[3]))
        m = NO_OUTLINE_MARGIN_MM
        frame = box(b[0] - m, b[1] - m, b[2] + m, b[3] + m)

    geoms = np.array([o.geometry for o in obstacles], dtype=object)
    ok = ~(shapely.is_missing(geoms) | shapely.is_empty(geoms)) if len(geoms) else \
        np.zeros(0, dtype=bool)
    idx = np.flatnonzero(ok)
    # merge touching obstacles: a slot that runs into a cut-out is one air region
    if len(idx):
        fixed = shapely.make_valid(geoms[idx])
        merged = shapely.get_parts(shapely.union_all(fixed))
        merged = merged[np.isin(shapely.get_type_id(merged), (3,))]
    else:
        fixed = np.empty(0, dtype=object)
        merged = np.empty(0, dtype=object)
    # which original each merged part comes from (the first one given, for its name)
    origin = _first_source(merged, fixed, idx)
    kept_m, bridged_m, _ = open_obstacles(merged, x_mm)
    kept, kept_from, bridged, bridged_from = [], [], [], []
    for k in range(len(merged)):
        for g in shapely.get_parts(kept_m[k]):
            if not g.is_empty and g.area > 0:
                kept.append(g)
                kept_from.append(origin[k])
        for g in shapely.get_parts(bridged_m[k]):
            if g.is_empty or g.area <= 0 or _corner_piece(g, kept_m[k], x_mm / 2.0):
                continue
            bridged.append(g)
            bridged_from.append(_first_source(np.array([g], dtype=object), fixed, idx)[0])
    kept_a = np.array(kept, dtype=object) if kept else np.empty(0, dtype=object)
    polygon = frame.difference(shapely.union_all(kept_a)) if kept else frame
    polygon = shapely.orient_polygons(polygon, exterior_cw=False)
    return SurfaceDomain(x_mm, polygon, kept_a, kept_from,
                         np.array(bridged, dtype=object) if bridged else
                         np.empty(0, dtype=object), bridged_from, obstacles)


def _corner_piece(piece: BaseGeometry, kept: BaseGeometry, r: float) -> bool:
    """True when every vertex of a removed ``piece`` lies within ``r`` (X/2, mm) of what
    the opening kept: the piece is a rounded-off convex corner, not a groove (a groove or a
    narrow slot reaches farther from the kept part, or nothing of it is kept)."""
    if kept.is_empty:
        return False
    pts = shapely.points(shapely.get_coordinates(piece))
    return bool(np.max(shapely.distance(kept, pts)) <= r * (1 + 1e-6) + 1e-9)


def _first_source(parts: np.ndarray, originals: np.ndarray, idx: np.ndarray) -> list[int]:
    """For each of ``parts`` the index (into the caller's list) of the first original that
    overlaps it."""
    if not len(parts):
        return []
    tree = shapely.STRtree(originals)
    qp, qo = tree.query(parts, predicate="intersects")
    best = np.full(len(parts), -1, dtype=np.int64)
    for p, o in zip(qp.tolist(), qo.tolist()):
        if best[p] < 0 or idx[o] < best[p]:
            best[p] = idx[o]
    best[best < 0] = idx[0] if len(idx) else 0
    return best.tolist()


# -- ring and edge arrays ----------------------------------------------------------------

def _rings(geom: BaseGeometry):
    """Vertices of every polygon ring of ``geom`` (oriented: interior on the left) and the
    index of each vertex's predecessor and successor on its ring: ``(V, prev, nxt)``."""
    geom = shapely.orient_polygons(geom, exterior_cw=False)
    parts = shapely.get_parts(geom)
    parts = parts[shapely.get_type_id(parts) == 3]
    empty = (np.empty((0, 2)), np.empty(0, dtype=np.int64), np.empty(0, dtype=np.int64))
    if not len(parts):
        return empty
    rings = shapely.remove_repeated_points(shapely.get_rings(parts), 1e-9)
    coords, ridx = shapely.get_coordinates(rings, return_index=True)
    n = len(coords)
    last = np.ones(n, dtype=bool)
    last[:-1] = ridx[1:] != ridx[:-1]
    V = coords[~last]
    r = ridx[~last]
    if not len(V):
        return empty
    start = np.flatnonzero(np.r_[True, r[1:] != r[:-1]])
    length = np.diff(np.r_[start, len(V)])
    ring_start = np.repeat(start, length)
    ring_len = np.repeat(length, length)
    pos = np.arange(len(V)) - ring_start
    return V, ring_start + (pos - 1) % ring_len, ring_start + (pos + 1) % ring_len


def _cross(ax, ay, bx, by):
    return ax * by - ay * bx


@dataclass
class _Side:
    """One conductor of the problem (A or B): its boundary edges ``E0 -> E1`` (interior on
    the left), ``prev`` the incoming edge of each edge's start vertex, and ``points`` for
    point-like parts."""

    E0: np.ndarray
    E1: np.ndarray
    prev: np.ndarray
    points: np.ndarray

    @classmethod
    def of(cls, geom: BaseGeometry) -> "_Side":
        V, prev, nxt = _rings(geom)
        parts = shapely.get_parts(geom)
        pointy = parts[np.isin(shapely.get_type_id(parts), (0, 4))]
        pts = shapely.get_coordinates(pointy) if len(pointy) else np.empty((0, 2))
        return cls(V, V[nxt] if len(V) else V, prev, pts)

    def vertices(self) -> np.ndarray:
        """Polygon vertices and points (k x 2, mm)."""
        if len(self.points):
            return np.concatenate([self.E0, self.points])
        return self.E0

    def local_feet(self, U: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Points of this conductor where the distance to each of ``U`` (m x 2, mm) is
        locally smallest along its boundary: feet of perpendiculars on edges facing the
        point, and vertices in whose normal cone the point lies; plus point-like parts.
        Returns (index into ``U``, points)."""
        outs_u, outs_p = [], []
        if len(self.points):
            m, k = len(U), len(self.points)
            outs_u.append(np.repeat(np.arange(m), k))
            outs_p.append(np.tile(self.points, (m, 1)))
        if len(self.E0):
            D = self.E1 - self.E0
            L2 = np.einsum("ij,ij->i", D, D)
            L2 = np.where(L2 > 0, L2, 1.0)
            for s in range(0, len(U), _CHUNK):
                Uc = U[s:s + _CHUNK]
                rx = Uc[:, None, 0] - self.E0[None, :, 0]
                ry = Uc[:, None, 1] - self.E0[None, :, 1]
                t = (rx * D[None, :, 0] + ry * D[None, :, 1]) / L2[None, :]
                cr = _cross(D[None, :, 0], D[None, :, 1], rx, ry)
                ui, ei = np.nonzero((t > 0) & (t < 1) & (cr <= 0))
                if len(ui):
                    outs_u.append(ui + s)
                    outs_p.append(self.E0[ei] + t[ui, ei][:, None] * D[ei])
                ui, vi = np.nonzero((t[:, self.prev] >= 1) & (t <= 0))
                if len(ui):
                    outs_u.append(ui + s)
                    outs_p.append(self.E0[vi])
        if not outs_u:
            return np.empty(0, dtype=np.int64), np.empty((0, 2))
        return np.concatenate(outs_u), np.concatenate(outs_p)


# -- the geodesic -------------------------------------------------------------------------

def _segments(P: np.ndarray, Q: np.ndarray) -> np.ndarray:
    return shapely.linestrings(np.stack([P, Q], axis=1))


def _tangent(V, PREV, NEXT, d) -> np.ndarray:
    """Both ring neighbours of each vertex on one side of the line along ``d`` (or on it)."""
    s1 = _cross(d[:, 0], d[:, 1], PREV[:, 0] - V[:, 0], PREV[:, 1] - V[:, 1])
    s2 = _cross(d[:, 0], d[:, 1], NEXT[:, 0] - V[:, 0], NEXT[:, 1] - V[:, 1])
    scale = np.hypot(d[:, 0], d[:, 1])
    tol = 1e-12 * scale * (np.hypot(*(PREV - V).T) + np.hypot(*(NEXT - V).T) + 1.0)
    s1 = np.where(np.abs(s1) <= tol, 0.0, s1)
    s2 = np.where(np.abs(s2) <= tol, 0.0, s2)
    return s1 * s2 >= 0


def geodesic(domain: SurfaceDomain, a: BaseGeometry, b: BaseGeometry,
             limit: float = math.inf) -> Geodesic | None:
    """Shortest path (mm) from ``a`` to ``b`` on the surface ``domain``.

    Parameters
    ----------
    domain:
        The surface (:func:`surface_domain`).
    a, b:
        Copper geometries (polygons, or points), mm.
    limit:
        Paths longer than this (mm) are not needed: ``None`` is returned for them.  Finite
        limits make the search local and fast.

    Returns
    -------
    Geodesic or None
        ``None`` when there is no surface path of length <= ``limit`` (or at all).
    """
    if a is None or b is None or a.is_empty or b.is_empty:
        return None
    line = shapely.shortest_line(a, b)
    pq = shapely.get_coordinates(line)[:2]
    d0 = float(shapely.length(line))
    if d0 > limit + _EPS:
        return None
    if d0 <= 0.0:
        return Geodesic(0.0, pq, True)
    # quick exit: nothing kept crosses the straight segment
    hit = domain._kept_tree.query(line, predicate="intersects")
    if not len(hit) or shapely.covers(domain.polygon, line):
        return _finish(domain, Geodesic(d0, pq, True))

    # the window: any path of length <= limit stays within limit of both a and b
    if math.isfinite(limit):
        g = limit + 1e-3
        ax0, ay0, ax1, ay1 = a.bounds
        bx0, by0, bx1, by1 = b.bounds
        wx0, wy0 = max(ax0, bx0) - g, max(ay0, by0) - g
        wx1, wy1 = min(ax1, bx1) + g, min(ay1, by1) + g
        if wx0 >= wx1 or wy0 >= wy1:
            return None
        D = shapely.clip_by_rect(domain.polygon, wx0, wy0, wx1, wy1)
        if not D.is_valid:
            D = shapely.make_valid(D)
        A = shapely.clip_by_rect(a, wx0, wy0, wx1, wy1)
        B = shapely.clip_by_rect(b, wx0, wy0, wx1, wy1)
        if A.is_empty:
            A = a
        if B.is_empty:
            B = b
    else:
        D, A, B = domain.polygon, a, b
    shapely.prepare(D)
    A = _on_surface(A, D)
    B = _on_surface(B, D)
    sa, sb = _Side.of(A), _Side.of(B)

    # nodes: reflex vertices of the domain (convex corners of obstacles) within reach
    V, ip, inx = _rings(D)
    PREV, NEXT = V[ip], V[inx]
    turn = _cross(V[:, 0] - PREV[:, 0], V[:, 1] - PREV[:, 1],
                  NEXT[:, 0] - V[:, 0], NEXT[:, 1] - V[:, 1]) if len(V) else np.empty(0)
    sel = turn < 0
    V, PREV, NEXT = V[sel], PREV[sel], NEXT[sel]
    pts = shapely.points(V) if len(V) else np.empty(0, dtype=object)
    dA = shapely.distance(A, pts) if len(V) else np.empty(0)
    dB = shapely.distance(B, pts) if len(V) else np.empty(0)
    if math.isfinite(limit) and len(V):
        sel = dA + dB <= limit + _EPS
        V, PREV, NEXT, dA, dB = V[sel], PREV[sel], NEXT[sel], dA[sel], dB[sel]
    n = len(V)
    bound = limit + _EPS

    # direct legs A -> B
    best = (math.inf, None, None)
    direct = [(pq[0][None, :], pq[1][None, :])]
    bv, av = sb.vertices(), sa.vertices()
    if len(bv):
        ui, p = sa.local_feet(bv)
        direct.append((p, bv[ui]))
    if len(av):
        ui, p = sb.local_feet(av)
        direct.append((av[ui], p))
    P = np.concatenate([x for x, _ in direct])
    Q = np.concatenate([y for _, y in direct])
    lens = np.hypot(*(Q - P).T)
    ok = lens <= min(bound, best[0])
    if ok.any():
        P, Q, lens = P[ok], Q[ok], lens[ok]
        vis = shapely.covers(D, _segments(P, Q))
        if vis.any():
            k = int(np.flatnonzero(vis)[np.argmin(lens[vis])])
            best = (float(lens[k]), P[k], Q[k])

    # legs A -> vertex and vertex -> B
    src_cost = np.full(n, math.inf)
    src_pt = np.zeros((n, 2))
    dst_cost = np.full(n, math.inf)
    dst_pt = np.zeros((n, 2))
    if n:
        for side, cost, where, other in ((sa, src_cost, src_pt, dB), (sb, dst_cost, dst_pt,
                                                                      dA)):
            ui, p = side.local_feet(V)
            if not len(ui):
                continue
            d = V[ui] - p
            ln = np.hypot(*d.T)
            ok = (ln + other[ui] <= bound) & _tangent(V[ui], PREV[ui], NEXT[ui], d)
            ui, p, ln = ui[ok], p[ok], ln[ok]
            if not len(ui):
                continue
            vis = shapely.covers(D, _segments(p, V[ui]))
            ui, p, ln = ui[vis], p[vis], ln[vis]
            if not len(ui):
                continue
            order = np.lexsort((ln, ui))
            ui, p, ln = ui[order], p[order], ln[order]
            first = np.r_[True, ui[1:] != ui[:-1]]
            cost[ui[first]] = ln[first]
            where[ui[first]] = p[first]

    # vertex-to-vertex edges (tangent at both ends, within reach, on the surface)
    ei, ej, ew = [], [], []
    for s in range(0, n, _CHUNK):
        i = np.arange(s, min(n, s + _CHUNK))
        I, J = np.meshgrid(i, np.arange(n), indexing="ij")
        m = J > I
        I, J = I[m], J[m]
        if not len(I):
            continue
        d = V[J] - V[I]
        ln = np.hypot(*d.T)
        ok = np.minimum(dA[I] + dB[J], dA[J] + dB[I]) + ln <= bound
        I, J, d, ln = I[ok], J[ok], d[ok], ln[ok]
        ok = _tangent(V[I], PREV[I], NEXT[I], d) & _tangent(V[J], PREV[J], NEXT[J], d)
        I, J, ln = I[ok], J[ok], ln[ok]
        if not len(I):
            continue
        vis = shapely.covers(D, _segments(V[I], V[J]))
        ei.append(I[vis])
        ej.append(J[vis])
        ew.append(ln[vis])
    adj: list[list[tuple[int, float]]] = [[] for _ in range(n)]
    if ei:
        for i, j, w in zip(np.concatenate(ei).tolist(), np.concatenate(ej).tolist(),
                           np.concatenate(ew).tolist()):
            adj[i].append((j, w))
            adj[j].append((i, w))

    # Dijkstra from A (legs src_cost) to B (legs dst_cost)
    dist = src_cost.copy()
    prev = np.full(n, -1, dtype=np.int64)
    heap = [(float(dist[v]), v) for v in np.flatnonzero(np.isfinite(dist)).tolist()]
    heapq.heapify(heap)
    best_len, end = best[0], -1
    done = np.zeros(n, dtype=bool)
    while heap:
        dv, v = heapq.heappop(heap)
        if done[v] or dv > dist[v]:
            continue
        if dv >= best_len:
            break
        done[v] = True
        if dst_cost[v] < math.inf and dv + dst_cost[v] < best_len:
            best_len, end = dv + dst_cost[v], v
        for w, wt in adj[v]:
            nd = dv + wt
            if nd < dist[w] and nd < best_len:
                dist[w] = nd
                prev[w] = v
                heapq.heappush(heap, (nd, w))
    if best_len > bound:
        return None
    if end < 0:
        return _finish(domain, Geodesic(best_len, np.array([best[1], best[2]]), False))
    chain = [end]
    while prev[chain[-1]] >= 0:
        chain.append(int(prev[chain[-1]]))
    chain.reverse()
    path = np.vstack([src_pt[chain[0]], V[chain], dst_pt[end]])
    return _finish(domain, Geodesic(float(best_len), path, False), V[chain])


def _on_surface(g: BaseGeometry, D: BaseGeometry) -> BaseGeometry:
    """Copper ``g`` less any part lying over a kept obstacle (copper over a slot is cut away
    in the board); ``g`` itself when most of it is off the surface (an earth conductor,
    which lies on the obstacle side of the surface boundary and may overlap the surface
    only in slivers where the opening rounded a corner)."""
    if shapely.get_type_id(g) not in (3, 6) or shapely.covers(D, g):
        return g
    cut = shapely.intersection(g, D)
    parts = shapely.get_parts(cut)
    parts = parts[shapely.get_type_id(parts) == 3]
    if not len(parts):
        return g
    on = shapely.union_all(parts)
    if float(shapely.area(on)) < 0.5 * float(shapely.area(g)):
        return g
    return on


def _finish(domain: SurfaceDomain, geo: Geodesic, bends: np.ndarray | None = None
            ) -> Geodesic:
    """Name the obstacles the path bends at and the narrow parts it crosses."""
    if bends is not None and len(bends) and len(domain.kept):
        pts = shapely.points(bends)
        qp, qk = domain._kept_tree.query(pts, predicate="dwithin", distance=1e-6)
        seen = set()
        for p, k in sorted(zip(qp.tolist(), qk.tolist())):
            if k not in seen:
                seen.add(k)
                geo.around.append((k, (float(bends[p][0]), float(bends[p][1]))))
    if len(domain.bridged):
        line = shapely.linestrings(geo.path) if len(geo.path) > 1 else None
        if line is not None and geo.length > 0:
            cand = domain._bridged_tree.query(line, predicate="intersects")
            for k in sorted(cand.tolist()):
                if shapely.relate_pattern(domain.bridged[k], line, "T********"):
                    geo.bridged.append(k)
    return geo
