"""Stripboard and pad-per-hole plans (our own TOML format) -> a :class:`Board`.

Units: millimetres.  A plan describes a hand-built board by its holes.  Hole references are
a row letter (``A`` .. ``Z``, ``AA`` .. ) and a column number from 1, e.g. ``D12``.  Row A is
at the top of the part side; hole (row r, column c), both from 0, sits at
``x = (c + 0.5) * pitch``, ``y = (rows - r - 0.5) * pitch``; the board outline is
``cols * pitch`` by ``rows * pitch``.

Contract (keys may be added, never changed)::

    [stripboard]
    holes = [40, 25]          # columns, rows
    pitch_mm = 2.54           # common practice
    strips = "rows"           # "rows" | "columns" | "pads" (pad-per-hole)
    strip_width_mm = 2.0      # gap = pitch - width (common practice 2.0..2.1)
    hole_mm = 1.0             # drilled hole (common practice)
    pad_mm = 1.8              # pad-per-hole pad diameter (common practice)
    cutter_mm = 3.0           # track cutter at a hole (from memory)
    cut_width_mm = 0.8        # a knife cut between two holes (from memory)
    copper_um = 35            # common practice
    wire_mm = 0.6             # bare link wire diameter (common practice)
    cuts = ["F10", "G10-G11"] # at a hole, or between two neighbouring holes of a strip
    removed_strips = ["C", "E..F"]   # strips whose copper is cut away whole
    slotted_strips = ["C"]    # copper cut away and a slot routed along the strip
    [[link]]                  # wire link on the part side
    from = "A3"
    to = "F3"
    bare = false              # bare wire: copper on the part side
    [[wire]]                  # off-board wire: to another hole, or off_board = "what"
    from = "A1"
    off_board = "DC bus +"
    [[part]]
    ref = "Q1"
    kind = "mosfet"           # as in [parts] of the project file
    pins = { G = "D10", D = "D11", S = "D12" }   # pin name -> hole
    nets = { G = "GATE_H" }   # optional: the net each pin is meant to be on
    [labels]
    HV_BUS = "A1"             # net name -> a hole on that net

With ``strips = "columns"`` strips are named by column number (``"12"``, ``"12..14"``).

Model.  Each strip's copper minus its cuts and holes is split into pieces; each piece is
one :class:`CopperShape` on the ``bottom`` layer (the copper side).  Holes are non-plated.
A lead soldered in a hole is a small termination shape (``component``/``pin`` set) on the
copper it touches; a link's two ends carry the same component and pin (``LK1.1``), so the
net graph joins them exactly as a part's pin would.  A bare link is also a copper shape
on the ``top`` layer (the part side).  Labelled pieces carry the label as their net; every
other piece is named by the net graph (``N1``...) when a pin is on it and is floating copper
otherwise.  Part leads on the part side are not modelled.
"""
from __future__ import annotations

import re
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import shapely
import shapely.ops
from shapely.geometry import LineString, Polygon, box

from ..errors import InputFileError
from ..geometry.arcs import circle
from ..model import Assumption, Board, Component, CopperShape, Hole, Layer, Pin, SourceRef, \
    Stackup

#: Defaults (mm) and where they come from.
DEFAULTS = {
    "pitch_mm": (2.54, "common practice (0.1 in)"),
    "strip_width_mm": (2.0, "common practice (strips about 2.0-2.1 mm wide)"),
    "hole_mm": (1.0, "common practice"),
    "pad_mm": (1.8, "common practice for pad-per-hole board"),
    "cutter_mm": (3.0, "from memory (a spot-face track cutter)"),
    "cut_width_mm": (0.8, "from memory (a knife or small drill cut between holes)"),
    "copper_um": (35.0, "common practice (1 oz copper)"),
    "wire_mm": (0.6, "common practice (tinned copper link wire)"),
    "slot_mm": (1.0, "from memory (a routed slot along the strip)"),
}
STRIP_KINDS = ("rows", "columns", "pads")
_REF = re.compile(r"^([A-Z]+)([0-9]+)$")
_NUM_KEYS = tuple(DEFAULTS)
_BOARD_KEYS = set(_NUM_KEYS) | {"holes", "strips", "cuts", "removed_strips", "slotted_strips"}


