"""The NC drill statement reader: parser state and one handler per kind of line.

Units: every coordinate and size is converted to millimetres as it is read (see
:mod:`layoutcheck.readers.drill_format`).  The public entry points are in
:mod:`layoutcheck.readers.drill`; this module does the work for ``parse_drill``.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np

from ..errors import InputFileError, ResourceLimitError, UnsupportedFeatureError
from ..geometry import arcs
from ..limits import Limits
from ..model import Assumption
from .drill_format import (INCH, METRIC, NumberFormat, parse_file_format_comment,
                           parse_format_comment, parse_units_line)
from .drill_geometry import (MIN_TOOL_DIAMETER_MM, ArcError, HoleShape, build_geometry,
                             centre_from_offsets, centre_from_radius)
from .drill_plating import (FileFunction, PlatingClue, aper_function_clue, file_function,
                            hole_plating, parse_attribute_comment, plating_from_name,
                            type_comment)
from .gerber.build import stroke_vertices, vertex_budget
from .holes import DrillFile, DrillHole

_WORD = re.compile(r"([A-Z])([^A-Z]*)")
# number patterns without overlapping repeats ("\d+\.?\d*" is quadratic when it fails)
_NUMERIC = re.compile(r"^[+-]?(\d+(?:\.\d*)?|\.\d+)$")
_INT = re.compile(r"^\d+$")
_HIT_LINE = re.compile(r"^(?:X([+-]?(?:\d+(?:\.\d*)?|\.\d+)))?(?:Y([+-]?(?:\d+(?:\.\d*)?|\.\d+)))?$")
_KEYWORD = re.compile(r"^(?:[A-Z]{2,}|[A-Z],)")
_MESSAGE = re.compile(r"^\s*M4[57](?!\d)", re.IGNORECASE)
_TOOL_FIELDS = "CFSBHZ"
_LINE_BREAK = re.compile(r"\r\n|\r|\n")
#: Most significant digits of a whole-number word (T, G, M, R, P).  Real files use at most
#: 4; the bound keeps Python's int conversion (4300 digits) out of reach.
MAX_WORD_DIGITS = 9
#: Largest rout arc radius (mm).  No board arc comes near it; far beyond it (about
#: 4e12 mm) the chord count formula of :mod:`layoutcheck.geometry.arcs` breaks down.
MAX_ARC_RADIUS_MM = 1e9
_PATTERN_CODES = {25: "pattern start", 1: "pattern end", 2: "pattern repeat",
                  8: "end of step and repeat", 70: "axis swap", 80: "X mirror",
                  90: "Y mirror"}


def _lines(text: str):
    """The lines of ``text`` one at a time (lazily: a limit reached early stops the read)."""
    pos = 0
    for m in _LINE_BREAK.finditer(text):
        yield text[pos:m.start()]
        pos = m.end()
    if pos < len(text):
        yield text[pos:]


@dataclass
class _Tool:
    number: int
    diameter: float
    line: int
    clue: PlatingClue | None = None       # per-tool TA.AperFunction comment
    type_clue: PlatingClue | None = None  # ;TYPE= comment in force at its definition


class DrillReader:
    """Parser state and the statement handlers (one instance per file)."""

    def __init__(self, name: str, limits: Limits):
        self.name = name
        self.limits = limits
        self.notes: list[Assumption] = []
        self.fmt = NumberFormat(name=name, notes=self.notes)
        self.line = 0
        self.tools: dict[int, _Tool] = {}
        self.tool_number: int | None = None
        self.tool_line = 0
        self.unload_line: int | None = None
        self.x = self.y = 0.0                  # current point, mm
        self.ox = self.oy = 0.0                # G93 origin, mm
        self.incremental = False
        self.incremental_stated = False
        self.rout = False
        self.motion = 0                        # 0 rapid, 1 linear, 2 cw, 3 ccw
        self.plunged = False
        self.path: list[np.ndarray] = []
        self.path_tool: _Tool | None = None
        self.path_line = 0
        self.last_hit = False
        self.motion_on_line = False
        self.header = "none"                   # none | open | closed
        self.header_line = 0
        self.body_started = False
        self.pending_ta: PlatingClue | None = None
        self.type_clue: PlatingClue | None = None
        self.types_seen: dict[bool, str] = {}
        self.function: FileFunction | None = None
        self.ended_line: int | None = None
        self.after_end: list[int] = []
        self.ignored: list[str] = []
        self.noted: set[str] = set()
        self.shapes: list[HoleShape] = []
        self.hole_tools: list[_Tool] = []
        self.hole_lines: list[int] = []
        self.file_units: str | None = None
        self.vertices = 0                      # polygon vertices of the holes so far
        self.max_vertices = vertex_budget(limits)
        self._circle_vertices: dict[float, int] = {}

    # -- helpers ----------------------------------------------------------------------
    def err(self, message: str, cls=InputFileError):
        return cls(message, file=self.name, line=self.line)

    def note(self, key: str, text: str) -> None:
        if key not in self.noted:
            self.noted.add(key)
            self.notes.append(Assumption(topic="drill", text=text))

    # -- driver -----------------------------------------------------------------------
    def run(self, text: str) -> DrillFile:
        if text.startswith("\ufeff"):
            text = text[1:]
        # lines end in CR LF, CR or LF; str.splitlines would also split on form feeds and
        # Unicode separators and so shift every line number after them
        for lineno, raw in enumerate(_lines(text), 1):
            self.line = lineno
            code, sep, comment = raw.partition(";")
            code = code.strip()
            if self.ended_line is not None:
                if code and code != "%":
                    self.after_end.append(lineno)
                continue
            if sep:
                self._comment(comment.strip())
            if not code or _MESSAGE.match(code):
                continue
            self._statement(re.sub(r"\s+", "", code.upper()))
        return self._finish()

    def _statement(self, code: str) -> None:
        if code == "M48":
            if self.header_line == 0 and not self.body_started:
                self.header, self.header_line = "open", self.line
                return
            raise self.err("M48 (header start) after the header or body; expected a single "
                           "header at the start of the file")
        if code in ("%", "M95"):
            if self.header == "open" or (self.header == "none" and not self.body_started):
                self.header = "closed"
                return
            if code == "M95" or not self.body_started:
                return  # a header end with no header open: no effect on the image
            raise self.err("'%' inside the body starts a stored pattern (step and repeat), "
                           "which this reader does not support", UnsupportedFeatureError)
        if _KEYWORD.match(code):
            self._keyword(code)
        else:
            self._words(code)

    def _keyword(self, code: str) -> None:
        head, _, arg = code.partition(",")
        if head in ("INCH", "METRIC"):
            try:
                st = parse_units_line(code)
            except ValueError as exc:
                raise self.err(str(exc)) from exc
            self.fmt.apply(st, self.line, from_comment=False)
            self.file_units = self.file_units or ("mm" if st.units == METRIC else "inch")
        elif head == "FMAT":
            if arg != "2":
                raise self.err(f"FMAT,{arg}: only format 2 is supported (expected FMAT,2)",
                               UnsupportedFeatureError)
        elif head == "VER":
            pass  # machine version; no effect on coordinates
        elif head == "ICI":
            if arg not in ("ON", "OFF"):
                raise self.err(f"ICI,{arg}: expected ICI,ON or ICI,OFF")
            self.incremental, self.incremental_stated = arg == "ON", True
        elif self.header == "open":
            self.ignored.append(f"{self.line}: {code}")
        else:
            raise self.err(f"unexpected line {code!r} outside the header; expected drill "
                           f"words such as T1, X1.5Y2.0, G85, M30")

    # -- comments ---------------------------------------------------------------------
    def _comment(self, text: str) -> None:
        attr = parse_attribute_comment(text)
        if attr is not None:
            cmd, name, fields = attr
            if cmd == "TF" and name == ".FileFunction":
                try:
                    fn = file_function(fields)
                except ValueError as exc:
                    raise self.err(f"TF.FileFunction comment: {exc}") from exc
                if fn is not None:
                    self.function = fn
            elif cmd == "TA" and name == ".AperFunction":
                self.pending_ta = aper_function_clue(fields)
            elif cmd == "TD" and name in ("", ".AperFunction"):
                self.pending_ta = None
            return
        clue = type_comment(text)
        if clue is not None:
            self.type_clue = clue
            self.types_seen.setdefault(clue.plated, clue.basis)
            return
        try:
            st = parse_format_comment(text) or parse_file_format_comment(text)
        except ValueError as exc:
            raise self.err(f"format comment {text[:60]!r}: {exc}") from exc
        if st is not None:
            self.fmt.apply(st, self.line, from_comment=True)
            if st.units and self.file_units is None:
                self.file_units = "mm" if st.units == METRIC else "inch"
            if st.incremental is not None and not self.incremental_stated:
                self.incremental = st.incremental

    # -- words ------------------------------------------------------------------------
    def _tokens(self, code: str) -> list[tuple[str, str]]:
        toks, pos = [], 0
        for m in _WORD.finditer(code):
            if m.start() != pos:
                break
            toks.append((m.group(1), m.group(2)))
            pos = m.end()
        if pos != len(code) or not toks:
            raise self.err(f"cannot read {code!r}: expected words such as T1, X1.5Y2.0, G85, "
                           f"M30 (a letter followed by a number)")
        for k, (letter, raw) in enumerate(toks):
            ok = _INT.match(raw) if letter in "GMTRP" else _NUMERIC.match(raw)
            if not ok:
                raise self.err(f"unreadable word {letter}{raw[:20]!r} in {code[:60]!r}: "
                               f"expected {'a whole number' if letter in 'GMTRP' else 'a number'}"
                               f" after {letter}")
            if letter in "GMTRP" and len(raw.lstrip("0")) > MAX_WORD_DIGITS:
                if letter == "R":
                    raise self.err(f"R repeat count of {len(raw.lstrip('0'))} digits exceeds "
                                   f"{self.limits.max_drill_hits} holes (max_drill_hits)",
                                   ResourceLimitError)
                raise self.err(f"{letter} followed by {len(raw.lstrip('0'))} digits; expected "
                               f"a whole number of at most {MAX_WORD_DIGITS} digits")
            if letter in "GMTRP" and len(raw) > MAX_WORD_DIGITS:  # only leading zeros extra
                toks[k] = (letter, raw.lstrip("0") or "0")
        return toks

    def _words(self, code: str) -> None:
        m = _HIT_LINE.match(code)
        if m and not self.rout and self.header != "open":
            words = {k: v for k, v in zip("XY", m.groups()) if v is not None}
            if words:  # fast path for the commonest line, a plain hit
                target = self._target(words)
                self._begin_body()
                return self._hit(target)
        toks = self._tokens(code)
        first = toks[0][0]
        if first == "T":
            return self._tool_line(toks, code)
        if self.header == "open":
            if all(l in "GM" and int(v) in (5, 40, 71, 72, 81, 90, 91)
                   for l, v in toks):
                return self._general(toks)
            raise self.err(f"{code!r} inside the header opened by M48 at line "
                           f"{self.header_line}; the header must be closed by % or M95 "
                           f"before drill data")
        if first == "R":
            return self._repeat(toks)
        if any(l == "G" and int(v) == 85 for l, v in toks):
            return self._g85(toks)
        if any(l == "P" for l, _ in toks):
            raise self.err("P<k> pattern repeat: stored patterns (step and repeat) are not "
                           "supported by this reader", UnsupportedFeatureError)
        self._general(toks)

    def _general(self, toks) -> None:
        self.motion_on_line = False
        pending: dict[str, str] = {}
        zero_set = False
        for letter, raw in toks:
            if letter == "M":
                self._flush(pending, zero_set)
                pending, zero_set = {}, False
                self._m_code(int(raw))
            elif letter == "G":
                code = int(raw)
                if code == 93:
                    self._flush(pending, zero_set)
                    pending, zero_set = {}, True
                else:
                    self._g_code(code)
            elif letter in "XYIJA":
                if letter in pending:
                    raise self.err(f"{letter} given twice in one line")
                pending[letter] = raw
            else:
                raise self.err(f"unexpected word {letter}{raw} here; expected X, Y, I, J, A, "
                               f"G or M words")
        self._flush(pending, zero_set)

    def _num(self, letter: str, raw: str) -> float:
        try:
            return self.fmt.value_mm(raw, self.line)
        except ValueError as exc:
            raise self.err(f"unreadable coordinate {letter}{raw}: {exc}") from exc

    def _target(self, words: dict[str, str]) -> tuple[float, float]:
        x, y = self.x, self.y
        if "X" in words:
            v = self._num("X", words["X"])
            x = x + v if self.incremental else self.ox + v
        if "Y" in words:
            v = self._num("Y", words["Y"])
            y = y + v if self.incremental else self.oy + v
        self._check_point(x, y)
        return x, y

    def _check_point(self, x: float, y: float) -> None:
        lim = self.limits.max_coordinate_mm
        if abs(x) > lim or abs(y) > lim:
            raise self.err(f"coordinate ({x:g}, {y:g}) mm lies beyond the {lim:g} mm limit "
                           f"(max_coordinate_mm); check the units and zero format",
                           ResourceLimitError)

    def _flush(self, pending: dict[str, str], zero_set: bool) -> None:
        if zero_set:
            if set(pending) - {"X", "Y"} or not pending:
                raise self.err("G93 zero set expects X and/or Y only")
            if "X" in pending:
                self.ox = self._num("X", pending["X"])
            if "Y" in pending:
                self.oy = self._num("Y", pending["Y"])
            self._check_point(self.ox, self.oy)
            return
        if not pending:
            return
        arc = {k: pending.pop(k) for k in "IJA" if k in pending}
        target = self._target(pending)
        self._begin_body()
        if not self.rout:
            if arc:
                raise self.err(f"{'/'.join(arc)} given in drill mode; I, J and A belong to "
                               f"G02/G03 rout arcs")
            self._hit(target)
        else:
            self._rout_motion(target, arc)

    def _begin_body(self) -> None:
        if not self.body_started:
            self.body_started = True
            if self.header_line == 0:
                self.note("no-header", f"{self.name}: no M48 header; the file was read as "
                          f"drill data (first drill action at line {self.line})")
            elif self.header == "open":  # pragma: no cover - guarded in _words
                raise self.err("drill data inside an unclosed header")

    # -- tools ------------------------------------------------------------------------
    def _tool_line(self, toks, code: str) -> None:
        digits = toks[0][1]
        number = int(digits[:2]) if len(digits) == 4 else int(digits)
        diameter = None
        for letter, raw in toks[1:]:
            if letter not in _TOOL_FIELDS:
                raise self.err(f"unexpected {letter}{raw} in tool line {code!r}; expected "
                               f"T<n> with C (diameter), F, S, B, H or Z fields")
            if letter == "C":
                diameter = raw  # later fields override earlier ones
        if diameter is not None:
            self._define(number, diameter)
        if self.header != "open":
            self._select(number)

    def _define(self, number: int, raw: str) -> None:
        try:
            d = self.fmt.literal_mm(raw, self.line)
        except ValueError as exc:
            raise self.err(f"tool T{number} diameter: {exc}") from exc
        if not d > 0:
            raise self.err(f"tool T{number} has diameter C{raw[:20]}; expected a diameter "
                           f"above 0")
        if d < MIN_TOOL_DIAMETER_MM:
            raise self.err(f"tool T{number} has diameter {d:g} mm; expected at least "
                           f"{MIN_TOOL_DIAMETER_MM:g} mm (no drill is smaller; wrong units?)")
        if d > self.limits.max_aperture_mm:
            raise self.err(f"tool T{number} diameter {d:g} mm is over the "
                           f"{self.limits.max_aperture_mm:g} mm limit (max_aperture_mm)",
                           ResourceLimitError)
        old = self.tools.get(number)
        clue, self.pending_ta = self.pending_ta, None
        if clue is None and old is not None:
            clue = old.clue
        type_clue = self.type_clue or (old.type_clue if old else None)
        self.tools[number] = _Tool(number, d, self.line, clue, type_clue)

    def _select(self, number: int) -> None:
        if self.plunged:
            self.note(f"tool-change-{self.line}", f"{self.name} line {self.line}: tool change "
                      f"with the router plunged; the routed path was ended there")
            self._end_path()
        self.last_hit = False
        if number == 0:
            self.tool_number, self.unload_line = None, self.line
        else:
            self.tool_number, self.tool_line = number, self.line

    def _need_tool(self) -> _Tool:
        if self.tool_number is None:
            why = (f" (T0 at line {self.unload_line} unloaded the tool)"
                   if self.unload_line else "")
            raise self.err(f"drilling or routing with no tool selected{why}; expected T<n> "
                           f"before the first hit")
        tool = self.tools.get(self.tool_number)
        if tool is None:
            n = self.tool_number
            raise self.err(f"tool T{n} (selected at line {self.tool_line}) was never given a "
                           f"diameter; expected T{n}C<diameter> in the header or body")
        return tool

    def _hit_vertices(self, diameter: float) -> int:
        """Vertices of one hit circle of ``diameter`` mm (as build_geometry makes it)."""
        n = self._circle_vertices.get(diameter)
        if n is None:
            n = self._circle_vertices[diameter] = max(
                arcs.segments_for(diameter / 2, 2 * math.pi), arcs.MIN_CIRCLE_SEGMENTS) + 1
        return n

    def _charge(self, n: int) -> None:
        """Count ``n`` more polygon vertices; ResourceLimitError past the file's budget."""
        self.vertices += n
        if self.vertices > self.max_vertices:
            raise self.err(f"the holes need more than {self.max_vertices} polygon vertices "
                           f"(limit max_total_vertices); too many or too large holes for one "
                           f"file", ResourceLimitError)

    def _add(self, coords: np.ndarray, tool: _Tool, is_slot: bool, line: int) -> None:
        if len(self.shapes) >= self.limits.max_drill_hits:
            raise self.err(f"more than {self.limits.max_drill_hits} holes (max_drill_hits)",
                           ResourceLimitError)
        self._charge(stroke_vertices(len(coords), tool.diameter / 2) if is_slot
                     else self._hit_vertices(tool.diameter))
        self.shapes.append(HoleShape(coords, tool.diameter, is_slot))
        self.hole_tools.append(tool)
        self.hole_lines.append(line)

    # -- drilling ---------------------------------------------------------------------
    def _hit(self, target) -> None:
        tool = self._need_tool()
        self._add(np.array([target], dtype=float), tool, False, self.line)
        self.x, self.y = target
        self.last_hit = True

    def _repeat(self, toks) -> None:
        count = int(toks[0][1])
        words = {}
        for letter, raw in toks[1:]:
            if letter not in "XY" or letter in words:
                raise self.err(f"unexpected {letter}{raw} in a repeat; expected R<k>X<dx>Y<dy>")
            words[letter] = raw
        if not self.last_hit:
            raise self.err("R<k> repeat without a hit just before it; expected a hit to repeat")
        tool = self._need_tool()
        if len(self.shapes) + count > self.limits.max_drill_hits:
            raise self.err(f"repeat of {count} hits exceeds {self.limits.max_drill_hits} holes "
                           f"(max_drill_hits)", ResourceLimitError)
        dx = self._num("X", words["X"]) if "X" in words else 0.0
        dy = self._num("Y", words["Y"]) if "Y" in words else 0.0
        self._check_point(self.x + count * dx, self.y + count * dy)
        if self.vertices + count * self._hit_vertices(tool.diameter) > self.max_vertices:
            self._charge(count * self._hit_vertices(tool.diameter))  # raises
        for k in range(1, count + 1):
            self._add(np.array([[self.x + k * dx, self.y + k * dy]]), tool, False, self.line)
        self.x, self.y = self.x + count * dx, self.y + count * dy

    def _g85(self, toks) -> None:
        k = next(i for i, (l, v) in enumerate(toks) if l == "G" and int(v) == 85)
        before, after = toks[:k], toks[k + 1:]
        for letter, raw in before + after:
            if letter not in "XY":
                raise self.err(f"unexpected {letter}{raw} in a G85 slot; expected "
                               f"X<x1>Y<y1>G85X<x2>Y<y2>")
        if self.plunged:
            raise self.err("G85 drilled slot while the router is plunged; expected M16/M17 "
                           "first")
        self._begin_body()
        tool = self._need_tool()
        start = self._target(dict(before))
        self.x, self.y = start
        end = self._target(dict(after))
        if start == end:
            self._add(np.array([start], dtype=float), tool, False, self.line)
        else:
            self._add(np.array([start, end], dtype=float), tool, True, self.line)
        self.x, self.y = end
        self.last_hit = False

    # -- G and M codes ----------------------------------------------------------------
    def _g_code(self, code: int) -> None:
        if code in (0, 1, 2, 3):
            if code == 0 and self.plunged:
                raise self.err(f"G00 rapid move with the router plunged (M15 at line "
                               f"{self.path_line}); expected M16/M17 before it")
            self.rout, self.motion = True, code
            self.motion_on_line = True
        elif code in (5, 81):
            if self.plunged:
                self.note(f"g05-{self.line}", f"{self.name} line {self.line}: drill mode "
                          f"selected with the router plunged; the routed path ended there")
                self._end_path()
            self.rout = False
        elif code in (90, 91):
            self.incremental, self.incremental_stated = code == 91, True
        elif code == 40:
            pass
        elif code in (41, 42):
            self.note("compensation", f"{self.name} line {self.line}: cutter compensation "
                      f"G{code} ignored; coordinates were taken as the tool centre line")
        else:
            raise self.err(f"G{code:02d} is not supported by this reader and may move the tool "
                           f"or cut; supported: G00-G03, G05, G40-G42, G81, G85, G90, G91, "
                           f"G93", UnsupportedFeatureError)

    def _m_code(self, code: int) -> None:
        if code in (14, 15):
            if not self.rout:
                raise self.err(f"M{code} plunge in drill mode; expected G00 to the start of "
                               f"the rout path first")
            if not self.plunged:
                self._begin_body()
                self.path_tool = self._need_tool()
                self.plunged, self.path_line = True, self.line
                self.path = [np.array([[self.x, self.y]], dtype=float)]
            self.last_hit = False
        elif code in (16, 17):
            if self.plunged:
                self._end_path()
        elif code in (30, 0):
            if self.plunged:
                self.note("open-path", f"{self.name} line {self.line}: end of program with "
                          f"the router plunged; the routed path ended there")
                self._end_path()
            self.ended_line = self.line
        elif code == 71:
            self.fmt.set_units(METRIC, self.line)
            self.file_units = self.file_units or "mm"
        elif code == 72:
            self.fmt.set_units(INCH, self.line)
            self.file_units = self.file_units or "inch"
        elif code == 95:
            pass
        elif code in _PATTERN_CODES:
            raise self.err(f"M{code:02d} ({_PATTERN_CODES[code]}): step-and-repeat patterns "
                           f"are not supported by this reader", UnsupportedFeatureError)
        else:
            raise self.err(f"M{code:02d} is not supported by this reader and may move the tool "
                           f"or cut; supported: M00, M14-M17, M30, M45, M47, M48, M71, M72, "
                           f"M95", UnsupportedFeatureError)

    # -- routing ----------------------------------------------------------------------
    def _rout_motion(self, target, arc: dict[str, str]) -> None:
        self.last_hit = False
        if self.motion == 0 or not self.plunged:
            if self.motion == 0 and arc:
                raise self.err("I/J/A given with a G00 move; expected them with G02/G03")
            if not self.motion_on_line:
                self.note("modal-move", f"{self.name} line {self.line}: coordinates in rout "
                          f"mode with the router up were read as a G0{self.motion} move, not "
                          f"a hit; drill mode needs G05 first")
            elif self.motion != 0:
                self.note("tool-up", f"{self.name} line {self.line}: G0{self.motion} rout "
                          f"motion with the router retracted (no M15 before it) was read as "
                          f"a move, not a cut")
            self.x, self.y = target
            return
        start = (self.x, self.y)
        if self.motion == 1:
            if arc:
                raise self.err("I/J/A given with a G01 line; expected them with G02/G03")
            pts = np.array([target], dtype=float)
        else:
            pts = self._arc(start, target, arc, clockwise=self.motion == 2)
        self.path.append(pts)
        self.x, self.y = target

    def _arc(self, start, end, words: dict[str, str], clockwise: bool) -> np.ndarray:
        try:
            if "A" in words:
                if "I" in words or "J" in words:
                    raise ArcError("both A and I/J given; expected one of them")
                centre = centre_from_radius(start, end, self._num("A", words["A"]), clockwise)
            elif "I" in words or "J" in words:
                i = self._num("I", words["I"]) if "I" in words else 0.0
                j = self._num("J", words["J"]) if "J" in words else 0.0
                centre = centre_from_offsets(start, end, i, j, clockwise)
            else:
                raise ArcError("expected A<radius> or I/J centre offsets")
        except ArcError as exc:
            raise self.err(f"G0{self.motion} arc: {exc}") from exc
        radius = max(math.hypot(start[0] - centre[0], start[1] - centre[1]),
                     math.hypot(end[0] - centre[0], end[1] - centre[1]))
        if not radius <= MAX_ARC_RADIUS_MM:
            raise self.err(f"G0{self.motion} arc of radius {radius:g} mm; expected at most "
                           f"{MAX_ARC_RADIUS_MM:g} mm", ResourceLimitError)
        pts = arcs.arc_points(start, end, centre, clockwise)
        reach = float(np.abs(pts).max())
        if reach > self.limits.max_coordinate_mm:
            raise self.err(f"G0{self.motion} arc reaches {reach:g} mm from the origin; "
                           f"expected at most {self.limits.max_coordinate_mm:g} mm "
                           f"(max_coordinate_mm)", ResourceLimitError)
        if len(pts) - 1 > self.limits.max_arc_segments:
            raise self.err(f"arc needs {len(pts) - 1} chords, over max_arc_segments",
                           ResourceLimitError)
        return pts[1:]

    def _end_path(self) -> None:
        pts = np.vstack(self.path)
        keep = np.ones(len(pts), dtype=bool)
        keep[1:] = np.any(np.diff(pts, axis=0) != 0, axis=1)
        pts = pts[keep]
        tool, line = self.path_tool, self.path_line
        self.plunged, self.path, self.path_tool = False, [], None
        self._add(pts, tool, len(pts) > 1, line)

    # -- result -----------------------------------------------------------------------
    def _finish(self) -> DrillFile:
        if self.plunged:
            self.note("open-path", f"{self.name}: the routed path started at line "
                      f"{self.path_line} has no M16/M17; it was cut up to the end of the file")
            self._end_path()
        if self.header == "open":
            self.note("open-header", f"{self.name}: the header opened by M48 at line "
                      f"{self.header_line} is never closed; the file has no drill data")
        if self.after_end:
            self.note("after-end", f"{self.name}: {len(self.after_end)} line(s) after the end "
                      f"of program (line {self.ended_line}) were not read, from line "
                      f"{self.after_end[0]}")
        if self.ignored:
            self.note("ignored", f"{self.name}: header settings with no effect on the hole "
                      f"image were skipped: " + "; ".join(self.ignored[:20]))
        geoms, paths = build_geometry(self.shapes)
        cache: dict[int, tuple] = {}
        holes = []
        for k, shape in enumerate(self.shapes):
            tool = self.hole_tools[k]
            info = cache.get(id(tool))
            if info is None:
                plated, basis = hole_plating(tool.clue, self.function, tool.type_clue)
                info = cache[id(tool)] = (plated, basis, tool.clue.function if tool.clue
                                          else None, f"T{tool.number}")
            holes.append(DrillHole(geometry=geoms[k], diameter=shape.diameter, path=paths[k],
                                   is_slot=shape.is_slot, tool=info[3], plated=info[0],
                                   plating_basis=info[1], function=info[2],
                                   line=self.hole_lines[k]))
        plated, basis, span = self._file_plating()
        return DrillFile(name=self.name, holes=holes, span=span, plated=plated,
                         plating_basis=basis, units=self.file_units or "inch",
                         notes=self.notes)

    def _file_plating(self):
        if self.function is not None:
            return self.function.plated, f"{self.function.basis} comment", self.function.span
        if len(self.types_seen) == 1:
            (plated, basis), = self.types_seen.items()
            return plated, basis, None
        plated = plating_from_name(self.name)
        return plated, ("file name" if plated is not None else ""), None
