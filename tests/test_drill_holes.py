"""NC drill hits, repeats, drilled slots (G85) and routed slots: geometry in millimetres.

Sources named beside each check:
* MANUAL = "NC drill programming manual (format 2), as summarised in our format notes"
  (section 2.4 body commands);
* "common practice" for exporter habits (routed slots written as G00/M15/G01/M16/G05);
* plane geometry (handbook formulas): disc area pi d^2/4; stadium area d*L + pi d^2/4;
  an arc-shaped slot of centre-line radius r, sweep theta and width w has area
  theta*r*w + pi w^2/4 (annular sector plus two half-disc caps), valid for r > w/2.
Tolerances follow the chord tolerance of layoutcheck.units (0.5 um sagitta): a flattened
outline differs from the true one by at most perimeter * tolerance in area.
"""
import math

import pytest
import shapely
from shapely.geometry import LineString, Point

from layoutcheck.readers.drill import parse_drill
from layoutcheck.units import CHORD_TOLERANCE_MM as TOL

HEAD = "M48\nMETRIC\nT1C1.000\nT2C0.600\n%\n"


def _read(body, head=HEAD, name="h.drl"):
    return parse_drill(head + body + "\nM30\n", name)


def _pts(df):
    return [(h.path.x, h.path.y) for h in df.holes if not h.is_slot]


def test_hit_is_a_disc_of_the_tool_diameter():
    """Handbook: disc area pi d^2/4 = 0.785398 mm^2 for d = 1 mm, centred on the hit;
    the flattened circle may differ by at most perimeter * chord tolerance."""
    df = _read("T1\nX3.0Y4.0")
    (h,) = df.holes
    assert h.geometry.area == pytest.approx(math.pi / 4, abs=math.pi * 1.0 * TOL)
    c = h.geometry.centroid
    assert (c.x, c.y) == pytest.approx((3.0, 4.0), abs=1e-9)
    assert h.diameter == 1.0 and not h.is_slot and h.line == 7
    # every point of the true circle lies inside (covering flattening), shapely's own test
    assert h.geometry.buffer(1e-9).contains(Point(3, 4).buffer(0.5, quad_segs=256))


def test_missing_axis_keeps_last_value_and_tool_changes():
    """MANUAL: a missing axis keeps its last value; T<n> selects the tool for later hits."""
    df = _read("T1\nX1.0Y2.0\nX5.0\nY7.0\nT2\nX0.0")
    assert _pts(df) == [(1.0, 2.0), (5.0, 2.0), (5.0, 7.0), (0.0, 7.0)]
    assert [h.diameter for h in df.holes] == [1.0, 1.0, 1.0, 0.6]


def test_repeat_code():
    """MANUAL: R<k>X<dx>Y<dy> repeats the previous hit k more times, each step offset by
    (dx, dy): a hit at (1, 1) and R3X2.5 give hits at x = 1, 3.5, 6, 8.5 mm; a missing
    axis steps by zero.  R2Y-1.0 then continues from (8.5, 1): y = 0, -1."""
    df = _read("T2\nX1.0Y1.0\nR3X2.5\nR2Y-1.0")
    assert _pts(df) == [(1, 1), (3.5, 1), (6, 1), (8.5, 1), (8.5, 0), (8.5, -1)]
    assert [h.line for h in df.holes] == [7, 8, 8, 8, 9, 9]


def test_incremental_g91_and_back_to_g90():
    """MANUAL: G91 incremental, G90 absolute: X1 Y1 (abs), G91 X2 -> (3, 1), Y-1 -> (3, 0),
    G90 X10 -> (10, 0)."""
    df = _read("T1\nX1.0Y1.0\nG91\nX2.0\nY-1.0\nG90\nX10.0")
    assert _pts(df) == [(1, 1), (3, 1), (3, 0), (10, 0)]


