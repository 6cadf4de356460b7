"""Gerber X2 writer for sample boards and reader tests.

Two levels:

* :class:`GerberWriter` writes any sequence of Gerber commands (apertures C/R/O/P and macros,
  flashes, draws, arcs, regions, polarity, transforms, step-and-repeat, block apertures,
  attributes), so tests can build unusual files word by word.
* :func:`gerber_layer_text` / :func:`write_gerbers` turn a
  :class:`~layoutcheck.writers.design.Design` into one file per copper layer plus a profile.

Conventions of the design-level output (Gerber Layer Format Specification rev. 2024.05):

* header order: ``G04`` comment, ``TF.GenerationSoftware``, ``TF.FileFunction``,
  ``TF.FilePolarity``, then ``%FSLAX46Y46*%`` and ``%MOMM*%``; coordinates are millimetres
  times 10^6 as integers (1 nm resolution), always both X and Y.
* apertures are all defined before the first object, each preceded by its
  ``TA.AperFunction`` (``ComponentPad`` for plated through-hole pads, ``SMDPad,CuDef`` for
  surface pads, ``ViaPad``, ``Conductor`` for track pens), then ``%TD*%``.
* drawing order per copper layer: zones, tracks, pads, vias.  A zone is one dark G36/G37
  region (``TA.AperFunction,Conductor`` + ``TO.N``); **its holes are written right after it
  as clear-polarity regions** (``%LPC*%`` ... ``%LPD*%``) without attributes.  A clear
  region erases everything already drawn beneath it, so a zone that sits inside another
  zone's hole must come later in ``Design.zones``; tracks, pads and vias are drawn after all
  zones and are never erased.
* every object carries ``TO.N`` (when its net is not ``None``); pads also ``TO.P`` (with the
  pin name as third field when the part names it) and ``TO.C``; ``%TD*%`` clears the object
  attributes after each object (a run of one track's draws shares one set).
* rectangles and obrounds at 0/90/180/270 degrees use ``R``/``O`` apertures (sizes swapped
  at 90/270); other angles, and every rounded rectangle, use aperture macros built from
  primitives 21 (centre line) and 1 (circle) with a rotation parameter.
* ``x2=False`` writes the same graphics with no ``TF``/``TA``/``TO``/``TD`` at all.

Units: millimetres throughout (the low-level writer takes coordinates in the file's unit).
"""
from __future__ import annotations

from pathlib import Path
from typing import Iterable, Sequence

from .design import DECIMALS, Design, Pad, Track, Zone

GENERATION_SOFTWARE = ("layoutcheck", "sample-writer", "0.1")

#: Roundrect macro: $1 width, $2 height, $3 corner radius, $4 rotation (degrees CCW).
ROUNDRECT_MACRO = (
    "0 rounded rectangle - $1 width $2 height $3 corner radius $4 rotation",
    "21,1,$1,$2-2x$3,0,0,$4",
    "21,1,$1-2x$3,$2,0,0,$4",
    "1,1,2x$3,$1/2-$3,$2/2-$3,$4",
    "1,1,2x$3,$3-$1/2,$2/2-$3,$4",
    "1,1,2x$3,$3-$1/2,$3-$2/2,$4",
    "1,1,2x$3,$1/2-$3,$3-$2/2,$4",
)
#: Rotated rectangle macro: $1 width, $2 height, $3 rotation.
ROTRECT_MACRO = (
    "0 rotated rectangle - $1 width $2 height $3 rotation",
    "21,1,$1,$2,0,0,$3",
)
#: Rotated obround macro ($1 >= $2): $1 length, $2 width, $3 rotation.
ROTOBROUND_MACRO = (
    "0 rotated obround - $1 length $2 width $3 rotation",
    "21,1,$1-$2,$2,0,0,$3",
    "1,1,$2,$1/2-$2/2,0,$3",
    "1,1,$2,$2/2-$1/2,0,$3",
)

_ESCAPED = {"%", "*", ",", "\\"}


def escape_field(value: str) -> str:
    """Escape one attribute field: ``%``, ``*``, ``,`` and ``\\`` become ``\\uXXXX``.

    Gerber Layer Format Specification rev. 2024.05: strings may not hold ``*`` or ``%``,
    fields may not hold ``,``; ``\\uXXXX`` escapes a character by its code point.
    """
    out = []
    for ch in str(value):
        if ch in _ESCAPED or ord(ch) < 32:
            out.append(f"\\u{ord(ch):04X}")
        else:
            out.append(ch)
    return "".join(out)


