"""Surface geodesics around slots and cut-outs (layoutcheck.geometry.paths).

Sources named beside each check:
* path lengths around slot ends and notches worked by hand (Pythagoras for the tangent
  legs, r * angle for the arcs the X/2 opening leaves at convex corners);
* the IEC 60664-1 groove rule (narrower than X: crossed straight; standards notes s.2d,
  second-hand source H) decides which slots are bridged;
* independent references: the shortest path around one convex obstacle runs along the
  convex hull of the obstacle and the two end points (geometry of convex sets, common
  practice), and a brute-force visibility graph over *all* obstacle vertices, checked
  segment by segment with shapely and solved with networkx Dijkstra (no pruning);
* shapely's own distance / covers on independently built geometry.
"""
from __future__ import annotations

import math

import networkx as nx
import numpy as np
import pytest
import shapely
import shapely.affinity
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st
from shapely.geometry import LineString, MultiPoint, Point, box

from layoutcheck.geometry.paths import Obstacle, geodesic, open_obstacles, surface_domain

UM = 1e-3
BOARD = box(-20, -20, 20, 20)
PAD_A = box(-0.5, 2.5, 0.5, 3.5)
PAD_B = box(-0.5, -3.5, 0.5, -2.5)


def domain_with(obstacles, x_mm=1.0, outline=BOARD):
    return surface_domain(outline, [Obstacle(g, "slot", (0.0, 0.0)) for g in obstacles], x_mm)


def around_corner(p, c, r, end_angle):
    """Hand formula: from point p, tangent to the circle (centre c, radius r), then along
    the arc clockwise to ``end_angle`` (radians).  Returns (tangent length, arc length)."""
    d = math.dist(p, c)
    t = math.sqrt(d * d - r * r)
    start = math.atan2(p[1] - c[1], p[0] - c[0]) - math.acos(r / d)
    return t, r * (start - end_angle)


def check_path(dom, geo, a, b):
    """A path starts on a, ends on b, its polyline length is its length, and every leg
    lies on the surface (shapely covers on the domain polygon)."""
    pts = geo.path
    assert shapely.distance(a, Point(pts[0])) < 1e-9
    assert shapely.distance(b, Point(pts[-1])) < 1e-9
    assert LineString(pts).length == pytest.approx(geo.length, abs=1e-9)
    for p, q in zip(pts, pts[1:]):
        if math.dist(p, q) > 0:
            assert dom.polygon.buffer(1e-9).covers(LineString([p, q]))


def test_rectangular_slot_path_goes_around_the_end():
    """Pads 1 x 1 mm at (0, +-3), slot 2 x 10 mm along x, X = 1 mm.  By hand: the opening
    rounds the slot's corners to r = X/2 = 0.5 (centres (+-4.5, +-0.5)); the path leaves
    the pad corner (0.5, 2.5), runs tangent to the corner arc, follows it to (5, 0.5), down
    the flat end (w - 2r = 1 mm) and back symmetrically:
    L = 2 (sqrt(20 - 0.25) + 0.5 * theta) + 1 with theta the arc angle."""
    dom = domain_with([box(-5, -1, 5, 1)])
    geo = geodesic(dom, PAD_A, PAD_B, limit=20)
    t, arc = around_corner((0.5, 2.5), (4.5, 0.5), 0.5, 0.0)
    hand = 2 * (t + arc) + 1.0
    assert t == pytest.approx(math.sqrt(19.75))
    assert geo is not None and not geo.straight
    assert geo.length == pytest.approx(hand, abs=UM)
    assert abs(geo.path[1][0]) > 4.5          # it turns at a slot end
    assert len(geo.around) == 1 and geo.bridged == []
    check_path(dom, geo, PAD_A, PAD_B)
    # without a limit the answer is the same (the limit only prunes longer paths)
    assert geodesic(dom, PAD_A, PAD_B).length == pytest.approx(geo.length, abs=1e-9)


def test_routed_slot_with_round_ends_is_exact():
    """A routed slot 2 mm wide with round ends (radius 1 >= X/2) is left unchanged by the
    opening.  By hand: tangent from (0.5, 2.5) to the end circle (centre (4, 0), r = 1),
    the arc to the symmetric tangent point, and back: L = 2 sqrt(18.5 - 1) + 2 * theta."""
    slot = LineString([(-4, 0), (4, 0)]).buffer(1.0, quad_segs=256)
    dom = domain_with([slot])
    assert dom.kept[0].equals(slot)            # kept exactly as drawn
    geo = geodesic(dom, PAD_A, PAD_B, limit=20)
    t, _ = around_corner((0.5, 2.5), (4.0, 0.0), 1.0, 0.0)
    theta = math.atan2(2.5, -3.5) - math.acos(1 / math.sqrt(18.5))
    hand = 2 * t + 2 * theta * 1.0
    assert geo.length == pytest.approx(hand, abs=UM)
    check_path(dom, geo, PAD_A, PAD_B)


