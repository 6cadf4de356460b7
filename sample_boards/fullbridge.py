"""Invented demo scenario: a full-bridge inverter stage for a 340-400 V DC bus.

Invented demo data: no real product, part number or brand.  Two revisions of one 2-layer,
1.6 mm, 35 um board of 120 x 90 mm (origin at the lower-left corner, y up, millimetres):

* ``build("a")`` - rev-a, with four planted clearance problems, one planted creepage
  problem and one planted commutation-loop problem (see PLANTED below and README.md): the
  film capacitors C5 and C6 sit in the upper-left corner, about 40 mm from leg A, and the
  bus return HV_RTN is routed apart from the HV_BUS strip (:data:`RETURN_TRACKS`);
* ``build("b")`` - rev-b, every problem fixed (the creepage one with a routed slot,
  :data:`CREEPAGE_SLOT`), C5 beside leg A, C6 beside leg B, a bottom-side chip capacitor
  (C10, C11) straight between each leg's high-side drain and low-side source
  (:data:`HF_CAPS`) and HV_RTN poured under the whole power area.

Circuit (nets in capitals):
  J1 (bus in): 1 HV_BUS, 2 HV_RTN.  J2 (bridge out): 1 OUT_A = SW_A, 2 OUT_B = SW_B.
  J3 (logic, 2.54 mm): 1 +15V, 2 +5V, 3 IN_A, 4 IN_B, 5 GND.
  C1 (HV_BUS-MID) and C2 (MID-HV_RTN): series bus electrolytics; R1, R2 balancing/bleed.
  C5 / C6: film capacitors HV_BUS-HV_RTN for leg A / leg B; C10 / C11 (rev-b only):
  ceramic chip capacitors HV_BUS-HV_RTN closing each leg's fast loop.
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
(HV_RTN; in rev-a only in the upper-left corner, the rest as tracks) computed here with
shapely as "area minus other copper grown by the spacing"; logic rails run on the bottom
layer; the switch nodes leave the legs through vias and run to J2 on the bottom layer.
Non-plated routed slots between the MOSFET legs lengthen the surface path between
neighbouring pins (both revisions).

Voltage model and spacing: the project file text :data:`PROJECT_TEXT` (written beside the
fab files as ``layoutcheck.toml``) is the one source of the node voltages and of the
spacing standard (IPC-2221B and IEC 60664-1, the larger governs).  SW_x swings 0..400 V,
and VB_x, HO_x and the high-side gate net are declared relative to it (``{ on = "SW_A",
volts = 15 }``), so between two nets riding on one switch node the working voltage is at
most 15 V.  :func:`pair_targets` takes the working voltage of every pair from
``layoutcheck.project.Project.working_voltage`` and the required distances from
``layoutcheck.physics.requirements.required_spacing``; the self-check is in
:mod:`spacing_check`.
"""
from __future__ import annotations

import math
import tomllib
from functools import lru_cache
from typing import NamedTuple

import shapely
from shapely.geometry import Polygon, box
from shapely.ops import unary_union

from layoutcheck.physics.requirements import SpacingProfile, required_spacing
from layoutcheck.project import project_from_data
from layoutcheck.writers.design import (Design, NonPlatedHole, PadTemplate, Part, Slot,
                                        Track, Via, place_pads, slot_polygon, track_polygon,
                                        zones_from_geometry)

BOARD_W, BOARD_H = 120.0, 90.0

# --------------------------------------------------------------------------- voltages
#: The project file of both revisions (``layoutcheck.toml``), and the voltage model and
#: environment the self-check uses.  Volts.
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
standard = "both"            # IPC-2221B Table 6-1 and IEC 60664-1; the larger governs
pollution_degree = 2         # IEC 60664-1: only non-conductive pollution, now and then
                             # conductive for a while from condensation
material_group = "IIIa"      # board laminate with a CTI of 175 V up to 400 V
overvoltage_category = "II"  # IEC 60664-1 Table F.1: equipment fed from the installation

[switching]
# For the power-loop rule: the overshoot of each leg's commutation loop is L di/dt.
current_a = 20          # load current commutated at each switching edge, A
switch_time_ns = 10     # its rise/fall time, ns: 20 A in 10 ns = 2 A/ns
derating = 0.8          # the peak may reach 80 % of the switch rating
warn_nh = 40            # warn above this loop inductance, nH

