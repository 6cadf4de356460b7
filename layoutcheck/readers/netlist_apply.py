"""Name a board's copper from an IPC-D-356(A) netlist, and find where the two disagree.

Units: millimetres.

A plain Gerber set has copper but no net names.  A bare-board test netlist has names and
test points (net, reference-pin, point, access side, hole).  :func:`apply_netlist` puts
them together (shared format notes 4.3: match each point to the copper by location, then
compare with the copper's own connectivity):

1. **Islands and conductors** come from :func:`layoutcheck.netgraph.build_netgraph` on the
   board as read (copper pieces joined by touching and by plated holes).
2. **Matching.**  Each record's point is looked up in an STRtree of the shapes of the
   layers it reaches: a through-hole point (``317`` and its ``017`` continuations) every
   copper layer, a blind/buried via (``307``) the layers of its span, a surface point
   (``327``, ``027``, ``099``) its access side: ``A01`` top, ``A0n`` layer n (n at or beyond
   the layer count: bottom), ``A00`` either outer layer.  A point counts as on copper when
   it lies in a shape or within :data:`MATCH_TOL_MM` of one.  Non-plated holes (``367``)
   name nothing.
3. **Naming.**  Every conductor that records of one net land on gets that net on each of
   its shapes that has no name yet; the pad under a point gets the record's component
   and pin (a flashed shape, or one no larger than the record's feature size; never a
   pour or track), a via's pad the via function.
   Conductors no record lands on stay unnamed (floating copper to the checks).
   ``board.has_net_names`` becomes True and the components are rebuilt from the pins.
4. **Disagreements** are left on ``board.netlist_problems`` as :class:`NetlistProblem`
   records (the ``netlist-mismatch`` rule reports them):

   * ``joined``: copper joins two netlist nets.  The joined copper is named after the
     alphabetically first one (as the net graph checks a short).  The location is where
     the copper reached from each net's points meets: a breadth-first walk over touching
     shapes and plated holes from the shapes under each net's points; the first shape
     pair (or hole) where two nets' walks meet.  k nets on one conductor give k-1 records.
   * ``split``: a netlist net lands on several unconnected conductors; one record per net
     with the location of every piece (the piece with the most copper first).
   * ``no-copper``: a record's point is on no copper of the layers it reaches.
   * ``no-hole``: a record says there is a hole (``D``) and the drill files have none
     there (or a non-plated one where it says plated).
   * ``name-differs``: the board files carry their own net names (Gerber X2, IPC-2581)
     and the copper under a point is named differently; nothing is renamed then.

If not one record lands on copper, the netlist is not this board's (or its units or origin
differ): that is an :class:`~layoutcheck.errors.InputFileError` naming the first record.
"""
from __future__ import annotations

from collections import deque
from dataclasses import dataclass, field
from typing import Any

import numpy as np
import shapely

from ..errors import InputFileError
from ..model import Assumption, Board
from ..netgraph import HOLE_CONTACT_MM, build_netgraph
from .gerber_board import components_from_shapes
from .ipc356 import NO_CONNECT, Netlist, NetRecord

#: A point within this distance (mm) of copper counts as on it: covers the 0.0001 in
#: (2.54 um) resolution of inch netlists and the flattening of round pads.
MATCH_TOL_MM = 0.01
#: Record kinds that name copper on their access side only.
SURFACE_KINDS = frozenset({"327", "099"})


@dataclass
class NetlistProblem:
    """One disagreement between a netlist and the copper (see the module docstring).

    kind:    ``joined`` | ``split`` | ``no-copper`` | ``no-hole`` | ``name-differs``.
    message: one plain sentence.
    nets:    the netlist nets concerned.
    where:   (x, y) mm, the location; ``layer`` its copper layer (``None``: a hole).
    file:    the netlist file; ``lines``: the record lines concerned.
    extra:   JSON-ready details (``pieces``, ``copper_net``...).
    """

    kind: str
    message: str
    nets: list[str]
    where: tuple[float, float] | None
    layer: str | None
    file: str
    lines: list[int] = field(default_factory=list)
    extra: dict[str, Any] = field(default_factory=dict)


