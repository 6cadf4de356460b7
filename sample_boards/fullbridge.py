"""Invented demo scenario: a full-bridge inverter stage for a 340-400 V DC bus.

Invented demo data: no real product, part number or brand.  Two revisions of one 2-layer,
1.6 mm, 35 um board of 120 x 90 mm (origin at the lower-left corner, y up, millimetres):

* ``build("a")`` - rev-a, with four planted spacing problems (see PLANTED below and
  README.md) and film capacitor C5 about 40 mm away from leg A (a large commutation loop);
* ``build("b")`` - rev-b, every problem fixed and C5 tight against Q1/Q2 with the bus return
  poured on the bottom layer directly under the HV_BUS top copper.

Circuit (nets in capitals):
  J1 (bus in): 1 HV_BUS, 2 HV_RTN.  J2 (bridge out): 1 OUT_A = SW_A, 2 OUT_B = SW_B.
  J3 (logic, 2.54 mm): 1 +15V, 2 +5V, 3 IN_A, 4 IN_B, 5 GND.
  C1 (HV_BUS-MID) and C2 (MID-HV_RTN): series bus electrolytics; R1, R2 balancing/bleed.
  C5 / C6: film capacitors HV_BUS-HV_RTN for leg A / leg B.
  Q1..Q4 (TO-247 style, 1 G, 2 D, 3 S): Q1 high A, Q2 low A, Q3 high B, Q4 low B.
  U1 / U2: bootstrap half-bridge drivers in a 16-position wide-body small-outline package
  with 8 pins fitted (positions 6-13 empty): 1 VCC, 2 HIN, 3 LIN, 4 COM, 5 LO, 14 VS,
  15 HO, 16 VB.  U1: HIN = IN_A (Q1), LIN = IN_B (Q2); U2: HIN = IN_B (Q3), LIN = IN_A
  (Q4), so IN_A turns on the diagonal Q1+Q4 and IN_B the diagonal Q3+Q2.
  D1/D2 bootstrap diodes (+15V -> VB_A/VB_B), C3/C4 bootstrap capacitors (VB_x - SW_x),
  C7/C8 driver decoupling (+15V-GND), C9 +5V decoupling, R3..R6 gate resistors
  (HO_A -> G_Q1, LO_A -> G_Q2, HO_B -> G_Q3, LO_B -> G_Q4).
  Ground: the bus return is HV_RTN; the logic/driver ground is GND.  In this non-isolated
  bootstrap stage they are one node, joined by the 0-ohm resistor R7 (bottom side, below
  leg A), so a netlist keeps the two names apart and the single tie point is explicit.

Drawing conventions: power nets are top-layer pours (HV_BUS) and a bottom-layer pour
(HV_RTN) computed here with shapely as "area minus other copper grown by the clearance";
logic rails run on the bottom layer; the switch nodes leave the legs through vias and run
to J2 on the bottom layer.

Voltage model: the project file text :data:`PROJECT_TEXT` (written beside the fab files as
``layoutcheck.toml``) is the one source of the node voltages.  SW_x swings 0..400 V, and
VB_x, HO_x and the high-side gate net are declared relative to it (``{ on = "SW_A",
volts = 15 }``), so between two nets riding on one switch node the working voltage is at
most 15 V.  :func:`spacing_violations` takes the working voltage of every pair from
``layoutcheck.project.Project.working_voltage`` on that text.
"""
from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass

import shapely
from shapely.geometry import Polygon, box
from shapely.ops import unary_union

from layoutcheck.project import project_from_data
from layoutcheck.writers.design import (Design, NonPlatedHole, PadTemplate, Part, Slot,
                                        Track, Via, place_pads, track_polygon,
                                        zones_from_geometry)

BOARD_W, BOARD_H = 120.0, 90.0

#: Later creepage work: set this to a Slot to cut a non-plated slot into rev-b's 3.05 mm
#: gap between the HV_BUS bus bar (lower edge y = 46.0) and the +5V run (upper edge
#: y = 42.95), e.g. ``Slot([(9.0, 44.475), (20.0, 44.475)], 1.0)``.
CREEPAGE_SLOT: Slot | None = None