def test_slot_narrower_than_x_is_bridged():
    """A 0.8 mm slot is narrower than X = 1.0 mm (pollution degree 2, IEC 60664-1 groove
    rule, standards notes s.2d): it is crossed straight, creepage = the straight gap
    (hand: pad edges y = 2.5 and -2.5 -> 5.0 mm), and the path reports the crossing."""
    dom = domain_with([box(-5, -0.4, 5, 0.4)])
    assert len(dom.kept) == 1 and len(dom.bridged) == 1      # kept: only the board edge
    geo = geodesic(dom, PAD_A, PAD_B, limit=20)
    assert geo.straight and geo.length == pytest.approx(5.0, abs=1e-9)
    assert geo.bridged == [0]
    # the same slot at X = 0.25 mm (pollution degree 1) must be gone around
    dom1 = domain_with([box(-5, -0.4, 5, 0.4)], x_mm=0.25)
    geo1 = geodesic(dom1, PAD_A, PAD_B, limit=20)
    assert not geo1.straight and geo1.length > 5.0 + 1.0


def test_no_obstacle_gives_the_straight_distance():
    """With nothing in the way the geodesic is shapely's distance of the two pads."""
    dom = domain_with([box(10, 10, 12, 12)])
    a, b = box(0, 0, 1, 1), Point(3, 4).buffer(0.5, quad_segs=64)
    geo = geodesic(dom, a, b, limit=10)
    assert geo.straight
    assert geo.length == pytest.approx(shapely.distance(a, b), abs=1e-12)


def test_limit_returns_none_for_longer_paths():
    """A limit below the hand length of the path around the rectangular slot gives None;
    just above it gives the same length."""
    dom = domain_with([box(-5, -1, 5, 1)])
    t, arc = around_corner((0.5, 2.5), (4.5, 0.5), 0.5, 0.0)
    hand = 2 * (t + arc) + 1.0
    assert geodesic(dom, PAD_A, PAD_B, limit=hand - 0.01) is None
    assert geodesic(dom, PAD_A, PAD_B, limit=hand + 0.01).length == pytest.approx(hand, abs=UM)
    assert geodesic(dom, PAD_A, PAD_B, limit=4.9) is None   # below even the straight gap


def test_notch_in_the_board_edge():
    """A 2 mm wide, 5 mm deep notch cut into the board's bottom edge between two pads.  By
    hand: its inner corners (9, 5), (11, 5) round to r = 0.5 (centres (9.5, 4.5),
    (10.5, 4.5)); from the pad corner (8, 2) tangent to the left arc, over the top
    (1 mm flat), and down symmetrically to (12, 2).  The corners where the notch meets the
    edge are convex corners of the board, which the opening does not touch."""
    outline = box(0, 0, 20, 20).difference(box(9, -1, 11, 5))
    dom = surface_domain(outline, [], 1.0)
    a, b = box(7, 1, 8, 2), box(12, 1, 13, 2)
    geo = geodesic(dom, a, b, limit=15)
    # the direction from the corner centre to the pad corner is atan2(-2.5, -1.5), in
    # the third quadrant; measured from 0 to 2 pi it is that plus 2 pi, and the tangent
    # point sits acos(r/d) before it (clockwise wrap up to the top, angle pi/2)
    t, arc = around_corner((8, 2), (9.5, 4.5), 0.5, math.pi / 2 - 2 * math.pi)
    assert 0 < arc < 0.5 * math.pi                    # less than half a turn of r = 0.5
    hand = 2 * (t + arc) + 1.0
    assert geo.length == pytest.approx(hand, abs=UM)
    assert dom.kept_label(geo.around[0][0], geo.around[0][1]).startswith("the board edge at")
    check_path(dom, geo, a, b)


