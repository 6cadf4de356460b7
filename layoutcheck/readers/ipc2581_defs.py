"""IPC-2581 reader, first pass: everything except the layer features.

One streaming pass (:func:`read_definitions`) collects the revision, the CadHeader units,
the dictionaries (line descriptors, fills, standard and user primitives, each with its own
units), the layers with their functions and spans, the stackup, the steps (profile, pad
stack definitions, packages, components, logical nets, physical nets) and the BOM.  Small
definition elements are copied whole; layer features are skipped here and streamed by the
second pass (:mod:`layoutcheck.readers.ipc2581`), so ids resolve whatever the order of the
file (revision C puts definitions first, B files and careless writers may not).

Element and attribute names follow IPC-2581 revisions B and C as recalled in the shared
format notes section 3 (marked [M] there).  Units: millimetres after conversion
(:data:`layoutcheck.readers.ipc2581_xml.UNIT_MM`).
"""
from __future__ import annotations

import copy
import math
import re
from dataclasses import dataclass, field
from typing import Any

from ..errors import InputFileError, UnsupportedFeatureError
from .ipc2581_xml import XmlWalk, boolean, local, number, src_line, unit_factor

#: Layer functions that are copper (conductor) layers of the board.
COPPER_FUNCTIONS = frozenset({"CONDUCTOR", "SIGNAL", "PLANE", "MIXED", "CONDFOIL"})
#: Layer functions of conductive material that is not a copper layer this reader models;
#: features on such a layer are an error rather than silently left out.
OTHER_CONDUCTIVE = frozenset({"CONDFILM", "COATINGCOND", "CONDUCTIVE_ADHESIVE", "RESISTIVE",
                              "CAPACITIVE", "SOLDERBUMP", "HOLEFILL"})
DRILL_FUNCTIONS = frozenset({"DRILL"})
ROUT_FUNCTIONS = frozenset({"ROUT", "V_CUT"})
DIELECTRIC_FUNCTIONS = frozenset({"DIELCORE", "DIELPREG", "DIELBASE", "DIELADHV",
                                  "DIELECTRIC"})
#: Board-model layer kind for the other layer functions.
KIND_OF_FUNCTION = {
    "DRILL": "drill", "ROUT": "drill", "V_CUT": "drill", "BOARD_OUTLINE": "profile",
    "SOLDERMASK": "soldermask", "SILKSCREEN": "legend", "LEGEND": "legend",
    "SOLDERPASTE": "paste", "PASTEMASK": "paste", "DOCUMENT": "drawing",
    "ASSEMBLY": "drawing", "COMPONENT_TOP": "component", "COMPONENT_BOTTOM": "component",
}

#: Measured characteristics: (definition, engineering unit) -> component property key.
CHARACTERISTIC_KEYS = {
    ("CAPACITANCE", "FARAD"): "capacitance_f", ("RESISTANCE", "OHM"): "resistance_ohm",
    ("INDUCTANCE", "HENRY"): "inductance_h", ("VOLTAGE", "VOLT"): "voltage_v",
    ("CURRENT", "AMPERE"): "current_a", ("POWER", "WATT"): "power_w",
    ("FREQUENCY", "HERTZ"): "frequency_hz", ("TEMPERATURE", "CELSIUS"): "temperature_c",
}
_SI_PREFIX = {"p": 1e-12, "n": 1e-9, "u": 1e-6, "\u00b5": 1e-6, "m": 1e-3, "k": 1e3,
              "K": 1e3, "M": 1e6, "G": 1e9}
_VALUE_RE = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*([pnu\u00b5mkKMG]?)\s*"
                       r"[A-Za-z\u03a9]*\s*$")


@dataclass
class LayerDef:
    """One ``Layer`` of CadData: name, function, side, polarity and drill span (file names)."""

    name: str
    function: str
    side: str | None
    polarity: str
    span: tuple[str, str] | None
    line: int | None
    order: int


@dataclass
class StackupEntry:
    """One ``StackupLayer``: the layer it names, thickness (mm, None if absent), sequence."""

    ref: str
    thickness: float | None
    sequence: float | None
    line: int | None


@dataclass
class PadStackDef:
    """A ``PadStackDef``: hole (diameter mm, plating, offset mm) and pads per layer name."""

    name: str
    hole: tuple[float, str, float, float] | None
    pads: dict[str, list] = field(default_factory=dict)   # layer -> [(elem, base path)]
    line: int | None = None


