"""IPC-2581 reader: one XML file in, a :class:`~layoutcheck.model.Board` out.

Two streaming passes over the file (memory stays bounded by the largest single feature,
see :mod:`layoutcheck.readers.ipc2581_xml`):

1. :func:`~layoutcheck.readers.ipc2581_defs.read_definitions`: units, dictionaries, layers,
   stackup, pad stacks, packages, components, nets, BOM (:mod:`.ipc2581_defs`).
2. the layer features of the board step: each ``Set`` child (``Pad``, ``Fiducial``,
   ``Features``, ``Hole``, ``SlotCavity``) is turned into copper or a hole as soon as its end
   tag is read (:class:`_Features`); revision B ``PadStack`` instances are read too.

The board model is the same as from Gerber: copper layers named ``top``, ``in1``..,
``bottom`` in stack order (stackup sequence, else the order of the conductor layers);
:class:`CopperShape` pieces carry the Set's net, the pad's component and pin (``PinRef``) and
a function that the rules understand (``ComponentPad`` / ``SMDPad`` for terminations,
``ViaPad`` for vias, ``Conductor`` for traces and surfaces, ``FiducialPad``); negative Sets
erase copper drawn before them on their layer; holes carry their drill layer's span and
plating; the outline comes from the step's ``Profile``; components get pins, nets and the
BOM characteristics as ``properties``; the stackup comes from the file (basis ``"file"``).
Anything on a copper layer that this reader does not understand is an error naming the
element path.  Units: millimetres.
"""
from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np
import shapely
from shapely.geometry import box

from ..errors import InputFileError, ResourceLimitError, UnsupportedFeatureError
from ..geometry.arcs import circle
from ..limits import DEFAULT_LIMITS, Limits
from ..model import Assumption, Board, Hole, Pin, SourceRef, copper_layer_names
from .ipc2581_defs import (COPPER_FUNCTIONS, DRILL_FUNCTIONS, OTHER_CONDUCTIVE, ROUT_FUNCTIONS,
                           Definitions, StepDef, board_step, read_definitions)
from .ipc2581_geom import LineDesc, apply_matrices, slot_width, stroke_batch
from .ipc2581_shapes import IDENTITY, NON_GEOMETRY, SHAPE_KINDS, STROKES, Loc, Shapes
from .ipc2581_xml import (XmlWalk, boolean, local, looks_like_ipc2581, src_line,
                          unit_factor)

#: Set@net values that mean "no net" (empty, placeholders seen in real files).
NO_NET_NAMES = frozenset({"", "n/c", "no net", "nonet", "no_net", "unconnected"})
#: Set children that are read; anything else on a copper or drill layer is an error.
SET_ITEMS = frozenset({"Pad", "Fiducial", "Features", "Hole", "SlotCavity"})
#: Set children that carry no geometry.
SET_IGNORED = NON_GEOMETRY | {"NetShort", "GeometryUsage"}
PLATED_STATUS = {"PLATED": True, "VIA": True, "VIA_CAPPED": True, "NONPLATED": False}
THROUGH_MOUNTS = frozenset({"THMT", "THT", "PRESSFIT"})
#: Features placed or stroked per vectorised batch.
_BATCH = 2000


def read_ipc2581(path: Path | str, project=None, *, limits: Limits = DEFAULT_LIMITS,
                 progress=None, name: str | None = None) -> Board:
    """Read an IPC-2581 (revision B or C) XML file into a Board.  Units: millimetres.

    ``project`` (a :class:`layoutcheck.project.Project`, optional) supplies the board size
    when the file has no profile and stackup values the file does not state.  Raises
    :class:`InputFileError` (or a subclass) naming the file, line and element path.
    """
    path = Path(path)
    file = path.name
    if not path.is_file():
        raise InputFileError("no such file", file=str(path))
    size = path.stat().st_size
    if size > limits.max_file_bytes:
        raise ResourceLimitError(f"file is {size} bytes; the limit for one fab file is "
                                 f"{limits.max_file_bytes}", file=file)
    if progress:
        progress(file, 0, 2)
    defs = read_definitions(XmlWalk(path, file))
    step = board_step(defs)
    shapes = build_dictionaries(defs, limits)
    order = copper_order(defs, shapes)
    if progress:
        progress(file, 1, 2)
    feats = _Features(defs, step, shapes, order, limits)
    feats.run(XmlWalk(path, file))
    board = feats.board(name or path.stem, project)
    board.source = str(path)
    if progress:
        progress("", 2, 2)
    return board


