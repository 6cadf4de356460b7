"""Small named boards built directly from shapely geometry (no file readers involved).

Units: millimetres, volts.  Every board here is drawn so that its answers can be worked
out by hand: axis-aligned rectangles whose gaps are differences of coordinates, and
circles whose gaps are centre distance minus radii.
"""
from __future__ import annotations

import math

import shapely
from shapely.geometry import LineString, Point, box

from layoutcheck.model import Board, CopperShape, Hole
from layoutcheck.project import project_from_data

#: quad_segs for test circles: chord sagitta r(1 - cos(pi/(4*256))) < 1 nm for r < 1 mm.
FINE = 256


def rect(x0: float, y0: float, x1: float, y1: float):
    """Axis-aligned rectangle (mm)."""
    return box(x0, y0, x1, y1)


def disc(cx: float, cy: float, d: float):
    """Circle of diameter ``d`` (mm), finely flattened (inscribed, error < 1 nm for d < 2)."""
    return Point(cx, cy).buffer(d / 2.0, quad_segs=FINE)


def htrack(x0: float, x1: float, yc: float, width: float):
    """Horizontal flat-ended track from x0 to x1 centred on y = yc (mm)."""
    return box(x0, yc - width / 2.0, x1, yc + width / 2.0)


def polyline_track(points, width: float):
    """A track drawn as many flat-ended segments (one shape per segment), mm."""
    return [LineString([p, q]).buffer(width / 2.0, cap_style="flat")
            for p, q in zip(points, points[1:])]


def cu(geom, layer: str = "top", net: str | None = None, *, component: str | None = None,
       pin: str | None = None, function: str | None = None, kind: str = "region"):
    """A :class:`CopperShape` with the given attributes."""
    return CopperShape(geometry=geom, layer=layer, net=net, component=component, pin=pin,
                       function=function, kind=kind)


def hole(cx: float, cy: float, d: float, *, plated: bool = True,
         span=("top", "bottom"), net: str | None = None):
    """A round drilled hole of diameter ``d`` (mm)."""
    return Hole(geometry=Point(cx, cy).buffer(d / 2.0, quad_segs=32), diameter=d,
                plated=plated, span=tuple(span), net=net)


def make_board(shapes, holes=(), layers=("top", "bottom"), *, has_net_names: bool = True,
               name: str = "test-board") -> Board:
    """A :class:`Board` with the given shapes, holes and copper layer names."""
    return Board(name=name, copper_layers=list(layers), shapes=list(shapes),
                 holes=list(holes), has_net_names=has_net_names)


def project(voltages: dict | None = None, *, altitude_m: float | None = None,
            coating: str | None = None):
    """A project with ``[voltages]`` and ``[environment]`` as given."""
    data: dict = {"voltages": dict(voltages or {})}
    env = {}
    if altitude_m is not None:
        env["altitude_m"] = altitude_m
    if coating is not None:
        env["coating"] = coating
    if env:
        data["environment"] = env
    return project_from_data(data, None)


# -- named boards ---------------------------------------------------------------------------

def two_tracks(centre_distance: float, width: float = 1.0, layer: str = "top",
               nets=("HV_BUS", "+15V"), length: float = 20.0) -> Board:
    """Two parallel horizontal tracks ``width`` wide, centres ``centre_distance`` apart.

    Gap = centre_distance - width (by hand).
    """
    a = cu(htrack(0.0, length, 0.0, width), layer, nets[0])
    b = cu(htrack(0.0, length, centre_distance, width), layer, nets[1])
    return make_board([a, b], layers=_layers_for(layer), name="two-tracks")


def two_discs(centre_distance: float, d: float = 1.6, layer: str = "top",
              nets=("HV_BUS", "+15V"), pads: bool = False) -> Board:
    """Two round pads (or round copper) of diameter ``d``; gap = centre_distance - d."""
    kw = dict(component="Q1", function="ComponentPad") if pads else {}
    a = cu(disc(0.0, 0.0, d), layer, nets[0], **({**kw, "pin": "1"} if pads else {}))
    b = cu(disc(centre_distance, 0.0, d), layer, nets[1],
           **({**kw, "pin": "2"} if pads else {}))
    return make_board([a, b], layers=_layers_for(layer), name="two-discs")


