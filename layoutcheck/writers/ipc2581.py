"""IPC-2581 writer for sample boards and reader tests.

:func:`write_ipc2581` / :func:`ipc2581_text` turn a
:class:`~layoutcheck.writers.design.Design` (the same data the Gerber and NC drill writers
use) into one IPC-2581 XML document, revision C (default) or B, in millimetres, microns or
inches.  Element and attribute names are those recalled in the shared format notes
section 3 (IPC-2581 B/C, from memory).  Layout of the document:

* ``Content``: FunctionMode, StepRef, LayerRefs, BomRef, ``DictionaryLineDesc`` (one entry
  per track or slot width, ROUND ends) and ``DictionaryStandard`` (one entry per pad shape:
  Circle, RectCenter, Oval, RectRound with all four corners rounded).
* ``LogisticHeader`` and ``HistoryRecord`` with fixed texts and dates (deterministic).
* ``Bom``: one BomItem per distinct (kind, value, package, properties) with a RefDes per
  part and ``Characteristics``: Textual ``kind`` and ``value``; every numeric property as
  ``Measured`` (``measuredCharacteristicName`` = the property key, definition and
  engineering unit from the key's suffix, e.g. ``capacitance_f`` -> CAPACITANCE / FARAD);
  other properties as Textual.
* ``Ecad``/``CadHeader(units)``/``CadData``: conductor layers ``TOP``, ``IN1``..,
  ``BOTTOM``; dielectric layers ``DIEL1``..; one drill layer ``DRILL`` with
  ``Span(TOP, BOTTOM)``; a ``BOARD_OUTLINE`` layer; the ``Stackup`` (copper and dielectric
  thicknesses, sequence numbers); the ``Step`` ``board`` with ``Profile``, ``PadStackDef`` s,
  ``Package`` s (pins with names), ``Component`` s (Xform rotation, mirror on the bottom,
  Location), ``LogicalNet`` s and one ``LayerFeature`` per layer.
* Copper ``Set`` s: zones as ``Features/Contour`` (Polygon + Cutouts), tracks as ``Line``
  (two points) or ``Polyline`` with a ``LineDescRef``; pads as ``Pad`` (padstackDefRef,
  Xform rotation, Location, StandardPrimitiveRef, PinRef) in Sets with
  ``padUsage="TERMINATION"``; vias in Sets with ``padUsage="VIA"``.  A net of ``""`` is
  written as ``N/C``; ``None`` writes no net attribute.
* Drill ``Set`` s: ``Hole`` (PLATED for through-hole pads, VIA for vias, NONPLATED for bare
  holes) and ``SlotCavity`` with the slot's tool path as a Polyline of the slot's width.

Units: the design is in millimetres; numbers are written in the chosen unit with 6
(mm), 3 (micron) or 9 (inch) decimals, i.e. 1 nm or finer.  Same design, same bytes.
"""
from __future__ import annotations

import math
from pathlib import Path
from xml.sax.saxutils import escape

from ..errors import UsageError
from .design import Design, Pad, Part

UNITS = {"MILLIMETER": (1.0, 6), "MICRON": (0.001, 3), "INCH": (25.4, 9)}
REVISIONS = ("B", "C")
NAMESPACE = "http://webstds.ipc.org/2581"
#: Property-key suffix -> (definition, engineering unit) of a Measured characteristic.
MEASURED_SUFFIX = {"_f": ("CAPACITANCE", "FARAD"), "_ohm": ("RESISTANCE", "OHM"),
                   "_h": ("INDUCTANCE", "HENRY"), "_v": ("VOLTAGE", "VOLT"),
                   "_a": ("CURRENT", "AMPERE"), "_w": ("POWER", "WATT"),
                   "_hz": ("FREQUENCY", "HERTZ"), "_c": ("TEMPERATURE", "CELSIUS")}
STEP = "board"


def _q(v) -> str:
    return escape(str(v), {'"': "&quot;"})


class _Out:
    def __init__(self, units: str):
        self.unit_mm, self.dec = UNITS[units]
        self.lines: list[str] = []

    def n(self, mm: float) -> str:
        """A length in mm written in the document's unit."""
        v = round(float(mm) / self.unit_mm, self.dec) + 0.0
        s = f"{v:.{self.dec}f}".rstrip("0").rstrip(".")
        return "0" if s in ("", "-0") else s

    def add(self, text: str) -> None:
        self.lines.append(text)


