"""IPC-D-356 / IPC-D-356A bare-board test netlists: text in, a :class:`Netlist` out.

The file is ASCII, one record per line, fixed columns (column 1 = first character; shared
format notes section 4, from a public application note on IPC-D-356A):

* ``C`` in column 1: a comment.
* ``P`` in column 1: a parameter, keyword from column 4 and value after it
  (``P  UNITS CUST 1``, ``P  JOB``, ``P  VER IPC-D-356A``, ``P  IMAGE PRIMARY``).
  ``P  NNAME<k>`` maps the alias ``NNAME<k>`` (the keyword) to a full net name (columns
  15..72) for names that do not fit the 14-column net field; records then carry the alias.
* test records, columns:

  ====== ==========================================================================
  1-3    operation code: ``317`` through hole, ``327`` surface feature, ``367``
         non-plated hole, ``307`` blind/buried via (span ``Lnn Lnn`` in 75-80),
         ``099`` test point, ``017``/``027`` continuation of the previous 317/327
  4-17   net name (or an NNAME alias; ``N/C`` = a single-point net)
  21-26  reference designator (``VIA`` for vias), 27 ``-``, 28-31 pin
  32     ``M`` for a mid-net point
  33-38  ``D`` + hole diameter (4 digits) + ``P`` plated / ``U`` unplated
  39-41  access: ``A00`` both sides, ``A01`` top, ``A0n`` layer/side n
  42-57  ``X`` sign 6 digits, ``Y`` sign 6 digits (blank sign = +)
  58-71  feature size ``X`` 4 digits, ``Y`` 4 digits, rotation ``R`` 3 digits
  73-74  ``S`` + solder mask (0 none, 1 primary, 2 secondary, 3 both)
  ====== ==========================================================================

* ``999``: end of file.  A file without it is taken as truncated (an error).

Units (``P  UNITS``; one only): ``CUST 0`` or ``CUST`` inches and degrees, ``CUST 1``
millimetres and degrees, ``CUST 2`` inches and radians, ``SI`` metric; numbers are integers
in 0.0001 in or 0.001 mm.  No UNITS line: CUST 0 is assumed and said so (format notes 4.1,
marked "from memory").  Everything returned is in millimetres and degrees.

Fields are read by column first; a record whose columns do not line up (tabs, shifted
fields) is read field by field with patterns instead (``A(\\d\\d)``, ``X..Y..``,
``D(\\d+)([PU])``), as the format notes (section 4.4) advise, and that is noted.
Coordinates with more than 6 digits are accepted the same way.  Records of other kinds
(conductors 378/078, outlines 389, adjacency 379, resistor/capacitor data 370/380,
non-test features 390, mask clearance 088) carry no test point; they are counted and
noted, not read.  Records of a panel image (after ``P  IMAGE`` other than ``PRIMARY``)
repeat the board and are not read either (noted).  An unknown record kind is an error.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from pathlib import Path

from ..errors import InputFileError, ResourceLimitError, UnsupportedFeatureError
from ..limits import DEFAULT_LIMITS, Limits
from ..model import Assumption

#: UNITS value -> (millimetres per coordinate unit, angle unit).
UNITS = {"CUST 0": (0.00254, "deg"), "CUST": (0.00254, "deg"), "CUST 1": (0.001, "deg"),
         "CUST 2": (0.00254, "rad"), "SI": (0.001, "deg")}
#: Test-point record kinds read here.
TEST_CODES = frozenset({"317", "327", "367", "307", "099", "017", "027"})
#: Continuation code -> the record kind it continues.
CONTINUES = {"017": "317", "027": "327"}
#: Record kinds that carry no test point; counted and noted, not read.
OTHER_CODES = frozenset({"378", "078", "389", "089", "379", "079", "370", "070", "380",
                         "080", "390", "090", "088"})
#: Net field value of a single-point (isolated) net.
NO_CONNECT = "N/C"
#: Reference designator of a via.
VIA_REF = "VIA"

_XY_COLS = re.compile(r"X([+\- ])(\d{6})Y([+\- ])(\d{6})")
_XY_FREE = re.compile(r"X\s*([+-]?)\s*(\d+)\s*Y\s*([+-]?)\s*(\d+)")
_SIZE = re.compile(r"^(?:X(\d{4}))?(?:Y(\d{4}))?(?:R(\d{3}))?\s*(?:S(\d))?")
_SPAN = re.compile(r"L(\d\d)\s*L(\d\d)")
_ACCESS = re.compile(r"A(\d\d)")
_HOLE = re.compile(r"D(\d+)([PU])")
_FIELDS = re.compile(
    r"^(?P<op>\d{3})(?P<net>\S*)\s+(?:(?P<ref>[^\s\-]+)\s*-\s*(?P<pin>[^\s]*?))?\s*"
    r"(?P<mid>M)?\s*(?:D(?P<dia>\d+)(?P<pl>[PU]))?\s*A(?P<acc>\d\d)")
_HEAD_RECORD = re.compile(r"^(?:317|327|367|307|017|027|099|999)(?:[ +\-A-Za-z0-9_/]|$)")
_HEAD_PARAM = re.compile(r"^P  (?:JOB|UNITS|VER|IMAGE|NNAME|TITLE|NUM|REV|CODE)")


@dataclass(frozen=True)
class NetRecord:
    """One test-point record, in board millimetres.

    line:      1-based line in the file.
    code:      operation code as written (``"317"``, ``"027"``...).
    kind:      the record kind after continuation (``"317"`` for a ``017``).
    net:       full net name (aliases resolved); ``""`` when the field is blank,
               ``"N/C"`` for a single-point net.
    ref, pin:  reference designator (``"VIA"`` for a via) and pin; ``""`` when blank.
    mid:       ``M`` flag (a mid-net point).
    hole_mm:   hole diameter (mm) or ``None``; ``plated`` True/False/None.
    access:    0 both sides, 1 top, n layer or side n.
    x, y:      the point (mm).
    size_x, size_y: feature size (mm) when given; ``rotation`` in degrees when given.
    mask:      solder-mask code 0..3 when given.
    span:      (first, last) layer numbers of a 307 record, when given.
    text:      the record as written (trailing blanks removed).
    """

    line: int
    code: str
    kind: str
    net: str
    ref: str
    pin: str
    mid: bool
    hole_mm: float | None
    plated: bool | None
    access: int
    x: float
    y: float
    size_x: float | None = None
    size_y: float | None = None
    rotation: float | None = None
    mask: int | None = None
    span: tuple[int, int] | None = None
    text: str = ""

    @property
    def is_via(self) -> bool:
        """True when the record is a via (reference ``VIA``)."""
        return self.ref.upper() == VIA_REF

    @property
    def through(self) -> bool:
        """True for a plated through-hole point (317 and its continuations)."""
        return self.kind == "317"


@dataclass
class Netlist:
    """A parsed IPC-D-356(A) file.

    name:     file name (for messages).
    units:    the UNITS value used (``"CUST 1"``...).
    version:  the ``VER`` value, if any.
    job:      the ``JOB`` value, if any.
    aliases:  NNAME alias -> full net name.
    records:  test-point records of the primary image, in file order (mm).
    notes:    what the parser assumed or did not read.
    """

    name: str
    units: str = "CUST 0"
    version: str | None = None
    job: str | None = None
    aliases: dict[str, str] = field(default_factory=dict)
    records: list[NetRecord] = field(default_factory=list)
    notes: list[Assumption] = field(default_factory=list)

    def nets(self) -> list[str]:
        """Every net name the records carry (not blank, not ``N/C``), sorted."""
        return sorted({r.net for r in self.records if r.net and r.net != NO_CONNECT})


def looks_like_ipc356(head: str) -> bool:
    """True when ``head`` (the start of a file) reads as an IPC-D-356 netlist.

    It must hold a test record (317/327/367/307/017/027/099/999 in columns 1-3) or a
    parameter line (``P  UNITS``, ``P  JOB``...), and no Gerber (``%``, ``G04``) or NC drill
    (``M48``) header line.
    """
    hits = 0
    for raw in head.splitlines()[:200]:
        line = raw.rstrip("\r\n")
        if not line.strip():
            continue
        s = line.lstrip()
        if s.startswith(("%", "G04", "M48")):
            return False
        if _HEAD_RECORD.match(line) or _HEAD_PARAM.match(line):
            hits += 1
        elif not (line[0] == "C" or line.startswith("P  ")):
            return False
        if hits >= 1 and len(line) >= 3 and line[:3] in TEST_CODES:
            return True
    return hits > 0


def read_ipc356(path: Path | str, *, limits: Limits = DEFAULT_LIMITS,
                name: str | None = None) -> Netlist:
    """Read an IPC-D-356(A) file from disk (see :func:`parse_ipc356`).  Units: mm."""
    path = Path(path)
    name = name or path.name
    if not path.is_file():
        raise InputFileError("no such netlist file", file=str(path))
    size = path.stat().st_size
    if size > limits.max_file_bytes:
        raise ResourceLimitError(f"file is {size} bytes; the limit for one file is "
                                 f"{limits.max_file_bytes}", file=name)
    data = path.read_bytes()
    return parse_ipc356(decode(data), name)


def decode(data: bytes) -> str:
    """The text of a netlist file (UTF-8, else Latin-1)."""
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError:
        return data.decode("latin-1")


@dataclass
class _Raw:
    """A record before units are applied: integer fields in file units."""

    line: int
    code: str
    kind: str
    net: str
    ref: str
    pin: str
    mid: bool
    hole: int | None
    plated: bool | None
    access: int
    x: int
    y: int
    sx: int | None
    sy: int | None
    rot: int | None
    mask: int | None
    span: tuple[int, int] | None
    text: str


def parse_ipc356(text: str, name: str) -> Netlist:
    """Parse the text of an IPC-D-356(A) netlist (see the module docstring).

    Parameters
    ----------
    text:
        The whole file.
    name:
        File name used in messages and errors.

    Returns
    -------
    Netlist
        Test-point records of the primary image with coordinates and sizes in
        millimetres, rotations in degrees, aliases resolved to full net names.

    Raises
    ------
    InputFileError
        With ``file=name`` and ``line=`` for a malformed record, a bad or repeated UNITS,
        a continuation with nothing to continue, an undefined alias, no test records, or
        no ``999`` end record (a truncated file).
    UnsupportedFeatureError
        For a record kind this reader does not know.
    """
    nl = Netlist(name)
    units: str | None = None
    units_line = 0
    raws: list[_Raw] = []
    other: dict[str, int] = {}
    image_skipped = 0
    in_primary = True
    ended = False
    after_end = 0
    fallback_lines: list[int] = []
    prev: _Raw | None = None
    for lineno, raw_line in enumerate(text.splitlines(), start=1):
        line = raw_line.rstrip("\r\n").rstrip()
        if ended:
            if line.strip():
                after_end += 1
            continue
        if not line.strip():
            continue
        c0 = line[0]
        if c0 == "C":
            continue
        if c0 == "P":
            words = line[3:].split(None, 1) if len(line) > 3 else []
            if line[1:3].strip() or not words:
                raise InputFileError(
                    f"parameter line {line!r} is malformed; expected 'P', two blanks and a "
                    "keyword from column 4 (e.g. 'P  UNITS CUST 1')", file=name, line=lineno)
            key = words[0].upper()
            value = words[1].strip() if len(words) > 1 else ""
            if key == "UNITS":
                u = " ".join(value.upper().split())
                if u not in UNITS:
                    raise InputFileError(
                        f"UNITS {value!r} is not known; expected CUST 0, CUST 1, CUST 2 or SI",
                        file=name, line=lineno)
                if units is not None and UNITS[u] != UNITS[units]:
                    raise InputFileError(
                        f"a second UNITS line ({u}) differs from the first ({units}, line "
                        f"{units_line}); a netlist has one unit", file=name, line=lineno)
                units, units_line = u, lineno
            elif key.startswith("NNAME"):
                if not value:
                    raise InputFileError(
                        f"alias {words[0]} names no net; expected the full net name from "
                        "column 15", file=name, line=lineno)
                nl.aliases[words[0]] = value
            elif key == "IMAGE":
                in_primary = value.upper().startswith("PRIMARY") or not value
            elif key == "VER":
                nl.version = value
            elif key == "JOB":
                nl.job = value
            continue
        code = line[:3]
        if code == "999":
            ended = True
            continue
        if not code.isdigit():
            raise InputFileError(
                f"line {line[:40]!r} is not a netlist record; expected C (comment), P "
                "(parameter), a 3-digit operation code (317, 327, 367...) or 999",
                file=name, line=lineno)
        if code in OTHER_CODES:
            other[code] = other.get(code, 0) + 1
            continue
        if code not in TEST_CODES:
            raise UnsupportedFeatureError(
                f"record kind {code} is not supported; expected 317, 327, 367, 307, 017, "
                "027, 099 (test points) or 378/389/379/370/380/390/088 (not read)",
                file=name, line=lineno)
        if not in_primary:
            image_skipped += 1
            continue
        rec, by_fields = _parse_record(line, lineno, name)
        if by_fields:
            fallback_lines.append(lineno)
        if code in CONTINUES:
            if prev is None or prev.kind != CONTINUES[code]:
                seen = "nothing" if prev is None else f"a {prev.code} record (line {prev.line})"
                raise InputFileError(
                    f"continuation record {code} follows {seen}; expected it right after a "
                    f"{CONTINUES[code]} record (or another continuation of one)",
                    file=name, line=lineno)
            rec.kind = prev.kind
            if not rec.net:
                rec.net = prev.net
            if not rec.ref:
                rec.ref, rec.pin = prev.ref, prev.pin
        elif code == "099" and not rec.net and prev is not None:
            # a test point of the feature just before it: same net when left blank
            rec.net = prev.net
        raws.append(rec)
        if code not in ("099",):
            prev = rec

    if not ended:
        last = len(text.splitlines())
        raise InputFileError(
            "the file ends without the 999 end record; it looks truncated (expected 999 "
            "after the last record)", file=name, line=max(last, 1))
    if not raws:
        raise InputFileError("the netlist holds no test records (317, 327, 367, 307); "
                             "expected at least one", file=name, line=1)
    if units is None:
        units = "CUST 0"
        nl.notes.append(Assumption("units", f"{name}: no UNITS line; taken as CUST 0 "
                                   "(inches, 0.0001 in per unit)"))
    nl.units = units
    scale, angle = UNITS[units]

    for r in raws:
        net = r.net
        if net in nl.aliases:
            net = nl.aliases[net]
        elif net.upper().startswith("NNAME") and nl.aliases:
            raise InputFileError(
                f"net field {net!r} looks like an alias but no P NNAME line defines it; "
                f"aliases defined: {', '.join(sorted(nl.aliases))}", file=name, line=r.line)
        rot = None
        if r.rot is not None:
            rot = float(r.rot) if angle == "deg" else math.degrees(r.rot)
        nl.records.append(NetRecord(
            line=r.line, code=r.code, kind=r.kind, net=net, ref=r.ref, pin=r.pin, mid=r.mid,
            hole_mm=None if r.hole is None else r.hole * scale, plated=r.plated,
            access=r.access, x=r.x * scale, y=r.y * scale,
            size_x=None if r.sx is None else r.sx * scale,
            size_y=None if r.sy is None else r.sy * scale,
            rotation=rot, mask=r.mask, span=r.span, text=r.text))

    if fallback_lines:
        shown = ", ".join(str(n) for n in fallback_lines[:5])
        more = f" and {len(fallback_lines) - 5} more" if len(fallback_lines) > 5 else ""
        nl.notes.append(Assumption("netlist", (
            f"{name}: {len(fallback_lines)} record(s) do not keep the fixed columns (lines "
            f"{shown}{more}); read field by field")))
    if other:
        what = ", ".join(f"{n} x {c}" for c, n in sorted(other.items()))
        nl.notes.append(Assumption("netlist", (
            f"{name}: records without test points not read ({what}); the copper comes from "
            "the Gerber files")))
    if image_skipped:
        nl.notes.append(Assumption("netlist", (
            f"{name}: {image_skipped} record(s) of panel images (P IMAGE other than "
            "PRIMARY) not read; only the primary image is matched to the board")))
    if after_end:
        nl.notes.append(Assumption("netlist", (
            f"{name}: {after_end} line(s) after the 999 end record ignored")))
    return nl


def _parse_record(line: str, lineno: int, name: str) -> tuple[_Raw, bool]:
    """One test record, by columns; falls back to fields when the columns do not fit."""
    try:
        return _by_columns(line, lineno, name), False
    except _ColumnMismatch:
        return _by_fields(line, lineno, name), True


class _ColumnMismatch(Exception):
    pass


def _by_columns(line: str, lineno: int, name: str) -> _Raw:
    code = line[:3]
    padded = line.ljust(80)
    if "\t" in line:
        raise _ColumnMismatch
    net = padded[3:17].strip()
    if padded[17:20].strip() or " " in net:
        raise _ColumnMismatch
    ref = padded[20:26].strip()
    dash = padded[26]
    pin = padded[27:31].strip()
    if dash not in "- " or (dash == " " and (ref or pin)) or " " in ref or " " in pin:
        raise _ColumnMismatch
    mid = padded[31] == "M"
    if padded[31] not in "M ":
        raise _ColumnMismatch
    hole = plated = None
    if padded[32] == "D":
        digits, pu = padded[33:37], padded[37]
        if not digits.isdigit() or pu not in "PU":
            raise _ColumnMismatch
        hole, plated = int(digits), pu == "P"
    elif padded[32:38].strip():
        raise _ColumnMismatch
    acc = padded[38:41]
    if acc[0] != "A" or not acc[1:].isdigit():
        raise _ColumnMismatch
    m = _XY_COLS.match(padded, 41)
    if m is None:
        raise _ColumnMismatch
    x = _signed(m.group(1), m.group(2))
    y = _signed(m.group(3), m.group(4))
    sx, sy, rot, mask = _sizes(padded[57:], lineno, name)
    span = _span(code, padded, lineno, name)
    return _Raw(lineno, code, code, net, ref, pin, mid, hole, plated, int(acc[1:]), x, y,
                sx, sy, rot, mask, span, line)


def _by_fields(line: str, lineno: int, name: str) -> _Raw:
    code = line[:3]
    flat = line.replace("\t", " ")
    m = _FIELDS.match(flat)
    xy = _XY_FREE.search(flat, m.end() if m else 0)
    if m is None or xy is None:
        acc = _ACCESS.search(flat, 3)
        seen = "no access code (A00, A01...)" if acc is None else \
            "no coordinates (X+nnnnnnY+nnnnnn)"
        raise InputFileError(
            f"record {code} is malformed: {seen} found in {line.strip()!r}; expected the "
            "fixed columns net 4-17, reference 21-26, pin 28-31, hole 33-38, access 39-41, "
            "X/Y 42-57", file=name, line=lineno)
    hole = plated = None
    if m.group("dia") is not None:
        hole, plated = int(m.group("dia")), m.group("pl") == "P"
    x = _signed(xy.group(1), xy.group(2))
    y = _signed(xy.group(3), xy.group(4))
    sx, sy, rot, mask = _sizes(flat[xy.end():].lstrip(), lineno, name)
    span = _span(code, flat, lineno, name)
    return _Raw(lineno, code, code, m.group("net") or "", m.group("ref") or "",
                m.group("pin") or "", bool(m.group("mid")), hole, plated,
                int(m.group("acc")), x, y, sx, sy, rot, mask, span, line)


def _signed(sign: str, digits: str) -> int:
    v = int(digits)
    return -v if sign == "-" else v


def _sizes(tail: str, lineno: int, name: str):
    m = _SIZE.match(tail)
    sx = sy = rot = mask = None
    if m:
        sx = int(m.group(1)) if m.group(1) else None
        sy = int(m.group(2)) if m.group(2) else None
        rot = int(m.group(3)) if m.group(3) else None
        mask = int(m.group(4)) if m.group(4) else None
    if rot is not None and rot > 360:
        raise InputFileError(f"rotation R{rot:03d} is out of range; expected 000..360",
                             file=name, line=lineno)
    if mask is not None and mask > 3:
        raise InputFileError(f"solder mask code S{mask} is out of range; expected S0..S3",
                             file=name, line=lineno)
    return sx, sy, rot, mask


def _span(code: str, text: str, lineno: int, name: str) -> tuple[int, int] | None:
    if code != "307":
        return None
    m = _SPAN.search(text, 57)
    if m is None:
        return None
    a, b = int(m.group(1)), int(m.group(2))
    if a < 1 or b < 1:
        raise InputFileError(f"layer span L{a:02d} L{b:02d} is not valid; layers count "
                             "from L01", file=name, line=lineno)
    return (min(a, b), max(a, b))


__all__ = ["Netlist", "NetRecord", "parse_ipc356", "read_ipc356", "looks_like_ipc356",
           "decode", "UNITS", "NO_CONNECT", "VIA_REF"]