def test_g93_zero_set_is_an_origin_offset():
    """MANUAL: G93X..Y.. sets the zero; applied as an origin offset: after G93X10Y20 the hit
    X1Y2 lands at (11, 22) mm."""
    df = _read("G93X10.0Y20.0\nT1\nX1.0Y2.0")
    assert _pts(df) == [(11.0, 22.0)]


@pytest.mark.parametrize("x2, y2", [(10.0, 0.0), (3.0, 4.0), (-6.0, 8.0)])
def test_g85_slot_geometry(x2, y2):
    """MANUAL: X1Y1G85X2Y2 is a drilled slot, the segment buffered by d/2.
    Handbook: stadium area = d*L + pi d^2/4 (L = 10 mm here, d = 1 mm: 10.7854 mm^2),
    within the chord tolerance times the perimeter; the outline must also lie within
    the tolerance of shapely's own finely flattened buffer of the same segment."""
    df = _read(f"T1\nX0.0Y0.0G85X{x2}Y{y2}")
    (h,) = df.holes
    L, d = math.hypot(x2, y2), 1.0
    assert h.is_slot and h.path.equals(LineString([(0, 0), (x2, y2)]))
    expected = d * L + math.pi * d * d / 4
    assert h.geometry.area == pytest.approx(expected, abs=(2 * L + math.pi * d) * TOL)
    fine = LineString([(0, 0), (x2, y2)]).buffer(0.5, quad_segs=512)
    assert shapely.hausdorff_distance(h.geometry.exterior, fine.exterior) <= TOL + 1e-6


def test_g85_end_keeps_start_axis_and_current_point_moves():
    """MANUAL: in X1Y1G85X2Y2 a missing end axis keeps the start's value; the slot end
    becomes the current point (the next hit with only Y given uses its X)."""
    df = _read("T1\nX2.0Y3.0G85X8.0\nY9.0")
    slot, hit = df.holes
    assert list(slot.path.coords) == [(2.0, 3.0), (8.0, 3.0)]
    assert (hit.path.x, hit.path.y) == (8.0, 9.0)


def test_routed_straight_slot_common_exporter_form():
    """Common practice: a routed slot as G00X..Y.. / M15 / G01X..Y.. / M16 / G05; geometry
    is the tool-centre path buffered by d/2 (MANUAL).  From (0,0) to (0,5) with d = 0.6:
    area = 0.6*5 + pi*0.36/4 = 3.28274 mm^2.  After G05 a bare XY is a hit again."""
    df = _read("T2\nG00X0.0Y0.0\nM15\nG01X0.0Y5.0\nM16\nG05\nX7.0Y7.0")
    slot, hit = df.holes
    assert slot.is_slot and slot.diameter == 0.6
    assert list(slot.path.coords) == [(0, 0), (0, 5)]
    assert slot.geometry.area == pytest.approx(3.0 + math.pi * 0.09,
                                               abs=(10 + math.pi * 0.6) * TOL)
    assert not hit.is_slot and (hit.path.x, hit.path.y) == (7.0, 7.0)
    assert slot.line == 8  # the M15 line


@pytest.mark.parametrize("ij", ["I5.0J0", "I-5.0J0"])
def test_routed_arc_g02_with_ij_either_sign(ij):
    """MANUAL: G02 is a clockwise rout arc; I/J give the centre offset from the start point,
    with the sign differing between writers, so the centre equidistant from start and end
    is kept.  Start (10,0), end (20,0), centre (15,0), clockwise = over the top through
    (15, 5).  Handbook: arc slot area = theta*r*w + pi w^2/4 = pi*5*1 + pi/4 = 16.4934 mm^2."""
    df = _read(f"T1\nG00X10.0Y0.0\nM15\nG02X20.0Y0.0{ij}\nM16\nG05")
    (h,) = df.holes
    r, w = 5.0, 1.0
    perimeter = 2 * math.pi * r + math.pi * w
    assert h.geometry.area == pytest.approx(math.pi * r * w + math.pi * w * w / 4,
                                            abs=perimeter * TOL * 2)
    x0, y0, x1, y1 = h.path.bounds
    assert y1 == pytest.approx(5.0, abs=TOL) and y0 == pytest.approx(0.0, abs=1e-9)
    # every path vertex lies on the circle of radius 5 about (15, 0)
    assert all(abs(math.hypot(x - 15, y) - 5) < 1e-9 for x, y in h.path.coords)


