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
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from ...errors import InputFileError, ResourceLimitError
from ...geometry import arcs
from ...limits import Limits
from .tokens import Word

_NAME = re.compile(r"^[._$a-zA-Z][._$a-zA-Z0-9]{0,126}$")
_TOKEN = re.compile(r"\s*(?:(\d+\.?\d*|\.\d+)|\$(\d+)|([-+xX/()]))")
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
            tokens.append(("var", int(m.group(2))))
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
        if val in ("+", "-"):
            inner = self.factor()
            return ("neg", inner) if val == "-" else inner
        if val == "(":
            node = self.expr()
            if self.peek() != ("op", ")"):
                raise ExpressionError(f"missing ')' in expression {self.text!r}")
            self.i += 1
            return node
        raise ExpressionError(f"unexpected {val!r} in expression {self.text!r}")


def evaluate(tree, variables: dict[int, float]) -> float:
    """Value of an expression tree; an undefined variable reads as 0 (spec rev. 2024.05)."""
    kind = tree[0]
    if kind == "num":
        return tree[1]
    if kind == "var":
        return variables.get(tree[1], 0.0)
    if kind == "neg":
        return -evaluate(tree[1], variables)
    _, op, a, b = tree
    x = evaluate(a, variables)
    y = evaluate(b, variables)
    if op == "+":
        return x + y
    if op == "-":
        return x - y
    if op == "x":
        return x * y
    if y == 0:
        raise ExpressionError("division by zero")
    return x / y


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
            stmts.append(Statement("define", w.line, var=int(m.group(1)), params=(tree,),
                                   text=compact))
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
    def __init__(self, macro: Macro, st: Statement, file: str, ad_line: int):
        self.macro, self.st, self.file, self.ad_line = macro, st, file, ad_line

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
        parts = []
        d = outer
        for _ in range(int(nrings)):
            if d <= 0:
                break
            ring = arcs.circle(cx, cy, d)
            inner = d - 2 * thick
            if inner > 0:
                ring = ring.difference(arcs.circle(cx, cy, inner))
            parts.append(ring)
            d -= 2 * (thick + gap)
        if ch_t > 0 and ch_l > 0:
            parts.append(Polygon(_rect(cx - ch_l / 2, cy - ch_t / 2, cx + ch_l / 2, cy + ch_t / 2)))
            parts.append(Polygon(_rect(cx - ch_t / 2, cy - ch_l / 2, cx + ch_t / 2, cy + ch_l / 2)))
        g = shapely.union_all(parts) if parts else Polygon()
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


def instantiate(macro: Macro, params: list[float], unit_factor: float, file: str,
                ad_line: int, limits: Limits) -> BaseGeometry:
    """Evaluate ``macro`` with AD ``params`` (file units) into a shape in millimetres.

    The result is the union of exposure-on primitives minus exposure-off ones, in statement
    order; its origin is the macro origin.
    """
    variables = {i + 1: v for i, v in enumerate(params)}
    result: BaseGeometry = Polygon()
    run: list[BaseGeometry] = []
    run_on = True

    def flush():
        nonlocal result, run
        if not run:
            return
        g = shapely.union_all(run) if len(run) > 1 else run[0]
        result = result.union(g) if run_on else result.difference(g)
        run = []

    for st in macro.statements:
        ctx = _Ctx(macro, st, file, ad_line)
        if st.kind == "comment":
            continue
        try:
            values = [evaluate(t, variables) for t in st.params]
        except ExpressionError as exc:
            ctx.fail(f"cannot evaluate {st.text!r}: {exc}")
        if st.kind == "define":
            variables[st.var] = values[0]
            continue
        on, g = _primitive(ctx, st.code, values, unit_factor, limits)
        if on != run_on:
            flush()
            run_on = on
        if not g.is_empty:
            run.append(g)
    flush()
    return _valid(result)
