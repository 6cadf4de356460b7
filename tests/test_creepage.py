"""Creepage rule: surface paths around slots, grooves bridged under X, places, earth, wiring.

Sources named beside each check:
* path lengths worked by hand (tangent legs by Pythagoras, arcs r * angle, for the corners
  the X/2 opening rounds) -- helpers ``corner_path`` / ``around_rect_slot_end`` in
  tests/boards.py;
* the groove rule and X by pollution degree (PD1 0.25 mm, PD2 1.0 mm): IEC 60664-1 groove
  examples as reproduced second-hand (standards notes s.2d, source H);
* geometry tests inject fixed requirements (``FixedRules``) so their answers do not depend
  on table values; the wiring tests compare with what
  ``layoutcheck.physics.requirements.required_spacing`` returns for the same inputs.
"""
from __future__ import annotations

import math

import pytest
import shapely
from shapely.geometry import LineString, Point, box

from boards import (FixedRules, around_rect_slot_end, cu, hole, iec_project, make_board,
                    npth, pads_across_slot, rect, two_places, two_tracks, with_outline)
from layoutcheck.checks import CheckContext, creepage
from layoutcheck.conductors import PairRules
from layoutcheck.physics.iec60664 import groove_width_x_mm
from layoutcheck.physics.requirements import SpacingProfile, required_spacing

UM = 1e-3
V = {"HV_BUS": 400, "GND": 0}


def run(board, rules=None, project=None, **kw):
    ctx = CheckContext(board, None, project or iec_project(V, **kw))
    return creepage.findings(ctx, rules), ctx


def test_path_goes_around_the_slot_end():
    """Pads 1 x 1 mm at (0, +-3) either side of a 2 x 10 mm slot, X = 1 mm (PD2): the
    path runs around a slot end; length by hand (around_rect_slot_end: corners rounded to
    X/2), below the 12 mm required -> one finding with that length and its path."""
    found, _ = run(pads_across_slot(2.0), FixedRules(12.0))
    hand = around_rect_slot_end((0.5, 2.5), 5.0, 1.0, 1.0)
    assert len(found) == 1
    f = found[0]
    assert f.rule == "creepage" and f.layer == "top" and f.nets == ["GND", "HV_BUS"]
    assert f.measured_mm == pytest.approx(hand, abs=UM)
    assert f.required_mm == 12.0 and f.voltage_v == 400
    assert "path goes around the slot at (0.00, 0.00)" in f.message
    path = f.extra["path"]
    assert LineString(path).length == pytest.approx(f.measured_mm, abs=1e-5)
    assert f.where == tuple(path[0]) and f.to == tuple(path[-1])
    # where is on the first net by name (GND, the lower pad), to on HV_BUS
    assert shapely.distance(box(-0.5, -3.5, 0.5, -2.5), Point(f.where)) < 1e-9
    assert shapely.distance(box(-0.5, 2.5, 0.5, 3.5), Point(f.to)) < 1e-9
    assert max(abs(x) for x, _ in path) > 4.5            # it goes out to a slot end
    assert f.extra["straight_mm"] == pytest.approx(5.0)
    assert f.extra["around"] == ["the slot at (0.00, 0.00)"]


def test_path_long_enough_gives_no_finding():
    """The same board with 11.0 mm required: the straight gap (5 mm, by hand) is short but
    the path around the slot (about 11.11 mm by hand) is long enough -> no finding."""
    assert around_rect_slot_end((0.5, 2.5), 5.0, 1.0, 1.0) > 11.0
    found, _ = run(pads_across_slot(2.0), FixedRules(11.0))
    assert found == []


def test_slot_narrower_than_x_is_crossed_straight():
    """A 0.8 mm slot under X = 1 mm (PD2): creepage = the straight gap 5.0 mm (by hand);
    the message and the assumptions say the slot was bridged (IEC 60664-1 groove rule)."""
    found, ctx = run(pads_across_slot(0.8), FixedRules(6.0))
    assert len(found) == 1
    f = found[0]
    assert f.measured_mm == pytest.approx(5.0, abs=1e-9)
    assert "crosses the slot at (0.00, 0.00) straight (narrower than X = 1 mm)" in f.message
    assert f.extra["bridged"] == ["the slot at (0.00, 0.00)"]
    texts = [a.text for a in ctx.assumptions if a.topic == "creepage"]
    assert any("on top, narrower than X = 1 mm and crossed straight: the slot at (0.00, "
               "0.00)" in t for t in texts)
    assert any("groove width X = 1 mm" in t for t in texts)