# --------------------------------------------------------------------------- voltages
#: The project file of both revisions (``layoutcheck.toml``), and the voltage model the
#: self-check uses.  Volts.
PROJECT_TEXT = """\
# layoutcheck project file for the invented full-bridge demo board (revisions a and b).
# Invented demo data; see ../README.md.

[board]
# The fab files sit beside this file: Gerber X2 copper/profile and NC drill (PTH, NPTH).
files = "."

[voltages]
# Volts.  A number is a fixed node, "lo..hi" a node that swings between the two, and
# { on = "<net>", volts = ... } a node that rides on another net, that much above it.
"HV_BUS" = 400
"HV_RTN" = 0
"GND" = 0                 # logic/driver ground, tied to HV_RTN by the 0-ohm R7
"MID" = "170..200"        # midpoint of the series bus capacitors C1/C2
"SW_*" = "0..400"         # bridge switch nodes (J2 outputs)
"VB_A" = { on = "SW_A", volts = 15 }        # bootstrap supply of leg A (C3)
"HO_A" = { on = "SW_A", volts = "0..15" }   # high-side driver output of leg A
"G_Q1" = { on = "SW_A", volts = "0..15" }   # Q1 gate, after R3
"VB_B" = { on = "SW_B", volts = 15 }        # bootstrap supply of leg B (C4)
"HO_B" = { on = "SW_B", volts = "0..15" }   # high-side driver output of leg B
"G_Q3" = { on = "SW_B", volts = "0..15" }   # Q3 gate, after R5
"+15V" = 15
"+5V" = 5
"*" = "0..15"             # every other net: logic inputs, low-side gate drive

[environment]
altitude_m = 0
coating = "none"
"""

#: :data:`PROJECT_TEXT` loaded by the package's own project reader.
PROJECT = project_from_data(tomllib.loads(PROJECT_TEXT), None)


def working_voltage(a: str, b: str) -> float:
    """Largest voltage (V) between nets ``a`` and ``b``, from :data:`PROJECT_TEXT`."""
    return PROJECT.working_voltage(a, b)


def target_gap(v: float) -> float:
    """The spacing (mm) this design keeps for working voltage ``v`` (V).

    Comfortably above IPC-2221B Table 6-1 columns B2 (external conductors) and A6
    (component terminations), uncoated, sea level to 3050 m (values from memory):
    301-500 V -> B2 2.5 mm, A6 1.5 mm, we keep 3.0; 151-300 V -> B2 1.25 mm, A6 0.8 mm,
    we keep 1.5; 31-150 V -> B2 0.6 mm, A6 0.4-0.8 mm, we keep 1.0; 30 V and lower ->
    B2 0.1 mm, A6 0.25 mm at most, we keep 0.5 (the drivers' neighbouring pins, 1.27 mm
    pitch with 0.6 mm pads, are 0.67 mm apart).
    """
    if v > 300:
        return 3.0
    if v > 150:
        return 1.5
    if v > 30:
        return 1.0
    return 0.5


#: Pours keep this much more than :func:`target_gap` (mm), so flattened arcs never eat
#: into the target.
POUR_MARGIN = 0.04

# --------------------------------------------------------------------------- footprints
def _two_pin(pitch: float, pad: float, drill: float | None, *, square1: bool = False,
             shape: str = "circle", h: float | None = None) -> list[PadTemplate]:
    s1 = "rect" if square1 else shape
    return [PadTemplate("1", -pitch / 2, 0.0, s1, pad, h, drill),
            PadTemplate("2", pitch / 2, 0.0, shape, pad, h, drill)]


SMD_1206 = [PadTemplate("1", -1.6, 0.0, "roundrect", 1.0, 1.6, corner_radius=0.25),
            PadTemplate("2", 1.6, 0.0, "roundrect", 1.0, 1.6, corner_radius=0.25)]
TO247 = [PadTemplate(str(i + 1), (i - 1) * 5.45, 0.0, "oval", 2.4, 3.2, 1.4) for i in range(3)]
#: The drivers' pin numbers (package positions) and names.
DRIVER_PINS = {"1": "VCC", "2": "HIN", "3": "LIN", "4": "COM", "5": "LO", "14": "VS",
               "15": "HO", "16": "VB"}


