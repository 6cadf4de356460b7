"""Plated or non-plated: the clues an NC drill file carries.  No lengths here.

NC drill has no native plating flag; exporters add comments, and file names say it too.
From strongest to weakest (our format notes, section 2.5):

1. a per-tool X2 attribute comment ``; #@! TA.AperFunction,Plated,PTH,ViaDrill``
   (``NonPlated,NPTH,ComponentDrill``...), applying to the next tool definition;
2. the whole file's function comment ``; #@! TF.FileFunction,Plated,1,2,PTH`` /
   ``NonPlated,1,2,NPTH`` (``MixedPlating,1,2`` gives the span only);
3. ``;TYPE=PLATED`` / ``;TYPE=NON_PLATED``, applying to the tools defined after it;
4. ``PTH`` / ``NPTH`` (``non-plated``, ``unplated``) in the file name (whole file only).
"""
from __future__ import annotations

import re
from dataclasses import dataclass

# "\s*+" (possessive): with no name, two plain "\s*" around it would split a long run of
# blanks in every possible way before failing (quadratic time)
_ATTRIBUTE = re.compile(r"^#@!\s*(TF|TA|TO|TD)\s*+(\.?[A-Za-z_$][\w.$]*)?\s*+(?:,(.*))?$")
_TYPE = re.compile(r"^TYPE\s*=\s*(PLATED|NON_PLATED|NONPLATED|NON-PLATED)\s*$", re.IGNORECASE)
_NAME_NONPLATED = re.compile(r"(?<![a-z0-9])(npth|non[-_ ]?plated|unplated)(?![a-z0-9])",
                             re.IGNORECASE)
_NAME_PLATED = re.compile(r"(?<![a-z0-9])pth(?![a-z0-9])", re.IGNORECASE)


@dataclass(frozen=True)
class PlatingClue:
    """What one clue says: ``plated`` True/False/None, its basis text, a hole function."""

    plated: bool | None
    basis: str
    function: str | None = None


@dataclass(frozen=True)
class FileFunction:
    """A drill file's ``.FileFunction``: plating (None for MixedPlating), span, raw text."""

    plated: bool | None
    span: tuple[int, int]
    text: str
    hole_type: str | None = None

    @property
    def basis(self) -> str:
        return f"TF.FileFunction {self.text}"


def parse_attribute_comment(text: str) -> tuple[str, str, tuple[str, ...]] | None:
    """Split a ``#@! TF.FileFunction,Plated,1,2,PTH`` comment body.

    ``text`` is the comment without its ``;``.  Returns (command, name, fields), e.g.
    ``("TF", ".FileFunction", ("Plated", "1", "2", "PTH"))``, or ``None`` if the comment
    is not an attribute comment.
    """
    m = _ATTRIBUTE.match(text.strip())
    if not m:
        return None
    fields = tuple(f.strip() for f in m.group(3).split(",")) if m.group(3) is not None else ()
    return m.group(1), m.group(2) or "", fields


def file_function(fields: tuple[str, ...]) -> FileFunction | None:
    """Interpret ``.FileFunction`` fields of a drill file.

    ``Plated,<from>,<to>,<type>[,Drill|Rout|Mixed]``, ``NonPlated,...`` and
    ``MixedPlating,<from>,<to>`` give a plating and a span; other functions give ``None``.
    Raises ``ValueError`` when the layer numbers are not positive whole numbers.
    """
    if not fields or fields[0] not in ("Plated", "NonPlated", "MixedPlating"):
        return None
    if len(fields) < 3:
        raise ValueError(f"expected {fields[0]},<from layer>,<to layer>..., got "
                         f"{','.join(fields)!r}")
    try:
        a, b = int(fields[1]), int(fields[2])
    except ValueError:
        raise ValueError(f"expected whole layer numbers in {','.join(fields)!r}") from None
    if a < 1 or b < 1:
        raise ValueError(f"expected layer numbers of 1 or more in {','.join(fields)!r}")
    plated = {"Plated": True, "NonPlated": False, "MixedPlating": None}[fields[0]]
    hole_type = fields[3] if len(fields) > 3 else None
    return FileFunction(plated, (min(a, b), max(a, b)), ",".join(fields), hole_type)


def aper_function_clue(fields: tuple[str, ...]) -> PlatingClue | None:
    """Interpret ``.AperFunction`` fields of a drill tool comment.

    ``Plated,PTH,ViaDrill`` -> plated, function ``ViaDrill``; ``NonPlated,NPTH,...`` ->
    non-plated; a bare ``ViaDrill`` (no plating fields) gives the function only.
    """
    if not fields or not fields[0]:
        return None
    basis = f"TA.AperFunction {','.join(fields)} comment"
    if fields[0] in ("Plated", "NonPlated"):
        function = fields[2] if len(fields) > 2 and fields[2] else None
        return PlatingClue(fields[0] == "Plated", basis, function)
    return PlatingClue(None, basis, fields[0])


def type_comment(text: str) -> PlatingClue | None:
    """Interpret a ``TYPE=PLATED`` / ``TYPE=NON_PLATED`` comment (without its ``;``)."""
    m = _TYPE.match(text.strip())
    if not m:
        return None
    plated = m.group(1).upper() == "PLATED"
    return PlatingClue(plated, f";TYPE={m.group(1).upper()} comment")


def plating_from_name(name: str) -> bool | None:
    """``False`` if the file name has the word NPTH / non-plated / unplated, ``True`` if it
    has PTH, else ``None``.  Only the last path component is looked at."""
    base = re.split(r"[\\/]", name)[-1]
    if _NAME_NONPLATED.search(base):
        return False
    if _NAME_PLATED.search(base):
        return True
    return None


def hole_plating(tool_clue: PlatingClue | None, function: FileFunction | None,
                 type_clue: PlatingClue | None) -> tuple[bool | None, str]:
    """Plating of one tool's holes: TA comment, then file function, then ``;TYPE=``."""
    if tool_clue is not None and tool_clue.plated is not None:
        return tool_clue.plated, tool_clue.basis
    if function is not None and function.plated is not None:
        return function.plated, f"{function.basis} comment"
    if type_clue is not None:
        return type_clue.plated, type_clue.basis
    return None, ""
