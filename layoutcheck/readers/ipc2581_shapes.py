"""IPC-2581 shapes to shapely geometry: standard primitives, user primitives, line
descriptors, lines, arcs, polylines, polygons, contours with cut-outs, outlines, and the
Xform/Location placement.

Definitions (IPC-2581 revisions B and C, recalled from memory and summarised in the shared
format notes section 3; marked [M] there):

* Standard primitives are centred on their own origin: ``Circle(diameter)``,
  ``RectCenter(width, height)``, ``RectRound(width, height, radius, upperRight, upperLeft,
  lowerLeft, lowerRight)``, ``RectCham(width, height, chamfer, <corner flags>)``,
  ``Oval(width, height)`` (a stadium), ``Donut(shape, outerDiameter, innerDiameter)``,
  ``Diamond(width, height)``, ``Ellipse(width, height)``, ``Thermal(shape, outerDiameter,
  innerDiameter, spokeCount, gap, spokeStartAngle)``; ``RectCorner(lowerLeftX, lowerLeftY,
  upperRightX, upperRightY)`` gives its corners.  When a RectRound/RectCham names none of
  its corner flags every corner is shaped (assumption, recorded); when it names some, the
  others are square.
* ``Polygon``: ``PolyBegin(x, y)`` then ``PolyStepSegment(x, y)`` and ``PolyStepCurve(x, y,
  centerX, centerY, clockwise)`` steps, filled.  ``Contour``: a Polygon minus its
  ``Cutout`` polygons.  ``Polyline``, ``Line(startX, startY, endX, endY)`` and ``Arc(...,
  centerX, centerY, clockwise)`` are stroked with a line descriptor ``LineDesc(lineWidth,
  lineEnd = ROUND | SQUARE | NONE)`` (inline or by ``LineDescRef``); ``Outline`` is a
  polygon's boundary stroked.  A ``FillDesc(fillProperty = HOLLOW)`` on a closed shape
  strokes its boundary with its line descriptor instead of filling it.
* ``Xform(rotation, mirror, scale, xOffset, yOffset)``: scale, then mirror (x -> -x), then
  rotate counter-clockwise about the local origin, then offset; ``Location(x, y)`` then
  moves the local origin to the board position (mirror-before-rotate is the notes'
  safest assumption).

Joins: ROUND lines have round caps and joins; SQUARE and NONE lines square/flat caps and
mitred joins.  Arcs are flattened by :mod:`layoutcheck.geometry.arcs` (chord error
under 0.5 um); circles are circumscribed there.  Units: millimetres (every entry point
takes ``scale`` = mm per unit of the element's scope).
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import shapely
from shapely import affinity
from shapely.geometry import LinearRing, LineString, Polygon, box
from shapely.geometry.base import BaseGeometry

from ..errors import InputFileError, ResourceLimitError, UnsupportedFeatureError
from ..geometry.arcs import arc_points, circle, quad_segs_for
from ..limits import DEFAULT_LIMITS, Limits
from ..model import Assumption
from .ipc2581_geom import (LineDesc, dedupe_points, path_geometry, polygonal, stroke)
from .ipc2581_xml import boolean, local, rel_path, src_line

#: Standard primitives recognised but not drawn (their exact geometry is not known well
#: enough here); meeting one on copper is an error rather than a guess.
UNSUPPORTED_PRIMITIVES = frozenset({"Hexagon", "Octagon", "Triangle", "Butterfly", "Moire"})
#: Children that carry no geometry and may appear beside shapes.
NON_GEOMETRY = frozenset({"ColorRef", "Color", "NonstandardAttribute", "SpecRef",
                          "LineDesc", "LineDescRef", "FillDesc", "FillDescRef", "Xform",
                          "Location", "PinRef", "Font", "FontRef"})
#: Elements that hold one shape, with the CopperShape ``kind`` each gives.
SHAPE_KINDS = {
    "Circle": "flash", "RectCenter": "flash", "RectCorner": "flash", "RectRound": "flash",
    "RectCham": "flash", "Oval": "flash", "Donut": "flash", "Diamond": "flash",
    "Ellipse": "flash", "Thermal": "flash", "StandardPrimitiveRef": "flash",
    "UserPrimitiveRef": "flash", "UserSpecial": "region", "Contour": "region",
    "Polygon": "region", "Outline": "draw", "Line": "draw", "Polyline": "draw",
    "Arc": "arc", "Text": "text",
}
SHAPE_KINDS.update({k: "flash" for k in UNSUPPORTED_PRIMITIVES})

#: The identity affine map (a, b, d, e, xoff, yoff).
IDENTITY = (1.0, 0.0, 0.0, 1.0, 0.0, 0.0)
#: Shapes stroked with a line descriptor (their copper can be made in batches).
STROKES = frozenset({"Line", "Polyline", "Arc"})

#: The largest gap (mm) between a polygon's last and first point that is closed silently.
CLOSE_TOL_MM = 0.001


@dataclass
class Loc:
    """Where an element subtree sits: file, the path of its root and the root element."""

    file: str
    base: str
    root: object = None

    def err(self, elem, message: str, cls=InputFileError) -> InputFileError:
        path = rel_path(self.base, self.root, elem) if self.root is not None else self.base
        return cls(message, file=self.file, line=src_line(elem),
                   element=path)


@dataclass
class Shapes:
    """Geometry maker for one file: dictionaries (mm) plus limits and notes.

    ``line``: LineDesc by id; ``fill``: fill property by id; ``standard`` / ``user``:
    centred geometry (mm) by id.  ``user_raw`` holds user entries not yet built (they may
    refer to each other in any order).
    """

    file: str
    limits: Limits = DEFAULT_LIMITS
    line: dict[str, LineDesc] = field(default_factory=dict)
    fill: dict[str, str] = field(default_factory=dict)
    standard: dict[str, BaseGeometry] = field(default_factory=dict)
    user: dict[str, BaseGeometry] = field(default_factory=dict)
    user_raw: dict[str, tuple] = field(default_factory=dict)
    notes: list[Assumption] = field(default_factory=list)
    vertices: int = 0
    _building: set = field(default_factory=set)

    # ----------------------------------------------------------------- helpers
    def note(self, topic: str, text: str) -> None:
        a = Assumption(topic, text)
        if a not in self.notes:
            self.notes.append(a)

    def num(self, elem, attr: str, loc: Loc, default: float | None = None) -> float:
        v = elem.get(attr)
        if v is None:
            if default is not None:
                return default
            raise loc.err(elem, f"<{local(elem.tag)}> has no {attr} attribute; expected a "
                                "number")
        try:
            x = float(v)
        except ValueError:
            raise loc.err(elem, f"{local(elem.tag)}@{attr} is {v[:30]!r}; expected a decimal "
                                "number") from None
        if not math.isfinite(x):
            raise loc.err(elem, f"{local(elem.tag)}@{attr} is {v!r}; expected a finite number")
        return x

    def coord(self, elem, attr: str, scale: float, loc: Loc, default=None) -> float:
        v = self.num(elem, attr, loc, default) * scale
        if abs(v) > self.limits.max_coordinate_mm:
            raise loc.err(elem, f"{local(elem.tag)}@{attr} is {v:g} mm from the origin; the "
                                f"limit is {self.limits.max_coordinate_mm:g} mm",
                          ResourceLimitError)
        return v

    def size(self, elem, attr: str, scale: float, loc: Loc, *, positive: bool = True,
             default=None) -> float:
        v = self.num(elem, attr, loc, default) * scale
        if v < 0 or (positive and v == 0):
            raise loc.err(elem, f"{local(elem.tag)}@{attr} is {v:g} mm; expected a "
                                f"{'positive' if positive else 'non-negative'} size")
        if v > self.limits.max_aperture_mm:
            raise loc.err(elem, f"{local(elem.tag)}@{attr} is {v:g} mm; the limit for one "
                                f"shape is {self.limits.max_aperture_mm:g} mm",
                          ResourceLimitError)
        return v

    def _count(self, n: int, elem, loc: Loc) -> None:
        self.vertices += n
        if self.vertices > self.limits.max_total_vertices:
            raise loc.err(elem, f"the file makes more than {self.limits.max_total_vertices} "
                                "polygon vertices (limit)", ResourceLimitError)

    # ----------------------------------------------------------------- descriptors
    def line_desc(self, elem, scale: float, loc: Loc) -> LineDesc:
        """A LineDesc element (inline), converted to mm."""
        end = (elem.get("lineEnd") or "ROUND").strip().upper()
        if end not in ("ROUND", "SQUARE", "NONE"):
            raise loc.err(elem, f"LineDesc@lineEnd is {end!r}; expected ROUND, SQUARE or NONE",
                          UnsupportedFeatureError)
        return LineDesc(self.size(elem, "lineWidth", scale, loc, positive=False), end)

    def _line_of(self, elem, scale: float, loc: Loc) -> LineDesc | None:
        for c in elem:
            name = local(c.tag)
            if name == "LineDesc":
                return self.line_desc(c, scale, loc)
            if name == "LineDescRef":
                ref = c.get("id")
                if ref not in self.line:
                    raise loc.err(c, f"LineDescRef id {ref!r} is not defined; expected an "
                                     "EntryLineDesc id of DictionaryLineDesc")
                return self.line[ref]
        return None

    def _fill_of(self, elem, loc: Loc) -> str:
        for c in elem:
            name = local(c.tag)
            if name == "FillDesc":
                return (c.get("fillProperty") or "FILL").strip().upper()
            if name == "FillDescRef":
                ref = c.get("id")
                if ref not in self.fill:
                    raise loc.err(c, f"FillDescRef id {ref!r} is not defined; expected an "
                                     "EntryFillDesc id of DictionaryFillDesc")
                return self.fill[ref]
        return "FILL"

    # ----------------------------------------------------------------- dispatch
    def shape(self, elem, scale: float, loc: Loc) -> BaseGeometry:
        """Geometry (mm) of one shape element in its own frame (not placed)."""
        name = local(elem.tag)
        if name == "StandardPrimitiveRef":
            ref = elem.get("id")
            g = self.standard.get(ref)
            if g is None:
                raise loc.err(elem, f"StandardPrimitiveRef id {ref!r} is not defined; expected "
                                    "an EntryStandard id of DictionaryStandard")
            return g
        if name == "UserPrimitiveRef":
            return self.user_shape(elem.get("id"), elem, loc)
        if name in UNSUPPORTED_PRIMITIVES:
            raise loc.err(elem, f"standard primitive {name} is not supported (its geometry is "
                                "not implemented); expected Circle, RectCenter, RectCorner, "
                                "RectRound, RectCham, Oval, Donut, Diamond, Ellipse, Thermal "
                                "or Contour", UnsupportedFeatureError)
        if name == "Text":
            raise loc.err(elem, "copper text is not supported; expected text converted to "
                                "polygons", UnsupportedFeatureError)
        maker = getattr(self, "_" + name, None)
        if maker is None or name not in SHAPE_KINDS:
            raise loc.err(elem, f"<{name}> is not a shape this reader knows; expected a "
                                "standard primitive, a primitive reference, UserSpecial, Line, "
                                "Arc, Polyline, Polygon, Contour or Outline",
                          UnsupportedFeatureError)
        g = maker(elem, scale, loc)
        xf = _child(elem, "Xform")
        if xf is not None:  # revision B allowed an Xform inside a primitive
            g = self.place(g, xf, None, scale, loc)
        return g

    def matrix(self, xform, location, scale: float, loc: Loc) -> tuple:
        """The affine map ``(a, b, d, e, xoff, yoff)`` of an Xform (may be None) about the
        local origin followed by the move to Location (may be None); lengths in mm."""
        a, b, d, e, xo, yo = 1.0, 0.0, 0.0, 1.0, 0.0, 0.0
        if xform is not None:
            s = self.num(xform, "scale", loc, 1.0)
            if s <= 0:
                raise loc.err(xform, f"Xform@scale is {s:g}; expected a positive factor")
            m = -1.0 if boolean(xform, "mirror") else 1.0
            if xform.get("faceUp") is not None and not boolean(xform, "faceUp", True):
                raise loc.err(xform, "Xform@faceUp=false is not supported on copper "
                                     "features", UnsupportedFeatureError)
            r = math.radians(self.num(xform, "rotation", loc, 0.0))
            c, sn = math.cos(r), math.sin(r)
            a, b, d, e = c * s * m, -sn * s, sn * s * m, c * s
            xo = self.num(xform, "xOffset", loc, 0.0) * scale
            yo = self.num(xform, "yOffset", loc, 0.0) * scale
            if xo or yo:
                self.note("units", f"{self.file}: Xform offsets applied after scale, mirror "
                                   "and rotation (order assumed)")
        if location is not None:
            xo += self.coord(location, "x", scale, loc, 0.0)
            yo += self.coord(location, "y", scale, loc, 0.0)
        return (a, b, d, e, xo, yo)

    def place(self, geom: BaseGeometry, xform, location, scale: float,
              loc: Loc) -> BaseGeometry:
        """Apply an Xform (may be None) about the local origin, then move to Location."""
        m = self.matrix(xform, location, scale, loc)
        if m == IDENTITY:
            return geom
        return shapely.affinity.affine_transform(geom, list(m))

    # ----------------------------------------------------------------- user primitives
    def user_shape(self, ref: str | None, elem, loc: Loc) -> BaseGeometry:
        g = self.user.get(ref)
        if g is not None:
            return g
        raw = self.user_raw.get(ref)
        if raw is None:
            raise loc.err(elem, f"UserPrimitiveRef id {ref!r} is not defined; expected an "
                                "EntryUser id of DictionaryUser")
        if ref in self._building:
            raise loc.err(elem, f"user primitive {ref!r} refers to itself (directly or "
                                "through others)")
        if len(self._building) >= self.limits.max_block_depth:
            raise loc.err(elem, "user primitives nested deeper than "
                                f"{self.limits.max_block_depth} (limit)", ResourceLimitError)
        self._building.add(ref)
        try:
            entry, scale, base = raw
            g = self.entry_geometry(entry, scale, Loc(self.file, base, entry))
        finally:
            self._building.discard(ref)
        self.user[ref] = g
        return g

    def entry_geometry(self, entry, scale: float, loc: Loc) -> BaseGeometry:
        """Union of the shapes inside a dictionary entry (EntryStandard / EntryUser)."""
        shapes = [c for c in entry if local(c.tag) not in NON_GEOMETRY]
        if not shapes:
            raise loc.err(entry, f"<{local(entry.tag)}> holds no shape")
        geoms = [self.shape(c, scale, loc) for c in shapes]
        return geoms[0] if len(geoms) == 1 else shapely.union_all(geoms)

    def _UserSpecial(self, elem, scale, loc):
        geoms = []
        for c in elem:
            name = local(c.tag)
            if name in NON_GEOMETRY:
                continue
            if name == "Features":
                for g in self.features(c, scale, loc):
                    geoms.append(g)
                continue
            geoms.append(self.shape(c, scale, loc))
        if not geoms:
            raise loc.err(elem, "UserSpecial holds no shape")
        return geoms[0] if len(geoms) == 1 else shapely.union_all(geoms)

    def features(self, elem, scale: float, loc: Loc) -> list[BaseGeometry]:
        """Placed geometry (mm) of each shape in a ``Features`` element."""
        xf = _child(elem, "Xform")
        lc = _child(elem, "Location")
        out = []
        for c in elem:
            name = local(c.tag)
            if name in NON_GEOMETRY:
                continue
            g = self.shape(c, scale, loc)
            if lc is not None and SHAPE_KINDS.get(name) in ("draw", "arc", "region") \
                    and name not in ("UserSpecial",):
                self.note("units", f"{self.file}: a Location given with a shape that has its "
                                   "own coordinates was taken as an offset")
            out.append(self.place(g, xf, lc, scale, loc))
        return out

    # ----------------------------------------------------------------- standard primitives
    def _filled(self, geom, elem, scale, loc):
        """Apply the element's FillDesc: FILL (default) keeps it, HOLLOW strokes its edge."""
        fill = self._fill_of(elem, loc)
        if fill == "FILL":
            return geom
        if fill == "HOLLOW":
            ld = self._line_of(elem, scale, loc)
            if ld is None or ld.width <= 0:
                raise loc.err(elem, f"hollow {local(elem.tag)} has no line width; expected a "
                                    "LineDesc with lineWidth > 0")
            return stroke(geom.boundary, ld)
        raise loc.err(elem, f"fill property {fill!r} is not supported; expected FILL or HOLLOW",
                      UnsupportedFeatureError)

    def _Circle(self, elem, scale, loc):
        return self._filled(circle(0.0, 0.0, self.size(elem, "diameter", scale, loc)),
                            elem, scale, loc)

    def _RectCenter(self, elem, scale, loc):
        w = self.size(elem, "width", scale, loc)
        h = self.size(elem, "height", scale, loc)
        return self._filled(box(-w / 2, -h / 2, w / 2, h / 2), elem, scale, loc)

    def _RectCorner(self, elem, scale, loc):
        x0 = self.coord(elem, "lowerLeftX", scale, loc)
        y0 = self.coord(elem, "lowerLeftY", scale, loc)
        x1 = self.coord(elem, "upperRightX", scale, loc)
        y1 = self.coord(elem, "upperRightY", scale, loc)
        if not (x1 > x0 and y1 > y0):
            raise loc.err(elem, "RectCorner upper-right corner is not above and right of the "
                                "lower-left one")
        return self._filled(box(x0, y0, x1, y1), elem, scale, loc)

    def _corner_flags(self, elem) -> tuple[bool, bool, bool, bool]:
        names = ("lowerRight", "upperRight", "upperLeft", "lowerLeft")
        if all(elem.get(n) is None for n in names):
            self.note("units", f"{self.file}: {local(elem.tag)} without corner flags taken as "
                               "shaped on all four corners")
            return (True, True, True, True)
        return tuple(boolean(elem, n) for n in names)  # type: ignore[return-value]

    def _shaped_rect(self, elem, scale, loc, attr: str, rounded: bool):
        w = self.size(elem, "width", scale, loc)
        h = self.size(elem, "height", scale, loc)
        r = self.size(elem, attr, scale, loc, positive=False)
        if r > min(w, h) / 2 + 1e-9:
            raise loc.err(elem, f"{local(elem.tag)}@{attr} {r:g} mm is more than half the "
                                f"shorter side ({min(w, h):g} mm)")
        r = min(r, min(w, h) / 2)
        flags = self._corner_flags(elem)
        # corners counter-clockwise from lower right: (corner, inward direction signs)
        corners = [((w / 2, -h / 2), (-1, 1), -90.0), ((w / 2, h / 2), (-1, -1), 0.0),
                   ((-w / 2, h / 2), (1, -1), 90.0), ((-w / 2, -h / 2), (1, 1), 180.0)]
        pts: list = []
        for ((cx, cy), (sx, sy), a0), on in zip(corners, flags):
            if not on or r <= 0:
                pts.append((cx, cy))
            elif rounded:
                ox, oy = cx + sx * r, cy + sy * r
                a = math.radians(a0)
                p0 = (ox + r * math.cos(a), oy + r * math.sin(a))
                p1 = (ox + r * math.cos(a + math.pi / 2), oy + r * math.sin(a + math.pi / 2))
                pts.extend(arc_points(p0, p1, (ox, oy), False).tolist())
            else:  # chamfer: the two points where the cut meets the sides
                a = math.radians(a0)
                along_x = abs(math.cos(a)) < 0.5   # the corner is reached along the x edge
                p0 = (cx + sx * r * along_x, cy + sy * r * (not along_x))
                p1 = (cx + sx * r * (not along_x), cy + sy * r * along_x)
                pts.extend([p0, p1])
        g = Polygon(dedupe_points(pts))
        return self._filled(g, elem, scale, loc)

    def _RectRound(self, elem, scale, loc):
        return self._shaped_rect(elem, scale, loc, "radius", True)

    def _RectCham(self, elem, scale, loc):
        return self._shaped_rect(elem, scale, loc, "chamfer", False)

    def _Oval(self, elem, scale, loc):
        w = self.size(elem, "width", scale, loc)
        h = self.size(elem, "height", scale, loc)
        d = min(w, h)
        half = (max(w, h) - d) / 2
        if half <= 0:
            g = circle(0.0, 0.0, d)
        else:
            line = LineString([(-half, 0), (half, 0)]) if w >= h else \
                LineString([(0, -half), (0, half)])
            g = line.buffer(d / 2, quad_segs=quad_segs_for(d / 2))
        return self._filled(g, elem, scale, loc)

    def _Diamond(self, elem, scale, loc):
        w = self.size(elem, "width", scale, loc)
        h = self.size(elem, "height", scale, loc)
        return self._filled(Polygon([(w / 2, 0), (0, h / 2), (-w / 2, 0), (0, -h / 2)]),
                            elem, scale, loc)

    def _Ellipse(self, elem, scale, loc):
        w = self.size(elem, "width", scale, loc)
        h = self.size(elem, "height", scale, loc)
        m = max(w, h)
        g = affinity.scale(circle(0.0, 0.0, m), w / m, h / m, origin=(0, 0))
        return self._filled(g, elem, scale, loc)

    def _ring_shape(self, elem, shape: str, d: float):
        if shape == "ROUND":
            return circle(0.0, 0.0, d)
        if shape == "SQUARE":
            return box(-d / 2, -d / 2, d / 2, d / 2)
        return None

    def _Donut(self, elem, scale, loc):
        shape = (elem.get("shape") or "ROUND").strip().upper()
        od = self.size(elem, "outerDiameter", scale, loc)
        idm = self.size(elem, "innerDiameter", scale, loc, positive=False)
        if idm >= od:
            raise loc.err(elem, f"Donut innerDiameter {idm:g} mm is not smaller than "
                                f"outerDiameter {od:g} mm")
        outer = self._ring_shape(elem, shape, od)
        if outer is None:
            raise loc.err(elem, f"Donut shape {shape!r} is not supported; expected ROUND or "
                                "SQUARE", UnsupportedFeatureError)
        if idm <= 0:
            return outer
        return self._filled(outer.difference(self._ring_shape(elem, shape, idm)), elem,
                            scale, loc)

    def _Thermal(self, elem, scale, loc):
        shape = (elem.get("shape") or "ROUND").strip().upper()
        od = self.size(elem, "outerDiameter", scale, loc)
        idm = self.size(elem, "innerDiameter", scale, loc)
        n = int(self.num(elem, "spokeCount", loc, 4.0))
        gap = self.size(elem, "gap", scale, loc, positive=False, default=0.0)
        a0 = self.num(elem, "spokeStartAngle", loc, 0.0)
        if idm >= od or n < 0 or n > 64:
            raise loc.err(elem, "Thermal needs innerDiameter < outerDiameter and 0..64 spokes")
        outer = self._ring_shape(elem, shape, od)
        if outer is None:
            raise loc.err(elem, f"Thermal shape {shape!r} is not supported; expected ROUND or "
                                "SQUARE", UnsupportedFeatureError)
        g = outer.difference(self._ring_shape(elem, shape, idm))
        if n and gap > 0:
            reach = od  # beyond the corner of a square ring too
            cuts = [affinity.rotate(box(0.0, -gap / 2, reach, gap / 2), a0 + k * 360.0 / n,
                                    origin=(0, 0)) for k in range(n)]
            g = g.difference(shapely.union_all(cuts))
        return g

    # ----------------------------------------------------------------- simple shapes
    def points(self, elem, scale: float, loc: Loc) -> np.ndarray:
        """Flattened points of a PolyBegin / PolyStepSegment / PolyStepCurve sequence."""
        pts: list[np.ndarray] = []
        cur = None
        n = 0
        for c in elem:
            name = local(c.tag)
            if name == "PolyBegin":
                if cur is not None:
                    raise loc.err(c, "a second PolyBegin; expected PolyStepSegment or "
                                     "PolyStepCurve steps")
                cur = (self.coord(c, "x", scale, loc), self.coord(c, "y", scale, loc))
                pts.append(np.array([cur]))
            elif name in ("PolyStepSegment", "PolyStepCurve"):
                if cur is None:
                    raise loc.err(c, f"{name} before PolyBegin; expected PolyBegin first")
                nxt = (self.coord(c, "x", scale, loc), self.coord(c, "y", scale, loc))
                if name == "PolyStepSegment":
                    pts.append(np.array([nxt]))
                else:
                    centre = (self.coord(c, "centerX", scale, loc),
                              self.coord(c, "centerY", scale, loc))
                    self._check_radii(cur, nxt, centre, c, loc)
                    arc = arc_points(cur, nxt, centre, boolean(c, "clockwise"))
                    pts.append(arc[1:])
                cur = nxt
            elif name in NON_GEOMETRY:
                continue
            else:
                raise loc.err(c, f"<{name}> inside <{local(elem.tag)}>; expected PolyBegin, "
                                 "PolyStepSegment or PolyStepCurve", UnsupportedFeatureError)
            n += len(pts[-1]) if name != "PolyBegin" else 1
            if n > self.limits.max_region_vertices:
                raise loc.err(c, f"more than {self.limits.max_region_vertices} points in one "
                                 "polygon (limit)", ResourceLimitError)
        if cur is None:
            raise loc.err(elem, f"<{local(elem.tag)}> has no PolyBegin; expected PolyBegin and "
                                "steps")
        out = np.concatenate(pts)
        self._count(len(out), elem, loc)
        return out

    def _check_radii(self, start, end, centre, elem, loc):
        r0 = math.hypot(start[0] - centre[0], start[1] - centre[1])
        r1 = math.hypot(end[0] - centre[0], end[1] - centre[1])
        if abs(r0 - r1) > max(0.0025, 0.001 * max(r0, r1)):
            raise loc.err(elem, f"arc radii differ: {r0:.6g} mm at the start, {r1:.6g} mm at "
                                "the end; expected a circular arc (same distance from the "
                                "centre)")
        if r0 == 0:
            raise loc.err(elem, "arc of zero radius; expected a centre away from the end points")

    def ring(self, elem, scale: float, loc: Loc) -> np.ndarray:
        """A closed ring (first point repeated at the end)."""
        pts = self.points(elem, scale, loc)
        if len(pts) < 3 and not (len(pts) >= 2 and np.allclose(pts[0], pts[-1])):
            raise loc.err(elem, f"<{local(elem.tag)}> has {len(pts)} points; a closed shape "
                                "needs at least 3")
        gap = float(np.hypot(*(pts[-1] - pts[0])))
        if gap > 0:
            if gap > CLOSE_TOL_MM:
                self.note("outline", f"{self.file}: a polygon that does not end where it began "
                                     f"({gap:.4g} mm apart) was closed with a straight edge")
                pts = np.vstack([pts, pts[:1]])
            else:
                pts = pts.copy()
                pts[-1] = pts[0]
        return pts

    def _Polygon(self, elem, scale, loc):
        g = polygonal(Polygon(self.ring(elem, scale, loc)))
        return self._filled(g, elem, scale, loc)

    def _Cutout(self, elem, scale, loc):
        return polygonal(Polygon(self.ring(elem, scale, loc)))

    def _Contour(self, elem, scale, loc):
        outer = None
        cuts = []
        for c in elem:
            name = local(c.tag)
            if name == "Polygon":
                if outer is not None:
                    raise loc.err(c, "Contour with two Polygons; expected one Polygon and "
                                     "Cutouts")
                outer = self._Polygon(c, scale, loc)
            elif name == "Cutout":
                cuts.append(self._Cutout(c, scale, loc))
            elif name not in NON_GEOMETRY:
                raise loc.err(c, f"<{name}> inside Contour; expected Polygon and Cutout",
                              UnsupportedFeatureError)
        if outer is None:
            raise loc.err(elem, "Contour without a Polygon")
        if cuts:
            outer = polygonal(outer.difference(shapely.union_all(cuts)))
        return outer

    def _stroke_of(self, elem, scale, loc, what: str) -> LineDesc:
        ld = self._line_of(elem, scale, loc)
        if ld is None:
            raise loc.err(elem, f"{what} has no line descriptor; expected a LineDesc or "
                                "LineDescRef child")
        return ld

    def _Outline(self, elem, scale, loc):
        poly = _child(elem, "Polygon")
        if poly is None:
            raise loc.err(elem, "Outline without a Polygon")
        ld = self._stroke_of(elem, scale, loc, "Outline")
        return stroke(LinearRing(self.ring(poly, scale, loc)), ld)

    def _Polyline(self, elem, scale, loc):
        pts, ld = self.stroke_spec(elem, scale, loc)
        return stroke(path_geometry(pts), ld)

    _Line = _Polyline
    _Arc = _Polyline

    def stroke_spec(self, elem, scale: float, loc: Loc) -> tuple[np.ndarray, LineDesc]:
        """Centre-line points (mm) and line descriptor of a Line, Polyline or Arc."""
        name = local(elem.tag)
        ld = self._stroke_of(elem, scale, loc, name)
        if name == "Polyline":
            return self.points(elem, scale, loc), ld
        s = (self.coord(elem, "startX", scale, loc), self.coord(elem, "startY", scale, loc))
        e = (self.coord(elem, "endX", scale, loc), self.coord(elem, "endY", scale, loc))
        if name == "Line":
            return np.array([s, e]), ld
        c = (self.coord(elem, "centerX", scale, loc), self.coord(elem, "centerY", scale, loc))
        self._check_radii(s, e, c, elem, loc)
        pts = arc_points(s, e, c, boolean(elem, "clockwise"))
        self._count(len(pts), elem, loc)
        return pts, ld

    # ----------------------------------------------------------------- slot widths
    def stroke_width(self, elem, scale, loc) -> float | None:
        """Line width (mm) of a stroked shape element, or None for filled shapes."""
        if local(elem.tag) in ("Line", "Polyline", "Arc"):
            return self._stroke_of(elem, scale, loc, local(elem.tag)).width
        return None


# ---------------------------------------------------------------------- helpers
def _child(elem, name: str):
    for c in elem:
        if local(c.tag) == name:
            return c
    return None


__all__ = ["LineDesc", "Loc", "Shapes", "SHAPE_KINDS", "NON_GEOMETRY", "STROKES",
           "IDENTITY", "UNSUPPORTED_PRIMITIVES"]
