"""NC drill writer for sample boards and reader tests.

Writes two files per design, plated (``<name>-PTH.drl``) and non-plated
(``<name>-NPTH.drl``), in the metric, absolute, decimal-point style (IPC-NC-349 lineage):

```
M48
; #@! TF.GenerationSoftware,layoutcheck,sample-writer,0.1
; #@! TF.FileFunction,Plated,1,2,PTH
; coordinates: millimetres, absolute, every number written with a decimal point
FMAT,2
METRIC,TZ,000.000
; #@! TA.AperFunction,Plated,PTH,ComponentDrill
T1C1.300
%
G90
G05
T1
X12.500Y5.000
...
M30
```

Each tool is preceded by a ``; #@! TA.AperFunction`` comment: ``Plated,PTH,ComponentDrill``
(through-hole pads), ``Plated,PTH,ViaDrill`` (vias) and ``NonPlated,NPTH,MechanicalDrill``
(bare holes and non-plated slots).  Tools are numbered from 1 in order of
(function, diameter); hits keep design order within a tool.  Slots are routed paths:
``G00X..Y..`` to the start, ``M15`` plunge, ``G01X..Y..`` along the centre line, ``M16``
retract, ``G05`` back to drill mode.

The zero-suppression word ``TZ`` ("trailing zeros kept") is true of the numbers written, and
every coordinate and size carries a decimal point, which overrides any zero mode.

Units: millimetres.  Coordinates are written with ``decimals`` decimals (default 3, i.e.
1 um, the usual 000.000 metric format).
"""
from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

from .design import Design
from .gerber import GENERATION_SOFTWARE

PTH_COMPONENT = ("Plated", "PTH", "ComponentDrill")
PTH_VIA = ("Plated", "PTH", "ViaDrill")
NPTH_MECHANICAL = ("NonPlated", "NPTH", "MechanicalDrill")


@dataclass
class _Tool:
    function: tuple[str, ...]
    diameter: float
    hits: list[tuple[float, float]] = field(default_factory=list)
    paths: list[list[tuple[float, float]]] = field(default_factory=list)


def _num(v: float, decimals: int) -> str:
    return f"{round(float(v), decimals) + 0.0:.{decimals}f}"


def _tools(design: Design, plated: bool, decimals: int) -> list[_Tool]:
    table: dict[tuple, _Tool] = {}

    def tool(function, d) -> _Tool:
        key = (function, round(float(d), decimals))
        if key not in table:
            table[key] = _Tool(function, key[1])
        return table[key]

    if plated:
        for p in design.pads:
            if p.drill is not None:
                tool(PTH_COMPONENT, p.drill).hits.append((p.x, p.y))
        for v in design.vias:
            tool(PTH_VIA, v.drill).hits.append((v.x, v.y))
        for s in design.slots:
            if s.plated:
                tool(PTH_COMPONENT, s.width).paths.append(list(s.points))
    else:
        for h in design.holes:
            tool(NPTH_MECHANICAL, h.d).hits.append((h.x, h.y))
        for s in design.slots:
            if not s.plated:
                tool(NPTH_MECHANICAL, s.width).paths.append(list(s.points))
    return [table[k] for k in sorted(table)]


def drill_text(design: Design, plated: bool = True, *, decimals: int = 3) -> str:
    """NC drill text of the plated (``plated=True``) or non-plated holes of ``design``.

    Units: millimetres.  An empty tool table still gives a valid file (header and ``M30``).
    """
    n = design.copper_layers
    span_kind = ("Plated", "1", str(n), "PTH") if plated else ("NonPlated", "1", str(n), "NPTH")
    lines = [
        "M48",
        "; #@! TF.GenerationSoftware," + ",".join(GENERATION_SOFTWARE),
        "; #@! TF.FileFunction," + ",".join(span_kind),
        f"; {design.name}: {'plated' if plated else 'non-plated'} holes and slots",
        "; coordinates: millimetres, absolute, every number written with a decimal point",
        "FMAT,2",
        "METRIC,TZ,000.000",
    ]
    tools = _tools(design, plated, decimals)
    for i, t in enumerate(tools, start=1):
        lines.append("; #@! TA.AperFunction," + ",".join(t.function))
        lines.append(f"T{i}C{_num(t.diameter, decimals)}")
    lines += ["%", "G90", "G05"]
    for i, t in enumerate(tools, start=1):
        lines.append(f"T{i}")
        for x, y in t.hits:
            lines.append(f"X{_num(x, decimals)}Y{_num(y, decimals)}")
        for path in t.paths:
            x0, y0 = path[0]
            lines.append(f"G00X{_num(x0, decimals)}Y{_num(y0, decimals)}")
            lines.append("M15")
            for x, y in path[1:]:
                lines.append(f"G01X{_num(x, decimals)}Y{_num(y, decimals)}")
            lines.append("M16")
            lines.append("G05")
    lines.append("M30")
    return "\n".join(lines) + "\n"


def drill_file_names(design: Design) -> tuple[str, str]:
    """(plated, non-plated) file names: ``<name>-PTH.drl``, ``<name>-NPTH.drl``."""
    return f"{design.name}-PTH.drl", f"{design.name}-NPTH.drl"


def write_drill(design: Design, out_dir, *, decimals: int = 3) -> list[Path]:
    """Write the plated and the non-plated drill file of ``design`` into ``out_dir``.

    Returns the two paths (plated first).  Units: millimetres.
    """
    design.validate()
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    paths = []
    for plated, fname in zip((True, False), drill_file_names(design)):
        p = out / fname
        p.write_text(drill_text(design, plated, decimals=decimals), encoding="ascii",
                     newline="\n")
        paths.append(p)
    return paths


__all__ = ["drill_text", "write_drill", "drill_file_names", "PTH_COMPONENT", "PTH_VIA",
           "NPTH_MECHANICAL"]
