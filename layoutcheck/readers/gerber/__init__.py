"""Gerber reader (RS-274X with X2/X3 attributes).  Geometry in millimetres.

Follows the Gerber Layer Format Specification rev. 2024.05 for every graphics command,
and reads the deprecated commands of its chapter 8 the way that chapter describes (the
whole-image transforms MI, OF, SF, AS and IR only with their identity values).

Public API
----------
parse_gerber(text, name, limits)  -> GerberFile
read_gerber(path, limits)         -> GerberFile
resolve_polarity(objects)         -> [(Polygon, GraphicObject), ...]
image(gerber_file)                -> shapely geometry
looks_like_gerber(text_head)      -> bool
"""
from __future__ import annotations

import os
import re

from ...errors import InputFileError, LayoutcheckError, ResourceLimitError
from ...limits import DEFAULT_LIMITS, Limits
from .plot import Plotter
from .polarity import image, resolve_polarity
from .tokens import last_text_line, iter_commands
from .types import GerberFile, GraphicObject

__all__ = ["parse_gerber", "read_gerber", "resolve_polarity", "image", "looks_like_gerber",
           "GerberFile", "GraphicObject"]


def parse_gerber(text: str, name: str, limits: Limits = DEFAULT_LIMITS) -> GerberFile:
    """Parse the text of one Gerber file.

    Parameters
    ----------
    text:
        The whole file as text.
    name:
        File name used in error messages and stored as ``GerberFile.name``.
    limits:
        Safety limits; exceeding one raises :class:`ResourceLimitError`.

    Returns
    -------
    GerberFile
        Every graphic object in file order (geometry in mm), file attributes, notes.

    Raises
    ------
    InputFileError
        Malformed or truncated input (with ``file`` and ``line`` set);
        :class:`UnsupportedFeatureError` / :class:`ResourceLimitError` are subclasses.
        ``ResourceLimitError`` also when ``text`` is longer than ``limits.max_file_bytes``
        characters.

    Notes
    -----
    The text is split into commands lazily, so a file that reaches a safety limit early is
    refused without reading the rest.  Each known way for bad input to fail is turned into
    a clear error where it arises.  As a last resort, any other exception (a reader bug
    met on unforeseen input) is re-raised as ``InputFileError("internal reader failure on
    this input: <type>: <message>")`` with the file and the line of the command being read,
    chained to the original; such an error means the reader needs a fix.
    """
    if len(text) > limits.max_file_bytes:
        raise ResourceLimitError(f"the text is {len(text)} characters; at most "
                                 f"{limits.max_file_bytes} allowed (limit max_file_bytes)",
                                 file=name)
    plotter = Plotter(name, limits)
    try:
        return plotter.run(iter_commands(text, name), last_text_line(text))
    except LayoutcheckError:
        raise
    except Exception as exc:  # last resort; see Notes
        raise InputFileError(f"internal reader failure on this input: {type(exc).__name__}: "
                             f"{str(exc)[:200]}", file=name, line=plotter.line or None) from exc


def read_gerber(path, limits: Limits = DEFAULT_LIMITS) -> GerberFile:
    """Read a Gerber file from ``path`` (decoded as UTF-8, else latin-1).  Units: mm."""
    name = os.path.basename(os.fspath(path))
    try:
        size = os.path.getsize(path)
    except OSError as exc:
        raise InputFileError(f"cannot read the file: {exc.strerror}", file=name) from exc
    if size > limits.max_file_bytes:
        raise ResourceLimitError(f"the file is {size} bytes; at most {limits.max_file_bytes} "
                                 "allowed (limit max_file_bytes)", file=name)
    try:
        with open(path, "rb") as fh:
            data = fh.read()
    except OSError as exc:
        raise InputFileError(f"cannot read the file: {exc.strerror}", file=name) from exc
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        text = data.decode("latin-1")
    if text.startswith("\ufeff"):
        text = text[1:]
    return parse_gerber(text, name, limits)


_SNIFF = re.compile(
    r"%\s*(?:FS[LTD]?[AI]?X\d|MO(?:MM|IN)|ADD\d|AM[._$a-zA-Z]|TF\.|TA\.|TO\.|LP[DC]|IP(?:POS|NEG)"
    r"|LN|IN)"
    r"|(?:^|\*)\s*G0*4[ #*]"
    r"|(?:^|\*)\s*(?:G0*[123])?(?:X[+-]?\d+)?(?:Y[+-]?\d+)?D0*[123]\*",
    re.MULTILINE)


def looks_like_gerber(text_head: str) -> bool:
    """Cheap sniff of the first few kilobytes: True when Gerber commands appear.

    Looks for extended commands (``%FS``, ``%MO``, ``%ADD``, ``%TF.``...), ``G04`` comments
    or ``D01*``-style operations.  NC drill text (``M48``, ``T1C0.8``, ``;`` comments)
    matches none of them.
    """
    return _SNIFF.search(text_head) is not None
