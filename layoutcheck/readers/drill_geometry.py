"""Geometry of NC drill holes: hit circles, slot buffers and rout arc centres.  Units: mm.

Hits become :func:`layoutcheck.geometry.arcs.circle` polygons (built in bulk, one template
per diameter, translated with a single vectorised :func:`shapely.polygons` call).  Slots and
routed paths become their tool-centre line buffered by d/2 with
``quad_segs = arcs.quad_segs_for(d/2)``, one :func:`shapely.buffer` call per diameter.
A closed rout path (a routed cut-out) also removes the piece it encloses, so its footprint
is the outer boundary of the buffer, holes filled.
"""
from __future__ import annotations

import math
from collections import defaultdict
from dataclasses import dataclass

import numpy as np
import shapely

from ..geometry import arcs


#: Largest difference (mm) between the start and end radius of a rout arc we accept, and
#: the amount by which an ``A`` radius may fall short of half the chord: rounding of the
#: end points to the file resolution (1 um metric 3.3, 2.54 um inch 2.4) stays far below.
ARC_RADIUS_TOL_MM = 0.005
#: ... or this fraction of the radius, whichever is larger.
ARC_RADIUS_TOL_REL = 0.002


#: Smallest hole diameter (mm) read: a nanometre.  Below it a hit circle would collapse
#: when placed at board coordinates (doubles hold about 16 significant digits).
MIN_TOOL_DIAMETER_MM = 1e-6


class ArcError(ValueError):
    """An arc whose centre cannot be found from the words given."""


def _tol(r: float) -> float:
    return max(ARC_RADIUS_TOL_MM, ARC_RADIUS_TOL_REL * r)


def _sweep(start, end, centre, clockwise: bool) -> float:
    return abs(arcs.arc_sweep(start, end, centre, clockwise))


def centre_from_radius(start, end, radius: float, clockwise: bool) -> tuple[float, float]:
    """Centre (mm) of the arc of at most 180 degrees from ``start`` to ``end`` with ``radius``.

    A clockwise arc of at most half a turn has its centre to the right of the chord
    direction, a counter-clockwise one to the left.
    """
    sx, sy = start
    ex, ey = end
    dx, dy = ex - sx, ey - sy
    chord = math.hypot(dx, dy)
    if radius <= 0:
        raise ArcError(f"expected a positive arc radius A, got {radius:g} mm")
    if chord == 0:
        raise ArcError("an arc given by its radius A needs distinct start and end points")
    half = chord / 2
    if radius < half:
        if half - radius > _tol(radius):
            raise ArcError(f"arc radius {radius:g} mm is shorter than half the "
                           f"{chord:g} mm chord")
        radius = half
    off = math.sqrt(max(radius * radius - half * half, 0.0))
    nx, ny = -dy / chord, dx / chord   # left of the chord direction
    side = -1.0 if clockwise else 1.0
    return (sx + dx / 2 + side * nx * off, sy + dy / 2 + side * ny * off)


def centre_from_offsets(start, end, i: float, j: float,
                        clockwise: bool) -> tuple[float, float]:
    """Centre (mm) of a rout arc given I/J offsets (sign conventions differ between writers).

    Candidates are start + (+-I, +-J).  The one whose distances to start and end agree best
    wins; on a tie, the one giving a sweep of at most 180 degrees in the commanded
    direction, then the first of (+I,+J), (-I,-J), (+I,-J), (-I,+J).
    """
    sx, sy = start
    cands = []
    for si, sj in ((1, 1), (-1, -1), (1, -1), (-1, 1)):
        c = (sx + si * i, sy + sj * j)
        if c not in cands:
            cands.append(c)
    best = None
    for order, c in enumerate(cands):
        r0 = math.hypot(sx - c[0], sy - c[1])
        r1 = math.hypot(end[0] - c[0], end[1] - c[1])
        if r0 == 0:
            continue
        mismatch = abs(r0 - r1)
        key = (round(mismatch, 9), _sweep(start, end, c, clockwise) > math.pi + 1e-9, order)
        if best is None or key < best[0]:
            best = (key, c, r0, mismatch)
    if best is None:
        raise ArcError("arc offsets I and J are both zero: expected the centre's offset "
                       "from the start point")
    _, c, r0, mismatch = best
    if mismatch > _tol(r0):
        raise ArcError(f"no centre from I={i:g}, J={j:g} mm is equidistant from start "
                       f"{_pt(start)} and end {_pt(end)} (best radii differ by "
                       f"{mismatch:.4g} mm)")
    return c


def _pt(p) -> str:
    return f"({p[0]:g}, {p[1]:g})"


@dataclass
class HoleShape:
    """A hole before its attributes: the hit point or tool-centre path (N x 2 mm array)."""

    coords: np.ndarray
    diameter: float
    is_slot: bool


def build_geometry(shapes: list[HoleShape]):
    """Footprints and paths for ``shapes``, in order.

    Returns two lists: the footprint polygons and the paths (Point for a hit, LineString
    for a slot).  Work is grouped by diameter and done with vectorised shapely calls.
    """
    n = len(shapes)
    geoms = np.empty(n, dtype=object)
    paths = np.empty(n, dtype=object)
    hits: dict[float, list[int]] = defaultdict(list)
    slots: dict[float, list[int]] = defaultdict(list)
    for k, s in enumerate(shapes):
        (slots if s.is_slot else hits)[s.diameter].append(k)
    for d in sorted(hits):
        idx = np.asarray(hits[d], dtype=np.intp)
        xy = np.array([shapes[k].coords[0] for k in idx], dtype=float).reshape(-1, 2)
        ring = np.asarray(arcs.circle(0.0, 0.0, d).exterior.coords)
        geoms[idx] = shapely.polygons(ring[None, :, :] + xy[:, None, :])
        paths[idx] = shapely.points(xy)
    for d in sorted(slots):
        idx = np.asarray(slots[d], dtype=np.intp)
        lines = [shapely.LineString(shapes[k].coords) for k in idx]
        arr = np.empty(len(lines), dtype=object)
        arr[:] = lines
        cut = shapely.buffer(arr, d / 2.0, quad_segs=arcs.quad_segs_for(d / 2.0))
        closed = shapely.is_closed(arr) & (shapely.get_num_points(arr) > 2)
        if closed.any():
            # a closed rout path cuts the enclosed piece free: it falls out with the cut
            cut[closed] = shapely.polygons(shapely.get_exterior_ring(cut[closed]))
        geoms[idx] = cut
        paths[idx] = arr
    return list(geoms), list(paths)