def test_opening_rounds_corners_and_removes_narrow_parts():
    """open_obstacles: a 2 x 10 mm rectangle at X = 1 loses four corner pieces of area
    (1 - pi/4) r^2 each with r = 0.5 (by hand); a 0.8 mm slot is removed whole; a stadium
    of radius 1 is unchanged.  Areas from shapely on the returned pieces."""
    rect = box(-5, -1, 5, 1)
    narrow = box(-5, -0.4, 5, 0.4)
    stadium = LineString([(-4, 0), (4, 0)]).buffer(1.0, quad_segs=256)
    kept, bridged, unchanged = open_obstacles([rect, narrow, stadium], 1.0)
    corner = (1 - math.pi / 4) * 0.25
    # the opening's arcs are chords within 0.5 um (about 70 per circle at r = 0.5): their
    # area falls short of the circle's by r^2 (pi - (N/2) sin(2 pi / N)) ~ 0.001 mm^2
    assert bridged[0].area == pytest.approx(4 * corner, abs=2e-3)
    assert kept[0].area == pytest.approx(20 - 4 * corner, abs=2e-3)
    assert bridged[0].area + kept[0].area == pytest.approx(20.0, abs=1e-9)
    assert kept[1].is_empty and bridged[1].area == pytest.approx(8.0)
    assert unchanged.tolist() == [False, False, True] and kept[2] is stadium


def test_path_passes_between_two_slots():
    """Two slots end to end along x with board between them (1.5 mm, then 0.6 mm): the
    gap is board, not air, so the path goes through it; the pads overlap the gap in x, so
    the path is the straight vertical 5.0 mm (by hand: pad edges y = +-2.5), wherever in
    the gap it runs."""
    for half_gap in (0.75, 0.3):
        slots = [box(-6, -1, -half_gap, 1), box(half_gap, -1, 6, 1)]
        dom = domain_with(slots, x_mm=1.0)
        geo = geodesic(dom, PAD_A, PAD_B, limit=20)
        assert geo.length == pytest.approx(5.0, abs=1e-9)
        assert np.all(np.abs(geo.path[:, 0]) <= half_gap + 1e-9)
        check_path(dom, geo, PAD_A, PAD_B)


# -- independent references ---------------------------------------------------------------

def brute_force(obstacles, p, q):
    """Shortest p-q path: visibility graph over p, q and every obstacle vertex, each
    segment checked with shapely covers on the free space, Dijkstra by networkx."""
    union = shapely.union_all(obstacles)
    free = box(-100, -100, 100, 100).difference(union)
    verts = [tuple(c) for g in shapely.get_parts(union)
             for ring in [g.exterior, *g.interiors] for c in ring.coords[:-1]]
    nodes = [tuple(p), tuple(q)] + verts
    G = nx.Graph()
    G.add_nodes_from(range(len(nodes)))
    pairs = [(i, j) for i in range(len(nodes)) for j in range(i + 1, len(nodes))]
    segs = shapely.linestrings([[nodes[i], nodes[j]] for i, j in pairs])
    ok = shapely.covers(free, segs)
    for (i, j), good in zip(pairs, ok):
        if good:
            G.add_edge(i, j, weight=math.dist(nodes[i], nodes[j]))
    try:
        return nx.dijkstra_path_length(G, 0, 1)
    except nx.NetworkXNoPath:
        return math.inf


coord = st.integers(min_value=-80, max_value=80).map(lambda k: k * 0.1)


@st.composite
def convex_case(draw):
    pts = draw(st.lists(st.tuples(coord, coord), min_size=3, max_size=8, unique=True))
    hull = MultiPoint(pts).convex_hull
    assume(hull.geom_type == "Polygon" and hull.area > 1.0)
    p = draw(st.tuples(coord, coord))
    q = draw(st.tuples(coord, coord))
    return hull, p, q


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.filter_too_much])
@given(convex_case())
def test_single_convex_obstacle_matches_hull_chain(case):
    """Around one convex obstacle the shortest path from p to q is the shorter of the two
    chains of the convex hull of {p, q} and the obstacle between p and q (when the
    segment pq crosses the obstacle and both are hull vertices); else it is |pq|."""
    hull, p, q = case
    assume(not hull.buffer(1e-6).contains(Point(p)) and not hull.buffer(1e-6).contains(Point(q)))
    assume(math.dist(p, q) > 1e-6)
    dom = surface_domain(None, [Obstacle(hull, "cut-out", None)], 0.0,
                         bounds=(-10, -10, 10, 10))
    geo = geodesic(dom, Point(p), Point(q))
    seg = LineString([p, q])
    if not shapely.relate_pattern(hull, seg, "T********"):
        assert geo.length == pytest.approx(math.dist(p, q), abs=1e-9)
        return
    big = MultiPoint(list(hull.exterior.coords) + [p, q]).convex_hull
    ring = [tuple(c) for c in big.exterior.coords[:-1]]
    assume(tuple(p) in ring and tuple(q) in ring)
    i, j = ring.index(tuple(p)), ring.index(tuple(q))
    n = len(ring)

    def chain(a, b):
        total, k = 0.0, a
        while k != b:
            total += math.dist(ring[k], ring[(k + 1) % n])
            k = (k + 1) % n
        return total

    ref = min(chain(i, j), chain(j, i))
    assert geo.length == pytest.approx(ref, abs=1e-9)


