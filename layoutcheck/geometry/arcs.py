"""Arc and circle flattening.

All arcs become chords whose largest distance from the true arc (the sagitta) is at most
``tol`` millimetres (default :data:`layoutcheck.units.CHORD_TOLERANCE_MM`).  For a chord
subtending angle ``a`` on radius ``r`` the sagitta is ``r (1 - cos(a/2))``, so the number of
chords for a sweep ``S`` is ``ceil(S / (2 acos(1 - tol/r)))``.

Arc chord vertices lie *on* the circle (a flattened arc is inside the true curve by at most
``tol``).  Full circles (:func:`circle`) are *circumscribed*: their edges touch the true
circle and their vertices stand out by at most ``tol``, so a flattened pad never shows less
copper than the real one (distances err on the safe side, by under 1 um).
"""
from __future__ import annotations

import math

import numpy as np
from shapely.geometry import Polygon

from ..units import CHORD_TOLERANCE_MM

#: Never fewer chords than this for a full circle (keeps tiny circles round-ish).
MIN_CIRCLE_SEGMENTS = 16
#: Never more than this many chords for one arc or circle.
MAX_SEGMENTS = 10_000


def segments_for(radius: float, sweep: float, tol: float = CHORD_TOLERANCE_MM) -> int:
    """Number of chords for an arc of ``radius`` (mm) sweeping ``sweep`` radians."""
    sweep = abs(sweep)
    if radius <= 0 or sweep == 0:
        return 1
    if tol >= radius:
        step = math.pi / 2
    else:
        step = 2.0 * math.acos(1.0 - tol / radius)
    n = math.ceil(sweep / step - 1e-12)
    n = max(n, math.ceil(MIN_CIRCLE_SEGMENTS * sweep / (2 * math.pi)), 1)
    return min(n, MAX_SEGMENTS)


def arc_points(start: tuple[float, float], end: tuple[float, float],
               centre: tuple[float, float], clockwise: bool, *, full_if_closed: bool = True,
               tol: float = CHORD_TOLERANCE_MM) -> np.ndarray:
    """Points (N x 2 array, start and end included) along an arc.

    The radius goes linearly from |start - centre| to |end - centre| (the Gerber
    specification allows any monotonic curve when the two radii differ slightly).
    ``start == end`` gives a full circle when ``full_if_closed`` is true, else one point.
    """
    sx, sy = start
    ex, ey = end
    cx, cy = centre
    r0 = math.hypot(sx - cx, sy - cy)
    r1 = math.hypot(ex - cx, ey - cy)
    a0 = math.atan2(sy - cy, sx - cx)
    a1 = math.atan2(ey - cy, ex - cx)
    same = abs(sx - ex) < 1e-12 and abs(sy - ey) < 1e-12
    if same:
        if not full_if_closed:
            return np.array([[sx, sy]], dtype=float)
        sweep = -2 * math.pi if clockwise else 2 * math.pi
    elif clockwise:
        sweep = a1 - a0
        if sweep >= 0:
            sweep -= 2 * math.pi
    else:
        sweep = a1 - a0
        if sweep <= 0:
            sweep += 2 * math.pi
    n = segments_for(max(r0, r1), sweep, tol)
    t = np.linspace(0.0, 1.0, n + 1)
    ang = a0 + sweep * t
    rad = r0 + (r1 - r0) * t
    pts = np.column_stack([cx + rad * np.cos(ang), cy + rad * np.sin(ang)])
    pts[0] = (sx, sy)
    if not same:
        pts[-1] = (ex, ey)
    else:
        pts[-1] = (sx, sy)
    return pts


def arc_sweep(start, end, centre, clockwise: bool) -> float:
    """Signed sweep angle (radians) of an arc; full circle when start == end."""
    pts_angle0 = math.atan2(start[1] - centre[1], start[0] - centre[0])
    pts_angle1 = math.atan2(end[1] - centre[1], end[0] - centre[0])
    if abs(start[0] - end[0]) < 1e-12 and abs(start[1] - end[1]) < 1e-12:
        return -2 * math.pi if clockwise else 2 * math.pi
    sweep = pts_angle1 - pts_angle0
    if clockwise and sweep >= 0:
        sweep -= 2 * math.pi
    if not clockwise and sweep <= 0:
        sweep += 2 * math.pi
    return sweep


def circle(cx: float, cy: float, diameter: float, tol: float = CHORD_TOLERANCE_MM) -> Polygon:
    """A flattened circle of ``diameter`` (mm) centred on (cx, cy).

    Empty polygon for diameter <= 0.
    """
    r = diameter / 2.0
    if r <= 0:
        return Polygon()
    n = max(segments_for(r, 2 * math.pi, tol), MIN_CIRCLE_SEGMENTS)
    ang = np.linspace(0.0, 2 * math.pi, n, endpoint=False)
    rv = r / math.cos(math.pi / n)  # circumscribed: the polygon covers the true circle
    return Polygon(np.column_stack([cx + rv * np.cos(ang), cy + rv * np.sin(ang)]))


def quad_segs_for(radius: float, tol: float = CHORD_TOLERANCE_MM) -> int:
    """``quad_segs`` for shapely ``buffer`` so that round caps meet ``tol`` (mm)."""
    return max(4, math.ceil(segments_for(radius, 2 * math.pi, tol) / 4))