def _angle(a: float) -> str:
    v = round(float(a) % 360.0, 6) + 0.0
    return f"{v:.6f}".rstrip("0").rstrip(".") or "0"


def _net_attr(net: str | None) -> str:
    if net is None:
        return ""
    return f' net="{_q(net if net else "N/C")}"'


def _layer_names(design: Design) -> dict[str, str]:
    return {n: n.upper() for n in design.layer_names}


# ---------------------------------------------------------------------- dictionaries
def _pad_key(pad: Pad) -> tuple:
    w, h = round(pad.w, 6), round(pad.height, 6)
    if pad.shape == "circle":
        return ("Circle", w)
    if pad.shape == "roundrect":
        return ("RectRound", w, h, round(pad.radius, 6))
    return ("RectCenter" if pad.shape == "rect" else "Oval", w, h)


def _primitive_xml(o: _Out, key: tuple) -> str:
    kind = key[0]
    if kind == "Circle":
        return f'<Circle diameter="{o.n(key[1])}"/>'
    if kind == "RectRound":
        return (f'<RectRound width="{o.n(key[1])}" height="{o.n(key[2])}" '
                f'radius="{o.n(key[3])}" upperRight="true" upperLeft="true" '
                f'lowerLeft="true" lowerRight="true"/>')
    return f'<{kind} width="{o.n(key[1])}" height="{o.n(key[2])}"/>'


class _Tables:
    """Dictionary ids, pad stacks and packages of one design (first use order)."""

    def __init__(self, design: Design):
        self.prims: dict[tuple, str] = {}
        self.lines: dict[float, str] = {}
        self.stacks: dict[tuple, str] = {}
        for p in design.pads:
            self.prim(_pad_key(p))
        for v in design.vias:
            self.prim(("Circle", round(v.pad, 6)))
        for t in design.tracks:
            self.line(t.width)
        for s in design.slots:
            self.line(s.width)

    def prim(self, key: tuple) -> str:
        return self.prims.setdefault(key, f"SP{len(self.prims) + 1}")

    def line(self, width: float) -> str:
        return self.lines.setdefault(round(width, 6), f"LD{len(self.lines) + 1}")

    def stack(self, key: tuple) -> str:
        return self.stacks.setdefault(key, f"PS{len(self.stacks) + 1}")


def _pad_stack_key(design: Design, pad: Pad) -> tuple:
    return ("pad", _pad_key(pad), tuple(design.pad_layers(pad)),
            None if pad.drill is None else round(pad.drill, 6))


# ---------------------------------------------------------------------- document
def ipc2581_text(design: Design, revision: str = "C", units: str = "MILLIMETER") -> str:
    """The IPC-2581 document of ``design`` as text (see the module docstring).

    ``revision``: ``"B"`` or ``"C"``; ``units``: ``"MILLIMETER"``, ``"MICRON"`` or
    ``"INCH"`` (design lengths are millimetres).  Raises UsageError for other values.
    """
    if revision not in REVISIONS:
        raise UsageError(f"revision {revision!r} is not one of {REVISIONS}")
    if units not in UNITS:
        raise UsageError(f"units {units!r} is not one of {tuple(UNITS)}")
    design.validate()
    o = _Out(units)
    tb = _Tables(design)
    lnames = _layer_names(design)
    layers = design.layer_names
    o.add('<?xml version="1.0" encoding="UTF-8"?>')
    o.add(f'<IPC-2581 revision="{revision}" xmlns="{NAMESPACE}">')
    _content(o, design, tb, lnames, units)
    o.add('<LogisticHeader><Role id="Owner" roleFunction="SENDER"/>'
          '<Enterprise id="SampleMaker" code="NONE"/>'
          '<Person name="sample" enterpriseRef="SampleMaker" roleRef="Owner"/>'
          '</LogisticHeader>')
    o.add('<HistoryRecord number="1" origination="2024-01-01T00:00:00" '
          'software="layoutcheck sample writer" lastChange="2024-01-01T00:00:00">'
          '<FileRevision fileRevisionId="1" comment="sample board" label="1">'
          '<SoftwarePackage name="layoutcheck" revision="0.1" vendor="layoutcheck">'
          '<Certification certificationStatus="SELFTEST"/></SoftwarePackage>'
          '</FileRevision></HistoryRecord>')
    items = _bom(o, design, lnames)
    o.add(f'<Ecad name="{_q(design.name)}">')
    o.add(f'<CadHeader units="{units}"/>')
    o.add("<CadData>")
    n = len(layers)
    for i, name in enumerate(layers):
        side = "TOP" if name == "top" else "BOTTOM" if name == "bottom" else "INTERNAL"
        o.add(f'<Layer name="{lnames[name]}" layerFunction="CONDUCTOR" side="{side}" '
              'polarity="POSITIVE"/>')
        if i < n - 1:
            o.add(f'<Layer name="DIEL{i + 1}" layerFunction="{"DIELCORE" if i % 2 else "DIELPREG"}"'
                  ' side="INTERNAL" polarity="POSITIVE"/>')
    o.add('<Layer name="DRILL" layerFunction="DRILL" side="ALL" polarity="POSITIVE">'
          f'<Span fromLayer="{lnames[layers[0]]}" toLayer="{lnames[layers[-1]]}"/></Layer>')
    o.add('<Layer name="PROFILE" layerFunction="BOARD_OUTLINE" side="ALL" '
          'polarity="POSITIVE"/>')
    _stackup(o, design, lnames, revision)
    o.add(f'<Step name="{STEP}">')
    o.add('<Datum x="0" y="0"/>')
    o.add("<Profile>" + _polygon(o, design.outline) + "</Profile>")
    _padstacks(o, design, tb, lnames)
    _packages_components(o, design, tb, lnames, items)
    _logical_nets(o, design)
    for name in layers:
        _copper_layer(o, design, tb, name, lnames[name])
    _drill_layer(o, design, tb)
    o.add("</Step>")
    o.add("</CadData>")
    o.add("</Ecad>")
    o.add("</IPC-2581>")
    return "\n".join(o.lines) + "\n"


