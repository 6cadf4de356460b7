"""Data a drill file (NC drill, or a Gerber drill layer) is read into.  Units: mm."""
from __future__ import annotations

from dataclasses import dataclass, field

from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from ..model import Assumption


@dataclass
class DrillHole:
    """One hit or slot.

    geometry:  footprint in the board plane (circle, or the tool path buffered by d/2).
    diameter:  tool diameter (mm).
    path:      the hit point (Point) or the slot's centre line (LineString).
    plated:    True / False when the file says so for this hole's tool, ``None`` if not.
    plating_basis: what said so (``"TA.AperFunction Plated,PTH,ViaDrill comment"``...).
    function:  ``ViaDrill``, ``ComponentDrill``, ``MechanicalDrill``..., if stated.
    """

    geometry: Polygon
    diameter: float
    path: BaseGeometry
    is_slot: bool = False
    tool: str | None = None
    plated: bool | None = None
    plating_basis: str = ""
    function: str | None = None
    net: str | None = None
    line: int = 0


@dataclass
class DrillFile:
    """A parsed drill file.

    span:    (first, last) copper layer numbers (1 = top) from the file function, if stated.
    plated:  whole-file plating if stated (file function, ``PTH``/``NPTH`` file name), else None.
    """

    name: str
    holes: list[DrillHole] = field(default_factory=list)
    span: tuple[int, int] | None = None
    plated: bool | None = None
    plating_basis: str = ""
    units: str = "mm"
    notes: list[Assumption] = field(default_factory=list)
