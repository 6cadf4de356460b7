"""Current path on one net between two pads (layoutcheck.geometry.current_path).

Sources named beside each check:
* path lengths worked by hand: Pythagoras for straight legs, the shortest path around a
  convex obstacle runs along the convex hull of the obstacle and the two end points
  (geometry of convex sets, common practice), tangent legs plus r * angle around a circle;
* widths worked by hand: a cut perpendicular to a piece running at angle ``a`` to a track
  of width ``w`` crosses it over ``w / cos(a)``;
* stackup heights worked by hand from the documented layer order (copper mid-planes,
  dielectrics between them);
* shapely's own ``covers`` on independently built copper for "the path stays in copper",
  and a brute-force visibility graph over all polygon vertices (every pair checked with
  shapely ``covers``, solved with networkx Dijkstra) for random pours.
"""
from __future__ import annotations

import math

import networkx as nx
import numpy as np
import pytest
import shapely
import shapely.affinity
from shapely.geometry import LineString, Point, Polygon, box

from boards import cu, disc, hole, htrack, make_board, npth, polyline_track
from layoutcheck.errors import UsageError
from layoutcheck.geometry.current_path import (PLATING_MM, WIDTH_CAP_MM, copper_z,
                                               current_path)
from layoutcheck.model import Stackup
from layoutcheck.netgraph import build_netgraph

NET = "HV_BUS"


def board_of(shapes, holes=(), layers=("top", "bottom"), *, thickness=1.6, copper=None,
             dielectric=None):
    b = make_board(shapes, holes, layers)
    b.stackup = Stackup(thickness_mm=thickness, copper_mm=dict(copper or {}),
                        dielectric_mm=dict(dielectric or {}))
    return b


def solve(board, start, end, net=NET):
    return current_path(board, build_netgraph(board), net, start, end)


def flat(points):
    """x, y of a polyline as one flat list (for pytest.approx)."""
    return [float(v) for p in points for v in p[:2]]


def check_connected(path):
    """Consecutive pieces share their end points, and the length is the sum of pieces."""
    for a, b in zip(path.pieces, path.pieces[1:]):
        assert a.end == b.start
    assert path.length_mm == pytest.approx(sum(math.dist(p.start, p.end)
                                               for p in path.pieces), abs=1e-12)


def check_in_copper(path, copper_by_layer):
    """Every in-plane piece lies in that layer's copper (shapely covers, 1 nm slack)."""
    for p in path.pieces:
        if p.kind == "trace":
            seg = LineString([p.start[:2], p.end[:2]])
            assert copper_by_layer[p.layer].buffer(1e-6).covers(seg)


# -- single layer -------------------------------------------------------------------------------

@pytest.mark.parametrize("width", [0.5, 2.0, 3.2])
@pytest.mark.parametrize("angle", [0.0, 30.0])
def test_straight_track_width_and_length(width, angle):
    """A straight track: one piece along it, its length the centre distance (by hand) and
    its width exactly the track width (the perpendicular cut crosses the track once)."""
    track = htrack(0.0, 30.0, 0.0, width)
    rot = shapely.affinity.rotate(track, angle, origin=(0, 0))
    s = shapely.affinity.rotate(Point(2, 0), angle, origin=(0, 0))
    e = shapely.affinity.rotate(Point(27, 0), angle, origin=(0, 0))
    b = board_of([cu(rot, "top", NET)], copper={"top": 0.07})
    path = solve(b, (s.x, s.y, "top"), (e.x, e.y, "top"))
    assert len(path.pieces) == 1
    p = path.pieces[0]
    assert p.kind == "trace" and p.layer == "top"
    assert p.width == pytest.approx(width, abs=1e-9)
    assert p.thickness == 0.07
    assert path.length_mm == pytest.approx(25.0, abs=1e-9)
    assert p.start[2] == pytest.approx(1.6 - 0.035, abs=1e-12)  # top mid-plane, by hand