[legs.A]
high = "Q1"
low = "Q2"

[legs.B]
high = "Q3"
low = "Q4"

# The parts of the commutation loops (invented values).  The package names are looked up
# in the package table for the parts' internal inductance.
[parts.Q1]
package = "TO-247"      # 650 V N-channel MOSFET
vds_max_v = 650         # drain-source rating, V
coss_pf = 120           # output capacitance at 400 V, pF

[parts.Q2]
package = "TO-247"
vds_max_v = 650
coss_pf = 120

[parts.Q3]
package = "TO-247"
vds_max_v = 650
coss_pf = 120

[parts.Q4]
package = "TO-247"
vds_max_v = 650
coss_pf = 120

[parts.C5]
kind = "capacitor"
package = "BOX-P7.5"    # 1 uF 630 V film, radial leads on a 7.5 mm pitch

[parts.C6]
kind = "capacitor"
package = "BOX-P7.5"

[parts.C10]
kind = "capacitor"
package = "1812"        # 100 nF 1 kV ceramic chip (rev-b only)

[parts.C11]
kind = "capacitor"
package = "1812"
"""

#: :data:`PROJECT_TEXT` loaded by the package's own project reader.
PROJECT = project_from_data(tomllib.loads(PROJECT_TEXT), None)

#: Every distance this design keeps is the requirement plus this much (mm).
MARGIN = 0.2

#: Pours keep this much more than the target (mm), so flattened arcs never eat into it.
POUR_MARGIN = 0.04


def working_voltage(a: str, b: str) -> float:
    """Largest voltage (V) between nets ``a`` and ``b``, from :data:`PROJECT_TEXT`."""
    return PROJECT.working_voltage(a, b)


@lru_cache(maxsize=None)
def _profile(insulation: str) -> SpacingProfile:
    e = PROJECT.environment
    return SpacingProfile(standard=e.standard, pollution_degree=e.pollution_degree,
                          material_group=e.material_group,
                          overvoltage_category=e.overvoltage_category,
                          insulation=insulation, altitude_m=e.altitude_m, coating=e.coating,
                          interpolate=e.interpolate, creepage_columns=e.creepage_columns)


@lru_cache(maxsize=None)
def required(volts: float, insulation: str = "functional") -> tuple[float, float]:
    """(clearance, creepage) in mm that :data:`PROJECT_TEXT`'s environment asks for at
    ``volts`` (V) across ``insulation``, external layer.

    ``layoutcheck.physics.requirements.required_spacing`` with the project's standard
    ("both": the larger of IPC-2221B Table 6-1 and IEC 60664-1), the working voltage also
    as the RMS value for the creepage row; the larger of the conductor and the
    component-termination case.
    """
    reqs = [required_spacing(_profile(insulation), volts, rms_v=volts, layer_outer=True,
                             termination=t) for t in (False, True)]
    return max(r.clearance_mm for r in reqs), max(r.creepage_mm for r in reqs)


def pair_targets(a: str, b: str) -> tuple[float, float, float]:
    """(working voltage V, clearance target mm, creepage target mm) for nets ``a``, ``b``.

    The targets are :func:`required` plus :data:`MARGIN`; the insulation kind comes from the
    project's ``[[insulation]]`` entries (none here: functional).
    """
    v = working_voltage(a, b)
    kind, _ = PROJECT.insulation_between(a, b)
    clr, crp = required(v, kind)
    return v, clr + MARGIN, crp + MARGIN


def target_gap(a: str, b: str) -> float:
    """The straight spacing (mm) this design keeps between nets ``a`` and ``b`` wherever
    no slot lengthens the surface path: the creepage target (never below the clearance)."""
    _, clr, crp = pair_targets(a, b)
    return max(clr, crp)


# --------------------------------------------------------------------------- footprints
def _two_pin(pitch: float, pad: float, drill: float | None, *, square1: bool = False,
             shape: str = "circle", h: float | None = None) -> list[PadTemplate]:
    s1 = "rect" if square1 else shape
    return [PadTemplate("1", -pitch / 2, 0.0, s1, pad, h, drill),
            PadTemplate("2", pitch / 2, 0.0, shape, pad, h, drill)]


SMD_1206 = [PadTemplate("1", -1.6, 0.0, "roundrect", 1.0, 1.6, corner_radius=0.25),
            PadTemplate("2", 1.6, 0.0, "roundrect", 1.0, 1.6, corner_radius=0.25)]
#: TO-247 style: 5.45 mm pitch, 1.4 mm holes, 2.2 x 3.2 mm oval pads (3.25 mm between pads).
TO247_PITCH = 5.45
TO247 = [PadTemplate(str(i + 1), (i - 1) * TO247_PITCH, 0.0, "oval", 2.2, 3.2, 1.4)
         for i in range(3)]
#: Routed non-plated slots between MOSFET legs: width (mm, at least X = 1.0 mm in
#: pollution degree 2) and half the length of the tool path (mm) about the pin row.
LEG_SLOT_WIDTH, LEG_SLOT_HALF = 1.2, 3.0
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


# --------------------------------------------------------------------------- the planted spot
#: The creepage demonstration: the +5V run from J3 to C9 passes under the HV_BUS bus bar
#: (lower edge y = 46.0) with a straight gap of this much (mm): above the clearance
#: (IPC-2221B 2.5 mm, IEC 60664-1 3.0 mm at 395 V) and below the creepage (4.0 mm).
CREEPAGE_GAP = 3.3
BUS_BAR_Y = 46.0
PLUS5_RUN_Y = round(BUS_BAR_Y - CREEPAGE_GAP - 0.4, 6)     # centre line, track 0.8 mm wide
#: rev-b's fix: a non-plated routed slot (1.2 mm wide, at least X) along the middle of the
#: gap, 3.5 mm past each end of the +5V run.
CREEPAGE_SLOT: Slot | None = Slot([(6.0, round(BUS_BAR_Y - CREEPAGE_GAP / 2, 6)),
                                   (22.5, round(BUS_BAR_Y - CREEPAGE_GAP / 2, 6))], 1.2)
#: Pours keep this much copper-free board (mm) around every slot.
SLOT_KEEPOUT = 0.5


# --------------------------------------------------------------------------- fast capacitors
#: rev-b's fast capacitors, one per leg: a chip capacitor on the bottom side on the line
#: between the high-side drain and the low-side source (leg A: x = 48.0, between Q1's
#: drain (48, 72) and Q2's source (48, 56); leg B the same 36 mm to the right).  Reference
#: and x offset (mm) for each leg.
HF_CAPS = (("C10", 0.0), ("C11", 36.0))
#: Leg A's pin 1 (HV_BUS) and pin 2 (HV_RTN) centres (mm) and the pads (along the
#: capacitor, across it; mm).  The pads are 3.3 mm apart, above the 3.2 mm clearance target
#: but below the 4.2 mm creepage target, so a non-plated routed slot 1.2 mm wide (at least
#: X = 1.0 mm) runs across between them, 1.05 mm of bare board on either side (common
#: practice for high-voltage chip capacitors); its ends reach 2.6 mm left and 0.7 mm right
#: of the pads (the right end stays 0.75 mm clear of the switch-node column on top).
HF_CAP_PADS = ((48.0, 66.25), (48.0, 61.75))
HF_CAP_PAD = (1.2, 3.4)
HF_CAP_SLOT = ((44.8, 64.0), (51.0, 64.0), 1.2)


# --------------------------------------------------------------------------- rev-a's big loop
#: Lower edge (y, mm) of the HV_BUS strip along the top edge: rev-a's beginner layout runs
#: the bus along the very edge of the board (y 83-88), far from its return.
STRIP_Y = {"a": 83.0, "b": 77.0}
#: rev-a's HV_RTN outside the corner pour (box 3.5-38 x 70-88 mm): 2.0 mm bottom-layer
#: tracks (mm).  Q2's source runs west above R7 (whose HV_RTN pad it feeds by a stub at
#: y = 51.6), down x = 33.5 (left of R7's GND feed at x = 37), west under the bus capacitor
#: C1 at y = 43.8 (4.4 mm below its HV_BUS pad), up x = 14.85 between J1 and C1 (4.85 mm
#: from both HV_BUS pads) into the corner pour; J1 pin 2 joins that track; leg B's sources
#: run west between the MOSFET rows (y = 64, 5.6 mm from the rows' pads) to Q2's.  So leg
#: A's loop spans the board from the bus strip at the top to y = 43 below C1.
RETURN_TRACKS = (
    ((48.0, 56.0), (48.0, 54.0), (33.5, 54.0), (33.5, 43.8), (14.85, 43.8), (14.85, 71.0)),
    ((7.0, 58.2), (7.0, 60.0), (14.85, 60.0)),
    ((84.0, 56.0), (84.0, 64.0), (48.0, 64.0), (48.0, 56.0)),
)
#: The stub from the return track to R7's HV_RTN pad (width mm, points mm).
R7_STUB = (1.0, ((33.5, 51.6), (37.0, 51.6)))


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

    def leg_slots(self, x: float, y: float, between) -> None:
        """Slots between the legs of a TO-247 row at (x, y): ``between`` gives, for each
        slot, its offset along the row in pin pitches from the middle pin (-0.5, 0.5)."""
        for k in between:
            sx = round(x + k * TO247_PITCH, 6)
            self.d.slots.append(Slot([(sx, round(y - LEG_SLOT_HALF, 6)),
                                      (sx, round(y + LEG_SLOT_HALF, 6))], LEG_SLOT_WIDTH))


def pour(d: Design, net: str, layer: str, region, *, extra_cuts=(), ignore_nets=()) -> list:
    """Zones for ``net`` on ``layer``: ``region`` minus every other net's copper grown by
    :func:`target_gap` + :data:`POUR_MARGIN` (mm), minus the holes (1.0 mm around) and slots
    (:data:`SLOT_KEEPOUT` around), minus ``extra_cuts`` (geometry, clearance) pairs;
    islands that touch no copper of ``net`` are dropped.
    """
    cuts, own = [], []
    for piece in d.copper():
        if piece.layer != layer:
            continue
        if piece.net == net:
            own.append(piece.geometry)
            continue
        if piece.net in ignore_nets:
            continue
        c = target_gap(net, piece.net or "") + POUR_MARGIN
        cuts.append(piece.geometry.buffer(c, quad_segs=16))
    for h in d.holes:
        cuts.append(shapely.Point(h.x, h.y).buffer(h.d / 2 + 1.0, quad_segs=16))
    for s in d.slots:
        cuts.append(slot_polygon(s).buffer(SLOT_KEEPOUT, quad_segs=16))
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
    b.two("R1", "resistor", "220 kOhm 0.6 W", "AXIAL-P15.24", (28.5, 77.5), (28.5, 62.26),
          ("HV_BUS", "MID"), pad=2.0, drill=1.0, resistance_ohm=220e3, rating_v=350)
    b.two("R2", "resistor", "220 kOhm 0.6 W", "AXIAL-P15.24", (35.5, 62.26), (35.5, 77.5),
          ("MID", "HV_RTN"), pad=2.0, drill=1.0, resistance_ohm=220e3, rating_v=350)
    b.track("MID", "top", 1.0, (22.0, 58.0), (22.0, 65.5))
    b.track("MID", "top", 1.0, (22.0, 62.26), (35.5, 62.26))

    # ---- film capacitors
    if a:   # C5 and C6 by the bus input in the upper-left corner, ~40 mm from leg A.
        c5 = ((10.0, 84.5), (10.0, 77.0))
        c6 = ((6.0, 82.5), (6.0, 75.0))
    else:   # C5 right beside leg A, clear of the switch-node column; C6 beside leg B.
        c5 = ((60.5, 67.5), (60.5, 60.0))
        c6 = ((96.5, 67.5), (96.5, 60.0))
    b.two("C5", "capacitor", "1 uF 630 V film", "BOX-P7.5", c5[0], c5[1],
          ("HV_BUS", "HV_RTN"), pad=2.2, drill=1.0, capacitance_f=1e-6, rating_v=630)
    b.two("C6", "capacitor", "1 uF 630 V film", "BOX-P7.5", c6[0], c6[1],
          ("HV_BUS", "HV_RTN"), pad=2.2, drill=1.0, capacitance_f=1e-6, rating_v=630)
    # rev-b: the film capacitors' HV_BUS pins go straight up into the HV_BUS strip; their
    # HV_RTN pins sit in the bottom HV_RTN pour.
    if not a:
        b.track("HV_BUS", "top", 1.6, (60.5, 67.5), (60.5, 78.0))
        b.track("HV_BUS", "top", 1.6, (96.5, 67.5), (96.5, 78.0))
        # The legs' fast capacitors C10/C11 (rev-b only): high-voltage chip capacitors on
        # the bottom side straight between the high-side drain and the low-side source,
        # with a routed slot between the pads (HF_CAP_PADS); tracks from the pads' outer
        # edges, so their round ends stay on the pads.
        for ref, dx in HF_CAPS:
            (x1, y1), (x2, y2) = HF_CAP_PADS
            b.two(ref, "capacitor", "100 nF 1 kV ceramic", "1812", (x1 + dx, y1),
                  (x2 + dx, y2), ("HV_BUS", "HV_RTN"), pad=HF_CAP_PAD[0],
                  h=HF_CAP_PAD[1], shape="roundrect", side="bottom",
                  capacitance_f=100e-9, rating_v=1000)
            edge = HF_CAP_PAD[0] / 2
            b.track("HV_BUS", "bottom", 2.0, (x1 + dx, y1 + edge), (x1 + dx, 72.0))
            b.track("HV_RTN", "bottom", 2.0, (x2 + dx, y2 - edge), (x2 + dx, 56.0))
            (sx0, sy), (sx1, _), width = HF_CAP_SLOT
            d.slots.append(Slot([(sx0 + dx, sy), (sx1 + dx, sy)], width))

    # ---- the two legs (leg B = leg A moved 36 mm right)
    for leg, dx, qh, ql, sw, gh, gl in (("A", 0.0, "Q1", "Q2", "SW_A", "G_Q1", "G_Q2"),
                                         ("B", 36.0, "Q3", "Q4", "SW_B", "G_Q3", "G_Q4")):
        b.part(qh, "mosfet", "650 V 40 mOhm N-channel MOSFET", "TO-247-3", TO247,
               {"1": gh, "2": "HV_BUS", "3": sw}, at=(48.0 + dx, 72.0),
               pins={"1": "G", "2": "D", "3": "S"}, vds_v=650, rds_on_ohm=0.04)
        b.part(ql, "mosfet", "650 V 40 mOhm N-channel MOSFET", "TO-247-3", TO247,
               {"1": gl, "2": sw, "3": "HV_RTN"}, at=(53.45 + dx, 56.0), rotation=180,
               pins={"1": "G", "2": "D", "3": "S"}, vds_v=650, rds_on_ohm=0.04)
        # Slots where neighbouring legs are 400 V apart: high side G-D and D-S (its G-S
        # are 15 V apart), low side G-D and D-S.
        b.leg_slots(48.0 + dx, 72.0, (-0.5, 0.5))
        b.leg_slots(53.45 + dx, 56.0, (-0.5, 0.5))
        # HV_BUS neck from the drain up into the top pour; switch-node column.
        b.track("HV_BUS", "top", 2.0, (48.0 + dx, 72.0), (48.0 + dx, STRIP_Y[rev] + 1.0))
        b.track(sw, "top", 2.2, (53.45 + dx, 72.0), (53.45 + dx, 42.5))

    # Switch nodes to J2 on the bottom layer.
    for y in (42.5, 44.7, 46.9):
        b.via("SW_A", 53.45, y, pad=1.6, drill=0.8)
    for y in (49.6, 51.8):
        b.via("SW_B", 89.45, y, pad=1.6, drill=0.8)
    # SW_A keeps 5.3 mm from D2's VB_B pad (415 V), then drops so that SW_B can pass
    # under Q4's gate pad with 5.2 mm and still keep 4.3 mm from SW_A and J2 pin 1.
    b.track("SW_A", "bottom", 2.4, (53.45, 43.0), (85.0, 43.0), (87.0, 41.3), (113.0, 41.3))
    b.track("SW_B", "bottom", 2.4, (89.45, 49.6), (91.05, 48.0), (99.0, 48.0),
            (101.0, 49.6), (113.0, 49.6))

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
        # High-side gate: HO -> R (x = 41) -> G of the high-side MOSFET, kept left of the
        # low-side MOSFET's HV_RTN source (415 V between them).
        b.track(ho, "top", 0.4, (x_ho, top), (x_ho, 38.0), (41.0 + dx, 38.0), (41.0 + dx, 44.4))
        b.smd(r_hi, "resistor", "10 Ohm", (41.0 + dx, 44.4), (41.0 + dx, 47.6), (ho, gh),
              resistance_ohm=10.0)
        b.track(gh, "top", 0.5, (41.0 + dx, 47.6), (41.0 + dx, 71.0), (42.55 + dx, 72.0))
        # Low-side gate: LO leaves along its row through the empty positions 6-8, then
        # runs up the right of the driver at x = 59.9 to R.
        if a and leg == "A":
            # Planted problem 2 (rev-a): LO_A swings left round R4 (y 42.5-44.4) to
            # x = 55.95, 1.2 mm from the 2.2 mm switch-node column (x <= 54.55).
            b.track(lo, "top", 0.4, (x_lo, bot), (59.9, bot), (59.9, 42.5), (55.95, 42.5),
                    (55.95, 44.4), (59.9, 44.4))
        else:
            b.track(lo, "top", 0.4, (x_lo, bot), (59.9 + dx, bot), (59.9 + dx, 44.4))
        b.smd(r_lo, "resistor", "10 Ohm", (59.9 + dx, 44.4), (59.9 + dx, 47.6), (lo, gl),
              resistance_ohm=10.0)
        b.track(gl, "top", 0.5, (59.9 + dx, 47.6), (59.9 + dx, 56.0))
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

    # +5V: from J3 pin 2 up and along the bus bar (the planted creepage spot, 3.3 mm
    # straight) to its decoupling C9.
    b.track("+5V", "top", 0.8, (6.0, 32.54), (9.5, 32.54), (9.5, PLUS5_RUN_Y),
            (19.0, PLUS5_RUN_Y), (19.0, 40.1))
    b.smd("C9", "capacitor", "100 nF 50 V", (19.0, 40.1), (19.0, 36.9), ("+5V", "GND"),
          capacitance_f=100e-9, rating_v=50)
    b.track("GND", "top", 0.5, (19.0, 36.9), (19.0, 35.2))
    b.via("GND", 19.0, 35.2)
    b.track("GND", "bottom", 0.5, (19.0, 35.2), (19.0, 20.0))

    # GND-HV_RTN tie: 0-ohm R7 on the bottom side below leg A.
    b.smd("R7", "resistor", "0 Ohm (GND to HV_RTN tie)", (37.0, 48.4), (37.0, 51.6),
          ("GND", "HV_RTN"), side="bottom", resistance_ohm=0.0)
    b.track("GND", "bottom", 0.6, (37.0, 20.0), (37.0, 48.4))

    # ---- planted problem 4 (rev-a): a bottom-layer HV_BUS track doubling the C5 feed
    # (C5+ -> R1 pin 1) with the HV_RTN pour only 0.8 mm away.
    bottom_bus = None
    if a:
        bottom_bus = Track("HV_BUS", "bottom", 2.0, [(10.0, 84.5), (28.5, 84.5), (28.5, 77.5)])
        d.tracks.append(bottom_bus)

    # ---- slots, then pours (made before the planted +15V track of rev-a is added, as a
    # board whose pour was not refilled after that track went in)
    if not a and CREEPAGE_SLOT is not None:
        d.slots.append(CREEPAGE_SLOT)
    hv_bus_region = unary_union([box(3.5, BUS_BAR_Y, 25.0, 53.5),   # bus bar J1 -> C1
                                 box(14.3, BUS_BAR_Y, 16.9, 88.0),  # column up the left side
                                 box(3.5, STRIP_Y[rev], 106.0, 88.0)])  # strip, top edge
    if a:
        # rev-a's return is routed apart from the bus (see RETURN_TRACKS): the HV_RTN pour
        # covers only the upper-left corner round C5, C6, C2 and R2.
        hv_rtn_region = box(3.5, 70.0, 38.0, 88.0)
        for points in RETURN_TRACKS:
            b.track("HV_RTN", "bottom", 2.0, *points)
        b.track("HV_RTN", "bottom", R7_STUB[0], *R7_STUB[1])
    else:
        hv_rtn_region = box(3.5, 51.0, 106.0, 88.0)
    # The bus bar's lower edge is the region's edge, CREEPAGE_GAP from the +5V run: the
    # +5V copper cuts the pour only where it would come closer than that.
    plus5 = [(p.geometry, CREEPAGE_GAP - 0.005) for p in d.copper()
             if p.layer == "top" and p.net == "+5V"]
    d.zones += pour(d, "HV_BUS", "top", hv_bus_region, ignore_nets=("+5V",),
                    extra_cuts=plus5)
    if bottom_bus is not None:
        d.zones += pour(d, "HV_RTN", "bottom", hv_rtn_region, ignore_nets=("HV_BUS",),
                        extra_cuts=[(track_polygon(bottom_bus), 0.8)]
                        + _bus_pad_cuts(d, "bottom"))
    else:
        d.zones += pour(d, "HV_RTN", "bottom", hv_rtn_region)

    if planted_15v:
        b.track("+15V", "top", 0.5, *planted_15v)
    d.validate()
    return d


def _bus_pad_cuts(d: Design, layer: str):
    """HV_BUS pads and vias on ``layer`` with the normal pour spacing (rev-a helper)."""
    c = target_gap("HV_RTN", "HV_BUS") + POUR_MARGIN
    return [(p.geometry, c) for p in d.copper()
            if p.layer == layer and p.net == "HV_BUS" and p.kind in ("pad", "via")]


# --------------------------------------------------------------------------- planted
class Planted(NamedTuple):
    """A planted problem of rev-a: layer, nets (sorted), smallest straight gap (mm), the
    area (x0, y0, x1, y1) it lies in (mm), and its kind (``clearance`` / ``creepage`` /
    ``loop``).

    A ``loop`` problem is no spacing problem: its layer is ``"both"``, ``gap`` is ``None``,
    ``nets`` are the bus nets and ``leg`` names the half-bridge leg ([legs] in
    :data:`PROJECT_TEXT`) whose commutation loop is too large.
    """

    layer: str
    nets: tuple[str, str]
    gap: float | None
    area: tuple[float, float, float, float]
    kind: str
    leg: str | None = None


#: The planted problems of rev-a (README.md, "rev-a: the planted problems").  1-4 miss the
#: clearance; 5 keeps the clearance but misses the creepage on a straight path, and rev-b
#: keeps the same copper there with :data:`CREEPAGE_SLOT` cut between; 6 is leg A's
#: commutation loop (C5 in the upper-left corner, the return routed apart from the bus), which
#: rev-b closes with C10 between Q1's drain and Q2's source.
PLANTED = {
    1: Planted("top", ("+15V", "HV_BUS"), 1.0, (21.0, 44.0, 26.0, 46.5), "clearance"),
    2: Planted("top", ("LO_A", "SW_A"), 1.2, (54.0, 41.0, 57.0, 45.5), "clearance"),
    3: Planted("top", ("HV_BUS", "HV_RTN"), 1.0, (4.0, 51.0, 10.0, 55.0), "clearance"),
    4: Planted("bottom", ("HV_BUS", "HV_RTN"), 0.8, (8.0, 76.0, 31.0, 87.0), "clearance"),
    5: Planted("top", ("+5V", "HV_BUS"), CREEPAGE_GAP, (8.5, 42.0, 20.0, 46.5), "creepage"),
    6: Planted("both", ("HV_BUS", "HV_RTN"), None, (3.5, 42.0, 55.0, 88.0), "loop", leg="A"),
}


def spacing_planted() -> dict[int, Planted]:
    """The clearance and creepage problems of :data:`PLANTED` (what the self-check sees)."""
    return {k: p for k, p in PLANTED.items() if p.kind in ("clearance", "creepage")}
