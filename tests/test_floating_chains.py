"""Floating conductors as zero-length stepping stones; earth conductors; IEC clearance.

Sources named beside each check:
* gaps worked by hand on axis-aligned rectangles (differences of coordinates) and circles
  (centre distance minus radius); a chain's length is the sum of its gaps (a floating
  conductor takes whatever potential its neighbours give it: common practice, and the
  IEC 60664-1 treatment of an unconnected conductive part in a gap, from memory);
* clearance is the straight air gap: a slot never lengthens it (standards notes s.2d,
  "a slot never increases clearance", derived [M], consistent with S3);
* geometry tests inject fixed requirements (``FixedRules``); IPC-2221B values where used
  come from ``ipc2221b_spacing`` (Table 6-1, from memory), never typed in.
"""
from __future__ import annotations

import pytest
import shapely
from shapely.geometry import Point, box

from boards import (FixedRules, cu, hole, iec_project, islands_between, make_board,
                    pads_across_slot, project, rect, with_outline)
from layoutcheck.checks import CheckContext, clearance, creepage
from layoutcheck.conductors import (end_conductors, shortest_chains, stepping_stones,
                                    straight_gaps)
from layoutcheck.netgraph import build_netgraph
from layoutcheck.physics.requirements import SpacingProfile, required_spacing
from layoutcheck.physics.spacing import ipc2221b_spacing

UM = 1e-3
V = {"HV_BUS": 400, "GND": 0}


def both_rules(board, rules, proj=None):
    proj = proj or iec_project(V)
    ctx = CheckContext(board, None, proj)
    return clearance.findings(ctx, rules), creepage.findings(ctx, rules)


def test_island_between_two_nets_sums_the_gaps():
    """HV block x = -2..0, island x = 1..2 (gap 1.0), GND block from x = 3.5 (gap 1.5):
    straight gap 3.5 mm passes 3.0 mm, through the island 1.0 + 1.5 = 2.5 mm does not (by
    hand).  Clearance and creepage both report the chain and name the island."""
    b = islands_between([1.0, 1.5], [1.0])
    cl, cr = both_rules(b, FixedRules(3.0, 3.0))
    for found, rule in ((cl, "clearance"), (cr, "creepage")):
        assert len(found) == 1
        f = found[0]
        assert f.rule == rule and f.nets == ["GND", "HV_BUS"]
        assert f.measured_mm == pytest.approx(2.5, abs=1e-9)
        assert f.extra["via"] == ["floating top island at (1.50, 1.00)"]
        assert "through floating top island at (1.50, 1.00)" in f.message
        # ends: on GND (x = 3.5) and on HV_BUS (x = 0)
        assert f.where[0] == pytest.approx(3.5) and f.to[0] == pytest.approx(0.0)


def test_chain_of_two_islands_sums_three_gaps():
    """Gaps 0.5, 0.7, 0.6 around islands 1.0 and 0.8 wide: straight 3.6 mm, through both
    islands 0.5 + 0.7 + 0.6 = 1.8 mm (by hand) < 2.0 mm; the chain lists both islands in
    order from the first net (GND, on the right) to HV_BUS."""
    b = islands_between([0.5, 0.7, 0.6], [1.0, 0.8])
    cl, cr = both_rules(b, FixedRules(2.0, 2.0))
    for found in (cl, cr):
        assert len(found) == 1
        f = found[0]
        assert f.measured_mm == pytest.approx(1.8, abs=1e-9)
        assert f.extra["via"] == ["floating top island at (2.60, 1.00)",
                                  "floating top island at (1.00, 1.00)"]
        assert len(f.extra["path"]) == 6


def test_island_off_to_the_side_changes_nothing():
    """An island beside the gap (x = 0.5..3, y = 5..6) gives no shorter chain than the
    direct 3.5 mm: no finding at 3.0 mm; at 4.0 mm only the direct gap is reported."""
    shapes = [cu(rect(-2, 0, 0, 2), "top", "HV_BUS"), cu(rect(3.5, 0, 5.5, 2), "top", "GND"),
              cu(rect(0.5, 5, 3, 6), "top", None)]
    b = make_board(shapes)
    cl, cr = both_rules(b, FixedRules(3.0, 3.0))
    assert cl == [] and cr == []
    cl, cr = both_rules(b, FixedRules(4.0, 4.0))
    assert len(cl) == 1 and "via" not in cl[0].extra
    assert cl[0].measured_mm == pytest.approx(3.5)