@dataclass
class Segment:
    """One piece of strip copper: ``strip`` name, its holes (row, col) and its shape index."""

    strip: str
    holes: list[tuple[int, int]]
    shape: int


@dataclass
class Cut:
    """A track cut.  ``holes``: one hole (at a hole) or two (between).  ``separates``: the
    copper on either side is no longer one piece."""

    text: str
    strip: str
    holes: tuple[tuple[int, int], ...]
    line: int | None
    separates: bool = True
    where: tuple[float, float] = (0.0, 0.0)


@dataclass
class Link:
    """A wire link or off-board wire between two holes (``b`` is ``None`` for a wire that
    leaves the board; ``off_board`` then says where to)."""

    ref: str
    a: tuple[int, int]
    b: tuple[int, int] | None
    bare: bool
    line: int | None
    off_board: str | None = None
    kind: str = "link"


@dataclass
class Lead:
    """A lead or wire end in a hole: ``ref``, ``pin``, the joint shape indices, the line."""

    ref: str
    pin: str
    hole: tuple[int, int]
    shapes: list[int]
    line: int | None
    expected_net: str | None = None


@dataclass
class Plan:
    """What a plan said, kept on ``board.plan`` for the stripboard rule and the drawing."""

    file: str
    cols: int
    rows: int
    pitch: float
    kind: str
    width: float
    hole_mm: float
    pad_mm: float
    strips: list[str] = field(default_factory=list)         # every strip name, in order
    removed: set[str] = field(default_factory=set)
    slotted: set[str] = field(default_factory=set)
    segments: list[Segment] = field(default_factory=list)
    hole_segments: dict[tuple[int, int], list[int]] = field(default_factory=dict)
    cuts: list[Cut] = field(default_factory=list)
    links: list[Link] = field(default_factory=list)
    leads: list[Lead] = field(default_factory=list)
    labels: dict[str, tuple[int, int]] = field(default_factory=dict)

    def xy(self, hole: tuple[int, int]) -> tuple[float, float]:
        """Centre (mm) of hole (row, col)."""
        r, c = hole
        return ((c + 0.5) * self.pitch, (self.rows - r - 0.5) * self.pitch)

    def strip_of(self, hole: tuple[int, int]) -> str:
        """Name of the strip through ``hole`` (row letter, column number, or the hole)."""
        if self.kind == "rows":
            return row_name(hole[0])
        if self.kind == "columns":
            return str(hole[1] + 1)
        return hole_name(hole)

    def along(self, hole: tuple[int, int]) -> int:
        """Position of ``hole`` along its strip."""
        return hole[1] if self.kind == "rows" else hole[0]


def row_name(r: int) -> str:
    """Row letters for row index ``r`` (0 -> A, 25 -> Z, 26 -> AA)."""
    s = ""
    r += 1
    while r:
        r, m = divmod(r - 1, 26)
        s = chr(65 + m) + s
    return s


def row_index(name: str) -> int:
    """Row index of row letters (A -> 0, AA -> 26)."""
    n = 0
    for ch in name:
        n = n * 26 + (ord(ch) - 64)
    return n - 1


def hole_name(hole: tuple[int, int]) -> str:
    """``D12`` for (row 3, column 11)."""
    return f"{row_name(hole[0])}{hole[1] + 1}"


def is_plan(path: Path | str) -> bool:
    """True when ``path`` is a ``.toml`` file with a ``[stripboard]`` table."""
    path = Path(path)
    if not (path.is_file() and path.suffix.lower() == ".toml"):
        return False
    try:
        return "stripboard" in tomllib.loads(path.read_text("utf-8"))
    except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError):
        return False


# -- line finding ---------------------------------------------------------------------------

class _Lines:
    """Finds the line of a value in the plan text, for messages."""

    def __init__(self, text: str):
        self.lines = text.splitlines()

    def header(self, name: str, k: int = 0) -> int | None:
        """Line of the ``k``-th ``[[name]]`` (or ``[name]``) header."""
        pat = re.compile(r"^\s*\[\[?\s*" + re.escape(name) + r"\s*\]\]?")
        hits = [n + 1 for n, ln in enumerate(self.lines) if pat.match(ln)]
        return hits[k] if k < len(hits) else (hits[0] if hits else None)

    def find(self, start: int | None, needle: str, quoted: bool = True) -> int | None:
        """First line at or after ``start`` (to the next header) holding ``needle``."""
        if start is None:
            return None
        pats = [f'"{needle}"', f"'{needle}'"] if quoted else [needle]
        for n in range(start - 1, len(self.lines)):
            ln = self.lines[n].split("#", 1)[0]
            if n >= start and re.match(r"^\s*\[", ln):
                break
            if any(p in ln for p in pats):
                return n + 1
        return start