def pad_near_track(gap: float, layer: str = "top") -> Board:
    """A 2 x 2 mm pad of HV_BUS (pin Q1.1) ``gap`` mm above a 1 mm track of +15V.

    Track spans y = -0.5..0.5 for x = 0..20; pad spans x = 9..11, y = 0.5+gap..2.5+gap.
    """
    track = cu(htrack(0.0, 20.0, 0.0, 1.0), layer, "+15V")
    pad = cu(rect(9.0, 0.5 + gap, 11.0, 2.5 + gap), layer, "HV_BUS", component="Q1",
             pin="1", function="SMDPad")
    return make_board([track, pad], layers=_layers_for(layer), name="pad-near-track")


def two_places(gap: float, separation: float = 30.0) -> Board:
    """HV_BUS comes within ``gap`` of +15V at two spots ``separation`` mm apart.

    +15V is a long track y = -0.5..0.5; HV_BUS is two 2 x 2 mm blocks joined by a track
    far above (y = 20), so it is one net with two close approaches.
    """
    lv = cu(htrack(-5.0, separation + 7.0, 0.0, 1.0), "top", "+15V")
    y0 = 0.5 + gap
    shapes = [lv,
              cu(rect(0.0, y0, 2.0, 21.0), "top", "HV_BUS"),
              cu(rect(separation, y0, separation + 2.0, 21.0), "top", "HV_BUS"),
              cu(rect(0.0, 19.0, separation + 2.0, 21.0), "top", "HV_BUS")]
    return make_board(shapes, name="two-places")


def _layers_for(layer: str):
    if layer in ("top", "bottom"):
        return ("top", "bottom")
    n = int(layer[2:]) if layer.startswith("in") else 1
    return ("top",) + tuple(f"in{i}" for i in range(1, n + 1)) + ("bottom",)


def hand_gap_rects(a, b) -> float:
    """Distance between two axis-aligned rectangles (x0, y0, x1, y1), by hand formula:
    sqrt(dx^2 + dy^2) with dx, dy the gaps along each axis (0 if they overlap)."""
    dx = max(0.0, max(a[0], b[0]) - min(a[2], b[2]))
    dy = max(0.0, max(a[1], b[1]) - min(a[3], b[3]))
    return math.hypot(dx, dy)


def shapely_gap(g1, g2) -> float:
    """shapely's own distance between two independently built geometries (mm)."""
    return float(shapely.distance(g1, g2))


# -- creepage, floating chains, earth (appended) -------------------------------------------

def npth(geom, *, slot: bool = True, width: float | None = None,
         span=("top", "bottom")):
    """A non-plated hole or slot with footprint ``geom`` (mm); ``width`` defaults to the
    footprint's smaller bounding-box side."""
    x0, y0, x1, y1 = geom.bounds
    w = width if width is not None else min(x1 - x0, y1 - y0)
    return Hole(geometry=geom, diameter=w, plated=False, span=tuple(span), is_slot=slot)


def with_outline(board: Board, outline) -> Board:
    """``board`` with its outline set (mm)."""
    board.outline = outline
    return board


def pads_across_slot(slot_width: float, *, rounded: bool = False, nets=("HV_BUS", "GND"),
                     pad_centre_y: float = 3.0) -> Board:
    """Two 1 x 1 mm pads centred at (0, +-pad_centre_y) either side of a 10 mm long slot
    along x centred at the origin, ``slot_width`` wide, on a 40 x 40 mm board.

    ``rounded``: the slot is a routed stadium (ends of radius ``slot_width / 2``, centre line
    from x = -5 + w/2 to 5 - w/2); otherwise a rectangle x = -5..5.  Straight gap between
    the pads: 2 * pad_centre_y - 1 (by hand).
    """
    w = slot_width
    if rounded:
        slot = LineString([(-5 + w / 2, 0), (5 - w / 2, 0)]).buffer(w / 2, quad_segs=FINE)
    else:
        slot = box(-5, -w / 2, 5, w / 2)
    c = pad_centre_y
    shapes = [cu(rect(-0.5, c - 0.5, 0.5, c + 0.5), "top", nets[0]),
              cu(rect(-0.5, -c - 0.5, 0.5, -c + 0.5), "top", nets[1])]
    b = make_board(shapes, [npth(slot, width=w)], name="pads-across-slot")
    return with_outline(b, box(-20, -20, 20, 20))


