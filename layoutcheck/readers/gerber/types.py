"""Data a Gerber file is read into.  Units: millimetres (converted from inches on read).

A :class:`GerberFile` keeps every graphic object in file order with its polarity and
attributes, so the caller can decide what the image means (copper, drill, profile).
"""
from __future__ import annotations

from dataclasses import dataclass, field

from shapely.geometry import LineString
from shapely.geometry.base import BaseGeometry

from ...model import Assumption

#: attribute name (with its leading dot for standard names) -> its fields
Attributes = dict[str, tuple[str, ...]]


@dataclass
class GraphicObject:
    """One graphic object as the file made it.

    geometry:   its image in mm: Polygon or MultiPolygon (aperture holes and transforms
                applied), possibly empty (zero-size apertures).
    polarity:   ``"dark"`` or ``"clear"`` (after LP and block-aperture inversion).
    kind:       ``"flash"``, ``"draw"``, ``"arc"`` or ``"region"``.
    attributes: the aperture attributes (``.AperFunction`` ...) and object attributes
                (``.N``, ``.P``, ``.C`` ...) in force when it was made.
    line:       1-based line of the operation (for a region: of its G37; for SR/AB copies:
                of the original operation).
    aperture:   ``"D10"`` etc., ``None`` for regions.
    point:      flash position (mm), else ``None``.
    path:       centre line of a draw/arc (flattened), else ``None``.
    aperture_diameter: diameter (mm) of a plain circle aperture used by a flash or draw.
    """

    geometry: BaseGeometry
    polarity: str
    kind: str
    attributes: Attributes = field(default_factory=dict)
    line: int = 0
    aperture: str | None = None
    point: tuple[float, float] | None = None
    path: LineString | None = None
    aperture_diameter: float | None = None


@dataclass
class GerberFile:
    """A parsed Gerber file.

    file_attributes: ``TF`` attributes (``.FileFunction`` -> fields, ...).
    image_negative:  the image means "no material where dark": ``.FilePolarity,Negative``
                     or legacy ``%IPNEG*%``.
    units:           the file's own unit (``"mm"`` or ``"inch"``); geometry is in mm anyway.
    notes:           what the reader tolerated or assumed (legacy codes, missing G75...).
    """

    name: str
    file_attributes: Attributes = field(default_factory=dict)
    objects: list[GraphicObject] = field(default_factory=list)
    image_negative: bool = False
    units: str = "mm"
    notes: list[Assumption] = field(default_factory=list)

    @property
    def file_function(self) -> tuple[str, ...] | None:
        return self.file_attributes.get(".FileFunction")