# -- reading --------------------------------------------------------------------------------

def read_plan(path: Path | str) -> Board:
    """Read the plan at ``path`` into a :class:`Board` (mm).  Raises InputFileError with the
    plan file and line on a bad plan."""
    path = Path(path)
    try:
        text = path.read_text("utf-8")
        data = tomllib.loads(text)
    except (OSError, UnicodeDecodeError) as e:
        raise InputFileError(f"cannot read the plan: {e}", file=str(path)) from e
    except tomllib.TOMLDecodeError as e:
        raise InputFileError(f"not valid TOML: {e}", file=str(path),
                             line=getattr(e, "lineno", None)) from e
    return plan_from_data(data, text, str(path))


def plan_from_data(data: dict, text: str, file: str) -> Board:
    """Build the board of a parsed plan (``text`` is the TOML text, for line numbers)."""
    return _Builder(data, text, file).build()


class _Builder:
    def __init__(self, data: dict, text: str, file: str):
        self.data, self.file, self.L = data, file, _Lines(text)
        self.notes: list[Assumption] = []
        self.occupied: dict[tuple[int, int], str] = {}

    def fail(self, msg: str, line: int | None):
        raise InputFileError(msg, file=self.file, line=line)

    def key_line(self, key: str) -> int | None:
        return self.L.find(self.L.header("stripboard"), key + " ", quoted=False) or \
            self.L.header("stripboard")

    # -- values -------------------------------------------------------------------------
    def hole(self, ref, line: int | None, what: str) -> tuple[int, int]:
        if not isinstance(ref, str) or not _REF.match(ref.strip().upper()):
            self.fail(f"{what}: {ref!r} is not a hole reference; expected a row letter and "
                      "a column number such as \"D12\"", line)
        m = _REF.match(ref.strip().upper())
        r, c = row_index(m.group(1)), int(m.group(2)) - 1
        if not (0 <= r < self.rows and 0 <= c < self.cols):
            self.fail(f"{what}: hole {ref} is outside the board, which has rows A.."
                      f"{row_name(self.rows - 1)} and columns 1..{self.cols}", line)
        return (r, c)

    def take(self, hole, who: str, line):
        if hole in self.occupied:
            self.fail(f"hole {hole_name(hole)} already holds {self.occupied[hole]}; {who} "
                      "cannot go in it too (one lead or wire end per hole)", line)
        self.occupied[hole] = who

    def build(self) -> Board:
        sb = self.data.get("stripboard")
        head = self.L.header("stripboard")
        if not isinstance(sb, dict):
            self.fail("[stripboard] must be a table", head)
        extra = sorted(set(sb) - _BOARD_KEYS)
        if extra:
            self.fail(f"[stripboard] unknown key {extra[0]!r}; expected one of "
                      f"{', '.join(sorted(_BOARD_KEYS))}", self.key_line(extra[0]))
        h = sb.get("holes")
        if (not isinstance(h, list) or len(h) != 2 or
                not all(isinstance(x, int) and not isinstance(x, bool) and 1 <= x <= 2000
                        for x in h)):
            self.fail("[stripboard] holes must be [columns, rows], whole numbers 1..2000; "
                      f"got {h!r}", self.key_line("holes"))
        self.cols, self.rows = int(h[0]), int(h[1])
        kind = sb.get("strips", "rows")
        if kind not in STRIP_KINDS:
            self.fail(f"[stripboard] strips must be one of {', '.join(STRIP_KINDS)}; got "
                      f"{kind!r}", self.key_line("strips"))
        v = {}
        for key in _NUM_KEYS:
            val = sb.get(key, DEFAULTS[key][0])
            if isinstance(val, bool) or not isinstance(val, (int, float)) or not val > 0:
                self.fail(f"[stripboard] {key} must be a number > 0; got {val!r}",
                          self.key_line(key))
            v[key] = float(val)
            if key not in sb and (kind != "pads" or key not in ("strip_width_mm",)) and \
                    not (kind == "pads" and key in ("cutter_mm", "cut_width_mm")) and \
                    not (kind != "pads" and key == "pad_mm"):
                self.notes.append(Assumption("plan", f"{key} not given: {val:g} "
                                             f"({DEFAULTS[key][1]})"))
        p = v["pitch_mm"]
        if kind != "pads" and v["strip_width_mm"] >= p:
            self.fail(f"[stripboard] strip_width_mm ({v['strip_width_mm']:g}) must be less "
                      f"than pitch_mm ({p:g}): the gap is pitch - width",
                      self.key_line("strip_width_mm"))
        if kind == "pads" and v["pad_mm"] >= p:
            self.fail(f"[stripboard] pad_mm ({v['pad_mm']:g}) must be less than pitch_mm "
                      f"({p:g})", self.key_line("pad_mm"))
        if v["hole_mm"] >= (v["pad_mm"] if kind == "pads" else p):
            self.fail("[stripboard] hole_mm must be smaller than the pad or pitch",
                      self.key_line("hole_mm"))
        self.v = v
        plan = Plan(self.file, self.cols, self.rows, p, kind, v["strip_width_mm"],
                    v["hole_mm"], v["pad_mm"])
        self.plan = plan
        if kind == "rows":
            plan.strips = [row_name(r) for r in range(self.rows)]
        elif kind == "columns":
            plan.strips = [str(c + 1) for c in range(self.cols)]
        plan.removed = self._strip_set(sb, "removed_strips")
        plan.slotted = self._strip_set(sb, "slotted_strips")
        plan.removed |= plan.slotted
        cuts = self._cuts(sb)
        plan.cuts = cuts
        board = Board(name=Path(self.file).stem, source=self.file)
        board.outline = box(0, 0, self.cols * p, self.rows * p)
        board.stackup = Stackup(copper_mm={"bottom": v["copper_um"] / 1000.0,
                                           "top": v["copper_um"] / 1000.0}, basis="project")
        self._copper(board, cuts)
        self._holes(board)
        self._parts(board)
        self._links(board)
        self._labels(board)
        board.copper_layers = ["top", "bottom"] if any(s.layer == "top" for s in board.shapes) \
            else ["bottom"]
        board.layers = [Layer(n, "copper", side=n, source=self.file, function="plan")
                        for n in board.copper_layers]
        board.has_net_names = True
        board.assumptions = self.notes + [Assumption(
            "plan", "part leads on the part side are not modelled; each lead is a solder "
            "joint on the copper it goes through")]
        board.source_kind = "plan"
        board.plan = plan
        return board

    def _strip_set(self, sb: dict, key: str) -> set[str]:
        val = sb.get(key, [])
        line = self.key_line(key)
        if self.plan.kind == "pads" and val:
            self.fail(f"[stripboard] {key}: a pad-per-hole board has no strips", line)
        if not isinstance(val, list) or not all(isinstance(x, str) for x in val):
            self.fail(f"[stripboard] {key} must be a list of strip names such as "
                      '["C", "E..F"]', line)
        out: set[str] = set()
        for item in val:
            ln = self.L.find(line, item)
            lo, _, hi = item.partition("..")
            hi = hi or lo
            names = self.plan.strips
            if lo.strip() not in names or hi.strip() not in names:
                self.fail(f"[stripboard] {key}: {item!r} names no strip of this board "
                          f"({names[0]}..{names[-1]})", ln)
            a, b = names.index(lo.strip()), names.index(hi.strip())
            out |= set(names[min(a, b):max(a, b) + 1])
        return out

    def _cuts(self, sb: dict) -> list[Cut]:
        val = sb.get("cuts", [])
        line = self.key_line("cuts")
        if not isinstance(val, list) or not all(isinstance(x, str) for x in val):
            self.fail('[stripboard] cuts must be a list of holes or hole pairs, e.g. '
                      '["F10", "G10-G11"]', line)
        if val and self.plan.kind == "pads":
            self.fail("[stripboard] cuts: a pad-per-hole board has no strips to cut", line)
        out = []
        for item in val:
            ln = self.L.find(line, item)
            parts = item.split("-")
            if len(parts) > 2:
                self.fail(f"cut {item!r}: expected a hole (\"F10\") or two neighbouring "
                          "holes of one strip (\"F10-F11\")", ln)
            holes = tuple(self.hole(x, ln, f"cut {item!r}") for x in parts)
            strip = self.plan.strip_of(holes[0])
            if len(holes) == 2:
                a, b = holes
                if self.plan.strip_of(b) != strip or \
                        abs(self.plan.along(a) - self.plan.along(b)) != 1:
                    self.fail(f"cut {item!r}: the two holes must be neighbours on one strip "
                              f"(strips run along {self.plan.kind})", ln)
                holes = tuple(sorted(holes, key=self.plan.along))
            out.append(Cut(item, strip, holes, ln))
        return out

    # -- copper ---------------------------------------------------------------------------
    def _strip_rect(self, name: str) -> Polygon:
        p, w = self.plan.pitch, self.plan.width
        if self.plan.kind == "rows":
            y = (self.rows - row_index(name) - 0.5) * p
            return box(0, y - w / 2, self.cols * p, y + w / 2)
        x = (int(name) - 0.5) * p
        return box(x - w / 2, 0, x + w / 2, self.rows * p)

    def _strip_holes(self, name: str) -> list[tuple[int, int]]:
        if self.plan.kind == "rows":
            r = row_index(name)
            return [(r, c) for c in range(self.cols)]
        c = int(name) - 1
        return [(r, c) for r in range(self.rows)]

    def _copper(self, board: Board, cuts: list[Cut]) -> None:
        plan, v = self.plan, self.v
        hr = v["hole_mm"] / 2
        by_strip: dict[str, list[Cut]] = {}
        for cut in cuts:
            by_strip.setdefault(cut.strip, []).append(cut)
        if plan.kind == "pads":
            for r in range(self.rows):
                for c in range(self.cols):
                    x, y = plan.xy((r, c))
                    geom = circle(x, y, v["pad_mm"]).difference(circle(x, y, v["hole_mm"]))
                    self._add_segment(board, hole_name((r, c)), geom, [(r, c)])
            return
        for name in plan.strips:
            holes = self._strip_holes(name)
            if name in plan.removed:
                for hole in holes:
                    plan.hole_segments[hole] = []
                continue
            copper = self._strip_rect(name)
            removed = []
            for cut in by_strip.get(name, []):
                if len(cut.holes) == 1:
                    cut.where = plan.xy(cut.holes[0])
                    removed.append(circle(*cut.where, v["cutter_mm"]))
                else:
                    (xa, ya), (xb, yb) = plan.xy(cut.holes[0]), plan.xy(cut.holes[1])
                    cut.where = ((xa + xb) / 2, (ya + yb) / 2)
                    cw, big = v["cut_width_mm"] / 2, plan.pitch
                    removed.append(box(cut.where[0] - cw, cut.where[1] - big,
                                       cut.where[0] + cw, cut.where[1] + big)
                                   if plan.kind == "rows" else
                                   box(cut.where[0] - big, cut.where[1] - cw,
                                       cut.where[0] + big, cut.where[1] + cw))
            centres = np.array([plan.xy(h) for h in holes])
            drilled = shapely.buffer(shapely.points(centres), hr, quad_segs=16)
            copper = copper.difference(shapely.union_all(removed + list(drilled)))
            pieces = [g for g in shapely.get_parts(copper) if not g.is_empty]
            pieces.sort(key=lambda g: (g.bounds[0], -g.bounds[3]))
            tree = shapely.STRtree(pieces)
            probe = shapely.buffer(shapely.points(centres), hr + 0.02, quad_segs=16)
            hi, pi = tree.query(probe, predicate="intersects")
            touch: dict[int, list[tuple[int, int]]] = {}
            for h_i, p_i in zip(hi.tolist(), pi.tolist()):
                touch.setdefault(p_i, []).append(holes[h_i])
            for hole in holes:
                plan.hole_segments[hole] = []
            for k, piece in enumerate(pieces):
                self._add_segment(board, name, piece, sorted(touch.get(k, []),
                                                             key=plan.along))
            self._cut_checks(by_strip.get(name, []))

    def _add_segment(self, board, strip, geom, holes):
        plan = self.plan
        idx = len(board.shapes)
        board.shapes.append(CopperShape(geom, "bottom", net=None, function="Conductor",
                                        kind="plan", source=SourceRef(self.file)))
        seg = len(plan.segments)
        plan.segments.append(Segment(strip, holes, idx))
        for h in holes:
            plan.hole_segments.setdefault(h, []).append(seg)

    def _cut_checks(self, cuts: list[Cut]) -> None:
        plan = self.plan
        for cut in cuts:
            a, b = cut.holes[0], cut.holes[-1]
            before = (a[0], a[1] - 1) if plan.kind == "rows" else (a[0] - 1, a[1])
            after = (b[0], b[1] + 1) if plan.kind == "rows" else (b[0] + 1, b[1])
            if len(cut.holes) == 2:
                before, after = a, b
            sa = set(plan.hole_segments.get(before, []))
            sb = set(plan.hole_segments.get(after, []))
            cut.separates = not (sa & sb)

    def _holes(self, board: Board) -> None:
        plan = self.plan
        for r in range(self.rows):
            for c in range(self.cols):
                x, y = plan.xy((r, c))
                board.holes.append(Hole(circle(x, y, plan.hole_mm), plan.hole_mm, False,
                                        ("top", "bottom"), function="ComponentDrill",
                                        plating_basis="stripboard plan: holes are not plated"))
        for name in sorted(plan.slotted, key=plan.strips.index):
            holes = self._strip_holes(name)
            (xa, ya), (xb, yb) = plan.xy(holes[0]), plan.xy(holes[-1])
            w = self.v["slot_mm"]
            geom = LineString([(xa, ya), (xb, yb)]).buffer(w / 2)
            board.holes.append(Hole(geom, w, False, ("top", "bottom"), is_slot=True,
                                    function="MechanicalDrill",
                                    plating_basis=f"stripboard plan: slot along strip {name}"))

    # -- leads ---------------------------------------------------------------------------
    def _joint(self, board: Board, ref: str, pin: str, hole, line, expected=None) -> Lead:
        plan = self.plan
        x, y = plan.xy(hole)
        reach = (plan.pad_mm if plan.kind == "pads" else plan.width) / 2
        ring = circle(x, y, 2 * reach).difference(circle(x, y, plan.hole_mm))
        idx = []
        for seg in plan.hole_segments.get(hole, []):
            g = ring.intersection(board.shapes[plan.segments[seg].shape].geometry)
            for part in shapely.get_parts(g):
                if part.area > 0 and part.geom_type == "Polygon":
                    idx.append(len(board.shapes))
                    board.shapes.append(CopperShape(
                        part, "bottom", component=ref, pin=pin, function="ComponentPad",
                        kind="plan", source=SourceRef(self.file, line)))
        lead = Lead(ref, pin, hole, idx, line, expected)
        plan.leads.append(lead)
        return lead

    def _lead_point(self, board: Board, lead: Lead, hole) -> tuple[float, float]:
        """Where a lead meets copper: the point of its solder joint nearest the hole centre
        (the hole itself is drilled out, so current paths start on the joint), or the hole
        centre when the lead has no copper around it."""
        x, y = self.plan.xy(hole)
        if not lead.shapes:
            return (x, y)
        joint = shapely.union_all([board.shapes[i].geometry for i in lead.shapes])
        p = shapely.ops.nearest_points(joint.buffer(-1e-3) if not joint.buffer(-1e-3).is_empty
                                       else joint, shapely.Point(x, y))[0]
        return (round(p.x, 6), round(p.y, 6))

    def _parts(self, board: Board) -> None:
        parts = self.data.get("part", [])
        if not isinstance(parts, list):
            self.fail("[[part]] must be an array of tables", self.L.header("part"))
        for k, entry in enumerate(parts):
            ln = self.L.header("part", k)
            ref = entry.get("ref")
            if not isinstance(ref, str) or not ref.strip():
                self.fail("[[part]] needs ref = \"<reference>\"", ln)
            if ref in board.components:
                self.fail(f"[[part]] {ref} is given twice", self.L.find(ln, ref))
            pins = entry.get("pins")
            if not isinstance(pins, dict) or not pins:
                self.fail(f"[[part]] {ref}: pins must map pin names to holes, e.g. "
                          '{ G = "D10", D = "D11", S = "D12" }', ln)
            nets = entry.get("nets", {})
            if not isinstance(nets, dict) or set(nets) - set(pins):
                self.fail(f"[[part]] {ref}: nets must map some of its pin names to net names",
                          self.L.find(ln, "nets", quoted=False))
            comp = Component(ref, side="top", value=entry.get("value"),
                             package=entry.get("package"))
            if "kind" in entry:
                comp.properties["kind"] = entry["kind"]
            for name, where in pins.items():
                pl = self.L.find(ln, where) if isinstance(where, str) else ln
                hole = self.hole(where, pl, f"part {ref} pin {name}")
                self.take(hole, f"{ref} pin {name}", pl)
                lead = self._joint(board, ref, str(name), hole, pl, nets.get(name))
                comp.pins[str(name)] = Pin(str(name), name=str(name),
                                           position=self._lead_point(board, lead, hole),
                                           layer="bottom")
            xs = [p.position for p in comp.pins.values()]
            comp.position = (sum(x for x, _ in xs) / len(xs), sum(y for _, y in xs) / len(xs))
            board.components[ref] = comp

    def _links(self, board: Board) -> None:
        plan = self.plan
        for table, prefix in (("link", "LK"), ("wire", "W")):
            items = self.data.get(table, [])
            if not isinstance(items, list):
                self.fail(f"[[{table}]] must be an array of tables", self.L.header(table))
            for k, entry in enumerate(items):
                ln = self.L.header(table, k)
                ref = f"{prefix}{k + 1}"
                if "from" not in entry:
                    self.fail(f"[[{table}]] needs from = \"<hole>\"", ln)
                fl = self.L.find(ln, str(entry["from"]))
                a = self.hole(entry["from"], fl, f"{table} {ref} from")
                off = entry.get("off_board") if table == "wire" else None
                if "to" in entry:
                    tl = self.L.find(ln, str(entry["to"]))
                    b = self.hole(entry["to"], tl, f"{table} {ref} to")
                elif off is not None:
                    b, tl = None, ln
                else:
                    self.fail(f"[[{table}]] needs to = \"<hole>\"" +
                              (" or off_board = \"<where>\"" if table == "wire" else ""), ln)
                bare = entry.get("bare", False)
                if not isinstance(bare, bool):
                    self.fail(f"[[{table}]] bare must be true or false", ln)
                self.take(a, f"{table} {ref}", fl)
                self._joint(board, ref, "1", a, fl)
                if b is not None:
                    if b == a:
                        self.fail(f"[[{table}]] {ref} goes from a hole to itself", tl)
                    self.take(b, f"{table} {ref}", tl)
                    self._joint(board, ref, "1", b, tl)
                    if bare:
                        geom = LineString([plan.xy(a), plan.xy(b)]).buffer(
                            self.v["wire_mm"] / 2, quad_segs=8)
                        board.shapes.append(CopperShape(
                            geom, "top", component=ref, pin="1", function="Conductor",
                            kind="plan", source=SourceRef(self.file, ln)))
                plan.links.append(Link(ref, a, b, bare, ln, off, table))

    def _labels(self, board: Board) -> None:
        labels = self.data.get("labels", {})
        head = self.L.header("labels")
        if not isinstance(labels, dict):
            self.fail("[labels] must map net names to holes", head)
        for net, where in labels.items():
            ln = self.L.find(head, where) if isinstance(where, str) else head
            hole = self.hole(where, ln, f"label {net}")
            segs = self.plan.hole_segments.get(hole, [])
            if not segs:
                self.fail(f"label {net}: hole {hole_name(hole)} has no copper around it (cut "
                          "or removed); put the label on a hole of the net's copper", ln)
            for s in segs:
                board.shapes[self.plan.segments[s].shape].net = net
            self.plan.labels[net] = hole


def strip_gap_mm(pitch_mm: float, width_mm: float, strips_between: int = 0,
                 floating_between: int = 0) -> float:
    """Edge-to-edge gap (mm) between two strips with ``strips_between`` strips between
    them, of which ``floating_between`` still have copper (floating copper counts as a
    zero-length stepping stone)."""
    return (strips_between + 1) * pitch_mm - width_mm - floating_between * width_mm


__all__ = ["Plan", "Segment", "Cut", "Link", "Lead", "read_plan", "plan_from_data",
           "is_plan", "row_name", "row_index", "hole_name", "strip_gap_mm", "DEFAULTS"]