def test_l_track_bends_at_the_inner_corner():
    """An L of 2 mm track (x 0..20 along y = 0, then up x = 20 to y = 20), pads at (1, 0)
    and (20, 19).  The shortest path bends once, at the inner corner (19, 1) (by hand:
    the only reflex vertex); length 2 * sqrt(18^2 + 1^2), between the straight distance
    and the centre-line length 19 + 19.  Each leg runs at angle a = atan(1/18) to its arm,
    so its perpendicular cut is 2 / cos(a) = 2 sqrt(325) / 18 (by hand)."""
    shapes = [cu(g, "top", NET) for g in polyline_track([(0, 0), (20, 0), (20, 20)], 2.0)]
    b = board_of(shapes)
    path = solve(b, (1.0, 0.0, "top"), (20.0, 19.0, "top"))
    assert flat(path.points()) == pytest.approx([1.0, 0.0, 19.0, 1.0, 20.0, 19.0], abs=1e-9)
    hand = 2 * math.sqrt(325.0)
    assert path.length_mm == pytest.approx(hand, abs=1e-9)
    assert math.hypot(19, 19) < path.length_mm < 38.0
    for p in path.pieces:
        assert p.width == pytest.approx(2 * math.sqrt(325.0) / 18.0, abs=1e-9)
    check_connected(path)
    check_in_copper(path, {"top": shapely.union_all([s.geometry for s in shapes])})


@pytest.mark.parametrize("cut, bends", [
    ((8, -4, 12, 2), [(8.0, 2.0), (12.0, 2.0)]),     # shorter route above
    ((8, -2, 12, 4), [(8.0, -2.0), (12.0, -2.0)]),   # mirrored: shorter route below
])
def test_pour_with_a_cut_out_goes_around_it(cut, bends):
    """A 30 x 20 mm pour with a 4 x 6 mm cut-out between pads at (0, 0) and (20, 0).  The
    path runs along the convex hull of the cut-out and the pads on the near side: legs to
    the two corners 2 mm off the axis and 4 mm along the cut-out, 2 sqrt(8^2 + 2^2) + 4;
    the far side would be 2 sqrt(8^2 + 4^2) + 4 (by hand)."""
    pour = Polygon(box(-5, -10, 25, 10).exterior.coords, [box(*cut).exterior.coords])
    b = board_of([cu(pour, "top", NET)])
    path = solve(b, (0.0, 0.0, "top"), (20.0, 0.0, "top"))
    assert path.length_mm == pytest.approx(2 * math.sqrt(68.0) + 4.0, abs=1e-9)
    assert path.length_mm < 2 * math.sqrt(80.0) + 4.0
    assert flat(path.points()) == pytest.approx(flat([(0.0, 0.0), *bends, (20.0, 0.0)]),
                                                abs=1e-9)
    # widths by hand: the leg along the cut-out's edge sees copper from that edge to the
    # pour's edge (8 mm); the slanted legs cross the 20 mm pour at atan(2/8) to its normal
    assert [p.width for p in path.pieces] == pytest.approx(
        [20 * math.sqrt(68.0) / 8, 8.0, 20 * math.sqrt(68.0) / 8], abs=1e-9)
    check_connected(path)
    check_in_copper(path, {"top": pour})


def test_non_plated_hole_in_a_pour_is_gone_around():
    """A non-plated hole of diameter 4 drilled through a 30 x 20 mm pour between pads at
    (-10, 0) and (10, 0): the drill removes the copper, so the path is two tangents
    sqrt(10^2 - 2^2) plus the arc 2 (pi - 2 acos(2/10)) (by hand).  The hole is flattened
    finely (1024 chords), so the polygon path is within 0.5 um of the true curve."""
    pour = box(-15, -10, 15, 10)
    b = board_of([cu(pour, "top", NET)], [npth(disc(0.0, 0.0, 4.0), slot=False)])
    path = solve(b, (-10.0, 0.0, "top"), (10.0, 0.0, "top"))
    hand = 2 * math.sqrt(96.0) + 2.0 * (math.pi - 2 * math.acos(0.2))
    assert path.length_mm == pytest.approx(hand, abs=5e-4)
    line = LineString([(x, y) for x, y, _ in path.points()])
    # the flattened hole's edges are 2 cos(pi / 1024) from its centre (inscribed polygon)
    assert shapely.distance(line, Point(0, 0)) > 2.0 * math.cos(math.pi / 1024) - 1e-9
    check_connected(path)


