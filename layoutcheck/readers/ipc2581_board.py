"""IPC-2581 reader, last step: the collected features become a :class:`Board`.

Negative Sets erase the copper drawn before them on their layer (the same rule as Gerber
clear polarity, :func:`layoutcheck.readers.gerber.polarity.resolve_polarity`); copper that
no Set names a net for takes the net of a physical net point (``PhyNetPoint``) inside it when
exactly one net claims it; holes listed twice (drill layer and B-style pad stack) are kept
once; pad stack holes stand in for the drill layer only when the file lists no holes at all.
The stackup comes from the file, the project file fills what the file leaves out.
Units: millimetres.
"""
from __future__ import annotations

from collections import defaultdict

import numpy as np
import shapely
from shapely.geometry import Polygon, box

from ..errors import InputFileError
from ..model import Assumption, Board, Component, CopperShape, Layer, Pin, SourceRef, Stackup
from .gerber.polarity import resolve_polarity
from .ipc2581_defs import COPPER_FUNCTIONS, DIELECTRIC_FUNCTIONS, KIND_OF_FUNCTION
from .ipc2581_shapes import Loc
from .ipc2581_xml import local


def assemble(f, name: str, project) -> Board:
    """Build the Board from a finished second pass ``f`` (``ipc2581._Features``)."""
    d = f.d
    board = Board(name=name)
    board.assumptions = list(f.sh.notes) + list(f.notes)
    order = list(f.copper)
    board.copper_layers = [f.copper[n] for n in order]
    _layers(board, f)
    board.outline = _outline(f, project, board)
    board.shapes = _copper(f, board)
    _phy_nets(f, board)
    board.has_net_names = any(s.net is not None for s in board.shapes)
    board.holes = _holes(f, board)
    board.components = _components(f)
    board.stackup = _stackup(f, board, project)
    if d.revision not in ("B", "C"):
        board.assumptions.append(Assumption(
            "input", f"{d.file}: IPC-2581 revision {d.revision!r}; read as revision C"))
    return board


# ---------------------------------------------------------------------- layers, outline
def _layers(board: Board, f) -> None:
    d = f.d
    for i, fname in enumerate(f.copper):
        L = d.layers[fname]
        lname = f.copper[fname]
        side = "top" if lname == "top" else "bottom" if lname == "bottom" else "inner"
        board.layers.append(Layer(lname, "copper", side, d.file, f"{L.function} {fname}",
                                  L.polarity == "NEGATIVE", i + 1))
    for L in sorted(d.layers.values(), key=lambda L: L.order):
        if L.function in COPPER_FUNCTIONS or L.function in DIELECTRIC_FUNCTIONS:
            continue
        kind = KIND_OF_FUNCTION.get(L.function, "other")
        side = {"TOP": "top", "BOTTOM": "bottom", "INTERNAL": "inner"}.get(L.side or "")
        board.layers.append(Layer(f"{kind}-{L.name}", kind, side, d.file,
                                  f"{L.function} {L.name}", L.polarity == "NEGATIVE"))


def _outline(f, project, board) -> Polygon | None:
    prof = f.step.profile
    if prof is not None:
        elem, base = prof
        loc = Loc(f.file, base, elem)
        outer, cuts = None, []
        for c in elem:
            n = local(c.tag)
            if n == "Polygon":
                if outer is not None:
                    raise loc.err(c, "Profile with two Polygons; expected one Polygon and "
                                     "Cutouts")
                outer = Polygon(f.sh.ring(c, f.scale, loc))
            elif n == "Cutout":
                cuts.append(Polygon(f.sh.ring(c, f.scale, loc)))
        if outer is None or outer.area <= 0:
            raise loc.err(elem, "Profile without a Polygon of positive area; expected the "
                                "board outline")
        if not outer.is_valid:
            outer = shapely.make_valid(outer)
        g = outer.difference(shapely.union_all(cuts)) if cuts else outer
        if g.geom_type == "MultiPolygon":
            g = max(g.geoms, key=lambda p: p.area)
        return g
    if project is not None and getattr(project, "size_mm", None) is not None:
        geoms = [it.geometry for it in f.items]
        x0, y0 = shapely.total_bounds(geoms)[:2] if geoms else (0.0, 0.0)
        w, h = project.size_mm
        board.assumptions.append(Assumption(
            "outline", f"no Profile in the board step: board taken as the {w:g} x {h:g} mm "
                       f"rectangle from [board] size_mm, lower-left corner at the copper's "
                       f"lower-left ({x0:.3f}, {y0:.3f})"))
        return box(x0, y0, x0 + w, y0 + h)
    raise InputFileError(f"no board outline: step {f.step.name!r} has no Profile and the "
                         "project file gives no [board] size_mm", file=f.file,
                         line=f.step.line)


