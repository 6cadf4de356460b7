"""The sample generator's self-check: every pair of copper features of different nets
against the design's clearance and creepage targets (:func:`fullbridge.pair_targets`).

Units: millimetres, volts.

Measured with shapely on the design's own ideal copper, without any reader:

* clearance: the straight gap between two features on one layer;
* creepage: the surface path between them (:func:`surface_path.surface_path`), around the
  non-plated slots and holes at least X wide (X from the project's pollution degree,
  :func:`layoutcheck.physics.iec60664.groove_width_x_mm`).

A pair whose straight gap is below the clearance target is a ``clearance`` violation; a pair
that keeps the clearance but whose surface path is below the creepage target is a
``creepage`` violation.  No copper is exempt.
"""
from __future__ import annotations

import itertools
from dataclasses import dataclass

import shapely

import fullbridge
from layoutcheck.physics.iec60664 import groove_width_x_mm
from layoutcheck.writers.design import Design, hole_polygon, slot_polygon
from surface_path import obstacle_outlines, surface_path


@dataclass
class Violation:
    """Two copper features of different nets closer than the design's targets (mm, V).

    gap: straight distance; path: surface path (``None`` for a clearance violation, where
    only the straight gap counts); target: the target missed (clearance or creepage).
    """

    layer: str
    nets: tuple[str, str]
    kind: str
    gap: float
    path: float | None
    target: float
    voltage: float
    where: tuple[float, float]
    features: tuple[str, str]


def obstacles(d: Design) -> list:
    """The slot and hole outlines (mm) a creepage path of ``d`` must go around."""
    x = groove_width_x_mm(fullbridge.PROJECT.environment.pollution_degree).mm
    return obstacle_outlines([(slot_polygon(s), s.width) for s in d.slots if not s.plated],
                             [(hole_polygon(h.x, h.y, h.d), h.d) for h in d.holes], x)


def spacing_violations(d: Design) -> list[Violation]:
    """Every pair of same-layer copper features of different nets that misses a target.

    The working voltage and targets of each pair come from :func:`fullbridge.pair_targets`.
    Uses an STRtree ``dwithin`` query (the largest target of the board) and shapely
    distances; sorted by layer, nets, position.  Units: mm, V.
    """
    out = []
    copper = d.copper()
    nets = sorted({p.net for p in copper if p.net})
    reach = max(fullbridge.target_gap(x, y) for x, y in itertools.combinations(nets, 2))
    obs = obstacles(d)
    for layer in d.layer_names:
        pieces = [p for p in copper if p.layer == layer and p.net]
        geoms = [p.geometry for p in pieces]
        tree = shapely.STRtree(geoms)
        left, right = tree.query(geoms, predicate="dwithin", distance=reach)
        for i, j in zip(left.tolist(), right.tolist()):
            if i >= j or pieces[i].net == pieces[j].net:
                continue
            v, clr, crp = fullbridge.pair_targets(pieces[i].net, pieces[j].net)
            gap = float(shapely.distance(geoms[i], geoms[j]))
            if gap >= crp - 1e-6:
                continue
            if gap < clr - 1e-6:
                kind, path, target = "clearance", None, clr
            else:
                path, _ = surface_path(geoms[i], geoms[j], obs, crp)
                if path >= crp - 1e-6:
                    continue
                kind, target, path = "creepage", crp, round(path, 4)
            c = shapely.shortest_line(geoms[i], geoms[j]).centroid
            out.append(Violation(layer, tuple(sorted((pieces[i].net, pieces[j].net))), kind,
                                 round(gap, 4), path, target, v,
                                 (round(c.x, 3), round(c.y, 3)),
                                 (_describe(pieces[i]), _describe(pieces[j]))))
    out.sort(key=lambda x: (x.layer, x.nets, x.where))
    return out


def _describe(piece) -> str:
    if piece.kind == "pad":
        return f"{piece.ref}.{piece.pin} pad"
    return f"{piece.net} {piece.kind}"


def planted_of(layer: str, nets, where) -> int | None:
    """The planted spacing problem (:data:`fullbridge.PLANTED`) a finding on ``layer`` between
    ``nets`` at ``where`` (mm) belongs to, or ``None``.  Problem 3 (J1's pads) shows on both
    layers, so its bottom-layer copy is accepted too."""
    for pid, p in fullbridge.spacing_planted().items():
        layers = (p.layer, "bottom") if pid == 3 else (p.layer,)
        x0, y0, x1, y1 = p.area
        if layer in layers and tuple(sorted(nets)) == p.nets and x0 <= where[0] <= x1 \
                and y0 <= where[1] <= y1:
            return pid
    return None


def classify(violations: list[Violation]) -> dict[int | None, list[Violation]]:
    """Sort violations into planted problems (by layer, nets and area); ``None`` = other."""
    out: dict[int | None, list[Violation]] = {}
    for v in violations:
        out.setdefault(planted_of(v.layer, v.nets, v.where), []).append(v)
    return out


def check(d: Design, rev: str) -> list[str]:
    """What is wrong with revision ``rev``'s spacing (empty list: as documented).

    rev-b must show nothing; rev-a exactly the planted problems, each with its documented
    smallest straight gap (to 0.01 mm) and kind (the kind of the smallest gap).
    """
    groups = classify(spacing_violations(d))
    if rev == "b":
        return [f"rev-b: {v}" for vs in groups.values() for v in vs]
    errors = [f"rev-a: unplanned {v}" for v in groups.get(None, [])]
    for pid, p in fullbridge.spacing_planted().items():
        found = groups.get(pid)
        if not found:
            errors.append(f"rev-a: planted problem {pid} ({p.nets}) is missing")
            continue
        worst = min(found, key=lambda v: v.gap)
        if abs(worst.gap - p.gap) > 0.01 or worst.kind != p.kind:
            errors.append(f"rev-a: planted problem {pid} is a {worst.kind} problem with "
                          f"{worst.gap:.3f} mm, documented {p.kind} with {p.gap} mm")
    return errors
