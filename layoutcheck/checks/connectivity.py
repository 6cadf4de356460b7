"""Connectivity: copper that joins differently named nets, nets in pieces, copper on no net.

Units: millimetres (locations), mm^2 (areas).

The work is done by :func:`layoutcheck.netgraph.build_netgraph`; this rule turns what it
found into findings:

* ``net-short`` (error): two differently named nets are joined by copper or a plated
  hole; one finding per meeting place (a conductor carrying k names gives k-1).
* ``net-split`` (error): a net's copper is in several unconnected pieces; one finding per
  piece beyond the main one, located on that piece.
* ``floating-copper`` (info): an island on no net and with no component pins.

When the files carry no net names, the nets were found from the copper alone and named
``N1, N2, ...``; this is recorded as an assumption, as is every unnamed group of pins that
had to be given a name.
"""
from __future__ import annotations

from ..findings import Finding
from ..netgraph import NetGraph, build_netgraph
from . import CheckContext

RULE_IDS = ("net-short", "net-split", "floating-copper")
SUMMARY = "copper joining differently named nets, nets in several pieces, copper on no net"
ORDER = 10


def graph_of(ctx: CheckContext) -> NetGraph:
    """The context's net graph, built (and kept on the context) if it is missing."""
    if ctx.graph is None:
        ctx.graph = build_netgraph(ctx.board)
    return ctx.graph


def _at(p) -> str:
    return f"({p[0]:.2f}, {p[1]:.2f})"


def run(ctx: CheckContext) -> list[Finding]:
    """Findings for shorts, splits and floating copper (see the module docstring)."""
    g = graph_of(ctx)
    board = ctx.board
    out: list[Finding] = []

    for s in g.shorts:
        a, b = s.nets
        if s.hole is not None:
            hole = board.holes[s.hole]
            span = f"{hole.span[0]}..{hole.span[1]}" if hole.span else "all layers"
            place = f"through the plated hole at {_at(s.where)} ({span})"
        else:
            place = f"on {s.layer} at {_at(s.where)}"
        others = [n for n in s.all_nets if n not in (a, b)]
        also = f"; the same copper also carries {', '.join(others)}" if others else ""
        msg = (f"Nets {a} and {b} are joined {place}{also}. The joined copper is checked "
               f"as {s.checked_as}.")
        out.append(Finding(
            rule="net-short", severity="error", message=msg, layer=s.layer,
            nets=[a, b], where=s.where,
            extra={"all_nets": list(s.all_nets), "checked_as": s.checked_as,
                   "hole": s.hole}))

    for s in g.splits:
        msg = (f"Net {s.net} is in {s.pieces} unconnected pieces; piece {s.piece} "
               f"(on {s.layer} at {_at(s.where)}) does not touch the rest.")
        out.append(Finding(
            rule="net-split", severity="error", message=msg, layer=s.layer, nets=[s.net],
            where=s.where,
            extra={"pieces": s.pieces, "piece": s.piece, "islands": list(s.islands)}))

    for i in g.floating:
        isl = g.islands[i]
        area = isl.area
        pt = isl.geometry.representative_point()
        where = (float(pt.x), float(pt.y))
        marked = " (marked as no net in the file)" if isl.no_net else ""
        msg = (f"Copper on {isl.layer} at {_at(where)} ({area:.2f} mm^2) is on no net and "
               f"has no component pins{marked}.")
        out.append(Finding(
            rule="floating-copper", severity="info", message=msg, layer=isl.layer,
            where=where, extra={"area_mm2": round(area, 6), "island": i}))

    if g.auto_named:
        names = sorted(g.auto_named, key=_natural)
        if not board.has_net_names:
            ctx.assume("nets", (
                f"the board files carry no net names: the copper forms {len(names)} "
                f"separate conductors, named {names[0]}..{names[-1]} in order of layer and "
                f"position; voltages can only be given to them by these names or by \"*\""))
        else:
            for name in names:
                pins = g.pins_of(name)
                shown = ", ".join(f"{r}.{p}" for r, p in pins[:6])
                more = f" and {len(pins) - 6} more" if len(pins) > 6 else ""
                ctx.assume("nets", (
                    f"copper joining pins {shown}{more} carries no net name; it is "
                    f"called {name} here"))
    return out


def _natural(name: str):
    digits = name.lstrip("N")
    return (0, int(digits)) if digits.isdigit() else (1, name)
