"""Half-bridge legs and the capacitors that close their commutation loops.

A *leg* is two switches in series across a bus: the high switch's source and the low
switch's drain on one net (the switch node), the high drain on the bus net and the low
source on its return.  Every capacitor with one pad on the bus net and one on the return
closes a loop ``cap+ -> high D -> high S -> low D -> low S -> cap-`` (power-layout notes,
PL-1).  Legs may instead be named in the project file (``[legs.<name>]``), which then
replaces the search.

Units: none (part references and nets only).
"""
from __future__ import annotations

from dataclasses import dataclass, field

from ..errors import ProjectFileError
from ..model import Assumption
from ..project import Project
from .pads import PadIndex, PadRef
from .roles import PartRole


@dataclass
class Leg:
    """One half-bridge leg.

    bus_net: the high switch's drain net; node_net: the switch node; return_net: the low
    switch's source net.  capacitors: parts across bus and return (sorted).  named: the
    leg comes from ``[legs.<name>]``.
    """

    name: str
    high: str
    low: str
    bus_net: str
    node_net: str
    return_net: str
    capacitors: list[str] = field(default_factory=list)
    named: bool = False

    @property
    def nets(self) -> list[str]:
        return sorted({self.bus_net, self.node_net, self.return_net})


def _pad_net(index: PadIndex, ref: str, pad: str | None) -> str | None:
    if pad is None:
        return None
    info = index.get(ref, pad)
    return info.net if info is not None else None


def capacitor_pads(index: PadIndex, ref: str, net_a: str, net_b: str) -> tuple[str, str] | None:
    """The pads of capacitor ``ref`` on ``net_a`` and on ``net_b`` (first of each), or
    ``None`` when it does not sit across the two nets."""
    pa = [p for p, n in index.nets_of(ref).items() if n == net_a]
    pb = [p for p, n in index.nets_of(ref).items() if n == net_b]
    if not pa or not pb:
        return None
    return pa[0], pb[0]


def capacitors_across(index: PadIndex, roles: dict[str, PartRole], net_a: str,
                      net_b: str) -> list[str]:
    """Capacitors with a pad on ``net_a`` and a pad on ``net_b`` (sorted references)."""
    return sorted(ref for ref, r in roles.items()
                  if r.kind == "capacitor" and capacitor_pads(index, ref, net_a, net_b))


def _terminals(index, role: PartRole):
    return (_pad_net(index, role.ref, role.pad("D")), _pad_net(index, role.ref, role.pad("S")))


def find_legs(project: Project, roles: dict[str, PartRole],
              index: PadIndex) -> tuple[list[Leg], list[Assumption]]:
    """The legs of the board (named in the project, or found), and notes about them.

    Raises :class:`ProjectFileError` (with its line) when a ``[legs.<name>]`` table names
    a part that is not on the board, is not a switch with known pins, or when its parts do
    not form a leg.
    """
    if project.legs:
        return [_named_leg(project, spec, roles, index) for spec in project.legs.values()], \
            [Assumption("legs", "half-bridge legs as named in the project file ([legs]); "
                                "no others are looked for")]
    switches = [r for _, r in sorted(roles.items()) if r.has_terminals]
    by_drain: dict[str, list[PartRole]] = {}
    for r in switches:
        d, _ = _terminals(index, r)
        if d is not None:
            by_drain.setdefault(d, []).append(r)
    found = []
    for h in switches:
        hd, hs = _terminals(index, h)
        if hd is None or hs is None or hd == hs:
            continue
        for low in by_drain.get(hs, []):
            if low.ref == h.ref:
                continue
            _, ls = _terminals(index, low)
            if ls is None or ls in (hd, hs):
                continue
            found.append((hs, h.ref, low.ref, hd, ls))
    count: dict[str, int] = {}
    for node, *_ in found:
        count[node] = count.get(node, 0) + 1
    legs = []
    for node, high, low, bus, ret in sorted(found):
        name = node if count[node] == 1 else f"{node} {high}/{low}"
        legs.append(Leg(name, high, low, bus, node, ret,
                        capacitors_across(index, roles, bus, ret)))
    return legs, []


def _named_leg(project: Project, spec, roles, index) -> Leg:
    def fail(msg):
        raise ProjectFileError(f"[legs.{spec.name}] {msg}", file=str(project.path or
                                                                    "<project>"),
                               line=spec.line)

    for key in ("high", "low"):
        ref = getattr(spec, key)
        if ref not in roles:
            fail(f"{key} = {ref!r}: the board has no such part")
        if not roles[ref].has_terminals:
            fail(f"{key} = {ref!r} is not a switch with known drain and source pads "
                 f"(found: {roles[ref].basis}); set [parts.{ref}] kind and pins")
    h, low = roles[spec.high], roles[spec.low]
    hd, hs = _terminals(index, h)
    ld, ls = _terminals(index, low)
    if hs is None or hs != ld:
        fail(f"{spec.high}'s {h.letter('S')} pad is on net {hs} and {spec.low}'s "
             f"{low.letter('D')} pad on net {ld}; a leg needs them on one net")
    if hd is None or ls is None or hd == ls:
        fail(f"{spec.high}'s {h.letter('D')} net ({hd}) and {spec.low}'s {low.letter('S')} "
             f"net ({ls}) must be two different nets")
    if spec.capacitor is not None:
        c = spec.capacitor
        if c not in roles:
            fail(f"capacitor = {c!r}: the board has no such part")
        if capacitor_pads(index, c, hd, ls) is None:
            nets = sorted({n for n in index.nets_of(c).values() if n})
            fail(f"capacitor {c} is on {', '.join(nets) or 'no net'}, not across {hd} and "
                 f"{ls}")
        caps = [c]
    else:
        caps = capacitors_across(index, roles, hd, ls)
    return Leg(spec.name, spec.high, spec.low, hd, hs, ls, caps, named=True)


def leg_loop_pads(leg: Leg, capacitor: str, roles: dict[str, PartRole],
                  index: PadIndex) -> list[PadRef]:
    """The pad sequence of the loop ``cap+ -> high D -> high S -> low D -> low S -> cap-``."""
    h, low = roles[leg.high], roles[leg.low]
    cp, cn = capacitor_pads(index, capacitor, leg.bus_net, leg.return_net)
    return [PadRef(capacitor, cp), PadRef(leg.high, h.pad("D")), PadRef(leg.high, h.pad("S")),
            PadRef(leg.low, low.pad("D")), PadRef(leg.low, low.pad("S")),
            PadRef(capacitor, cn)]