def write_ipc2581(design: Design, path, revision: str = "C",
                  units: str = "MILLIMETER") -> Path:
    """Write ``design`` as an IPC-2581 file at ``path`` (a file, or a folder to put
    ``<design.name>.xml`` in).  Returns the path written.  Units: see :func:`ipc2581_text`.
    """
    p = Path(path)
    if p.is_dir():
        p = p / f"{design.name}.xml"
    p.parent.mkdir(parents=True, exist_ok=True)
    p.write_text(ipc2581_text(design, revision, units), encoding="utf-8", newline="\n")
    return p


# ---------------------------------------------------------------------- sections
def _content(o: _Out, design: Design, tb: _Tables, lnames, units) -> None:
    o.add('<Content roleRef="Owner">')
    o.add('<FunctionMode mode="FABRICATION" level="3"/>')
    o.add(f'<StepRef name="{STEP}"/>')
    for name in design.layer_names:
        o.add(f'<LayerRef name="{lnames[name]}"/>')
    o.add('<LayerRef name="DRILL"/>')
    o.add('<LayerRef name="PROFILE"/>')
    o.add('<BomRef name="bom"/>')
    o.add(f'<DictionaryLineDesc units="{units}">')
    for width, ident in tb.lines.items():
        o.add(f'<EntryLineDesc id="{ident}"><LineDesc lineEnd="ROUND" '
              f'lineWidth="{o.n(width)}"/></EntryLineDesc>')
    o.add("</DictionaryLineDesc>")
    o.add(f'<DictionaryStandard units="{units}">')
    for key, ident in tb.prims.items():
        o.add(f'<EntryStandard id="{ident}">{_primitive_xml(o, key)}</EntryStandard>')
    o.add("</DictionaryStandard>")
    o.add("</Content>")


def _measured(key: str, value) -> str:
    for suffix, (definition, unit) in MEASURED_SUFFIX.items():
        if key.endswith(suffix):
            return (f'<Measured definition="{definition}" engineeringUnit="{unit}" '
                    f'measuredCharacteristicName="{_q(key)}" '
                    f'measuredCharacteristicValue="{float(value)!r}"/>')
    return (f'<Measured definition="OTHER" measuredCharacteristicName="{_q(key)}" '
            f'measuredCharacteristicValue="{float(value)!r}"/>')


def _textual(key: str, value) -> str:
    return (f'<Textual definition="OTHER" textualCharacteristicName="{_q(key)}" '
            f'textualCharacteristicValue="{_q(value)}"/>')