@pytest.mark.parametrize("pour, width", [
    ((0, -5, 30, 5), 10.0),          # pour 10 mm across the path
    ((0, -1, 30, 20), 21.0),         # off-centre: the whole extent, not a window
    ((0, -100, 30, 100), WIDTH_CAP_MM),   # 200 mm: capped
])
def test_width_on_a_pour_is_its_extent_across_the_path(pour, width):
    """On a rectangular pour a path along x has the pour's height as width (by hand),
    capped at the documented WIDTH_CAP_MM (50 mm)."""
    b = board_of([cu(box(*pour), "top", NET)])
    path = solve(b, (5.0, 0.0, "top"), (25.0, 0.0, "top"))
    assert len(path.pieces) == 1
    assert path.pieces[0].width == pytest.approx(width, abs=1e-9)
    assert WIDTH_CAP_MM == 50.0


# -- layers and vias ----------------------------------------------------------------------------

def two_layer_via_board(thickness, t_top, t_bottom):
    """Track x 0..10 on top, via (0.6 mm hole, 1.2 mm pads) at (10, 0), track x 10..20 on
    the bottom; 1 mm tracks."""
    shapes = [cu(htrack(0, 10, 0, 1.0), "top", NET), cu(disc(10, 0, 1.2), "top", NET),
              cu(disc(10, 0, 1.2), "bottom", NET), cu(htrack(10, 20, 0, 1.0), "bottom", NET)]
    return board_of(shapes, [hole(10, 0, 0.6)], thickness=thickness,
                    copper={"top": t_top, "bottom": t_bottom})


@pytest.mark.parametrize("thickness, t_top, t_bottom", [(1.6, 0.035, 0.035),
                                                         (1.0, 0.07, 0.035)])
def test_two_layers_through_one_via(thickness, t_top, t_bottom):
    """Top track, via, bottom track.  z of the top mid-plane is T - t_top/2, of the bottom
    t_bottom/2, so the barrel piece is T - (t_top + t_bottom)/2 long (for equal copper: board
    thickness minus copper); total 9 + 9 + that (by hand).  The via has the hole diameter
    and the documented plating thickness; segments are bar, tube, bar."""
    b = two_layer_via_board(thickness, t_top, t_bottom)
    path = solve(b, (1.0, 0.0, "top"), (19.0, 0.0, "bottom"))
    zt, zb = thickness - t_top / 2, t_bottom / 2
    assert [p.kind for p in path.pieces] == ["trace", "via", "trace"]
    top, via, bot = path.pieces
    assert top.start == pytest.approx((1.0, 0.0, zt)) and top.end == pytest.approx((10, 0, zt))
    assert via.start == pytest.approx((10, 0, zt)) and via.end == pytest.approx((10, 0, zb))
    assert bot.end == pytest.approx((19.0, 0.0, zb))
    assert via.layer is None and via.span == ("top", "bottom") and via.hole == 0
    assert via.width == 0.6 and via.thickness == PLATING_MM
    assert math.dist(via.start, via.end) == pytest.approx(
        thickness - (t_top + t_bottom) / 2, abs=1e-12)
    assert (top.thickness, bot.thickness) == (t_top, t_bottom)
    assert top.width == pytest.approx(1.0, abs=1e-9) and bot.width == pytest.approx(1.0,
                                                                                   abs=1e-9)
    assert path.length_mm == pytest.approx(18.0 + thickness - (t_top + t_bottom) / 2,
                                           abs=1e-9)
    segs = path.segments()
    assert [s.shape for s in segs] == ["bar", "tube", "bar"]
    assert [s.start for s in segs] == [p.start for p in path.pieces]
    assert [q[2] for q in path.points()] == ["top", "top", "bottom", "bottom"]
    assert flat(path.points()) == pytest.approx([1, 0, 10, 0, 10, 0, 19, 0], abs=1e-9)
    check_connected(path)