@dataclass
class ComponentDef:
    ref: str
    package: str | None
    part: str | None
    layer: str | None
    mount: str | None
    rotation: float
    mirror: bool
    position: tuple[float, float] | None


@dataclass
class StepDef:
    """What one ``Step`` defines (geometry for later, names for the board model)."""

    name: str
    line: int | None
    profile: tuple | None = None                       # (elem copy, base path)
    repeats: int = 0
    padstacks: dict[str, PadStackDef] = field(default_factory=dict)
    packages: dict[str, dict[str, str]] = field(default_factory=dict)  # name -> pin -> name
    components: dict[str, ComponentDef] = field(default_factory=dict)
    logical: dict[tuple[str, str], str] = field(default_factory=dict)  # (ref, pin) -> net
    phy_points: list[tuple[str, float, float, str]] = field(default_factory=list)
    has_features: bool = False


@dataclass
class Definitions:
    """Result of the first pass.  ``scale``: mm per CadHeader unit."""

    file: str
    revision: str | None = None
    units: str | None = None
    scale: float = 1.0
    dict_entries: list[tuple[str, str, Any, str | None, str]] = field(default_factory=list)
    layers: dict[str, LayerDef] = field(default_factory=dict)
    stackup: list[StackupEntry] = field(default_factory=list)
    overall_thickness: float | None = None
    steps: dict[str, StepDef] = field(default_factory=dict)
    step_refs: list[str] = field(default_factory=list)
    bom: dict[str, dict[str, Any]] = field(default_factory=dict)   # refdes -> properties
    bom_values: dict[str, str] = field(default_factory=dict)


_DICTS = {"DictionaryLineDesc": "line", "DictionaryFillDesc": "fill",
          "DictionaryStandard": "standard", "DictionaryUser": "user"}
_ENTRIES = {"EntryLineDesc": "line", "EntryFillDesc": "fill", "EntryStandard": "standard",
            "EntryUser": "user"}
_STEP_PARTS = ("Profile", "PadStackDef", "Package", "Component", "LogicalNet", "PhyNet",
               "StepRepeat")


def read_definitions(walk: XmlWalk) -> Definitions:
    """First pass over the file (see module docstring).  Raises InputFileError."""
    d = Definitions(walk.file)
    dict_units: str | None = None
    step: StepDef | None = None
    raw_thickness: list = []
    for event, elem in walk:
        name = local(elem.tag)
        if event == "start":
            if walk.depth == 1:
                d.revision = elem.get("revision")
            elif name in _DICTS:
                dict_units = elem.get("units")
            elif name in _ENTRIES or name == "BomItem" or name == "Stackup":
                walk.collect()
            elif name == "Layer" and walk.parent_name() == "CadData":
                walk.collect()
            elif name == "CadHeader":
                d.units = elem.get("units")
                d.scale = unit_factor(d.units, walk.where(), walk.file, walk.line)
            elif name == "Step" and walk.parent_name() == "CadData":
                sname = elem.get("name") or f"step{len(d.steps) + 1}"
                step = d.steps.setdefault(sname, StepDef(sname, walk.line))
            elif step is not None and name in _STEP_PARTS and walk.parent_name() in (
                    "Step", "PhyNetGroup"):
                walk.collect()
            elif name == "LayerFeature" and step is not None:
                step.has_features = True
                walk.skip()
            elif name == "PadStack" and step is not None:
                walk.skip()
            elif name == "StepRef" and walk.parent_name() == "Content":
                if elem.get("name"):
                    d.step_refs.append(elem.get("name"))
            continue
        # ---- end events
        if name in _ENTRIES:
            kind = _ENTRIES[name]
            if elem.get("id") is None:
                raise walk.error(f"<{name}> has no id; expected an id attribute")
            d.dict_entries.append((kind, elem.get("id"), copy.deepcopy(elem), dict_units,
                                   walk.where()))
        elif name in _DICTS:
            dict_units = None
        elif name == "Layer" and walk.parent_name() == "CadData":
            _layer(d, elem, walk)
        elif name == "Stackup":
            _stackup(d, elem, walk, raw_thickness)
        elif name == "BomItem":
            _bom_item(d, elem, walk)
        elif name == "Step" and walk.parent_name() == "CadData":
            step = None
        elif step is not None and name in _STEP_PARTS and walk.parent_name() in (
                "Step", "PhyNetGroup"):
            _step_part(d, step, name, elem, walk)
    # thicknesses were read before CadHeader units might be known: scale them now
    d.stackup = [StackupEntry(e.ref, None if t is None else t * d.scale, e.sequence, e.line)
                 for e, t in zip(d.stackup, raw_thickness)]
    if d.overall_thickness is not None:
        d.overall_thickness *= d.scale
    if d.units is None:
        raise InputFileError("no CadHeader units; expected <CadHeader units=\"MILLIMETER\"|"
                             "\"MICRON\"|\"INCH\"> in Ecad", file=walk.file)
    return d


