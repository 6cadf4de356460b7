"""The net graph: which copper is joined to which, and which net each piece belongs to.

Units: millimetres.

Steps
1. **Islands.**  On each copper layer the shapes that touch or overlap (an STRtree
   self-query with ``predicate="intersects"``) are grouped into connected pieces, and each
   piece's shapes are merged with ``shapely.union_all``.  Grouping first and merging per
   group is much faster than one union of the whole layer.  Pieces that touch only at a
   point count as joined (copper meeting at a point is treated as connected, so two
   differently named shapes touching at a corner show up as a short); such an island's
   geometry is then a MultiPolygon.
2. **Graph.**  Nodes are islands.  A plated hole joins every island it touches (within
   :data:`HOLE_CONTACT_MM`) on every copper layer of its span; the edge carries the hole
   index.  Pads of the same component pin on different islands are joined too (the Gerber
   X2 rule: "flashes with the same refdes and pin count as connected"); the edge carries
   ``pin=(ref, pin)``.  Non-plated holes join nothing.
3. **Nets.**  Each connected component of the graph is one conductor.  Its names are the
   ``.N`` names of its shapes and of the plated holes on it (``None`` = not said,
   ``""`` = explicitly no net, ``"N/C"`` = a single-pad net, never joined to another N/C).

   * one name -> that net;
   * several names -> a :class:`NetShort` per meeting (a spanning set: k names give k-1
     records), located where two differently named shapes meet, at the hole that joins
     them, or on the first hole of the path between them; the conductor is checked as the
     alphabetically first name;
   * a name on several conductors -> a :class:`NetSplit` per piece beyond the main one
     (the piece with the most copper), pieces in order of decreasing copper area;
   * no name: when the board carries no net names at all, every conductor is named
     ``N1, N2, ...`` in order of (lowest copper layer, min x, min y); when it does, a
     conductor with component pins gets such a name too (an unnamed pin group) and one
     without pins is *floating*.  ``N/C`` conductors are named ``N/C-1, N/C-2, ...``.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import networkx as nx
import numpy as np
import shapely
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from .model import Board

#: A plated hole joins copper it touches or comes within this distance of (mm).  Covers
#: the flattening of circles (under 1 um); far below any real antipad clearance.
HOLE_CONTACT_MM = 0.001
#: The ``.N`` value for a single-pad net (Gerber X2): such pads never form a net together.
NO_CONNECT = "N/C"

_POLYGONAL = (3, 6)  # shapely type ids: Polygon, MultiPolygon


@dataclass
class Island:
    """A connected piece of copper on one layer.

    id:        index in :attr:`NetGraph.islands`.
    layer:     copper layer name.
    geometry:  Polygon (MultiPolygon if pieces touch only at a point), mm.
    shapes:    indices into ``board.shapes`` of its members.
    names:     ``.N`` names carried by its members (not ``""``, ``None`` or ``N/C``).
    pins:      (component, pin) of member pads, sorted.
    no_net:    some member is marked explicitly "no net" (``""``).
    no_connect: some member is marked ``N/C``.
    """

    id: int
    layer: str
    geometry: BaseGeometry
    shapes: list[int]
    names: set[str] = field(default_factory=set)
    pins: list[tuple[str, str]] = field(default_factory=list)
    no_net: bool = False
    no_connect: bool = False

    @property
    def area(self) -> float:
        """Copper area in mm^2."""
        return float(shapely.area(self.geometry))


@dataclass
class NetShort:
    """Two differently named nets joined by copper.

    nets:       the two names that meet there (sorted).
    all_nets:   every name on the joined conductor (sorted).
    checked_as: the name the joined copper is checked under (alphabetically first).
    where:      (x, y) mm, a point where they meet.
    layer:      copper layer of the meeting, or ``None`` when it is a plated hole.
    hole:       index of the plated hole that joins them, if any.
    """

    nets: tuple[str, str]
    all_nets: tuple[str, ...]
    checked_as: str
    where: tuple[float, float]
    layer: str | None = None
    hole: int | None = None


@dataclass
class NetSplit:
    """A net whose copper is in several unconnected pieces; one record per extra piece.

    pieces: how many pieces the net is in.  piece: this piece's number (2..pieces).
    where:  (x, y) mm, a point on this piece.  layer: the layer of that point.
    islands: island ids of this piece.
    """

    net: str
    pieces: int
    piece: int
    where: tuple[float, float]
    layer: str | None
    islands: list[int]


@dataclass
class NetGraph:
    """Islands, the graph joining them, and the nets.  See the module docstring.

    layers:        copper layer names, stack order.
    islands:       every island; ``islands[i].id == i``.
    graph:         networkx Graph over island ids (edge data ``hole`` / ``holes`` or ``pin``).
    conductors:    island ids of each connected component, each sorted.
    shape_island:  island id of each board shape (-1 for an empty shape).
    island_net:    net of each island, ``None`` for floating copper.
    nets:          net name -> island ids (sorted by name).
    floating:      island ids of copper on no net and with no pins.
    auto_named:    nets we named (``N1``...) because the copper carried no name.
    shorts, splits: the problems found.
    """

    layers: list[str]
    islands: list[Island]
    graph: nx.Graph
    conductors: list[list[int]]
    shape_island: np.ndarray
    island_net: list[str | None]
    nets: dict[str, list[int]]
    floating: list[int]
    auto_named: set[str]
    shorts: list[NetShort]
    splits: list[NetSplit]
    no_connect: set[str] = field(default_factory=set)
    _geom_cache: dict = field(default_factory=dict, repr=False)

    def net_of_island(self, i: int) -> str | None:
        """The net of island ``i``, or ``None`` when it is floating."""
        return self.island_net[i]

    def islands_on(self, layer: str) -> list[int]:
        """Island ids on ``layer``."""
        return [isl.id for isl in self.islands if isl.layer == layer]

    def net_geometry(self, net: str, layer: str) -> BaseGeometry:
        """Union (mm) of ``net``'s islands on ``layer``; empty polygon if none.  Cached."""
        key = (net, layer)
        if key not in self._geom_cache:
            geoms = [self.islands[i].geometry for i in self.nets.get(net, ())
                     if self.islands[i].layer == layer]
            self._geom_cache[key] = shapely.union_all(geoms) if geoms else Polygon()
        return self._geom_cache[key]

    def pins_of(self, net: str) -> list[tuple[str, str]]:
        """(component, pin) pairs on ``net``, sorted."""
        out = set()
        for i in self.nets.get(net, ()):
            out.update(self.islands[i].pins)
        return sorted(out)

    def nets_on_layer(self, layer: str) -> list[str]:
        """Nets with copper on ``layer``, sorted."""
        return sorted({self.island_net[i] for i in self.islands_on(layer)
                       if self.island_net[i] is not None})