# ---------------------------------------------------------------------- copper
def _copper(f, board: Board) -> list[CopperShape]:
    by_layer: dict[str, list] = defaultdict(list)
    for it in f.items:
        by_layer[it.layer].append(it)
    f.items = []     # each layer's features are freed once its copper is made
    negative = {f.copper[n] for n in f.copper if f.d.layers[n].polarity == "NEGATIVE"}
    pin_names = _pin_names(f)
    out: list[CopperShape] = []
    for lname in board.copper_layers:
        items = by_layer.pop(lname, [])
        if lname in negative:
            if board.outline is None:
                raise InputFileError(f"negative copper layer {lname} needs a board outline",
                                     file=f.file)
            image = shapely.union_all([p for p, _ in resolve_polarity(items)]) if items \
                else Polygon()
            for g in shapely.get_parts(board.outline.difference(image)):
                if g.geom_type == "Polygon" and g.area > 0:
                    out.append(CopperShape(g, lname, None, kind="plane",
                                           source=SourceRef(f.file)))
            board.assumptions.append(Assumption(
                "layer", f"{f.file}: copper layer {lname} is negative: copper is the outline "
                         "minus its features; its nets come from the holes and pads on it"))
            continue
        if any(it.polarity == "clear" for it in items):
            pieces = resolve_polarity(items)
        else:  # nothing to erase: keep the geometry objects, split multi-part ones
            pieces = []
            for it in items:
                g = it.geometry
                if g.geom_type == "Polygon":
                    pieces.append((g, it))
                else:
                    pieces.extend((p, it) for p in shapely.get_parts(g)
                                  if p.geom_type == "Polygon" and p.area > 0)
        for poly, it in pieces:
            out.append(CopperShape(poly, lname, it.net, it.component, it.pin, it.function,
                                   it.kind, SourceRef(f.file, it.line, it.where),
                                   pin_names.get((it.component, it.pin))))
        del items, pieces
    return out


def _pin_names(f) -> dict[tuple[str, str], str]:
    """(refdes, pin number) -> the pin's name in its component's Package, where named."""
    out = {}
    for ref, c in f.step.components.items():
        for num, name in f.step.packages.get(c.package or "", {}).items():
            if name:
                out[(ref, num)] = name
    return out


def _phy_nets(f, board: Board) -> None:
    """Name unnamed copper from PhyNetPoints that fall inside it (one net only)."""
    pts = f.step.phy_points
    if not pts or not board.shapes:
        return
    unnamed = [i for i, s in enumerate(board.shapes) if s.net is None]
    if not unnamed:
        return
    geoms = np.array([board.shapes[i].geometry for i in unnamed], dtype=object)
    layers = np.array([board.shapes[i].layer for i in unnamed], dtype=object)
    tree = shapely.STRtree(geoms)
    p_geom = shapely.points([(x, y) for _, x, y, _ in pts])
    p_layer = [f.copper.get(lay) for _, _, _, lay in pts]
    pi, si = tree.query(p_geom, predicate="intersects")
    claims: dict[int, set] = defaultdict(set)
    for a, b in zip(pi, si):
        if p_layer[a] is None or p_layer[a] == layers[b]:
            claims[int(b)].add(pts[a][0])
    conflicts = 0
    for b, nets in claims.items():
        if len(nets) == 1:
            board.shapes[unnamed[b]].net = next(iter(nets))
        else:
            conflicts += 1
    if conflicts:
        board.assumptions.append(Assumption(
            "net", f"{f.file}: {conflicts} unnamed copper piece(s) hold physical net points of "
                   "several nets; left without a net"))


# ---------------------------------------------------------------------- holes
def _holes(f, board: Board) -> list:
    holes = list(f.holes)
    if not holes and f.pad_holes:
        holes = list(f.pad_holes)
        board.assumptions.append(Assumption(
            "drill", f"{f.file}: no drill layer lists holes; holes taken from the pad stack "
                     "definitions of the pads"))
    seen = set()
    out = []
    for h in holes:
        b = h.geometry.bounds
        key = (round(b[0], 4), round(b[1], 4), round(b[2], 4), round(b[3], 4), h.is_slot)
        if key in seen:
            continue
        seen.add(key)
        out.append(h)
    return out


