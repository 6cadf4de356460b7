"""The graphics state machine: commands -> graphic objects.  Units: millimetres.

Gerber Layer Format Specification rev. 2024.05, chapter 4 (graphics state, operations
D01/D02/D03, plot modes, apertures, regions, polarity and transforms, SR, AB), chapter 5
(attributes) and chapter 8 (deprecated commands, read the way that chapter describes).
Extended commands (FS, AD, SR, TF ...) live in :mod:`.extended`; word commands here.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import shapely
from shapely.geometry import LineString, MultiPoint, Polygon

from ...errors import InputFileError, ResourceLimitError, UnsupportedFeatureError
from ...geometry import arcs
from ...limits import Limits
from ...model import Assumption
from .apertures import Aperture, apply_matrix, check_scaled_size, transform_matrix
from .attributes import AttributeState, attribute_from_comment
from .build import GeometryBuilder, repair_collapsed, stroke_vertices, vertex_budget
from .coords import CoordinateFormat, UNIT_FACTORS, check_coordinate, parse_number, whole_number
from .extended import attribute_command, run_extended
from .macros import Macro
from .regions import RegionBuilder, region_geometry
from .tokens import Command, Word, comment_text, is_comment, split_fields
from .types import GerberFile, GraphicObject

_KNOWN_G = {1, 2, 3, 4, 36, 37, 54, 55, 70, 71, 74, 75, 90, 91}

#: Largest arc radius (mm) flattened.  No board arc comes near it; far beyond it (about
#: 4e12 mm) the chord count formula of :mod:`layoutcheck.geometry.arcs` breaks down.
MAX_ARC_RADIUS_MM = 1e9


@dataclass
class StepRepeat:
    nx: int
    ny: int
    dx: float
    dy: float
    sink: list
    start: int
    line: int


@dataclass
class Block:
    number: int
    attributes: dict
    line: int
    sink: list = field(default_factory=list)
    saved_sink: list | None = None


class Plotter:
    """Reads commands into a :class:`GerberFile`.  Call :meth:`run` once."""

    def __init__(self, name: str, limits: Limits):
        self.name = name
        self.limits = limits
        self.gf = GerberFile(name)
        self.fmt: CoordinateFormat | None = None
        self.units: str | None = None          # from MO
        self.legacy_units: str | None = None   # from G70/G71
        self.factor: float | None = None
        self.incremental_g91 = False
        self.cur: tuple[float, float] | None = None
        self.aperture: Aperture | None = None
        self.apertures: dict[int, Aperture] = {}
        self.macros: dict[str, Macro] = {}
        self.mode: str | None = None           # "linear", "cw", "ccw"
        self.quadrant: str | None = None       # "single", "multi"
        self.polarity = "dark"
        self.mirror = ""
        self.rotation = 0.0
        self.scale = 1.0
        self.attrs = AttributeState()
        self.region: RegionBuilder | None = None
        self.sr: StepRepeat | None = None
        self.blocks: list[Block] = []
        self.sink: list[GraphicObject] = self.gf.objects
        self.builder = GeometryBuilder()
        self.last_op: str | None = None
        self.ended = False
        self.count = 0
        self.line = 0                          # line of the command being run
        self.repaired = 0                      # shapes made valid after block/SR copies
        self.vertices = 0                      # polygon vertices made so far
        self.max_vertices = vertex_budget(limits)
        self._noted: set[str] = set()

    # ------------------------------------------------------------------ helpers
    def note(self, text: str, line: int | None = None) -> None:
        """Record an assumption once per distinct text."""
        if text in self._noted:
            return
        self._noted.add(text)
        where = f" (first at line {line})" if line else ""
        self.gf.notes.append(Assumption(topic="gerber", text=text + where))

    def fail(self, msg: str, line: int, cls=InputFileError):
        raise cls(msg, file=self.name, line=line)

    def unit_factor(self, line: int) -> float:
        """mm per file unit; assumes inch (with a note) when neither MO nor G70/G71 said."""
        if self.factor is None:
            unit = self.units or self.legacy_units
            if unit is None:
                unit = "inch"
                self.note("no MO (or G70/G71) unit command; assumed inches", line)
            self.gf.units = unit
            self.factor = UNIT_FACTORS[unit]
        return self.factor

    def set_units(self, unit: str, legacy: bool, line: int) -> None:
        if legacy:
            self.note("deprecated G70/G71 unit code", line)
            if self.units is not None:
                if unit != self.units:
                    self.note("G70/G71 disagrees with MO; kept the MO unit", line)
                return
            self.legacy_units = unit
        else:
            if self.factor is not None and self.gf.units != unit:
                self.note("the unit changed after it was first used", line)
            self.units = unit
        self.gf.units = unit
        self.factor = UNIT_FACTORS[unit]

    def add(self, obj: GraphicObject, line: int) -> None:
        self.count += 1
        if self.count > self.limits.max_objects_per_file:
            self.fail(f"more than {self.limits.max_objects_per_file} graphic objects; "
                      "limit max_objects_per_file", line, ResourceLimitError)
        self.sink.append(obj)

    def charge(self, n: int, line: int) -> None:
        """Count ``n`` more polygon vertices; ResourceLimitError past the file's budget
        (checked before copies are made, so memory stays bounded)."""
        self.vertices += int(n)
        if self.vertices > self.max_vertices:
            self.fail(f"the image needs more than {self.max_vertices} polygon vertices "
                      "(limit max_total_vertices); too many or too large objects for one "
                      "file", line, ResourceLimitError)

    def object_attributes(self, ap: Aperture | None) -> dict:
        base = ap.attributes if ap is not None else {}
        if not self.attrs.object:
            return dict(base)
        return {**base, **self.attrs.object}

    # ------------------------------------------------------------------ main loop
    def run(self, commands: list[Command], last_line: int) -> GerberFile:
        commands = iter(commands)
        for cmd in commands:
            self.line = cmd.line
            if self.ended:
                if any(w.text for w in cmd.words):
                    self.note("content after M02 ignored (the file ends at M02)", cmd.line)
                for _ in commands:  # the rest must still be well-formed words
                    pass
                break
            if cmd.extended:
                run_extended(self, cmd.words)
            else:
                self.word(cmd.words[0])
        if not self.ended:
            self.fail("the file ends without M02; expected M02* as the last command (the file "
                      "looks truncated)", last_line)
        self.builder.flush()
        self.repaired += self.builder.repaired
        if self.repaired:
            self.note(f"{self.repaired} object(s) far smaller than the floating-point "
                      "resolution at their position were reduced to their valid part")
        return self.gf

    def finish(self, line: int) -> None:
        """M02: close an open SR, refuse an open region or block."""
        if self.region is not None:
            self.fail(f"M02 inside the region opened at line {self.region.line}; expected G37 "
                      "first", line)
        if self.blocks:
            self.fail(f"M02 inside the block aperture D{self.blocks[-1].number} opened at line "
                      f"{self.blocks[-1].line}; expected %AB*% first", line)
        if self.sr is not None:
            self.note("M02 closed an open step-and-repeat", line)
            self.close_sr(line)
        self.ended = True

    # ------------------------------------------------------------------ word commands
    def word(self, w: Word) -> None:
        text, line = w.text, w.line
        if not text:
            return
        if is_comment(text):
            attr = attribute_from_comment(comment_text(text))
            if attr is not None:
                attribute_command(self, attr, line)
            return
        fields = split_fields(text, self.name, line)
        gcodes: list[int] = []
        dcode = mcode = None
        coords: dict[str, str] = {}
        for letter, value in fields:
            if letter in "XYIJ":
                if letter in coords:
                    self.fail(f"{letter} appears twice in {text!r}", line)
                coords[letter] = value
                continue
            if not (value.isascii() and value.isdigit()):
                self.fail(f"saw {letter}{value!r} in {text!r}; expected {letter} followed by a "
                          "number", line)
            if letter == "G":
                gcodes.append(whole_number(value, "the code G", self.name, line))
            elif letter == "D":
                if dcode is not None:
                    self.fail(f"two D codes in {text[:60]!r}", line)
                dcode = whole_number(value, "the code D", self.name, line)
            elif letter == "M":
                mcode = whole_number(value, "the code M", self.name, line)
            else:
                self.fail(f"saw the code {letter}{value} in {text!r}; expected G, D, M, X, Y, I "
                          "or J codes", line)
        for g in gcodes:
            self.gcode(g, line)
        if dcode is not None:
            if dcode >= 10:
                if coords:
                    self.fail(f"coordinates with an aperture selection in {text!r}; expected "
                              "them with D01/D02/D03", line)
                self.select(dcode, line)
            elif dcode in (1, 2, 3):
                self.operate(dcode, coords, line)
            else:
                self.fail(f"saw D{dcode:02d}; expected D01, D02, D03 or an aperture number "
                          ">= 10", line)
        elif coords:
            if self.last_op == "D01":
                self.note("coordinates without a D code read as D01 (deprecated modal D01)", line)
                self.operate(1, coords, line)
            elif self.last_op == "D02":
                self.note("coordinates without a D code after D02 read as a move (deprecated "
                          "modal D02)", line)
                self.operate(2, coords, line)
            else:
                self.fail(f"coordinates {text!r} without a D code (last operation: "
                          f"{self.last_op or 'none'}); expected D01, D02 or D03", line)
        if mcode is not None:
            if mcode in (0, 2):
                if mcode == 0:
                    self.note("M00 read as M02 (deprecated)", line)
                self.finish(line)
            elif mcode == 1:
                self.note("M01 ignored (deprecated optional stop)", line)
            else:
                self.fail(f"saw M{mcode:02d}; expected M02 (or the deprecated M00/M01)", line)

    def gcode(self, g: int, line: int) -> None:
        if g == 1:
            self.mode = "linear"
        elif g == 2:
            self.mode = "cw"
        elif g == 3:
            self.mode = "ccw"
        elif g == 36:
            if self.region is not None:
                self.fail(f"G36 inside the region opened at line {self.region.line}; expected "
                          "G37 first", line)
            self.region = RegionBuilder(line, {**self.attrs.aperture, **self.attrs.object})
        elif g == 37:
            self.end_region(line)
        elif g in (54, 55):
            self.note(f"deprecated G{g} prefix ignored", line)
        elif g in (70, 71):
            self.set_units("inch" if g == 70 else "mm", True, line)
        elif g == 74:
            self.quadrant = "single"
            self.note("deprecated G74 single-quadrant arc mode", line)
        elif g == 75:
            self.quadrant = "multi"
        elif g in (90, 91):
            self.incremental_g91 = g == 91
            self.note(f"deprecated G{g} (absolute/incremental) code", line)
        else:
            self.fail(f"saw G{g:02d}; expected one of G01, G02, G03, G04, G36, G37, G75 (or "
                      "deprecated G54, G55, G70, G71, G74, G90, G91)", line)

    def select(self, number: int, line: int) -> None:
        ap = self.apertures.get(number)
        if ap is None:
            self.fail(f"aperture D{number} is selected but was never defined; expected an AD "
                      f"(or AB) command for D{number} before this line", line)
        if self.region is not None:
            self.note("aperture selected inside a region (not allowed; no effect on it)", line)
        self.aperture = ap

    # ------------------------------------------------------------------ coordinates
    def target(self, coords: dict[str, str], line: int):
        if not coords:
            if self.cur is None:
                self.note("current point undefined; took (0, 0)", line)
                return (0.0, 0.0), None, None
            return self.cur, None, None
        if self.fmt is None:
            self.fail("coordinates before the format command; expected %FS...*% first", line)
        f = self.unit_factor(line)
        fmt = self.fmt
        incremental = fmt.incremental or self.incremental_g91
        cur = self.cur
        if cur is None and (incremental or "X" not in coords or "Y" not in coords):
            self.note("current point undefined; took (0, 0)", line)
            cur = (0.0, 0.0)
        vals = {}
        for letter, raw in coords.items():
            if letter in "XI":
                v, dec = parse_number(raw, fmt.x_int, fmt.x_dec, fmt.trailing, self.name, line,
                                      letter)
            else:
                v, dec = parse_number(raw, fmt.y_int, fmt.y_dec, fmt.trailing, self.name, line,
                                      letter)
            if dec:
                self.note("a coordinate holds a decimal point; read literally", line)
                if not math.isfinite(v):
                    self.fail(f"saw {letter} with a number of {len(raw)} characters, too large "
                              "for a double; expected a finite coordinate", line,
                              ResourceLimitError)
            vals[letter] = v * f
        if incremental:
            x = cur[0] + vals.get("X", 0.0)
            y = cur[1] + vals.get("Y", 0.0)
        else:
            x = vals["X"] if "X" in vals else cur[0]
            y = vals["Y"] if "Y" in vals else cur[1]
        lim = self.limits.max_coordinate_mm
        if abs(x) > lim or abs(y) > lim:
            check_coordinate(x if abs(x) > lim else y, self.limits, self.name, line)
        return (x, y), vals.get("I"), vals.get("J")

    # ------------------------------------------------------------------ operations
    def operate(self, op: int, coords: dict[str, str], line: int) -> None:
        end, i, j = self.target(coords, line)
        start = self.cur
        if op == 1:
            if start is None:
                self.note("D01 with an undefined current point; started at (0, 0)", line)
                start = (0.0, 0.0)
            self.plot(start, end, i, j, line)
        elif op == 2:
            if self.region is not None:
                self.region.end_contour()
        else:
            self.flash(end, line)
        self.cur = end
        self.last_op = f"D0{op}"

    def plot(self, start, end, i, j, line: int) -> None:
        mode = self.mode
        if mode is None:
            self.note("D01 before any G01/G02/G03; took linear plotting", line)
            mode = self.mode = "linear"
        if mode == "linear":
            pts = np.array([start, end], dtype=float)
        else:
            pts = self.arc_points(start, end, i, j, mode == "cw", line)
        if self.region is not None:
            self.region.add(start, pts[1:], line, self.limits, self.name)
            return
        ap = self.need_aperture(line)
        if self.scale > 1:
            check_scaled_size(ap, self.scale, self.name, line, self.limits)
        kind = "draw" if mode == "linear" else "arc"
        if ap.block is not None:
            self.fail(f"a {kind} with the block aperture {ap.code}; expected a circle "
                      "aperture", line, UnsupportedFeatureError)
        if ap.circle_diameter is not None:
            d = ap.circle_diameter * self.scale
            obj = GraphicObject(None, self.polarity, kind, self.object_attributes(ap), line,
                                ap.code, None, None, d)
            self.charge(stroke_vertices(len(pts), d / 2), line)
            self.builder.add_stroke(obj, pts, d / 2)
            self.add(obj, line)
            return
        if kind == "draw" and ap.convex:
            self.note("draw with a non-circular standard aperture (deprecated); swept as the "
                      "convex hull of the aperture at both ends", line)
            shape = ap.transformed(self.mirror, self.rotation, self.scale)
            if shape.is_empty:
                geom = Polygon()
            else:
                c = shapely.get_coordinates(shape)
                both = np.vstack([c + pts[0], c + pts[-1]])
                geom = MultiPoint(both).convex_hull
                if geom.geom_type != "Polygon":  # collapsed below double resolution
                    self.repaired += 1
                    geom = Polygon()
            self.charge(shapely.get_num_coordinates(geom), line)
            obj = GraphicObject(geom, self.polarity, kind, self.object_attributes(ap), line,
                                ap.code, None, LineString(pts), None)
            self.add(obj, line)
            return
        what = "an arc" if kind == "arc" else "a draw"
        self.fail(f"{what} with aperture {ap.code} ({ap.template}); expected a solid circle "
                  "aperture (the image of this stroke is not defined here)", line,
                  UnsupportedFeatureError)

    def need_aperture(self, line: int) -> Aperture:
        if self.aperture is None:
            self.fail("an operation before any aperture is selected; expected a Dnn (n >= 10) "
                      "selection first", line)
        return self.aperture

    def arc_points(self, start, end, i, j, clockwise: bool, line: int) -> np.ndarray:
        if i is None and j is None:
            self.fail("a circular D01 without I or J; expected the centre offset I...J...",
                      line)
        i = i or 0.0
        j = j or 0.0
        quadrant = self.quadrant
        if quadrant is None:
            self.note("arc before any G74/G75; took G75 (multi-quadrant)", line)
            quadrant = self.quadrant = "multi"
        sx, sy = start
        ex, ey = end
        if quadrant == "multi":
            centre = (sx + i, sy + j)
        else:
            if sx == ex and sy == ey:
                return np.array([start, start], dtype=float)
            centre = self._single_quadrant_centre(start, end, abs(i), abs(j), clockwise, line)
        r0 = math.hypot(sx - centre[0], sy - centre[1])
        r1 = math.hypot(ex - centre[0], ey - centre[1])
        if not max(r0, r1) <= MAX_ARC_RADIUS_MM:
            self.fail(f"an arc of radius {max(r0, r1):g} mm (centre offset I, J from the "
                      f"start); expected at most {MAX_ARC_RADIUS_MM:g} mm", line,
                      ResourceLimitError)
        step = (self.fmt.resolution() if self.fmt else 1e-6) * (self.factor or 1.0)
        if abs(r0 - r1) > 2 * step + 1e-6:
            self.note("an arc's start and end radii differ by more than two coordinate steps; "
                      "radius varied linearly along it", line)
        pts = arcs.arc_points(start, end, centre, clockwise)
        reach = float(np.abs(pts).max())
        if reach > self.limits.max_coordinate_mm:
            check_coordinate(reach, self.limits, self.name, line)
        return pts

    def _single_quadrant_centre(self, start, end, i, j, clockwise, line):
        """G74: of the candidate centres (sx +- I, sy +- J), the one giving an arc of at most
        90 degrees in the commanded direction with the smallest radius mismatch (spec rev.
        2024.05, chapter 8, "Single-quadrant arc mode")."""
        sx, sy = start
        best = None
        for cx in {sx + i, sx - i}:
            for cy in {sy + j, sy - j}:
                sweep = abs(arcs.arc_sweep(start, end, (cx, cy), clockwise))
                mismatch = abs(math.hypot(sx - cx, sy - cy) - math.hypot(end[0] - cx,
                                                                         end[1] - cy))
                ok = sweep <= math.pi / 2 + 1e-6
                key = (not ok, mismatch, cx, cy)
                if best is None or key < best:
                    best = key
        if best[0]:
            self.note("a G74 arc has no candidate centre within 90 degrees; took the one with "
                      "the smallest radius mismatch", line)
        return best[2], best[3]

    def flash(self, pt, line: int) -> None:
        if self.region is not None:
            self.fail(f"D03 (flash) inside the region opened at line {self.region.line}; "
                      "expected only D01/D02 until G37", line)
        ap = self.need_aperture(line)
        if self.scale > 1:
            check_scaled_size(ap, self.scale, self.name, line, self.limits)
        if ap.block is not None:
            self.flash_block(ap, pt, line)
            return
        d = ap.circle_diameter * self.scale if ap.circle_diameter is not None else None
        obj = GraphicObject(None, self.polarity, "flash", self.object_attributes(ap), line,
                            ap.code, pt, None, d)
        shape = ap.transformed(self.mirror, self.rotation, self.scale)
        self.charge(shapely.get_num_coordinates(shape), line)
        self.builder.add_flash(obj, shape, pt[0], pt[1])
        self.add(obj, line)

    def flash_block(self, ap: Aperture, pt, line: int) -> None:
        """Insert the block's objects, transformed (LM/LR/LS) and moved to ``pt``; under
        LPC every polarity is inverted (spec rev. 2024.05, "Block aperture (AB)")."""
        objs = ap.block
        if not objs:
            return
        if self.count + len(objs) > self.limits.max_objects_per_file:
            self.fail(f"flashing block {ap.code} would exceed {self.limits.max_objects_per_file} "
                      "graphic objects; limit max_objects_per_file", line, ResourceLimitError)
        m = transform_matrix(self.mirror, self.rotation, self.scale)
        off = (float(pt[0]), float(pt[1]))
        geoms = np.empty(len(objs), dtype=object)
        geoms[:] = [o.geometry for o in objs]
        self.charge(shapely.get_num_coordinates(geoms).sum(), line)
        geoms = apply_matrix(geoms, m, off)
        self._check_reach(geoms, ap.code, line)
        self.repaired += repair_collapsed(geoms)
        path_idx = [k for k, o in enumerate(objs) if o.path is not None]
        paths = {}
        if path_idx:
            arr = np.empty(len(path_idx), dtype=object)
            arr[:] = [objs[k].path for k in path_idx]
            paths = dict(zip(path_idx, apply_matrix(arr, m, off)))
        invert = self.polarity == "clear"
        extra = {**ap.attributes, **self.attrs.object}
        for k, o in enumerate(objs):
            point = None
            if o.point is not None:
                px, py = m @ np.asarray(o.point, dtype=float) + off
                point = (float(px), float(py))
            pol = o.polarity
            if invert:
                pol = "dark" if pol == "clear" else "clear"
            attrs = {**extra, **o.attributes} if extra else dict(o.attributes)
            dia = o.aperture_diameter * self.scale if o.aperture_diameter is not None else None
            self.add(GraphicObject(geoms[k], pol, o.kind, attrs, o.line, o.aperture, point,
                                   paths.get(k), dia), line)

    def _check_reach(self, geoms: np.ndarray, what: str, line: int) -> None:
        """ResourceLimitError when a flashed block's objects reach beyond the coordinate
        limit; LS may scale a block without bound, so this is checked on the result."""
        if len(geoms) == 0:
            return
        b = shapely.bounds(geoms)
        with np.errstate(invalid="ignore"):
            reach = np.fmax.reduce(np.abs(b), axis=None)
        if not np.isnan(reach) and not reach <= self.limits.max_coordinate_mm:
            self.fail(f"{what} places copper {float(reach):g} mm from the origin; expected at "
                      f"most {self.limits.max_coordinate_mm:g} mm (limit max_coordinate_mm)",
                      line, ResourceLimitError)

    def end_region(self, line: int) -> None:
        rb = self.region
        if rb is None:
            self.fail("G37 without an open region; expected G36 before it", line)
        rb.end_contour()
        self.region = None
        step = self.fmt.resolution() * self.unit_factor(line) if self.fmt else 1e-6
        geom = region_geometry(rb, step, self.name, self.note)
        if not rb.contours:
            self.note("an empty region (G36 ... G37 with no contour) made no object", line)
            return
        self.charge(shapely.get_num_coordinates(geom), line)
        self.add(GraphicObject(geom, self.polarity, "region", dict(rb.attributes), line), line)

    # ------------------------------------------------------------------ step and repeat
    def open_sr(self, nx: int, ny: int, dx: float, dy: float, line: int) -> None:
        if self.blocks:
            self.fail("SR inside a block aperture; expected SR outside AB", line)
        if self.region is not None:
            self.fail("SR inside a region; expected G37 first", line)
        if self.sr is not None:
            self.note("a new SR closed the open one (deprecated habit)", line)
            self.close_sr(line)
        if nx == 1 and ny == 1:
            return
        reach = max(abs(dx) * (nx - 1), abs(dy) * (ny - 1))
        if reach > self.limits.max_coordinate_mm:
            check_coordinate(reach, self.limits, self.name, line)
        if nx * ny > self.limits.max_step_repeat:
            self.fail(f"SR asks for {nx} x {ny} = {nx * ny} copies; at most "
                      f"{self.limits.max_step_repeat} allowed (limit max_step_repeat)", line,
                      ResourceLimitError)
        self.sr = StepRepeat(nx, ny, dx, dy, self.sink, len(self.sink), line)

    def close_sr(self, line: int) -> None:
        sr = self.sr
        if sr is None:
            return
        self.sr = None
        self.cur = None
        self.builder.flush()
        objs = sr.sink[sr.start:]
        k = len(objs)
        copies = sr.nx * sr.ny - 1
        if k == 0 or copies == 0:
            return
        if k * (copies + 1) > self.limits.max_step_repeat_objects:
            self.fail(f"SR opened at line {sr.line} makes {k * (copies + 1)} objects; at most "
                      f"{self.limits.max_step_repeat_objects} allowed (limit "
                      "max_step_repeat_objects)", line, ResourceLimitError)
        if self.count + k * copies > self.limits.max_objects_per_file:
            self.fail(f"SR opened at line {sr.line} would exceed "
                      f"{self.limits.max_objects_per_file} graphic objects; limit "
                      "max_objects_per_file", line, ResourceLimitError)
        # copy order: +Y first, then +X; copy (0, 0) is the originals
        offs = np.array([(ix * sr.dx, iy * sr.dy) for ix in range(sr.nx) for iy in range(sr.ny)
                         ][1:], dtype=float)
        base = np.empty(k, dtype=object)
        base[:] = [o.geometry for o in objs]
        self.charge(shapely.get_num_coordinates(base).sum() * copies, line)
        geoms = _translate_tiled(base, offs)
        self.repaired += repair_collapsed(geoms)
        path_idx = [n for n, o in enumerate(objs) if o.path is not None]
        tiled_paths = None
        if path_idx:
            pbase = np.empty(len(path_idx), dtype=object)
            pbase[:] = [objs[n].path for n in path_idx]
            tiled_paths = _translate_tiled(pbase, offs)
        pos_of = {n: p for p, n in enumerate(path_idx)}
        for c, (ox, oy) in enumerate(offs):
            for n, o in enumerate(objs):
                point = None if o.point is None else (o.point[0] + ox, o.point[1] + oy)
                path = None
                if tiled_paths is not None and n in pos_of:
                    path = tiled_paths[c * len(path_idx) + pos_of[n]]
                self.add(GraphicObject(geoms[c * k + n], o.polarity, o.kind, dict(o.attributes),
                                       o.line, o.aperture, point, path, o.aperture_diameter),
                         o.line)


def _translate_tiled(base: np.ndarray, offsets: np.ndarray) -> np.ndarray:
    """``len(offsets)`` translated copies of every geometry in ``base``, copy-major."""
    import shapely

    tiled = np.tile(base, len(offsets))
    per_geom = np.repeat(offsets, len(base), axis=0)
    counts = shapely.get_num_coordinates(tiled)
    per_coord = np.repeat(per_geom, counts, axis=0)
    return shapely.transform(tiled, lambda c: c + per_coord)