def _at(p) -> str:
    return f"({p[0]:.2f}, {p[1]:.2f})"


def record_layers(rec: NetRecord, layers: list[str]) -> list[str]:
    """The copper layers a record's point reaches (see the module docstring, step 2)."""
    n = len(layers)
    if n == 0 or rec.kind == "367":
        return []
    if n == 1:
        return list(layers)
    if rec.kind == "307" and rec.span is not None:
        a, b = rec.span
        return layers[min(a, n) - 1:min(b, n)]
    if rec.kind in SURFACE_KINDS:
        if rec.access == 0:
            return [layers[0], layers[-1]]
        if rec.access >= n:
            return [layers[-1]]
        return [layers[rec.access - 1]]
    return list(layers)


class _Matcher:
    """Shapes under record points, per layer (STRtree queries, vectorised)."""

    def __init__(self, board: Board):
        self.board = board
        self.by_layer: dict[str, np.ndarray] = {}
        self.trees: dict[str, shapely.STRtree] = {}
        layer_of = np.array([s.layer for s in board.shapes], dtype=object)
        for name in board.copper_layers:
            idx = np.flatnonzero(layer_of == name) if len(layer_of) else np.empty(0, int)
            self.by_layer[name] = idx
            self.trees[name] = shapely.STRtree([board.shapes[i].geometry for i in idx])

    def hits(self, layer: str, points: np.ndarray) -> list[list[int]]:
        """For each point, the board shape indices under it (or nearest within tolerance)."""
        out: list[list[int]] = [[] for _ in range(len(points))]
        idx = self.by_layer.get(layer)
        if idx is None or not len(idx) or not len(points):
            return out
        tree = self.trees[layer]
        qp, qs = tree.query(points, predicate="intersects")
        for p, s in zip(qp.tolist(), qs.tolist()):
            out[p].append(int(idx[s]))
        miss = np.array([k for k, h in enumerate(out) if not h], dtype=np.int64)
        if len(miss):
            mp, ms = tree.query_nearest(points[miss], max_distance=MATCH_TOL_MM,
                                        all_matches=True)
            for p, s in zip(mp.tolist(), ms.tolist()):
                out[int(miss[p])].append(int(idx[s]))
        return [sorted(set(h)) for h in out]