def test_routed_arc_g03_with_radius_a():
    """MANUAL: G03 is counter-clockwise, A gives the radius, arcs span at most 180 deg.
    From (0,0) to (10,0) with A5: centre (5,0), counter-clockwise from the left point
    passes below, through (5, -5)."""
    df = _read("T1\nG00X0.0Y0.0\nM15\nG03X10.0Y0.0A5.0\nM16")
    (h,) = df.holes
    x0, y0, x1, y1 = h.path.bounds
    assert y0 == pytest.approx(-5.0, abs=TOL) and y1 == pytest.approx(0.0, abs=1e-9)


def test_routed_arc_radius_larger_than_half_chord():
    """MANUAL (arcs of at most 180 deg, A = radius): clockwise from (0,0) to (10,0) with
    A10: centre to the right of the chord, (5, -sqrt(75)); the arc bulges up to
    y = 10 - sqrt(75) = 1.33975 mm."""
    df = _read("T1\nG00X0.0Y0.0\nM15\nG02X10.0Y0.0A10.0\nM16")
    (h,) = df.holes
    assert h.path.bounds[3] == pytest.approx(10 - math.sqrt(75), abs=TOL)
    c = (5.0, -math.sqrt(75))
    assert all(abs(math.hypot(x - c[0], y - c[1]) - 10) < 1e-9 for x, y in h.path.coords)


def test_routed_path_line_then_arc_is_one_slot():
    """MANUAL: the path runs from M15 to M16 as one cut; G01 then G03 continue it.
    Centre-line length 10 + pi*5 = 25.708 mm (line plus half circle)."""
    df = _read("T1\nG00X20.0Y0.0\nM15\nG01X30.0Y0.0\nG03X40.0Y0.0A5.0\nM17\nG05")
    (h,) = df.holes
    assert h.path.length == pytest.approx(10 + 5 * math.pi, abs=1e-3)
    assert h.geometry.is_valid and h.geometry.geom_type == "Polygon"


def test_rout_moves_without_plunge_are_moves_with_note():
    """MANUAL: only M15/M14 lowers the router, so G01 with the tool up cuts nothing; the
    reader must say so rather than skip it silently."""
    df = _read("T1\nG00X0.0Y0.0\nG01X5.0Y0.0\nG05\nX1.0Y1.0")
    assert _pts(df) == [(1.0, 1.0)]
    assert any("retracted" in n.text for n in df.notes)


def test_compensation_codes_read_as_centre_line_with_note():
    """MANUAL: G40/G41/G42 cutter compensation; for CAD data the coordinates are the tool
    centre line, so the slot centre line is exactly the coordinates given."""
    df = _read("T1\nG00X0.0Y0.0\nG41\nM15\nG01X4.0Y0.0\nM16\nG40")
    assert list(df.holes[0].path.coords) == [(0, 0), (4, 0)]
    assert any("compensation" in n.text for n in df.notes)


def test_tools_defined_in_body_unload_and_end():
    """MANUAL / common practice: tools may be defined in the body (T3C2.0 selects it too);
    T0 unloads; M30 ends the program, so later lines are not read (and that is noted);
    M47 operator messages are ignored."""
    text = ("M48\nMETRIC\n%\nM47,Operator check\nT3C2.0\nX1.0Y1.0\nT0\nM30\n"
            "T3\nX9.0Y9.0\n")
    df = parse_drill(text, "b.drl")
    assert [(h.path.x, h.path.y, h.diameter) for h in df.holes] == [(1.0, 1.0, 2.0)]
    assert any("after the end" in n.text for n in df.notes)