def test_chain_replaces_the_direct_finding_in_the_same_place():
    """HV and GND 2.8 mm apart with a 0.3 mm wide island in the gap (gaps 1.0 and 1.5 by
    hand): the direct 2.8 mm and the chain 2.5 mm both fall short of 3.0 mm in one place;
    one finding remains, the chain, recording the direct distance."""
    b = islands_between([1.0, 1.5], [0.3])
    cl, cr = both_rules(b, FixedRules(3.0, 3.0))
    for found in (cl, cr):
        assert len(found) == 1
        assert found[0].measured_mm == pytest.approx(2.5, abs=1e-9)
        assert found[0].extra["direct_mm"] == pytest.approx(2.8, abs=1e-9)


def test_chain_never_runs_through_another_net():
    """HV_BUS, island, LV, island, GND in a row, every gap 0.5 mm: HV-GND through LV would
    be 2.0 mm, but a chain may not pass through a net (LV has its own potential).  The
    HV_BUS-GND chain is HV, island, (straight over LV, whose copper is not an obstacle:
    the pairwise problem of LV) island, GND = 0.5 + 2.0 + 0.5 = 3.0 mm by hand; each
    neighbour pair gets its own chain of 1.0 mm."""
    shapes = [cu(rect(0, 0, 1, 1), "top", "HV_BUS"), cu(rect(1.5, 0, 2, 1), "top", None),
              cu(rect(2.5, 0, 3.5, 1), "top", "LV"), cu(rect(4, 0, 4.5, 1), "top", None),
              cu(rect(5, 0, 6, 1), "top", "GND")]
    b = make_board(shapes)
    g = build_netgraph(b)
    proj = iec_project({"HV_BUS": 400, "LV": 15, "GND": 0})
    ends = end_conductors(b, g, proj, "top")
    stones = stepping_stones(b, g, "top")
    chains = shortest_chains(ends, stones, straight_gaps, 10.0)
    pairs = {(ends[c.a].name, ends[c.b].name): c.length for c in chains}
    assert pairs == {("HV_BUS", "LV"): pytest.approx(1.0), ("GND", "LV"): pytest.approx(1.0),
                     ("GND", "HV_BUS"): pytest.approx(3.0)}


def test_unconnected_pad_is_a_stepping_stone():
    """A pad marked N/C (Gerber X2 single-pad net) between the two nets: gaps 1.0 + 1.5 =
    2.5 mm by hand; named by its pin."""
    b = islands_between([1.0, 1.5], [1.0])
    isl = b.shapes[1]
    isl.net, isl.component, isl.pin = "N/C", "J1", "1"
    cl, _ = both_rules(b, FixedRules(3.0, 3.0))
    # the N/C pad's own gaps to each net are checked as before (it is a net of its own);
    # the chain is the HV_BUS-GND finding
    chain = [f for f in cl if f.nets == ["GND", "HV_BUS"]]
    assert len(chain) == 1 and chain[0].extra["via"] == ["unconnected pad J1.1 (N/C-1)"]
    assert chain[0].measured_mm == pytest.approx(2.5, abs=1e-9)


def test_bare_plated_hole_is_a_stepping_stone():
    """A plated hole of diameter 1.0 on no net at (1.5, 1): gaps from HV (x = 0) 1.5 - 0.5
    = 1.0 and to GND (x = 3.5) 1.5 mm (by hand, circle flattened within 1 um)."""
    shapes = [cu(rect(-2, 0, 0, 2), "top", "HV_BUS"), cu(rect(3.5, 0, 5.5, 2), "top", "GND")]
    b = make_board(shapes, [hole(1.5, 1.0, 1.0)])
    cl, _ = both_rules(b, FixedRules(3.0, 3.0))
    assert len(cl) == 1 and cl[0].extra["via"] == ["plated hole at (1.50, 1.00) on no net"]
    assert cl[0].measured_mm == pytest.approx(2.5, abs=UM)


def test_clearance_is_not_lengthened_by_a_slot():
    """Clearance is the straight air gap: across a 2 mm slot the pads are still 5.0 mm
    apart (by hand), while the creepage path goes around the slot end."""
    b = pads_across_slot(2.0)
    cl, cr = both_rules(b, FixedRules(12.0, 6.0))
    assert len(cl) == 1 and cl[0].rule == "clearance"
    assert cl[0].measured_mm == pytest.approx(5.0, abs=1e-9)
    assert len(cr) == 1 and cr[0].measured_mm > 11.0


