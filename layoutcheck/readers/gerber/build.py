"""Batched geometry for flashes and round strokes (vectorised shapely calls).

The plotter records each flash (aperture shape + position) and each round stroke (centre
line + radius) as it reads; :meth:`GeometryBuilder.flush` then makes all their polygons in a
few array calls: one ``shapely.transform`` that moves every flash shape to its point, one
``shapely.linestrings`` for every centre line and one ``shapely.buffer`` per chord count.
Units: millimetres.
"""
from __future__ import annotations

from collections import defaultdict

import numpy as np
import shapely
from shapely.geometry.base import BaseGeometry

from ...geometry import arcs
from .regions import valid_polygonal
from .types import GraphicObject

def vertex_budget(limits) -> int:
    """The per-file vertex budget ``limits.max_total_vertices``.

    A vertex costs about 70 bytes while a file is read (coordinates, GEOS objects, buffers),
    so the default 50 million is about 3.5 GB -- several times a large real board, whose arcs
    are flattened to 0.5 um.  Without such a budget a 250 kB file flashing a 1000 mm circle
    (2221 vertices) 20,000 times takes 3 GB, within every other limit.
    """
    return int(limits.max_total_vertices)


def stroke_vertices(n_points: int, radius: float) -> int:
    """Estimated vertices of a centre line of ``n_points`` buffered by ``radius`` (mm) with
    round caps: both sides plus two half circles at ``arcs.quad_segs_for(radius)``, with a
    margin for the round joins on the outer side of bends."""
    qs = arcs.quad_segs_for(radius) if radius > 0 else 1
    return 3 * n_points + 4 * qs + 2


#: A moved shape is checked with ``is_valid`` when its thinnest part (area over largest
#: extent) is below this fraction of its distance from the origin: only then can rounding
#: its coordinates to doubles (relative precision 2.2e-16) collapse it.
COLLAPSE_RATIO = 1e-9


def repair_collapsed(geoms: np.ndarray) -> int:
    """Make valid, in place, the shapes in ``geoms`` (object array, mm) that rounding may
    have collapsed, and return how many were changed.

    Only shapes far thinner than their distance from the origin (see
    :data:`COLLAPSE_RATIO`) are tested, so the cost is one vectorised area and bounds pass.
    A collapsed shape is replaced by its valid polygonal part (often empty): the change is
    below the floating-point resolution at that position.
    """
    if len(geoms) == 0:
        return 0
    b = shapely.bounds(geoms)
    area = shapely.area(geoms)
    with np.errstate(invalid="ignore"):
        ext = np.fmax(b[:, 2] - b[:, 0], b[:, 3] - b[:, 1])
        mag = np.fmax(np.fmax.reduce(np.abs(b), axis=1), 1.0)
        suspect = ~np.isnan(ext) & (area <= COLLAPSE_RATIO * mag * ext)
    idx = np.flatnonzero(suspect)
    if idx.size == 0:
        return 0
    bad = idx[~shapely.is_valid(geoms[idx])]
    for k in bad:
        geoms[k] = valid_polygonal(geoms[k])
    return int(bad.size)


class GeometryBuilder:
    """Collects objects whose geometry is still to be made."""

    def __init__(self) -> None:
        self._flash_objs: list[GraphicObject] = []
        self._flash_shapes: list[BaseGeometry] = []
        self._flash_points: list[tuple[float, float]] = []
        self._stroke_objs: list[GraphicObject] = []
        self._stroke_coords: list[np.ndarray] = []
        self._stroke_radius: list[float] = []
        #: shapes made valid by :func:`repair_collapsed` so far
        self.repaired = 0

    def __len__(self) -> int:
        return len(self._flash_objs) + len(self._stroke_objs)

    def add_flash(self, obj: GraphicObject, shape: BaseGeometry, x: float, y: float) -> None:
        """``obj`` gets ``shape`` (at the aperture origin) moved to (x, y) mm."""
        self._flash_objs.append(obj)
        self._flash_shapes.append(shape)
        self._flash_points.append((x, y))

    def add_stroke(self, obj: GraphicObject, coords: np.ndarray, radius: float) -> None:
        """``obj`` gets the centre line ``coords`` (N x 2, mm) as ``path`` and its buffer by
        ``radius`` (mm) with round caps as geometry."""
        self._stroke_objs.append(obj)
        self._stroke_coords.append(coords)
        self._stroke_radius.append(radius)

    def flush(self) -> None:
        """Make the geometry of every recorded object."""
        if self._flash_objs:
            self._flush_flashes()
        if self._stroke_objs:
            self._flush_strokes()

    def _flush_flashes(self) -> None:
        shapes = np.array(self._flash_shapes, dtype=object)
        pts = np.array(self._flash_points, dtype=float)
        counts = shapely.get_num_coordinates(shapes)
        offsets = np.repeat(pts, counts, axis=0)
        moved = shapely.transform(shapes, lambda c: c + offsets)
        self.repaired += repair_collapsed(moved)
        for obj, g in zip(self._flash_objs, moved):
            obj.geometry = g
        self._flash_objs, self._flash_shapes, self._flash_points = [], [], []

    def _flush_strokes(self) -> None:
        coords = self._stroke_coords
        lengths = np.fromiter((len(c) for c in coords), dtype=np.intp, count=len(coords))
        flat = np.concatenate(coords, axis=0)
        index = np.repeat(np.arange(len(coords)), lengths)
        paths = shapely.linestrings(flat, indices=index)
        radii = np.array(self._stroke_radius, dtype=float)
        geoms = np.empty(len(coords), dtype=object)
        groups: dict[int, list[int]] = defaultdict(list)
        qs_of: dict[float, int] = {}
        for i, r in enumerate(self._stroke_radius):
            qs = qs_of.get(r)
            if qs is None:
                qs = qs_of[r] = arcs.quad_segs_for(r) if r > 0 else 0
            groups[qs].append(i)
        for qs, idx in sorted(groups.items()):
            idx_arr = np.array(idx, dtype=np.intp)
            geoms[idx_arr] = shapely.buffer(paths[idx_arr], radii[idx_arr], quad_segs=max(qs, 1))
        self.repaired += repair_collapsed(geoms)
        for obj, path, g in zip(self._stroke_objs, paths, geoms):
            obj.path = path
            obj.geometry = g
        self._stroke_objs, self._stroke_coords, self._stroke_radius = [], [], []