def test_copper_z_of_a_four_layer_stack():
    """Four layers, 35 um copper, T = 1.6 mm.  Given dielectrics 0.2 / 1.06 / 0.2 (they
    add up to 1.6 - 4 * 0.035): z = 1.5825, 1.3475, 0.2525, 0.0175 (by hand, top down:
    each step is half the copper above, the dielectric and half the copper below).  With
    no dielectrics given each gets (1.6 - 0.14) / 3."""
    layers = ("top", "in1", "in2", "bottom")
    cu35 = {n: 0.035 for n in layers}
    b = board_of([], layers=layers, copper=cu35,
                 dielectric={"top": 0.2, "in1": 1.06, "in2": 0.2})
    z = copper_z(b)
    assert [z[n] for n in layers] == pytest.approx([1.5825, 1.3475, 0.2525, 0.0175],
                                                   abs=1e-12)
    b = board_of([], layers=layers, copper=cu35)
    z = copper_z(b)
    g = (1.6 - 0.14) / 3
    assert [z[n] for n in layers] == pytest.approx(
        [1.5825, 1.5825 - 0.035 - g, 1.5825 - 2 * (0.035 + g), 0.0175], abs=1e-12)
    one = board_of([], layers=("bottom",), copper={"bottom": 0.07})
    assert copper_z(one) == {"bottom": pytest.approx(0.035)}


def test_via_to_an_inner_layer_stops_there():
    """A through via touching net copper on top and in2 only: its nodes are on those two
    layers, so the barrel piece runs from z(top) to z(in2) = 1.5825 - 0.2525 (by hand,
    stack of the previous test)."""
    layers = ("top", "in1", "in2", "bottom")
    shapes = [cu(htrack(0, 10, 0, 1.0), "top", NET), cu(disc(10, 0, 1.2), "top", NET),
              cu(disc(10, 0, 1.2), "in2", NET), cu(htrack(10, 20, 0, 1.0), "in2", NET)]
    b = board_of(shapes, [hole(10, 0, 0.6)], layers=layers,
                 copper={n: 0.035 for n in layers},
                 dielectric={"top": 0.2, "in1": 1.06, "in2": 0.2})
    path = solve(b, (1.0, 0.0, "top"), (19.0, 0.0, "in2"))
    via = [p for p in path.pieces if p.kind == "via"]
    assert len(via) == 1 and via[0].span == ("top", "in2")
    assert math.dist(via[0].start, via[0].end) == pytest.approx(1.5825 - 0.2525, abs=1e-12)
    assert path.length_mm == pytest.approx(18.0 + 1.33, abs=1e-9)


def via_choice_board(detour: bool):
    """Top: 1 mm track y = 0, x 0..30, vias (0.6 mm, 1.2 mm pads) at (10, 0) and (25, 0).
    Bottom: a 1 mm track from via 2 straight down to (25, -10); from via 1 either a direct
    1 mm track to (25, -10) or a detour down to y = -20, across and up to (25, -10)."""
    shapes = [cu(htrack(0, 30, 0, 1.0), "top", NET)]
    for x in (10, 25):
        shapes += [cu(disc(x, 0, 1.2), "top", NET), cu(disc(x, 0, 1.2), "bottom", NET)]
    shapes.append(cu(box(24.5, -10, 25.5, 0), "bottom", NET))
    if detour:
        shapes += [cu(g, "bottom", NET) for g in
                   polyline_track([(10, 0), (10, -20), (25, -20), (25, -10)], 1.0)]
    else:
        shapes.append(cu(LineString([(10, 0), (25, -10)]).buffer(0.5, cap_style="flat"),
                         "bottom", NET))
    return board_of(shapes, [hole(10, 0, 0.6), hole(25, 0, 0.6)])


