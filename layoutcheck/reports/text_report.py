"""Terminal text report: a summary table, findings grouped by rule (worst first), then the
assumptions and the safety caution.  Lengths in mm, voltages in V.
"""
from __future__ import annotations

import textwrap
from collections import defaultdict

from ..findings import SEVERITY_RANK
from .caution import closing_lines
from .json_report import auto_named_nets, loop_entries
from .loop_report import loop_lines

WIDTH = 92
_LABEL = {"error": "ERROR", "warning": "WARN ", "info": "info "}


def _wrap(text: str, indent: str) -> list[str]:
    return textwrap.wrap(text, WIDTH, initial_indent=indent, subsequent_indent=indent) or [indent]


def _xy(p) -> str:
    return f"({p[0]:.3f}, {p[1]:.3f})"


def render(review) -> str:
    b = review.board
    g = review.graph
    lines: list[str] = []
    size = b.size_mm
    lines.append(f"layoutcheck review of {b.name}")
    dims = f"{size[0]:.1f} x {size[1]:.1f} mm" if size else "size unknown"
    lines.append(f"  board: {dims}, {len(b.copper_layers)} copper layer(s) "
                 f"({', '.join(b.copper_layers)}), {len(g.nets)} nets, "
                 f"{len(b.components)} components, {len(b.holes)} holes")
    if g.floating:
        lines.append(f"  floating copper islands (no net): {len(g.floating)}")
    undeclared = [a for a in review.assumptions if a.topic == "voltage" and
                  a.text.startswith("net ")]
    if undeclared:
        lines.extend(textwrap.wrap(
            f"NOTE: {len(undeclared)} of {len(g.nets)} nets have no declared voltage and "
            "were given an assumed one (see Assumptions); every verdict below depends on "
            "that.", WIDTH, initial_indent="  ", subsequent_indent="        "))
    lines.append("")

    by_rule: dict[str, list] = defaultdict(list)
    for f in review.findings:
        by_rule[f.rule].append(f)
    order = sorted(by_rule, key=lambda r: (min(SEVERITY_RANK[f.severity] for f in by_rule[r]),
                                           -len(by_rule[r]), r))
    quiet = sorted(set(review.rules_run) - set(by_rule))
    head = f"  {'rule':<22}{'errors':>8}{'warnings':>10}{'info':>7}"
    lines.append(head)
    lines.append("  " + "-" * (len(head) - 2))
    tot = [0, 0, 0]
    for r in order:
        c = [sum(f.severity == s for f in by_rule[r]) for s in ("error", "warning", "info")]
        tot = [a + x for a, x in zip(tot, c)]
        lines.append(f"  {r:<22}{c[0]:>8}{c[1]:>10}{c[2]:>7}")
    for r in quiet:
        lines.append(f"  {r:<22}{0:>8}{0:>10}{0:>7}")
    lines.append(f"  {'total':<22}{tot[0]:>8}{tot[1]:>10}{tot[2]:>7}")
    lines.append("")
    if not review.findings:
        lines.append("No findings for the rules run. Read the assumptions below: the result "
                     "holds only under them.")
        lines.append("")

    for r in order:
        fs = by_rule[r]
        lines.append(f"{r} ({len(fs)})")
        for f in fs:
            where = f" {f.layer}" if f.layer else ""
            nets = " / ".join(f.nets)
            lines.append(f"  {_LABEL[f.severity]}{where}  {nets}".rstrip())
            lines.extend(_wrap(f.message, "         "))
            if f.where is not None:
                loc = _xy(f.where) + (f" to {_xy(f.to)}" if f.to is not None else "")
                lines.append(f"         at {loc} mm")
            if f.extra.get("via"):
                lines.extend(_wrap("through floating copper: " + ", ".join(f.extra["via"]),
                                   "         "))
            if f.extra.get("path") and len(f.extra["path"]) > 2:
                pts = " -> ".join(f"({x:.2f}, {y:.2f})" for x, y in f.extra["path"][:6])
                more = " ..." if len(f.extra["path"]) > 6 else ""
                lines.extend(_wrap(f"surface path: {pts}{more}", "         "))
            if f.basis:
                lines.extend(_wrap("basis: " + f.basis, "         "))
        lines.append("")

    loops = loop_entries(review)
    if loops:
        lines.append(f"Power loops ({len(loops)})")
        lines.extend(loop_lines(loops))
        lines.append("")

    named = auto_named_nets(review)
    if named:
        lines.append(f"Nets named by layoutcheck ({len(named)}): the files carry no name for them")
        for n in named:
            pins = ", ".join(n["pins"][:8]) + (" ..." if len(n["pins"]) > 8 else "")
            w = n["where"]
            lines.append(f"  {n['name']:<6} {n['layer']} at ({w['x_mm']:.3f}, {w['y_mm']:.3f})"
                         + (f"  pins {pins}" if pins else ""))
        lines.append("")

    lines.extend(closing_lines(review.assumptions, WIDTH))
    return "\n".join(lines) + "\n"