def _wide_so16(fitted) -> list[PadTemplate]:
    """An invented 16-position wide-body small-outline footprint with only ``fitted``
    positions populated (mm, part frame).

    Pad rows at x = -4.65 (positions 1..8, top to bottom) and x = +4.65 (positions 9..16,
    bottom to top), pitch 1.27 mm, pads 2.0 x 0.6 mm.  Leaving positions out between the
    low-side and the high-side pins is how high-voltage half-bridge drivers keep their
    floating pins away from the rest (common practice).
    """
    out = []
    for pin in fitted:
        n = int(pin)
        x, y = (-4.65, 4.445 - 1.27 * (n - 1)) if n <= 8 else (4.65, -4.445 + 1.27 * (n - 9))
        out.append(PadTemplate(pin, x, round(y, 6), "rect", 2.0, 0.6))
    return out


DRIVER_FOOTPRINT = _wide_so16(DRIVER_PINS)


def _header(n: int, pitch: float = 2.54) -> list[PadTemplate]:
    return [PadTemplate(str(i + 1), i * pitch, 0.0, "rect" if i == 0 else "circle", 1.7,
                        None, 1.0) for i in range(n)]


# --------------------------------------------------------------------------- builder
class _Board:
    def __init__(self, name: str):
        self.d = Design(name, [(0.0, 0.0), (BOARD_W, 0.0), (BOARD_W, BOARD_H), (0.0, BOARD_H)],
                        copper_layers=2, thickness_mm=1.6, copper_um=35.0)

    def part(self, ref, kind, value, package, templates, nets, *, at, rotation=0.0,
             side="top", pins=None, **props):
        part = Part(ref, kind, value, package, pins or {t.pin: "" for t in templates},
                    (round(at[0], 6), round(at[1], 6)), rotation % 360, side, dict(props))
        self.d.parts.append(part)
        self.d.pads += place_pads(part, templates, nets)
        return part

    def two(self, ref, kind, value, package, p1, p2, nets, *, pad, drill=None,
            square1=False, shape="circle", h=None, side="top", pins=None, **props):
        """A two-terminal part whose pin 1 lands on ``p1`` and pin 2 on ``p2``."""
        dx, dy = p2[0] - p1[0], p2[1] - p1[1]
        pitch = math.hypot(dx, dy)
        rot = math.degrees(math.atan2(dy, dx))
        if side == "bottom":
            rot = rot + 180.0
        mid = ((p1[0] + p2[0]) / 2, (p1[1] + p2[1]) / 2)
        if drill is None and shape == "roundrect":
            tpl = [PadTemplate("1", -pitch / 2, 0, "roundrect", pad, h, corner_radius=0.25),
                   PadTemplate("2", pitch / 2, 0, "roundrect", pad, h, corner_radius=0.25)]
        else:
            tpl = _two_pin(pitch, pad, drill, square1=square1, shape=shape, h=h)
        return self.part(ref, kind, value, package, tpl, {"1": nets[0], "2": nets[1]},
                         at=mid, rotation=rot, side=side, pins=pins, **props)

    def smd(self, ref, kind, value, p1, p2, nets, side="top", **props):
        return self.two(ref, kind, value, "1206", p1, p2, nets, pad=1.0, h=1.6,
                        shape="roundrect", side=side, **props)

    def track(self, net, layer, width, *points):
        self.d.tracks.append(Track(net, layer, width, [tuple(map(float, p)) for p in points]))

    def via(self, net, x, y, pad=0.7, drill=0.35):
        self.d.vias.append(Via(net, x, y, pad, drill))


def _nets_seen(d: Design, layer: str):
    return [p for p in d.copper() if p.layer == layer]