# -- building ------------------------------------------------------------------------------

def build_netgraph(board: Board) -> NetGraph:
    """Build the :class:`NetGraph` of ``board`` (coordinates in mm).

    Deterministic: islands are numbered by (layer, min x, min y, max x, max y, first shape)
    and auto-names follow (lowest layer, min x, min y).
    """
    layers = list(board.copper_layers)
    for name in sorted({s.layer for s in board.shapes} - set(layers)):
        layers.append(name)
    layer_index = {name: k for k, name in enumerate(layers)}

    islands, shape_island = _islands(board, layers)
    graph = nx.Graph()
    graph.add_nodes_from(range(len(islands)))
    hole_islands = _hole_edges(board, islands, layers, layer_index, graph)
    _pin_edges(islands, graph)

    conductors = sorted((sorted(c) for c in nx.connected_components(graph)),
                        key=lambda c: c[0])
    conductor_of = np.empty(len(islands), dtype=np.int64)
    for k, comp in enumerate(conductors):
        conductor_of[comp] = k

    hole_names: dict[int, set[str]] = {}
    hole_name_islands: dict[str, dict[int, set[int]]] = {}
    for h, isl in hole_islands.items():
        nm = board.holes[h].net
        if nm and nm != NO_CONNECT and isl:
            k = int(conductor_of[isl[0]])
            hole_names.setdefault(k, set()).add(nm)
            hole_name_islands.setdefault(nm, {}).setdefault(k, set()).update(isl)

    cond_names = []
    for k, comp in enumerate(conductors):
        names = set(hole_names.get(k, ()))
        for i in comp:
            names |= islands[i].names
        cond_names.append(names)

    # shorts
    shorts: list[NetShort] = []
    for k, comp in enumerate(conductors):
        if len(cond_names[k]) > 1:
            shorts.extend(_short_records(board, islands, graph, comp, cond_names[k],
                                         hole_islands, hole_name_islands, k))

    # names
    used = set().union(*cond_names) if cond_names else set()
    island_net: list[str | None] = [None] * len(islands)
    nets: dict[str, list[int]] = {}
    auto_named: set[str] = set()
    no_connect: set[str] = set()
    floating: list[int] = []
    unnamed, nc = [], []
    for k, comp in enumerate(conductors):
        if cond_names[k]:
            name = min(cond_names[k])
            for i in comp:
                island_net[i] = name
            nets.setdefault(name, []).extend(comp)
        elif any(islands[i].no_connect for i in comp):
            nc.append(k)
        elif not board.has_net_names or any(islands[i].pins for i in comp):
            unnamed.append(k)
        else:
            floating.extend(comp)

    def order_key(k):
        comp = conductors[k]
        low = min(layer_index[islands[i].layer] for i in comp)
        b = np.array([shapely.bounds(islands[i].geometry) for i in comp
                      if layer_index[islands[i].layer] == low])
        return (low, round(float(b[:, 0].min()), 6), round(float(b[:, 1].min()), 6), comp[0])

    def give_names(group, prefix, record):
        counter = 0
        for k in sorted(group, key=order_key):
            counter += 1
            while f"{prefix}{counter}" in used:
                counter += 1
            name = f"{prefix}{counter}"
            used.add(name)
            record.add(name)
            for i in conductors[k]:
                island_net[i] = name
            nets[name] = list(conductors[k])

    give_names(unnamed, "N", auto_named)
    give_names(nc, f"{NO_CONNECT}-", no_connect)

    splits = _split_records(board, islands, conductors, cond_names, hole_name_islands)
    nets = {n: sorted(nets[n]) for n in sorted(nets)}
    return NetGraph(layers=layers, islands=islands, graph=graph, conductors=conductors,
                    shape_island=shape_island, island_net=island_net, nets=nets,
                    floating=sorted(floating), auto_named=auto_named, shorts=shorts,
                    splits=splits, no_connect=no_connect)


