"""The board model: plain data that every reader produces and every check consumes.

Units: millimetres for every coordinate and length, volts, amperes, henries.
Coordinates are board coordinates exactly as in the fab files (y up).

Copper layer names are fixed: ``top``, ``in1`` .. ``inN``, ``bottom`` (stack order).
A one-layer board has only ``top`` (or only ``bottom``).
"""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from shapely.geometry import Polygon

#: Layer kinds a reader may report.
LAYER_KINDS = ("copper", "drill", "profile", "soldermask", "legend", "paste", "component",
               "drawing", "other")

#: .AperFunction values (first field) that mark a pad for a component lead or termination.
TERMINATION_FUNCTIONS = frozenset({
    "ComponentPad", "SMDPad", "BGAPad", "ConnectorPad", "CastellatedPad", "HeatsinkPad",
    "WasherPad",
})


@dataclass(frozen=True)
class SourceRef:
    """Where a thing came from: file name and 1-based line (or an element path)."""

    file: str
    line: int | None = None
    element: str | None = None

    def text(self) -> str:
        if self.line is not None:
            return f"{self.file}:{self.line}"
        if self.element:
            return f"{self.file} {self.element}"
        return self.file


@dataclass(frozen=True)
class Assumption:
    """Something a reader, the project loader or a check had to assume.

    ``topic`` is a short stable key (``"layer"``, ``"voltage"``, ``"units"``, ``"stackup"``,
    ``"plating"``, ``"pin-role"``, ...); ``text`` says what was assumed and why.
    """

    topic: str
    text: str


@dataclass
class Layer:
    """One fab layer.

    name:     ``top``/``in1``../``bottom`` for copper; otherwise a descriptive name
              (``drill-1-2-pth``, ``profile``, ``soldermask-top``...).
    kind:     one of :data:`LAYER_KINDS`.
    side:     ``"top"``, ``"bottom"``, ``"inner"`` or ``None``.
    source:   the file it was read from.
    function: the raw ``.FileFunction`` value (comma-joined) or the reason it was identified.
    negative: the file's image is negative (copper = outline minus image).
    """

    name: str
    kind: str
    side: str | None = None
    source: str | None = None
    function: str | None = None
    negative: bool = False
    index: int | None = None  # copper: 1 = top .. N = bottom


@dataclass
class CopperShape:
    """One piece of copper on one layer (a single polygon, possibly with holes).

    net:       net name from the file (``.N``), ``""`` when the file says "no net",
               ``None`` when the file says nothing.
    component: reference designator (``.C`` or the first field of ``.P``), if any.
    pin:       pin (pad) number or name from ``.P``, if any.
    function:  first field of ``.AperFunction`` (``"SMDPad"``, ``"Conductor"``, ...), if any.
    kind:      how it was made: ``"flash"``, ``"draw"``, ``"arc"``, ``"region"``, ``"plane"``.
    pin_name:  the pin's function name when the file gives one (third field of ``.P``).
    """

    geometry: Polygon
    layer: str
    net: str | None = None
    component: str | None = None
    pin: str | None = None
    function: str | None = None
    kind: str = "region"
    source: SourceRef | None = None
    pin_name: str | None = None

    @property
    def is_termination(self) -> bool:
        """True for a pad that takes a component lead or termination."""
        return self.pin is not None or (self.function in TERMINATION_FUNCTIONS)


@dataclass
class Hole:
    """A drilled hole or routed slot.

    geometry:   the hole's footprint in the board plane (circle or stadium/route buffer).
    diameter:   tool diameter (mm); a slot's width.
    plated:     True when plated through (joins copper layers in its span).
    span:       (first, last) copper layer names it passes through, e.g. ``("top", "bottom")``.
    is_slot:    True for G85 / routed / drawn slots.
    net:        net name carried by the file (Gerber drill ``.N``), if any.
    function:   ``ViaDrill``, ``ComponentDrill``, ``MechanicalDrill``..., if known.
    plating_basis: how plated/non-plated was decided (file function, comment, name...).
    """

    geometry: Polygon
    diameter: float
    plated: bool
    span: tuple[str, str]
    is_slot: bool = False
    net: str | None = None
    function: str | None = None
    plating_basis: str = ""
    source: SourceRef | None = None

    @property
    def centre(self) -> tuple[float, float]:
        c = self.geometry.centroid
        return (c.x, c.y)


