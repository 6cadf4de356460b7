"""Text and JSON for commutation loops: the ``layoutcheck loop`` command's output, and the
loop table the review's text report shows.

Units: nH, mm, mm^2, V, MHz, as the JSON key names say.  JSON of the command::

    {"schema": "layoutcheck-loop/1",
     "loops": [{"name", "parts", "inductance_nh", "area_mm2", "length_mm",
                "stacked_return_nh", "overshoot_v", "ringing_mhz",
                "path": [[x, y, layer], ...], ...}],
     "assumptions": [{"topic", "text"}], "caution": "..."}
"""
from __future__ import annotations

import json

from .caution import CAUTION, closing_lines
from .json_report import _clean

SCHEMA = "layoutcheck-loop/1"
WIDTH = 92


def render_json(result) -> str:
    """JSON text for a :class:`layoutcheck.loops.ThroughResult` (two-space indent)."""
    doc = {"schema": SCHEMA,
           "loops": [_clean(r.entry()) for r in result.loops],
           "assumptions": [{"topic": a.topic, "text": a.text} for a in result.assumptions],
           "caution": CAUTION}
    return json.dumps(doc, indent=2, ensure_ascii=False) + "\n"


def _num(v, fmt: str, unit: str) -> str:
    return "-" if v is None else f"{v:{fmt}} {unit}"


def loop_lines(entries: list[dict]) -> list[str]:
    """A few lines per loop entry (the dicts of ``LoopResult.entry()``)."""
    out = []
    for e in entries:
        mark = "" if e.get("smallest", True) else "  (not the leg's smallest)"
        out.append(f"  {e['name']}{mark}")
        out.append(f"    L {_num(e['inductance_nh'], '.1f', 'nH')} (parts inside: "
                   f"{_num(e.get('internal_nh'), '.1f', 'nH')}), area "
                   f"{_num(e['area_mm2'], '.0f', 'mm^2')}, length "
                   f"{_num(e['length_mm'], '.0f', 'mm')}, over a stacked return "
                   f"{_num(e['stacked_return_nh'], '.1f', 'nH')}")
        peak = f"peak {_num(e.get('peak_v'), '.0f', 'V')}"
        if e.get("rating_pct") is not None:
            peak += (f" = {e['rating_pct']:.0f} % of {e['rating_v']:.0f} V (allowed "
                     f"{100 * e['derating']:.0f} %)")
        out.append(f"    at {e['di_dt_a_per_ns']:g} A/ns: overshoot "
                   f"{_num(e['overshoot_v'], '.0f', 'V')} on a {e['bus_v']:.0f} V bus, "
                   f"{peak}; ringing {_num(e['ringing_mhz'], '.0f', 'MHz')}")
        out.append("    through " + " -> ".join(e.get("pads") or e["parts"]))
    return out


def render_text(result) -> str:
    """Terminal text for a :class:`layoutcheck.loops.ThroughResult`."""
    entries = [r.entry() for r in result.loops]
    lines = [f"layoutcheck loop ({len(entries)} loop{'s' if len(entries) != 1 else ''})"]
    lines += loop_lines(entries)
    for e in entries:
        if e["severity"] == "error":
            lines.append(f"  ERROR: {e['name']}: the peak exceeds the derated switch rating")
    lines.append("")
    lines.extend(closing_lines(result.assumptions, WIDTH))
    return "\n".join(lines) + "\n"
