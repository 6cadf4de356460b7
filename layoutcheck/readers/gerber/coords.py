"""Coordinate format (FS) and units (MO, legacy G70/G71): file numbers -> millimetres.

Gerber Layer Format Specification rev. 2024.05, "Coordinate commands" (MO, FS); deprecated
forms from chapter 8: trailing-zero omission, incremental notation.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass

from ...errors import InputFileError, ResourceLimitError
from ...limits import Limits
from ...units import MM_PER_INCH

_FS = re.compile(r"^FS([LTD])?([AI])?(?:N\d+)?(?:G\d+)?X(\d)(\d)Y(\d)(\d)(?:[DMZ]\d+)*$")
_INT = re.compile(r"^[+-]?\d+$")
_DEC = re.compile(r"^[+-]?(?:\d+(?:\.\d*)?|\.\d+)$")  # no overlapping repeats: linear

UNIT_FACTORS = {"mm": 1.0, "inch": MM_PER_INCH}


@dataclass(frozen=True)
class CoordinateFormat:
    """Digits of a coordinate number.

    trailing:     ``True`` for the deprecated trailing-zero omission (``FST``).
    incremental:  ``True`` for the deprecated incremental notation (``FS.I``).
    """

    x_int: int
    x_dec: int
    y_int: int
    y_dec: int
    trailing: bool = False
    incremental: bool = False

    def resolution(self) -> float:
        """Smallest step in file units (the coarser of the two axes)."""
        return 10.0 ** -min(self.x_dec, self.y_dec)


def parse_fs(word: str, name: str, line: int) -> tuple[CoordinateFormat, list[str]]:
    """Parse an FS word.  Returns the format and the texts of notes about it."""
    m = _FS.match(word.replace(" ", ""))
    if not m:
        raise InputFileError(f"saw the format command {word!r}; expected e.g. 'FSLAX26Y26'",
                             file=name, line=line)
    zeros, mode, xi, xd, yi, yd = m.groups()
    notes = []
    if zeros in (None, "D"):
        notes.append(f"FS has zero-omission letter {zeros or 'none'!r}; read as leading "
                     "zeros omitted (L)")
    if mode is None:
        notes.append("FS has no absolute/incremental letter; read as absolute (A)")
    if zeros == "T":
        notes.append("FS uses trailing-zero omission (deprecated); coordinates right-padded")
    if mode == "I":
        notes.append("FS uses incremental coordinates (deprecated); coordinates accumulated")
    if (xi, xd) != (yi, yd):
        notes.append("FS gives X and Y different digit counts; each axis read with its own")
    fmt = CoordinateFormat(int(xi), int(xd), int(yi), int(yd), trailing=zeros == "T",
                           incremental=mode == "I")
    return fmt, notes


#: Most significant digits read in an integer coordinate.  With at most 9 decimals (FS
#: takes one digit per count) 30 digits is 10^21 file units or more, beyond any board; the
#: bound keeps Python's int conversion (4300 digits) and int -> float (1e308) in range.
MAX_COORDINATE_DIGITS = 30


def whole_number(digits: str, what: str, name: str, line: int) -> int:
    """A whole number written as ``digits`` (aperture, block and code numbers).

    Gerber integers are 32-bit (spec rev. 2024.05, "Data types"): more than 10
    significant digits raise :class:`InputFileError` instead of reaching ``int()``.
    """
    sig = digits.lstrip("0")
    if len(sig) > 10:
        raise InputFileError(f"saw {what} {digits[:20]}... with {len(sig)} digits; expected "
                             "a whole number below 2^31", file=name, line=line)
    return int(sig or "0")


def parse_number(value: str, n_int: int, n_dec: int, trailing: bool, name: str,
                 line: int, letter: str) -> tuple[float, bool]:
    """A coordinate number in file units; the flag is True when it held a decimal point."""
    if _INT.match(value):
        n_sig = len(value.lstrip("+-").lstrip("0"))
        if n_sig > MAX_COORDINATE_DIGITS:
            raise InputFileError(
                f"saw {letter}{value[:20]}... with {n_sig} digits; expected a coordinate of at "
                f"most {MAX_COORDINATE_DIGITS} digits (format {n_int}.{n_dec} has "
                f"{n_int + n_dec})", file=name, line=line)
        if trailing:
            sign = -1.0 if value[0] == "-" else 1.0
            digits = value.lstrip("+-")
            width = n_int + n_dec
            if len(digits) < width:
                digits = digits + "0" * (width - len(digits))
            return sign * int(digits.lstrip("0") or "0") / 10.0 ** n_dec, False
        sign = -1 if value[0] == "-" else 1
        return sign * int(value.lstrip("+-").lstrip("0") or "0") / 10.0 ** n_dec, False
    if _DEC.match(value):
        return float(value), True
    raise InputFileError(f"saw {letter}{value!r}; expected a signed integer coordinate",
                         file=name, line=line)


def parse_decimal(value: str, what: str, name: str, line: int) -> float:
    """A plain decimal number (aperture sizes, SR steps, LR angles...)."""
    v = value.strip()
    if not _DEC.match(v):
        raise InputFileError(f"saw {v[:40]!r} for {what}; expected a decimal number",
                             file=name, line=line)
    out = float(v)
    if not math.isfinite(out):
        raise InputFileError(f"saw a number of {len(v)} characters for {what}, too large for a "
                             "double; expected a finite decimal number", file=name, line=line)
    return out


def check_coordinate(value_mm: float, limits: Limits, name: str, line: int) -> None:
    """Raise :class:`ResourceLimitError` for a coordinate beyond ``max_coordinate_mm``."""
    if abs(value_mm) > limits.max_coordinate_mm:
        raise ResourceLimitError(
            f"saw a coordinate of {value_mm:g} mm; expected at most "
            f"{limits.max_coordinate_mm:g} mm from the origin (limit max_coordinate_mm)",
            file=name, line=line)


def parse_mo(word: str, name: str, line: int) -> str:
    """``MOMM`` -> ``"mm"``, ``MOIN`` -> ``"inch"``."""
    v = word[2:].strip().upper()
    if v == "MM":
        return "mm"
    if v == "IN":
        return "inch"
    raise InputFileError(f"saw the unit command {word!r}; expected 'MOMM' or 'MOIN'",
                         file=name, line=line)
