"""A plain description of a board to write: parts, pads, tracks, zones, vias, holes, slots.

Units: millimetres for every coordinate and size, degrees (counter-clockwise) for rotations.
Coordinates are board coordinates, y up, as they will appear in the fab files.

The :class:`Design` is deliberately format-neutral: the Gerber X2 and NC drill writers
(:mod:`layoutcheck.writers.gerber`, :mod:`layoutcheck.writers.drill`) read it, and an
IPC-2581 or IPC-D-356A writer can read the same data (every pad knows its part, pin, net,
side or plated hole; every part knows its pin names).  A stripboard plan fits too: strips are
:class:`Zone` rectangles, the holes are plated or bare :class:`Pad` s on the strips, and
track cuts are simply gaps between zones.

Copper layer names follow :func:`layoutcheck.model.copper_layer_names`: ``top``,
``in1`` .. ``inN``, ``bottom``.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Iterable

from shapely.geometry import LineString, MultiPolygon, Polygon
from shapely.geometry.base import BaseGeometry
from shapely import affinity

from ..errors import UsageError
from ..geometry.arcs import circle, quad_segs_for
from ..model import copper_layer_names

Point2 = tuple[float, float]

#: Part kinds a design may name.
PART_KINDS = ("mosfet", "igbt", "capacitor", "resistor", "diode", "driver", "connector",
              "inductor", "other")
#: Pad shapes the writers know.
PAD_SHAPES = ("circle", "rect", "oval", "roundrect")
#: Where a pad is: one outer layer, or every copper layer (plated through-hole).
PAD_LAYERS = ("top", "bottom", "all")

#: Coordinates are rounded to this many decimals (1 nm) wherever the writers emit them.
DECIMALS = 6


@dataclass
class Part:
    """A placed component.

    ref:        reference designator (``Q1``).
    kind:       one of :data:`PART_KINDS`.
    value:      free text (``"10 uF 450 V"``).
    package:    free text footprint name (``"TO-247-3"``).
    pins:       pin number -> pin name (``{"1": "G"}``); ``""`` when a pin has no name.
    position:   placement origin (mm).
    rotation:   degrees, counter-clockwise.
    side:       ``"top"`` or ``"bottom"``.
    properties: ratings and other characteristics (``{"voltage_v": 650}``).
    """

    ref: str
    kind: str
    value: str = ""
    package: str = ""
    pins: dict[str, str] = field(default_factory=dict)
    position: Point2 = (0.0, 0.0)
    rotation: float = 0.0
    side: str = "top"
    properties: dict[str, Any] = field(default_factory=dict)

    def pin_name(self, pin: str) -> str:
        """The pin's name, ``""`` when it has none or the pin is unknown."""
        return self.pins.get(pin, "") or ""


@dataclass
class Pad:
    """One pad (land) of a part, or a free pad when ``ref`` is ``""``.

    net:        net name; ``None`` when the design says nothing, ``""`` for "no net".
    x, y:       centre (mm).
    shape:      one of :data:`PAD_SHAPES`.
    w, h:       size along the pad's own x and y before rotation (mm); ``h`` defaults to ``w``.
    layers:     ``"top"``, ``"bottom"`` or ``"all"`` (plated through-hole; needs ``drill``).
    drill:      finished hole diameter (mm) of a plated through-hole pad, else ``None``.
    rotation:   degrees, counter-clockwise.
    corner_radius: for ``roundrect`` (mm); default a quarter of the shorter side.
    function:   override of the pad's .AperFunction (``"ConnectorPad"``, ``"TestPad"``...);
                default ``ComponentPad`` for through-hole and ``SMDPad,CuDef`` for SMD pads.
    """

    ref: str
    pin: str
    net: str | None
    x: float
    y: float
    shape: str = "circle"
    w: float = 1.0
    h: float | None = None
    layers: str = "top"
    drill: float | None = None
    rotation: float = 0.0
    corner_radius: float | None = None
    function: str | None = None

    @property
    def height(self) -> float:
        """Pad size along its own y (mm)."""
        return self.w if self.h is None else self.h

    @property
    def through_hole(self) -> bool:
        """True for a plated through-hole pad."""
        return self.drill is not None

    @property
    def radius(self) -> float:
        """Corner radius (mm) of a roundrect pad; 0 for other shapes."""
        if self.shape != "roundrect":
            return 0.0
        r = self.corner_radius
        if r is None:
            r = 0.25 * min(self.w, self.height)
        return min(r, 0.5 * min(self.w, self.height))


@dataclass
class Track:
    """A conductor stroked with a round-ended pen.  width: mm; points: centre line (mm)."""

    net: str | None
    layer: str
    width: float
    points: list[Point2]