def apply_netlist(board: Board, netlist: Netlist) -> list[NetlistProblem]:
    """Name ``board``'s copper from ``netlist`` and record where they disagree.

    Changes ``board`` in place (shape nets, pins and functions, components,
    ``has_net_names``, ``assumptions``, ``netlist_problems``) and returns the problems
    found.  Coordinates: mm.  Raises :class:`InputFileError` when no record lands on any
    copper.
    """
    file = netlist.name
    had_names = board.has_net_names
    graph = build_netgraph(board)
    layers = list(board.copper_layers)
    recs = [r for r in netlist.records]
    problems: list[NetlistProblem] = []

    # -- 2. matching -------------------------------------------------------------------
    matcher = _Matcher(board)
    hits: list[dict[str, list[int]]] = [dict() for _ in recs]
    wanted: dict[str, list[int]] = {}
    for k, r in enumerate(recs):
        for lname in record_layers(r, layers):
            wanted.setdefault(lname, []).append(k)
    for lname, ks in wanted.items():
        pts = shapely.points([(recs[k].x, recs[k].y) for k in ks])
        for k, h in zip(ks, matcher.hits(lname, pts)):
            if h:
                hits[k][lname] = h
    pointed = [k for k, r in enumerate(recs) if r.kind != "367"]
    blank = [recs[k].line for k in pointed if not recs[k].net]
    if pointed and not any(hits[k] for k in pointed):
        first = recs[pointed[0]]
        raise InputFileError(
            f"not one of the {len(pointed)} test points of this netlist lands on the "
            f"board's copper (first: {first.text.strip()!r} at {_at((first.x, first.y))} mm, "
            f"units {netlist.units}); expected the netlist of this board in the same "
            "coordinates as its Gerber files", file=file, line=first.line)

    for k in pointed:
        if not hits[k] and recs[k].plated is not False:   # a 317 ..U hole needs no copper
            r = recs[k]
            reach = record_layers(r, layers)
            side = " or ".join(reach) if reach else "no copper layer"
            who = _who(r)
            problems.append(NetlistProblem(
                "no-copper", f"Netlist record at {file} line {r.line} ({who}, net "
                f"{r.net or '(blank)'}) points at {_at((r.x, r.y))} on {side}, where there "
                "is no copper.", [r.net] if r.net and r.net != NO_CONNECT else [],
                (r.x, r.y), reach[0] if reach else None, file, [r.line],
                {"record": r.text.strip()}))
    problems.extend(_hole_problems(board, recs, file))

    # -- 3. conductors per record ------------------------------------------------------
    island_cond = np.full(len(graph.islands), -1, dtype=np.int64)
    for c, comp in enumerate(graph.conductors):
        island_cond[comp] = c
    hit_cond: list[dict[str, int]] = []      # record -> layer -> conductor
    for k in range(len(recs)):
        by_layer = {}
        for lname, shapes in hits[k].items():
            isl = [int(graph.shape_island[s]) for s in shapes]
            isl = [i for i in isl if i >= 0]
            if isl:
                by_layer[lname] = int(island_cond[isl[0]])
        hit_cond.append(by_layer)
    rec_conds = [set(h.values()) for h in hit_cond]

    labels_of: dict[int, dict[str, list[int]]] = {}   # conductor -> label -> record idx
    for k, r in enumerate(recs):
        if not r.net or r.kind == "367":
            continue
        label = f"{NO_CONNECT}@{r.line}" if r.net == NO_CONNECT else r.net
        for c in rec_conds[k]:
            labels_of.setdefault(c, {}).setdefault(label, []).append(k)

    if had_names:
        problems.extend(_name_differences(board, recs, hits, file))
    else:
        problems.extend(_joins(board, graph, recs, hits, labels_of, file))
        problems.extend(_splits(graph, recs, hit_cond, labels_of, file))
        _name_copper(board, graph, labels_of)
    _mark_pads(board, recs, hits)
    board.components = components_from_shapes(board.shapes, board.components)
    board.has_net_names = True

    named = sum(1 for c in labels_of if labels_of[c])
    unnamed = len(graph.conductors) - named
    nets = netlist.nets()
    text = (f"{file}: IPC-D-356 netlist with {len(recs)} test records and {len(nets)} nets "
            f"(units {netlist.units})")
    if had_names:
        text += "; the board files carry their own net names, so the netlist only checks them"
    else:
        text += (f" names the copper: {named} conductor(s) matched to its points"
                 + (f", {unnamed} with no netlist point left unnamed" if unnamed else ""))
    notes = [*netlist.notes, Assumption("nets", text)]
    if blank:
        notes.append(Assumption("netlist", (
            f"{file}: {len(blank)} test record(s) with a blank net field (first at line "
            f"{blank[0]}) name no copper")))
    for a in notes:
        if a not in board.assumptions:
            board.assumptions.append(a)
    board.netlist_problems.extend(problems)
    return problems


def _who(r: NetRecord) -> str:
    if r.is_via:
        return f"{r.code} via"
    if r.ref:
        return f"{r.code} {r.ref}-{r.pin}" if r.pin else f"{r.code} {r.ref}"
    return r.code


