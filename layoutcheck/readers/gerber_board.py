"""Build a :class:`~layoutcheck.model.Board` from a set of Gerber and NC drill files.

Steps: sniff and parse every file, identify layers (:mod:`.layers`), number the copper
layers, take the outline from the profile layer, turn each copper layer's image into
:class:`CopperShape` pieces that keep their X2 attributes (net, pin, component, function),
turn drill hits into :class:`Hole` objects with spans and plating, and collect components
from ``.P``/``.C`` attributes.  Everything assumed along the way is recorded on the board.
Units: millimetres.
"""
from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import shapely
from shapely.geometry import Polygon, box
from shapely.ops import polygonize, unary_union

from ..errors import InputFileError
from ..limits import DEFAULT_LIMITS, Limits
from ..model import (Assumption, Board, Component, CopperShape, Hole, Layer, Pin, SourceRef,
                     Stackup, copper_layer_names)
from ..project import Project
from . import drill as drill_reader
from . import gerber as gerber_reader
from .fabset import FabFile
from .holes import DrillFile
from .layers import LayerRole, role_from_name, role_from_project, role_from_x2

Progress = Callable[[str, int, int], None]


@dataclass
class _Parsed:
    file: FabFile
    role: LayerRole
    gerber: object | None = None      # GerberFile
    drill: DrillFile | None = None


def board_from_fab_files(files: list[FabFile], project: Project, *, name: str,
                         limits: Limits = DEFAULT_LIMITS,
                         progress: Progress | None = None) -> Board:
    """Read Gerber/NC drill files into a Board (see module docstring)."""
    assumptions: list[Assumption] = []
    parsed = _parse_all(files, project, limits, progress, assumptions)
    board = Board(name=name)
    board.assumptions = assumptions

    copper = [p for p in parsed if p.role.kind == "copper"]
    if not copper:
        raise InputFileError("no copper layer found among the files "
                             f"({', '.join(f.name for f in files) or 'none'}); expected "
                             "Gerber copper layers (X2 .FileFunction Copper, or name them in "
                             "[board] layers of the project file)", file=name)
    names_by_file = _number_copper(copper, name)
    board.copper_layers = sorted(set(names_by_file.values()),
                                 key=lambda n: _stack_key(n))

    # layers list, in stack order for copper, then the rest by file name
    for p in sorted(copper, key=lambda p: _stack_key(names_by_file[p.file.name])):
        lname = names_by_file[p.file.name]
        side = "top" if lname == "top" else "bottom" if lname == "bottom" else "inner"
        board.layers.append(Layer(lname, "copper", side, p.file.name, p.role.function or
                                  f"identified by {p.role.basis}", p.role.negative,
                                  board.copper_layers.index(lname) + 1))
    for p in parsed:
        if p.role.kind in ("copper", "ignore"):
            continue
        lname = p.role.kind + (f"-{p.role.side}" if p.role.side else "")
        if p.role.kind == "drill":
            lname = "drill-" + ("pth" if p.role.plated else "npth" if p.role.plated is False
                                else "unknown")
        board.layers.append(Layer(lname, p.role.kind, p.role.side, p.file.name,
                                  p.role.function or f"identified by {p.role.basis}",
                                  p.role.negative))

    board.outline = _outline(parsed, project, copper, assumptions, name)
    for p in copper:
        board.shapes.extend(_copper_shapes(p, names_by_file[p.file.name], board.outline))
    board.has_net_names = any(s.net is not None for s in board.shapes)
    board.holes = _holes(parsed, board, project, assumptions)
    board.components = components_from_shapes(board.shapes)
    board.stackup = _stackup(board, project, assumptions)
    return board


