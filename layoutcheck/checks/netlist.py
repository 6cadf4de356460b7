"""Netlist agreement: where an IPC-D-356 netlist and the board's copper disagree.

Units: millimetres (locations).

The reader (:func:`layoutcheck.readers.netlist_apply.apply_netlist`) matches every test
point of the netlist to the copper and leaves what did not agree on
``board.netlist_problems``; this rule turns each into one ``netlist-mismatch`` finding
(severity error) with its location, nets and the netlist lines concerned:

* copper that joins two netlist nets (located where the copper of the two meets),
* a netlist net whose points land on unconnected pieces of copper (every piece located),
* a record that points at no copper on the layers it reaches, or at no (plated) hole,
* a record whose net differs from the name the board files give that copper.

A board read without a netlist has no such problems and gets no findings.
"""
from __future__ import annotations

from ..findings import Finding
from . import CheckContext

RULE_IDS = ("netlist-mismatch",)
SUMMARY = "IPC-D-356 netlist against the copper: joined or split nets, points on no copper"
ORDER = 12


def run(ctx: CheckContext) -> list[Finding]:
    """One error finding per netlist problem the reader recorded (see the module docstring)."""
    out: list[Finding] = []
    for p in getattr(ctx.board, "netlist_problems", None) or []:
        extra = {"kind": p.kind, "netlist": p.file, "lines": list(p.lines)}
        extra.update(p.extra)
        out.append(Finding(rule="netlist-mismatch", severity="error", message=p.message,
                           layer=p.layer, nets=list(p.nets), where=p.where, extra=extra))
    return out
