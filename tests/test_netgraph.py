"""Net graph: islands, plated-hole joins, shorts, splits, floating copper, auto-naming.

Sources: the Gerber Layer Format Specification's intended connectivity check as quoted in
shared/reference/formats.md s.1.10 ("pads that share a net name must connect; pads with
different names must be isolated; N/C nets count as unique; flashes with the same refdes
and pin count as connected") and s.2.5 ("only plated holes join copper layers ... every
copper layer in their span").  Geometry facts are worked by hand or computed by shapely on
independently built geometry.
"""
from __future__ import annotations

import random

import numpy as np
import pytest
import shapely
from shapely.geometry import Point

from boards import cu, hole, make_board, project, rect
from layoutcheck.checks import CheckContext
from layoutcheck.checks import connectivity
from layoutcheck.netgraph import build_netgraph


def test_overlapping_shapes_form_one_island():
    """Overlapping copper is one conductor (common practice); the island's area is the
    union's: 2x1 + 2x1 overlapping by 0.5x1 -> 3.5 mm^2 (by hand)."""
    b = make_board([cu(rect(0, 0, 2, 1), net="A"), cu(rect(1.5, 0, 3.5, 1), net="A"),
                    cu(rect(5, 0, 6, 1), net="B")])
    g = build_netgraph(b)
    assert len(g.islands) == 2
    first = g.islands[g.shape_island[0]]
    assert first.shapes == [0, 1]
    assert first.area == pytest.approx(3.5, abs=1e-12)
    assert g.shape_island[0] == g.shape_island[1] != g.shape_island[2]
    assert g.nets == {"A": [first.id], "B": [int(g.shape_island[2])]}
    assert not g.shorts and not g.splits and not g.floating


def test_touching_at_a_corner_counts_as_joined():
    """Documented choice (module docstring): copper meeting at a point is connected, so a
    corner contact of two differently named shapes is a short at that corner (0 area)."""
    b = make_board([cu(rect(0, 0, 1, 1), net="A"), cu(rect(1, 1, 2, 2), net="B")])
    g = build_netgraph(b)
    assert len(g.islands) == 1
    assert len(g.shorts) == 1
    assert g.shorts[0].where == pytest.approx((1.0, 1.0), abs=1e-9)


def test_plated_hole_joins_layers_and_carries_the_name():
    """Formats notes s.2.5: a plated hole joins every copper layer in its span.  The
    bottom pad has no name; it takes the top pad's net through the hole."""
    b = make_board([cu(rect(0, 0, 2, 2), "top", "A"), cu(rect(0, 0, 2, 2), "bottom"),
                    cu(rect(10, 0, 12, 2), "bottom", "B")],
                   holes=[hole(1, 1, 0.8)])
    g = build_netgraph(b)
    top, bot = int(g.shape_island[0]), int(g.shape_island[1])
    assert g.graph.has_edge(top, bot)
    assert g.graph.edges[top, bot]["hole"] == 0
    assert g.net_of_island(bot) == "A"
    assert g.nets_on_layer("bottom") == ["A", "B"]


def test_non_plated_hole_does_not_join():
    """Formats notes s.2.5: only plated holes join copper layers.  The unnamed bottom pad
    stays apart and, with no pins, is floating copper."""
    b = make_board([cu(rect(0, 0, 2, 2), "top", "A"), cu(rect(0, 0, 2, 2), "bottom")],
                   holes=[hole(1, 1, 0.8, plated=False)])
    g = build_netgraph(b)
    top, bot = int(g.shape_island[0]), int(g.shape_island[1])
    assert not g.graph.has_edge(top, bot)
    assert g.net_of_island(bot) is None
    assert g.floating == [bot]


def test_blind_via_joins_only_its_span():
    """Formats notes s.2.5: a plated hole joins the copper layers *in its span*; a top..in1
    via on a 4-layer board does not touch in2 or bottom copper under it."""
    layers = ("top", "in1", "in2", "bottom")
    shapes = [cu(rect(0, 0, 2, 2), layer, "A" if layer == "top" else None)
              for layer in layers]
    b = make_board(shapes, holes=[hole(1, 1, 0.3, span=("top", "in1"))], layers=layers)
    g = build_netgraph(b)
    isl = [int(g.shape_island[k]) for k in range(4)]
    assert g.net_of_island(isl[1]) == "A"
    assert g.net_of_island(isl[2]) is None and g.net_of_island(isl[3]) is None
    assert sorted(g.floating) == sorted(isl[2:])


