"""Geometry helpers of the IPC-2581 reader: strokes, batched placement, validity.

``LineDesc`` strokes: ROUND lines have round caps and joins; SQUARE lines square caps and
NONE lines flat caps, both with mitred joins (shared format notes section 3.4 [M]:
"strokes are round-capped when lineEnd=ROUND").  Round caps use
:func:`layoutcheck.geometry.arcs.quad_segs_for`, so a cap is as close to the true circle as
any flattened arc (0.5 um).  Units: millimetres.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import shapely
from shapely.geometry import LineString, Point, Polygon, box
from shapely.geometry.base import BaseGeometry

from ..geometry.arcs import circle, quad_segs_for


@dataclass(frozen=True)
class LineDesc:
    """A line descriptor: width (mm) and end style (``ROUND``, ``SQUARE`` or ``NONE``)."""

    width: float
    end: str = "ROUND"


def dedupe_points(pts):
    """Points without consecutive repeats or a repeated closing point (mm)."""
    out = []
    for p in pts:
        q = (float(p[0]), float(p[1]))
        if not out or abs(q[0] - out[-1][0]) > 1e-12 or abs(q[1] - out[-1][1]) > 1e-12:
            out.append(q)
    if len(out) > 1 and out[0] == out[-1]:
        out.pop()
    return out


def path_geometry(pts: np.ndarray):
    """A centre line: LineString, or a Point when all points coincide (mm)."""
    if len(pts) == 1 or not (np.abs(pts - pts[0]) > 1e-12).any():
        return Point(pts[0])
    return LineString(pts)


def apply_matrices(geoms: np.ndarray, mats: np.ndarray) -> np.ndarray:
    """Each geometry moved by its own affine map (rows ``a, b, d, e, xoff, yoff``), mm.

    One vectorised pass over all coordinates; the input geometries are not changed.
    """
    if len(geoms) == 0:
        return geoms
    _, idx = shapely.get_coordinates(geoms, return_index=True)
    m = mats[idx]

    def f(c):
        return np.column_stack([m[:, 0] * c[:, 0] + m[:, 1] * c[:, 1] + m[:, 4],
                                m[:, 2] * c[:, 0] + m[:, 3] * c[:, 1] + m[:, 5]])
    return shapely.transform(geoms, f)


def stroke_batch(paths: list[np.ndarray], lds: list[LineDesc]) -> list[BaseGeometry]:
    """Stroked copper (mm) of many centre lines at once, grouped by line descriptor."""
    out: list = [None] * len(paths)
    groups: dict[LineDesc, list[int]] = {}
    for i, (pts, ld) in enumerate(zip(paths, lds)):
        if len(pts) < 2 or not (np.abs(pts - pts[0]) > 1e-12).any() or ld.width <= 0:
            out[i] = stroke(path_geometry(pts), ld)
        else:
            groups.setdefault(ld, []).append(i)
    for ld, members in groups.items():
        coords = np.concatenate([paths[i] for i in members])
        index = np.repeat(np.arange(len(members)), [len(paths[i]) for i in members])
        lines = shapely.linestrings(coords, indices=index)
        r = ld.width / 2
        if ld.end == "ROUND":
            polys = shapely.buffer(lines, r, quad_segs=quad_segs_for(r))
        else:
            polys = shapely.buffer(lines, r, quad_segs=quad_segs_for(r),
                                   cap_style="square" if ld.end == "SQUARE" else "flat",
                                   join_style="mitre", mitre_limit=10.0)
        for i, g in zip(members, polys):
            out[i] = g
    return out


def stroke(path, ld: LineDesc) -> BaseGeometry:
    """``path`` (LineString, LinearRing or Point) stroked with ``ld`` (mm)."""
    r = ld.width / 2
    if r <= 0:
        return Polygon()
    if isinstance(path, Point):
        if ld.end == "ROUND":
            return circle(path.x, path.y, ld.width)
        if ld.end == "SQUARE":
            return box(path.x - r, path.y - r, path.x + r, path.y + r)
        return Polygon()
    if ld.end == "ROUND":
        return path.buffer(r, quad_segs=quad_segs_for(r))
    cap = "square" if ld.end == "SQUARE" else "flat"
    return path.buffer(r, quad_segs=quad_segs_for(r), cap_style=cap, join_style="mitre",
                       mitre_limit=10.0)


def polygonal(g: BaseGeometry) -> BaseGeometry:
    """``g`` if valid, else its repaired polygonal part (make_valid) (mm)."""
    if g.is_valid:
        return g
    fixed = shapely.make_valid(g)
    parts = [p for p in shapely.get_parts(fixed) if p.geom_type == "Polygon" and p.area > 0]
    return shapely.union_all(parts) if parts else Polygon()


def slot_width(geom: BaseGeometry) -> float:
    """Width (mm) of a slot footprint: the shorter side of its minimum rotated rectangle."""
    env = shapely.oriented_envelope(geom)
    if env.geom_type != "Polygon":
        return 0.0
    xy = np.asarray(env.exterior.coords)
    sides = np.hypot(*(xy[1:3] - xy[0:2]).T)
    return float(min(sides))


__all__ = ["LineDesc", "apply_matrices", "dedupe_points", "path_geometry", "polygonal",
           "slot_width", "stroke", "stroke_batch"]