def islands_between(gaps, widths, *, nets=("HV_BUS", "GND"), layer: str = "top") -> Board:
    """Two 2 x 2 mm blocks of two nets on a row along x with floating islands between:
    block A x = -2..0; then for each island a gap ``gaps[k]`` and an island ``widths[k]``
    wide (y = 0.5..1.5, no net); then a last gap and block B (y = 0..2).  The straight gap
    A-B is sum(gaps) + sum(widths); through the islands it is sum(gaps) (by hand)."""
    shapes = [cu(rect(-2, 0, 0, 2), layer, nets[0])]
    x = 0.0
    for g, w in zip(gaps, widths):
        x += g
        shapes.append(cu(rect(x, 0.5, x + w, 1.5), layer, None))
        x += w
    x += gaps[len(widths)]
    shapes.append(cu(rect(x, 0, x + 2, 2), layer, nets[1]))
    return make_board(shapes, layers=_layers_for(layer), name="islands-between")


def iec_project(voltages: dict | None = None, *, standard: str = "iec60664-1",
                pollution_degree: int | None = None, earth: dict | None = None,
                insulation: list | None = None, altitude_m: float | None = None):
    """A project under IEC 60664-1 (or ``"both"``) with optional ``[earth]`` and
    ``[[insulation]]`` tables."""
    env: dict = {"standard": standard}
    if pollution_degree is not None:
        env["pollution_degree"] = pollution_degree
    if altitude_m is not None:
        env["altitude_m"] = altitude_m
    data: dict = {"voltages": dict(voltages or {}), "environment": env}
    if earth is not None:
        data["earth"] = dict(earth)
    if insulation is not None:
        data["insulation"] = list(insulation)
    return project_from_data(data, None)


class FixedRules:
    """A requirement source with fixed distances (mm), for geometry tests that must not
    depend on table values: same clearance and creepage for every pair and voltage."""

    def __init__(self, creepage_mm: float, clearance_mm: float | None = None):
        self.creepage_mm = creepage_mm
        self.clearance_mm = clearance_mm if clearance_mm is not None else creepage_mm
        self.calls: list[tuple] = []

    def get(self, kind, volts, outer=True, termination=False):
        from layoutcheck.physics.requirements import Requirement
        self.calls.append((kind, volts, outer, termination))
        return Requirement(self.clearance_mm, self.creepage_mm,
                           (f"fixed test requirement ({kind})",), "test", "test")

    def reach(self, volts, what, outer=True):
        return getattr(self.get("functional", volts, outer), what)


def corner_path(p, c, r, end_angle):
    """Hand formula for a path leaving point ``p`` tangent to the circle (centre ``c``,
    radius ``r``, mm) and following the arc clockwise to ``end_angle`` (radians):
    returns (tangent length, arc length), both mm (Pythagoras, and r * angle)."""
    d = math.dist(p, c)
    t = math.sqrt(d * d - r * r)
    start = math.atan2(p[1] - c[1], p[0] - c[0]) - math.acos(r / d)
    return t, r * (start - end_angle)


def around_rect_slot_end(pad_corner, slot_half_length, slot_half_width, x_mm):
    """Hand length (mm) of the path from ``pad_corner`` (upper pad, right of the slot's
    centre line) around the right end of a rectangular slot to the mirror-image pad below:
    the opening by X rounds the slot's corners to r = X/2, so the path is tangent leg +
    corner arc + the flat end (2 * half width - 2r) + arc + leg (symmetric about y = 0)."""
    r = x_mm / 2.0
    c = (slot_half_length - r, slot_half_width - r)
    t, arc = corner_path(pad_corner, c, r, 0.0)
    return 2 * (t + arc) + (2 * slot_half_width - 2 * r)


# -- parts and half-bridge legs (power-loop rule; appended) ---------------------------------

def part_pad(ref: str, pin: str, x: float, y: float, net: str | None, *, size: float = 2.0,
             layer: str = "top", function: str = "SMDPad"):
    """A square pad ``size`` mm wide of part ``ref``, pad ``pin``, centred on (x, y) mm."""
    h = size / 2.0
    return cu(rect(x - h, y - h, x + h, y + h), layer, net, component=ref, pin=pin,
              function=function)


def segment_track(p, q, width: float, net: str, layer: str = "top"):
    """A straight flat-ended track of ``width`` mm from point ``p`` to ``q`` (mm)."""
    return cu(LineString([p, q]).buffer(width / 2.0, cap_style="flat"), layer, net)