def _hole_problems(board: Board, recs: list[NetRecord], file: str) -> list[NetlistProblem]:
    """Records that say there is a hole where the drill files have none (or no plated one)."""
    with_hole = [k for k, r in enumerate(recs) if r.hole_mm is not None or r.kind == "367"]
    if not with_hole:
        return []
    out: list[NetlistProblem] = []
    geoms = [h.geometry for h in board.holes]
    tree = shapely.STRtree(geoms)
    pts = shapely.points([(recs[k].x, recs[k].y) for k in with_hole])
    qp, qh = tree.query(pts, predicate="dwithin", distance=MATCH_TOL_MM)
    found: dict[int, list[int]] = {}
    for p, h in zip(qp.tolist(), qh.tolist()):
        found.setdefault(p, []).append(h)
    for p, k in enumerate(with_hole):
        r = recs[k]
        holes = found.get(p, [])
        want_plated = r.plated is True
        if holes and (not want_plated or any(board.holes[h].plated for h in holes)):
            continue
        what = "plated hole" if want_plated else "hole"
        seen = "only a non-plated one" if holes else "none"
        out.append(NetlistProblem(
            "no-hole", f"Netlist record at {file} line {r.line} ({_who(r)}) has a "
            f"{what} at {_at((r.x, r.y))}; the drill files have {seen} there.",
            [r.net] if r.net and r.net != NO_CONNECT else [], (r.x, r.y), None, file,
            [r.line], {"record": r.text.strip(), "hole_mm": r.hole_mm}))
    return out


def _name_differences(board, recs, hits, file) -> list[NetlistProblem]:
    out = []
    for k, r in enumerate(recs):
        if not r.net or r.net == NO_CONNECT:
            continue
        for lname, shapes in hits[k].items():
            names = {board.shapes[s].net for s in shapes} - {None, "", NO_CONNECT}
            if names and r.net not in names:
                other = ", ".join(sorted(names))
                out.append(NetlistProblem(
                    "name-differs", f"Netlist record at {file} line {r.line} ({_who(r)}) "
                    f"says net {r.net} at {_at((r.x, r.y))} on {lname}; the board files "
                    f"name that copper {other}.", [r.net, *sorted(names)], (r.x, r.y), lname,
                    file, [r.line], {"copper_net": sorted(names)}))
                break
    return out


# ------------------------------------------------------------------------------- joins
class _Union:
    def __init__(self):
        self.parent: dict[str, str] = {}

    def find(self, a: str) -> str:
        self.parent.setdefault(a, a)
        while self.parent[a] != a:
            self.parent[a] = self.parent[self.parent[a]]
            a = self.parent[a]
        return a

    def union(self, a: str, b: str) -> bool:
        ra, rb = self.find(a), self.find(b)
        if ra == rb:
            return False
        lo, hi = sorted((ra, rb))
        self.parent[hi] = lo
        return True


def _label_name(label: str) -> str:
    return NO_CONNECT if label.startswith(NO_CONNECT + "@") else label


def _joins(board, graph, recs, hits, labels_of, file) -> list[NetlistProblem]:
    out: list[NetlistProblem] = []
    for c in sorted(labels_of):
        labels = labels_of[c]
        if len(labels) < 2:
            continue
        meetings = _meetings(board, graph, graph.conductors[c], recs, hits, labels)
        names = sorted({_label_name(x) for x in labels})
        real = [n for n in names if n != NO_CONNECT]
        chosen = real[0] if real else NO_CONNECT
        uf = _Union()
        for a, b, where, layer, hole in meetings:
            if not uf.union(a, b):
                continue
            na, nb = _label_name(a), _label_name(b)
            lines = sorted({recs[k].line for x in (a, b) for k in labels[x]})[:20]
            place = (f"through the plated hole at {_at(where)}" if hole is not None
                     else f"on {layer} at {_at(where)}")
            if NO_CONNECT in (na, nb):
                nc_line = a.split("@")[1] if a.startswith(NO_CONNECT) else b.split("@")[1]
                other = nb if a.startswith(NO_CONNECT) else na
                what = (f"The single-point (N/C) pad of netlist line {nc_line} is joined to "
                        f"{'another N/C pad' if other == NO_CONNECT else 'net ' + other}")
            else:
                what = f"Netlist nets {na} and {nb} are joined by copper"
            msg = (f"{what} {place} ({file}); the joined copper is checked as {chosen}.")
            out.append(NetlistProblem(
                "joined", msg, sorted({na, nb} - {NO_CONNECT}) or [NO_CONNECT], where,
                layer, file, lines,
                {"all_nets": names, "checked_as": chosen, "hole": hole}))
    return out


