"""Clearance rule: distances, places, columns, voltages.

Sources named beside each check:
* gaps worked by hand (axis-aligned rectangles: difference of coordinates; circles:
  centre distance minus the two radii) and shapely's own ``distance`` on independently
  built polygons, to 1 um;
* required values: IPC-2221B Table 6-1 (values from memory; cross-checked against
  IPC-D-275 structure per our standards notes, shared/reference/standards.md s.1).
"""
from __future__ import annotations

import math

import pytest
import shapely
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st
from shapely.geometry import LineString, Point, box

from boards import (cu, hand_gap_rects, htrack, make_board, pad_near_track,
                    polyline_track, project, rect, two_discs, two_places, two_tracks)
from layoutcheck.checks import CheckContext, clearance
from layoutcheck.physics.spacing import ipc2221b_spacing

UM = 1e-3  # 1 micrometre in mm

HV_LV = {"HV_BUS": 400, "+15V": 15}   # 385 V between them -> 301-500 V row


def run(board, voltages=HV_LV, **env):
    ctx = CheckContext(board, None, project(voltages, **env))
    return clearance.run(ctx), ctx


def test_two_tracks_too_close():
    """Two 1 mm tracks with centres 3.0 mm apart have a 2.0 mm gap (by hand); at 385 V on
    an uncoated outer layer IPC-2221B Table 6-1 B2, 301-500 V row asks 2.5 mm (from
    memory).  measured_mm agrees with shapely.distance of independently built boxes."""
    found, _ = run(two_tracks(3.0))
    assert len(found) == 1
    f = found[0]
    assert f.rule == "clearance" and f.severity == "error" and f.layer == "top"
    assert f.nets == ["+15V", "HV_BUS"]
    assert f.measured_mm == pytest.approx(2.0, abs=UM)
    ref = shapely.distance(box(0, -0.5, 20, 0.5), box(0, 2.5, 20, 3.5))
    assert abs(f.measured_mm - ref) < UM
    assert f.required_mm == 2.5 and f.voltage_v == 385
    assert f.extra["column"] == "B2" and f.extra["row"] == "301-500 V"
    assert "B2" in f.basis and "301-500 V" in f.basis and "from memory" in f.basis
    # the two nearest points: one on each track edge, 2.0 mm apart vertically
    assert f.where[1] == pytest.approx(2.5, abs=UM) and f.to[1] == pytest.approx(0.5, abs=UM)
    assert math.dist(f.where, f.to) == pytest.approx(f.measured_mm, abs=UM)
    assert "2.00 mm apart on top" in f.message and "2.50 mm required at 385 V" in f.message
    assert "B2, 301-500 V" in f.message


@pytest.mark.parametrize("centres", [3.5, 3.6, 10.0])
def test_no_finding_when_gap_meets_requirement(centres):
    """Gap = centres - 1 mm (by hand): 2.5 mm equals the B2 301-500 V requirement (not
    closer than required), larger gaps pass too (IPC-2221B Table 6-1, from memory)."""
    found, _ = run(two_tracks(centres))
    assert found == []


def test_two_discs_gap_by_hand_and_by_shapely():
    """Two 1.6 mm round pads with centres 2.6 mm apart: gap = 2.6 - 0.8 - 0.8 = 1.0 mm
    (hand); shapely on independently built circles agrees to 1 um."""
    found, _ = run(two_discs(2.6))
    assert len(found) == 1
    f = found[0]
    assert f.measured_mm == pytest.approx(1.0, abs=UM)
    ref = shapely.distance(Point(0, 0).buffer(0.8, quad_segs=64),
                           Point(2.6, 0).buffer(0.8, quad_segs=64))
    assert abs(f.measured_mm - ref) < UM
    # where is on the first net in sort order (+15V, the disc at x = 2.6), to on HV_BUS
    assert f.where == pytest.approx((1.8, 0.0), abs=UM)
    assert f.to == pytest.approx((0.8, 0.0), abs=UM)


def test_round_pads_use_termination_column():
    """The same discs as component pads: a termination is involved, so IPC-2221B Table
    6-1 A6 (termination, uncoated, to 3050 m), 301-500 V = 1.5 mm applies (from memory)."""
    found, _ = run(two_discs(2.6, pads=True))
    assert len(found) == 1
    assert found[0].extra["column"] == "A6" and found[0].required_mm == 1.5
    assert found[0].extra["class"] == "termination"


