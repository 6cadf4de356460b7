"""Coordinates, units, operations and arcs (G75 multi-quadrant, G74 single-quadrant).

Source: Gerber Layer Format Specification rev. 2024.05 §4.2 [Coordinate commands: MO,
FS], §4.7 [Plot state commands], §4.8 [Operations], §8 [Deprecated format elements]
(section numbers recalled from memory; titles in brackets).
"""
from __future__ import annotations

import math

import numpy as np
import pytest

from gerber_samples import TOL, area_ok, ij, parse, xy
from layoutcheck.errors import InputFileError
from layoutcheck.readers.gerber import parse_gerber

PRE = "%ADD10C,0.2*%\nD10*\n"


def arc_length_ok(length: float, exact: float, r: float) -> bool:
    """A chord of sagitta s on radius r is shorter than its arc by a factor of about
    1 - s/(3r) (series of sin(a/2)/(a/2)); with s <= TOL the total stays within TOL/r."""
    return exact * (1 - TOL / r) - 1e-12 <= length <= exact + 1e-9


def radii(path, centre):
    p = np.asarray(path.coords)
    return np.hypot(p[:, 0] - centre[0], p[:, 1] - centre[1])


# ---------------------------------------------------------------- G75 arcs
def test_quarter_arc_ccw():
    """§4.7.2 [Circular plotting]: G03 from (5,0) to (0,5) with centre offset (-5,0) is the
    first-quadrant quarter circle of radius 5: length 5 pi/2; a C 0.2 stroke has area
    length x 0.2 + pi 0.01 (two half-disc caps)."""
    gf = parse(PRE + f"G75*\nG03*\n{xy(5, 0)}D02*\n{xy(0, 5)}{ij(-5, 0)}D01*\n")
    o = gf.objects[0]
    assert o.kind == "arc" and o.aperture_diameter == pytest.approx(0.2)
    r = radii(o.path, (0, 0))
    assert np.all(np.abs(r - 5) <= 1e-9)             # chord vertices lie on the arc
    assert o.path.coords[0] == (5, 0) and o.path.coords[-1] == (0, 5)
    assert np.all(np.asarray(o.path.coords) >= -1e-9)  # stays in the first quadrant
    assert arc_length_ok(o.path.length, 5 * math.pi / 2, 5)
    assert area_ok(o.geometry.area, 5 * math.pi / 2 * 0.2 + math.pi * 0.01,
                   2 * 5 * math.pi / 2 + 0.2 * math.pi)


def test_quarter_points_clockwise_is_three_quarters():
    """§4.7.2: the same end points clockwise sweep 270 degrees (length 15 pi/2)."""
    gf = parse(PRE + f"G75*\nG02*\n{xy(5, 0)}D02*\n{xy(0, 5)}{ij(-5, 0)}D01*\n")
    p = gf.objects[0].path
    assert arc_length_ok(p.length, 15 * math.pi / 2, 5)
    assert np.asarray(p.coords)[:, 1].min() == pytest.approx(-5, abs=TOL)


def test_half_arc_clockwise_passes_top():
    """§4.7.2: G02 from (-5,0) to (5,0) about (0,0) goes through (0,5)."""
    gf = parse(PRE + f"G75*\nG02*\n{xy(-5, 0)}D02*\n{xy(5, 0)}{ij(5, 0)}D01*\n")
    p = np.asarray(gf.objects[0].path.coords)
    assert p[:, 1].max() == pytest.approx(5, abs=TOL) and p[:, 1].min() >= -1e-9


def test_full_circle():
    """§4.7.2: with G75 a start point equal to the end point is a full circle.  Stroke of
    C 0.2 on radius 5: annulus pi (5.1^2 - 4.9^2) = 2 pi."""
    gf = parse(PRE + f"G75*\n{xy(5, 0)}D02*\nG03{xy(5, 0)}{ij(-5, 0)}D01*\n")
    o = gf.objects[0]
    assert arc_length_ok(o.path.length, 10 * math.pi, 5)
    assert area_ok(o.geometry.area, 2 * math.pi, 2 * math.pi * 10)
    assert len(o.geometry.interiors) == 1