def _meetings(board, graph, comp, recs, hits, labels):
    """Where the walks from each label's points meet: (label a, label b, where, layer, hole).

    Nodes are shapes (ints) and plated holes (``("h", index)``); edges join touching shapes
    of one island, shapes touching a hole that joins islands, and pads of the same
    component pin.  Sorted by the walk depth at the meeting, then position.
    """
    members = [s for i in comp for s in graph.islands[i].shapes]
    adj: dict[Any, set] = {s: set() for s in members}
    for i in comp:
        shapes = graph.islands[i].shapes
        if len(shapes) < 2:
            continue
        geo = [board.shapes[s].geometry for s in shapes]
        qa, qb = shapely.STRtree(geo).query(geo, predicate="intersects")
        for a, b in zip(qa.tolist(), qb.tolist()):
            if a < b:
                adj[shapes[a]].add(shapes[b])
                adj[shapes[b]].add(shapes[a])
    cset = set(comp)
    hole_ids = sorted({h for u, v, d in graph.graph.edges(cset, data=True)
                       if u in cset and v in cset for h in d.get("holes", ())})
    if hole_ids:
        geo = [board.shapes[s].geometry for s in members]
        tree = shapely.STRtree(geo)
        qh, qs = tree.query([board.holes[h].geometry for h in hole_ids], predicate="dwithin",
                            distance=HOLE_CONTACT_MM)
        for h, s in zip(qh.tolist(), qs.tolist()):
            node = ("h", hole_ids[h])
            adj.setdefault(node, set()).add(members[s])
            adj[members[s]].add(node)
    by_pin: dict[tuple, list[int]] = {}
    for s in members:
        sh = board.shapes[s]
        if sh.component is not None and sh.pin is not None:
            by_pin.setdefault((sh.component, sh.pin), []).append(s)
    for group in by_pin.values():
        for s in group[1:]:
            adj[group[0]].add(s)
            adj[s].add(group[0])

    label_of: dict[Any, str] = {}
    depth: dict[Any, int] = {}
    queue: deque = deque()
    seeds_at: dict[Any, list[tuple[str, int]]] = {}
    for label in sorted(labels):
        for k in labels[label]:
            for shapes in hits[k].values():
                for s in shapes:
                    if s in adj:
                        seeds_at.setdefault(s, []).append((label, k))
    meetings = []
    for s in sorted(seeds_at, key=lambda n: (str(type(n)), n)):
        first_label, _ = seeds_at[s][0]
        label_of[s], depth[s] = first_label, 0
        queue.append(s)
        for label, k in seeds_at[s][1:]:
            if label != first_label:
                r = recs[k]
                meetings.append((0, first_label, label, (r.x, r.y),
                                 board.shapes[s].layer, None))
    while queue:
        u = queue.popleft()
        for v in sorted(adj[u], key=lambda n: (str(type(n)), n)):
            if v not in label_of:
                label_of[v], depth[v] = label_of[u], depth[u] + 1
                queue.append(v)
    seen_edges = set()
    for u in adj:
        for v in adj[u]:
            key = (min(str(u), str(v)), max(str(u), str(v)))
            if key in seen_edges or label_of.get(u) == label_of.get(v):
                continue
            seen_edges.add(key)
            if u not in label_of or v not in label_of:
                continue
            hole = next((n[1] for n in (u, v) if isinstance(n, tuple)), None)
            if hole is not None:
                c = board.holes[hole].centre
                where, layer = (float(c[0]), float(c[1])), None
            else:
                ga, gb = board.shapes[u].geometry, board.shapes[v].geometry
                meet = shapely.intersection(ga, gb)
                pt = shapely.point_on_surface(meet) if not meet.is_empty else \
                    shapely.get_point(shapely.shortest_line(ga, gb), 0)
                where = (float(shapely.get_x(pt)), float(shapely.get_y(pt)))
                layer = board.shapes[u].layer
            a, b = sorted((label_of[u], label_of[v]))
            meetings.append((depth[u] + depth[v], a, b, where, layer, hole))
    meetings.sort(key=lambda m: (m[0], m[1], m[2], round(m[3][0], 6), round(m[3][1], 6)))
    return [m[1:] for m in meetings]


