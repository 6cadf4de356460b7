"""Which file is which layer.

Order of evidence (strongest first):

1. the Gerber X2 ``.FileFunction`` file attribute (and ``.FilePolarity``);
2. ``[board] layers`` in the project file (file name -> layer);
3. a guess from words in the file name, recorded as an assumption.

Layer values accepted in the project map: ``top``, ``in1``..``inN``, ``bottom``,
``copper-<n>`` (1 = top), ``profile``, ``drill`` / ``drill-pth`` / ``drill-npth``,
``soldermask-top``/``-bottom``, ``legend-top``/``-bottom``, ``paste-top``/``-bottom``,
``ignore``.
"""
from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import PurePosixPath

from ..errors import ProjectFileError


@dataclass
class LayerRole:
    """What one file is.

    kind:      ``copper``, ``profile``, ``drill``, ``soldermask``, ``legend``, ``paste``,
               ``component``, ``drawing``, ``other`` or ``ignore``.
    side:      ``top``/``bottom``/``inner`` (copper, mask...), else ``None``.
    index:     copper: the L number (1 = top) when known; inner layers by name guess get
               their ``in<k>`` number + 1.  ``None`` for an outer layer known only by side.
    plated:    drill: True/False when the role says so.
    span:      drill: (from, to) copper L numbers when known.
    basis:     ``x2``, ``project`` or ``file name`` (the last is an assumption).
    negative:  the file image is negative (dark = no material).
    """

    kind: str
    side: str | None = None
    index: int | None = None
    plated: bool | None = None
    span: tuple[int, int] | None = None
    basis: str = "x2"
    negative: bool = False
    function: str = ""


_SIDE = {"Top": "top", "Bot": "bottom", "Inr": "inner"}


def role_from_x2(file_function: tuple[str, ...] | None,
                 file_polarity: tuple[str, ...] | None) -> LayerRole | None:
    """Role from X2 ``.FileFunction`` fields, or ``None`` when absent."""
    if not file_function:
        return None
    ff = [f.strip() for f in file_function]
    neg = bool(file_polarity) and file_polarity[0].strip().lower() == "negative"
    head = ff[0]
    text = ",".join(ff)
    if head == "Copper":
        idx = None
        if len(ff) > 1 and re.fullmatch(r"L\d+", ff[1]):
            idx = int(ff[1][1:])
        side = _SIDE.get(ff[2]) if len(ff) > 2 else None
        return LayerRole("copper", side, idx, negative=neg, function=text)
    if head in ("Plated", "NonPlated"):
        span = None
        if len(ff) > 2 and ff[1].isdigit() and ff[2].isdigit():
            span = (int(ff[1]), int(ff[2]))
        return LayerRole("drill", plated=(head == "Plated"), span=span, function=text)
    if head == "Profile":
        return LayerRole("profile", function=text)
    if head == "Soldermask":
        return LayerRole("soldermask", _SIDE.get(ff[1]) if len(ff) > 1 else None,
                         function=text, negative=neg)
    if head == "Legend":
        return LayerRole("legend", _SIDE.get(ff[1]) if len(ff) > 1 else None, function=text)
    if head == "Paste":
        return LayerRole("paste", _SIDE.get(ff[1]) if len(ff) > 1 else None, function=text)
    if head == "Component":
        return LayerRole("component", function=text)
    if head in ("Drillmap", "FabricationDrawing", "AssemblyDrawing", "OtherDrawing",
                "ArrayDrawing", "Vcut", "Depthrout", "Keep-out", "Pads", "Glue",
                "Carbonmask", "Goldmask", "Heatsinkmask", "Peelablemask", "Silvermask",
                "Tinmask", "Viafill", "Plated-ink", "Other"):
        return LayerRole("other", function=text)
    return LayerRole("other", function=text)


_MAP_RE = re.compile(r"^(top|bottom|in(\d+)|copper-(\d+)|profile|drill|drill-pth|drill-npth|"
                     r"(soldermask|legend|paste)-(top|bottom)|ignore)$")