def test_hole_does_not_join_copper_behind_an_antipad():
    """A plane with a clearance ring (antipad) around the hole is not joined by it
    (common practice); only copper the hole touches joins."""
    plane = rect(-5, -5, 5, 5).difference(Point(0, 0).buffer(0.8, quad_segs=32))
    b = make_board([cu(rect(-0.5, -0.5, 0.5, 0.5), "top", "SIG"), cu(plane, "bottom", "GND")],
                   holes=[hole(0, 0, 0.4)])
    g = build_netgraph(b)
    assert g.graph.number_of_edges() == 0
    assert not g.shorts


def test_short_on_one_island_located_in_the_overlap():
    """Formats notes s.1.10: pads with different names must be isolated.  The reported
    point lies in the overlap of the two named shapes (checked with shapely on the
    shapes themselves); the copper is checked under the alphabetically first name."""
    a, b_ = rect(0, 0, 3, 1), rect(2.5, 0, 6, 1)
    b = make_board([cu(a, net="VBUS"), cu(b_, net="GND")])
    g = build_netgraph(b)
    assert len(g.shorts) == 1
    s = g.shorts[0]
    assert s.nets == ("GND", "VBUS") and s.checked_as == "GND" and s.layer == "top"
    assert shapely.intersection(a, b_).buffer(1e-9).contains(Point(s.where))
    assert g.nets == {"GND": [0]}


def test_short_through_a_plated_hole_located_at_the_hole():
    """A plated hole joining A on top to B on bottom shorts them at the hole centre
    (formats notes s.2.5, by hand: hole at (1, 1))."""
    b = make_board([cu(rect(0, 0, 2, 2), "top", "A"), cu(rect(0, 0, 2, 2), "bottom", "B")],
                   holes=[hole(1, 1, 0.6)])
    g = build_netgraph(b)
    assert len(g.shorts) == 1
    s = g.shorts[0]
    assert s.nets == ("A", "B") and s.hole == 0 and s.layer is None
    assert s.where == pytest.approx((1.0, 1.0), abs=1e-6)


def test_hole_net_name_conflicting_with_copper_is_a_short():
    """A plated hole may carry .N (formats notes s.2.6); a hole named B in copper named A
    joins the two names at the hole."""
    b = make_board([cu(rect(0, 0, 2, 2), "top", "A")], holes=[hole(1, 1, 0.6, net="B")])
    g = build_netgraph(b)
    assert [(s.nets, s.hole) for s in g.shorts] == [(("A", "B"), 0)]


def test_short_through_unnamed_copper_is_located_on_the_path():
    """A on top -> via 0 -> unnamed bottom track -> via 1 -> B on top: the names meet only
    through unnamed copper; the short is placed at the first via on the path (hand)."""
    b = make_board([cu(rect(0, 0, 2, 2), "top", "A"), cu(rect(10, 0, 12, 2), "top", "B"),
                    cu(rect(0, 0, 12, 2), "bottom")],
                   holes=[hole(1, 1, 0.4), hole(11, 1, 0.4)])
    g = build_netgraph(b)
    assert len(g.shorts) == 1
    assert g.shorts[0].nets == ("A", "B")
    assert g.shorts[0].hole in (0, 1)
    assert g.shorts[0].where == pytest.approx(b.holes[g.shorts[0].hole].centre, abs=1e-9)


def test_three_names_give_a_spanning_set_of_shorts():
    """k names on one conductor -> k-1 meeting records (documented), all naming the full
    set."""
    b = make_board([cu(rect(0, 0, 2, 1), net="C"), cu(rect(1.5, 0, 4, 1), net="A"),
                    cu(rect(3.5, 0, 6, 1), net="B")])
    g = build_netgraph(b)
    assert len(g.shorts) == 2
    assert all(s.all_nets == ("A", "B", "C") for s in g.shorts)
    assert {frozenset(s.nets) for s in g.shorts} == {frozenset("AC"), frozenset("AB")}