def _polygonal(g: BaseGeometry) -> BaseGeometry:
    """Make ``g`` a valid Polygon/MultiPolygon (drop lines and points make_valid leaves)."""
    if not g.is_valid:
        g = shapely.make_valid(g)
    if shapely.get_type_id(g) in _POLYGONAL:
        return g
    parts = shapely.get_parts(g)
    parts = parts[np.isin(shapely.get_type_id(parts), _POLYGONAL)]
    return shapely.union_all(parts) if len(parts) else Polygon()


def _components(n: int, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Connected-component labels of ``n`` nodes joined by edges (a[k], b[k]).

    Vectorised hooking and pointer jumping; each label is the smallest node of its part.
    """
    keep = a != b
    a, b = a[keep], b[keep]
    lab = np.arange(n)
    while True:
        la, lb = lab[a], lab[b]
        lo = np.minimum(la, lb)
        new = lab.copy()
        np.minimum.at(new, la, lo)
        np.minimum.at(new, lb, lo)
        while True:
            nxt = new[new]
            if np.array_equal(nxt, new):
                break
            new = nxt
        if np.array_equal(new, lab):
            return lab
        lab = new


def _islands(board: Board, layers: list[str]) -> tuple[list[Island], np.ndarray]:
    shapes = board.shapes
    n = len(shapes)
    shape_island = np.full(n, -1, dtype=np.int64)
    geoms = np.empty(n, dtype=object)
    geoms[:] = [s.geometry for s in shapes]
    layer_of = np.array([s.layer for s in shapes], dtype=object)
    groups = []  # (layer rank, bounds tuple, first shape, layer, members, geometry)
    for rank, layer in enumerate(layers):
        idx = np.flatnonzero(layer_of == layer) if n else np.empty(0, dtype=np.int64)
        if not len(idx):
            continue
        g = geoms[idx]
        ok = ~(shapely.is_missing(g) | shapely.is_empty(g))
        idx, g = idx[ok], g[ok]
        bad = ~shapely.is_valid(g)
        if bad.any():
            g = g.copy()
            g[bad] = [_polygonal(x) for x in g[bad]]
            ok = ~shapely.is_empty(g)
            idx, g = idx[ok], g[ok]
        if not len(idx):
            continue
        tree = shapely.STRtree(g)
        qa, qb = tree.query(g, predicate="intersects")
        lab = _components(len(g), qa, qb)
        order = np.argsort(lab, kind="stable")
        cuts = np.flatnonzero(np.diff(lab[order])) + 1
        members_list = np.split(order, cuts)
        geo = np.empty(len(members_list), dtype=object)
        for k, m in enumerate(members_list):
            geo[k] = g[m[0]] if len(m) == 1 else shapely.union_all(g[m])
        bnd = shapely.bounds(geo)
        for k, m in enumerate(members_list):
            groups.append((rank, tuple(np.round(bnd[k], 9)), int(idx[m].min()), layer,
                           np.sort(idx[m]), geo[k]))
    groups.sort(key=lambda t: (t[0], t[1], t[2]))
    islands = []
    for iid, (_, _, _, layer, members, geom) in enumerate(groups):
        isl = Island(iid, layer, geom, members.tolist())
        pins = set()
        for s_i in members:
            s = shapes[s_i]
            if s.net == "":
                isl.no_net = True
            elif s.net == NO_CONNECT:
                isl.no_connect = True
            elif s.net is not None:
                isl.names.add(s.net)
            if s.component is not None and s.pin is not None:
                pins.add((s.component, s.pin))
        isl.pins = sorted(pins)
        shape_island[members] = iid
        islands.append(isl)
    return islands, shape_island


def _span_range(span, layer_index: dict, nlayers: int) -> tuple[int, int]:
    try:
        a, b = layer_index[span[0]], layer_index[span[1]]
    except (KeyError, IndexError, TypeError):
        return 0, nlayers - 1
    return min(a, b), max(a, b)


def _hole_edges(board, islands, layers, layer_index, graph) -> dict[int, list[int]]:
    """Add plated-hole edges; return hole index -> island ids it joins (sorted)."""
    out: dict[int, list[int]] = {}
    plated = [h for h, hole in enumerate(board.holes) if hole.plated]
    if not plated or not islands:
        return out
    tree = shapely.STRtree([isl.geometry for isl in islands])
    hg = [board.holes[h].geometry for h in plated]
    qh, qi = tree.query(hg, predicate="dwithin", distance=HOLE_CONTACT_MM)
    isl_rank = np.array([layer_index[isl.layer] for isl in islands])
    found: dict[int, list[int]] = {}
    for k, i in zip(qh.tolist(), qi.tolist()):
        found.setdefault(plated[k], []).append(i)
    for h in sorted(found):
        lo, hi = _span_range(board.holes[h].span, layer_index, len(layers))
        isl = sorted(i for i in found[h] if lo <= isl_rank[i] <= hi)
        if not isl:
            continue
        out[h] = isl
        for j in isl[1:]:
            if graph.has_edge(isl[0], j):
                graph.edges[isl[0], j]["holes"].append(h)
            else:
                graph.add_edge(isl[0], j, hole=h, holes=[h])
    return out


def _pin_edges(islands, graph) -> None:
    by_pin: dict[tuple[str, str], list[int]] = {}
    for isl in islands:
        for p in isl.pins:
            by_pin.setdefault(p, []).append(isl.id)
    for p in sorted(by_pin):
        ids = by_pin[p]
        for j in ids[1:]:
            if not graph.has_edge(ids[0], j):
                graph.add_edge(ids[0], j, pin=p)


def _xy(pt) -> tuple[float, float]:
    return (float(shapely.get_x(pt)), float(shapely.get_y(pt)))


class _Groups:
    """Tiny union-find over names."""

    def __init__(self, names):
        self.parent = {n: n for n in names}

    def find(self, n):
        while self.parent[n] != n:
            self.parent[n] = self.parent[self.parent[n]]
            n = self.parent[n]
        return n

    def union(self, a, b) -> bool:
        ra, rb = self.find(a), self.find(b)
        if ra == rb:
            return False
        lo, hi = sorted((ra, rb))
        self.parent[hi] = lo
        return True

    def count(self) -> int:
        return len({self.find(n) for n in self.parent})


def _short_records(board, islands, graph, comp, names, hole_islands, hole_name_islands,
                   cond_index) -> list[NetShort]:
    """Where the differently named parts of one conductor meet (a spanning set)."""
    all_nets = tuple(sorted(names))
    chosen = all_nets[0]
    groups = _Groups(all_nets)
    out: list[NetShort] = []

    def record(a, b, where, layer=None, hole=None):
        if groups.union(a, b):
            out.append(NetShort(tuple(sorted((a, b))), all_nets, chosen, where, layer, hole))

    # 1. on one island: differently named shapes that touch
    for i in comp:
        isl = islands[i]
        if len(isl.names) < 2:
            continue
        named = [s for s in isl.shapes if board.shapes[s].net in isl.names]
        geo = np.array([board.shapes[s].geometry for s in named], dtype=object)
        net = np.array([board.shapes[s].net for s in named], dtype=object)
        qa, qb = shapely.STRtree(geo).query(geo, predicate="intersects")
        keep = (qa < qb) & (net[qa] != net[qb])
        seen = set()
        for a, b in zip(qa[keep].tolist(), qb[keep].tolist()):
            pair = tuple(sorted((net[a], net[b])))
            if pair in seen or groups.find(pair[0]) == groups.find(pair[1]):
                continue
            seen.add(pair)
            meet = shapely.intersection(geo[a], geo[b])
            pt = shapely.point_on_surface(meet) if not meet.is_empty else \
                shapely.get_point(shapely.shortest_line(geo[a], geo[b]), 0)
            record(pair[0], pair[1], _xy(pt), isl.layer)
        # named parts joined only through unnamed copper of the same island
        by_name = {}
        for s in named:
            by_name.setdefault(board.shapes[s].net, []).append(board.shapes[s].geometry)
        nm = sorted(by_name)
        for a in nm:
            for b in nm:
                if a < b and groups.find(a) != groups.find(b):
                    line = shapely.shortest_line(shapely.union_all(by_name[a]),
                                                 shapely.union_all(by_name[b]))
                    record(a, b, _xy(shapely.get_point(line, 0)), isl.layer)

    # 2. at plated holes (hole name and the names of the copper it touches) and at pads
    #    of the same pin on different islands
    def rep(i):
        return min(islands[i].names) if islands[i].names else None

    members = set(comp)
    for h in sorted(hole_islands):
        isl = hole_islands[h]
        if isl[0] not in members:
            continue
        hnet = board.holes[h].net
        sides = [hnet] if hnet in names else []
        sides += [r for r in (rep(i) for i in isl) if r is not None]
        for s in sides[1:]:
            record(sides[0], s, board.holes[h].centre, None, h)
    for u, v, data in sorted(graph.subgraph(comp).edges(data=True),
                             key=lambda e: (min(e[0], e[1]), max(e[0], e[1]))):
        if "pin" not in data:
            continue
        a, b = rep(min(u, v)), rep(max(u, v))
        if a is not None and b is not None:
            pt = shapely.point_on_surface(islands[max(u, v)].geometry)
            record(a, b, _xy(pt), islands[max(u, v)].layer)

    # 3. names joined only through unnamed islands: first joint on the path between them
    if groups.count() > 1:
        sub = graph.subgraph(comp)
        carriers: dict[str, set[int]] = {n: set() for n in all_nets}
        for i in comp:
            for n in islands[i].names:
                carriers[n].add(i)
        for n, by_cond in hole_name_islands.items():
            if n in carriers and cond_index in by_cond:
                carriers[n] |= by_cond[cond_index]
        while groups.count() > 1:
            root = groups.find(all_nets[0])
            src = sorted(set().union(*(carriers[n] for n in all_nets
                                       if groups.find(n) == root)))
            paths = nx.multi_source_dijkstra_path(sub, src)
            best = None
            for n in all_nets:
                if groups.find(n) == root:
                    continue
                for i in sorted(carriers[n]):
                    if i in paths:
                        cand = (len(paths[i]), n, i)
                        if best is None or cand < best:
                            best = cand
            if best is None:  # cannot happen in a connected component; stay safe
                break
            _, n, i = best
            path = paths[i]
            start = next(m for m in all_nets if groups.find(m) == root
                         and path[0] in carriers[m])
            data = sub.edges[path[0], path[1]] if len(path) > 1 else {}
            if data.get("hole") is not None:
                record(start, n, board.holes[data["hole"]].centre, None, data["hole"])
            else:
                pt = shapely.point_on_surface(islands[path[min(1, len(path) - 1)]].geometry)
                record(start, n, _xy(pt), islands[path[-1]].layer)
    return out


def _split_records(board, islands, conductors, cond_names,
                   hole_name_islands) -> list[NetSplit]:
    where_name: dict[str, list[int]] = {}
    for k, names in enumerate(cond_names):
        for n in names:
            where_name.setdefault(n, []).append(k)
    if not any(len(ks) > 1 for ks in where_name.values()):
        return []
    area = shapely.area([isl.geometry for isl in islands])
    cond_area = [float(area[comp].sum()) for comp in conductors]
    out: list[NetSplit] = []
    for name in sorted(where_name):
        ks = where_name[name]
        if len(ks) < 2:
            continue
        # the main piece is the one with the most copper (then the first)
        ordered = sorted(ks, key=lambda k: (-cond_area[k], k))
        for piece, k in enumerate(ordered[1:], start=2):
            comp = conductors[k]
            bearing = [i for i in comp if name in islands[i].names]
            if bearing:
                i = max(bearing, key=lambda j: (area[j], -j))
                named = [board.shapes[s].geometry for s in islands[i].shapes
                         if board.shapes[s].net == name]
                biggest = named[int(np.argmax(shapely.area(named)))]
                pt = _xy(shapely.point_on_surface(biggest))
            else:  # the name comes from a plated hole on this piece
                i = min(hole_name_islands[name][k])
                pt = _xy(shapely.point_on_surface(islands[i].geometry))
            out.append(NetSplit(name, len(ks), piece, pt, islands[i].layer, list(comp)))
    return out