@pytest.mark.parametrize("detour, via, planar", [
    (False, 0, 9.0 + math.hypot(15.0, 9.5)),   # via 1: 27.76 mm beats via 2: 33.5 mm
    (True, 1, 24.0 + 9.5),                      # via 1 now 9 + 50-odd: via 2 wins
])
def test_the_shorter_of_two_vias_wins(detour, via, planar):
    """From (1, 0) on top to (25, -9.5) on the bottom.  Through via 1 with the direct
    track: 9 + sqrt(15^2 + 9.5^2) (the straight leg stays inside the 1 mm diagonal track:
    its distance from the track axis grows to 0.42 mm < 0.5 mm); through via 2: 24 + 9.5;
    the detour makes via 1's bottom leg at least 10 + 15 + 10 (by hand).  Both add the
    same barrel length 1.6 - 0.035."""
    b = via_choice_board(detour)
    path = solve(b, (1.0, 0.0, "top"), (25.0, -9.5, "bottom"))
    assert path.holes == [via]
    assert path.length_mm == pytest.approx(planar + 1.6 - 0.035, abs=1e-9)
    check_connected(path)


def test_through_hole_pad_with_no_layer_enters_on_any_layer():
    """A through-hole pad at (0, 0) (1 mm plated hole, 2 mm pads on both layers) joined
    only on the bottom to a track to (9, 0).  Given with layer None the path starts on the
    bottom: one piece of 9 mm, no via.  Given on top it must go down the barrel first:
    9 + 1.6 - 0.035 (by hand)."""
    shapes = [cu(disc(0, 0, 2.0), "top", NET), cu(disc(0, 0, 2.0), "bottom", NET),
              cu(htrack(0, 10, 0, 1.0), "bottom", NET)]
    b = board_of(shapes, [hole(0, 0, 1.0)])
    path = solve(b, (0.0, 0.0, None), (9.0, 0.0, "bottom"))
    assert [p.kind for p in path.pieces] == ["trace"]
    assert path.start == (0.0, 0.0, "bottom")
    assert path.length_mm == pytest.approx(9.0, abs=1e-12)
    path = solve(b, (0.0, 0.0, "top"), (9.0, 0.0, "bottom"))
    assert [p.kind for p in path.pieces] == ["via", "trace"]
    assert path.length_mm == pytest.approx(9.0 + 1.6 - 0.035, abs=1e-12)


# -- errors and determinism -------------------------------------------------------------------

def test_disconnected_pads_raise_naming_net_and_points():
    """Two pieces of one net with a 2 mm gap: no copper path (by construction)."""
    b = board_of([cu(htrack(0, 10, 0, 1.0), "top", NET), cu(htrack(12, 20, 0, 1.0), "top", NET)])
    with pytest.raises(UsageError) as err:
        solve(b, (1.0, 0.0, "top"), (19.0, 0.0, "top"))
    msg = str(err.value)
    assert NET in msg and "(1.000, 0.000)" in msg and "(19.000, 0.000)" in msg
    assert "not connected" in msg


def test_non_plated_hole_does_not_join_layers():
    """The two-layer board of the via test with its hole made non-plated: the layers are
    not joined, so there is no path (a non-plated hole joins nothing; common practice)."""
    b = two_layer_via_board(1.6, 0.035, 0.035)
    b.holes[0].plated = False
    with pytest.raises(UsageError, match="not connected"):
        solve(b, (1.0, 0.0, "top"), (19.0, 0.0, "bottom"))