@dataclass
class Zone:
    """A filled copper area (pour, plane piece or stripboard strip).

    polygon: outer boundary (mm), not repeated at the end.
    holes:   inner boundaries (mm); each must lie inside ``polygon`` and not touch another.
    """

    net: str | None
    layer: str
    polygon: list[Point2]
    holes: list[list[Point2]] = field(default_factory=list)


@dataclass
class Via:
    """A plated via through every copper layer.  pad: land diameter; drill: hole (mm)."""

    net: str | None
    x: float
    y: float
    pad: float
    drill: float


@dataclass
class NonPlatedHole:
    """A non-plated drilled hole (mounting, tooling).  d: diameter (mm)."""

    x: float
    y: float
    d: float


@dataclass
class Slot:
    """A routed slot: the tool centre line ``points`` (mm) swept by a cutter of ``width``.

    Non-plated by default (a creepage or mounting slot); ``plated=True`` makes a plated
    slot (then ``net`` may name its net).
    """

    points: list[Point2]
    width: float
    plated: bool = False
    net: str | None = None


@dataclass
class Design:
    """Everything the sample writers need to produce one board's fab files.

    name:          file name stem (``fullbridge-rev-a``).
    outline:       board profile polygon (mm), not repeated at the end.
    copper_layers: number of copper layers (1 = top only).
    thickness_mm:  finished board thickness (mm).
    copper_um:     copper thickness of every layer (micrometres).
    notes:         free text lines the writers may put in comments.
    """

    name: str
    outline: list[Point2]
    copper_layers: int = 2
    thickness_mm: float = 1.6
    copper_um: float = 35.0
    pads: list[Pad] = field(default_factory=list)
    tracks: list[Track] = field(default_factory=list)
    zones: list[Zone] = field(default_factory=list)
    vias: list[Via] = field(default_factory=list)
    holes: list[NonPlatedHole] = field(default_factory=list)
    slots: list[Slot] = field(default_factory=list)
    parts: list[Part] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)

    # ----------------------------------------------------------------- queries
    @property
    def layer_names(self) -> list[str]:
        """Copper layer names in stack order (``["top", "bottom"]``)."""
        return copper_layer_names(self.copper_layers)

    def part(self, ref: str) -> Part | None:
        """The part with reference ``ref``, or ``None``."""
        return self.parts_by_ref().get(ref)

    def parts_by_ref(self) -> dict[str, Part]:
        """Reference designator -> part (the first one if a reference is repeated)."""
        index: dict[str, Part] = {}
        for p in self.parts:
            index.setdefault(p.ref, p)
        return index

    def pin_name(self, ref: str, pin: str) -> str:
        """Name of pin ``pin`` of part ``ref`` (``""`` if unnamed or unknown)."""
        p = self.part(ref)
        return p.pin_name(pin) if p is not None else ""

    def nets(self) -> list[str]:
        """Every non-empty net name used by any copper or plated feature, sorted."""
        names: set[str] = set()
        for seq in (self.pads, self.tracks, self.zones, self.vias, self.slots):
            for item in seq:
                if item.net:
                    names.add(item.net)
        return sorted(names)

    def pad_layers(self, pad: Pad) -> list[str]:
        """Copper layer names a pad is on."""
        if pad.layers == "all":
            return self.layer_names
        return [pad.layers]

    # ----------------------------------------------------------------- checks
    def validate(self) -> None:
        """Raise :class:`layoutcheck.errors.UsageError` if the design is inconsistent.

        Checks layer names, pad shapes and sizes, through-hole pads having a drill,
        pads naming known parts and pins, positive widths and diameters.
        """
        layers = set(self.layer_names)
        if len(self.outline) < 3:
            raise UsageError(f"design {self.name!r}: outline needs at least 3 points, "
                             f"got {len(self.outline)}")
        by_ref = self.parts_by_ref()
        if len(by_ref) != len(self.parts):
            raise UsageError(f"design {self.name!r}: a reference designator is used twice")
        for p in self.parts:
            if p.kind not in PART_KINDS:
                raise UsageError(f"part {p.ref}: kind {p.kind!r} is not one of {PART_KINDS}")
            if p.side not in ("top", "bottom"):
                raise UsageError(f"part {p.ref}: side must be 'top' or 'bottom', got {p.side!r}")
        for pad in self.pads:
            where = f"pad {pad.ref or '(free)'}-{pad.pin}"
            if pad.shape not in PAD_SHAPES:
                raise UsageError(f"{where}: shape {pad.shape!r} is not one of {PAD_SHAPES}")
            if pad.layers not in PAD_LAYERS:
                raise UsageError(f"{where}: layers {pad.layers!r} is not one of {PAD_LAYERS}")
            if pad.layers != "all" and pad.layers not in layers:
                raise UsageError(f"{where}: layer {pad.layers!r} is not on a "
                                 f"{self.copper_layers}-layer board")
            if (pad.drill is not None) != (pad.layers == "all"):
                raise UsageError(f"{where}: a through-hole pad needs layers='all' and a drill; "
                                 f"got layers={pad.layers!r}, drill={pad.drill!r}")
            if pad.w <= 0 or pad.height <= 0:
                raise UsageError(f"{where}: size must be positive, got {pad.w} x {pad.height}")
            if pad.drill is not None and not 0 < pad.drill < min(pad.w, pad.height):
                raise UsageError(f"{where}: drill {pad.drill} must be positive and smaller "
                                 f"than the pad ({pad.w} x {pad.height})")
            if pad.ref:
                part = by_ref.get(pad.ref)
                if part is None:
                    raise UsageError(f"{where}: no part {pad.ref!r} in the design")
                if part.pins and pad.pin not in part.pins:
                    raise UsageError(f"{where}: part {pad.ref} has no pin {pad.pin!r} "
                                     f"(pins: {sorted(part.pins)})")
        for t in self.tracks:
            if t.layer not in layers:
                raise UsageError(f"track on {t.net}: layer {t.layer!r} not in {sorted(layers)}")
            if t.width <= 0 or len(t.points) < 2:
                raise UsageError(f"track on {t.net}: needs width > 0 and two points or more")
        for z in self.zones:
            if z.layer not in layers:
                raise UsageError(f"zone on {z.net}: layer {z.layer!r} not in {sorted(layers)}")
            if len(z.polygon) < 3:
                raise UsageError(f"zone on {z.net}: polygon needs at least 3 points")
        for v in self.vias:
            if not 0 < v.drill < v.pad:
                raise UsageError(f"via at ({v.x}, {v.y}): drill {v.drill} must be positive and "
                                 f"smaller than its pad {v.pad}")
        for h in self.holes:
            if h.d <= 0:
                raise UsageError(f"hole at ({h.x}, {h.y}): diameter must be positive")
        for s in self.slots:
            if s.width <= 0 or len(s.points) < 2:
                raise UsageError("slot: needs width > 0 and two points or more")

    # ----------------------------------------------------------------- geometry
    def copper(self) -> list["CopperPiece"]:
        """Ideal copper of the design as shapely geometry, one piece per feature and layer.

        Pads are their exact shapes (circles flattened as in :mod:`layoutcheck.geometry.arcs`),
        tracks are round-ended buffers, zones are polygons minus their holes.  Useful as
        independent ground truth when testing readers, and for checking sample boards.
        """
        out: list[CopperPiece] = []
        for z in self.zones:
            out.append(CopperPiece(z.layer, z.net, zone_polygon(z), "zone"))
        for t in self.tracks:
            out.append(CopperPiece(t.layer, t.net, track_polygon(t), "track"))
        for p in self.pads:
            g = pad_polygon(p)
            for layer in self.pad_layers(p):
                out.append(CopperPiece(layer, p.net, g, "pad", p.ref, p.pin))
        for v in self.vias:
            g = circle(v.x, v.y, v.pad)
            for layer in self.layer_names:
                out.append(CopperPiece(layer, v.net, g, "via"))
        return out

    def outline_polygon(self) -> Polygon:
        """The board profile as a shapely polygon (mm)."""
        return Polygon(self.outline)


