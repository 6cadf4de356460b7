"""Apertures: the AD command, the standard templates C/R/O/P, macro and block apertures.

Gerber Layer Format Specification rev. 2024.05, sections "Aperture definition (AD)" and
"Standard aperture templates"; chapter 8 for the deprecated rectangular hole.  Holes are transparent: the
aperture's image is the shape minus its hole.  Shapes are built once in millimetres with the
aperture origin at (0, 0); transformed copies (LM/LR/LS) are cached per aperture.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass, field

import numpy as np
import shapely
from shapely.geometry import Polygon, box
from shapely.geometry.base import BaseGeometry

from ...errors import InputFileError, ResourceLimitError
from ...geometry import arcs
from ...limits import Limits
from .coords import whole_number
from .macros import Macro, instantiate
from .types import GraphicObject

# Number patterns are written without overlapping repeats (no "0*\d+", no "\d+\.?\d*"),
# so a failing match on a long digit string costs linear, not quadratic, time.
_AD = re.compile(r"^(?i:ADD)(\d+)([._$a-zA-Z][._$a-zA-Z0-9]*)(?:,(.*))?$", re.S)
_NUM = re.compile(r"^[+-]?(?:\d+(?:\.\d*)?|\.\d+)$")

#: Templates and their allowed parameter counts (last two of C/R/O and P include the
#: deprecated rectangular hole).
_COUNTS = {"C": (1, 2, 3), "R": (2, 3, 4), "O": (2, 3, 4), "P": (2, 3, 4, 5)}


@dataclass
class Aperture:
    """One entry of the aperture dictionary.

    shape:            image at the aperture origin in mm (``None`` for a block aperture).
    circle_diameter:  diameter (mm) when the aperture is a plain circle without hole.
    convex:           a hole-free convex standard shape (R, O, P) that a deprecated straight
                      draw may sweep (convex hull of the shape at both ends).
    block:            the objects of a block aperture (AB), in block coordinates.
    """

    number: int
    template: str
    shape: BaseGeometry | None
    attributes: dict[str, tuple[str, ...]]
    line: int
    circle_diameter: float | None = None
    convex: bool = False
    block: list[GraphicObject] | None = None
    size: float = 0.0
    _cache: dict = field(default_factory=dict, repr=False)

    @property
    def code(self) -> str:
        return f"D{self.number}"

    def transformed(self, mirror: str, rotation: float, scale: float) -> BaseGeometry:
        """The shape after LM (mirror), LR (degrees, counter-clockwise) and LS (factor)."""
        key = (mirror, rotation, scale)
        g = self._cache.get(key)
        if g is None:
            g = apply_matrix(self.shape, transform_matrix(mirror, rotation, scale))
            self._cache[key] = g
        return g


def transform_matrix(mirror: str, rotation: float, scale: float) -> np.ndarray:
    """2x2 matrix of the aperture transform: mirror first, then rotate, then scale
    (spec rev. 2024.05, "Aperture transformations")."""
    mx = -1.0 if "X" in mirror else 1.0
    my = -1.0 if "Y" in mirror else 1.0
    a = math.radians(rotation)
    c, s = math.cos(a), math.sin(a)
    if rotation % 90 == 0:
        c, s = round(c), round(s)
    return scale * np.array([[c * mx, -s * my], [s * mx, c * my]])


def is_identity(m: np.ndarray) -> bool:
    return bool(m[0, 0] == 1 and m[1, 1] == 1 and m[0, 1] == 0 and m[1, 0] == 0)


def apply_matrix(g, m: np.ndarray, offset=(0.0, 0.0)):
    """Apply ``p -> m @ p + offset`` to a geometry or an array of geometries."""
    if is_identity(m) and offset == (0.0, 0.0):
        return g
    mt = m.T
    off = np.asarray(offset, dtype=float)
    return shapely.transform(g, lambda c: c @ mt + off)


def _params(text: str | None, file: str, line: int) -> list[float]:
    if text is None or text.strip() == "":
        return []
    out = []
    for p in text.split("X"):
        p = p.strip()
        if not _NUM.match(p):
            raise InputFileError(f"saw the aperture parameter {p!r}; expected a decimal number",
                                 file=file, line=line)
        out.append(float(p))
    return out


def _hole(shape: BaseGeometry, rest: list[float], f: float) -> tuple[BaseGeometry, bool]:
    """Subtract a round (one value) or deprecated rectangular (two values) hole."""
    if not rest:
        return shape, False
    if len(rest) == 1:
        if rest[0] <= 0:
            return shape, False
        return shape.difference(arcs.circle(0.0, 0.0, rest[0] * f)), True
    hx, hy = rest[0] * f, rest[1] * f
    if hx <= 0 or hy <= 0:
        return shape, False
    return shape.difference(box(-hx / 2, -hy / 2, hx / 2, hy / 2)), True


def standard_shape(template: str, p: list[float], f: float) -> tuple[BaseGeometry, bool]:
    """Shape (mm) of a standard aperture and whether it has a hole.  ``f``: file unit -> mm."""
    if template == "C":
        d = p[0] * f
        shape = arcs.circle(0.0, 0.0, d) if d > 0 else Polygon()
        return _hole(shape, p[1:], f)
    if template in ("R", "O"):
        w, h = p[0] * f, p[1] * f
        if w <= 0 or h <= 0:
            return Polygon(), False
        if template == "R" or w == h:
            shape = box(-w / 2, -h / 2, w / 2, h / 2) if template == "R" else \
                arcs.circle(0.0, 0.0, w)
        else:
            short = min(w, h)
            half = (max(w, h) - short) / 2
            if w > h:
                core = box(-half, -h / 2, half, h / 2)
                ends = [arcs.circle(-half, 0.0, short), arcs.circle(half, 0.0, short)]
            else:
                core = box(-w / 2, -half, w / 2, half)
                ends = [arcs.circle(0.0, -half, short), arcs.circle(0.0, half, short)]
            shape = shapely.union_all([core] + ends)
        return _hole(shape, p[2:], f)
    # P: outer diameter X vertices [X rotation [X hole]]
    d = p[0] * f
    n = int(p[1])
    rot = p[2] if len(p) > 2 else 0.0
    if d <= 0:
        return Polygon(), False
    ang = np.radians(rot) + np.arange(n) * (2 * math.pi / n)
    shape = Polygon(np.column_stack([d / 2 * np.cos(ang), d / 2 * np.sin(ang)]))
    return _hole(shape, p[3:], f)


def parse_ad(word: str, macros: dict[str, Macro], unit_factor: float, attributes: dict,
             file: str, line: int, limits: Limits, charge=None) -> Aperture:
    """Parse an ``ADD<n><template>[,<params>]`` word into an :class:`Aperture` (mm).

    ``charge(n)``, if given, is told the vertices built for a macro aperture (see
    :func:`.macros.instantiate`)."""
    m = _AD.match(word.replace(" ", ""))
    if not m:
        raise InputFileError(f"saw the aperture definition {word[:60]!r}; expected e.g. "
                             "'ADD10C,0.5'", file=file, line=line)
    number = whole_number(m.group(1), "the aperture number", file, line)
    template = m.group(2)
    if number < 10:
        raise InputFileError(f"saw aperture number D{number}; expected 10 or more (D00-D09 "
                             "are reserved)", file=file, line=line)
    params = _params(m.group(3), file, line)
    attrs = dict(attributes)
    if template in _COUNTS:
        if len(params) not in _COUNTS[template]:
            raise InputFileError(
                f"aperture D{number} ({template}) has {len(params)} parameters; expected "
                f"{' or '.join(map(str, _COUNTS[template]))}", file=file, line=line)
        for i, v in enumerate(params):
            if v < 0 and not (template == "P" and i == 2):
                raise InputFileError(f"aperture D{number} ({template}) has the negative size "
                                     f"{v:g}; expected sizes >= 0", file=file, line=line)
        if template == "P":
            n = params[1]
            if not 3 <= n <= limits.max_polygon_vertices or n != int(n):
                raise InputFileError(f"polygon aperture D{number} has {n:g} vertices; expected "
                                     f"a whole number from 3 to {limits.max_polygon_vertices}",
                                     file=file, line=line)
        size = max([params[0]] + ([params[1]] if template in "RO" else [])) * unit_factor
        _check_size(size, number, file, line, limits)
        # holes (and anything else) beyond the limit, e.g. a value too large for a double
        sizes = [v for i, v in enumerate(params) if not (template == "P" and i in (1, 2))]
        _check_size(max(sizes) * unit_factor, number, file, line, limits)
        if template == "P" and len(params) > 2 and not math.isfinite(params[2]):
            raise InputFileError(f"polygon aperture D{number} has the rotation {params[2]}; "
                                 "expected a finite number of degrees", file=file, line=line)
        shape, has_hole = standard_shape(template, params, unit_factor)
        plain_circle = template == "C" and not has_hole
        return Aperture(number, template, shape, attrs, line,
                        circle_diameter=params[0] * unit_factor if plain_circle else None,
                        convex=template in ("R", "O", "P") and not has_hole, size=size)
    macro = macros.get(template)
    if macro is None:
        raise InputFileError(f"aperture D{number} uses the template {template!r}; expected C, "
                             "R, O, P or a macro defined earlier with AM", file=file, line=line)
    shape = instantiate(macro, params, unit_factor, file, line, limits, charge)
    size = 0.0
    if not shape.is_empty:
        x0, y0, x1, y1 = shape.bounds
        size = max(abs(x0), abs(y0), abs(x1), abs(y1)) * 2
        _check_size(max(x1 - x0, y1 - y0), number, file, line, limits)
    return Aperture(number, template, shape, attrs, line, size=size)


def check_scaled_size(ap: Aperture, scale: float, file: str, line: int, limits: Limits) -> None:
    """Raise :class:`ResourceLimitError` when LS makes ``ap`` larger than the limit."""
    if scale > 1 and ap.size * scale > limits.max_aperture_mm:
        raise ResourceLimitError(f"aperture {ap.code} scaled by LS {scale:g} is "
                                 f"{ap.size * scale:g} mm across; expected at most "
                                 f"{limits.max_aperture_mm:g} mm (limit max_aperture_mm)",
                                 file=file, line=line)


def _check_size(size_mm: float, number: int, file: str, line: int, limits: Limits) -> None:
    if not size_mm <= limits.max_aperture_mm:  # also catches NaN
        raise ResourceLimitError(f"aperture D{number} is {size_mm:g} mm across; expected at "
                                 f"most {limits.max_aperture_mm:g} mm (limit max_aperture_mm)",
                                 file=file, line=line)