@pytest.mark.parametrize("net, start, match", [
    ("GND", (1.0, 0.0, "top"), "not a net"),
    (NET, (1.0, 5.0, "top"), "not on the copper"),
    (NET, (1.0, 0.0, "in7"), "expected one of top, bottom"),
    (NET, (1.0, 0.0, "bottom"), "not on the copper"),
])
def test_bad_arguments_raise(net, start, match):
    """Unknown net or layer, or a point off the net's copper, is a usage error."""
    b = board_of([cu(htrack(0, 10, 0, 1.0), "top", NET)])
    with pytest.raises(UsageError, match=match):
        solve(b, start, (9.0, 0.0, "top"), net=net)


def test_same_input_same_path():
    """A cut-out centred between the pads gives two routes of equal length (by symmetry);
    the same board built twice gives the same path, piece for piece."""
    def build():
        pour = Polygon(box(-5, -10, 25, 10).exterior.coords,
                       [box(8, -3, 12, 3).exterior.coords])
        return board_of([cu(pour, "top", NET)])
    a = solve(build(), (0.0, 0.0, "top"), (20.0, 0.0, "top"))
    b = solve(build(), (0.0, 0.0, "top"), (20.0, 0.0, "top"))
    assert a.pieces == b.pieces
    assert a.length_mm == pytest.approx(2 * math.sqrt(73.0) + 4.0, abs=1e-9)


# -- against an independent brute force ------------------------------------------------------

def random_pour(seed):
    """A 40 x 30 mm pour with ten random rectangular and coarse round cut-outs in its middle
    (some merge or reach the edge), built with shapely; start in the left fifth, end in
    the right fifth, on the copper."""
    rng = np.random.default_rng(seed)
    cuts = []
    for _ in range(10):
        x, y = rng.uniform([8, 0], [30, 30])
        if rng.random() < 0.5:
            w, h = rng.uniform(1, 8, 2)
            cuts.append(box(x, y, x + w, y + h))
        else:
            cuts.append(Point(x, y).buffer(rng.uniform(0.5, 3), quad_segs=4))
    pour = box(0, 0, 40, 30).difference(shapely.union_all(cuts))
    pour = max(shapely.get_parts(pour), key=lambda g: g.area)
    pts = []
    for lo, hi in ((0, 8), (32, 40)):
        while True:
            p = Point(*rng.uniform([lo, 0], [hi, 30]))
            if pour.contains(p):
                pts.append((p.x, p.y))
                break
    return pour, pts


def brute_force_length(pour, a, b):
    """Shortest path by a visibility graph over *all* ring vertices and the two points,
    every segment checked with shapely covers and solved with networkx Dijkstra (no
    tangent pruning): the textbook construction (shortest paths in a polygon bend only at
    its vertices)."""
    coords = [tuple(c) for ring in [pour.exterior, *pour.interiors] for c in ring.coords[:-1]]
    nodes = [a, b, *coords]
    g = nx.Graph()
    g.add_nodes_from(range(len(nodes)))
    P, Q, I, J = [], [], [], []
    for i in range(len(nodes)):
        for j in range(i + 1, len(nodes)):
            P.append(nodes[i])
            Q.append(nodes[j])
            I.append(i)
            J.append(j)
    segs = shapely.linestrings(np.stack([np.array(P), np.array(Q)], axis=1))
    ok = shapely.covers(pour, segs)
    for k in np.flatnonzero(ok):
        g.add_edge(I[k], J[k], weight=math.dist(P[k], Q[k]))
    try:
        return nx.dijkstra_path_length(g, 0, 1)
    except nx.NetworkXNoPath:
        return None


@pytest.mark.parametrize("seed", range(8))
def test_matches_a_brute_force_visibility_graph(seed):
    """Random pours: the path length equals the brute-force shortest path (shapely covers +
    networkx Dijkstra over every vertex pair), and every piece lies in the copper."""
    pour, (a, b) = random_pour(seed)
    ref = brute_force_length(pour, a, b)
    board = board_of([cu(pour, "top", NET)])
    assert ref is not None   # the largest part was kept, so the points are connected
    path = solve(board, (*a, "top"), (*b, "top"))
    assert path.length_mm == pytest.approx(ref, abs=1e-9)
    check_connected(path)
    check_in_copper(path, {"top": pour})