@dataclass
class CopperPiece:
    """One feature's copper on one layer (see :meth:`Design.copper`)."""

    layer: str
    net: str | None
    geometry: BaseGeometry
    kind: str
    ref: str | None = None
    pin: str | None = None


# ---------------------------------------------------------------------- shapes
def pad_polygon(pad: Pad) -> Polygon:
    """The pad's copper as a polygon (mm), rotation applied."""
    w, h = pad.w, pad.height
    if pad.shape == "circle":
        return circle(pad.x, pad.y, w)
    if pad.shape == "rect":
        g = Polygon([(-w / 2, -h / 2), (w / 2, -h / 2), (w / 2, h / 2), (-w / 2, h / 2)])
    elif pad.shape == "oval":
        d = min(w, h)
        half = (max(w, h) - d) / 2
        line = LineString([(-half, 0), (half, 0)]) if w >= h else \
            LineString([(0, -half), (0, half)])
        g = line.buffer(d / 2, quad_segs=quad_segs_for(d / 2)) if half > 0 else circle(0, 0, d)
    else:  # roundrect
        r = pad.radius
        core = Polygon([(-w / 2 + r, -h / 2 + r), (w / 2 - r, -h / 2 + r),
                        (w / 2 - r, h / 2 - r), (-w / 2 + r, h / 2 - r)])
        if r <= 0:
            g = Polygon([(-w / 2, -h / 2), (w / 2, -h / 2), (w / 2, h / 2), (-w / 2, h / 2)])
        elif core.area > 0:
            g = core.buffer(r, quad_segs=quad_segs_for(r), join_style="round")
        else:  # degenerate: an obround
            return pad_polygon(Pad(pad.ref, pad.pin, pad.net, pad.x, pad.y, "oval", w, h,
                                   rotation=pad.rotation))
    if pad.rotation % 360:
        g = affinity.rotate(g, pad.rotation, origin=(0, 0))
    return affinity.translate(g, pad.x, pad.y)