def test_missing_g75_noted():
    """§4.7.2: G75 must precede the first arc; we assume it and say so."""
    gf = parse(PRE + f"G03*\n{xy(5, 0)}D02*\n{xy(0, 5)}{ij(-5, 0)}D01*\n")
    assert arc_length_ok(gf.objects[0].path.length, 5 * math.pi / 2, 5)
    assert any("G75" in n.text for n in gf.notes)


# ---------------------------------------------------------------- G74 arcs
@pytest.mark.parametrize("mode, start, end, ivals, quadrant", [
    # CW from (0,5) to (5,0), unsigned offsets (0,5): centre (0,0), first quadrant
    ("G02", (0, 5), (5, 0), (0, 5), (1, 1)),
    # CCW from (5,0) to (0,5), offsets (5,0): centre (0,0)
    ("G03", (5, 0), (0, 5), (5, 0), (1, 1)),
    # CW from (5,0) to (0,-5): fourth quadrant
    ("G02", (5, 0), (0, -5), (5, 0), (1, -1)),
    # CCW from (-5,0) to (0,-5): third quadrant
    ("G03", (-5, 0), (0, -5), (5, 0), (-1, -1)),
])
def test_single_quadrant_arcs(mode, start, end, ivals, quadrant):
    """§8.1.10 [Single-quadrant mode, G74]: I and J are unsigned; of the candidate centres
    (sx +- I, sy +- J) the one giving an arc of at most 90 degrees in the commanded
    direction is meant - here (0, 0) for each case."""
    gf = parse(PRE + f"G74*\n{mode}*\n{xy(*start)}D02*\n{xy(*end)}I{ivals[0] * 1000000}"
               f"J{ivals[1] * 1000000}D01*\n")
    p = gf.objects[0].path
    assert np.all(np.abs(radii(p, (0, 0)) - 5) <= 1e-9)
    assert arc_length_ok(p.length, 5 * math.pi / 2, 5)
    mid = np.asarray(p.coords)[len(p.coords) // 2]
    assert np.sign(mid[0]) == quadrant[0] and np.sign(mid[1]) == quadrant[1]


def test_single_quadrant_closed_arc_is_a_dot():
    """§8.1.10: in G74 mode start = end is a zero-length arc (the aperture once), not a
    full circle as in G75."""
    gf = parse(PRE + f"G74*\nG02*\n{xy(5, 0)}D02*\n{xy(5, 0)}{ij(5, 0)}D01*\n")
    assert area_ok(gf.objects[0].geometry.area, math.pi * 0.01, math.pi * 0.2)


def test_arc_without_offsets_is_an_error():
    with pytest.raises(InputFileError) as e:
        parse(PRE + f"G75*\nG02*\n{xy(5, 0)}D02*\n{xy(0, 5)}D01*\n")
    assert e.value.line == 8


# ---------------------------------------------------------------- units and formats
def test_inch_units():
    """§4.2.1 [Unit (MO)]: MOIN means inches (25.4 mm); FSLAX25Y25: 5 decimals, so
    X100000 = 1 in.  A C 0.1 in flash has diameter 2.54 mm."""
    gf = parse("%ADD10C,0.1*%\nD10*\nX100000Y-50000D03*\n", header="%FSLAX25Y25*%\n%MOIN*%\n")
    o = gf.objects[0]
    assert gf.units == "inch"
    assert o.point == pytest.approx((25.4, -12.7))
    assert area_ok(o.geometry.area, math.pi * 1.27 ** 2, math.pi * 2.54)


@pytest.mark.parametrize("fs, words, expected", [
    # leading-zero omission: value = integer / 10^d (§4.2.2)
    ("%FSLAX33Y33*%", "X15Y-5", (0.015, -0.005)),
    # deprecated trailing-zero omission: right-pad to i+d = 5 digits (§8.2.1)
    ("%FSTAX23Y23*%", "X15Y-5", (15.0, -50.0)),
    ("%FSTAX23Y23*%", "X01234Y00005", (1.234, 0.005)),
    # full digit counts read the same either way
    ("%FSLAX23Y23*%", "X01234Y00005", (1.234, 0.005)),
])
def test_coordinate_formats(fs, words, expected):
    gf = parse(f"%ADD10C,0.1*%\nD10*\n{words}D03*\n", header=f"{fs}\n%MOMM*%\n")
    assert gf.objects[0].point == pytest.approx(expected)


def test_incremental_fs_and_g91():
    """§8.2.1 [FS incremental notation] and §8.4 [G91]: coordinates are steps from the
    current point; I/J stay offsets."""
    for header, pre in [("%FSLIX26Y26*%\n%MOMM*%\n", ""), ("%FSLAX26Y26*%\n%MOMM*%\n", "G91*\n")]:
        gf = parse(PRE + pre + "X1000000Y0D02*\nG01X1000000Y1000000D01*\nX1000000D01*\n",
                   header=header)
        assert np.allclose(list(gf.objects[0].path.coords), [(1, 0), (2, 1)])
        assert np.allclose(list(gf.objects[1].path.coords), [(2, 1), (3, 1)])


def test_modal_coordinates():
    """§4.8.1 [Operations overview]: a missing X or Y keeps the current point's value."""
    gf = parse(PRE + f"G01*\n{xy(1, 2)}D02*\n{xy(x=3)}D01*\n{xy(y=5)}D01*\nD03*\n")
    assert list(gf.objects[0].path.coords) == [(1, 2), (3, 2)]
    assert list(gf.objects[1].path.coords) == [(3, 2), (3, 5)]
    assert gf.objects[2].point == (3, 5)


def test_combined_words_and_modal_d01():
    """§8.3.1 [G01/G02/G03 and D01 in one word]; §8.3.2 [Coordinate data without
    operation code]: coordinates alone repeat D01 after a D01."""
    gf = parse(PRE + f"{xy(0, 0)}D02*\nG01{xy(1, 0)}D01*\n{xy(2, 0)}*\n")
    assert [o.kind for o in gf.objects] == ["draw", "draw"]
    assert list(gf.objects[1].path.coords) == [(1, 0), (2, 0)]
    assert any("modal D01" in n.text for n in gf.notes)


def test_coordinates_without_d_after_flash_are_an_error():
    """§8.3.2: only a D01 may be implied; after D03 the meaning is not defined."""
    with pytest.raises(InputFileError) as e:
        parse(PRE + f"{xy(0, 0)}D03*\n{xy(2, 0)}*\n")
    assert e.value.line == 6


def test_flash_at_current_point():
    gf = parse(PRE + f"{xy(4, 5)}D02*\nD03*\n")
    assert gf.objects[0].point == (4, 5)


def test_decimal_point_coordinates_read_literally():
    """formats.md 1.3 [M]: a decimal point in a coordinate is read literally (from memory:
    seen in legacy files)."""
    gf = parse(PRE + "X1.5Y-2.25D03*\n")
    assert gf.objects[0].point == (1.5, -2.25)


def test_default_units_inch_with_note():
    """formats.md 1.11 [M]: no MO and no G70/G71 -> inches, with a note."""
    gf = parse_gerber("%FSLAX24Y24*%\n%ADD10C,0.01*%\nD10*\nX10000Y0D03*\nM02*\n", "u.gbr")
    assert gf.units == "inch" and gf.objects[0].point == pytest.approx((25.4, 0))
    assert any("assumed inches" in n.text for n in gf.notes)


def test_notes_deduplicated():
    gf = parse(PRE + "G54D10*\nG54D10*\nG54D10*\n")
    assert sum("G54" in n.text for n in gf.notes) == 1
