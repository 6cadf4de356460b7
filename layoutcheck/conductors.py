"""Conductors on one copper layer for the spacing rules: nets, floating stepping stones, earth.

Units: millimetres, volts.

On each layer the spacing rules see three kinds of conductor:

* **nets** -- the named nets' copper (their islands on the layer), the ends of every
  spacing question;
* **stepping stones** -- conductors at no defined potential: floating copper islands
  (``NetGraph.floating``), unconnected pads (nets ``N/C-*``, and nets we named ``N1``...
  that hold a single pin when the files do carry net names) and plated holes on no net
  that touch no copper.  A stone takes whatever potential its surroundings give it, so for
  a spacing question it counts as zero length: the distance between two nets through
  stones is the sum of the gaps from stone to stone (common practice; IEC 60664-1 treats
  an unconnected conductive part in a gap the same way, from memory);
* **earth** -- optional 0 V conductors declared in the project's ``[earth]`` table: the
  board edge (``EARTH:edge``, a thin ring just outside the outline's exterior, so the
  distance to it is the distance to the edge; cut-outs are not part of it) and the
  non-plated round holes (not slots) at least ``hole_min_mm`` across that carry earthed
  hardware (``EARTH:hole@x,y``; the hole's edge stands for the hardware, a washer or screw
  head larger than the hole is not modelled).  Their insulation kind is ``[earth] kind``.

:func:`shortest_chains` finds, for every pair of end conductors, the shortest chain
``a -> stone -> ... -> stone -> b`` on a graph whose edges are gaps (straight for
clearance, surface paths for creepage); a chain never passes through another net or earth.
"""
from __future__ import annotations

import heapq
import math
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np
import shapely
from shapely.geometry import LineString, Point, Polygon
from shapely.geometry.base import BaseGeometry

from .findings import Finding
from .geometry.paths import Obstacle, SurfaceDomain, surface_domain
from .model import Board
from .netgraph import HOLE_CONTACT_MM, NetGraph
from .physics.requirements import Requirement, SpacingProfile, required_spacing
from .project import Project
from .units import VoltageRange

#: Width (mm) of the ring that stands for an earthed board edge (only its inner side, the
#: outline itself, matters for distances).
EDGE_RING_MM = 0.1
#: Prefix of earth conductor names.
EARTH = "EARTH:"
_ZERO = VoltageRange(0.0, 0.0)


@dataclass
class Conductor:
    """One conductor on one layer.

    name:     net name, ``EARTH:edge`` / ``EARTH:hole@x,y``, or a description of a stone
              (``floating top island at (x, y)``...).
    kind:     ``"net"``, ``"earth"`` or ``"stone"``.
    pieces:   its copper on the layer, one polygon per island (for earth: the ring or the
              hole), mm.  :attr:`geometry` is their union, made when first asked for.
    net:      the net it belongs to (nets, and stones that are unconnected-pad nets).
    terminations: True when some of its copper is a component termination.
    """

    name: str
    kind: str
    layer: str
    pieces: list
    net: str | None = None
    terminations: bool = False
    _union: BaseGeometry | None = field(default=None, repr=False)

    @property
    def geometry(self) -> BaseGeometry:
        """All its copper on the layer (mm)."""
        if self._union is None:
            self._union = (self.pieces[0] if len(self.pieces) == 1 else
                           shapely.union_all(self.pieces) if self.pieces else Polygon())
        return self._union


@dataclass
class Chain:
    """The shortest chain between end conductors ``a`` and ``b`` through stones.

    length: sum of the gaps (mm).  stones: stone indices in order from ``a``.
    legs:   per gap ``(path, info)``: ``path`` a (k, 2) array from the ``a`` side to the
            ``b`` side, ``info`` whatever the gap function returned with it.
    """

    a: int
    b: int
    length: float
    stones: list[int]
    legs: list[tuple[np.ndarray, object]] = field(default_factory=list)

    def path(self) -> np.ndarray:
        """All legs joined (mm); the part on each stone between two legs counts zero."""
        return np.vstack([p for p, _ in self.legs])


