"""NC drill number formats: units, zero modes and digit counts.  Numbers out: millimetres.

An NC drill coordinate is either a decimal number (read literally) or a string of digits
whose meaning depends on three things the file may or may not state:

* the unit: ``INCH`` / ``METRIC`` header lines, ``M72`` / ``M71`` in the body;
* the zero mode, as the drilling-machine programming manual defines it:
  ``LZ`` = leading zeros present, trailing zeros dropped (right-pad the digits to the full
  count, then place the decimal point); ``TZ`` = trailing zeros present, leading zeros
  dropped (integer / 10^decimals);
* the digit counts: a template such as ``000.000`` on the unit line, a
  ``; FORMAT={3:3/ ...}`` or ``;FILE_FORMAT=2:5`` comment, else inch 2.4 / metric 3.3.

A decimal point always overrides the zero mode and digit counts.  Whatever had to be
assumed is reported once as an :class:`~layoutcheck.model.Assumption` with topic
``"drill-format"``.
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field

from ..model import Assumption
from ..units import MM_PER_INCH

INCH = "inch"
METRIC = "metric"

#: Digits (integer, decimal) a unit uses when the file does not say.
DEFAULT_DIGITS = {INCH: (2, 4), METRIC: (3, 3)}

#: Zero modes.  ``LZ``: leading zeros present (trailing dropped).  ``TZ``: trailing zeros
#: present (leading dropped).  ``keep``: both kept (full digit strings; read like TZ).
ZERO_MODES = ("LZ", "TZ", "keep")

# groups: sign, integer digits, "." or None, decimal digits or None.  Written without
# overlapping repeats so that a failing match on a long digit string is linear.
_NUMBER = re.compile(r"^([+-]?)(\d*)(?:(\.)(\d*))?$")
_TEMPLATE = re.compile(r"^(0+)\.(0+)$")
_FORMAT_COMMENT = re.compile(
    r"FORMAT\s*=\s*\{\s*([\d-]+)\s*:\s*([\d-]+)\s*/([^{}]*)\}", re.IGNORECASE)
# ("[^{}]" not "[^}]": a search from each "FORMAT={" then stops at the next "{", so a long
# comment of repeated openings without "}" is scanned in linear, not quadratic, time)
_FILE_FORMAT_COMMENT = re.compile(r"^FILE_FORMAT\s*=\s*(\d+)\s*:\s*(\d+)\s*$", re.IGNORECASE)


#: Most digits a format may give the integer or the decimal part.  Real formats use 2 to 6
#: (2.4 inch, 3.3 metric...); the bound keeps a hostile count (a billion digits) from
#: building a number of that many digits.
MAX_FORMAT_DIGITS = 9


def _digit_counts(ints: str, decs: str, where: str) -> tuple[int, int]:
    """``(ints, decs)`` as whole numbers; ``ValueError`` beyond :data:`MAX_FORMAT_DIGITS`."""
    if len(ints.lstrip("0")) > 1 or len(decs.lstrip("0")) > 1:  # 10 or more
        raise ValueError(f"{where} gives {ints[:12]}:{decs[:12]} digits; expected at most "
                         f"{MAX_FORMAT_DIGITS} integer and {MAX_FORMAT_DIGITS} decimal digits")
    return int(ints), int(decs)


@dataclass
class FormatStatement:
    """What one line (command or comment) says about the number format.

    ``None`` fields are not stated by that line.  ``digits`` applies to ``units`` if given,
    else to the unit in force.
    """

    units: str | None = None
    zeros: str | None = None
    digits: tuple[int, int] | None = None
    incremental: bool | None = None


def parse_units_line(code: str) -> FormatStatement:
    """Read an ``INCH[,LZ|,TZ][,00.0000]`` / ``METRIC[,...]`` header line.

    Raises ``ValueError`` naming the field that is neither a zero mode nor a digit template.
    """
    parts = [p for p in code.split(",")]
    head = parts[0]
    if head not in ("INCH", "METRIC"):
        raise ValueError(f"expected INCH or METRIC, got {head!r}")
    st = FormatStatement(units=INCH if head == "INCH" else METRIC)
    for part in parts[1:]:
        if part in ("LZ", "TZ"):
            st.zeros = part
            continue
        m = _TEMPLATE.match(part)
        if m:
            st.digits = _digit_counts(str(len(m.group(1))), str(len(m.group(2))),
                                      f"the {head} digit template")
            continue
        if part == "":
            continue
        raise ValueError(f"{head} line field {part!r} is neither LZ, TZ nor a digit "
                         f"template like 000.000")
    return st


def parse_format_comment(text: str) -> FormatStatement | None:
    """Read a ``FORMAT={3:3/ absolute / metric / suppress leading zeros}`` comment.

    Returns ``None`` when the comment is not of this kind.  ``-:-`` digits (decimal
    coordinates) state no digit counts.  Raises ``ValueError`` for digit counts above
    :data:`MAX_FORMAT_DIGITS`.
    """
    m = _FORMAT_COMMENT.search(text)
    if not m:
        return None
    st = FormatStatement()
    if m.group(1).isdigit() and m.group(2).isdigit():
        st.digits = _digit_counts(m.group(1), m.group(2), "the FORMAT comment")
    for word in (w.strip().lower() for w in m.group(3).split("/")):
        if word == "absolute":
            st.incremental = False
        elif word == "incremental":
            st.incremental = True
        elif word in ("metric", "mm"):
            st.units = METRIC
        elif word in ("inch", "inches", "imperial"):
            st.units = INCH
        elif "leading" in word and "suppress" in word:
            st.zeros = "TZ"
        elif "trailing" in word and "suppress" in word:
            st.zeros = "LZ"
        elif "keep" in word and "zero" in word:
            st.zeros = "keep"
    return st


def parse_file_format_comment(text: str) -> FormatStatement | None:
    """Read a ``FILE_FORMAT=2:5`` comment (digit counts only); ``None`` if not one.

    Raises ``ValueError`` for digit counts above :data:`MAX_FORMAT_DIGITS`.
    """
    m = _FILE_FORMAT_COMMENT.match(text.strip())
    if not m:
        return None
    return FormatStatement(digits=_digit_counts(m.group(1), m.group(2),
                                                "the FILE_FORMAT comment"))


@dataclass
class NumberFormat:
    """The number format in force while a drill file is read.

    Statements from command lines (``INCH``/``METRIC``/``M71``/``M72``) take precedence over
    statements from comments; a comment that disagrees with a command is reported as a note.
    """

    name: str
    units: str = INCH
    zeros: str | None = None
    digits: dict[str, tuple[int, int]] = field(default_factory=lambda: dict(DEFAULT_DIGITS))
    #: where each part was stated: None (not), "command" or "comment" (+ line)
    units_src: tuple[str, int] | None = None
    zeros_src: tuple[str, int] | None = None
    digits_src: dict[str, tuple[str, int]] = field(default_factory=dict)
    notes: list[Assumption] = field(default_factory=list)
    _noted: set = field(default_factory=set)

    # -- statements -------------------------------------------------------------------
    def apply(self, st: FormatStatement, line: int, *, from_comment: bool) -> None:
        """Take what a header line or comment states (see class docstring for precedence)."""
        kind = "comment" if from_comment else "command"
        if st.units is not None:
            if self._takes(self.units_src, from_comment, self.units, st.units, "unit", line):
                self.units = st.units
                self.units_src = (kind, line)
        if st.zeros is not None:
            if self._takes(self.zeros_src, from_comment, self.zeros, st.zeros, "zero mode",
                           line):
                self.zeros = st.zeros
                self.zeros_src = (kind, line)
        if st.digits is not None:
            unit = st.units or self.units
            src = self.digits_src.get(unit)
            if self._takes(src, from_comment, self.digits[unit], st.digits, "digit format",
                           line):
                self.digits[unit] = st.digits
                self.digits_src[unit] = (kind, line)

    def _takes(self, src, from_comment, old, new, what, line) -> bool:
        if src is None or old == new:
            return True
        if src[0] == "command" and from_comment:
            self._note(f"{self.name} line {line}: a comment states {what} {new!r} but the "
                       f"command on line {src[1]} states {old!r}; the command is used")
            return False
        if src[0] == "comment" and not from_comment:
            self._note(f"{self.name} line {line}: the command states {what} {new!r}, "
                       f"overriding {old!r} from the comment on line {src[1]}")
        return True

    def set_units(self, units: str, line: int) -> None:
        """Body unit switch (``M71`` metric, ``M72`` inch)."""
        self.units = units
        self.units_src = ("command", line)

    # -- numbers ----------------------------------------------------------------------
    def value_mm(self, raw: str, line: int) -> float:
        """Convert one coordinate or distance string to millimetres.

        Raises ``ValueError`` (message says what was seen and expected) when ``raw`` is
        not a number or has more digits than a leading-zero format allows.
        """
        m = _NUMBER.match(raw)
        if m is None or (not m.group(2) and not m.group(4)):
            raise ValueError(f"expected a number (digits with an optional sign and decimal "
                             f"point), got {raw!r}")
        if self.units_src is None and "units" not in self._noted:
            self._note(f"{self.name}: the file states no unit (INCH/METRIC, M71/M72); "
                       f"inch was assumed (first number at line {line})", key="units")
        if m.group(3):
            value = float(raw)
        else:
            value = self._integer_value(m.group(2), line)
            if m.group(1) == "-":
                value = -value
        return value * MM_PER_INCH if self.units == INCH else value

    def literal_mm(self, raw: str, line: int) -> float:
        """A size such as a tool diameter: a plain number in file units, to millimetres.

        Tool sizes are written with a decimal point; one without is read as a whole
        number of file units (and noted).
        """
        m = _NUMBER.match(raw)
        if m is None or (not m.group(2) and not m.group(4)):
            raise ValueError(f"expected a number, got {raw!r}")
        if self.units_src is None:
            self._note(f"{self.name}: the file states no unit (INCH/METRIC, M71/M72); "
                       f"inch was assumed (first number at line {line})", key="units")
        if not m.group(3):
            self._note(f"{self.name} line {line}: size {raw!r} has no decimal point; read as "
                       f"a whole number of {self.unit_word()}", key=("size", line))
        value = float(raw)
        return value * MM_PER_INCH if self.units == INCH else value

    def _integer_value(self, digits: str, line: int) -> float:
        ints, decs = self.digits[self.units]
        key = ("format", self.units, self.zeros, ints, decs)
        if key not in self._noted:
            assumed = []
            if self.zeros is None:
                assumed.append("leading zeros suppressed")
            if self.units not in self.digits_src and self.units_src is None:
                # with the unit stated, 2.4 (inch) / 3.3 (metric) is the manual's default
                assumed.append(f"{ints}.{decs} digits")
            if assumed:
                zeros = ("leading zeros present" if self.zeros == "LZ"
                         else "leading zeros suppressed")
                self._note(f"{self.name}: coordinates without a decimal point were read as "
                           f"{self.unit_word()} {ints}.{decs}, {zeros}; not stated in the "
                           f"file: {', '.join(assumed)} (first such number at line {line})",
                           key=key)
            else:
                self._noted.add(key)
        if self.zeros == "LZ":
            if len(digits) > ints + decs:
                raise ValueError(f"{len(digits)} digits {digits!r} with leading zeros present "
                                 f"(LZ); expected at most {ints + decs} for the {ints}.{decs} "
                                 f"format")
            digits = digits.ljust(ints + decs, "0")
        if len(digits) > 30:
            raise ValueError(f"expected a coordinate of at most {ints + decs} digits, got "
                             f"{len(digits)} digits")
        return int(digits) / 10 ** decs

    def unit_word(self) -> str:
        return "inch" if self.units == INCH else "metric (mm)"

    def _note(self, text: str, key=None) -> None:
        key = key if key is not None else text
        if key in self._noted:
            return
        self._noted.add(key)
        self.notes.append(Assumption(topic="drill-format", text=text))