@st.composite
def many_obstacles(draw):
    n = draw(st.integers(min_value=1, max_value=5))
    obs = []
    for _ in range(n):
        x, y = draw(coord), draw(coord)
        w = draw(st.integers(min_value=2, max_value=40)) * 0.1
        h = draw(st.integers(min_value=2, max_value=40)) * 0.1
        ang = draw(st.integers(min_value=0, max_value=17)) * 10.0
        obs.append(shapely.affinity.rotate(box(x, y, x + w, y + h), ang, origin=(x, y)))
    p = draw(st.tuples(coord, coord))
    q = draw(st.tuples(coord, coord))
    return obs, p, q


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.filter_too_much])
@given(many_obstacles())
def test_random_obstacles_match_brute_force(case):
    """Random rotated rectangles (merged where they overlap) and two points: the pruned
    tangent graph gives the brute-force visibility-graph length to 1e-9 mm, and a limit
    just below that length returns None (nothing shorter exists)."""
    obs, p, q = case
    union = shapely.union_all(obs)
    assume(not union.buffer(1e-6).contains(Point(p)) and not union.buffer(1e-6).contains(Point(q)))
    assume(union.distance(Point(p)) > 1e-6 and union.distance(Point(q)) > 1e-6)
    ref = brute_force(obs, p, q)
    assume(math.isfinite(ref))
    dom = surface_domain(None, [Obstacle(g, "cut-out", None) for g in obs], 0.0,
                         bounds=(-10, -10, 10, 10))
    geo = geodesic(dom, Point(p), Point(q))
    assert geo.length == pytest.approx(ref, abs=1e-9)
    limited = geodesic(dom, Point(p), Point(q), limit=ref + 1e-6)
    assert limited.length == pytest.approx(ref, abs=1e-9)
    if ref > 1e-3:
        assert geodesic(dom, Point(p), Point(q), limit=ref - 1e-4) is None


@st.composite
def pads_and_obstacles(draw):
    obs, _, _ = draw(many_obstacles())
    pads = []
    for _ in range(2):
        x, y = draw(coord), draw(coord)
        w = draw(st.integers(min_value=2, max_value=12)) * 0.1
        h = draw(st.integers(min_value=2, max_value=12)) * 0.1
        pads.append(box(x, y, x + w, y + h))
    return obs, pads[0], pads[1]


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.filter_too_much])
@given(pads_and_obstacles())
def test_pad_to_pad_against_densified_brute_force(case):
    """Pads (rectangles) as ends: the brute-force graph starts from every point of the pads'
    boundaries sampled every 0.05 mm (vertices included), so it is an upper bound within
    2 x 0.05 mm of the true length; the geodesic must lie in that band."""
    obs, a, b = case
    union = shapely.union_all(obs)
    assume(not a.intersects(union) and not b.intersects(union) and not a.intersects(b))
    step = 0.05
    pa = shapely.get_coordinates(shapely.segmentize(a.exterior, step))[:-1]
    pb = shapely.get_coordinates(shapely.segmentize(b.exterior, step))[:-1]
    free = box(-100, -100, 100, 100).difference(union)
    verts = np.array([c for g in shapely.get_parts(union)
                      for ring in [g.exterior, *g.interiors] for c in ring.coords[:-1]])
    nodes = np.vstack([pa, pb, verts])
    na, nb = len(pa), len(pb)
    i, j = np.triu_indices(len(nodes), 1)
    # an edge inside one pad is never useful; skip pad-pad pairs on the same pad
    same = ((i < na) & (j < na)) | ((i >= na) & (i < na + nb) & (j >= na) & (j < na + nb))
    i, j = i[~same], j[~same]
    ok = shapely.covers(free, shapely.linestrings(np.stack([nodes[i], nodes[j]], axis=1)))
    G = nx.Graph()
    for u, v in zip(i[ok].tolist(), j[ok].tolist()):
        G.add_edge(u, v, weight=float(np.hypot(*(nodes[u] - nodes[v]))))
    G.add_edges_from((("S", k) for k in range(na)), weight=0.0)
    G.add_edges_from((("T", na + k) for k in range(nb)), weight=0.0)
    try:
        ref = nx.dijkstra_path_length(G, "S", "T")
    except nx.NetworkXNoPath:
        assume(False)
    dom = surface_domain(None, [Obstacle(g, "cut-out", None) for g in obs], 0.0,
                         bounds=(-10, -10, 10, 10))
    geo = geodesic(dom, a, b)
    assert geo.length <= ref + 1e-9
    assert geo.length >= ref - 2 * step - 1e-9
    check_path(dom, geo, a, b)
