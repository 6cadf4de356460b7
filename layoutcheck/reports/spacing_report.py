"""Text and JSON for ``layoutcheck spacing`` (a requirement without a board).

Lengths in mm, voltages in V.  JSON: ``{"clearance_mm", "creepage_mm", "basis": [...]}``
plus the inputs, the defaults used, assumptions, warnings and the caution.
"""
from __future__ import annotations

import json

from .caution import CAUTION

SCHEMA = "layoutcheck-spacing/1"

_LABELS = {"standard": "standard", "pollution_degree": "pollution degree",
           "material_group": "material group", "overvoltage_category": "overvoltage category",
           "insulation": "insulation", "altitude_m": "altitude", "coating": "coating",
           "creepage_columns": "creepage columns"}
_IEC_ONLY = {"pollution_degree", "material_group", "overvoltage_category", "insulation",
             "creepage_columns"}


def render_json(profile, req, inputs: dict, defaults: list[str], keys: list[str]) -> str:
    settings = {k: getattr(profile, k) for k in keys}
    doc = {"schema": SCHEMA,
           "clearance_mm": req.clearance_mm, "creepage_mm": req.creepage_mm,
           "basis": list(req.basis),
           "governing": {"clearance": req.clearance_by, "creepage": req.creepage_by},
           "inputs": {"volts": inputs["volts"], "rms_v": inputs["rms_v"],
                      "impulse_v": inputs["impulse_v"], **settings,
                      "interpolate": inputs["interpolate"],
                      "layer": "inner" if inputs["inner"] else "outer",
                      "termination": inputs["termination"]},
           "defaults_used": defaults, "assumptions": list(req.assumptions),
           "warnings": list(req.warnings), "from_memory": req.from_memory,
           "caution": CAUTION}
    return json.dumps(doc, indent=2) + "\n"


def _mm(x: float) -> str:
    t = f"{x:.6g}"
    return t if "." in t else t + ".0"


def render_text(profile, req, inputs: dict, defaults: list[str], keys: list[str]) -> str:
    volts, rms, impulse = inputs["volts"], inputs["rms_v"], inputs["impulse_v"]
    out = [f"Required spacing for a working voltage of {volts:g} V"]
    for k in keys:
        if profile.standard == "ipc2221b" and k in _IEC_ONLY:
            continue
        v = getattr(profile, k)
        shown = f"{v:g} m" if k == "altitude_m" else str(v)
        out.append(f"  {_LABELS[k]}: {shown}" + (" (default)" if k in defaults else ""))
    if profile.standard != "ipc2221b":
        out.append(f"  RMS voltage for creepage: {rms:g} V" if rms is not None else
                   f"  RMS voltage for creepage: {volts:g} V (default: the working voltage)")
        out.append(f"  impulse voltage: {impulse:g} V" if impulse is not None else
                   "  impulse voltage: from IEC 60664-1 Table F.1 (default)")
    if profile.standard != "iec60664-1":
        out.append(f"  layer: {'internal' if inputs['inner'] else 'external (default)'}; "
                   f"{'termination' if inputs['termination'] else 'no termination (default)'}")
    if profile.standard != "ipc2221b":
        out.append("  rows: " + ("interpolated" if inputs["interpolate"]
                                 else "next row up (default)"))
    out += ["", f"  clearance: {_mm(req.clearance_mm)} mm ({req.clearance_by})",
            f"  creepage:  {_mm(req.creepage_mm)} mm ({req.creepage_by})", "", "Basis:"]
    out += [f"  - {b}" for b in req.basis]
    for title, items in (("Assumptions:", req.assumptions), ("Warnings:", req.warnings)):
        if items:
            out += ["", title] + [f"  - {a}" for a in items]
    out += ["", CAUTION]
    return "\n".join(out) + "\n"