def _clean_comment(text: str) -> str:
    return str(text).replace("*", " ").replace("%", " ").replace("\n", " ").replace("\r", " ")


def decimal_text(value: float, decimals: int = DECIMALS) -> str:
    """A decimal parameter (aperture sizes, angles) with a fixed number of decimals."""
    v = round(float(value), decimals) + 0.0
    return f"{v:.{decimals}f}"


class GerberWriter:
    """Builds one Gerber file command by command.

    Parameters
    ----------
    x2:
        When false every attribute call (``file_attribute``, ``aperture_attribute``,
        ``object_attribute``, ``delete_attribute`` and ``attributes=`` arguments) writes
        nothing, giving a plain RS-274X file.
    integer_digits, decimal_digits:
        The coordinate format (``FSLA X<i><d> Y<i><d>``); default 4.6.
    units:
        ``"mm"`` (``%MOMM*%``) or ``"inch"`` (``%MOIN*%``).  Coordinates and sizes given to
        the methods are in this unit.
    comment:
        Text of a ``G04`` comment written first, or ``None``.

    Every method that makes an object returns ``self`` so calls can be chained, except the
    aperture methods, which return the new D code number.
    """

    def __init__(self, *, x2: bool = True, integer_digits: int = 4, decimal_digits: int = 6,
                 units: str = "mm", comment: str | None = None):
        if units not in ("mm", "inch"):
            raise ValueError(f"units must be 'mm' or 'inch', got {units!r}")
        if not (1 <= integer_digits <= 6 and 1 <= decimal_digits <= 6):
            raise ValueError("integer and decimal digits must be 1..6")
        self.x2 = x2
        self.integer_digits = integer_digits
        self.decimal_digits = decimal_digits
        self.units = units
        self._comment = comment
        self._file_attrs: list[str] = []
        self._body: list[str] = []
        self._next_d = 10
        self._current_d: int | None = None
        self._mode: str | None = None
        self._g75 = False
        self._point: tuple[float, float] | None = None
        self._in_region = False
        self._macros: set[str] = set()
        self._dict: dict[str, tuple[str, ...]] = {}

    # ------------------------------------------------------------ formatting
    def coord(self, value: float) -> str:
        """Coordinate number: ``value * 10**d`` rounded to an integer (leading zeros omitted).

        Raises ``ValueError`` when the integer needs more than ``i + d`` digits.
        """
        n = int(round(float(value) * 10 ** self.decimal_digits))
        if abs(n) >= 10 ** (self.integer_digits + self.decimal_digits):
            raise ValueError(f"coordinate {value} does not fit the format "
                             f"{self.integer_digits}.{self.decimal_digits}")
        return str(n)

    def _xy(self, x: float, y: float) -> str:
        return f"X{self.coord(x)}Y{self.coord(y)}"

    def _dec(self, v: float) -> str:
        return decimal_text(v, self.decimal_digits)

    # ------------------------------------------------------------ raw output
    def comment(self, text: str) -> "GerberWriter":
        """A ``G04`` comment (``*`` and ``%`` in ``text`` become spaces)."""
        self._body.append(f"G04 {_clean_comment(text)}*")
        return self

    def raw(self, line: str) -> "GerberWriter":
        """Append ``line`` verbatim to the body (for deliberately odd test files)."""
        self._body.append(line)
        return self

    # ------------------------------------------------------------ attributes
    @staticmethod
    def _attr(cmd: str, name: str, values: Sequence[str]) -> str:
        return f"%{cmd}{name}" + "".join("," + escape_field(v) for v in values) + "*%"

    def file_attribute(self, name: str, *values: str) -> "GerberWriter":
        """A ``TF`` file attribute; always placed in the header, before FS and MO."""
        if self.x2:
            self._file_attrs.append(self._attr("TF", name, values))
        return self

    def aperture_attribute(self, name: str, *values: str) -> "GerberWriter":
        """A ``TA`` aperture attribute (applies to apertures defined and regions made next)."""
        if self.x2:
            self._body.append(self._attr("TA", name, values))
            self._dict[name] = tuple(values)
        return self

    def object_attribute(self, name: str, *values: str) -> "GerberWriter":
        """A ``TO`` object attribute (``.N``, ``.P``, ``.C`` ...) for the objects made next."""
        if self.x2:
            self._body.append(self._attr("TO", name, values))
            self._dict[name] = tuple(values)
        return self

    def delete_attribute(self, name: str | None = None) -> "GerberWriter":
        """``%TD*%`` (all aperture and object attributes) or ``%TD<name>*%``."""
        if self.x2:
            self._body.append(f"%TD{name or ''}*%")
            if name:
                self._dict.pop(name, None)
            else:
                self._dict.clear()
        return self

    def _attributes(self, attributes: dict[str, Sequence[str]] | None, cmd: str):
        """Set attributes given as ``attributes=``; a value already in force is not
        repeated (the attribute dictionary keeps it until ``TD``)."""
        for name, values in (attributes or {}).items():
            if isinstance(values, str):
                values = (values,)
            if self._dict.get(name) == tuple(values):
                continue
            if cmd == "TA":
                self.aperture_attribute(name, *values)
            else:
                self.object_attribute(name, *values)

    # ------------------------------------------------------------ apertures
    def _define(self, template: str, params: Sequence[float | str],
                attributes: dict | None) -> int:
        self._attributes(attributes, "TA")
        code = self._next_d
        self._next_d += 1
        text = "X".join(p if isinstance(p, str) else self._dec(p) for p in params)
        self._body.append(f"%ADD{code}{template}" + (f",{text}" if params else "") + "*%")
        return code

    def circle(self, diameter: float, hole: float | None = None, *,
               attributes: dict | None = None) -> int:
        """Define a ``C`` (circle) aperture; returns its D code."""
        params = [diameter] + ([hole] if hole else [])
        return self._define("C", params, attributes)

    def rect(self, width: float, height: float, hole: float | None = None, *,
             attributes: dict | None = None) -> int:
        """Define an ``R`` (centred rectangle) aperture; returns its D code."""
        params = [width, height] + ([hole] if hole else [])
        return self._define("R", params, attributes)

    def obround(self, width: float, height: float, hole: float | None = None, *,
                attributes: dict | None = None) -> int:
        """Define an ``O`` (obround) aperture; returns its D code."""
        params = [width, height] + ([hole] if hole else [])
        return self._define("O", params, attributes)

    def polygon(self, diameter: float, vertices: int, rotation: float | None = None,
                hole: float | None = None, *, attributes: dict | None = None) -> int:
        """Define a ``P`` (regular polygon) aperture; returns its D code."""
        params: list = [diameter, str(int(vertices))]
        if rotation is not None or hole:
            params.append(rotation or 0.0)
        if hole:
            params.append(hole)
        return self._define("P", params, attributes)

    def define_macro(self, name: str, words: Iterable[str]) -> str:
        """Write an ``AM`` aperture macro (each word without its ``*``, one per line);
        returns ``name``."""
        body = "\n".join(f"{w}*" for w in words)
        self._body.append(f"%AM{name}*\n{body}%")
        self._macros.add(name)
        return name

    def has_macro(self, name: str) -> bool:
        """True once :meth:`define_macro` wrote ``name``."""
        return name in self._macros

    def macro(self, name: str, *params: float, attributes: dict | None = None) -> int:
        """Define an aperture from macro ``name`` with ``params``; returns its D code."""
        return self._define(name, list(params), attributes)

    # ------------------------------------------------------------ state
    def select(self, code: int) -> "GerberWriter":
        """Make ``D<code>`` the current aperture (written only when it changes)."""
        if code != self._current_d:
            self._body.append(f"D{code}*")
            self._current_d = code
        return self

    def _plot_mode(self, mode: str):
        if mode != self._mode:
            self._body.append(f"{mode}*")
            self._mode = mode

    def polarity(self, dark: bool | str = True) -> "GerberWriter":
        """``%LPD*%`` (dark, True or ``"dark"``) or ``%LPC*%`` (clear)."""
        is_dark = dark if isinstance(dark, bool) else dark == "dark"
        self._body.append("%LPD*%" if is_dark else "%LPC*%")
        return self

    def transform(self, *, mirror: str | None = None, rotation: float | None = None,
                  scale: float | None = None) -> "GerberWriter":
        """``LM`` (``"N"``, ``"X"``, ``"Y"``, ``"XY"``), ``LR`` (degrees CCW), ``LS``."""
        if mirror is not None:
            self._body.append(f"%LM{mirror}*%")
        if rotation is not None:
            self._body.append(f"%LR{self._dec(rotation)}*%")
        if scale is not None:
            self._body.append(f"%LS{self._dec(scale)}*%")
        return self

    def step_repeat(self, nx: int, ny: int, dx: float, dy: float) -> "GerberWriter":
        """Open an ``SR`` block: ``nx`` x ``ny`` copies at steps ``dx``, ``dy`` (file unit)."""
        self._body.append(f"%SRX{int(nx)}Y{int(ny)}I{self._dec(dx)}J{self._dec(dy)}*%")
        self._point = None
        return self

    def end_step_repeat(self) -> "GerberWriter":
        """Close the open ``SR`` block."""
        self._body.append("%SR*%")
        self._point = None
        return self

    def block_begin(self) -> int:
        """Open an ``AB`` block aperture; returns its D code (close with :meth:`block_end`)."""
        code = self._next_d
        self._next_d += 1
        self._body.append(f"%ABD{code}*%")
        return code

    def block_end(self) -> "GerberWriter":
        """Close the open ``AB`` block aperture."""
        self._body.append("%AB*%")
        self._point = None
        self._current_d = None
        return self

    # ------------------------------------------------------------ operations
    def flash(self, x: float, y: float, aperture: int | None = None, *,
              attributes: dict | None = None) -> "GerberWriter":
        """``D03``: flash the current (or given) aperture at (x, y)."""
        if aperture is not None:
            self.select(aperture)
        self._attributes(attributes, "TO")
        self._body.append(f"{self._xy(x, y)}D03*")
        self._point = (x, y)
        return self

    def move(self, x: float, y: float) -> "GerberWriter":
        """``D02``: move the current point (inside a region: start a new contour)."""
        self._body.append(f"{self._xy(x, y)}D02*")
        self._point = (x, y)
        return self

    def draw(self, x: float, y: float) -> "GerberWriter":
        """``G01`` + ``D01``: a straight draw (or contour segment) to (x, y)."""
        self._plot_mode("G01")
        self._body.append(f"{self._xy(x, y)}D01*")
        self._point = (x, y)
        return self

    def arc(self, x: float, y: float, cx: float, cy: float, clockwise: bool = False
            ) -> "GerberWriter":
        """``G02``/``G03`` + ``D01``: a circular arc from the current point to (x, y) about
        the centre (cx, cy), in multi-quadrant mode (``G75`` is written before the first).
        """
        if self._point is None:
            raise ValueError("an arc needs a current point: move() first")
        if not self._g75:
            self._body.append("G75*")
            self._g75 = True
        self._plot_mode("G02" if clockwise else "G03")
        i = cx - self._point[0]
        j = cy - self._point[1]
        self._body.append(f"{self._xy(x, y)}I{self.coord(i)}J{self.coord(j)}D01*")
        self._point = (x, y)
        return self

    def polyline(self, points: Sequence[tuple[float, float]]) -> "GerberWriter":
        """Move to the first point and draw through the rest."""
        self.move(*points[0])
        for p in points[1:]:
            self.draw(*p)
        return self

    def region_begin(self) -> "GerberWriter":
        """``G36``: start a region statement."""
        self._body.append("G36*")
        self._in_region = True
        return self

    def region_end(self) -> "GerberWriter":
        """``G37``: end the region statement."""
        self._body.append("G37*")
        self._in_region = False
        return self

    def region(self, contours: Sequence[Sequence[tuple[float, float]]], *,
               attributes: dict | None = None) -> "GerberWriter":
        """One G36/G37 region made of straight-edged ``contours`` (each closed if needed).

        ``attributes`` are written as ``TO`` object attributes before the region.
        """
        self._attributes(attributes, "TO")
        self._plot_mode("G01")
        self.region_begin()
        for contour in contours:
            pts = list(contour)
            if pts[0] != pts[-1]:
                pts.append(pts[0])
            self.move(*pts[0])
            for p in pts[1:]:
                self.draw(*p)
        return self.region_end()

    # ------------------------------------------------------------ result
    def text(self, *, end: bool = True) -> str:
        """The whole file: comment, TF attributes, FS, MO, body, ``M02*`` (if ``end``)."""
        fmt = f"{self.integer_digits}{self.decimal_digits}"
        lines = []
        if self._comment:
            lines.append(f"G04 {_clean_comment(self._comment)}*")
        lines += self._file_attrs
        lines.append(f"%FSLAX{fmt}Y{fmt}*%")
        lines.append("%MOMM*%" if self.units == "mm" else "%MOIN*%")
        lines += self._body
        if end:
            lines.append("M02*")
        return "\n".join(lines) + "\n"