def _at(p) -> str:
    """``(x, y)`` to 0.01 mm, without a minus sign on zero."""
    x, y = (round(float(v), 2) + 0.0 for v in p)
    return f"({x:.2f}, {y:.2f})"


def _xy(g) -> tuple[float, float]:
    """A point naming ``g``: its centroid when that lies on it, else a point on it."""
    p = shapely.centroid(g)
    if not shapely.intersects(g, p):
        p = shapely.point_on_surface(g)
    return (float(shapely.get_x(p)), float(shapely.get_y(p)))


def _layer_rank(graph: NetGraph, layer: str) -> dict[str, int]:
    return {name: k for k, name in enumerate(graph.layers)}


def _spans(board: Board, graph: NetGraph, hole, layer: str) -> bool:
    rank = _layer_rank(graph, layer)
    try:
        lo, hi = sorted((rank[hole.span[0]], rank[hole.span[1]]))
    except (KeyError, IndexError, TypeError):
        return True
    return lo <= rank.get(layer, -1) <= hi


# -- which conductors ------------------------------------------------------------------

def stone_nets(board: Board, graph: NetGraph) -> set[str]:
    """Nets that are unconnected pads: ``N/C-*``, and our ``N1``... names that hold exactly
    one pin when the files carry net names (a pad wired to nothing)."""
    out = set(graph.no_connect)
    if board.has_net_names:
        for net in graph.auto_named:
            if len(graph.pins_of(net)) == 1:
                out.add(net)
    return out


def net_conductors(board: Board, graph: NetGraph, layer: str) -> list[Conductor]:
    """The nets with copper on ``layer`` that are not stones, sorted by name."""
    stones = stone_nets(board, graph)
    out = []
    for net in graph.nets_on_layer(layer):
        if net in stones:
            continue
        term = any(board.shapes[s].is_termination for i in graph.nets[net]
                   if graph.islands[i].layer == layer for s in graph.islands[i].shapes)
        pieces = [graph.islands[i].geometry for i in graph.nets[net]
                  if graph.islands[i].layer == layer]
        out.append(Conductor(net, "net", layer, pieces, net, term))
    return out


def stepping_stones(board: Board, graph: NetGraph, layer: str) -> list[Conductor]:
    """Conductors at no defined potential on ``layer`` (see the module docstring), in a
    fixed order: floating islands, unconnected pads, then bare plated holes."""
    out = []
    for i in graph.floating:
        isl = graph.islands[i]
        if isl.layer == layer:
            out.append(Conductor(f"floating {layer} island at {_at(_xy(isl.geometry))}",
                                 "stone", layer, [isl.geometry]))
    for net in sorted(stone_nets(board, graph)):
        geom = graph.net_geometry(net, layer)
        if geom.is_empty:
            continue
        pins = graph.pins_of(net)
        what = (f"unconnected pad {pins[0][0]}.{pins[0][1]} ({net})" if len(pins) == 1
                else f"unconnected copper {net} at {_at(_xy(geom))}")
        out.append(Conductor(what, "stone", layer, [geom], net))
    bare = [h for h in board.holes if h.plated and not h.net and
            _spans(board, graph, h, layer)]
    if bare:
        ids = graph.islands_on(layer)
        geo = np.array([h.geometry for h in bare], dtype=object)
        if ids:
            tree = shapely.STRtree([graph.islands[i].geometry for i in ids])
            qh, _ = tree.query(geo, predicate="dwithin", distance=HOLE_CONTACT_MM)
            touching = set(qh.tolist())
        else:
            touching = set()
        for k, h in enumerate(bare):
            if k not in touching:
                out.append(Conductor(f"plated hole at {_at(h.centre)} on no net", "stone",
                                     layer, [h.geometry]))
    return out