# ---------------------------------------------------------------------------- parsing
def _parse_all(files, project, limits, progress, assumptions) -> list[_Parsed]:
    out: list[_Parsed] = []
    total = len(files)
    pfile = str(project.path) if project.path else "<project>"
    for i, f in enumerate(files):
        if progress:
            progress(f.name, i, total)
        head = f.head()
        mapped = role_from_project(f.name, project.layer_map, pfile) if project.layer_map else None
        if mapped is not None and mapped.kind == "ignore":
            assumptions.append(Assumption("input", f"{f.name}: ignored as the project file says"))
            continue
        if gerber_reader.looks_like_gerber(head):
            gf = gerber_reader.parse_gerber(f.text(), f.name, limits)
            assumptions.extend(a for a in gf.notes if a not in assumptions)
            role = role_from_x2(gf.file_attributes.get(".FileFunction"),
                                gf.file_attributes.get(".FilePolarity"))
            if role is None:
                role = mapped
            if role is None:
                role = role_from_name(f.name)
                if role is None:
                    raise InputFileError(
                        "cannot tell which layer this Gerber file is: it has no X2 "
                        ".FileFunction and its name says nothing recognisable; name it in "
                        "[board] layers of the project file (e.g. \"" + f.name +
                        "\" = \"top\")", file=f.name)
                assumptions.append(Assumption(
                    "layer", f"{f.name}: no X2 file function; taken as {_role_text(role)} "
                             "from its file name"))
            if gf.image_negative:
                role.negative = True
            if role.kind == "drill":
                out.append(_Parsed(f, role, drill=drill_reader.drill_from_gerber(gf)))
            else:
                out.append(_Parsed(f, role, gerber=gf))
        elif drill_reader.looks_like_drill(head):
            df = drill_reader.parse_drill(f.text(), f.name, limits)
            assumptions.extend(a for a in df.notes if a not in assumptions)
            role = LayerRole("drill", plated=df.plated, span=df.span, basis="drill file")
            if mapped is not None and mapped.kind == "drill" and mapped.plated is not None:
                role.plated = mapped.plated
            out.append(_Parsed(f, role, drill=df))
        else:
            if mapped is not None:
                raise InputFileError(
                    f"the project file names this file as {_role_text(mapped)}, but it is "
                    "neither Gerber nor NC drill data", file=f.name)
            assumptions.append(Assumption(
                "input", f"{f.name}: not recognised as Gerber or NC drill data; not read"))
    if progress:
        progress("", total, total)
    return out


def _role_text(role: LayerRole) -> str:
    if role.kind == "copper":
        if role.side in ("top", "bottom"):
            return f"{role.side} copper"
        return f"copper layer {role.index}" if role.index else "copper"
    return role.kind + (f" ({role.side})" if role.side else "")


# ------------------------------------------------------------------------ copper order
def _stack_key(name: str) -> int:
    if name == "top":
        return 0
    if name == "bottom":
        return 10_000
    return int(name[2:])


def _number_copper(copper: list[_Parsed], board_name: str) -> dict[str, str]:
    """Map each copper file to ``top``/``in<k>``/``bottom``."""
    idx: dict[str, int | None] = {}
    bottoms = []
    for p in copper:
        r = p.role
        if r.index is not None and r.side != "bottom":
            idx[p.file.name] = r.index
        elif r.side == "top":
            idx[p.file.name] = 1
        elif r.side == "bottom":
            bottoms.append(p)
            idx[p.file.name] = r.index
        else:
            idx[p.file.name] = r.index
    known = [v for v in idx.values() if v is not None]
    n = max(known + [len(copper)])
    for p in bottoms:
        if idx[p.file.name] is None:
            idx[p.file.name] = n
    if any(v is None for v in idx.values()):
        missing = [k for k, v in idx.items() if v is None]
        raise InputFileError("cannot place copper layer(s) in the stack: " + ", ".join(missing)
                             + "; name them in [board] layers (top, in1.., bottom)",
                             file=board_name)
    n = max(idx.values())
    seen: dict[int, str] = {}
    for f, i in idx.items():
        if i in seen:
            raise InputFileError(f"two files claim copper layer L{i}: {seen[i]} and {f}",
                                 file=board_name)
        seen[i] = f
    if len(copper) > 1 and sorted(idx.values()) != list(range(1, n + 1)):
        raise InputFileError(
            "copper layers missing from the set: found L" +
            ", L".join(str(i) for i in sorted(idx.values())) + f" of {n}; a board cannot "
            "be reviewed with a copper layer missing", file=board_name)
    names = copper_layer_names(n)
    if len(copper) == 1:
        only = copper[0]
        side = "bottom" if only.role.side == "bottom" else "top"
        return {only.file.name: side}
    return {f: names[i - 1] for f, i in idx.items()}