def role_from_project(name: str, layer_map: dict[str, str], project_file: str) -> LayerRole | None:
    """Role from ``[board] layers`` (matched on the file's name or its base name)."""
    value = layer_map.get(name) or layer_map.get(PurePosixPath(name).name)
    if value is None:
        return None
    m = _MAP_RE.match(value)
    if not m:
        raise ProjectFileError(
            f"[board] layers: {value!r} for {name} is not a layer; expected top, in1..inN, "
            "bottom, copper-<n>, profile, drill, drill-pth, drill-npth, soldermask-top, "
            "legend-bottom, paste-top, ... or ignore", file=project_file)
    v = m.group(0)
    if v == "top":
        return LayerRole("copper", "top", 1, basis="project")
    if v == "bottom":
        return LayerRole("copper", "bottom", None, basis="project")
    if m.group(2):
        return LayerRole("copper", "inner", int(m.group(2)) + 1, basis="project")
    if m.group(3):
        return LayerRole("copper", None, int(m.group(3)), basis="project")
    if v == "profile":
        return LayerRole("profile", basis="project")
    if v.startswith("drill"):
        plated = {"drill": None, "drill-pth": True, "drill-npth": False}[v]
        return LayerRole("drill", plated=plated, basis="project")
    if m.group(4):
        return LayerRole(m.group(4), m.group(5), basis="project")
    return LayerRole("ignore", basis="project")


def _words(name: str) -> list[str]:
    stem = PurePosixPath(name).name.lower()
    return [w for w in re.split(r"[^a-z0-9]+", stem) if w]


_EXT_ROLE = {  # widely used fab-file extensions (common practice)
    "gtl": ("copper", "top"), "gbl": ("copper", "bottom"),
    "gts": ("soldermask", "top"), "gbs": ("soldermask", "bottom"),
    "gto": ("legend", "top"), "gbo": ("legend", "bottom"),
    "gtp": ("paste", "top"), "gbp": ("paste", "bottom"),
    "gko": ("profile", None), "gm1": ("profile", None),
}


def role_from_name(name: str) -> LayerRole | None:
    """A guess from the file name (words and common extensions); ``None`` if no idea."""
    words = _words(name)
    ext = PurePosixPath(name).suffix.lower().lstrip(".")
    if ext in _EXT_ROLE:
        kind, side = _EXT_ROLE[ext]
        return LayerRole(kind, side, 1 if (kind == "copper" and side == "top") else None,
                         basis="file name")
    m = re.fullmatch(r"g(\d+)", ext) or re.fullmatch(r"gp(\d+)", ext)
    if m:
        return LayerRole("copper", "inner", int(m.group(1)) + 1, basis="file name")
    ws = set(words)
    side = None
    if ws & {"top", "front", "component"}:
        side = "top"
    elif ws & {"bottom", "bot", "back", "solder"}:
        side = "bottom"
    if ws & {"profile", "outline", "edge", "edges", "cuts", "boardoutline", "contour"}:
        return LayerRole("profile", basis="file name")
    if ws & {"mask", "soldermask", "solderresist", "resist"}:
        return LayerRole("soldermask", side, basis="file name")
    if ws & {"silk", "silkscreen", "legend", "overlay"}:
        return LayerRole("legend", side, basis="file name")
    if ws & {"paste", "stencil", "cream"}:
        return LayerRole("paste", side, basis="file name")
    if ws & {"drill", "drl", "holes", "pth", "npth"}:
        plated = False if ws & {"npth", "nonplated", "unplated"} else (True if "pth" in ws else None)
        return LayerRole("drill", plated=plated, basis="file name")
    for w in words:
        m = re.fullmatch(r"(?:in|inner|l)(\d+)", w)
        if m and ws & {"copper", "cu", "signal", "plane", "inner"} | {w}:
            k = int(m.group(1))
            if w.startswith("l"):
                return LayerRole("copper", None, k, basis="file name")
            return LayerRole("copper", "inner", k + 1, basis="file name")
    if side and ws & {"copper", "cu", "layer", "signal"} or side and len(ws) <= 3:
        return LayerRole("copper", side, 1 if side == "top" else None, basis="file name")
    return None