def earth_conductors(board: Board, project: Project, layer: str) -> list[Conductor]:
    """The 0 V conductors the project declares (``[earth]``), for ``layer``."""
    out = []
    earth = project.earth
    if earth.edge and board.outline is not None and not board.outline.is_empty:
        parts = shapely.get_parts(board.outline)
        body = shapely.union_all([Polygon(p.exterior) for p in parts])
        ring = shapely.difference(shapely.buffer(body, EDGE_RING_MM, join_style="mitre"),
                                  body)
        out.append(Conductor(f"{EARTH}edge", "earth", layer, [ring]))
    if earth.mounting_holes:
        for h in board.holes:
            if not h.plated and not h.is_slot and h.diameter >= earth.hole_min_mm - 1e-9:
                x, y = h.centre
                x, y = round(x, 2) + 0.0, round(y, 2) + 0.0
                out.append(Conductor(f"{EARTH}hole@{x:.2f},{y:.2f}", "earth", layer,
                                     [h.geometry]))
    return out


def end_conductors(board: Board, graph: NetGraph, project: Project,
                   layer: str) -> list[Conductor]:
    """Nets (not stones) and earth conductors on ``layer``: the ends of spacing questions."""
    return net_conductors(board, graph, layer) + earth_conductors(board, project, layer)


def is_earth(name: str) -> bool:
    return name.startswith(EARTH)


def pair_voltage(project: Project, a: str, b: str) -> float:
    """Largest voltage (V) between conductors ``a`` and ``b``; earth is 0 V."""
    if is_earth(a) and is_earth(b):
        return 0.0
    if is_earth(a) or is_earth(b):
        net = b if is_earth(a) else a
        return project.voltage_of(net)[0].difference_to(_ZERO)
    return project.working_voltage(a, b)


def pair_insulation(project: Project, a: str, b: str) -> tuple[str, str]:
    """Insulation kind between conductors ``a`` and ``b`` and why."""
    if is_earth(a) or is_earth(b):
        return project.earth.kind, "[earth] kind"
    return project.insulation_between(a, b)


def voltage_span(project: Project, conductors: list[Conductor]) -> float:
    """The largest voltage (V) between any two of ``conductors`` (an upper bound)."""
    lo, hi = math.inf, -math.inf
    for c in conductors:
        r = _ZERO if c.kind == "earth" or c.net is None else project.voltage_of(c.net)[0]
        lo, hi = min(lo, r.lo), max(hi, r.hi)
    return max(0.0, hi - lo) if math.isfinite(lo) else 0.0


class PairRules:
    """Required distances between conductors under the project's ``[environment]``
    (IEC 60664-1 or both standards), one :class:`SpacingProfile` per insulation kind;
    results are cached by (kind, volts, outer layer, termination)."""

    def __init__(self, project: Project):
        self.project = project
        self._profiles: dict[str, SpacingProfile] = {}
        self._cache: dict[tuple, Requirement] = {}

    def profile(self, kind: str) -> SpacingProfile:
        if kind not in self._profiles:
            e = self.project.environment
            self._profiles[kind] = SpacingProfile(
                standard=e.standard, pollution_degree=e.pollution_degree,
                material_group=e.material_group, overvoltage_category=e.overvoltage_category,
                insulation=kind, altitude_m=e.altitude_m, coating=e.coating,
                interpolate=e.interpolate, creepage_columns=e.creepage_columns)
        return self._profiles[kind]

    def get(self, kind: str, volts: float, outer: bool = True,
            termination: bool = False) -> Requirement:
        """The :class:`Requirement` for ``volts`` (V) across ``kind`` insulation."""
        key = (kind, round(float(volts), 9), bool(outer), bool(termination))
        if key not in self._cache:
            v = float(volts)
            self._cache[key] = required_spacing(self.profile(kind), v, rms_v=v,
                                                layer_outer=outer, termination=termination)
        return self._cache[key]

    def kinds(self) -> list[str]:
        """Every insulation kind a pair can get (entries, the default, earth)."""
        ks = {"functional"} | {r.kind for r in self.project.insulation}
        if self.project.earth.edge or self.project.earth.mounting_holes:
            ks.add(self.project.earth.kind)
        return sorted(ks)

    def reach(self, volts: float, what: str, outer: bool = True) -> float:
        """The largest ``what`` (``"clearance_mm"`` / ``"creepage_mm"``) any pair at up to
        ``volts`` (V) can need (mm)."""
        return max(getattr(self.get(k, volts, outer, t), what)
                   for k in self.kinds() for t in (False, True))


