"""The sample generator's own creepage measure: the shortest path over the board surface
between two copper shapes, going around obstacles (non-plated slots and holes).

Units: millimetres.

Independent of the package's creepage rule on purpose, so the two can check each other.
Creepage is measured along the surface of the insulation; a groove (slot) at least X wide
must be gone around, a narrower one is crossed straight (IEC 60664-1, creepage and clearance
measuring examples; X from :func:`layoutcheck.physics.iec60664.groove_width_x_mm`).  Copper
of other nets is no obstacle: each conductor's own spacing is checked pair by pair.

Method: the shortest path among polygonal obstacles is a polyline whose inner corners are
obstacle vertices (the visibility-graph method, common practice in computational geometry;
from memory).  Between two shapes rather than two points it starts at the copper point
nearest its first corner, or at a copper vertex when that point is hidden; both are tried.
Obstacles are the flattened slot and hole outlines, whose chords lie inside the true arcs, so
a path wrapping an arc is at most a chord error (0.5 um) short: the safe side.
"""
from __future__ import annotations

import math

import networkx as nx
import numpy as np
import shapely
from shapely.geometry.base import BaseGeometry

#: Obstacles are shrunk by this much (mm) for the visibility test, so that a path may run
#: along an obstacle's outline without counting as crossing it.
_EPS = 1e-6


def obstacle_outlines(slots, holes, x_mm: float) -> list[BaseGeometry]:
    """Slot and hole outlines (mm) that a creepage path must go around: slots at least
    ``x_mm`` wide and holes at least ``x_mm`` across.  ``slots`` are (polygon, width)
    pairs, ``holes`` (polygon, diameter) pairs."""
    return [g for g, w in list(slots) + list(holes) if w >= x_mm - 1e-9]


def _vertices(g: BaseGeometry) -> np.ndarray:
    """Every vertex of the polygon rings of ``g`` (closing points dropped), as (n, 2)."""
    out = []
    for ring in shapely.get_rings(shapely.get_parts(g)):
        c = shapely.get_coordinates(ring)
        out.append(c[:-1] if len(c) > 1 else c)
    return np.concatenate(out) if out else np.empty((0, 2))


def _visible(p: np.ndarray, q: np.ndarray, blocked: BaseGeometry) -> np.ndarray:
    """For segments p[k] -> q[k], True where the segment does not enter ``blocked``."""
    if blocked.is_empty or len(p) == 0:
        return np.ones(len(p), dtype=bool)
    segs = shapely.linestrings(np.stack([p, q], axis=1))
    return ~shapely.intersects(segs, blocked)


def _to_shape(points: np.ndarray, shape: BaseGeometry) -> tuple[np.ndarray, np.ndarray]:
    """Nearest points on ``shape`` to each of ``points``, and their distances."""
    lines = shapely.shortest_line(shapely.points(points), shape)
    c = shapely.get_coordinates(lines).reshape(-1, 2, 2)[:, 1, :]
    return c, np.hypot(*(c - points).T)


def surface_path(a: BaseGeometry, b: BaseGeometry, obstacles: list[BaseGeometry],
                 limit: float) -> tuple[float, list[tuple[float, float]]]:
    """Shortest path (mm) over the surface from copper ``a`` to copper ``b``.

    Parameters
    ----------
    a, b:
        The two copper shapes (mm).
    obstacles:
        Outlines the path must go around (:func:`obstacle_outlines`).
    limit:
        Paths of this length (mm) or longer are not followed: the result is then
        ``(math.inf, [])`` unless the straight gap itself is ``limit`` or more, when it is
        the straight gap.

    Returns
    -------
    (length, points): the length in mm and the path from ``a`` to ``b``.
    """
    straight = float(shapely.distance(a, b))
    line = shapely.shortest_line(a, b)
    pts = [tuple(map(float, p)) for p in shapely.get_coordinates(line)]
    if straight >= limit:
        return straight, pts
    area = shapely.union(a, b).envelope.buffer(limit)
    near = [o for o in obstacles if o.intersects(area)]
    if not near:
        return straight, pts
    solid = shapely.union_all(near)
    blocked = solid.buffer(-_EPS)
    if not line.intersects(blocked):
        return straight, pts
    # Only copper within ``limit`` of the other shape can start a shorter path.
    a_loc = a.intersection(b.buffer(limit))
    b_loc = b.intersection(a.buffer(limit))
    nodes = _vertices(solid)
    _, da = _to_shape(nodes, a_loc)
    _, db = _to_shape(nodes, b_loc)
    nodes = nodes[da + db < limit]
    g = nx.Graph()
    n = len(nodes)
    if n:
        i, j = np.triu_indices(n, 1)
        seg_len = np.hypot(*(nodes[i] - nodes[j]).T)
        ok = seg_len < limit
        i, j, seg_len = i[ok], j[ok], seg_len[ok]
        vis = _visible(nodes[i], nodes[j], blocked)
        for u, v, w in zip(i[vis].tolist(), j[vis].tolist(), seg_len[vis].tolist()):
            g.add_edge(u, v, weight=w)
    starts: dict[str, list] = {}
    for end, shape, other in (("A", a_loc, b_loc), ("B", b_loc, a_loc)):
        corners = _vertices(shape)
        best = {}
        for k in range(n):
            cand = np.vstack([_to_shape(nodes[k:k + 1], shape)[0], corners])
            d = np.hypot(*(cand - nodes[k]).T)
            order = np.argsort(d, kind="stable")
            cand, d = cand[order], d[order]
            keep = d < limit
            cand, d = cand[keep], d[keep]
            if len(cand) == 0:
                continue
            vis = _visible(cand, np.repeat(nodes[k:k + 1], len(cand), axis=0), blocked)
            if vis.any():
                m = int(np.argmax(vis))
                best[k] = (float(d[m]), tuple(map(float, cand[m])))
        for k, (w, p) in best.items():
            g.add_edge(end, k, weight=w)
        starts[end] = best
        # straight segments from a corner of one shape to the other shape
        if len(corners):
            near_pts, d = _to_shape(corners, other)
            vis = _visible(corners, near_pts, blocked) & (d < limit)
            for c, q, w in zip(corners[vis], near_pts[vis], d[vis]):
                if not g.has_edge("A", "B") or g["A"]["B"]["weight"] > w:
                    pa, pb = (c, q) if end == "A" else (q, c)
                    g.add_edge("A", "B", weight=float(w),
                               ends=(tuple(map(float, pa)), tuple(map(float, pb))))
    if "A" not in g or "B" not in g:
        return math.inf, []
    try:
        length, route = nx.single_source_dijkstra(g, "A", "B", weight="weight")
    except nx.NetworkXNoPath:
        return math.inf, []
    if length >= limit:
        return math.inf, []
    if route == ["A", "B"]:
        return float(length), list(g["A"]["B"]["ends"])
    path = [starts["A"][route[1]][1]]
    path += [tuple(map(float, nodes[k])) for k in route[1:-1]]
    path.append(starts["B"][route[-2]][1])
    return float(length), path