def pour(d: Design, net: str, layer: str, region, *, extra_cuts=(), ignore_nets=()) -> list:
    """Zones for ``net`` on ``layer``: ``region`` minus every other net's copper grown by
    :func:`target_gap` + :data:`POUR_MARGIN` (mm), minus ``extra_cuts`` (geometry,
    clearance) pairs; islands that touch no copper of ``net`` are dropped.
    """
    cuts, own = [], []
    for piece in _nets_seen(d, layer):
        if piece.net == net:
            own.append(piece.geometry)
            continue
        if piece.net in ignore_nets:
            continue
        c = target_gap(working_voltage(net, piece.net or "")) + POUR_MARGIN
        cuts.append(piece.geometry.buffer(c, quad_segs=16))
    for h in d.holes:
        cuts.append(shapely.Point(h.x, h.y).buffer(h.d / 2 + 1.0, quad_segs=16))
    for geom, c in extra_cuts:
        cuts.append(geom.buffer(c, quad_segs=16))
    area = region.difference(unary_union(cuts))
    area = area.simplify(0.002, preserve_topology=True)
    own_u = unary_union(own) if own else Polygon()
    polys = [g for g in getattr(area, "geoms", [area]) if isinstance(g, Polygon)]
    keep = [g for g in polys if g.intersects(own_u) and g.area > 0.5]
    return zones_from_geometry(net, layer, unary_union(keep) if keep else Polygon())