def test_split_net_located_on_the_smaller_piece():
    """Formats notes s.1.10: pads that share a net name must connect.  The bigger piece is
    the main one; the record points into the other piece (checked with shapely)."""
    small = rect(20, 0, 21, 1)
    b = make_board([cu(rect(0, 0, 10, 1), net="SW"), cu(small, net="SW")])
    g = build_netgraph(b)
    assert len(g.splits) == 1
    s = g.splits[0]
    assert (s.net, s.pieces, s.piece, s.layer) == ("SW", 2, 2, "top")
    assert small.contains(Point(s.where))
    assert sorted(g.nets["SW"]) == [0, 1]


def test_three_pieces_give_two_split_records():
    """A net in three pieces: one record per extra piece, each saying 3 pieces."""
    b = make_board([cu(rect(0, 0, 10, 1), net="SW"), cu(rect(20, 0, 21, 1), net="SW"),
                    cu(rect(30, 0, 32, 1), net="SW")])
    g = build_netgraph(b)
    assert [(s.pieces, s.piece) for s in g.splits] == [(3, 2), (3, 3)]
    assert rect(30, 0, 32, 1).contains(Point(g.splits[0].where))  # larger extra first


def test_same_pin_pads_count_as_connected():
    """Formats notes s.1.10: flashes with the same refdes and pin count as connected, so
    two separate pads of Q1 pin 2 named the same are not a split."""
    b = make_board([cu(rect(0, 0, 1, 1), net="D", component="Q1", pin="2"),
                    cu(rect(5, 0, 6, 1), net="D", component="Q1", pin="2")])
    g = build_netgraph(b)
    assert not g.splits
    assert g.graph.edges[0, 1]["pin"] == ("Q1", "2")


def test_no_connect_pads_are_unique():
    """Formats notes s.1.10: N/C nets count as unique: two N/C pads are not one net in two
    pieces, and each gets its own name."""
    b = make_board([cu(rect(0, 0, 1, 1), net="N/C", component="U1", pin="3"),
                    cu(rect(5, 0, 6, 1), net="N/C", component="U1", pin="4")])
    g = build_netgraph(b)
    assert not g.splits and not g.shorts and not g.floating
    assert sorted(g.nets) == ["N/C-1", "N/C-2"]


def test_floating_island_and_its_finding():
    """Copper on no net and with no pins is floating; the finding gives its area, worked
    by hand (1.5 x 2 = 3.0 mm^2), and a point on it."""
    island = rect(10, 10, 11.5, 12)
    b = make_board([cu(rect(0, 0, 1, 1), net="A"), cu(island, net="")])
    g = build_netgraph(b)
    assert g.floating == [1]
    ctx = CheckContext(b, g, project({"*": 5}))
    found = [f for f in connectivity.run(ctx) if f.rule == "floating-copper"]
    assert len(found) == 1
    f = found[0]
    assert f.severity == "info" and f.layer == "top"
    assert f.extra["area_mm2"] == pytest.approx(3.0, abs=1e-9)
    assert island.contains(Point(f.where))
    assert "marked as no net" in f.message


def test_unnamed_pin_group_is_auto_named_with_assumption():
    """With net names in the files, unnamed copper joining component pins is still a net:
    named N1 and recorded as an assumption listing its pins."""
    b = make_board([cu(rect(0, 0, 1, 1), net="A"),
                    cu(rect(5, 0, 6, 1), component="R1", pin="1"),
                    cu(rect(5.5, 0, 9, 1)),
                    cu(rect(8, 0, 9, 1), component="C3", pin="2")])
    g = build_netgraph(b)
    assert g.auto_named == {"N1"}
    assert g.pins_of("N1") == [("C3", "2"), ("R1", "1")]
    ctx = CheckContext(b, g, project({"*": 5}))
    connectivity.run(ctx)
    texts = [a.text for a in ctx.assumptions if a.topic == "nets"]
    assert len(texts) == 1 and "C3.2" in texts[0] and "R1.1" in texts[0] and "N1" in texts[0]


def _unnamed_shapes():
    return [cu(rect(30, 0, 31, 1), "top"), cu(rect(0, 5, 1, 6), "top"),
            cu(rect(0, 0, 1, 1), "bottom"), cu(rect(10, 0, 11, 1), "top"),
            cu(rect(0, 5.5, 3, 6), "top")]


