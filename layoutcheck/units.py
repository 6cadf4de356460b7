"""Units and small parsers.

Inside layoutcheck every length is a millimetre, every voltage a volt, every current an
ampere and every inductance a henry.  Conversion happens once, at the reader boundary, with
the factors below.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass

MM_PER_INCH = 25.4
MM_PER_MIL = 0.0254
MM_PER_MICRON = 0.001

#: Largest distance (mm) between a flattened arc chord and the true arc.  0.5 um keeps
#: flattening error far below the 1 um agreement the distance checks promise.
CHORD_TOLERANCE_MM = 0.0005

#: Distances are reported and compared to this resolution (mm): 0.1 um.
DISTANCE_RESOLUTION_MM = 1e-4


@dataclass(frozen=True, order=True)
class VoltageRange:
    """A node voltage in volts: fixed (lo == hi) or swinging between lo and hi."""

    lo: float
    hi: float

    def __post_init__(self):
        if self.lo > self.hi:
            object.__setattr__(self, "lo", self.hi)
            object.__setattr__(self, "hi", self.lo)

    def difference_to(self, other: "VoltageRange") -> float:
        """Largest voltage between a node of this range and a node of ``other`` (V)."""
        return max(self.hi - other.lo, other.hi - self.lo, 0.0)

    def text(self) -> str:
        if self.lo == self.hi:
            return f"{_fmt(self.lo)} V"
        return f"{_fmt(self.lo)}..{_fmt(self.hi)} V"


def _fmt(v: float) -> str:
    return f"{v:g}"


_RANGE = re.compile(r"^\s*([-+]?\d+(?:\.\d*)?|[-+]?\.\d+)\s*(?:V)?\s*\.\.\s*"
                    r"([-+]?\d+(?:\.\d*)?|[-+]?\.\d+)\s*(?:V)?\s*$", re.IGNORECASE)


def parse_voltage(value) -> VoltageRange:
    """Parse a project-file voltage: a number (volts) or a ``"lo..hi"`` string.

    Raises ``ValueError`` with the accepted forms when the value is neither.
    """
    if isinstance(value, bool):
        raise ValueError(f"expected a number of volts or 'lo..hi', got {value!r}")
    if isinstance(value, (int, float)):
        if not math.isfinite(value):
            raise ValueError(f"expected a finite number of volts, got {value!r}")
        return VoltageRange(float(value), float(value))
    if isinstance(value, str):
        m = _RANGE.match(value)
        if m:
            return VoltageRange(float(m.group(1)), float(m.group(2)))
        try:
            v = float(value.strip().rstrip("Vv"))
        except ValueError:
            pass
        else:
            if math.isfinite(v):
                return VoltageRange(v, v)
    raise ValueError(f"expected a number of volts or a range like \"0..340\", got {value!r}")