def build(rev: str) -> Design:
    """The full-bridge sample board, revision ``"a"`` (planted problems) or ``"b"`` (fixed).

    Units: millimetres.
    """
    if rev not in ("a", "b"):
        raise ValueError(f"revision must be 'a' or 'b', got {rev!r}")
    a = rev == "a"
    b = _Board(f"fullbridge-rev-{rev}")
    d = b.d
    d.notes = ["Invented demo data: full-bridge stage, 340-400 V DC bus.",
               f"Revision {rev}; see sample_boards/README.md."]

    # Mounting holes, non-plated 3.2 mm, one per corner.
    for x, y in ((4.0, 4.0), (116.0, 4.0), (4.0, 86.0), (116.0, 86.0)):
        d.holes.append(NonPlatedHole(x, y, 3.2))

    # ---- connectors
    # Planted problem 3 (rev-a): J1 on a 5.0 mm pitch with 4.0 mm pads -> 1.0 mm pad gap.
    j1_pitch, j1_pad = (5.0, 4.0) if a else (7.5, 3.0)
    b.two("J1", "connector", "2-way screw terminal, 600 V", f"TERMINAL-2P-{j1_pitch}",
          (7.0, 50.5), (7.0, 50.5 + j1_pitch), ("HV_BUS", "HV_RTN"), pad=j1_pad, drill=1.5,
          square1=True, pins={"1": "HV_BUS", "2": "HV_RTN"}, rating_v=600)
    b.two("J2", "connector", "2-way screw terminal, 600 V", "TERMINAL-2P-7.5",
          (113.0, 42.5), (113.0, 50.0), ("SW_A", "SW_B"), pad=3.0, drill=1.5, square1=True,
          pins={"1": "OUT_A", "2": "OUT_B"}, rating_v=600)
    b.part("J3", "connector", "5-way pin header", "HEADER-1X5-2.54", _header(5),
           {"1": "+15V", "2": "+5V", "3": "IN_A", "4": "IN_B", "5": "GND"},
           at=(6.0, 30.0), rotation=90,
           pins={"1": "+15V", "2": "+5V", "3": "IN_A", "4": "IN_B", "5": "GND"})

    # ---- bus capacitors and balancing resistors
    b.two("C1", "capacitor", "220 uF 250 V electrolytic", "RADIAL-D16-P7.5", (22.0, 50.5),
          (22.0, 58.0), ("HV_BUS", "MID"), pad=2.6, drill=1.3, square1=True,
          pins={"1": "+", "2": "-"}, capacitance_f=220e-6, rating_v=250)
    b.two("C2", "capacitor", "220 uF 250 V electrolytic", "RADIAL-D16-P7.5", (22.0, 65.5),
          (22.0, 73.0), ("MID", "HV_RTN"), pad=2.6, drill=1.3, square1=True,
          pins={"1": "+", "2": "-"}, capacitance_f=220e-6, rating_v=250)
    b.two("R1", "resistor", "220 kOhm 0.6 W", "AXIAL-P15.24", (28.5, 80.74), (28.5, 65.5),
          ("HV_BUS", "MID"), pad=2.0, drill=1.0, resistance_ohm=220e3, rating_v=350)
    b.two("R2", "resistor", "220 kOhm 0.6 W", "AXIAL-P15.24", (34.0, 65.5), (34.0, 80.74),
          ("MID", "HV_RTN"), pad=2.0, drill=1.0, resistance_ohm=220e3, rating_v=350)
    b.track("MID", "top", 1.0, (22.0, 58.0), (22.0, 65.5), (34.0, 65.5))

    # ---- film capacitors
    if a:   # C5 ~40 mm from leg A, in the upper-left corner: large commutation loop.
        c5 = ((10.0, 84.5), (10.0, 77.0))
    else:   # C5 right between Q1 (D) and Q2 (S): small loop.
        c5 = ((48.0, 67.5), (48.0, 60.0))
    b.two("C5", "capacitor", "1 uF 630 V film", "BOX-P7.5", c5[0], c5[1],
          ("HV_BUS", "HV_RTN"), pad=2.2, drill=1.0, capacitance_f=1e-6, rating_v=630)
    b.two("C6", "capacitor", "1 uF 630 V film", "BOX-P7.5", (84.0, 67.5), (84.0, 60.0),
          ("HV_BUS", "HV_RTN"), pad=2.2, drill=1.0, capacitance_f=1e-6, rating_v=630)

    # ---- the two legs (leg B = leg A moved 36 mm right)
    for leg, dx, qh, ql, sw, gh, gl in (("A", 0.0, "Q1", "Q2", "SW_A", "G_Q1", "G_Q2"),
                                         ("B", 36.0, "Q3", "Q4", "SW_B", "G_Q3", "G_Q4")):
        b.part(qh, "mosfet", "650 V 40 mOhm N-channel MOSFET", "TO-247-3", TO247,
               {"1": gh, "2": "HV_BUS", "3": sw}, at=(48.0 + dx, 72.0),
               pins={"1": "G", "2": "D", "3": "S"}, vds_v=650, rds_on_ohm=0.04)
        b.part(ql, "mosfet", "650 V 40 mOhm N-channel MOSFET", "TO-247-3", TO247,
               {"1": gl, "2": sw, "3": "HV_RTN"}, at=(53.45 + dx, 56.0), rotation=180,
               pins={"1": "G", "2": "D", "3": "S"}, vds_v=650, rds_on_ohm=0.04)
        # HV_BUS neck from the drain up into the top pour; switch-node column.
        b.track("HV_BUS", "top", 2.0, (48.0 + dx, 72.0), (48.0 + dx, 78.0))
        b.track(sw, "top", 2.4, (53.45 + dx, 72.0), (53.45 + dx, 42.5))

    # Film capacitor of leg B (both revisions) and of leg A (rev-b) wired to the legs.
    b.track("HV_BUS", "top", 1.6, (84.0, 72.0), (84.0, 67.5))
    b.track("HV_RTN", "top", 1.6, (84.0, 60.0), (84.0, 56.0))
    if not a:
        b.track("HV_BUS", "top", 1.6, (48.0, 72.0), (48.0, 67.5))
        b.track("HV_RTN", "top", 1.6, (48.0, 60.0), (48.0, 56.0))

    # Switch nodes to J2 on the bottom layer.
    for y in (42.5, 44.7, 46.9):
        b.via("SW_A", 53.45, y, pad=1.6, drill=0.8)
    for y in (49.6, 51.8):
        b.via("SW_B", 89.45, y, pad=1.6, drill=0.8)
    b.track("SW_A", "bottom", 3.0, (53.45, 42.5), (113.0, 42.5))
    b.track("SW_B", "bottom", 3.0, (89.45, 49.6), (113.0, 49.6))

    # ---- drivers and their surroundings (leg B = leg A + 36 mm)
    for leg, dx in (("A", 0.0), ("B", 36.0)):
        u, c_boot, d_boot, c_dec, r_hi, r_lo = (("U1", "C3", "D1", "C7", "R3", "R4")
                                                if leg == "A" else
                                                ("U2", "C4", "D2", "C8", "R5", "R6"))
        sw, vb, ho, lo = f"SW_{leg}", f"VB_{leg}", f"HO_{leg}", f"LO_{leg}"
        gh, gl = ("G_Q1", "G_Q2") if leg == "A" else ("G_Q3", "G_Q4")
        hin, lin = ("IN_A", "IN_B") if leg == "A" else ("IN_B", "IN_A")
        # The driver, turned 90 degrees: the high-side row (16 VB, 15 HO, 14 VS) faces the
        # power stage at y = cy + 4.65, the logic row (1 VCC .. 5 LO) faces the rails at
        # y = cy - 4.65; 7.3 mm of bare board between the rows.
        cx, cy = 55.355 + dx, 27.05
        b.part(u, "driver", "600 V bootstrap half-bridge gate driver",
               "SO-16W, 8 of 16 positions fitted", DRIVER_FOOTPRINT,
               {"1": "+15V", "2": hin, "3": lin, "4": "GND", "5": lo, "14": sw, "15": ho,
                "16": vb}, at=(cx, cy), rotation=90, pins=dict(DRIVER_PINS),
               offset_rating_v=600)
        pitch = 1.27
        x_vb, x_ho, x_vs = (round(cx - 4.445 + k * pitch, 6) for k in range(3))
        x_vcc, x_hin, x_lin, x_com, x_lo = (round(cx - 4.445 + k * pitch, 6)
                                            for k in range(5))
        top, bot = round(cy + 4.65, 6), round(cy - 4.65, 6)
        # Bootstrap capacitor straddles the HO pin; HO leaves between its pads.
        b.smd(c_boot, "capacitor", "1 uF 50 V", (x_ho - 1.6, 35.5), (x_ho + 1.6, 35.5),
              (vb, sw), capacitance_f=1e-6, rating_v=50)
        b.track(vb, "top", 0.5, (x_vb, top), (x_vb, 34.2), (x_ho - 1.6, 35.5))
        b.track(sw, "top", 0.5, (x_vs, top), (x_vs, 34.2), (x_ho + 1.6, 35.5))
        b.track(sw, "top", 0.6, (x_vs, 42.5), (x_vs, 36.8), (x_ho + 1.6, 35.5))
        # Bootstrap diode, cathode (pin 1) to VB.
        b.two(d_boot, "diode", "1 A 600 V ultrafast rectifier", "AXIAL-P10.16",
              (44.0 + dx, 35.5), (33.84 + dx, 35.5), (vb, "+15V"), pad=2.0, drill=1.0,
              square1=True, pins={"1": "K", "2": "A"}, rating_v=600)
        b.track(vb, "top", 0.5, (x_ho - 1.6, 35.5), (44.0 + dx, 35.5))
        # High-side gate: HO -> R (x = 43) -> G of the high-side MOSFET.
        b.track(ho, "top", 0.4, (x_ho, top), (x_ho, 38.0), (43.0 + dx, 38.0), (43.0 + dx, 44.4))
        b.smd(r_hi, "resistor", "10 Ohm", (43.0 + dx, 44.4), (43.0 + dx, 47.6), (ho, gh),
              resistance_ohm=10.0)
        b.track(gh, "top", 0.5, (43.0 + dx, 47.6), (43.0 + dx, 70.2), (42.55 + dx, 72.0))
        # Low-side gate: LO leaves along its row through the empty positions 6-8, then
        # runs up the right of the driver at x = 58.9 to R.
        if a and leg == "A":
            # Planted problem 2 (rev-a): above the driver LO_A jogs left to x = 55.68
            # (y 35.4-40), 1.2 mm from the SW_A pad of C3 (x <= 54.28), then back to R4.
            b.track(lo, "top", 0.4, (x_lo, bot), (58.9, bot), (58.9, 35.4), (55.68, 35.4),
                    (55.68, 40.0), (58.9, 40.0), (58.9, 44.4))
        else:
            b.track(lo, "top", 0.4, (x_lo, bot), (58.9 + dx, bot), (58.9 + dx, 44.4))
        b.smd(r_lo, "resistor", "10 Ohm", (58.9 + dx, 44.4), (58.9 + dx, 47.6), (lo, gl),
              resistance_ohm=10.0)
        b.track(gl, "top", 0.5, (58.9 + dx, 47.6), (58.9 + dx, 56.0))
        # Logic side of the driver: pins go down to vias on the bottom-layer rails.
        rails = {"+15V": 12.38, "IN_A": 14.92, "IN_B": 17.46, "GND": 20.0}
        for x, net in ((x_vcc, "+15V"), (x_hin, hin), (x_lin, lin), (x_com, "GND")):
            b.track(net, "top", 0.4, (x, bot), (x, rails[net]))
            b.via(net, x, rails[net])
        # Decoupling right of the logic pins, below LO.
        b.smd(c_dec, "capacitor", "1 uF 50 V", (57.5 + dx, 16.8), (57.5 + dx, 20.0),
              ("+15V", "GND"), capacitance_f=1e-6, rating_v=50)
        b.track("GND", "top", 0.4, (57.5 + dx, 20.0), (x_com, 20.0))
        b.track("+15V", "top", 0.5, (57.5 + dx, 16.8), (57.5 + dx, 12.38))
        b.via("+15V", 57.5 + dx, 12.38)

    # +15V to the bootstrap diode anodes.
    if a:
        # Planted problem 1 (rev-a): D1's anode fed on the top layer from J3 pin 1; the last
        # run passes 1.0 mm below the HV_BUS bus bar (x 21.5..25.0, y 45.0 vs 46.0).
        planted_15v = [(6.0, 30.0), (21.5, 30.0), (21.5, 44.75), (33.84, 44.75),
                       (33.84, 35.5)]
    else:
        planted_15v = None
        b.via("+15V", 33.84, 12.38)
        b.track("+15V", "top", 0.5, (33.84, 12.38), (33.84, 35.5))
    b.via("+15V", 69.84, 12.38)
    b.track("+15V", "top", 0.5, (69.84, 12.38), (69.84, 35.5))

    # Logic rails on the bottom layer, fanned out of J3 as a staircase.
    b.track("+15V", "bottom", 0.6, (6.0, 30.0), (8.0, 30.0), (8.0, 12.38), (93.5, 12.38))
    b.track("IN_A", "bottom", 0.4, (6.0, 35.08), (10.0, 35.08), (10.0, 14.92), (89.45, 14.92))
    b.track("IN_B", "bottom", 0.4, (6.0, 37.62), (12.0, 37.62), (12.0, 17.46), (88.18, 17.46))
    b.track("GND", "bottom", 0.6, (6.0, 40.16), (14.0, 40.16), (14.0, 20.0), (90.72, 20.0))

    # +5V: from J3 pin 2 up and along the bus bar (3.05 mm gap) to its decoupling C9.
    b.track("+5V", "top", 0.8, (6.0, 32.54), (9.5, 32.54), (9.5, 42.55), (19.0, 42.55),
            (19.0, 40.1))
    b.smd("C9", "capacitor", "100 nF 50 V", (19.0, 40.1), (19.0, 36.9), ("+5V", "GND"),
          capacitance_f=100e-9, rating_v=50)
    b.track("GND", "top", 0.5, (19.0, 36.9), (19.0, 35.2))
    b.via("GND", 19.0, 35.2)
    b.track("GND", "bottom", 0.5, (19.0, 35.2), (19.0, 20.0))

    # GND-HV_RTN tie: 0-ohm R7 on the bottom side below leg A.
    b.smd("R7", "resistor", "0 Ohm (GND to HV_RTN tie)", (39.0, 48.4), (39.0, 51.6),
          ("GND", "HV_RTN"), side="bottom", resistance_ohm=0.0)
    b.track("GND", "bottom", 0.6, (39.0, 20.0), (39.0, 48.4))

    # ---- planted problem 4 (rev-a): a bottom-layer HV_BUS track doubling the C5 feed
    # (C5+ -> R1 pin 1) with the HV_RTN pour only 0.8 mm away.
    bottom_bus = None
    if a:
        bottom_bus = Track("HV_BUS", "bottom", 2.0, [(10.0, 84.5), (28.5, 84.5), (28.5, 80.74)])
        d.tracks.append(bottom_bus)

    # ---- pours (made before the planted +15V track of rev-a is added, as a board whose
    # pour was not refilled after that track went in)
    hv_bus_region = unary_union([box(3.5, 46.0, 25.0, 53.5),      # bus bar J1 -> C1
                                 box(14.3, 46.0, 16.9, 88.0),     # column up the left side
                                 box(3.5, 77.0, 106.0, 88.0)])    # strip over the legs
    hv_rtn_region = box(3.5, 51.0, 106.0, 88.0)
    d.zones += pour(d, "HV_BUS", "top", hv_bus_region)
    if bottom_bus is not None:
        d.zones += pour(d, "HV_RTN", "bottom", hv_rtn_region, ignore_nets=("HV_BUS",),
                        extra_cuts=[(track_polygon(bottom_bus), 0.8)]
                        + _bus_pad_cuts(d, "bottom"))
    else:
        d.zones += pour(d, "HV_RTN", "bottom", hv_rtn_region)

    if planted_15v:
        b.track("+15V", "top", 0.5, *planted_15v)
    if not a and CREEPAGE_SLOT is not None:
        d.slots.append(CREEPAGE_SLOT)
    d.validate()
    return d