def is_ipc2581(path: Path | str) -> bool:
    """True when ``path`` is a file whose XML root element is ``IPC-2581``."""
    p = Path(path)
    if not p.is_file():
        return False
    with open(p, "rb") as f:
        return looks_like_ipc2581(f.read(65536))


# ---------------------------------------------------------------------- dictionaries
def build_dictionaries(d: Definitions, limits: Limits) -> Shapes:
    """Line/fill descriptors and primitives of Content's dictionaries, in mm."""
    sh = Shapes(d.file, limits)
    seen: dict[tuple[str, str], int | None] = {}
    for kind in ("line", "fill", "standard", "user"):
        for k, ident, elem, units, where in d.dict_entries:
            if k != kind:
                continue
            if (kind, ident) in seen:
                raise InputFileError(f"{kind} dictionary id {ident!r} is defined twice (first "
                                     f"on line {seen[(kind, ident)]})", file=d.file,
                                     line=src_line(elem), element=where)
            seen[(kind, ident)] = src_line(elem)
            scale = unit_factor(units, where, d.file, src_line(elem), default=d.scale)
            loc = Loc(d.file, where, elem)
            if kind == "line":
                ld = next((c for c in elem if local(c.tag) == "LineDesc"), None)
                if ld is None:
                    raise loc.err(elem, "EntryLineDesc without a LineDesc")
                sh.line[ident] = sh.line_desc(ld, scale, loc)
            elif kind == "fill":
                fd = next((c for c in elem if local(c.tag) == "FillDesc"), None)
                sh.fill[ident] = ((fd.get("fillProperty") if fd is not None else None)
                                  or "FILL").upper()
            elif kind == "standard":
                sh.standard[ident] = sh.entry_geometry(elem, scale, loc)
            else:
                sh.user_raw[ident] = (elem, scale, where)
    for ident in sorted(sh.user_raw):
        sh.user_shape(ident, None, Loc(d.file, sh.user_raw[ident][2]))
    return sh


# ---------------------------------------------------------------------- copper order
def copper_order(d: Definitions, sh: Shapes) -> list[str]:
    """File names of the conductor layers, top first."""
    conductors = [L for L in d.layers.values() if L.function in COPPER_FUNCTIONS]
    if not conductors:
        raise InputFileError("no conductor layer (layerFunction CONDUCTOR, SIGNAL, PLANE or "
                             "MIXED) among the Layer definitions", file=d.file)
    names = {L.name for L in conductors}
    entries = [e for e in d.stackup if e.ref in names]
    if entries:
        if all(e.sequence is not None for e in d.stackup):
            ordered = [e.ref for e in sorted(d.stackup, key=lambda e: e.sequence)]
        else:
            ordered = [e.ref for e in d.stackup]
        order = [n for n in ordered if n in names]
        missing = sorted(names - set(order))
        if missing:
            raise InputFileError(f"conductor layer(s) {', '.join(missing)} not in the Stackup; "
                                 "expected every conductor layer in the stack order",
                                 file=d.file, line=d.layers[missing[0]].line)
        basis = "stackup"
    else:
        order = [L.name for L in sorted(conductors, key=lambda L: L.order)]
        basis = "Layer definitions"
        if len(order) > 2:
            sh.note("stackup", f"{d.file}: no stackup; copper layer order taken from the order "
                               "of the Layer definitions")
    if len(dict.fromkeys(order)) != len(order):
        raise InputFileError("a conductor layer appears twice in the stack order", file=d.file)
    sides = [d.layers[n].side for n in order]
    if len(order) > 1 and sides[0] == "BOTTOM" and sides[-1] == "TOP":
        order.reverse()
        sh.note("stackup", f"{d.file}: the {basis} lists the bottom layer first; read bottom-up")
    return order


