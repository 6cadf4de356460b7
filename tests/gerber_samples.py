"""Tiny hand-written Gerber texts and checks shared by the tests/test_gerber_*.py files.

Coordinates in the helpers are millimetres written with the format FSLAX46Y46 (6 decimals,
so 1 mm = 1000000), as the Gerber Layer Format Specification rev. 2024.05 recommends.

Tolerances: arcs and circles are flattened so that no chord strays more than
``CHORD_TOLERANCE_MM`` (0.5 um) from the true curve.  An area may therefore differ from the
exact value by at most (length of the curved boundary) x 0.5 um, and a bound by about 0.5 um.
"""
from __future__ import annotations

import math

from layoutcheck.readers.gerber import parse_gerber
from layoutcheck.units import CHORD_TOLERANCE_MM

TOL = CHORD_TOLERANCE_MM
HEADER = "%FSLAX46Y46*%\n%MOMM*%\n"


def c(v: float) -> str:
    """A coordinate number for FSLAX46Y46 (mm -> integer millionths)."""
    return str(int(round(v * 1_000_000)))


def xy(x: float | None = None, y: float | None = None) -> str:
    out = ""
    if x is not None:
        out += "X" + c(x)
    if y is not None:
        out += "Y" + c(y)
    return out


def ij(i: float, j: float) -> str:
    return f"I{c(i)}J{c(j)}"


def doc(body: str, header: str = HEADER, end: str = "M02*\n") -> str:
    """A whole file: header + body + M02."""
    return header + body + end


def parse(body: str, header: str = HEADER, **kw):
    """Parse ``body`` wrapped in the mm header and M02."""
    return parse_gerber(doc(body, header), "test.gbr", **kw)


def area_ok(actual: float, exact: float, curved_length: float, extra: float = 1e-9) -> bool:
    """|actual - exact| within the flattening allowance of the curved boundary (mm^2)."""
    return abs(actual - exact) <= curved_length * TOL * 1.05 + extra


def bounds_ok(actual, exact, tol: float = 2 * TOL) -> bool:
    return all(abs(a - e) <= tol for a, e in zip(actual, exact))


def disc_band_area(r: float, h: float) -> float:
    """Area of a disc of radius r cut to the band |y| <= h (h <= r): the integral of the
    chord length 2*sqrt(r^2 - y^2) from -h to h (elementary calculus)."""
    return 2 * (h * math.sqrt(r * r - h * h) + r * r * math.asin(h / r))