# ====================================================================== design level
def _layer_function(design: Design, layer: str) -> tuple[str, ...]:
    names = design.layer_names
    if layer not in names:
        raise ValueError(f"layer {layer!r} is not a copper layer of this design "
                         f"({', '.join(names)}) nor 'profile'")
    n = names.index(layer) + 1
    if layer == "top":
        side = "Top"
    elif layer == "bottom":
        side = "Bot"
    else:
        side = "Inr"
    return ("Copper", f"L{n}", side)


def _pad_function(pad: Pad) -> tuple[str, ...]:
    if pad.function:
        return tuple(pad.function.split(","))
    return ("ComponentPad",) if pad.through_hole else ("SMDPad", "CuDef")


class _Apertures:
    """Deduplicating aperture table for one layer (keyed by shape and function)."""

    def __init__(self, w: GerberWriter):
        self.w = w
        self.codes: dict[tuple, int] = {}

    def get(self, key: tuple) -> int:
        return self.codes[key]

    def need(self, key: tuple) -> None:
        if key in self.codes:
            return
        kind, function = key[0], key[-1]
        attrs = {".AperFunction": function}
        w = self.w
        if kind == "C":
            code = w.circle(key[1], attributes=attrs)
        elif kind == "R":
            code = w.rect(key[1], key[2], attributes=attrs)
        elif kind == "O":
            code = w.obround(key[1], key[2], attributes=attrs)
        elif kind == "RoundRect":
            if not w.has_macro("RoundRect"):
                w.define_macro("RoundRect", ROUNDRECT_MACRO)
            code = w.macro("RoundRect", key[1], key[2], key[3], key[4], attributes=attrs)
        elif kind == "RotRect":
            if not w.has_macro("RotRect"):
                w.define_macro("RotRect", ROTRECT_MACRO)
            code = w.macro("RotRect", key[1], key[2], key[3], attributes=attrs)
        elif kind == "RotObround":
            if not w.has_macro("RotObround"):
                w.define_macro("RotObround", ROTOBROUND_MACRO)
            code = w.macro("RotObround", key[1], key[2], key[3], attributes=attrs)
        else:  # pragma: no cover - keys are made below
            raise ValueError(kind)
        self.codes[key] = code