def test_two_separate_places_give_two_findings():
    """HV_BUS comes within 1.0 mm of +15V at two spots 30 mm apart (by construction):
    two places, two findings, each 1.0 mm (hand) and located at its own spot."""
    found, _ = run(two_places(1.0))
    assert len(found) == 2
    xs = sorted(f.where[0] for f in found)
    assert 0 - UM <= xs[0] <= 2 + UM and 30 - UM <= xs[1] <= 32 + UM
    for f in found:
        assert f.measured_mm == pytest.approx(1.0, abs=UM)


def test_one_place_with_many_segments_gives_one_finding():
    """A track drawn as 40 short segments running 1.2 mm from another net (gap by hand:
    centre offset 2.0 - half widths 0.4 - 0.4) is one place and one finding."""
    pts = [(x * 0.5, 2.0) for x in range(41)]
    segs = polyline_track(pts, 0.8)
    shapes = [cu(s, "top", "HV_BUS") for s in segs]
    shapes.append(cu(htrack(0.0, 20.0, 0.0, 0.8), "top", "+15V"))
    found, _ = run(make_board(shapes))
    assert len(found) == 1
    assert found[0].measured_mm == pytest.approx(1.2, abs=UM)


def test_termination_column_stricter_than_conductor():
    """At 120 V (101-150 V row) IPC-2221B Table 6-1 gives B2 = 0.6 mm and A6 = 0.8 mm
    (from memory).  A pad 0.6 mm from a track is a violation (A6); the same copper without
    the pad attributes is not (0.6 >= B2 0.6)."""
    v = {"HV_BUS": 120, "+15V": 0}
    found, _ = run(pad_near_track(0.6), v)
    assert len(found) == 1
    f = found[0]
    assert f.extra["column"] == "A6" and f.required_mm == 0.8
    assert f.measured_mm == pytest.approx(0.6, abs=UM)
    assert "at a component termination" in f.message
    plain = pad_near_track(0.6)
    for s in plain.shapes:
        s.pin = s.component = s.function = None
    found, _ = run(plain, v)
    assert found == []


def test_conductor_column_stricter_than_termination():
    """At 40 V (31-50 V row) B2 = 0.6 mm but A6 = 0.4 mm (IPC-2221B Table 6-1, from
    memory): a pad 0.5 mm from a track passes, a plain conductor 0.5 mm away does not."""
    v = {"HV_BUS": 40, "+15V": 0}
    found, _ = run(pad_near_track(0.5), v)
    assert found == []
    plain = pad_near_track(0.5)
    for s in plain.shapes:
        s.pin = s.component = s.function = None
    found, _ = run(plain, v)
    assert len(found) == 1 and found[0].extra["column"] == "B2"
    assert found[0].required_mm == 0.6


def test_track_entering_a_pad_leaves_no_conductor_sliver():
    """A track of the pad's net that ends 1 nm past the pad's near edge must not turn the
    pad's distance into a conductor-to-conductor distance (module docstring: copper within
    SLIVER_MM of a termination is judged as the termination).  At 40 V the pad 0.5 mm away
    passes A6 = 0.4 mm; the sliver would otherwise fail B2 = 0.6 mm (IPC-2221B Table 6-1,
    from memory)."""
    b = pad_near_track(0.5)
    # track from far above down to 1 nm below the pad's lower edge (pad y0 = 1.0)
    b.shapes.append(cu(rect(9.8, 0.999999, 10.2, 8.0), "top", "HV_BUS"))
    found, _ = run(b, {"HV_BUS": 40, "+15V": 0})
    assert found == []


def test_conductor_leaving_a_pad_towards_the_other_net_keeps_its_class():
    """A track leaving the pad and running 0.3 mm from the +15V track is conductor copper
    (farther than SLIVER_MM from the pad): B2 31-50 V = 0.6 mm applies (IPC-2221B Table
    6-1, from memory).  Gap by hand: new track bottom y = 0.8, +15V top y = 0.5 -> 0.3 mm;
    the pad itself (0.5 mm) passes A6 = 0.4 mm."""
    b = pad_near_track(0.5)
    b.shapes.append(cu(rect(11.0, 0.8, 16.0, 1.2), "top", "HV_BUS"))  # 0.3 mm above y=0.5
    found, _ = run(b, {"HV_BUS": 40, "+15V": 0})
    assert len(found) == 1
    f = found[0]
    assert f.extra["class"] == "conductor" and f.required_mm == 0.6
    assert f.measured_mm == pytest.approx(0.3, abs=UM)