# ---------------------------------------------------------------------- pass 2
@dataclass(slots=True)
class _Item:
    """One copper feature; ``geometry`` is local until :meth:`_Features.finish` applies
    ``matrix`` (or strokes ``stroke``)."""

    geometry: object
    polarity: str
    layer: str
    net: str | None
    component: str | None
    pin: str | None
    function: str | None
    kind: str
    line: int | None
    where: str
    matrix: tuple | None = None
    stroke: tuple | None = None     # (points, LineDesc)


def _net(v: str | None) -> str | None:
    if v is None:
        return None
    v = v.strip()
    return "" if v.lower() in NO_NET_NAMES else v


class _Features:
    """Second pass: the board step's layer features and B-style pad stacks."""

    def __init__(self, d: Definitions, step: StepDef, sh: Shapes, order: list[str],
                 limits: Limits):
        self.d, self.step, self.sh, self.limits = d, step, sh, limits
        self.file = d.file
        self.scale = d.scale
        names = copper_layer_names(len(order))
        if len(order) == 1 and d.layers[order[0]].side == "BOTTOM":
            names = ["bottom"]
        self.copper = dict(zip(order, names))          # file layer -> board layer
        self.items: list[_Item] = []
        self.holes: list[Hole] = []
        self.pad_holes: list[Hole] = []
        self.pins: dict[tuple[str, str], Pin] = {}
        self.notes: list[Assumption] = []
        self._ps_cache: dict[tuple[str, str], object] = {}

    def note(self, topic: str, text: str) -> None:
        a = Assumption(topic, text)
        if a not in self.notes:
            self.notes.append(a)

    # ----------------------------------------------------------------- the walk
    def run(self, walk: XmlWalk) -> None:
        """Stream the features (second pass), then place and stroke them in batches."""
        in_step = False
        k_step = 0
        layer = mode = None
        set_attrs: dict = {}
        for event, elem in walk:
            name = local(elem.tag)
            if event == "start":
                parent = walk.parent_name()
                if (walk.depth == 2 and name != "Ecad") or (walk.depth == 3 and name != "CadData") \
                        or (walk.depth == 4 and name != "Step"):
                    walk.skip()
                elif name == "Step" and parent == "CadData":
                    k_step += 1
                    in_step = (elem.get("name") or f"step{k_step}") == self.step.name
                    if not in_step:
                        walk.skip()
                elif parent == "Step":
                    if name == "LayerFeature":
                        layer = elem.get("layerRef")
                        mode = self._mode(layer, walk)
                        if mode == "ignore":
                            walk.skip()
                    elif name == "PadStack":
                        walk.collect()
                    else:
                        walk.skip()
                elif parent == "LayerFeature":
                    if name == "Set":
                        set_attrs = dict(elem.attrib)
                    elif name in SET_IGNORED:
                        walk.skip()
                    else:
                        raise walk.error(f"<{name}> directly in LayerFeature; expected Set",
                                         cls=UnsupportedFeatureError)
                elif parent == "Set":
                    if name in SET_ITEMS:
                        walk.collect()
                    elif name in SET_IGNORED:
                        walk.skip()
                    else:
                        raise walk.error(f"<{name}> in a Set on layer {layer!r} is not "
                                         "understood; expected Pad, Fiducial, Features, Hole "
                                         "or SlotCavity", cls=UnsupportedFeatureError)
                continue
            if name in SET_ITEMS and walk.parent_name() == "Set":
                self._item(name, elem, layer, mode, set_attrs, walk)
                if len(self.items) > self.limits.max_objects_per_file:
                    raise walk.error(f"more than {self.limits.max_objects_per_file} features "
                                     "(limit)", cls=ResourceLimitError)
            elif name == "PadStack":
                self._b_padstack(elem, walk)
            elif name == "LayerFeature":
                layer = mode = None
            elif name == "Step":
                in_step = False
        self.finish()

    def finish(self) -> None:
        """Apply the deferred placements and strokes (vectorised)."""
        moved = [i for i, it in enumerate(self.items) if it.matrix is not None]
        for k in range(0, len(moved), _BATCH):   # batches keep the coordinate arrays small
            chunk = moved[k:k + _BATCH]
            geoms = np.empty(len(chunk), dtype=object)
            geoms[:] = [self.items[i].geometry for i in chunk]
            mats = np.array([self.items[i].matrix for i in chunk], dtype=float)
            for i, g in zip(chunk, apply_matrices(geoms, mats)):
                self.items[i].geometry = g
                self.items[i].matrix = None
        stroked = [i for i, it in enumerate(self.items) if it.stroke is not None]
        for k in range(0, len(stroked), _BATCH):
            chunk = stroked[k:k + _BATCH]
            geoms = stroke_batch([self.items[i].stroke[0] for i in chunk],
                                 [self.items[i].stroke[1] for i in chunk])
            for i, g in zip(chunk, geoms):
                self.items[i].geometry = g
                self.items[i].stroke = None
        self.items = [it for it in self.items if not it.geometry.is_empty]

    def _mode(self, layer: str | None, walk: XmlWalk) -> str:
        L = self.d.layers.get(layer or "")
        if L is None:
            raise walk.error(f"LayerFeature layerRef {layer!r} names no Layer of CadData; "
                             f"expected one of {', '.join(sorted(self.d.layers)) or 'none'}")
        if L.function in COPPER_FUNCTIONS:
            return "copper"
        if L.function in DRILL_FUNCTIONS:
            return "drill"
        if L.function in ROUT_FUNCTIONS:
            return "rout"
        if L.function in OTHER_CONDUCTIVE:
            raise walk.error(f"features on layer {layer!r} of function {L.function} "
                             "(conductive, not copper) are not supported",
                             cls=UnsupportedFeatureError)
        return "ignore"

    # ----------------------------------------------------------------- items
    def _item(self, name, elem, layer, mode, sa, walk: XmlWalk) -> None:
        loc = Loc(self.file, walk.where(), elem)
        net = _net(sa.get("net"))
        if mode == "copper":
            if name in ("Hole", "SlotCavity"):
                self.note("drill", f"{self.file}: holes listed on a copper layer taken as "
                                   "drilled through every copper layer")
                self._hole(name, elem, None, net, sa, loc)
            elif name == "Features":
                self._features(elem, layer, net, sa, loc)
            else:
                self._pad(name, elem, layer, net, sa, loc)
        elif name in ("Hole", "SlotCavity"):
            self._hole(name, elem, layer, net, sa, loc)
        elif name == "Features":
            self._rout(elem, layer, net, sa, loc)
        # pads and fiducials on a drill or rout layer draw no copper

    def _polarity(self, sa, loc: Loc, elem) -> str:
        p = (sa.get("polarity") or "POSITIVE").upper()
        if p not in ("POSITIVE", "NEGATIVE"):
            raise loc.err(elem, f"Set@polarity {p!r}; expected POSITIVE or NEGATIVE")
        return "dark" if p == "POSITIVE" else "clear"

    def _add(self, geom, sa, layer, net, comp, pin, func, kind, loc: Loc, elem, *,
             matrix=None, stroke=None) -> None:
        if geom is not None and matrix is None and geom.is_empty:
            return
        self.items.append(_Item(geom, self._polarity(sa, loc, elem), self.copper[layer], net,
                                comp, pin, func, kind, src_line(elem), loc.base,
                                None if matrix == IDENTITY else matrix, stroke))

    def _features(self, elem, layer, net, sa, loc: Loc) -> None:
        use = (sa.get("padUsage") or "").upper()
        pinref = next((c for c in elem if local(c.tag) == "PinRef"), None)
        comp = pinref.get("componentRef") if pinref is not None else sa.get("componentRef")
        pin = pinref.get("pin") if pinref is not None else None
        func = "ViaPad" if use == "VIA" else self._term(comp, None) \
            if (use == "TERMINATION" or pin is not None) else "Conductor"
        m = self.sh.matrix(_child(elem, "Xform"), _child(elem, "Location"), self.scale, loc)
        n = 0
        for c in elem:
            cname = local(c.tag)
            if cname in NON_GEOMETRY:
                continue
            n += 1
            kind = SHAPE_KINDS.get(cname, "region")
            if cname in STROKES:
                pts, ld = self.sh.stroke_spec(c, self.scale, loc)
                if m != IDENTITY:
                    pts = pts @ np.array([[m[0], m[2]], [m[1], m[3]]]) + (m[4], m[5])
                self._add(None, sa, layer, net, comp, pin, func, kind, loc, elem,
                          stroke=(pts, ld))
            else:
                g = self.sh.shape(c, self.scale, loc)
                self._add(g, sa, layer, net, comp, pin, func, kind, loc, elem, matrix=m)
        if n == 0:
            raise loc.err(elem, "Features holds no shape")
        if pin is not None and comp:
            self._pin(comp, pin, net, layer, None)

    def _term(self, comp: str | None, padstack) -> str:
        if padstack is not None and padstack.hole is not None:
            return "ComponentPad"
        c = self.step.components.get(comp or "")
        if c is not None and (c.mount or "").upper() in THROUGH_MOUNTS:
            return "ComponentPad"
        return "SMDPad"

    def _pad(self, name, elem, layer, net, sa, loc: Loc) -> None:
        body = elem
        if name == "Fiducial":  # may wrap its mark in a typed child (LocalFiducial...)
            while not _has_shape(body):
                kids = [c for c in body if local(c.tag) not in NON_GEOMETRY]
                if len(kids) != 1:
                    raise loc.err(elem, "Fiducial without a shape")
                body = kids[0]
        xf = _child(body, "Xform")
        lc = _child(body, "Location")
        pinref = _child(body, "PinRef")
        comp = pinref.get("componentRef") if pinref is not None else sa.get("componentRef")
        pin = pinref.get("pin") if pinref is not None else None
        ps = None
        if elem.get("padstackDefRef"):
            ps = self.step.padstacks.get(elem.get("padstackDefRef"))
            if ps is None:
                raise loc.err(elem, f"padstackDefRef {elem.get('padstackDefRef')!r} names no "
                                    "PadStackDef of this step")
        shape_elems = [c for c in body if local(c.tag) not in NON_GEOMETRY]
        if len(shape_elems) == 1:
            local_g = self.sh.shape(shape_elems[0], self.scale, loc)  # shared, not copied
        elif shape_elems:
            local_g = shapely.union_all([self.sh.shape(c, self.scale, loc)
                                         for c in shape_elems])
        elif ps is not None:
            local_g = self._padstack_geometry(ps, layer, loc, elem)
        else:
            raise loc.err(elem, f"{name} has no shape and no padstackDefRef; expected a "
                                "primitive or a pad stack definition")
        if local_g is None:
            return
        m = self.sh.matrix(xf, lc, self.scale, loc)
        use = (sa.get("padUsage") or "").upper()
        if name == "Fiducial":
            func = "FiducialPad"
        elif use == "VIA":
            func = "ViaPad"
        elif use == "TERMINATION" or pin is not None:
            func = self._term(comp, ps)
        else:
            func = None
        if net is None and pin is not None:
            net = self.step.logical.get((comp or "", pin))
        self._add(local_g, sa, layer, net, comp, pin, func, "flash", loc, elem, matrix=m)
        if pin is not None and comp:
            self._pin(comp, pin, net, layer, (m[4], m[5]))
        if ps is not None and ps.hole is not None:
            dia, status, hx, hy = ps.hole
            cx, cy = m[0] * hx + m[1] * hy + m[4], m[2] * hx + m[3] * hy + m[5]
            plated = PLATED_STATUS.get(status, True)
            self.pad_holes.append(Hole(circle(cx, cy, dia), dia, plated,
                                       self._span(None), False, net,
                                       "ViaDrill" if use == "VIA" else "ComponentDrill",
                                       "pad stack PadstackHoleDef",
                                       SourceRef(self.file, src_line(elem), loc.base)))

    def _padstack_geometry(self, ps, layer, loc: Loc, elem):
        key = (ps.name, layer)
        if key not in self._ps_cache:
            geoms = []
            for pd, base in ps.pads.get(layer, []):
                ploc = Loc(self.file, base, pd)
                shp = [c for c in pd if local(c.tag) not in NON_GEOMETRY]
                for c in shp:
                    g = self.sh.shape(c, self.scale, ploc)
                    geoms.append(self.sh.place(g, _child(pd, "Xform"), _child(pd, "Location"),
                                               self.scale, ploc))
            self._ps_cache[key] = shapely.union_all(geoms) if geoms else None
        return self._ps_cache[key]

    def _pin(self, comp, pin, net, layer, pos) -> None:
        key = (comp, pin)
        if key not in self.pins:
            self.pins[key] = Pin(pin, None, net or None, pos, self.copper.get(layer, layer))

    # ----------------------------------------------------------------- holes
    def _span(self, layer: str | None) -> tuple[str, str]:
        names = list(self.copper.values())
        L = self.d.layers.get(layer or "")
        if L is None or L.span is None:
            if layer is not None:
                self.note("drill", f"{self.file}: drill layer {layer!r} states no Span; "
                                   f"taken as through all {len(names)} copper layers")
            return (names[0], names[-1])
        a, b = L.span
        if a not in self.copper or b not in self.copper:
            bad = a if a not in self.copper else b
            raise InputFileError(f"Span of drill layer {layer!r} names {bad!r}, which is not a "
                                 "conductor layer", file=self.file, line=L.line,
                                 element=f"Layer[{layer}]/Span")
        x, y = sorted((self.copper[a], self.copper[b]), key=names.index)
        return (x, y)

    def _plating(self, elem, sa, loc: Loc, default: bool | None) -> tuple[bool, str]:
        st = elem.get("platingStatus")
        if st is None:
            if sa.get("plate") is not None:
                return boolean(sa, "plate"), "Set@plate"
            if default is not None:
                return default, "routed layer (taken as non-plated)"
            raise loc.err(elem, f"{local(elem.tag)} has no platingStatus; expected PLATED, "
                                "NONPLATED, VIA or VIA_CAPPED")
        st = st.strip().upper()
        if st not in PLATED_STATUS:
            raise loc.err(elem, f"platingStatus {st!r}; expected one of "
                                f"{', '.join(PLATED_STATUS)}")
        return PLATED_STATUS[st], f"platingStatus {st}"

    def _hole(self, name, elem, layer, net, sa, loc: Loc) -> None:
        plated, basis = self._plating(elem, sa, loc, None)
        st = (elem.get("platingStatus") or "").upper()
        use = (sa.get("padUsage") or "").upper()
        func = "ViaDrill" if (st.startswith("VIA") or use == "VIA") else \
            "ComponentDrill" if plated else "MechanicalDrill"
        src = SourceRef(self.file, src_line(elem), loc.base)
        span = self._span(layer)
        if name == "Hole":
            d = self.sh.size(elem, "diameter", self.scale, loc)
            x = self.sh.coord(elem, "x", self.scale, loc)
            y = self.sh.coord(elem, "y", self.scale, loc)
            kind = (elem.get("type") or "CIRCLE").upper()
            if kind == "CIRCLE":
                g = circle(x, y, d)
            elif kind == "SQUARE":
                g = self.sh.place(box(-d / 2, -d / 2, d / 2, d / 2), _child(elem, "Xform"),
                                  None, self.scale, loc)
                g = shapely.affinity.translate(g, x, y)
            else:
                raise loc.err(elem, f"Hole@type {kind!r}; expected CIRCLE or SQUARE",
                              UnsupportedFeatureError)
            self.holes.append(Hole(g, d, plated, span, False, net, func, basis, src))
            return
        geoms = self.sh.features(elem, self.scale, loc)
        if not geoms:
            raise loc.err(elem, "SlotCavity holds no shape")
        g = shapely.union_all(geoms)
        widths = [self.sh.stroke_width(c, self.scale, loc) for c in elem
                  if local(c.tag) not in NON_GEOMETRY]
        w = widths[0] if len(widths) == 1 and widths[0] else slot_width(g)
        self._add_slot(g, w, plated, span, net, func, basis, src)

    def _rout(self, elem, layer, net, sa, loc: Loc) -> None:
        plated, basis = self._plating(elem, sa, loc, False)
        src = SourceRef(self.file, src_line(elem), loc.base)
        geoms = self.sh.features(elem, self.scale, loc)
        widths = [self.sh.stroke_width(c, self.scale, loc) for c in elem
                  if local(c.tag) not in NON_GEOMETRY]
        for g, w in zip(geoms, widths):
            self._add_slot(g, w or slot_width(g), plated, self._span(layer), net,
                           "ComponentDrill" if plated else "MechanicalDrill", basis, src)

    def _add_slot(self, g, w, plated, span, net, func, basis, src) -> None:
        for part in shapely.get_parts(g):
            if part.geom_type == "Polygon" and part.area > 0:
                self.holes.append(Hole(part, w, plated, span, True, net, func, basis, src))

    # ----------------------------------------------------------------- revision B pad stacks
    def _b_padstack(self, elem, walk: XmlWalk) -> None:
        loc = Loc(self.file, walk.where(), elem)
        net = _net(elem.get("net"))
        holes = [c for c in elem if local(c.tag) == "LayerHole"]
        via = any((h.get("platingStatus") or "").upper().startswith("VIA") for h in holes)
        for h in holes:
            span_el = _child(h, "Span")
            if span_el is None:
                self._hole("Hole", h, None, net, {}, loc)
            else:
                self._b_hole(h, span_el, net, loc)
        for lp in elem:
            if local(lp.tag) != "LayerPad":
                continue
            lname = lp.get("layerRef")
            if lname not in self.d.layers:
                raise loc.err(lp, f"LayerPad layerRef {lname!r} names no Layer")
            if lname not in self.copper:
                continue
            pinref = _child(lp, "PinRef")
            comp = pinref.get("componentRef") if pinref is not None else None
            pin = pinref.get("pin") if pinref is not None else None
            shp = [c for c in lp if local(c.tag) not in NON_GEOMETRY]
            if not shp:
                raise loc.err(lp, "LayerPad without a shape")
            g = self.sh.place(shapely.union_all([self.sh.shape(c, self.scale, loc)
                                                 for c in shp]),
                              _child(lp, "Xform"), _child(lp, "Location"), self.scale, loc)
            func = "ViaPad" if via else ("ComponentPad" if holes else "SMDPad")
            self.items.append(_Item(g, "dark", self.copper[lname], net, comp, pin, func,
                                    "flash", src_line(lp), loc.base))
            if pin is not None and comp:
                c = g.centroid
                self._pin(comp, pin, net, lname, (c.x, c.y))

    def _b_hole(self, h, span_el, net, loc: Loc) -> None:
        a, b = span_el.get("fromLayer"), span_el.get("toLayer")
        names = list(self.copper.values())
        if a not in self.copper or b not in self.copper:
            raise loc.err(span_el, f"LayerHole Span {a!r}..{b!r} names a layer that is not a "
                                   "conductor layer")
        span = tuple(sorted((self.copper[a], self.copper[b]), key=names.index))
        before = len(self.holes)
        self._hole("Hole", h, None, net, {}, loc)
        for k in range(before, len(self.holes)):
            self.holes[k].span = span

    # ----------------------------------------------------------------- the board
    def board(self, name: str, project) -> Board:
        from .ipc2581_board import assemble
        return assemble(self, name, project)


def _child(elem, name: str):
    for c in elem:
        if local(c.tag) == name:
            return c
    return None


def _has_shape(elem) -> bool:
    return any(local(c.tag) in SHAPE_KINDS for c in elem)


__all__ = ["read_ipc2581", "is_ipc2581", "build_dictionaries", "copper_order",
           "NO_NET_NAMES", "LineDesc"]