def _r(v: float) -> float:
    return round(float(v), DECIMALS) + 0.0


def pad_aperture_key(pad: Pad, function: tuple[str, ...] | None = None) -> tuple:
    """The aperture a pad is flashed with: ``(kind, sizes..., function)``.

    Rotations of 0/180 keep ``R``/``O``; 90/270 swap the sizes; other angles use the
    rotated-rectangle / rotated-obround macros; roundrects always use the macro.
    """
    fn = function or _pad_function(pad)
    w, h = _r(pad.w), _r(pad.height)
    rot = _r(pad.rotation % 360.0)
    if pad.shape == "circle":
        return ("C", w, fn)
    quarter = rot % 90.0 == 0.0
    if quarter and (rot // 90) % 2 == 1:
        w, h, rot = h, w, 0.0
    elif quarter:
        rot = 0.0
    if pad.shape == "roundrect":
        return ("RoundRect", w, h, _r(pad.radius), rot, fn)
    if pad.shape == "rect":
        return ("R", w, h, fn) if rot == 0.0 else ("RotRect", w, h, rot, fn)
    # oval
    if rot == 0.0:
        return ("O", w, h, fn)
    if h > w:
        w, h, rot = h, w, _r((rot + 90.0) % 360.0)
    return ("RotObround", w, h, rot, fn)


def _track_key(track: Track) -> tuple:
    return ("C", _r(track.width), ("Conductor",))


def _via_key(pad: float) -> tuple:
    return ("C", _r(pad), ("ViaPad",))


def _net_attrs(net: str | None) -> dict:
    return {} if net is None else {".N": (net,)}


def gerber_layer_text(design: Design, layer: str, x2: bool = True) -> str:
    """Gerber text of one layer of ``design``: a copper layer name or ``"profile"``.

    Units: millimetres (format 4.6).  See the module docstring for the layout of the file.
    """
    if layer == "profile":
        return _profile_text(design, x2)
    function = _layer_function(design, layer)
    w = GerberWriter(x2=x2, comment="layoutcheck sample writer")
    w.file_attribute(".GenerationSoftware", *GENERATION_SOFTWARE)
    w.file_attribute(".FileFunction", *function)
    w.file_attribute(".FilePolarity", "Positive")

    pads = [p for p in design.pads if layer in design.pad_layers(p)]
    tracks = [t for t in design.tracks if t.layer == layer]
    zones = [z for z in design.zones if z.layer == layer]
    vias = list(design.vias)

    parts = design.parts_by_ref()
    ap = _Apertures(w)
    for t in tracks:
        ap.need(_track_key(t))
    for p in pads:
        ap.need(pad_aperture_key(p))
    for v in vias:
        ap.need(_via_key(v.pad))
    if ap.codes:
        w.delete_attribute()
    w.polarity(True)

    for z in zones:
        _write_zone(w, z)
    for t in tracks:
        if t.net is not None:
            w.object_attribute(".N", t.net)
        w.select(ap.get(_track_key(t)))
        pts = [(_r(x), _r(y)) for x, y in t.points]
        w.move(*pts[0])
        if len(pts) == 1:
            w.draw(*pts[0])
        for q in pts[1:]:
            w.draw(*q)
        if t.net is not None:
            w.delete_attribute()
    for p in pads:
        attrs: dict = {}
        if p.ref:
            part = parts.get(p.ref)
            name = part.pin_name(p.pin) if part is not None else ""
            attrs[".P"] = (p.ref, p.pin, name) if name else (p.ref, p.pin)
        attrs.update(_net_attrs(p.net))
        if p.ref:
            attrs[".C"] = (p.ref,)
        w.flash(_r(p.x), _r(p.y), ap.get(pad_aperture_key(p)), attributes=attrs)
        if attrs:
            w.delete_attribute()
    for v in vias:
        attrs = _net_attrs(v.net)
        w.flash(_r(v.x), _r(v.y), ap.get(_via_key(v.pad)), attributes=attrs)
        if attrs:
            w.delete_attribute()
    return w.text()


def _write_zone(w: GerberWriter, z: Zone) -> None:
    w.aperture_attribute(".AperFunction", "Conductor")
    if z.net is not None:
        w.object_attribute(".N", z.net)
    w.region([[(_r(x), _r(y)) for x, y in z.polygon]])
    w.delete_attribute()
    if z.holes:
        w.polarity(False)
        for hole in z.holes:
            w.region([[(_r(x), _r(y)) for x, y in hole]])
        w.polarity(True)


def _profile_text(design: Design, x2: bool) -> str:
    w = GerberWriter(x2=x2, comment="layoutcheck sample writer")
    w.file_attribute(".GenerationSoftware", *GENERATION_SOFTWARE)
    w.file_attribute(".FileFunction", "Profile", "NP")
    w.file_attribute(".FilePolarity", "Positive")
    code = w.circle(0.1, attributes={".AperFunction": ("Profile",)})
    w.delete_attribute()
    w.polarity(True)
    w.select(code)
    pts = [(_r(x), _r(y)) for x, y in design.outline]
    w.polyline(pts + [pts[0]])
    return w.text()


def gerber_file_names(design: Design) -> dict[str, str]:
    """Layer -> file name: ``<name>-copper-<layer>.gbr`` and ``<name>-profile.gbr``."""
    names = {layer: f"{design.name}-copper-{layer}.gbr" for layer in design.layer_names}
    names["profile"] = f"{design.name}-profile.gbr"
    return names


def write_gerbers(design: Design, out_dir, *, x2: bool = True) -> list[Path]:
    """Write every copper layer and the profile of ``design`` into ``out_dir``.

    Returns the paths written, copper layers in stack order then the profile.  ``x2=False``
    writes plain Gerber (no attributes) with the same graphics and names.
    """
    design.validate()
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    paths = []
    for layer, fname in gerber_file_names(design).items():
        p = out / fname
        p.write_text(gerber_layer_text(design, layer, x2=x2), encoding="utf-8", newline="\n")
        paths.append(p)
    return paths


def coordinate_text(value_mm: float) -> str:
    """The 4.6 coordinate number for ``value_mm`` millimetres (``12.5`` -> ``"12500000"``)."""
    return GerberWriter().coord(value_mm)


__all__ = ["GerberWriter", "gerber_layer_text", "write_gerbers", "gerber_file_names",
           "escape_field", "coordinate_text", "pad_aperture_key", "ROUNDRECT_MACRO",
           "ROTRECT_MACRO", "ROTOBROUND_MACRO", "GENERATION_SOFTWARE"]