def test_pollution_degree_1_uses_smaller_x():
    """Pollution degree 1: X = 0.25 mm (standards notes s.2d), so the 0.8 mm slot is wider
    than X and the path goes around it; hand length with corners rounded to 0.125 mm."""
    x = groove_width_x_mm(1).mm
    assert x == 0.25
    found, _ = run(pads_across_slot(0.8), FixedRules(12.0), pollution_degree=1)
    hand = around_rect_slot_end((0.5, 2.5), 5.0, 0.4, x)
    assert len(found) == 1 and found[0].measured_mm == pytest.approx(hand, abs=UM)
    assert found[0].extra["groove_x_mm"] == 0.25


def test_routed_slot_round_ends_exact():
    """A routed 2 mm slot with round ends (radius 1 mm, centre line x = -4..4): the
    opening leaves it as drawn; hand length: two tangents from the pad corners (0.5, +-2.5)
    to the end circle (centre (4, 0), r = 1) plus the arc between the tangent points."""
    found, _ = run(pads_across_slot(2.0, rounded=True), FixedRules(12.0))
    d2 = 3.5 ** 2 + 2.5 ** 2
    theta = math.atan2(2.5, -3.5) - math.acos(1 / math.sqrt(d2))
    hand = 2 * math.sqrt(d2 - 1) + 2 * theta
    assert len(found) == 1 and found[0].measured_mm == pytest.approx(hand, abs=UM)


def test_outline_cut_out_acts_like_a_slot():
    """The same 2 x 10 mm opening drawn as a cut-out of the board outline (an interior
    ring) instead of a drilled slot: same hand length, named as a cut-out."""
    b = pads_across_slot(2.0)
    b.holes = []
    b.outline = box(-20, -20, 20, 20).difference(box(-5, -1, 5, 1))
    found, _ = run(b, FixedRules(12.0))
    hand = around_rect_slot_end((0.5, 2.5), 5.0, 1.0, 1.0)
    assert len(found) == 1 and found[0].measured_mm == pytest.approx(hand, abs=UM)
    assert "path goes around the cut-out at (0.00, 0.00)" in found[0].message


def test_runs_only_under_iec():
    """Creepage is an IEC 60664-1 notion here: with the default standard (IPC-2221B) the
    rule gives nothing; with "both" it runs."""
    b = pads_across_slot(0.8)
    proj = iec_project(V, standard="iec60664-1")
    proj.environment.standard = "ipc2221b"
    assert run(b, FixedRules(6.0), project=proj)[0] == []
    assert len(run(b, FixedRules(6.0), standard="both")[0]) == 1


def test_inner_layers_have_no_creepage():
    """Inner layers: solid insulation, no surface path (module docstring) -> nothing, even
    for a 0.2 mm gap (by hand: centres 1.2, width 1.0)."""
    found, _ = run(two_tracks(1.2, layer="in1", nets=("HV_BUS", "GND")), FixedRules(5.0))
    assert found == []
    found, _ = run(two_tracks(1.2, layer="top", nets=("HV_BUS", "GND")), FixedRules(5.0))
    assert len(found) == 1 and found[0].measured_mm == pytest.approx(0.2, abs=1e-9)


def test_two_places_two_findings():
    """HV_BUS comes within 1.0 mm (by construction) of +15V at two spots 30 mm apart: two
    places, two findings, one at each spot (same place idea as the clearance rule)."""
    found, _ = run(two_places(1.0), FixedRules(2.0),
                   project=iec_project({"HV_BUS": 400, "+15V": 15}))
    assert len(found) == 2
    xs = sorted(f.where[0] for f in found)
    assert -UM <= xs[0] <= 2 + UM and 30 - UM <= xs[1] <= 32 + UM
    assert all(f.measured_mm == pytest.approx(1.0, abs=1e-9) for f in found)


def test_requirement_comes_from_the_standard_and_insulation_kind():
    """Without injected rules: the required creepage is required_spacing(profile, 400 V,
    rms 400 V) for the pair's insulation kind ([[insulation]] entry, else functional) and
    the basis is its brief creepage lines.  Gaps are set from that requirement (half of it), so
    the test does not depend on the table values themselves."""
    proj = iec_project(V)
    req = required_spacing(SpacingProfile(insulation="functional"), 400, rms_v=400)
    b = two_tracks(1.0 + req.creepage_mm / 2, nets=("HV_BUS", "GND"))
    found, ctx = run(b, project=proj)
    assert len(found) == 1
    f = found[0]
    assert f.required_mm == req.creepage_mm and f.basis == req.brief("creepage")
    assert f.measured_mm == pytest.approx(req.creepage_mm / 2, abs=1e-9)
    assert f.extra["insulation"] == "functional"
    proj2 = iec_project(V, insulation=[{"between": "HV_*", "and": "GND",
                                        "kind": "reinforced"}])
    rr = PairRules(proj2).get("reinforced", 400)
    assert rr.creepage_mm == required_spacing(
        SpacingProfile(insulation="reinforced"), 400, rms_v=400).creepage_mm
    found, _ = run(b, project=proj2)
    assert found[0].required_mm == rr.creepage_mm and found[0].extra["insulation"] == \
        "reinforced"