def test_clearance_shortened_by_island_under_default_standard():
    """Default standard IPC-2221B: the chain rule applies too.  Gaps are set from the B2
    301-500 V requirement R (ipc2221b_spacing, Table 6-1 from memory): 0.3 R + island R +
    0.3 R; direct 1.6 R passes, the chain 0.6 R does not.  A chain's far ends are not known
    to be terminations or not, so the larger of the conductor (B2) and termination (A6)
    columns is required."""
    r = ipc2221b_spacing(385, "B2").mm
    need = max(r, ipc2221b_spacing(385, "A6").mm)
    b = islands_between([0.3 * r, 0.3 * r], [r])
    ctx = CheckContext(b, None, project({"HV_BUS": 400, "GND": 15}))
    found = clearance.run(ctx)
    assert len(found) == 1
    f = found[0]
    assert f.measured_mm == pytest.approx(0.6 * r, abs=1e-9) and f.required_mm == need
    assert f.extra["via"] == [f"floating top island at ({0.8 * r:.2f}, 1.00)"]


def test_earth_edge_clearance():
    """[earth] edge: an HV pad 1.0 mm from the board edge (by hand) is checked against
    EARTH:edge at the net's full voltage (400 V to 0 V)."""
    b = with_outline(make_board([cu(rect(1, 5, 3, 7), "top", "HV_BUS")]), box(0, 0, 30, 20))
    cl, _ = both_rules(b, FixedRules(3.0, 2.0), iec_project(V, earth={"edge": True}))
    assert len(cl) == 1
    assert cl[0].nets == ["EARTH:edge", "HV_BUS"] and cl[0].voltage_v == 400
    assert cl[0].measured_mm == pytest.approx(1.0, abs=1e-9)


def test_chain_to_earth():
    """An island between an HV pad and the earthed edge: edge at x = 0, island x = 1..2,
    pad from x = 3: 1.0 + 1.0 = 2.0 mm through the island (by hand), direct 3.0 mm."""
    shapes = [cu(rect(3, 5, 5, 7), "top", "HV_BUS"), cu(rect(1, 5.5, 2, 6.5), "top", None)]
    b = with_outline(make_board(shapes), box(0, 0, 30, 20))
    cl, cr = both_rules(b, FixedRules(2.5, 2.5), iec_project(V, earth={"edge": True}))
    for found in (cl, cr):
        assert len(found) == 1 and found[0].nets == ["EARTH:edge", "HV_BUS"]
        assert found[0].measured_mm == pytest.approx(2.0, abs=1e-9)
        assert found[0].extra["via"] == ["floating top island at (1.50, 6.00)"]


def test_iec_clearance_basis_and_both():
    """Under IEC 60664-1 the required clearance is required_spacing(...).clearance_mm with
    no termination class; under "both" the larger of IEC and IPC, the basis saying which
    governs.  Gaps are set from those values (half of them), so no table value is typed."""
    for std in ("iec60664-1", "both"):
        req = required_spacing(SpacingProfile(standard=std, insulation="functional"), 400,
                               rms_v=400, layer_outer=True, termination=False)
        gap = req.clearance_mm / 2
        b = make_board([cu(rect(0, 0, 2, 2), "top", "HV_BUS"),
                        cu(rect(2 + gap, 0, 4, 2), "top", "GND")])
        ctx = CheckContext(b, None, iec_project(V, standard=std))
        found = clearance.run(ctx)
        assert len(found) == 1
        f = found[0]
        assert f.required_mm == req.clearance_mm and f.basis == req.brief("clearance")
        assert f.extra["standard"] == req.clearance_by and f.measured_mm == pytest.approx(gap)
        if std == "both":
            assert "governs" in f.basis


def test_floating_copper_alone_is_not_checked():
    """A floating island near a single net makes no chain (a chain needs two ends)."""
    shapes = [cu(rect(0, 0, 1, 1), "top", "HV_BUS"), cu(rect(1.05, 0, 2, 1), "top", None)]
    cl, cr = both_rules(make_board(shapes), FixedRules(3.0, 3.0))
    assert cl == [] and cr == []


def test_chain_gaps_agree_with_shapely():
    """Each leg of a clearance chain is shapely's distance between the two conductors it
    joins (independently built boxes)."""
    b = islands_between([0.5, 0.7, 0.6], [1.0, 0.8])
    cl, _ = both_rules(b, FixedRules(2.0, 2.0))
    path = cl[0].extra["path"]
    legs = [shapely.distance(Point(path[k]), Point(path[k + 1])) for k in (0, 2, 4)]
    ref = [shapely.distance(box(3.6, 0, 5.6, 2), box(2.2, 0.5, 3.0, 1.5)),
           shapely.distance(box(2.2, 0.5, 3.0, 1.5), box(0.5, 0.5, 1.5, 1.5)),
           shapely.distance(box(0.5, 0.5, 1.5, 1.5), box(-2, 0, 0, 2))]
    assert legs == pytest.approx(ref, abs=1e-9)