def test_redefined_tool_keeps_old_diameter_for_earlier_hits():
    """MANUAL: a tool definition applies from where it stands; hits before a redefinition
    keep the diameter they were drilled with."""
    df = _read("T1\nX0.0Y0.0\nT1C2.0\nX5.0Y0.0")
    assert [h.diameter for h in df.holes] == [1.0, 2.0]


def test_many_hits_vectorised_and_deterministic():
    """Same input, same result (project rule); 2000 hits read twice give identical
    geometry, each with the disc area pi d^2/4 (handbook) within tolerance."""
    body = "T2\n" + "\n".join(f"X{i * 0.5:.3f}Y{(i % 7) * 0.5:.3f}" for i in range(2000))
    a, b = _read(body), _read(body)
    assert len(a.holes) == 2000
    ga = shapely.to_wkb([h.geometry for h in a.holes])
    gb = shapely.to_wkb([h.geometry for h in b.holes])
    assert list(ga) == list(gb)
    areas = shapely.area([h.geometry for h in a.holes])
    assert max(abs(areas - math.pi * 0.09)) <= math.pi * 0.6 * TOL


EXPORTER_FILE = """M48
; DRILL file, invented demo board
; FORMAT={-:-/ absolute / metric / decimal}
; #@! TF.CreationDate,2025-01-01T00:00:00
; #@! TF.FileFunction,Plated,1,2,PTH
FMAT,2
METRIC
R,T
; #@! TA.AperFunction,Plated,PTH,ViaDrill
T1C0.400
; #@! TA.AperFunction,Plated,PTH,ComponentDrill
T2C1.000
%
G90
G05
T1
X118.11Y-74.93
X120.65Y-74.93
T2
G00X100.0Y-80.0
M15
G01X103.0Y-80.0
M16
G05
X110.0Y-80.0
T0
M30
"""


def test_exporter_style_file():
    """Common practice: the layout exporters' usual NC drill output (decimal metric
    coordinates, attribute comments, a routed oval hole as G00/M15/G01/M16/G05, T0 and M30
    at the end).  Every hole is where its decimals say (MANUAL: a decimal point is read
    literally), with the per-tool function, and nothing had to be assumed."""
    df = parse_drill(EXPORTER_FILE, "demo-PTH.drl")
    assert [(round(h.path.centroid.x, 3), round(h.path.centroid.y, 3)) for h in df.holes] == \
        [(118.11, -74.93), (120.65, -74.93), (101.5, -80.0), (110.0, -80.0)]
    assert [h.function for h in df.holes] == ["ViaDrill", "ViaDrill", "ComponentDrill",
                                              "ComponentDrill"]
    assert [h.is_slot for h in df.holes] == [False, False, True, False]
    assert df.units == "mm" and df.span == (1, 2) and df.plated is True
    assert not [n for n in df.notes if n.topic == "drill-format"]


def test_missing_g05_after_rout_is_noted():
    """MANUAL: G00 puts the machine in rout mode and coordinates stay moves until G05; a
    writer that forgets G05 loses its hits, and the reader must say so."""
    df = _read("T1\nG00X0.0Y0.0\nM15\nG01X2.0Y0.0\nM16\nX5.0Y5.0")
    assert len(df.holes) == 1 and df.holes[0].is_slot
    assert any("G05" in n.text for n in df.notes)


def test_closed_rout_path_removes_the_enclosed_piece():
    """MANUAL: G02 with start = end and I/J is a full circle; routing a closed contour
    frees the piece inside it (common practice: routed round cut-outs), so the hole is the
    full disc of radius r + w/2.  Centre (5,0), r = 5, w = 1: area = pi * 5.5^2 = 95.033
    mm^2 (handbook disc), within the chord tolerance times the perimeter."""
    df = _read("T1\nG00X10.0Y0.0\nM15\nG02X10.0Y0.0I-5.0J0\nM16\nG05")
    (h,) = df.holes
    assert h.is_slot and h.path.is_closed
    assert len(h.geometry.interiors) == 0
    assert h.geometry.area == pytest.approx(math.pi * 5.5 ** 2, abs=2 * math.pi * 5.5 * TOL * 2)