def _bom(o: _Out, design: Design, lnames) -> dict[str, str]:
    """Write the Bom; returns ref -> item (OEMDesignNumberRef)."""
    groups: dict[tuple, list[Part]] = {}
    for p in design.parts:
        props = tuple(sorted((k, repr(v)) for k, v in p.properties.items()))
        groups.setdefault((p.kind, p.value, p.package, props), []).append(p)
    o.add('<Bom name="bom">')
    o.add(f'<BomHeader assembly="{_q(design.name)}" revision="1"><StepRef name="{STEP}"/>'
          '</BomHeader>')
    item_of: dict[str, str] = {}
    for k, (key, parts) in enumerate(groups.items(), start=1):
        item = f"ITEM{k}"
        first = parts[0]
        o.add(f'<BomItem OEMDesignNumberRef="{item}" quantity="{len(parts)}" '
              f'pinCount="{len(first.pins)}" category="ELECTRICAL">')
        for p in parts:
            item_of[p.ref] = item
            o.add(f'<RefDes name="{_q(p.ref)}" packageRef="{_q(p.package or "PKG")}" '
                  f'populate="true" layerRef="{lnames.get(p.side, "TOP")}"/>')
        chars = [_textual("kind", first.kind)]
        if first.value:
            chars.append(_textual("value", first.value))
        for pk, pv in sorted(first.properties.items()):
            if isinstance(pv, (int, float)) and not isinstance(pv, bool) and math.isfinite(pv):
                chars.append(_measured(pk, pv))
            else:
                chars.append(_textual(pk, pv))
        o.add('<Characteristics category="ELECTRICAL">' + "".join(chars) +
              "</Characteristics>")
        o.add("</BomItem>")
    o.add("</Bom>")
    return item_of


def _stackup(o: _Out, design: Design, lnames, revision: str) -> None:
    layers = design.layer_names
    n = len(layers)
    cu = design.copper_um / 1000.0
    diel = (design.thickness_mm - n * cu) / (n - 1) if n > 1 else 0.0
    status = ' stackupStatus="PROPOSED"' if revision == "C" else ""
    o.add(f'<Stackup name="STACKUP" overallThickness="{o.n(design.thickness_mm)}" '
          f'tolPlus="0" tolMinus="0" whereMeasured="METAL"{status}>')
    o.add(f'<StackupGroup name="BOARD" thickness="{o.n(design.thickness_mm)}" tolPlus="0" '
          'tolMinus="0">')
    seq = 0
    for i, name in enumerate(layers):
        seq += 1
        o.add(f'<StackupLayer layerOrGroupRef="{lnames[name]}" thickness="{o.n(cu)}" '
              f'tolPlus="0" tolMinus="0" sequence="{seq}"/>')
        if i < n - 1:
            seq += 1
            o.add(f'<StackupLayer layerOrGroupRef="DIEL{i + 1}" thickness="{o.n(diel)}" '
                  f'tolPlus="0" tolMinus="0" sequence="{seq}"/>')
    o.add("</StackupGroup>")
    o.add("</Stackup>")


def _polygon(o: _Out, pts, tag: str = "Polygon") -> str:
    pts = list(pts)
    if pts[0] != pts[-1]:
        pts.append(pts[0])
    body = [f'<PolyBegin x="{o.n(pts[0][0])}" y="{o.n(pts[0][1])}"/>']
    body += [f'<PolyStepSegment x="{o.n(x)}" y="{o.n(y)}"/>' for x, y in pts[1:]]
    return f"<{tag}>" + "".join(body) + f"</{tag}>"


def _padstacks(o: _Out, design: Design, tb: _Tables, lnames) -> None:
    done = set()
    for p in design.pads:
        key = _pad_stack_key(design, p)
        ident = tb.stack(key)
        if ident in done:
            continue
        done.add(ident)
        hole = "" if p.drill is None else (
            f'<PadstackHoleDef name="{ident}H" diameter="{o.n(p.drill)}" platingStatus="PLATED"'
            ' plusTol="0" minusTol="0" x="0" y="0"/>')
        pads = "".join(f'<PadstackPadDef layerRef="{lnames[layer]}" padUse="REGULAR">'
                       '<Location x="0" y="0"/>'
                       f'<StandardPrimitiveRef id="{tb.prim(_pad_key(p))}"/></PadstackPadDef>'
                       for layer in design.pad_layers(p))
        o.add(f'<PadStackDef name="{ident}">{hole}{pads}</PadStackDef>')
    for v in design.vias:
        key = ("via", round(v.pad, 6), round(v.drill, 6))
        ident = tb.stack(key)
        if ident in done:
            continue
        done.add(ident)
        pads = "".join(f'<PadstackPadDef layerRef="{lnames[layer]}" padUse="REGULAR">'
                       '<Location x="0" y="0"/>'
                       f'<StandardPrimitiveRef id="{tb.prim(("Circle", round(v.pad, 6)))}"/>'
                       '</PadstackPadDef>' for layer in design.layer_names)
        o.add(f'<PadStackDef name="{ident}"><PadstackHoleDef name="{ident}H" '
              f'diameter="{o.n(v.drill)}" platingStatus="VIA" plusTol="0" minusTol="0" x="0" '
              f'y="0"/>{pads}</PadStackDef>')