def test_auto_naming_without_net_names_is_deterministic():
    """Without net names every conductor is N1, N2, ... by (lowest layer, min x, min y),
    worked by hand: top (0,5) -> N1, top (10,0) -> N2, top (30,0) -> N3, bottom -> N4;
    shuffling the input does not change the names given to each piece of copper."""
    expected = {(0.0, 5.0, "top"): "N1", (10.0, 0.0, "top"): "N2",
                (30.0, 0.0, "top"): "N3", (0.0, 0.0, "bottom"): "N4"}
    for seed in range(4):
        shapes = _unnamed_shapes()
        random.Random(seed).shuffle(shapes)
        b = make_board(shapes, has_net_names=False)
        g = build_netgraph(b)
        got = {}
        for isl in g.islands:
            x0, y0, _, _ = isl.geometry.bounds
            got[(x0, y0, isl.layer)] = g.net_of_island(isl.id)
        assert got == expected
        assert g.auto_named == {"N1", "N2", "N3", "N4"} and not g.floating


def test_auto_naming_assumption_counts_conductors():
    """The connectivity rule states once that nets were found from the copper, with the
    count (4 conductors in the board above, by hand)."""
    b = make_board(_unnamed_shapes(), has_net_names=False)
    ctx = CheckContext(b, None, project({"*": 5}))
    assert connectivity.run(ctx) == []
    texts = [a.text for a in ctx.assumptions if a.topic == "nets"]
    assert len(texts) == 1 and "4 separate conductors" in texts[0] and "N1..N4" in texts[0]


def test_auto_names_do_not_collide_with_file_names():
    """A file that already uses the name N1 keeps it; our name skips to N2."""
    b = make_board([cu(rect(0, 0, 1, 1), net="N1"),
                    cu(rect(5, 0, 6, 1), component="R1", pin="1")])
    g = build_netgraph(b)
    assert g.auto_named == {"N2"}


def test_connectivity_findings_for_short_and_split():
    """net-short and net-split findings carry the nets, a location and say what happened."""
    b = make_board([cu(rect(0, 0, 3, 1), net="VBUS"), cu(rect(2.5, 0, 6, 1), net="GND"),
                    cu(rect(20, 0, 21, 1), net="VBUS")])
    ctx = CheckContext(b, None, project({"*": 5}))
    found = connectivity.run(ctx)
    short = [f for f in found if f.rule == "net-short"]
    split = [f for f in found if f.rule == "net-split"]
    assert len(short) == 1 and short[0].nets == ["GND", "VBUS"]
    assert "GND" in short[0].message and "VBUS" in short[0].message
    assert "top" in short[0].message and short[0].severity == "error"
    assert len(split) == 1 and split[0].nets == ["VBUS"] and "2 unconnected pieces" in \
        split[0].message
    assert rect(20, 0, 21, 1).contains(Point(split[0].where))


def test_netgraph_api_geometry_and_pins():
    """net_geometry is the union of a net's islands on a layer: area 2 + 1 = 3 mm^2 (hand)."""
    b = make_board([cu(rect(0, 0, 2, 1), net="A", component="J1", pin="1"),
                    cu(rect(5, 0, 6, 1), net="A"), cu(rect(5, 0, 6, 1), "bottom", net="B")])
    g = build_netgraph(b)
    assert g.net_geometry("A", "top").area == pytest.approx(3.0, abs=1e-12)
    assert g.net_geometry("A", "bottom").is_empty
    assert g.net_geometry("A", "top") is g.net_geometry("A", "top")  # cached
    assert g.pins_of("A") == [("J1", "1")]
    assert g.nets_on_layer("top") == ["A"] and g.nets_on_layer("bottom") == ["B"]


def test_many_shapes_grouped_correctly():
    """5000 shapes: 1000 chains of 5 overlapping 1.2 mm segments (pitch 1 mm) on a 2 mm
    grid of rows -> exactly 1000 islands, each of area 5.2 x 0.3 (by hand)."""
    n_chain, per = 1000, 5
    shapes = []
    for c in range(n_chain):
        y = 2.0 * (c % 100)
        x = 10.0 * (c // 100)
        for k in range(per):
            shapes.append(cu(rect(x + k, y, x + k + 1.2, y + 0.3), net=f"S{c}"))
    g = build_netgraph(make_board(shapes))
    assert len(g.islands) == n_chain
    areas = np.array([isl.area for isl in g.islands])
    assert np.allclose(areas, 5.2 * 0.3, atol=1e-9)
    assert not g.shorts and not g.splits