def _bus_pad_cuts(d: Design, layer: str):
    """HV_BUS pads and vias on ``layer`` with the normal pour clearance (rev-a helper)."""
    c = target_gap(working_voltage("HV_RTN", "HV_BUS")) + POUR_MARGIN
    return [(p.geometry, c) for p in d.copper()
            if p.layer == layer and p.net == "HV_BUS" and p.kind in ("pad", "via")]


# --------------------------------------------------------------------------- checking
@dataclass
class Violation:
    """Two copper features of different nets closer than :func:`target_gap` (mm, V)."""

    layer: str
    nets: tuple[str, str]
    gap: float
    required: float
    voltage: float
    where: tuple[float, float]
    features: tuple[str, str]


def spacing_violations(d: Design) -> list[Violation]:
    """Every pair of same-layer copper features of different nets below the target gap.

    All copper counts.  The working voltage of each pair comes from :data:`PROJECT_TEXT`
    (:func:`working_voltage`), the gap it needs from :func:`target_gap`.  Uses an STRtree
    ``dwithin`` query (3.0 mm, the largest target) and shapely distances; sorted by layer,
    nets, position.  Units: mm, V.
    """
    out = []
    copper = d.copper()
    for layer in d.layer_names:
        pieces = [p for p in copper if p.layer == layer and p.net]
        geoms = [p.geometry for p in pieces]
        tree = shapely.STRtree(geoms)
        left, right = tree.query(geoms, predicate="dwithin", distance=3.0)
        for i, j in zip(left.tolist(), right.tolist()):
            if i >= j or pieces[i].net == pieces[j].net:
                continue
            v = working_voltage(pieces[i].net, pieces[j].net)
            req = target_gap(v)
            gap = shapely.distance(geoms[i], geoms[j])
            if gap < req - 1e-6:
                line = shapely.shortest_line(geoms[i], geoms[j])
                c = line.centroid
                out.append(Violation(layer, tuple(sorted((pieces[i].net, pieces[j].net))),
                                     round(gap, 4), req, v, (round(c.x, 3), round(c.y, 3)),
                                     (_describe(pieces[i]), _describe(pieces[j]))))
    out.sort(key=lambda x: (x.layer, x.nets, x.where))
    return out


