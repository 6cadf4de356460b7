"""SVG drawing of a stripboard plan: copper side and part side, findings marked.

Units: the drawing is in millimetres (1 user unit = 1 mm).  The copper side is drawn as
seen from below (mirrored left to right), the part side as seen from above.  Strip copper
is coloured by the highest voltage its net may reach (red at 60 V and above, blue below,
grey for floating copper); cuts are drawn as white gaps, links as lines, part pins as
dots joined to their part's label; each finding is a numbered ring, listed under the
drawing.
"""
from __future__ import annotations

import textwrap

from xml.sax.saxutils import escape

import shapely

HIGH_V = 60.0  # volts: above this a strip is drawn as high voltage (common practice, ELV)
_MARGIN = 6.0


def _path(geom, tx) -> str:
    """SVG path data of a (multi)polygon, each point mapped by ``tx``."""
    out = []
    for poly in shapely.get_parts(geom):
        if poly.is_empty or poly.geom_type != "Polygon":
            continue
        for ring in (poly.exterior, *poly.interiors):
            pts = [tx(x, y) for x, y in ring.coords]
            out.append("M" + " L".join(f"{x:.3f},{y:.3f}" for x, y in pts) + " Z")
    return " ".join(out)


def render(review) -> str:
    """The SVG text for a review of a plan board (``review.board.plan`` must be set)."""
    board, plan, g, proj = review.board, review.board.plan, review.graph, review.project
    w, h = plan.cols * plan.pitch, plan.rows * plan.pitch
    gap = 12.0
    total_w = 2 * w + gap + 2 * _MARGIN
    chars = max(40, int((2 * w + gap) / 1.15))   # about 1.15 mm per character at size 2.2
    wrapped = [textwrap.wrap(f"{k}. [{f.severity}] {f.rule}: {f.message}", chars,
                             subsequent_indent="    ")
               for k, f in enumerate(review.findings, 1)]
    total_h = h + 2 * _MARGIN + 14 + sum(3.2 * len(x) + 1.4 for x in wrapped)
    parts = [f'<svg xmlns="http://www.w3.org/2000/svg" width="{total_w * 4:.0f}" '
             f'height="{total_h * 4:.0f}" viewBox="0 0 {total_w:.3f} {total_h:.3f}" '
             'font-family="sans-serif">',
             f'<rect width="{total_w:.3f}" height="{total_h:.3f}" fill="#ffffff"/>']

    def copper_tx(x, y):
        return (_MARGIN + (w - x), _MARGIN + 6 + (h - y))

    def part_tx(x, y):
        return (_MARGIN + w + gap + x, _MARGIN + 6 + (h - y))

    parts.append(f'<text x="{_MARGIN}" y="{_MARGIN + 3}" font-size="3">copper side '
                 '(seen from below, mirrored)</text>')
    parts.append(f'<text x="{_MARGIN + w + gap}" y="{_MARGIN + 3}" font-size="3">part side'
                 '</text>')
    for tx in (copper_tx, part_tx):
        parts.append(f'<path d="{_path(board.outline, tx)}" fill="#e8dcc0" '
                     'stroke="#806040" stroke-width="0.2"/>')

    def colour(net):
        if net is None:
            return "#b0b0b0"
        v, _ = proj.voltage_of(net)
        return "#d04030" if max(abs(v.lo), abs(v.hi)) >= HIGH_V else "#3060c0"

    for idx, shape in enumerate(board.shapes):
        isl = int(g.shape_island[idx])
        net = g.island_net[isl] if isl >= 0 else None
        if shape.layer == "bottom" and shape.component is None:
            parts.append(f'<path d="{_path(shape.geometry, copper_tx)}" fill="{colour(net)}" '
                         f'fill-opacity="0.8" fill-rule="evenodd"><title>{escape(str(net))}'
                         '</title></path>')
    for hole in board.holes:
        for tx in (copper_tx, part_tx):
            parts.append(f'<path d="{_path(hole.geometry, tx)}" fill="#ffffff" '
                         'stroke="#404040" stroke-width="0.05"/>')
    for cut in plan.cuts:
        x, y = copper_tx(*cut.where)
        parts.append(f'<text x="{x:.3f}" y="{y - 1.6:.3f}" font-size="1.4" '
                     f'text-anchor="middle">{escape(cut.text)}</text>')
    for net, hole in sorted(plan.labels.items()):
        for tx in (copper_tx, part_tx):
            x, y = tx(*plan.xy(hole))
            parts.append(f'<text x="{x:.3f}" y="{y - 1.4:.3f}" font-size="1.5" '
                         f'fill="#202020">{escape(net)}</text>')
    for link in plan.links:
        x1, y1 = part_tx(*plan.xy(link.a))
        if link.b is None:
            parts.append(f'<line x1="{x1:.3f}" y1="{y1:.3f}" x2="{x1:.3f}" '
                         f'y2="{y1 - 3:.3f}" stroke="#208020" stroke-width="0.5"/>'
                         f'<text x="{x1:.3f}" y="{y1 - 3.4:.3f}" font-size="1.5">'
                         f'{escape(link.off_board or "")}</text>')
            continue
        x2, y2 = part_tx(*plan.xy(link.b))
        col = "#a06000" if link.bare else "#208020"
        parts.append(f'<line x1="{x1:.3f}" y1="{y1:.3f}" x2="{x2:.3f}" y2="{y2:.3f}" '
                     f'stroke="{col}" stroke-width="0.5"><title>{link.ref}</title></line>')
    for ref, comp in sorted(board.components.items()):
        pts = [part_tx(*p.position) for p in comp.pins.values() if p.position]
        if len(pts) > 1:
            d = "M" + " L".join(f"{x:.3f},{y:.3f}" for x, y in pts)
            parts.append(f'<path d="{d}" fill="none" stroke="#303030" stroke-width="0.6" '
                         'stroke-opacity="0.5"/>')
        for name, pin in sorted(comp.pins.items()):
            x, y = part_tx(*pin.position)
            parts.append(f'<circle cx="{x:.3f}" cy="{y:.3f}" r="0.7" fill="#303030"/>'
                         f'<text x="{x + 0.8:.3f}" y="{y + 1.8:.3f}" font-size="1.1">'
                         f'{escape(name)}</text>')
        if pts:
            x, y = pts[0]
            parts.append(f'<text x="{x:.3f}" y="{y - 1.2:.3f}" font-size="1.8" '
                         f'font-weight="bold">{escape(ref)}</text>')
    for k, f in enumerate(review.findings, 1):
        if f.where is None:
            continue
        tx = part_tx if f.layer == "top" else copper_tx
        x, y = tx(*f.where)
        col = {"error": "#e00000", "warning": "#e08000"}.get(f.severity, "#808080")
        parts.append(f'<circle cx="{x:.3f}" cy="{y:.3f}" r="1.6" fill="none" '
                     f'stroke="{col}" stroke-width="0.4"/><text x="{x + 1.8:.3f}" '
                     f'y="{y - 1.0:.3f}" font-size="2" fill="{col}">{k}</text>')
    y = _MARGIN + 6 + h + 6
    for lines in wrapped:
        for line in lines:
            parts.append(f'<text x="{_MARGIN}" y="{y:.3f}" font-size="2.2">'
                         f'{escape(line)}</text>')
            y += 3.2
        y += 1.4
    parts.append("</svg>")
    return "\n".join(parts) + "\n"