@dataclass
class Pin:
    """A component pin: ``number`` is the pad id in the files, ``name`` its function if known."""

    number: str
    name: str | None = None
    net: str | None = None
    position: tuple[float, float] | None = None
    layer: str | None = None


@dataclass
class Component:
    """A placed part.  ``properties`` keeps characteristics (value, rating, package...)."""

    ref: str
    pins: dict[str, Pin] = field(default_factory=dict)
    package: str | None = None
    value: str | None = None
    side: str | None = None
    position: tuple[float, float] | None = None
    rotation: float = 0.0
    properties: dict[str, Any] = field(default_factory=dict)


@dataclass
class Stackup:
    """Board build-up, top to bottom.

    thickness_mm:  overall board thickness.
    copper_mm:     copper thickness per copper layer name.
    dielectric_mm: thickness of the dielectric *below* each copper layer but the last,
                   keyed by the copper layer above it.
    basis:         ``"default"``, ``"project"`` or ``"file"``.
    """

    thickness_mm: float = 1.6
    copper_mm: dict[str, float] = field(default_factory=dict)
    dielectric_mm: dict[str, float] = field(default_factory=dict)
    basis: str = "default"

    DEFAULT_THICKNESS_MM = 1.6
    DEFAULT_COPPER_MM = 0.035

    def copper(self, layer: str) -> float:
        return self.copper_mm.get(layer, self.DEFAULT_COPPER_MM)


@dataclass
class Board:
    """Everything the checks need to know about one board.

    copper_layers: copper layer names in stack order (``["top", "bottom"]``).
    shapes:        all copper pieces on all copper layers.
    holes:         drilled holes and slots.
    outline:       board profile polygon (cut-outs as interior rings), or ``None`` if unknown.
    components:    parts by reference designator.
    has_net_names: True when the files carry net names (X2 ``.N``, IPC-2581 nets, netlist).
    assumptions:   what the readers had to assume.
    netlist_problems: disagreements between an IPC-D-356 netlist and the copper, left by
                   :func:`layoutcheck.readers.netlist_apply.apply_netlist` for the
                   ``netlist-mismatch`` rule (empty when no netlist was read).
    source_kind:   ``"plan"`` for a stripboard / pad-per-hole plan, else ``None``.
    plan:          the plan's own description (:class:`layoutcheck.readers.plan.Plan`)
                   for plan boards, else ``None``.
    """

    name: str
    layers: list[Layer] = field(default_factory=list)
    copper_layers: list[str] = field(default_factory=list)
    shapes: list[CopperShape] = field(default_factory=list)
    holes: list[Hole] = field(default_factory=list)
    outline: Polygon | None = None
    components: dict[str, Component] = field(default_factory=dict)
    stackup: Stackup = field(default_factory=Stackup)
    has_net_names: bool = False
    assumptions: list[Assumption] = field(default_factory=list)
    source: str | None = None
    netlist_problems: list[Any] = field(default_factory=list)
    source_kind: str | None = None
    plan: Any = None

    @property
    def size_mm(self) -> tuple[float, float] | None:
        if self.outline is None:
            return None
        x0, y0, x1, y1 = self.outline.bounds
        return (x1 - x0, y1 - y0)

    def is_outer(self, layer: str) -> bool:
        return layer in ("top", "bottom")

    def shapes_on(self, layer: str) -> list[CopperShape]:
        return [s for s in self.shapes if s.layer == layer]


def copper_layer_names(count: int) -> list[str]:
    """Stack-order names for ``count`` copper layers: top, in1.., bottom."""
    if count <= 0:
        return []
    if count == 1:
        return ["top"]
    return ["top"] + [f"in{i}" for i in range(1, count - 1)] + ["bottom"]