# -- the surface ----------------------------------------------------------------------

def board_surface(board: Board, graph: NetGraph | None, layer: str,
                  x_mm: float) -> SurfaceDomain:
    """The surface of ``layer`` (``top`` or ``bottom``) for creepage paths: the outline
    minus non-plated holes and slots through it, opened by the groove width ``x_mm``."""
    obstacles = []
    for h in board.holes:
        if h.plated or (graph is not None and not _spans(board, graph, h, layer)):
            continue
        obstacles.append(Obstacle(h.geometry, "slot" if h.is_slot else "hole", h.centre))
    bounds = None
    if board.outline is None:
        geoms = [s.geometry for s in board.shapes] + [h.geometry for h in board.holes]
        if geoms:
            bounds = tuple(shapely.total_bounds(geoms))
    return surface_domain(board.outline, obstacles, x_mm, bounds)


# -- places ---------------------------------------------------------------------------

#: Buffers used to find places: the factor that makes a flattened buffer (quad_segs 4)
#: cover the true offset curve.
_QUAD_SEGS = 4
_COVER = 1.0 / math.cos(math.pi / (4 * _QUAD_SEGS))


def close_places(a: BaseGeometry, b: BaseGeometry, reach: float) -> list[BaseGeometry]:
    """The parts of ``a`` within ``reach`` (mm) of ``b``, grouped into separate places.

    Zones of ``a`` closer than ``reach`` (with a buffer enlarged so its flattened arcs
    cover the true offset) are merged when closer than about ``reach``; each merged part
    is one place.  Returns ``a`` clipped to each place, ordered by (min x, min y).
    """
    if a.is_empty or b.is_empty or reach <= 0:
        return []
    zone = shapely.intersection(a, shapely.buffer(b, reach * _COVER + 1e-6,
                                                  quad_segs=_QUAD_SEGS))
    if zone.is_empty:
        return []
    places = shapely.get_parts(shapely.buffer(zone, 0.5 * reach, quad_segs=_QUAD_SEGS))
    if len(places) == 1:
        return [a]
    bnd = shapely.bounds(places)
    places = places[np.lexsort((bnd[:, 1], bnd[:, 0]))]
    out = [shapely.intersection(a, p) for p in places]
    return [g for g in out if not g.is_empty]


# -- pairs that come close ---------------------------------------------------------------

#: Geometries with more vertices than this are clipped to the other side's neighbourhood
#: before buffering and measuring (planes); smaller ones are cheaper to use whole.
_CLIP_ABOVE = 64


def _within(a, b, dist) -> np.ndarray:
    """Vectorised ``distance(a, b) <= dist`` (mm), the bigger geometry prepared first."""
    big_first = shapely.get_num_coordinates(a) >= shapely.get_num_coordinates(b)
    x, y = np.where(big_first, a, b), np.where(big_first, b, a)
    shapely.prepare(x)
    return shapely.dwithin(x, y, dist)


def near(geom: BaseGeometry, other: BaseGeometry, reach: float) -> BaseGeometry:
    """``geom`` clipped to ``other``'s bounding box grown by ``reach`` (mm) when it is big
    and sticks out; only copper within ``reach`` of ``other`` can matter."""
    if geom.is_empty or shapely.get_num_coordinates(geom) <= _CLIP_ABOVE:
        return geom
    x0, y0, x1, y1 = other.bounds
    r = reach * 1.01 + 1e-3
    window = shapely.box(x0 - r, y0 - r, x1 + r, y1 + r)
    if shapely.contains_properly(window, geom):
        return geom
    return shapely.intersection(geom, window)