# ------------------------------------------------------------------------------ splits
def _splits(graph, recs, hit_cond, labels_of, file) -> list[NetlistProblem]:
    conds_of: dict[str, list[int]] = {}
    for c, labels in labels_of.items():
        for label in labels:
            if not label.startswith(NO_CONNECT + "@"):
                conds_of.setdefault(label, []).append(c)
    area = shapely.area([isl.geometry for isl in graph.islands]) if graph.islands else []
    out = []
    for net in sorted(conds_of):
        cs = conds_of[net]
        if len(cs) < 2:
            continue
        cs = sorted(cs, key=lambda c: (-float(np.sum(area[graph.conductors[c]])), c))
        pieces = []
        for c in cs:
            k = min(labels_of[c][net], key=lambda j: recs[j].line)
            r = recs[k]
            layer = min((lname for lname, cc in hit_cond[k].items() if cc == c),
                        key=graph.layers.index)
            pieces.append({"where": [r.x, r.y], "layer": layer, "line": r.line,
                           "record": _who(r)})
        shown = "; ".join(f"{p['record']} at {_at(p['where'])} on {p['layer']} (line "
                          f"{p['line']})" for p in pieces)
        lines = sorted({recs[k].line for c in cs for k in labels_of[c][net]})[:20]
        out.append(NetlistProblem(
            "split", f"Netlist net {net} is in {len(cs)} unconnected pieces of copper: "
            f"{shown} ({file}).", [net], tuple(pieces[1]["where"]), pieces[1]["layer"],
            file, lines, {"pieces": pieces}))
    return out


# ------------------------------------------------------------------------------ naming
def _name_copper(board: Board, graph, labels_of) -> None:
    for c, labels in labels_of.items():
        names = sorted({_label_name(x) for x in labels})
        real = [n for n in names if n != NO_CONNECT]
        chosen = real[0] if real else NO_CONNECT
        for i in graph.conductors[c]:
            for s in graph.islands[i].shapes:
                if board.shapes[s].net is None:
                    board.shapes[s].net = chosen


def _pad_shape(board: Board, shapes: list[int], rec: NetRecord) -> int | None:
    """The pad among the shapes under a point, or ``None`` when none looks like one.

    A flashed shape (the smallest, if several); otherwise, when the record gives a feature
    size, the smallest drawn or region shape no larger than that size (5 % slack).  A pour
    or track under a point is not a pad.
    """
    flashes = [s for s in shapes if board.shapes[s].kind == "flash"]
    if flashes:
        pick = flashes
    elif rec.size_x:
        size = max(rec.size_x, rec.size_y or 0.0) * 1.05 + MATCH_TOL_MM
        b = shapely.bounds([board.shapes[s].geometry for s in shapes])
        fits = np.maximum(b[:, 2] - b[:, 0], b[:, 3] - b[:, 1]) <= size
        pick = [s for s, ok in zip(shapes, fits.tolist())
                if ok and board.shapes[s].kind != "plane"]
    else:
        pick = []
    if not pick:
        return None
    area = shapely.area([board.shapes[s].geometry for s in pick])
    return min(zip(pick, area.tolist()), key=lambda t: (t[1], t[0]))[0]


def _mark_pads(board: Board, recs, hits) -> None:
    for k, r in enumerate(recs):
        if not hits[k] or not (r.ref or r.is_via):
            continue
        for lname in sorted(hits[k]):
            s = _pad_shape(board, hits[k][lname], r)
            if s is None:
                continue
            sh = board.shapes[s]
            if r.is_via:
                if sh.function is None and sh.component is None:
                    sh.function = "ViaPad"
                continue
            if not r.pin or sh.component is not None:
                continue
            sh.component, sh.pin = r.ref, r.pin
            if sh.function is None:
                sh.function = "ComponentPad" if r.kind in ("317", "307") else "SMDPad"


__all__ = ["apply_netlist", "NetlistProblem", "record_layers", "MATCH_TOL_MM"]