def test_earth_edge_gets_a_finding():
    """[earth] edge = true: a 2 x 2 mm HV pad 1.0 mm from the board edge (by hand: pad
    x0 = 1, edge x = 0) is 1.0 mm from EARTH:edge, short of 2 mm -> one finding, at
    400 V (earth is 0 V)."""
    b = with_outline(make_board([cu(rect(1, 5, 3, 7), "top", "HV_BUS")]), box(0, 0, 30, 20))
    found, _ = run(b, FixedRules(2.0), earth={"edge": True})
    assert len(found) == 1
    f = found[0]
    assert f.nets == ["EARTH:edge", "HV_BUS"] and f.voltage_v == 400
    assert f.measured_mm == pytest.approx(1.0, abs=1e-9)
    assert f.where[0] == pytest.approx(0.0, abs=1e-9)      # on the edge
    assert run(b, FixedRules(2.0))[0] == []                  # no [earth]: nothing


def test_earthed_mounting_hole():
    """[earth] mounting_holes: a 3.2 mm non-plated hole at (10, 10) carries earthed
    hardware (>= hole_min_mm 2.5).  A pad whose edge is at x = 12.6 is 12.6 - 10 - 1.6 =
    1.0 mm from the hole (by hand); a 2.0 mm hole is not earthed."""
    shapes = [cu(rect(12.6, 9, 14, 11), "top", "HV_BUS")]
    holes = [npth(Point(10, 10).buffer(1.6, quad_segs=64), slot=False, width=3.2),
             npth(Point(20, 10).buffer(1.0, quad_segs=64), slot=False, width=2.0)]
    b = with_outline(make_board(shapes, holes), box(0, 0, 30, 20))
    found, _ = run(b, FixedRules(2.0), earth={"mounting_holes": True})
    assert [f.nets for f in found] == [["EARTH:hole@10.00,10.00", "HV_BUS"]]
    assert found[0].measured_mm == pytest.approx(1.0, abs=UM)


def test_json_report_carries_path():
    """The JSON report puts extra["path"] on the finding as [[x, y], ...]."""
    from layoutcheck.netgraph import build_netgraph
    from layoutcheck.reports.json_report import report_dict
    from layoutcheck.review import Review
    b = pads_across_slot(2.0)
    found, ctx = run(b, FixedRules(12.0))
    rev = Review(b, build_netgraph(b), ctx.project, found, ctx.assumptions, ["creepage"])
    d = report_dict(rev)
    f = [x for x in d["findings"] if x["rule"] == "creepage"][0]
    assert isinstance(f["path"], list) and all(len(p) == 2 for p in f["path"])
    w = f["where"]
    assert f["path"][0] == pytest.approx([w["x_mm"], w["y_mm"]], abs=1e-6)


def test_plated_hole_is_not_an_obstacle():
    """A plated hole is copper, not a hole in the surface: a via of no net between the pads
    is a stepping stone, not something to go around.  Straight gap 5.0 mm (by hand); via
    of diameter 1 at the origin: gaps 2.5 - 0.5 = 2.0 each, chain 4.0 mm."""
    b = make_board([cu(rect(-0.5, 2.5, 0.5, 3.5), "top", "HV_BUS"),
                    cu(rect(-0.5, -3.5, 0.5, -2.5), "top", "GND")],
                   [hole(0, 0, 1.0, plated=True)])
    found, _ = run(b, FixedRules(6.0))
    assert len(found) == 1
    assert found[0].measured_mm == pytest.approx(4.0, abs=UM)   # circle flattened < 1 um
    assert found[0].extra["via"] == ["plated hole at (0.00, 0.00) on no net"]


def test_deterministic():
    """Same input, same findings."""
    a, _ = run(pads_across_slot(2.0), FixedRules(12.0))
    b, _ = run(pads_across_slot(2.0), FixedRules(12.0))
    assert [(f.message, f.extra["path"]) for f in a] == [(f.message, f.extra["path"])
                                                         for f in b]