def _pieces(conductors: list[Conductor]) -> tuple[np.ndarray, np.ndarray]:
    geo, owner = [], []
    for k, c in enumerate(conductors):
        for g in c.pieces:
            if g is not None and not g.is_empty:
                geo.append(g)
                owner.append(k)
    return np.array(geo, dtype=object), np.array(owner, dtype=np.int64)


def close_pairs(ends: list[Conductor], reach: float, need: Callable[[int, int], float],
                tol: float = 0.0, only: Callable[[int, int], bool] | None = None):
    """Pairs of ``ends`` (``i < j``) whose copper comes closer than ``need(i, j) - tol``.

    Candidates come from an STRtree of the conductors' pieces (islands) queried with
    ``dwithin reach`` (``reach`` >= every ``need``), then exact vectorised ``dwithin``.
    Yields ``(i, j, A, B)`` in order of (i, j), with ``A``/``B`` the union of the pieces of
    each that come that close, clipped to the other's neighbourhood (:func:`near`).
    ``only(i, j)`` skips pairs before anything is measured.
    """
    geo, owner = _pieces(ends)
    if len(geo) < 2 or reach <= 0:
        return
    qa, qb = shapely.STRtree(geo).query(geo, predicate="dwithin", distance=reach)
    keep = owner[qa] < owner[qb]
    qa, qb = qa[keep], qb[keep]
    if not len(qa):
        return
    n = len(ends)
    code = owner[qa] * n + owner[qb]
    uniq, inv = np.unique(code, return_inverse=True)
    want = np.ones(len(uniq), dtype=bool)
    dist = np.empty(len(uniq))
    for k, c in enumerate(uniq.tolist()):
        i, j = divmod(c, n)
        if only is not None and not only(i, j):
            want[k] = False
            dist[k] = 0.0
        else:
            dist[k] = need(i, j) - tol
    sel = want[inv]
    qa, qb, inv = qa[sel], qb[sel], inv[sel]
    close = _within(geo[qa], geo[qb], dist[inv])
    groups: dict[int, tuple[set, set]] = {}
    for a, b, k in zip(qa[close].tolist(), qb[close].tolist(), inv[close].tolist()):
        ga, gb = groups.setdefault(k, (set(), set()))
        ga.add(a)
        gb.add(b)
    for k in sorted(groups):
        i, j = divmod(int(uniq[k]), n)
        ga, gb = groups[k]
        A = shapely.union_all(geo[sorted(ga)]) if len(ga) > 1 else geo[next(iter(ga))]
        B = shapely.union_all(geo[sorted(gb)]) if len(gb) > 1 else geo[next(iter(gb))]
        r = dist[k] + tol
        yield i, j, near(A, B, r), near(B, A, r)


# -- chains through stepping stones ---------------------------------------------------

#: A gap function: for geometry arrays X, Y (same length) and a limit (mm), per pair
#: ``None`` (farther than the limit) or ``(length, path from X to Y, info)``.
GapFn = Callable[[np.ndarray, np.ndarray, float], list]


def straight_gaps(X: np.ndarray, Y: np.ndarray, limit: float) -> list:
    """:data:`GapFn` for clearance: the straight distance and the nearest-point segment."""
    if not len(X):
        return []
    lines = shapely.shortest_line(X, Y)
    d = shapely.length(lines)
    coords = [shapely.get_coordinates(ln)[:2] for ln in lines]
    return [(float(d[k]), coords[k], None) if d[k] <= limit else None
            for k in range(len(X))]