# ------------------------------------------------------------------------------ outline
def _outline(parsed, project: Project, copper, assumptions, board_name) -> Polygon | None:
    profiles = [p for p in parsed if p.role.kind == "profile" and p.gerber is not None]
    if profiles:
        p = profiles[0]
        poly = outline_from_gerber(p.gerber)
        if poly is None:
            raise InputFileError("the profile layer does not form a closed board outline "
                                 "(expected closed loops of draws/arcs or a region)",
                                 file=p.file.name)
        if len(profiles) > 1:
            assumptions.append(Assumption("outline", "several profile layers; used "
                                          f"{p.file.name}"))
        return poly
    if project.size_mm is not None:
        geoms = [o.geometry for p in copper for o in p.gerber.objects
                 if o.geometry is not None and not o.geometry.is_empty]
        x0, y0 = (0.0, 0.0)
        if geoms:
            x0, y0, _, _ = shapely.total_bounds(geoms)
        w, h = project.size_mm
        assumptions.append(Assumption(
            "outline", f"no profile layer: board taken as the {w:g} x {h:g} mm rectangle "
                       f"from [board] size_mm, lower-left corner at the copper's lower-left "
                       f"({x0:.3f}, {y0:.3f})"))
        return box(x0, y0, x0 + w, y0 + h)
    raise InputFileError("no board outline: no profile layer among the files and no "
                         "[board] size_mm in the project file", file=board_name)


def outline_from_gerber(gf) -> Polygon | None:
    """The board outline from a profile layer: closed loops of strokes, or regions.

    The largest loop is the board; loops inside it are cut-outs (interior rings).
    """
    lines = [o.path for o in gf.objects if o.path is not None and o.kind in ("draw", "arc")]
    regions = [o.geometry for o in gf.objects if o.kind == "region" and o.polarity == "dark"]
    polys: list[Polygon] = []
    if lines:
        merged = unary_union(lines)
        polys = [p for p in polygonize(merged) if p.area > 0]
    if not polys and regions:
        u = unary_union(regions)
        polys = list(getattr(u, "geoms", [u]))
    if not polys:
        return None
    polys.sort(key=lambda p: -p.area)
    outer = Polygon(polys[0].exterior)
    inner = [p.exterior for p in polys[1:] if outer.contains(p.representative_point())
             and outer.contains(p)]
    # polygonize returns faces; keep only outermost cut-outs
    inner_polys = unary_union([Polygon(r) for r in inner]) if inner else None
    result = outer if inner_polys is None else outer.difference(inner_polys)
    if result.geom_type == "MultiPolygon":
        result = max(result.geoms, key=lambda g: g.area)
    return result


# ------------------------------------------------------------------------------- copper
def _first(attrs, key):
    v = attrs.get(key)
    if not v:
        return None
    return v[0].strip()


def _copper_shapes(p: _Parsed, layer: str, outline: Polygon | None) -> list[CopperShape]:
    gf = p.gerber
    out: list[CopperShape] = []
    if p.role.negative:
        img = gerber_reader.image(gf)
        if outline is None:
            raise InputFileError("negative copper layer needs a board outline", file=p.file.name)
        copper = outline.difference(img)
        for g in getattr(copper, "geoms", [copper]):
            if isinstance(g, Polygon) and not g.is_empty:
                out.append(CopperShape(g, layer, None, kind="plane",
                                       source=SourceRef(p.file.name)))
        return out
    for poly, obj in gerber_reader.resolve_polarity(gf.objects):
        a = obj.attributes
        net = None
        if ".N" in a:
            fields = [x.strip() for x in a[".N"]]
            net = fields[0] if fields else ""
            if net == "N/C":
                net = ""
        ref = pin = pin_name = None
        if ".P" in a and a[".P"]:
            ref = a[".P"][0].strip()
            pin = a[".P"][1].strip() if len(a[".P"]) > 1 else None
            pin_name = a[".P"][2].strip() or None if len(a[".P"]) > 2 else None
        elif ".C" in a and a[".C"]:
            ref = a[".C"][0].strip()
        func = _first(a, ".AperFunction")
        out.append(CopperShape(poly, layer, net, ref, pin, func, obj.kind,
                               SourceRef(p.file.name, obj.line), pin_name))
    return out


def components_from_shapes(shapes: list[CopperShape],
                           known: dict[str, Component] | None = None) -> dict[str, Component]:
    """Components and their pins from the ``component``/``pin`` marks on copper shapes,
    added to ``known`` (a copy) when given; a pin's position is its pad's centroid (mm)."""
    comps: dict[str, Component] = dict(known or {})
    for s in shapes:
        if not s.component:
            continue
        c = comps.setdefault(s.component, Component(s.component))
        if s.pin is not None and s.pin not in c.pins:
            pt = s.geometry.centroid
            c.pins[s.pin] = Pin(s.pin, s.pin_name, s.net or None, (pt.x, pt.y), s.layer)
    return dict(sorted(comps.items()))