def _describe(piece) -> str:
    if piece.kind == "pad":
        return f"{piece.ref}.{piece.pin} pad"
    return f"{piece.net} {piece.kind}"


#: The planted problems of rev-a: id -> (layer, nets, smallest gap mm, area box).
PLANTED = {
    1: ("top", ("+15V", "HV_BUS"), 1.0, (21.0, 44.0, 26.0, 46.5)),
    2: ("top", ("LO_A", "SW_A"), 1.2, (54.0, 33.0, 57.0, 48.0)),
    3: ("top", ("HV_BUS", "HV_RTN"), 1.0, (4.0, 51.0, 10.0, 55.0)),
    4: ("bottom", ("HV_BUS", "HV_RTN"), 0.8, (8.0, 79.0, 31.0, 87.0)),
}


def classify(violations: list[Violation]) -> dict[int | None, list[Violation]]:
    """Sort violations into planted problems (by layer, nets and area); ``None`` = other.

    Problem 3 (J1's pads) shows on both layers, so its bottom-layer copy is accepted too.
    """
    out: dict[int | None, list[Violation]] = {}
    for v in violations:
        key = None
        for pid, (layer, nets, _gap, (x0, y0, x1, y1)) in PLANTED.items():
            layers = (layer, "bottom") if pid == 3 else (layer,)
            if v.layer in layers and v.nets == nets and x0 <= v.where[0] <= x1 \
                    and y0 <= v.where[1] <= y1:
                key = pid
                break
        out.setdefault(key, []).append(v)
    return out