# ---------------------------------------------------------------------- layers, stackup
def _layer(d: Definitions, elem, walk: XmlWalk) -> None:
    lname = elem.get("name")
    if not lname:
        raise walk.error("Layer has no name; expected a name attribute")
    if lname in d.layers:
        raise walk.error(f"layer {lname!r} is defined twice (first on line "
                         f"{d.layers[lname].line})")
    func = (elem.get("layerFunction") or "").strip().upper()
    if not func:
        raise walk.error(f"layer {lname!r} has no layerFunction; expected CONDUCTOR, PLANE, "
                         "DRILL, SOLDERMASK...")
    side = (elem.get("side") or "").strip().upper() or None
    span = None
    for c in elem:
        if local(c.tag) == "Span":
            a, b = c.get("fromLayer"), c.get("toLayer")
            if not a or not b:
                raise walk.error("Span needs fromLayer and toLayer", extra="Span")
            span = (a, b)
    d.layers[lname] = LayerDef(lname, func, side, (elem.get("polarity") or "POSITIVE").upper(),
                               span, src_line(elem), len(d.layers))


def _stackup(d: Definitions, elem, walk: XmlWalk, raw: list) -> None:
    v = elem.get("overallThickness")
    if v is not None:
        d.overall_thickness = number(elem, "overallThickness", walk)
    for sl in elem.iter():
        if local(sl.tag) != "StackupLayer":
            continue
        ref = sl.get("layerOrGroupRef")
        if not ref:
            raise walk.error("StackupLayer has no layerOrGroupRef", elem=sl)
        t = number(sl, "thickness", walk, required=False)
        if t is not None and t < 0:
            raise walk.error(f"StackupLayer {ref}: negative thickness {t:g}", elem=sl)
        seq = number(sl, "sequence", walk, required=False)
        d.stackup.append(StackupEntry(ref, None, seq, src_line(sl)))
        raw.append(t)


# ---------------------------------------------------------------------- steps
def _xy(elem, walk, scale):
    return (number(elem, "x", walk, default=0.0) * scale,
            number(elem, "y", walk, default=0.0) * scale)


def _step_part(d: Definitions, step: StepDef, name: str, elem, walk: XmlWalk) -> None:
    if name == "Profile":
        step.profile = (copy.deepcopy(elem), walk.where())
    elif name == "StepRepeat":
        step.repeats += 1
    elif name == "PadStackDef":
        ps = PadStackDef(elem.get("name") or "", None, line=src_line(elem))
        if not ps.name:
            raise walk.error("PadStackDef has no name")
        base = walk.where()
        for c in elem:
            cn = local(c.tag)
            if cn == "PadstackHoleDef":
                dia = number(c, "diameter", walk) * d.scale
                x, y = _xy(c, walk, d.scale)
                ps.hole = (dia, (c.get("platingStatus") or "PLATED").upper(), x, y)
            elif cn == "PadstackPadDef":
                use = (c.get("padUse") or "REGULAR").upper()
                if use != "REGULAR":
                    continue  # antipads and thermals describe planes' clearances
                layer = c.get("layerRef")
                if not layer:
                    raise walk.error("PadstackPadDef has no layerRef", elem=c)
                ps.pads.setdefault(layer, []).append((copy.deepcopy(c), base))
        step.padstacks[ps.name] = ps
    elif name == "Package":
        pins: dict[str, str] = {}
        for c in elem:
            if local(c.tag) == "Pin" and c.get("number") is not None:
                pins[c.get("number")] = c.get("name") or ""
        step.packages[elem.get("name") or ""] = pins
    elif name == "Component":
        ref = elem.get("refDes") or elem.get("name")
        if not ref:
            return  # C made refDes optional: nothing to attach pins or BOM data to
        rot, mirror, pos = 0.0, False, None
        for c in elem:
            cn = local(c.tag)
            if cn == "Xform":
                rot = number(c, "rotation", walk, default=0.0)
                mirror = boolean(c, "mirror")
            elif cn == "Location":
                pos = _xy(c, walk, d.scale)
        step.components[ref] = ComponentDef(ref, elem.get("packageRef"), elem.get("part"),
                                            elem.get("layerRef"), elem.get("mountType"),
                                            rot, mirror, pos)
    elif name == "LogicalNet":
        net = elem.get("name")
        for c in elem:
            if local(c.tag) == "PinRef" and net is not None:
                step.logical[(c.get("componentRef") or "", c.get("pin") or "")] = net
    elif name == "PhyNet":
        net = elem.get("name")
        for c in elem:
            if local(c.tag) == "PhyNetPoint" and net:
                x, y = _xy(c, walk, d.scale)
                step.phy_points.append((net, x, y, c.get("layerRef") or ""))


