"""NC drill reader: hits, drilled (G85) slots and routed slots.  Units out: millimetres.

The format follows the drilling-machine maker's programming manual (format 2) as
summarised in our format notes, section 2, read leniently where exporters are known to
stray (missing header, tools defined in the body, unstated units or zero modes), with
every such tolerance reported as an :class:`~layoutcheck.model.Assumption`.

Supported: ``M48`` ... ``%``/``M95`` header; ``INCH``/``METRIC`` with ``LZ``/``TZ`` and a
digit template; ``FMAT,2``; ``VER``; ``ICI,ON|OFF``; tools ``T<n>C<d>`` with F/S/B/H/Z;
``T0`` unload; hits; ``R<k>`` repeats; ``G85`` slots; rout paths (``G00``, ``M15``/``M14``,
``G01``, ``G02``/``G03`` with ``A`` or ``I``/``J``, ``M16``/``M17``, ``G05``/``G81``);
``G90``/``G91``; ``G40``-``G42`` (coordinates taken as the tool centre line); ``G93`` zero
set; ``M71``/``M72``; ``M30``/``M00``; ``M45``/``M47`` messages.

Not supported (UnsupportedFeatureError naming the line): step-and-repeat patterns
(``M25``, ``M01``, ``M02``, ``M08``, ``M70``/``M80``/``M90``, ``P`` repeats, ``%`` inside the
body), canned cycles and any other G or M code that may move the tool or cut, ``FMAT,1``.
"""
from __future__ import annotations

import re
from pathlib import Path

from ..errors import InputFileError, LayoutcheckError, ResourceLimitError
from ..limits import DEFAULT_LIMITS, Limits
from .drill_gerber import drill_from_gerber
from .drill_parser import DrillReader
from .holes import DrillFile

__all__ = ["parse_drill", "read_drill", "looks_like_drill", "drill_from_gerber"]


def parse_drill(text: str, name: str, limits: Limits = DEFAULT_LIMITS) -> DrillFile:
    """Read NC drill text into holes in millimetres.

    Parameters
    ----------
    text:
        The whole file.
    name:
        File name, used in error messages and as the weakest plating clue (a name with
        ``NPTH``/``non-plated``/``unplated`` -> non-plated file, ``PTH`` -> plated file).
    limits:
        Safety limits (hole count, coordinate range in mm, tool diameter in mm).

    Returns
    -------
    DrillFile
        Holes in file order: hits as circles of the tool diameter (mm), G85 and routed
        slots as the tool-centre path buffered by d/2.  ``span``/``plated`` from the file
        function comment when present; ``units`` is the file's own unit (``"inch"`` or
        ``"mm"``; geometry is mm regardless); ``notes`` lists everything assumed.

    Raises
    ------
    InputFileError
        Malformed input (with file and line).  ``UnsupportedFeatureError`` for codes this
        reader does not implement, ``ResourceLimitError`` when a limit is exceeded
        (including text longer than ``limits.max_file_bytes`` characters).

    Notes
    -----
    Each known way for bad input to fail is turned into a clear error where it arises.  As
    a last resort, any other exception (a reader bug met on unforeseen input) is re-raised
    as ``InputFileError("internal reader failure on this input: <type>: <message>")`` with
    the file and the line being read, chained to the original; such an error means the
    reader needs a fix.
    """
    if len(text) > limits.max_file_bytes:
        raise ResourceLimitError(f"the text is {len(text)} characters; at most "
                                 f"{limits.max_file_bytes} allowed (max_file_bytes)", file=name)
    reader = DrillReader(name, limits)
    try:
        return reader.run(text)
    except LayoutcheckError:
        raise
    except Exception as exc:  # last resort; see Notes
        raise InputFileError(f"internal reader failure on this input: {type(exc).__name__}: "
                             f"{str(exc)[:200]}", file=name, line=reader.line or None) from exc


def read_drill(path, limits: Limits = DEFAULT_LIMITS) -> DrillFile:
    """Open an NC drill file and read it with :func:`parse_drill` (millimetres out)."""
    p = Path(path)
    try:
        size = p.stat().st_size
        if size > limits.max_file_bytes:
            raise ResourceLimitError(f"file is {size} bytes, over the {limits.max_file_bytes} "
                                     f"byte limit (max_file_bytes)", file=p.name)
        data = p.read_bytes()
    except OSError as exc:
        raise InputFileError(f"cannot read the file: {exc.strerror or exc}",
                             file=p.name) from exc
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        text = data.decode("latin-1")
    return parse_drill(text, p.name, limits)


_SNIFF_UNITS = re.compile(r"^(INCH|METRIC)(,(LZ|TZ|0+\.0+))*$")
_SNIFF_TOOL = re.compile(r"^T\d{1,4}([FSBHZ][+-]?[\d.]+)*C\d*\.?\d+")
_SNIFF_SELECT = re.compile(r"^T\d{1,4}$")
_SNIFF_HIT = re.compile(r"^(X[+-]?[\d.]+(Y[+-]?[\d.]+)?|Y[+-]?[\d.]+)$")


def looks_like_drill(text_head: str) -> bool:
    """Cheap guess whether the start of a file is NC drill (for the file dispatcher).

    True on an ``M48`` line, an ``INCH``/``METRIC`` line, a tool definition such as
    ``T1C0.8``, an ``FMAT`` line or a ``;`` attribute comment; or, for a headerless file,
    a tool selection plus coordinate lines.  Gerber and XML text give False.
    """
    head = text_head[:65536]
    if "%FS" in head or "%MO" in head or head.lstrip().startswith("<"):
        return False
    lines = [ln.strip().upper() for ln in head.splitlines()[:400]]
    lines = [ln for ln in lines if ln]
    if any(ln.endswith("*") for ln in lines):
        return False
    for ln in lines:
        if ln == "M48" or _SNIFF_UNITS.match(ln) or _SNIFF_TOOL.match(ln):
            return True
        if ln.startswith("FMAT,") or (ln.startswith(";") and "#@! TF.FILEFUNCTION" in ln):
            return True
    select = any(_SNIFF_SELECT.match(ln) for ln in lines)
    hits = sum(1 for ln in lines if _SNIFF_HIT.match(ln))
    return select and hits >= 1
