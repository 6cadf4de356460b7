"""JSON report: one object, schema ``layoutcheck-report/1`` (extend, never break).

``loops`` lists the commutation loops the power-loop rule evaluated (the data it leaves in
``Finding.extra["loop"]``; the finding itself then shows the loop's name under ``loop``).

Lengths in millimetres, voltages in volts; floats rounded to 0.1 um / 1 mV so that the same
input gives the same bytes.
"""
from __future__ import annotations

import json
import math
from typing import Any

from .caution import CAUTION

SCHEMA = "layoutcheck-report/1"


def _r(v, nd=4):
    if v is None:
        return None
    if isinstance(v, float):
        if not math.isfinite(v):
            return None
        v = round(v, nd)
        return 0.0 if v == 0 else v
    return v


def _pt(p):
    if p is None:
        return None
    return {"x_mm": _r(float(p[0])), "y_mm": _r(float(p[1]))}


def _clean(v: Any):
    if isinstance(v, float):
        return _r(v)
    if isinstance(v, dict):
        return {k: _clean(x) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return [_clean(x) for x in v]
    return v


def auto_named_nets(review) -> list[dict]:
    """Nets layoutcheck had to name (``N1``...): their pins and a point on their copper."""
    g = review.graph
    out = []
    for net in sorted(g.auto_named, key=lambda n: (len(n), n)):
        isl = g.islands[g.nets[net][0]]
        p = isl.geometry.representative_point()
        out.append({"name": net, "pins": [f"{r}.{p_}" for r, p_ in g.pins_of(net)],
                    "layer": isl.layer, "where": _pt((p.x, p.y))})
    return out


def loop_entries(review) -> list[dict]:
    """The loop data the power-loop rule left on its findings, in findings order."""
    return [f.extra["loop"] for f in review.findings
            if f.rule == "power-loop" and isinstance(f.extra.get("loop"), dict)]


def report_dict(review) -> dict:
    """The report as plain data (see the module docstring for the schema)."""
    b = review.board
    size = b.size_mm
    findings = []
    for f in review.findings:
        d = {
            "rule": f.rule, "severity": f.severity, "layer": f.layer, "nets": list(f.nets),
            "measured_mm": _r(f.measured_mm), "required_mm": _r(f.required_mm),
            "voltage_v": _r(f.voltage_v, 3), "basis": f.basis, "where": _pt(f.where),
            "to": _pt(f.to), "message": f.message,
        }
        for k, v in f.extra.items():
            d[k] = _clean(v) if k != "loop" else v.get("name")
        findings.append(d)
    summary = {"errors": sum(f.severity == "error" for f in review.findings),
               "warnings": sum(f.severity == "warning" for f in review.findings),
               "infos": sum(f.severity == "info" for f in review.findings)}
    out = {
        "schema": SCHEMA,
        "board": {
            "name": b.name,
            "layers": [{"name": l.name, "kind": l.kind, "side": l.side,
                        "file": l.source} for l in b.layers],
            "nets": sorted(review.graph.nets),
            "components": sorted(b.components),
            "size_mm": [_r(size[0]), _r(size[1])] if size else None,
            "floating_islands": len(review.graph.floating),
            "named_by_layoutcheck": auto_named_nets(review),
        },
        "assumptions": [{"topic": a.topic, "text": a.text} for a in review.assumptions],
        "findings": findings,
        "loops": [_clean(e) for e in loop_entries(review)],
        "summary": summary,
        "rules_run": list(review.rules_run),
        "caution": CAUTION,
    }
    return out


def render(review) -> str:
    """The JSON text (UTF-8, two-space indent, trailing newline)."""
    return json.dumps(report_dict(review), indent=2, ensure_ascii=False) + "\n"