def shortest_chains(ends: list[Conductor], stones: list[Conductor], gaps: GapFn,
                    reach: float) -> list[Chain]:
    """Shortest chain (at most ``reach`` mm) between each pair of ``ends`` that passes
    through at least one of ``stones``; stones are zero-length stepping stones.

    Candidate gaps come from an STRtree of the pieces (``dwithin reach``); ``gaps``
    measures each stone against the close pieces of its neighbour.  Returns one
    :class:`Chain` per pair that has one (``a < b``), in a fixed order.
    """
    if not stones or len(ends) < 2 or reach <= 0:
        return []
    ne = len(ends)
    geo, owner = _pieces(list(ends) + list(stones))
    is_stone = owner >= ne
    sq = np.flatnonzero(is_stone)
    qs, qn = shapely.STRtree(geo).query(geo[sq], predicate="dwithin", distance=reach)
    qs = sq[qs]
    os_, on = owner[qs], owner[qn]
    keep = (os_ != on) & ((on < ne) | (os_ < on))   # stone-end, and each stone pair once
    qs, qn, os_, on = qs[keep], qn[keep], os_[keep], on[keep]
    if not len(qs):
        return []
    groups: dict[tuple[int, int], tuple[set, set]] = {}
    for s, n, a, b in zip(qs.tolist(), qn.tolist(), os_.tolist(), on.tolist()):
        gs, gn = groups.setdefault((a, b), (set(), set()))
        gs.add(s)
        gn.add(n)
    keys = sorted(groups)

    def union(idx):
        idx = sorted(idx)
        return geo[idx[0]] if len(idx) == 1 else shapely.union_all(geo[idx])

    X = np.array([union(groups[k][0]) for k in keys], dtype=object)
    Y = np.array([union(groups[k][1]) for k in keys], dtype=object)
    measured = gaps(X, Y, reach)
    adj: dict[int, list] = {}
    for (s, n), m in zip(keys, measured):
        if m is None:
            continue
        length, path, info = m
        # listed under each end with the path oriented away from that end
        adj.setdefault(s, []).append((n, length, path, info))
        adj.setdefault(n, []).append((s, length, path[::-1], info))
    for v in adj:
        adj[v].sort(key=lambda e: (e[1], e[0]))

    out = []
    for a in range(ne):
        if a not in adj:
            continue
        dist = {a: 0.0}
        back: dict[int, tuple] = {}
        heap = [(0.0, a)]
        best: dict[int, float] = {}
        while heap:
            d, v = heapq.heappop(heap)
            if d > dist.get(v, math.inf):
                continue
            if v < ne and v != a:
                best[v] = d
                continue        # never through another end conductor
            for w, ln, path, info in adj.get(v, ()):
                nd = d + ln
                if nd <= reach and nd < dist.get(w, math.inf):
                    dist[w] = nd
                    back[w] = (v, path, info)
                    heapq.heappush(heap, (nd, w))
        for b in sorted(best):
            if b <= a:
                continue
            legs, stones_used, v = [], [], b
            while v != a:
                u, path, info = back[v]
                legs.append((path, info))
                if u != a:
                    stones_used.append(u - ne)
                v = u
            legs.reverse()
            stones_used.reverse()
            out.append(Chain(a, b, best[b], stones_used, legs))
    return out


def supersede(same_pair: list[Finding], chain: Finding, need: float,
              tol: float) -> tuple[bool, list[Finding]]:
    """Decide between a chain finding and the direct findings of the same pair and layer.

    A direct finding in the same place (its nearest points within ``need`` mm of the
    chain's path) no longer than the chain keeps the place: ``(False, [])``.  Otherwise the
    chain takes the place and the longer direct findings there are returned to be dropped:
    ``(True, dropped)`` (the chain's ``extra["direct_mm"]`` then holds their shortest)."""
    path = chain.extra.get("path") or [chain.where, chain.to]
    line = LineString(path) if len(path) > 1 else Point(path[0])
    near = [f for f in same_pair
            if min(line.distance(Point(f.where)), line.distance(Point(f.to))) <= need]
    if any(f.measured_mm <= chain.measured_mm + tol for f in near):
        return False, []
    if near:
        chain.extra["direct_mm"] = round(min(f.measured_mm for f in near), 7)
    return True, near
