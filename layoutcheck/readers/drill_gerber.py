"""Gerber drill layers turned into drill holes.  Units: millimetres.

A Gerber drill or rout layer (``.FileFunction,Plated,<from>,<to>,<type>[,Drill|Rout|Mixed]``
or ``NonPlated,...``) uses circle apertures only: a flash is a hole of the aperture's
diameter, a draw or arc is a slot of the aperture's width.  ``.AperFunction`` names the
hole's function (``ViaDrill``, ``ComponentDrill``, ``MechanicalDrill``...) and ``.N`` may
carry a net on plated holes (Gerber Layer Format Specification rev. 2024.05, drill and rout
layer attributes, as summarised in our format notes, section 2.6).
"""
from __future__ import annotations

from shapely.geometry import MultiPolygon, Point, Polygon

from ..errors import InputFileError, UnsupportedFeatureError
from ..geometry import arcs
from ..model import Assumption
from .drill_geometry import MIN_TOOL_DIAMETER_MM
from .drill_plating import file_function
from .gerber.types import GerberFile, GraphicObject
from .holes import DrillFile, DrillHole


def drill_from_gerber(gf: GerberFile) -> DrillFile:
    """Turn a parsed Gerber drill layer into a :class:`DrillFile` (millimetres).

    Parameters
    ----------
    gf:
        A Gerber file whose ``.FileFunction`` is ``Plated,...`` or ``NonPlated,...``.

    Returns
    -------
    DrillFile
        One hole per flash (circle of the aperture diameter, mm) and one slot per draw or
        arc (geometry = the object's stroked image, path = its centre line).  Span and
        plating come from the file function; ``function`` from ``.AperFunction``; ``net``
        from ``.N``.  ``units`` is the Gerber file's own unit; geometry is mm regardless.

    Raises
    ------
    InputFileError
        No drill file function, or a hole of zero or negative size.
    UnsupportedFeatureError
        Anything that a set of round holes cannot express: clear objects, regions,
        non-circular apertures, a negative image.
    """
    fields = gf.file_function
    if not fields:
        raise InputFileError("the file has no .FileFunction attribute; a Gerber drill layer "
                             "needs .FileFunction,Plated,<from>,<to>,... or NonPlated,...",
                             file=gf.name)
    try:
        fn = file_function(tuple(fields))
    except ValueError as exc:
        raise InputFileError(f".FileFunction: {exc}", file=gf.name) from exc
    if fn is None or fn.plated is None:
        raise InputFileError(f".FileFunction {','.join(fields)!r} is not a drill layer; "
                             f"expected Plated,<from>,<to>,... or NonPlated,<from>,<to>,...",
                             file=gf.name)
    if gf.image_negative:
        raise UnsupportedFeatureError("the drill layer has a negative image; drill layers "
                                      "are positive (dark = hole)", file=gf.name)
    basis = f"{fn.basis} attribute"
    notes = list(gf.notes)
    holes = [_hole(obj, gf.name, fn.plated, basis, notes) for obj in gf.objects]
    return DrillFile(name=gf.name, holes=holes, span=fn.span, plated=fn.plated,
                     plating_basis=basis, units=gf.units, notes=notes)


def _hole(obj: GraphicObject, name: str, plated: bool, basis: str,
          notes: list[Assumption]) -> DrillHole:
    where = dict(file=name, line=obj.line or None)
    if obj.polarity != "dark":
        raise UnsupportedFeatureError(f"a {obj.polarity} (clear) {obj.kind} on a drill layer; "
                                      f"expected dark flashes and draws only", **where)
    if obj.kind == "region":
        raise UnsupportedFeatureError("a region on a drill layer; expected flashes (holes) "
                                      "and draws/arcs (slots) of circle apertures", **where)
    if obj.kind not in ("flash", "draw", "arc"):
        raise UnsupportedFeatureError(f"graphic object of kind {obj.kind!r} on a drill layer; "
                                      f"expected flash, draw or arc", **where)
    d = obj.aperture_diameter
    if d is None:
        raise UnsupportedFeatureError(f"{obj.kind} with aperture {obj.aperture or '?'} which "
                                      f"is not a plain circle; drill layers use circle "
                                      f"apertures only", **where)
    if not d >= MIN_TOOL_DIAMETER_MM:
        raise InputFileError(f"{obj.kind} with aperture {obj.aperture or '?'} of diameter "
                             f"{d:g} mm; expected a hole diameter above 0 (at least "
                             f"{MIN_TOOL_DIAMETER_MM:g} mm)", **where)
    func = obj.attributes.get(".AperFunction")
    function = func[0] if func else None
    net = None
    nets = obj.attributes.get(".N")
    if nets is not None:
        net = nets[0] if nets else ""
        if len(nets) > 1:
            notes.append(Assumption(topic="net", text=(
                f"{name} line {obj.line}: a drill hole carries several net names "
                f"{', '.join(nets)}; the first, {nets[0]!r}, was used")))
    if obj.kind == "flash":
        if obj.point is None:
            raise InputFileError("flash without a position", **where)
        path = Point(obj.point)
        geometry = _polygon(obj.geometry) or arcs.circle(obj.point[0], obj.point[1], d)
        is_slot = False
    else:
        if obj.path is None:
            raise InputFileError(f"{obj.kind} without a centre line", **where)
        path = obj.path
        geometry = _polygon(obj.geometry)
        if geometry is None:
            geometry = path.buffer(d / 2.0, quad_segs=arcs.quad_segs_for(d / 2.0))
        is_slot = path.length > 0
    return DrillHole(geometry=geometry, diameter=d, path=path, is_slot=is_slot,
                     tool=obj.aperture, plated=plated, plating_basis=basis,
                     function=function, net=net, line=obj.line)


def _polygon(geom):
    """The object's image as one polygon (a one-part MultiPolygon is unwrapped)."""
    if geom is None or geom.is_empty:
        return None
    if isinstance(geom, MultiPolygon) and len(geom.geoms) == 1:
        return geom.geoms[0]
    if isinstance(geom, (Polygon, MultiPolygon)):
        return geom
    return None