def track_polygon(track: Track) -> BaseGeometry:
    """A track as its round-ended, round-joined outline (mm)."""
    r = track.width / 2
    pts = _dedupe(track.points)
    if len(pts) == 1:
        return circle(pts[0][0], pts[0][1], track.width)
    return LineString(pts).buffer(r, quad_segs=quad_segs_for(r))


def zone_polygon(zone: Zone) -> Polygon:
    """A zone as a polygon with holes (mm)."""
    return Polygon(zone.polygon, [h for h in zone.holes])


def zones_from_geometry(net: str | None, layer: str, geom: BaseGeometry,
                        *, min_area: float = 1e-6) -> list[Zone]:
    """Turn a shapely (Multi)Polygon into zones, one per polygon, coordinates at 1 nm.

    Pieces smaller than ``min_area`` (mm^2) are dropped.  Use this to make pours:
    an area minus the other nets' copper grown by the clearance.
    """
    polys: Iterable[Polygon]
    if isinstance(geom, Polygon):
        polys = [geom]
    elif isinstance(geom, MultiPolygon):
        polys = list(geom.geoms)
    else:
        polys = [g for g in getattr(geom, "geoms", []) if isinstance(g, Polygon)]
    out = []
    for p in sorted(polys, key=lambda q: (round(q.bounds[0], 6), round(q.bounds[1], 6))):
        if p.is_empty or p.area < min_area:
            continue
        shell = _ring(p.exterior.coords)
        holes = [_ring(i.coords) for i in p.interiors]
        out.append(Zone(net, layer, shell, [h for h in holes if len(h) >= 3]))
    return out


def place_pads(part: Part, templates: Iterable["PadTemplate"],
               nets: dict[str, str | None]) -> list[Pad]:
    """Pads of ``part`` from footprint ``templates`` placed at the part's position.

    Template offsets are in the part's own frame; the part's rotation (degrees CCW) turns
    them, and a bottom-side part is mirrored about its own y axis first (seen from the top).
    ``nets`` maps pin number -> net.  Coordinates are rounded to 1 nm.
    """
    ca = math.cos(math.radians(part.rotation))
    sa = math.sin(math.radians(part.rotation))
    px, py = part.position
    out = []
    for t in templates:
        dx, dy, rot = t.dx, t.dy, t.rotation
        if part.side == "bottom":
            dx, rot = -dx, -rot
        x = px + dx * ca - dy * sa
        y = py + dx * sa + dy * ca
        layers = "all" if t.drill is not None else part.side
        out.append(Pad(part.ref, t.pin, nets.get(t.pin), round(x, DECIMALS), round(y, DECIMALS),
                       t.shape, t.w, t.h, layers, t.drill, (part.rotation + rot) % 360,
                       t.corner_radius, t.function))
    return out


@dataclass(frozen=True)
class PadTemplate:
    """One pad of a footprint in the part's own frame (mm, degrees CCW)."""

    pin: str
    dx: float
    dy: float
    shape: str = "circle"
    w: float = 1.0
    h: float | None = None
    drill: float | None = None
    rotation: float = 0.0
    corner_radius: float | None = None
    function: str | None = None


def _ring(coords) -> list[Point2]:
    pts = [(round(x, DECIMALS) + 0.0, round(y, DECIMALS) + 0.0) for x, y in coords]
    if len(pts) > 1 and pts[0] == pts[-1]:
        pts = pts[:-1]
    return _dedupe(pts)


def _dedupe(points) -> list[Point2]:
    out: list[Point2] = []
    for p in points:
        q = (float(p[0]), float(p[1]))
        if not out or q != out[-1]:
            out.append(q)
    return out


def hole_polygon(x: float, y: float, d: float) -> Polygon:
    """A drilled hole's footprint (mm)."""
    return circle(x, y, d)


def slot_polygon(slot: Slot) -> BaseGeometry:
    """A routed slot's footprint: its centre line buffered by half the width (mm)."""
    pts = _dedupe(slot.points)
    if len(pts) == 1:
        return circle(pts[0][0], pts[0][1], slot.width)
    r = slot.width / 2
    return LineString(pts).buffer(r, quad_segs=quad_segs_for(r))