# -------------------------------------------------------------------------------- holes
def _holes(parsed, board: Board, project: Project, assumptions) -> list[Hole]:
    n = len(board.copper_layers)
    names = board.copper_layers
    holes: list[Hole] = []
    plated_files = set(project.plated_files)
    non_plated_files = set(project.non_plated_files)
    for p in parsed:
        if p.drill is None:
            continue
        df = p.drill
        span = p.role.span or df.span
        if span is None:
            span_names = (names[0], names[-1])
            if df.holes:
                assumptions.append(Assumption(
                    "drill", f"{p.file.name}: no layer span stated; taken as through all "
                             f"{n} copper layers"))
        else:
            a, b = sorted(span)
            a, b = max(a, 1), min(b, n)
            span_names = (names[a - 1], names[b - 1])
        file_plated = p.role.plated if p.role.plated is not None else df.plated
        basis = df.plating_basis or p.role.basis
        base = p.file.name.rsplit("/", 1)[-1]
        if p.file.name in plated_files or base in plated_files:
            file_plated, basis = True, "project file [board] plated"
        elif p.file.name in non_plated_files or base in non_plated_files:
            file_plated, basis = False, "project file [board] non_plated"
        guessed = 0
        trees = _LayerTrees(board)
        for h in df.holes:
            plated, pbasis = h.plated, h.plating_basis
            if plated is None:
                plated, pbasis = file_plated, basis
            if plated is None:
                plated = trees.copper_around(h.geometry, span_names)
                pbasis = "guessed from copper around the hole"
                guessed += 1
            holes.append(Hole(h.geometry, h.diameter, bool(plated), span_names, h.is_slot,
                              h.net, h.function, pbasis, SourceRef(p.file.name, h.line)))
        if guessed:
            assumptions.append(Assumption(
                "plating", f"{p.file.name}: plating of {guessed} hole(s) not stated; taken "
                           "as plated where copper surrounds the hole on every layer it "
                           "crosses, else non-plated"))
    return holes


class _LayerTrees:
    """STRtrees of copper per layer, built on first use."""

    def __init__(self, board: Board):
        self.board = board
        self.trees: dict[str, shapely.STRtree] = {}

    def copper_around(self, geom, span_names) -> bool:
        layers = self.board.copper_layers
        i0, i1 = layers.index(span_names[0]), layers.index(span_names[1])
        for lname in layers[i0:i1 + 1]:
            tree = self.trees.get(lname)
            if tree is None:
                tree = shapely.STRtree([s.geometry for s in self.board.shapes
                                        if s.layer == lname])
                self.trees[lname] = tree
            if len(tree.query(geom, predicate="intersects")) == 0:
                return False
        return True


def _stackup(board: Board, project: Project, assumptions) -> Stackup:
    st = Stackup()
    basis = "default"
    if project.stackup_thickness_mm is not None:
        st.thickness_mm = project.stackup_thickness_mm
        basis = "project"
    cu = (project.stackup_copper_um / 1000.0) if project.stackup_copper_um else None
    for lname in board.copper_layers:
        st.copper_mm[lname] = cu if cu is not None else Stackup.DEFAULT_COPPER_MM
    if cu is not None:
        basis = "project"
    n = len(board.copper_layers)
    if n > 1:
        total_cu = sum(st.copper_mm.values())
        each = max(st.thickness_mm - total_cu, 0.01) / (n - 1)
        for lname in board.copper_layers[:-1]:
            st.dielectric_mm[lname] = each
    st.basis = basis
    if project.stackup_thickness_mm is None:
        assumptions.append(Assumption("stackup", "board thickness not given: assumed "
                                      f"{Stackup.DEFAULT_THICKNESS_MM} mm"))
    if cu is None:
        assumptions.append(Assumption("stackup", "copper thickness not given: assumed "
                                      f"{Stackup.DEFAULT_COPPER_MM * 1000:g} um on every layer"))
    if n > 2:
        assumptions.append(Assumption("stackup", "dielectric split evenly between the "
                                      f"{n} copper layers"))
    return st


__all__ = ["board_from_fab_files", "outline_from_gerber"]