# ---------------------------------------------------------------------- components
def _components(f) -> dict[str, Component]:
    step, d = f.step, f.d
    comps: dict[str, Component] = {}
    for ref, c in step.components.items():
        L = d.layers.get(c.layer or "")
        side = "bottom" if ((L is not None and L.side == "BOTTOM")
                            or (L is None and c.mirror)) else "top"
        props = dict(d.bom.get(ref, {}))
        if c.part and "part" not in props:
            props["part"] = c.part
        if c.mount:
            props.setdefault("mount", c.mount)
        value = props.get("value")
        comps[ref] = Component(ref, {}, c.package, value if isinstance(value, str) else None,
                               side, c.position, c.rotation, props)
    for (ref, pin), p in sorted(f.pins.items()):
        comp = comps.get(ref)
        if comp is None:
            comp = comps[ref] = Component(ref, properties=dict(d.bom.get(ref, {})))
        comp.pins[pin] = p
    for (ref, pin), net in sorted(step.logical.items()):
        comp = comps.get(ref)
        if comp is None or not ref:
            continue
        if pin not in comp.pins:
            comp.pins[pin] = Pin(pin, None, net or None)
        elif comp.pins[pin].net is None and net:
            comp.pins[pin].net = net
    for ref, comp in comps.items():
        c = step.components.get(ref)
        names = step.packages.get(c.package or "", {}) if c is not None else {}
        for num, pin in comp.pins.items():
            if names.get(num):
                pin.name = names[num]
    return dict(sorted(comps.items()))


# ---------------------------------------------------------------------- stackup
def _stackup(f, board: Board, project) -> Stackup:
    d = f.d
    st = Stackup()
    names = board.copper_layers
    from_file = False
    entries = d.stackup
    if entries and all(e.sequence is not None for e in entries):
        entries = sorted(entries, key=lambda e: e.sequence)
    pos = {e.ref: i for i, e in enumerate(entries)}
    missing_cu = []
    for fname, lname in f.copper.items():
        e = entries[pos[fname]] if fname in pos else None
        if e is not None and e.thickness:
            st.copper_mm[lname] = e.thickness
            from_file = True
        else:
            missing_cu.append(lname)
    cu_proj = (project.stackup_copper_um / 1000.0) if (
        project is not None and getattr(project, "stackup_copper_um", None)) else None
    for lname in missing_cu:
        st.copper_mm[lname] = cu_proj if cu_proj is not None else Stackup.DEFAULT_COPPER_MM
    if missing_cu:
        board.assumptions.append(Assumption(
            "stackup", f"{d.file}: copper thickness of {', '.join(missing_cu)} not in the "
                       f"stackup; taken as {st.copper_mm[missing_cu[0]] * 1000:g} um"))
    total = None
    if d.overall_thickness:
        total = d.overall_thickness
        from_file = True
    elif entries and all(e.thickness is not None for e in entries):
        total = sum(e.thickness for e in entries)
        from_file = True
    elif project is not None and getattr(project, "stackup_thickness_mm", None):
        total = project.stackup_thickness_mm
    if total is None:
        total = Stackup.DEFAULT_THICKNESS_MM
        board.assumptions.append(Assumption("stackup", "board thickness not given: assumed "
                                            f"{Stackup.DEFAULT_THICKNESS_MM} mm"))
    st.thickness_mm = total
    file_order = list(f.copper)
    split = False
    for a, b in zip(file_order, file_order[1:]):
        gap = None
        if a in pos and b in pos:
            lo, hi = sorted((pos[a], pos[b]))
            between = [e for e in entries[lo + 1:hi]
                       if d.layers.get(e.ref) is None
                       or d.layers[e.ref].function in DIELECTRIC_FUNCTIONS]
            if between and all(e.thickness is not None for e in between):
                gap = sum(e.thickness for e in between)
        if gap is None:
            split = True
        else:
            st.dielectric_mm[f.copper[a]] = gap
            from_file = True
    if split and len(names) > 1:
        each = max(total - sum(st.copper_mm.values()), 0.01) / (len(names) - 1)
        for lname in names[:-1]:
            st.dielectric_mm.setdefault(lname, each)
        board.assumptions.append(Assumption(
            "stackup", f"{d.file}: dielectric thickness between some copper layers not in "
                       "the stackup; the rest of the board thickness split evenly"))
    st.basis = "file" if from_file else ("project" if project is not None and (
        getattr(project, "stackup_thickness_mm", None) or cu_proj) else "default")
    if project is not None and from_file:
        pt = getattr(project, "stackup_thickness_mm", None)
        if pt and abs(pt - st.thickness_mm) > 1e-6:
            board.assumptions.append(Assumption(
                "stackup", f"the file's stackup ({st.thickness_mm:g} mm) was used, not the "
                           f"project file's [stackup] thickness_mm ({pt:g} mm)"))
    return st


__all__ = ["assemble"]
