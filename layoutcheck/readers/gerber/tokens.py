"""Gerber text -> commands (words and extended-command blocks) with 1-based line numbers.

Gerber Layer Format Specification rev. 2024.05, chapter 3: a file is a stream of words,
each ending in ``*``.  Word commands stand alone (``X100Y200D01*``); extended commands sit
between ``%`` ... ``%`` and may hold several words (``%FSLAX26Y26*MOMM*%``; an ``AM`` keeps
all its words together).  CR and LF carry no meaning, so a word may be split over lines;
the line of a word is the line of its first non-blank character.
"""
from __future__ import annotations

import re
from collections.abc import Iterator
from dataclasses import dataclass

from ...errors import InputFileError

_DELIM = re.compile(r"[%*]")
_FIELD = re.compile(r"([A-Z])([^A-Z]*)")
_COMMENT = re.compile(r"^\s*[Gg]0*4(?![0-9])")


@dataclass(frozen=True)
class Word:
    """One ``*``-terminated word: its text (CR/LF removed, outer blanks stripped) and line."""

    text: str
    line: int


@dataclass(frozen=True)
class Command:
    """A word command (``words`` has one item) or an extended block (``extended=True``)."""

    words: tuple[Word, ...]
    extended: bool

    @property
    def line(self) -> int:
        return self.words[0].line


def _clean(raw: str, base_line: int) -> tuple[str, int]:
    """Strip a raw word; return its text without CR/LF and the line of its first character."""
    stripped = raw.lstrip()
    lead = len(raw) - len(stripped)
    line = base_line + raw.count("\n", 0, lead)
    text = stripped.rstrip()
    if "\n" in text or "\r" in text:
        text = text.replace("\r", "").replace("\n", "")
    return text, line


def tokenize(text: str, name: str) -> tuple[list[Command], int]:
    """Split Gerber ``text`` into commands.

    Returns the commands and the number of the last line that holds any text.  Raises
    :class:`InputFileError` for a word that does not end in ``*`` (for example ``%FSLAX26Y26%``
    or a file cut off in the middle of a word) or an extended block left open.
    """
    return list(iter_commands(text, name)), last_text_line(text)


def iter_commands(text: str, name: str) -> Iterator[Command]:
    """The commands of ``text`` one at a time, as :func:`tokenize` finds them.

    Lazy, so a reader that stops early (a safety limit reached) never splits the rest of
    a huge file.  The errors of :func:`tokenize` are raised when the scan reaches them.
    """
    pos = 0
    line = 1  # line number at ``pos``
    in_ext = False
    ext_words: list[Word] = []
    ext_line = 1
    for m in _DELIM.finditer(text):
        end = m.start()
        raw = text[pos:end]
        delim = m.group()
        if delim == "*":
            word, wline = _clean(raw, line)
            if in_ext:
                ext_words.append(Word(word, wline))
            else:
                yield Command((Word(word, wline),), False)
        else:  # '%'
            word, wline = _clean(raw, line)
            if word:
                raise InputFileError(
                    f"saw {word[:40]!r} followed by '%'; expected every word to end in '*'",
                    file=name, line=wline)
            if in_ext:
                if ext_words:  # an empty '%%' pair holds nothing and is skipped
                    yield Command(tuple(ext_words), True)
                ext_words = []
                in_ext = False
            else:
                in_ext = True
                ext_line = line + raw.count("\n")
        line += raw.count("\n")
        pos = m.end()
    tail = text[pos:]
    word, wline = _clean(tail, line)
    if word:
        raise InputFileError(
            f"saw {word[:40]!r} at the end of the file; expected it to end in '*' "
            "(the file looks truncated)", file=name, line=wline)
    if in_ext:
        raise InputFileError("an extended command opened with '%' is never closed; expected '%' "
                             "(the file looks truncated)", file=name, line=ext_line)


def last_text_line(text: str) -> int:
    """1-based number of the last line of ``text`` that holds anything but blanks."""
    stripped = text.rstrip()
    return stripped.count("\n") + 1


def is_comment(word: str) -> bool:
    """True for a ``G04`` comment word (any spelling: ``G4``, ``G004``, ``g04``)."""
    return _COMMENT.match(word) is not None


def comment_text(word: str) -> str:
    """The text of a ``G04`` comment word, without the code."""
    m = _COMMENT.match(word)
    return word[m.end():] if m else word


def split_fields(word: str, name: str, line: int) -> list[tuple[str, str]]:
    """Split a word command into (letter, value) pairs: ``G01X10Y-5D01`` -> G,01 X,10 ...

    Letters are upper-cased; blanks are dropped.  Raises :class:`InputFileError` when the
    word does not start with a letter.
    """
    up = word.upper()
    if " " in up or "\t" in up:
        up = up.replace(" ", "").replace("\t", "")
    if not up or not ("A" <= up[0] <= "Z"):
        fields = []
    else:
        fields = _FIELD.findall(up)
    if not fields:
        raise InputFileError(f"saw the word {word[:40]!r}; expected codes and coordinates "
                             "such as 'X100Y200D01'", file=name, line=line)
    return fields
