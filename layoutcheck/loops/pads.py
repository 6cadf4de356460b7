"""Pads of parts: which net each pad is on, where it is, on which copper layers.

Units: millimetres.  A pad is named ``REF.PIN`` (reference designator and pad number as
in the files, e.g. ``Q1.2``).
"""
from __future__ import annotations

import re
from dataclasses import dataclass

import shapely

from ..errors import UsageError
from ..model import Board

_ITEM = re.compile(r"^([^.\s]+)\.([^\s]+)$")


@dataclass(frozen=True)
class PadRef:
    """One pad: part reference and pad number (strings as in the files)."""

    ref: str
    pin: str

    def text(self) -> str:
        return f"{self.ref}.{self.pin}"


@dataclass(frozen=True)
class PadInfo:
    """Where a pad is.

    net:      its net (``None`` when the copper carries none).
    layers:   copper layers it has copper on, stack order (two or more: through-hole).
    position: (x, y) in mm.
    """

    ref: str
    pin: str
    net: str | None
    layers: tuple[str, ...]
    position: tuple[float, float]

    @property
    def start_layer(self) -> str | None:
        """The layer to start a copper path on: ``None`` (any) for a through-hole pad."""
        return self.layers[0] if len(self.layers) == 1 else None


class PadIndex:
    """Every component pad of a board with its net (from the net graph), layers and place.

    ``graph`` is the board's :class:`layoutcheck.netgraph.NetGraph`.
    """

    def __init__(self, board: Board, graph):
        self.board = board
        order = {name: k for k, name in enumerate(graph.layers)}
        islands: dict[tuple[str, str], list[int]] = {}
        for isl in graph.islands:
            for p in isl.pins:
                islands.setdefault(tuple(p), []).append(isl.id)
        shapes: dict[tuple[str, str], list] = {}
        for s in board.shapes:
            if s.component is not None and s.pin is not None:
                shapes.setdefault((s.component, s.pin), []).append(s.geometry)
        self._pads: dict[tuple[str, str], PadInfo] = {}
        keys = set(islands) | set(shapes)
        for ref, comp in board.components.items():
            keys |= {(ref, p) for p in comp.pins}
        for key in sorted(keys):
            ids = islands.get(key, [])
            nets = sorted({graph.island_net[i] for i in ids if graph.island_net[i]})
            pin = board.components.get(key[0])
            pin = pin.pins.get(key[1]) if pin is not None else None
            net = nets[0] if nets else (pin.net if pin is not None else None)
            layers = sorted({graph.islands[i].layer for i in ids},
                            key=lambda n: order.get(n, len(order)))
            if not layers and pin is not None and pin.layer:
                layers = [pin.layer]
            if pin is not None and pin.position is not None:
                pos = (float(pin.position[0]), float(pin.position[1]))
            elif key in shapes:
                c = shapely.centroid(shapely.union_all(shapes[key]))
                pos = (float(c.x), float(c.y))
            else:
                continue
            self._pads[key] = PadInfo(key[0], key[1], net, tuple(layers), pos)

    def get(self, ref: str, pin: str) -> PadInfo | None:
        """The pad ``ref.pin``, or ``None`` if the board has no such pad."""
        return self._pads.get((ref, pin))

    def pins_of(self, ref: str) -> list[str]:
        """Pad numbers of part ``ref`` (sorted numerically where they are numbers)."""
        return sorted((p for r, p in self._pads if r == ref), key=_pin_key)

    def nets_of(self, ref: str) -> dict[str, str | None]:
        """Pad number -> net for part ``ref``."""
        return {p: self._pads[(ref, p)].net for p in self.pins_of(ref)}

    def require(self, pad: PadRef) -> PadInfo:
        """The pad, or :class:`UsageError` naming what is missing."""
        info = self.get(pad.ref, pad.pin)
        if info is not None:
            return info
        if pad.ref not in self.board.components and not self.pins_of(pad.ref):
            raise UsageError(f"{pad.text()}: the board has no part {pad.ref!r}")
        have = ", ".join(self.pins_of(pad.ref)) or "none"
        raise UsageError(f"{pad.text()}: part {pad.ref} has no pad {pad.pin!r} (its pads: "
                         f"{have})")


def _pin_key(p: str):
    return (0, int(p), "") if p.isdigit() else (1, 0, p)


def parse_pad_list(text: str) -> list[PadRef]:
    """``"C3.1,Q1.2,Q1.3"`` -> pads.  :class:`UsageError` names an item not ``REF.PIN``."""
    items = [t.strip() for t in text.split(",")]
    out = []
    for item in items:
        m = _ITEM.match(item)
        if not m:
            raise UsageError(f"--through: {item!r} is not a pad reference; expected "
                             "REF.PIN such as Q1.2")
        out.append(PadRef(m.group(1), m.group(2)))
    if len(out) < 2:
        raise UsageError("--through: a loop needs at least two pads, e.g. "
                         "C3.1,Q1.2,Q1.3,Q2.2,Q2.3,C3.2")
    return out
