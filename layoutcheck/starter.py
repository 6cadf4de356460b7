"""Text of a starter project file for ``layoutcheck init``.

Every net found is listed.  A voltage is filled in only where the name says it plainly
(``+15V``, ``3V3``, ``GND``...) or names a high-voltage node (``HV``, ``BUS``, ``DC+``...);
every filled value is marked as a guess in a comment.  Other nets are listed commented out,
so the ``"*"`` fallback applies to them and each shows up as an assumption in reports.
"""
from __future__ import annotations

import re

_GROUND = re.compile(r"^(GND|AGND|DGND|PGND|GNDA|GNDD|VSS|COM|0V|EARTH|PE)(_.*)?$", re.I)
_VOLTS = re.compile(r"^[+]?(\d+)(?:[.Vv](\d+))?V?$")
_NEG = re.compile(r"^-(\d+)(?:[.Vv](\d+))?V?$")
_HIGH = re.compile(r"(^|[_\-])(HV|BUS|VBUS|DCBUS|DC\+|DC_P|HVDC|VDC|LINE|MAINS)($|[_\-+])", re.I)
_SWING = re.compile(r"(^|[_\-])(SW|PHASE|OUT|HO|VS|VB)($|[_\-\d])", re.I)


def guess_voltage(net: str) -> tuple[str, str] | None:
    """(TOML value, comment) guessed from a net name, or None."""
    n = net.strip()
    if _GROUND.match(n):
        return "0", "guess: a ground name"
    m = _VOLTS.match(n) if re.search(r"\dV|V\d", n, re.I) else None
    if m:
        v = float(f"{m.group(1)}.{m.group(2) or 0}")
        return f"{v:g}", "guess: voltage in the name"
    m = _NEG.match(n) if re.search(r"\dV|V\d", n, re.I) else None
    if m:
        v = -float(f"{m.group(1)}.{m.group(2) or 0}")
        return f"{v:g}", "guess: voltage in the name"
    if _HIGH.search(n):
        return "400", "GUESS: a high-voltage name; set your bus maximum"
    if _SWING.search(n):
        return '"0..400"', "GUESS: a switching node; set 0..bus maximum (+ driver supply " \
                          "for bootstrap/high-side gate nets)"
    return None


def _key(net: str) -> str:
    return '"' + net.replace("\\", "\\\\").replace('"', '\\"') + '"'


def starter_project_text(board, graph) -> str:
    lines = [
        "# layoutcheck project file (starter written by `layoutcheck init`).",
        "# Check every value: a wrong voltage gives a wrong review.",
        "",
        "[board]",
        'files = "."',
        "",
        "[voltages]",
        "# volts: a number, or \"lo..hi\" for a node that swings. Exact names beat globs;",
        "# among globs the first wins; \"*\" is the fallback for every other net.",
    ]
    for net in sorted(graph.nets):
        pins = graph.pins_of(net)
        pin_text = ", ".join(f"{r}.{p}" for r, p in pins[:6]) + (" ..." if len(pins) > 6 else "")
        g = guess_voltage(net)
        note = f"  pins: {pin_text}" if pin_text else ""
        if g:
            lines.append(f"{_key(net)} = {g[0]}  # {g[1]}{';' + note if note else ''}")
        else:
            lines.append(f"# {_key(net)} = ?  # not guessed{';' + note if note else ''}")
    lines += [
        '"*" = "0..15"',
        "",
        "[environment]",
        "altitude_m = 0",
        'coating = "none"          # none | solder-mask | conformal',
        "",
    ]
    return "\n".join(lines)