def test_both_classes_short_in_one_place_give_one_finding():
    """At 40 V: the pad 0.3 mm from the +15V track falls short of A6 = 0.4 mm and a track
    leaving the pad 0.35 mm from it (hand: y 0.85 - 0.5) falls short of B2 = 0.6 mm
    (IPC-2221B Table 6-1, from memory).  One place, one finding: the larger shortfall
    (conductor, 0.25 mm) is reported and the termination's numbers go along with it."""
    b = pad_near_track(0.3)
    b.shapes.append(cu(rect(11.0, 0.85, 14.0, 1.25), "top", "HV_BUS"))
    found, _ = run(b, {"HV_BUS": 40, "+15V": 0})
    assert len(found) == 1
    f = found[0]
    assert f.extra["class"] == "conductor" and f.required_mm == 0.6
    assert f.measured_mm == pytest.approx(0.35, abs=UM)
    assert f.extra["closest_mm"] == pytest.approx(0.3, abs=UM)
    assert f.extra["also"] == [{"class": "termination", "column": "A6",
                                "measured_mm": pytest.approx(0.3, abs=UM), "required_mm": 0.4}]
    assert "component termination is also 0.30 mm away" in f.message


def test_internal_layer_uses_b1():
    """Internal layers use IPC-2221B Table 6-1 B1: 301-500 V = 0.25 mm (from memory).  A
    0.2 mm gap (hand: centres 1.2, width 1.0) fails inside, and fails B2 on top."""
    inner = two_tracks(1.2, layer="in1")
    found, _ = run(inner)
    assert len(found) == 1 and found[0].layer == "in1"
    assert found[0].extra["column"] == "B1" and found[0].required_mm == 0.25
    assert found[0].measured_mm == pytest.approx(0.2, abs=UM)
    found, _ = run(two_tracks(1.3, layer="in1"))   # 0.3 mm >= 0.25 mm
    assert found == []
    found, _ = run(two_tracks(1.3, layer="top"))
    assert len(found) == 1 and found[0].extra["column"] == "B2"


def test_voltages_from_globs_and_fallback():
    """Project voltages: "HV_*" glob gives 400 V, "*" gives 0..15 V; the working voltage is
    the largest difference, 400 - 0 = 400 V -> B2 301-500 V = 2.5 mm (IPC-2221B Table 6-1,
    from memory)."""
    b = two_tracks(3.0, nets=("HV_BUS", "GATE_LO"))
    found, _ = run(b, {"HV_*": 400, "*": "0..15"})
    assert len(found) == 1 and found[0].voltage_v == 400 and found[0].required_mm == 2.5


def test_swinging_node_uses_largest_difference():
    """A switch node 0..400 V next to a 0..15 V net: largest difference 400 V (by hand,
    VoltageRange.difference_to); a 600 V bus next to it: 600 - 0 = 600 V -> B2 above
    500 V = 2.5 + 100 x 0.005 = 3.0 mm (IPC-2221B Table 6-1 add-to-500, from memory)."""
    found, _ = run(two_tracks(3.0, nets=("SW", "GATE")), {"SW": "0..400", "GATE": "0..15"})
    assert found[0].voltage_v == 400
    found, _ = run(two_tracks(3.0, nets=("SW", "BUS")), {"SW": "0..400", "BUS": 600})
    assert found[0].voltage_v == 600 and found[0].required_mm == pytest.approx(3.0)


def test_solder_mask_conductors_use_b4():
    """Coating "solder-mask": conductors use B4, 301-500 V = 0.8 mm (IPC-2221B Table 6-1,
    from memory).  Gap 0.7 mm (hand) fails, 0.9 mm passes."""
    found, _ = run(two_tracks(1.7), coating="solder-mask")
    assert len(found) == 1 and found[0].extra["column"] == "B4" and found[0].required_mm == 0.8
    found, _ = run(two_tracks(1.9), coating="solder-mask")
    assert found == []


