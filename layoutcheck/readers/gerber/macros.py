"""Aperture macros (AM): parsing, arithmetic expressions and primitives -> shapely geometry.

Gerber Layer Format Specification rev. 2024.05, "Aperture macro (AM)".  A macro is a list of
statements: primitives, comments (code 0) and variable definitions ``$k=expr``.  At AD time
``$1..$n`` take the AD parameters, the statements run in order, exposure on (1) adds to what
the macro has built so far and exposure off (0) subtracts from it.  Every primitive rotates
about the MACRO ORIGIN (0, 0), not about its own centre.

Sizes in the macro are in the file unit; :func:`instantiate` returns millimetres.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np
import shapely
from shapely import affinity
from shapely.geometry import MultiPolygon, Polygon
from shapely.geometry.base import BaseGeometry

from ...errors import InputFileError, ResourceLimitError, UnsupportedFeatureError
from ...geometry import arcs
from ...limits import Limits
from .tokens import Word

_NAME = re.compile(r"^[._$a-zA-Z][._$a-zA-Z0-9]{0,126}$")
_TOKEN = re.compile(r"\s*(?:(\d+(?:\.\d*)?|\.\d+)|\$(\d+)|([-+xX/()]))")
_VARDEF = re.compile(r"^\$(\d+)=(.*)$", re.S)

#: primitive code -> (name, allowed parameter counts; None = checked when evaluated)
PRIMITIVES: dict[int, tuple[str, tuple[int, ...] | None]] = {
    1: ("circle", (4, 5)),
    2: ("vector line (deprecated code 2)", (7,)),
    20: ("vector line", (7,)),
    21: ("centre line", (6,)),
    22: ("lower-left line (deprecated)", (6,)),
    4: ("outline", None),
    5: ("polygon", (6,)),
    6: ("moire (deprecated)", (9,)),
    7: ("thermal", (6,)),
}


class ExpressionError(ValueError):
    """A macro arithmetic expression that cannot be read or evaluated."""


#: Most rings of a moire primitive drawn.  The deprecated moire is a registration target
#: of a few rings; GEOS overlay and validity checks on thousands of nested rings take time
#: that grows faster than their vertex count.
MAX_MOIRE_RINGS = 100

#: Deepest nesting of parentheses and unary signs read in one expression.  Real macros
#: nest a few levels; the bound keeps the recursive-descent parser far from Python's
#: recursion limit on hostile input.
MAX_EXPRESSION_NESTING = 100


def _var_number(digits: str) -> int:
    """``$n`` variable number; at most 10 significant digits (Gerber integers are 32-bit,
    spec rev. 2024.05, "Data types")."""
    sig = digits.lstrip("0")
    if len(sig) > 10:
        raise ExpressionError(f"variable ${digits[:12]}... has {len(sig)} digits; expected a "
                              "variable number below 2^31")
    return int(sig or "0")


# ----------------------------------------------------------------------------- expressions
def parse_expression(text: str):
    """Parse a macro expression into a small tree.

    Grammar (spec rev. 2024.05, "Arithmetic expressions"): ``+ -`` bind looser than ``x /``, both
    left-associative; unary ``+``/``-``; parentheses; constants; ``$n`` variables.  An
    upper-case ``X`` is accepted as multiply (a habit of some writers).
    """
    tokens = []
    pos = 0
    text = text.strip()
    while pos < len(text):
        m = _TOKEN.match(text, pos)
        if not m or m.end() == pos:
            raise ExpressionError(f"unexpected {text[pos:pos + 10]!r} in expression {text!r}")
        if m.group(1) is not None:
            tokens.append(("num", float(m.group(1))))
        elif m.group(2) is not None:
            tokens.append(("var", _var_number(m.group(2))))
        else:
            op = m.group(3)
            tokens.append(("op", "x" if op == "X" else op))
        pos = m.end()
        while pos < len(text) and text[pos].isspace():
            pos += 1
    if not tokens:
        raise ExpressionError("empty expression")
    parser = _Parser(tokens, text)
    tree = parser.expr()
    if parser.i != len(tokens):
        raise ExpressionError(f"unexpected {tokens[parser.i][1]!r} in expression {text!r}")
    return tree


class _Parser:
    def __init__(self, tokens, text):
        self.t = tokens
        self.i = 0
        self.text = text
        self.depth = 0

    def peek(self):
        return self.t[self.i] if self.i < len(self.t) else (None, None)

    def expr(self):
        node = self.term()
        while self.peek() in (("op", "+"), ("op", "-")):
            op = self.t[self.i][1]
            self.i += 1
            node = ("bin", op, node, self.term())
        return node

    def term(self):
        node = self.factor()
        while self.peek() in (("op", "x"), ("op", "/")):
            op = self.t[self.i][1]
            self.i += 1
            node = ("bin", op, node, self.factor())
        return node

    def factor(self):
        kind, val = self.peek()
        if kind is None:
            raise ExpressionError(f"expression {self.text!r} ends too early")
        self.i += 1
        if kind in ("num", "var"):
            return (kind, val)
        if val not in ("+", "-", "("):
            raise ExpressionError(f"unexpected {val!r} in expression {self.text[:40]!r}")
        self.depth += 1
        if self.depth > MAX_EXPRESSION_NESTING:
            raise ExpressionError(f"expression {self.text[:40]!r}... is nested more than "
                                  f"{MAX_EXPRESSION_NESTING} deep (parentheses and signs); "
                                  "expected a shallower expression")
        if val == "(":
            node = self.expr()
            if self.peek() != ("op", ")"):
                raise ExpressionError(f"missing ')' in expression {self.text[:40]!r}")
            self.i += 1
        else:
            inner = self.factor()
            node = ("neg", inner) if val == "-" else inner
        self.depth -= 1
        return node


def evaluate(tree, variables: dict[int, float]) -> float:
    """Value of an expression tree; an undefined variable reads as 0 (spec rev. 2024.05).

    Evaluated with an explicit stack, so a long left-associative chain such as
    ``1+1+1+...`` (a tree as deep as it is long) needs no recursion.  Raises
    :class:`ExpressionError` for a division by zero or a value that is not finite
    (an overflow such as ``1e200x1e200``).
    """
    values: list[float] = []
    stack = [(tree, False)]
    while stack:
        node, ready = stack.pop()
        kind = node[0]
        if kind == "num":
            values.append(node[1])
        elif kind == "var":
            values.append(variables.get(node[1], 0.0))
        elif kind == "neg":
            if ready:
                values.append(-values.pop())
            else:
                stack.append((node, True))
                stack.append((node[1], False))
        elif not ready:
            stack.append((node, True))
            stack.append((node[3], False))
            stack.append((node[2], False))
        else:
            y = values.pop()
            x = values.pop()
            op = node[1]
            if op == "+":
                values.append(x + y)
            elif op == "-":
                values.append(x - y)
            elif op == "x":
                values.append(x * y)
            else:
                if y == 0:
                    raise ExpressionError("division by zero")
                values.append(x / y)
    result = values.pop()
    if not math.isfinite(result):
        raise ExpressionError(f"the value is {result}; expected a finite number (an "
                              "overflow?)")
    return result


# ----------------------------------------------------------------------------- definitions
@dataclass(frozen=True)
class Statement:
    """``kind`` is ``"primitive"`` (code, params) or ``"define"`` (var, params[0])."""

    kind: str
    line: int
    code: int = 0
    var: int = 0
    params: tuple = ()
    text: str = ""


@dataclass(frozen=True)
class Macro:
    name: str
    line: int
    statements: tuple[Statement, ...]


def parse_am(words: tuple[Word, ...], file: str, limits: Limits) -> Macro:
    """Parse the words of one ``%AM...%`` block into a :class:`Macro`."""
    head = words[0]
    mname = head.text[2:].strip()
    if not _NAME.match(mname):
        raise InputFileError(f"saw the macro name {mname!r}; expected a name such as 'THERM1'",
                             file=file, line=head.line)
    stmts: list[Statement] = []
    for w in words[1:]:
        text = w.text.strip()
        if not text:
            continue
        if re.match(r"^0(?![0-9.])", text):
            stmts.append(Statement("comment", w.line, text=text[1:].strip()))
            continue
        compact = re.sub(r"\s+", "", text)
        m = _VARDEF.match(compact)
        if m:
            try:
                tree = parse_expression(m.group(2))
            except ExpressionError as exc:
                raise InputFileError(f"bad expression in macro {mname!r} variable "
                                     f"${m.group(1)}: {exc}", file=file, line=w.line) from exc
            try:
                var = _var_number(m.group(1))
            except ExpressionError as exc:
                raise InputFileError(f"macro {mname!r}: {exc}", file=file, line=w.line) from exc
            stmts.append(Statement("define", w.line, var=var, params=(tree,), text=compact))
            continue
        parts = compact.split(",")
        try:
            code = int(parts[0])
        except ValueError:
            code = -1
        if code not in PRIMITIVES:
            raise InputFileError(f"saw {parts[0]!r} as a primitive code in macro {mname!r}; "
                                 "expected 0, 1, 2, 4, 5, 6, 7, 20, 21 or 22",
                                 file=file, line=w.line)
        pname, counts = PRIMITIVES[code]
        nparams = len(parts) - 1
        if code == 4 and nparams > 2 * limits.max_outline_vertices + 5:
            raise ResourceLimitError(
                f"macro {mname!r}: the outline primitive has {nparams} parameters, more than "
                f"{limits.max_outline_vertices} vertices (limit max_outline_vertices)",
                file=file, line=w.line)
        if counts is not None and nparams not in counts:
            raise InputFileError(
                f"macro {mname!r}: the {pname} primitive has {nparams} parameters; expected "
                f"{' or '.join(map(str, counts))}", file=file, line=w.line)
        trees = []
        for p in parts[1:]:
            try:
                trees.append(parse_expression(p))
            except ExpressionError as exc:
                raise InputFileError(f"bad expression in macro {mname!r}, {pname} primitive: "
                                     f"{exc}", file=file, line=w.line) from exc
        stmts.append(Statement("primitive", w.line, code=code, params=tuple(trees),
                               text=compact))
        if len(stmts) > limits.max_macro_primitives:
            raise ResourceLimitError(f"macro {mname!r} has more than "
                                     f"{limits.max_macro_primitives} statements (limit "
                                     "max_macro_primitives)", file=file, line=w.line)
    return Macro(mname, head.line, tuple(stmts))


# ----------------------------------------------------------------------------- geometry
def _rotate_pts(pts: np.ndarray, deg: float) -> np.ndarray:
    if deg == 0:
        return pts
    a = math.radians(deg)
    c, s = math.cos(a), math.sin(a)
    return pts @ np.array([[c, s], [-s, c]])


def _rot_point(x: float, y: float, deg: float) -> tuple[float, float]:
    if deg == 0:
        return x, y
    a = math.radians(deg)
    c, s = math.cos(a), math.sin(a)
    return x * c - y * s, x * s + y * c


def _poly(pts: np.ndarray, deg: float) -> Polygon:
    return Polygon(_rotate_pts(np.asarray(pts, dtype=float), deg))


def _rect(x0: float, y0: float, x1: float, y1: float) -> np.ndarray:
    return np.array([[x0, y0], [x1, y0], [x1, y1], [x0, y1]], dtype=float)


def _valid(g: BaseGeometry) -> BaseGeometry:
    if g.is_valid:
        return g
    try:
        g = shapely.make_valid(g, method="structure")
    except (TypeError, ValueError):  # older GEOS
        g = g.buffer(0)
    parts = [p for p in shapely.get_parts(g) if p.geom_type in ("Polygon", "MultiPolygon")]
    return shapely.union_all(parts) if parts else Polygon()


class _Ctx:
    def __init__(self, macro: Macro, st: Statement, file: str, ad_line: int, charge=None):
        self.macro, self.st, self.file, self.ad_line = macro, st, file, ad_line
        self.charge = charge if charge is not None else _no_charge

    def fail(self, what: str, cls=InputFileError):
        raise cls(f"macro {self.macro.name!r} (used by the AD at line {self.ad_line}): {what}",
                  file=self.file, line=self.st.line)

    def exposure(self, v: float) -> bool:
        if v == 1:
            return True
        if v == 0:
            return False
        self.fail(f"exposure is {v:g}; expected 0 (off) or 1 (on)")

    def size(self, v: float, what: str) -> float:
        if v < 0:
            self.fail(f"{what} is {v:g}; expected a value >= 0")
        return v


def _no_charge(n: int) -> None:
    """Default vertex accounting: none."""


def _moire_rings(ctx: _Ctx, cx: float, cy: float, outer: float, thick: float, step: float,
                 rings: int) -> list[BaseGeometry]:
    """The rings of a moire (mm) as annuli built directly, without overlay operations.

    Every circle uses the segment count of the outer one, so the flattened circles are
    scaled copies of each other and never cross: rings that do not touch form a valid
    MultiPolygon, and rings that touch (gap 0) are merged into one annulus.  (A union of
    thousands of touching rings costs GEOS time that grows with the square of the count.)
    """
    annuli: list[list[float]] = []
    d = outer
    for _ in range(rings):
        if d <= 0:
            break
        inner = d - 2 * thick
        if annuli and d >= annuli[-1][1]:   # reaches the hole of the ring before it
            annuli[-1][1] = min(annuli[-1][1], inner)
        elif inner < d:
            annuli.append([d, inner])
        d -= step
    if not annuli:
        return []
    n = max(arcs.segments_for(outer / 2, 2 * math.pi), arcs.MIN_CIRCLE_SEGMENTS)
    ang = np.linspace(0.0, 2 * math.pi, n, endpoint=False)
    unit = np.column_stack([np.cos(ang), np.sin(ang)]) / math.cos(math.pi / n)

    def ring(diameter: float) -> np.ndarray:
        return unit * (diameter / 2) + (cx, cy)

    polys = np.empty(len(annuli), dtype=object)
    for k, (o, i) in enumerate(annuli):
        ctx.charge(2 * (n + 1))
        polys[k] = Polygon(ring(o), [ring(i)] if i > 0 else None)
    # the annuli are disjoint by construction; only a ring thinner than the double
    # resolution can be invalid (checked one by one: a MultiPolygon-wide check of nested
    # rings is far slower)
    bad = ~shapely.is_valid(polys)
    if bad.any():
        return [_valid(shapely.union_all(polys))]
    return [MultiPolygon(list(polys)) if len(polys) > 1 else polys[0]]


def _primitive(ctx: _Ctx, code: int, p: list[float], f: float,
               limits: Limits) -> tuple[bool, BaseGeometry]:
    """Build one primitive in mm.  ``f`` converts file units to mm."""
    if code == 1:
        on = ctx.exposure(p[0])
        d = ctx.size(p[1], "circle diameter") * f
        rot = p[4] if len(p) > 4 else 0.0
        cx, cy = _rot_point(p[2] * f, p[3] * f, rot)
        return on, arcs.circle(cx, cy, d) if d > 0 else Polygon()
    if code in (2, 20):
        on = ctx.exposure(p[0])
        w = ctx.size(p[1], "line width") * f
        x1, y1, x2, y2 = (v * f for v in p[2:6])
        length = math.hypot(x2 - x1, y2 - y1)
        if w == 0 or length == 0:
            return on, Polygon()
        nx, ny = -(y2 - y1) / length * w / 2, (x2 - x1) / length * w / 2
        pts = [[x1 + nx, y1 + ny], [x2 + nx, y2 + ny], [x2 - nx, y2 - ny], [x1 - nx, y1 - ny]]
        return on, _poly(pts, p[6])
    if code in (21, 22):
        on = ctx.exposure(p[0])
        w = ctx.size(p[1], "width") * f
        h = ctx.size(p[2], "height") * f
        x, y = p[3] * f, p[4] * f
        if w == 0 or h == 0:
            return on, Polygon()
        if code == 21:
            pts = _rect(x - w / 2, y - h / 2, x + w / 2, y + h / 2)
        else:
            pts = _rect(x, y, x + w, y + h)
        return on, _poly(pts, p[5])
    if code == 4:
        on = ctx.exposure(p[0])
        n = p[1]
        if n != int(n) or n < 3:
            ctx.fail(f"outline has {n:g} vertices; expected a whole number >= 3")
        n = int(n)
        if n > limits.max_outline_vertices:
            ctx.fail(f"outline has {n} vertices; at most {limits.max_outline_vertices} allowed "
                     "(limit max_outline_vertices)", ResourceLimitError)
        if len(p) != 2 * n + 5:
            ctx.fail(f"outline with {n} vertices has {len(p)} parameters; expected {2 * n + 5} "
                     "(exposure, n, n+1 points, rotation)")
        pts = np.array(p[2:2 * n + 4], dtype=float).reshape(-1, 2) * f
        if not np.allclose(pts[0], pts[-1], rtol=0, atol=1e-9):
            ctx.fail(f"outline ends at ({pts[-1][0]:g}, {pts[-1][1]:g}) mm; expected its last "
                     f"point to equal its first ({pts[0][0]:g}, {pts[0][1]:g}) mm")
        keep = np.ones(len(pts), dtype=bool)
        keep[1:] = np.any(np.diff(pts, axis=0) != 0, axis=1)
        pts = pts[keep]
        if len(pts) < 4:
            return on, Polygon()
        return on, _valid(_poly(pts, p[-1]))
    if code == 5:
        on = ctx.exposure(p[0])
        n = p[1]
        if n != int(n) or not 3 <= n <= 12:
            ctx.fail(f"polygon has {n:g} vertices; expected a whole number from 3 to 12")
        d = ctx.size(p[4], "polygon diameter") * f
        if d == 0:
            return on, Polygon()
        ang = np.arange(int(n)) * (2 * math.pi / int(n))
        pts = np.column_stack([p[2] * f + d / 2 * np.cos(ang), p[3] * f + d / 2 * np.sin(ang)])
        return on, _poly(pts, p[5])
    if code == 6:
        cx, cy = p[0] * f, p[1] * f
        outer = ctx.size(p[2], "moire outer diameter") * f
        thick = ctx.size(p[3], "ring thickness") * f
        gap = ctx.size(p[4], "ring gap") * f
        nrings = p[5]
        if nrings != int(nrings) or nrings < 0:
            ctx.fail(f"moire has {nrings:g} rings; expected a whole number >= 0")
        ch_t = ctx.size(p[6], "cross-hair thickness") * f
        ch_l = ctx.size(p[7], "cross-hair length") * f
        # rings shrink by 2 (thickness + gap); once the diameter reaches 0 no more are
        # drawn, and with thickness + gap = 0 every ring is the first one again
        step = 2 * (thick + gap)
        rings = int(min(nrings, outer / step + 1.0 if step > 0 else 1.0))
        if rings > MAX_MOIRE_RINGS:
            ctx.fail(f"a moire drawing {rings} rings is not supported; this reader draws at "
                     f"most {MAX_MOIRE_RINGS} (a moire is a registration target of a few "
                     "rings)", UnsupportedFeatureError)
        parts = _moire_rings(ctx, cx, cy, outer, thick, step, rings)
        g = parts[0] if parts else Polygon()
        if ch_t > 0 and ch_l > 0:
            cross = shapely.union_all([
                Polygon(_rect(cx - ch_l / 2, cy - ch_t / 2, cx + ch_l / 2, cy + ch_t / 2)),
                Polygon(_rect(cx - ch_t / 2, cy - ch_l / 2, cx + ch_t / 2, cy + ch_l / 2))])
            g = g.union(cross) if not g.is_empty else cross
        return True, affinity.rotate(g, p[8], origin=(0, 0)) if p[8] else g
    if code == 7:
        cx, cy = p[0] * f, p[1] * f
        outer = ctx.size(p[2], "thermal outer diameter") * f
        inner = ctx.size(p[3], "thermal inner diameter") * f
        gap = ctx.size(p[4], "thermal gap") * f
        if inner >= outer:
            ctx.fail(f"thermal inner diameter {p[3]:g} is not below the outer {p[2]:g}")
        g = arcs.circle(cx, cy, outer)
        if inner > 0:
            g = g.difference(arcs.circle(cx, cy, inner))
        if gap > 0:
            r = outer  # bars longer than the disc
            bars = shapely.union_all([
                Polygon(_rect(cx - r, cy - gap / 2, cx + r, cy + gap / 2)),
                Polygon(_rect(cx - gap / 2, cy - r, cx + gap / 2, cy + r))])
            g = g.difference(bars)
        return True, affinity.rotate(g, p[5], origin=(0, 0)) if p[5] else g
    raise AssertionError(code)  # pragma: no cover - codes checked at parse time


#: primitive code -> the parameters that are lengths (sizes or coordinates, file units)
_LENGTHS: dict[int, slice] = {
    1: slice(1, 4), 2: slice(1, 6), 20: slice(1, 6), 21: slice(1, 5), 22: slice(1, 5),
    4: slice(2, -1), 5: slice(2, 5), 6: slice(0, 5), 7: slice(0, 5),
}


def _check_lengths(ctx: _Ctx, code: int, p: list[float], f: float, limits: Limits) -> None:
    """Refuse a primitive whose size or position (mm) is beyond ``max_aperture_mm`` before
    any geometry is built: no aperture is that large, and flattening a circle of an
    astronomical diameter has no meaning."""
    lengths = p[_LENGTHS[code]]
    if code == 6:
        lengths = lengths + p[6:8]
    if not lengths:
        return
    big = max(abs(v) for v in lengths) * f
    if big > limits.max_aperture_mm:
        ctx.fail(f"the {PRIMITIVES[code][0]} primitive has a size or position of {big:g} mm; "
                 f"expected at most {limits.max_aperture_mm:g} mm (limit max_aperture_mm)",
                 ResourceLimitError)


def instantiate(macro: Macro, params: list[float], unit_factor: float, file: str,
                ad_line: int, limits: Limits, charge=None) -> BaseGeometry:
    """Evaluate ``macro`` with AD ``params`` (file units) into a shape in millimetres.

    The result is the union of exposure-on primitives minus exposure-off ones, in statement
    order; its origin is the macro origin.  ``charge(n)``, if given, is called with the
    vertex count of every primitive built (the caller's per-file vertex budget; it raises
    to stop), so a file cannot make the reader build macros without bound.  One aperture
    may build at most ``limits.max_region_vertices`` vertices (the limit on one filled
    region, applied to one aperture): :class:`ResourceLimitError` past it.
    """
    variables = {i + 1: v for i, v in enumerate(params)}
    built = 0
    st: Statement | None = None

    def charge_one(n: int) -> None:
        # one aperture is one filled shape: no more vertices than one region may have
        nonlocal built
        built += n
        if built > limits.max_region_vertices:
            raise ResourceLimitError(
                f"macro {macro.name!r} (used by the AD at line {ad_line}) builds more than "
                f"{limits.max_region_vertices} vertices for one aperture (limit "
                "max_region_vertices, applied to one aperture)", file=file,
                line=st.line if st is not None else ad_line)
        if charge is not None:
            charge(n)

    result: BaseGeometry = Polygon()
    run: list[BaseGeometry] = []
    run_on = True

    def flush():
        nonlocal result, run
        if not run:
            return
        g = shapely.union_all(run) if len(run) > 1 else run[0]
        if result.is_empty:  # nothing to add to or cut from: no overlay needed
            result = g if run_on else result
        else:
            result = result.union(g) if run_on else result.difference(g)
        run = []

    for st in macro.statements:
        ctx = _Ctx(macro, st, file, ad_line, charge_one)
        if st.kind == "comment":
            continue
        try:
            values = [evaluate(t, variables) for t in st.params]
        except ExpressionError as exc:
            ctx.fail(f"cannot evaluate {st.text!r}: {exc}")
        if st.kind == "define":
            variables[st.var] = values[0]
            continue
        _check_lengths(ctx, st.code, values, unit_factor, limits)
        on, g = _primitive(ctx, st.code, values, unit_factor, limits)
        if st.code != 6:  # a moire charges its rings as it builds them
            ctx.charge(int(shapely.get_num_coordinates(g)))
        if on != run_on:
            flush()
            run_on = on
        if not g.is_empty:
            run.append(g)
    flush()
    return _valid(result)
