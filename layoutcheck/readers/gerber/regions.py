"""Regions (G36 ... G37): contours -> one filled shape.  Units: millimetres.

Gerber Layer Format Specification rev. 2024.05, "Region statement": D02 starts a new contour,
D01 adds a straight or circular segment; at G37 each contour is filled on its own and the
region is the union of the fills.  A contour must close; the only allowed self-contact is a
cut-in, which :func:`contour_polygon` turns into a hole.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import shapely
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from ...errors import InputFileError, ResourceLimitError
from ...limits import Limits


@dataclass
class Contour:
    start_line: int
    chunks: list[np.ndarray] = field(default_factory=list)
    last_line: int = 0
    n_points: int = 0


@dataclass
class RegionBuilder:
    """State of an open region statement."""

    line: int                      # line of G36
    attributes: dict               # attribute dictionary at G36
    contours: list[Contour] = field(default_factory=list)
    current: Contour | None = None
    vertices: int = 0

    def add(self, start: tuple[float, float], pts: np.ndarray, line: int, limits: Limits,
            file: str) -> None:
        """Add segment points ``pts`` (end points after ``start``) to the open contour."""
        if self.current is None:
            self.current = Contour(line, [np.array([start], dtype=float)], line, 1)
            self.vertices += 1
        self.current.chunks.append(pts)
        self.current.last_line = line
        self.current.n_points += len(pts)
        self.vertices += len(pts)
        if self.vertices > limits.max_region_vertices:
            raise ResourceLimitError(f"region started at line {self.line} has more than "
                                     f"{limits.max_region_vertices} points (limit "
                                     "max_region_vertices)", file=file, line=line)

    def end_contour(self) -> None:
        """D02 or G37: the open contour is complete."""
        if self.current is not None:
            self.contours.append(self.current)
            self.current = None


def valid_polygonal(g: BaseGeometry) -> BaseGeometry:
    """The valid polygonal part of ``g`` (mm): ``make_valid``, keep polygons of positive
    area, unite them; an empty Polygon when none is left."""
    try:
        g = shapely.make_valid(g, method="structure")
    except (TypeError, ValueError):  # pragma: no cover - GEOS without "structure"
        g = g.buffer(0)
    parts = [p for p in shapely.get_parts(g) if p.geom_type == "Polygon" and p.area > 0]
    if not parts:
        return Polygon()
    return parts[0] if len(parts) == 1 else shapely.union_all(parts)


def contour_polygon(c: Contour, resolution: float, file: str,
                    note) -> BaseGeometry:
    """Fill one contour.  ``resolution`` (mm) is one coordinate step: a contour whose end
    misses its start by more raises :class:`InputFileError`; a smaller miss is closed with a
    note."""
    pts = np.concatenate(c.chunks, axis=0)
    gap = math.hypot(*(pts[-1] - pts[0]))
    if gap > 0:
        if gap > resolution * 1.000001 + 1e-9:
            raise InputFileError(
                f"region contour whose first segment is at line {c.start_line} ends at ({pts[-1][0]:g}, "
                f"{pts[-1][1]:g}) mm, {gap:g} mm from its start ({pts[0][0]:g}, {pts[0][1]:g}) "
                "mm; expected it to close on its start point", file=file, line=c.last_line)
        note("a region contour missed its start by at most one coordinate step; closed it",
             c.last_line)
        pts = np.vstack([pts, pts[:1]])
    keep = np.ones(len(pts), dtype=bool)
    keep[1:] = np.any(np.diff(pts, axis=0) != 0, axis=1)
    pts = pts[keep]
    if len(pts) < 4:
        return Polygon()
    poly = Polygon(pts)
    if poly.is_valid:
        return poly
    return valid_polygonal(poly)


def region_geometry(rb: RegionBuilder, resolution: float, file: str, note) -> BaseGeometry:
    """Union of the filled contours of a finished region (mm)."""
    fills = [contour_polygon(c, resolution, file, note) for c in rb.contours]
    fills = [f for f in fills if not f.is_empty]
    if not fills:
        return Polygon()
    if len(fills) == 1:
        return fills[0]
    return shapely.union_all(np.array(fills, dtype=object))
