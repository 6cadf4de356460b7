"""A closed loop from a pad sequence: copper paths between pads of one net, straight pieces
through parts, and joins where they meet.

Units: millimetres (geometry), henries (the parts' internal inductance).

The model
    Consecutive pads on one net are joined through the copper by the current-path provider
    (``current_path(board, graph, net, start, end)`` and ``copper_z(board)``; the default is
    :mod:`layoutcheck.geometry.current_path`).  Consecutive pads of one part are joined by
    a straight round conductor (the package's lead size) between the two pad centres,
    lying on the board surface on the part's side: half the copper plus half the lead
    above the outer copper's mid-plane.  The part's internal inductance (leads above the
    board, frame, bond wires or winding; :mod:`layoutcheck.loops.packages`) is added in
    series.  Where one piece ends away from where the next begins (a through-hole lead
    from the copper layer of the path up to the part, or a path ending a little off the
    pad centre) a straight round join of the lead's size is inserted, and the last pad
    joins the first.  The loop's inductance is then
    :func:`layoutcheck.physics.inductance.loop_inductance` of the closed chain plus the
    internal inductances.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

from ..errors import UsageError
from ..physics.inductance import Segment, enclosed_area
from .pads import PadIndex, PadRef
from .roles import DEFAULT_LEAD_MM, PartRole

#: Gaps shorter than this (mm) between consecutive pieces are not joined.
JOIN_TOLERANCE_MM = 1e-6


@dataclass(frozen=True)
class Step:
    """One leg of a pad sequence: through ``copper`` on ``net`` or through ``part``."""

    kind: str
    a: PadRef
    b: PadRef
    net: str | None = None

    @property
    def part(self) -> str | None:
        return self.a.ref if self.kind == "part" else None


@dataclass
class LoopGeometry:
    """A closed loop ready for the inductance sum.

    segments:          the closed chain (mm), in the direction of the current.
    path:              its corners ``(x, y, layer)`` in mm; ``layer`` is ``None`` off the
                       copper (through parts and their leads).
    length_mm:         length of the chain.
    copper_length_mm:  length of the copper tracks of the paths (vias and joins excluded).
    copper_width_mm:   their length-weighted mean width (``None`` without copper tracks).
    area_mm2:          area enclosed by the chain seen from above.
    internal_h:        the parts' internal inductance, summed (H).
    internal_parts:    ``(ref, H, basis)`` for each part step.
    parts, nets:       the parts and nets passed, in loop order.
    """

    segments: list[Segment]
    path: list[tuple[float, float, str | None]]
    length_mm: float
    copper_length_mm: float
    copper_width_mm: float | None
    area_mm2: float
    internal_h: float
    internal_parts: list[tuple[str, float, str]] = field(default_factory=list)
    parts: list[str] = field(default_factory=list)
    nets: list[str] = field(default_factory=list)


def default_provider():
    """The copper current-path module, or ``None`` when this installation has none."""
    try:
        from ..geometry import current_path as provider
    except ImportError:
        return None
    return provider


def plan_steps(pads: list[PadRef], index: PadIndex) -> list[Step]:
    """Steps joining each pad to the next and the last to the first.

    Pads on one net are joined through copper (preferred), pads of one part through the
    part.  Raises :class:`UsageError` naming a pad that is not on the board, or two
    neighbours that are neither on one net nor of one part.
    """
    infos = [index.require(p) for p in pads]
    steps = []
    n = len(pads)
    for k in range(n):
        a, b = pads[k], pads[(k + 1) % n]
        ia, ib = infos[k], infos[(k + 1) % n]
        if a == b:
            continue
        if ia.net is not None and ia.net == ib.net:
            steps.append(Step("copper", a, b, ia.net))
        elif a.ref == b.ref:
            steps.append(Step("part", a, b))
        else:
            raise UsageError(f"{a.text()} (net {ia.net}) and {b.text()} (net {ib.net}) are "
                             "neither on one net nor pads of one part, so nothing joins them")
    if not any(s.kind == "copper" for s in steps):
        raise UsageError("the pads " + ",".join(p.text() for p in pads) + " form no loop "
                         "through copper; expected pads of several parts joined by nets")
    return steps


def _chain_join(chain: list[Segment], segs: list[Segment], size_mm: float) -> None:
    if chain and segs:
        a, b = chain[-1].end, segs[0].start
        if math.dist(a, b) > JOIN_TOLERANCE_MM:
            chain.append(Segment(tuple(a), tuple(b), size_mm, shape="round"))
    chain.extend(segs)


def _oriented(segs: list[Segment], start_xy) -> list[Segment]:
    """``segs`` in the order and direction that starts nearest ``start_xy``."""
    if not segs:
        return segs
    d_first = math.dist(segs[0].start[:2], start_xy)
    d_last = math.dist(segs[-1].end[:2], start_xy)
    if d_last < d_first:
        return [Segment(s.end, s.start, s.width, s.thickness, s.shape, s.width_dir)
                for s in reversed(segs)]
    return segs


def _part_z(board, z: dict[str, float], ref: str, layers_a, layers_b, lead: float) -> float:
    """Height (mm, in the provider's frame) of a part's straight piece: on the board
    surface of the part's side, half the copper plus half the lead beyond the copper's
    mid-plane."""
    stack = [n for n in board.copper_layers if n in z] or sorted(z, key=lambda n: z[n])
    first, last = stack[0], stack[-1]
    up = 1.0 if z[first] >= z[last] else -1.0
    comp = board.components.get(ref)
    side = comp.side if comp is not None and comp.side in ("top", "bottom") else None
    if side is None:
        common = set(layers_a) & set(layers_b)
        if len(layers_a) == 1 and len(layers_b) == 1 and common:
            side = "bottom" if next(iter(common)) == last and last != first else "top"
        else:
            side = "top"
    layer = first if side == "top" else last
    sign = up if side == "top" else -up
    return z[layer] + sign * (board.stackup.copper(layer) / 2 + lead / 2)


def assemble(board, graph, index: PadIndex, steps: list[Step], roles: dict[str, PartRole],
             provider, cache: dict | None = None) -> LoopGeometry:
    """Build the closed loop of ``steps`` (see the module docstring).  Millimetres.

    ``provider`` supplies ``current_path`` and ``copper_z``; ``cache`` (optional) keeps
    copper paths between calls, keyed by net and end points.
    """
    z = provider.copper_z(board)
    cache = {} if cache is None else cache
    chain: list[Segment] = []
    path: list[tuple[float, float, str | None]] = []
    internal, internal_parts, parts, nets = 0.0, [], [], []
    cu_len = cu_w = 0.0
    for step in steps:
        ia, ib = index.get(step.a.ref, step.a.pin), index.get(step.b.ref, step.b.pin)
        for ref in (step.a.ref, step.b.ref):
            if ref not in parts:
                parts.append(ref)
        if step.kind == "copper":
            if step.net not in nets:
                nets.append(step.net)
            start = (*ia.position, ia.start_layer)
            end = (*ib.position, ib.start_layer)
            key = (step.net, start, end)
            if key not in cache:
                cache[key] = provider.current_path(board, graph, step.net, start, end)
            cp = cache[key]
            segs = _oriented(list(cp.segments()), ia.position)
            pts = list(cp.points())
            if pts and math.dist(pts[-1][:2], ia.position) < math.dist(pts[0][:2], ia.position):
                pts.reverse()
            for piece in cp.pieces:
                if piece.kind == "trace":
                    ln = math.dist(piece.start, piece.end)
                    cu_len += ln
                    cu_w += ln * piece.width
            size = _lead_of(roles, step.a.ref)
            _chain_join(chain, segs, size)
            path.extend((float(x), float(y), layer) for x, y, layer in pts)
        else:
            role = roles.get(step.a.ref)
            lead = role.lead_mm if role is not None else DEFAULT_LEAD_MM
            zp = _part_z(board, z, step.a.ref, ia.layers, ib.layers, lead)
            s = (ia.position[0], ia.position[1], zp)
            e = (ib.position[0], ib.position[1], zp)
            segs = [Segment(s, e, lead, shape="round")] if math.dist(s, e) > 0 else []
            _chain_join(chain, segs, lead)
            path.extend([(*ia.position, None), (*ib.position, None)])
            if role is not None:
                internal += role.internal_h
                internal_parts.append((step.a.ref, role.internal_h, role.internal_basis))
    if len(chain) > 1:
        _chain_join(chain, [chain[0]], DEFAULT_LEAD_MM)
        chain.pop()                          # the first segment was only a target
    if len(chain) < 2:
        raise UsageError("the loop has fewer than two conductors; its pads coincide")
    clean = []
    for p in path:
        if not clean or (abs(p[0] - clean[-1][0]) > 1e-9 or abs(p[1] - clean[-1][1]) > 1e-9
                         or p[2] != clean[-1][2]):
            clean.append(p)
    area = enclosed_area([s.start[:2] for s in chain]) if len(chain) >= 3 else 0.0
    return LoopGeometry(
        segments=chain, path=clean, length_mm=float(sum(s.length for s in chain)),
        copper_length_mm=cu_len, copper_width_mm=(cu_w / cu_len if cu_len > 0 else None),
        area_mm2=area, internal_h=internal, internal_parts=internal_parts, parts=parts,
        nets=nets)


def _lead_of(roles, ref) -> float:
    role = roles.get(ref)
    return role.lead_mm if role is not None else DEFAULT_LEAD_MM