def _packages_components(o: _Out, design: Design, tb: _Tables, lnames, items) -> None:
    pads_of: dict[str, list[Pad]] = {}
    for p in design.pads:
        if p.ref:
            pads_of.setdefault(p.ref, []).append(p)
    pkg_of: dict[str, str] = {}
    names: dict[tuple, str] = {}
    used: dict[str, int] = {}
    for part in design.parts:
        text = part.package or "PKG"
        key = (text, tuple(sorted(part.pins.items())))
        if key not in names:
            k = used.get(text, 0)
            used[text] = k + 1
            names[key] = text if k == 0 else f"{text}~{k + 1}"
            _package(o, names[key], part, pads_of.get(part.ref, []), tb)
        pkg_of[part.ref] = names[key]
    for part in design.parts:
        mount = "THMT" if any(p.drill is not None for p in pads_of.get(part.ref, [])) \
            else "SMT"
        mirror = ' mirror="true"' if part.side == "bottom" else ""
        o.add(f'<Component refDes="{_q(part.ref)}" packageRef="{_q(pkg_of[part.ref])}" '
              f'part="{items[part.ref]}" layerRef="{lnames.get(part.side, "TOP")}" '
              f'mountType="{mount}"><Xform rotation="{_angle(part.rotation)}"{mirror}/>'
              f'<Location x="{o.n(part.position[0])}" y="{o.n(part.position[1])}"/>'
              "</Component>")


def _package(o: _Out, name: str, part: Part, pads: list[Pad], tb: _Tables) -> None:
    """A Package whose pins sit where ``part``'s pads are, in the part's own frame."""
    ca, sa = math.cos(math.radians(part.rotation)), math.sin(math.radians(part.rotation))
    px, py = part.position
    first: dict[str, Pad] = {}
    for p in pads:
        first.setdefault(p.pin, p)
    pins = sorted(set(part.pins) | set(first), key=lambda s: (len(s), s))
    body = []
    for num in pins:
        pad = first.get(num)
        nm = part.pins.get(num, "")
        name_attr = f' name="{_q(nm)}"' if nm else ""
        if pad is None:
            body.append(f'<Pin number="{_q(num)}"{name_attr} type="SURFACE" '
                        'electricalType="ELECTRICAL"/>')
            continue
        dx, dy = pad.x - px, pad.y - py
        lx, ly = dx * ca + dy * sa, -dx * sa + dy * ca
        if part.side == "bottom":
            lx = -lx
        kind = "THRU" if pad.drill is not None else "SURFACE"
        body.append(f'<Pin number="{_q(num)}"{name_attr} type="{kind}" '
                    f'electricalType="ELECTRICAL"><Location x="{o.n(lx)}" y="{o.n(ly)}"/>'
                    f'<StandardPrimitiveRef id="{tb.prim(_pad_key(pad))}"/></Pin>')
    o.add(f'<Package name="{_q(name)}" type="OTHER" pinOne="{_q(pins[0]) if pins else "1"}">'
          + "".join(body) + "</Package>")


def _logical_nets(o: _Out, design: Design) -> None:
    pins: dict[str, set] = {}
    for p in design.pads:
        if p.ref and p.net:
            pins.setdefault(p.net, set()).add((p.ref, p.pin))
    for net in design.nets():
        refs = "".join(f'<PinRef componentRef="{_q(r)}" pin="{_q(n)}"/>'
                       for r, n in sorted(pins.get(net, ())))
        o.add(f'<LogicalNet name="{_q(net)}">{refs}</LogicalNet>')