def test_conformal_a5_and_a7_differ_at_280v():
    """Conformal coating at 280 V: pads use A7 = 0.8 mm, conductors A5 = 0.4 mm (the one
    row where they differ; IPC-2221B Table 6-1, from memory).  Gap 0.6 mm (hand)."""
    v = {"HV_BUS": 280, "+15V": 0}
    found, _ = run(two_discs(2.2, pads=True), v, coating="conformal")
    assert len(found) == 1 and found[0].extra["column"] == "A7"
    found, _ = run(two_discs(2.2, pads=False), v, coating="conformal")
    assert found == []


def test_high_altitude_uses_b3():
    """Above 3050 m uncoated conductors use B3: 151-170 V = 3.2 mm (IPC-2221B Table 6-1,
    from memory); a 2.0 mm gap that passes B2 (1.25 mm) fails at 4000 m."""
    v = {"HV_BUS": 160, "+15V": 0}
    assert run(two_tracks(3.0), v)[0] == []
    found, _ = run(two_tracks(3.0), v, altitude_m=4000)
    assert len(found) == 1 and found[0].extra["column"] == "B3" and found[0].required_mm == 3.2


def test_floating_copper_excluded_and_auto_named_included():
    """Floating copper (no net, no pins) is not checked; nets we named N1.. are (brief).
    Gap 0.05 mm (hand) at 0..15 V against 0..15 V = 15 V -> B2 0-15 V = 0.1 mm."""
    shapes = [cu(rect(0, 0, 1, 1), net="A"), cu(rect(1.05, 0, 2, 1), net="")]
    assert run(make_board(shapes), {"*": "0..15"})[0] == []
    shapes = [cu(rect(0, 0, 1, 1)), cu(rect(1.05, 0, 2, 1))]
    found, _ = run(make_board(shapes, has_net_names=False), {"*": "0..15"})
    assert len(found) == 1 and found[0].nets == ["N1", "N2"]
    assert found[0].measured_mm == pytest.approx(0.05, abs=UM)
    assert found[0].required_mm == 0.1


def test_same_net_is_never_checked():
    """Copper of one net may be as close as it likes (it is one conductor)."""
    shapes = [cu(rect(0, 0, 1, 1), net="A"), cu(rect(1.01, 0, 2, 1), net="A")]
    assert run(make_board(shapes), {"A": 400})[0] == []


def test_assumptions_name_columns_and_provenance():
    """Assumptions: which column applied and why (once per column) and that the values are
    from memory (once) -- standards notes s.5: the whole table is unverified."""
    _, ctx = run(pad_near_track(0.6), {"HV_BUS": 120, "+15V": 0})
    texts = [a.text for a in ctx.assumptions if a.topic == "clearance"]
    assert any("column B2" in t for t in texts)
    assert any("column A6" in t for t in texts)
    assert sum("from memory" in t for t in texts) == 1
    _, ctx2 = run(two_tracks(3.0))
    assert len([a for a in ctx2.assumptions if "column B2" in a.text]) == 1


def test_plane_with_many_neighbours():
    """A 40 x 40 mm plane with 400 V and 100 small 0 V pads in its antipads: each pad's
    clearance is the antipad ring width (hand: ring radius 1.5 - pad radius 0.5 = 1.0 mm),
    short of 2.5 mm (B2 301-500 V, IPC-2221B Table 6-1 from memory) -> 100 findings, each
    agreeing with shapely on independently built circles."""
    holes_ = [Point(2 + 4 * i, 2 + 4 * j).buffer(1.5, quad_segs=64)
              for i in range(10) for j in range(10)]
    plane = box(0, 0, 40, 40).difference(shapely.union_all(holes_))
    shapes = [cu(plane, "top", "HV_BUS")]
    # pads flattened like the holes (64 chords per quarter: under 0.1 um from the circle)
    shapes += [cu(Point(2 + 4 * i, 2 + 4 * j).buffer(0.5, quad_segs=64), "top", f"S{i}_{j}")
               for i in range(10) for j in range(10)]
    found, _ = run(make_board(shapes), {"HV_BUS": 400, "*": 0})
    assert len(found) == 100
    for f in found:
        assert f.measured_mm == pytest.approx(1.0, abs=UM)