# ---------------------------------------------------------------------- BOM
def _num_value(text: str | None) -> float | None:
    if text is None:
        return None
    m = _VALUE_RE.match(text)
    if not m:
        return None
    v = float(m.group(1)) * _SI_PREFIX.get(m.group(2), 1.0)
    return v if math.isfinite(v) else None


def _bom_item(d: Definitions, elem, walk: XmlWalk) -> None:
    props: dict[str, Any] = {}
    refs: list[tuple[str, Any]] = []
    if elem.get("OEMDesignNumberRef"):
        props["part"] = elem.get("OEMDesignNumberRef")
    for c in elem:
        cn = local(c.tag)
        if cn == "RefDes" and c.get("name"):
            refs.append((c.get("name"), c))
        elif cn == "Characteristics":
            for ch in c:
                _characteristic(props, ch, walk)
    for ref, rd in refs:
        p = dict(props)
        if rd.get("populate") is not None:
            p["populate"] = boolean(rd, "populate", True)
        d.bom[ref] = p


def _characteristic(props: dict, ch, walk: XmlWalk) -> None:
    cn = local(ch.tag)
    if cn == "Measured":
        definition = (ch.get("definition") or "").strip().upper()
        unit = (ch.get("engineeringUnit") or "").strip().upper()
        raw = ch.get("measuredCharacteristicValue", ch.get("value"))
        v = _num_value(raw)
        if v is None:
            raise walk.error(f"Measured characteristic value {raw!r} is not a number; "
                             "expected a decimal with an optional SI prefix", elem=ch)
        key = ch.get("measuredCharacteristicName") or CHARACTERISTIC_KEYS.get(
            (definition, unit)) or (definition.lower() or "measured")
        props[key] = v
    elif cn in ("Textual", "Enumerated"):
        low = "textual" if cn == "Textual" else "enumerated"
        key = ch.get(f"{low}CharacteristicName") or (ch.get("definition") or low).lower()
        val = ch.get(f"{low}CharacteristicValue")
        if val is not None:
            props[key] = val
    elif cn == "Ranged":
        key = ch.get("rangedCharacteristicName") or (ch.get("definition") or "ranged").lower()
        lo = _num_value(ch.get("rangedCharacteristicLowerValue"))
        hi = _num_value(ch.get("rangedCharacteristicUpperValue"))
        props[key] = (lo, hi)


# ---------------------------------------------------------------------- choosing the step
def board_step(d: Definitions) -> StepDef:
    """The step that is the board: the one Content/StepRef names, else the only one."""
    if not d.steps:
        raise InputFileError("no Step in CadData; expected a board Step with layer features",
                             file=d.file)
    cands = [d.steps[n] for n in d.step_refs if n in d.steps]
    if not cands:
        cands = list(d.steps.values())
    if len(cands) > 1:
        boards = [s for s in cands if s.repeats == 0 and s.has_features]
        cands = boards or cands
    step = cands[0]
    if step.repeats:
        raise UnsupportedFeatureError(
            f"step {step.name!r} is a panel (StepRepeat); expected the board step itself",
            file=d.file, line=step.line)
    return step


__all__ = ["COPPER_FUNCTIONS", "OTHER_CONDUCTIVE", "DRILL_FUNCTIONS", "ROUT_FUNCTIONS",
           "DIELECTRIC_FUNCTIONS", "KIND_OF_FUNCTION", "CHARACTERISTIC_KEYS", "LayerDef",
           "StackupEntry", "PadStackDef", "ComponentDef", "StepDef", "Definitions",
           "read_definitions", "board_step"]