def _copper_layer(o: _Out, design: Design, tb: _Tables, layer: str, fname: str) -> None:
    o.add(f'<LayerFeature layerRef="{fname}">')
    for z in design.zones:
        if z.layer != layer:
            continue
        cut = "".join(_polygon(o, h, "Cutout") for h in z.holes)
        o.add(f'<Set{_net_attr(z.net)}><Features><Contour>{_polygon(o, z.polygon)}{cut}'
              "</Contour></Features></Set>")
    for t in design.tracks:
        if t.layer != layer:
            continue
        ld = f'<LineDescRef id="{tb.line(t.width)}"/>'
        pts = t.points
        if len(pts) == 2:
            (x0, y0), (x1, y1) = pts
            shape = (f'<Line startX="{o.n(x0)}" startY="{o.n(y0)}" endX="{o.n(x1)}" '
                     f'endY="{o.n(y1)}">{ld}</Line>')
        else:
            steps = "".join(f'<PolyStepSegment x="{o.n(x)}" y="{o.n(y)}"/>' for x, y in pts[1:])
            shape = (f'<Polyline><PolyBegin x="{o.n(pts[0][0])}" y="{o.n(pts[0][1])}"/>'
                     f"{steps}{ld}</Polyline>")
        o.add(f'<Set{_net_attr(t.net)}><Features>{shape}</Features></Set>')
    for p in design.pads:
        if layer not in design.pad_layers(p):
            continue
        comp = f' componentRef="{_q(p.ref)}"' if p.ref else ""
        xf = f'<Xform rotation="{_angle(p.rotation)}"/>' if p.rotation % 360 else ""
        pin = f'<PinRef componentRef="{_q(p.ref)}" pin="{_q(p.pin)}"/>' if p.ref else ""
        o.add(f'<Set{_net_attr(p.net)} padUsage="TERMINATION"{comp}>'
              f'<Pad padstackDefRef="{tb.stack(_pad_stack_key(design, p))}">{xf}'
              f'<Location x="{o.n(p.x)}" y="{o.n(p.y)}"/>'
              f'<StandardPrimitiveRef id="{tb.prim(_pad_key(p))}"/>{pin}</Pad></Set>')
    for v in design.vias:
        ps = tb.stack(("via", round(v.pad, 6), round(v.drill, 6)))
        o.add(f'<Set{_net_attr(v.net)} padUsage="VIA"><Pad padstackDefRef="{ps}">'
              f'<Location x="{o.n(v.x)}" y="{o.n(v.y)}"/>'
              f'<StandardPrimitiveRef id="{tb.prim(("Circle", round(v.pad, 6)))}"/></Pad></Set>')
    o.add("</LayerFeature>")


def _drill_layer(o: _Out, design: Design, tb: _Tables) -> None:
    o.add('<LayerFeature layerRef="DRILL">')
    k = 0

    def hole(net, usage, d, status, x, y) -> None:
        nonlocal k
        k += 1
        use = f' padUsage="{usage}"' if usage else ""
        o.add(f'<Set{_net_attr(net)}{use}><Hole name="H{k}" diameter="{o.n(d)}" '
              f'platingStatus="{status}" plusTol="0" minusTol="0" x="{o.n(x)}" '
              f'y="{o.n(y)}"/></Set>')

    for p in design.pads:
        if p.drill is not None:
            hole(p.net, "TERMINATION", p.drill, "PLATED", p.x, p.y)
    for v in design.vias:
        hole(v.net, "VIA", v.drill, "VIA", v.x, v.y)
    for h in design.holes:
        hole(None, None, h.d, "NONPLATED", h.x, h.y)
    for s in design.slots:
        k += 1
        pts = s.points
        steps = "".join(f'<PolyStepSegment x="{o.n(x)}" y="{o.n(y)}"/>' for x, y in pts[1:])
        status = "PLATED" if s.plated else "NONPLATED"
        o.add(f'<Set{_net_attr(s.net if s.plated else None)}><SlotCavity name="S{k}" '
              f'platingStatus="{status}" plusTol="0" minusTol="0"><Polyline>'
              f'<PolyBegin x="{o.n(pts[0][0])}" y="{o.n(pts[0][1])}"/>{steps}'
              f'<LineDescRef id="{tb.line(s.width)}"/></Polyline></SlotCavity></Set>')
    o.add("</LayerFeature>")


__all__ = ["write_ipc2581", "ipc2581_text", "UNITS", "REVISIONS", "NAMESPACE"]