@st.composite
def two_rects(draw):
    coord = st.integers(min_value=0, max_value=400).map(lambda k: k * 0.025)   # 0..10 mm
    size = st.integers(min_value=4, max_value=120).map(lambda k: k * 0.025)    # 0.1..3 mm
    x0, y0, w0, h0 = draw(coord), draw(coord), draw(size), draw(size)
    x1, y1, w1, h1 = draw(coord), draw(coord), draw(size), draw(size)
    volts = draw(st.sampled_from([10, 40, 120, 160, 280, 400, 700]))
    layer = draw(st.sampled_from(["top", "in1"]))
    return (x0, y0, x0 + w0, y0 + h0), (x1, y1, x1 + w1, y1 + h1), volts, layer


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.filter_too_much])
@given(two_rects())
def test_property_random_rectangles(case):
    """Random pairs of axis-aligned rectangles on two nets: a finding exists iff the gap is
    shorter than required, and its measured_mm equals both the hand formula for rectangle
    gaps and shapely.distance of independently built boxes to 1 um.  Required values:
    IPC-2221B Table 6-1 (from memory) via ipc2221b_spacing, whose values are tested
    separately against the table."""
    ra, rb, volts, layer = case
    assume(not box(*ra).intersects(box(*rb)))      # touching copper would be one island
    b = make_board([cu(rect(*ra), layer, "A"), cu(rect(*rb), layer, "B")],
                   layers=("top", "in1", "bottom"))
    found, _ = run(b, {"A": volts, "B": 0})
    gap = hand_gap_rects(ra, rb)
    ref = shapely.distance(box(*ra), box(*rb))
    assert abs(gap - ref) < 1e-9
    column = "B2" if layer == "top" else "B1"
    required = ipc2221b_spacing(volts, column).mm
    expected = gap < required - clearance.TOLERANCE_MM
    assert (len(found) == 1) == expected
    assert len(found) <= 1
    if found:
        f = found[0]
        assert abs(f.measured_mm - ref) < UM
        assert f.required_mm == required
        assert math.dist(f.where, f.to) == pytest.approx(f.measured_mm, abs=UM)
        # where lies on A's copper, to on B's (nets sorted: A first)
        assert shapely.distance(box(*ra), Point(f.where)) < UM
        assert shapely.distance(box(*rb), Point(f.to)) < UM


def test_result_is_deterministic():
    """Same input, same findings (project rule: deterministic output)."""
    a, _ = run(two_places(1.0))
    b, _ = run(two_places(1.0))
    assert [(f.where, f.to, f.measured_mm, f.message) for f in a] == \
        [(f.where, f.to, f.measured_mm, f.message) for f in b]


def test_diagonal_approach_distance_by_hand():
    """Corner-to-corner approach: rectangles offset by (1.2, 1.6) -> gap
    sqrt(1.2^2 + 1.6^2) = 2.0 mm (3-4-5 triangle, by hand)."""
    shapes = [cu(rect(0, 0, 2, 2), net="HV_BUS"), cu(rect(3.2, 3.6, 5, 5), net="+15V")]
    found, _ = run(make_board(shapes))
    assert len(found) == 1
    assert found[0].measured_mm == pytest.approx(2.0, abs=UM)
    assert found[0].to == pytest.approx((2.0, 2.0), abs=UM)
    assert found[0].where == pytest.approx((3.2, 3.6), abs=UM)


def test_line_segment_track_round_caps():
    """A round-capped 0.5 mm track ending 1.5 mm from a pad edge, measured from its end cap:
    gap = 1.5 - 0.25 = 1.25 mm (hand); shapely agrees on an independent buffer."""
    trk = LineString([(-10, 0), (0, 0)]).buffer(0.25, quad_segs=64)
    pad = rect(1.5, -1, 3.5, 1)
    found, _ = run(make_board([cu(trk, net="HV_BUS"), cu(pad, net="+15V")]))
    assert len(found) == 1
    ref = shapely.distance(LineString([(-10, 0), (0, 0)]).buffer(0.25, quad_segs=128), pad)
    assert found[0].measured_mm == pytest.approx(1.25, abs=UM)
    assert abs(found[0].measured_mm - ref) < UM