def add_components(board: Board, *, packages: dict | None = None, names: dict | None = None,
                   properties: dict | None = None) -> Board:
    """Fill ``board.components`` from its pads: one part per reference, each pin at its
    pad's centroid (mm) with the pad's net and layer.  ``packages``: ref -> package name;
    ``names``: (ref, pin) -> pin name; ``properties``: ref -> dict."""
    from layoutcheck.model import Component, Pin
    packages, names, properties = packages or {}, names or {}, properties or {}
    for s in board.shapes:
        if s.component is None or s.pin is None:
            continue
        comp = board.components.setdefault(s.component, Component(s.component))
        comp.package = packages.get(s.component)
        comp.properties = dict(properties.get(s.component, {}))
        c = s.geometry.centroid
        comp.pins[s.pin] = Pin(s.pin, names.get((s.component, s.pin)), s.net, (c.x, c.y),
                               s.layer)
    return board


def half_bridge(width: float = 30.0, height: float = 20.0, *, track_w: float = 2.0,
                capacitor: bool = True, names: dict | None = None,
                packages: dict | None = None, q_pins=("1", "2", "3"),
                properties: dict | None = None) -> Board:
    """One half-bridge leg drawn as a ``width`` x ``height`` mm rectangle on the top layer.

    Left edge: capacitor C3 with pad 1 (HV_BUS) at (0, height) and pad 2 (HV_RTN) at (0, 0).
    Right edge: high switch Q1 with its drain pad at (width, height) and source pad 6 mm
    below; low switch Q2 with its drain pad at (width, 6) and source pad at (width, 0);
    gate pads 5 mm to the right of each drain/source pair.  ``q_pins`` gives the pad
    numbers of gate, drain and source (default the common 1 G, 2 D, 3 S).  Tracks
    ``track_w`` wide along the centre lines: HV_BUS along the top edge, SW_A between Q1's
    source and Q2's drain, HV_RTN along the bottom edge.  Every pad is a 2 mm square.
    By hand: the loop C3.1 -> Q1 D -> Q1 S -> Q2 D -> Q2 S -> C3.2 runs round the
    rectangle, enclosing ``width * height`` mm^2 with a perimeter of
    ``2 * (width + height)`` mm.
    """
    W, H = width, height
    g, d, s = q_pins
    shapes = [
        part_pad("Q1", d, W, H, "HV_BUS"), part_pad("Q1", s, W, H - 6, "SW_A"),
        part_pad("Q1", g, W + 5, H - 3, "G_Q1"),
        part_pad("Q2", d, W, 6, "SW_A"), part_pad("Q2", s, W, 0, "HV_RTN"),
        part_pad("Q2", g, W + 5, 3, "G_Q2"),
        segment_track((0, H), (W, H), track_w, "HV_BUS"),
        segment_track((W, H - 6), (W, 6), track_w, "SW_A"),
        segment_track((W, 0), (0, 0), track_w, "HV_RTN"),
    ]
    if capacitor:
        shapes += [part_pad("C3", "1", 0, H, "HV_BUS"), part_pad("C3", "2", 0, 0, "HV_RTN")]
    board = make_board(shapes, name="half-bridge")
    return add_components(board, packages=packages, names=names, properties=properties)


class StraightPaths:
    """A stand-in current-path provider: the copper between two pads is one straight round
    conductor of diameter ``diameter`` mm from pad centre to pad centre, on the start's
    layer (top when not given).  ``copper_z``: top copper's mid-plane at 1.5825 mm, bottom
    at 0.0175 mm (a 1.6 mm board with 35 um copper).  Records its calls."""

    def __init__(self, diameter: float = 0.8, shape: str = "round"):
        self.diameter = diameter
        self.shape = shape
        self.calls: list = []

    def copper_z(self, board):
        return {"top": 1.6 - 0.0175, "bottom": 0.0175}

    def current_path(self, board, graph, net, start, end):
        from types import SimpleNamespace

        from layoutcheck.physics.inductance import Segment
        self.calls.append((net, start, end))
        layer = start[2] or end[2] or "top"
        z = self.copper_z(board)[layer]
        a, b = (start[0], start[1], z), (end[0], end[1], z)
        piece = SimpleNamespace(start=a, end=b, layer=layer, width=self.diameter,
                                thickness=self.diameter, kind="trace")
        seg = Segment(a, b, self.diameter, self.diameter, self.shape)
        return SimpleNamespace(net=net, pieces=[piece], length_mm=math.dist(a, b),
                               segments=lambda: [seg],
                               points=lambda: [(a[0], a[1], layer), (b[0], b[1], layer)])
