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
from .types import GraphicObject


class GeometryBuilder:
    """Collects objects whose geometry is still to be made."""

    def __init__(self) -> None:
        self._flash_objs: list[GraphicObject] = []
        self._flash_shapes: list[BaseGeometry] = []
        self._flash_points: list[tuple[float, float]] = []
        self._stroke_objs: list[GraphicObject] = []
        self._stroke_coords: list[np.ndarray] = []
        self._stroke_radius: list[float] = []

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
        for obj, path, g in zip(self._stroke_objs, paths, geoms):
            obj.path = path
            obj.geometry = g
        self._stroke_objs, self._stroke_coords, self._stroke_radius = [], [], []
