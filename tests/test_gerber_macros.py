"""Aperture macros: expressions, variables, every primitive, exposure and rotation.

Source: Gerber Layer Format Specification rev. 2024.05 §4.5 [Aperture macro (AM)] and §8.2
[deprecated primitives 2, 22, 6] (section numbers recalled from memory; titles in
brackets).  Every primitive rotates about the macro origin, not its own centre; the
expected positions below are that rotation worked by hand.
"""
from __future__ import annotations

import math

import pytest
from shapely.geometry import Point

from gerber_samples import area_ok, bounds_ok, disc_band_area, parse, xy
from layoutcheck.errors import InputFileError, ResourceLimitError
from layoutcheck.limits import Limits
from layoutcheck.readers.gerber.macros import ExpressionError, evaluate, parse_expression


def macro_shape(body: str, params: str = ""):
    """Flash a macro made of ``body`` (primitive words joined by '*') at the origin."""
    ad = f"%ADD10M{',' + params if params else ''}*%\n"
    gf = parse(f"%AMM*{body}*%\n{ad}D10*\n{xy(0, 0)}D03*\n")
    return gf.objects[0].geometry


# ---------------------------------------------------------------- expressions
@pytest.mark.parametrize("text, value", [
    ("1+2x3", 7.0),            # x binds tighter than + (§4.5.4 [Arithmetic expressions])
    ("(1+2)x3", 9.0),          # parentheses first
    ("8/2/2", 2.0),            # left-associative
    ("10-4-3", 3.0),
    ("-2x3+1", -5.0),          # unary minus on a factor
    ("--2", 2.0),
    ("+.5", 0.5),
    ("2X3", 6.0),              # upper-case X accepted as multiply (from memory: common habit)
    ("$1x$2-$3", 1.5 * 4 - 2),
    ("$9+1", 1.0),             # undefined variable reads as 0
])
def test_expression_values(text, value):
    """Gerber spec rev. 2024.05 §4.5.4 [Macro variables and expressions]."""
    assert evaluate(parse_expression(text), {1: 1.5, 2: 4.0, 3: 2.0}) == pytest.approx(value)


@pytest.mark.parametrize("text", ["1+", "(1", "2x", "1 2", "a", "", "1/0"])
def test_bad_expressions(text):
    with pytest.raises(ExpressionError):
        evaluate(parse_expression(text), {})


def test_variables_from_ad_and_definitions():
    """§4.5.4: $1, $2 come from the AD parameters; $3=$1x2 defines a new one.  AD 0.5X1 ->
    a circle of diameter 1 centred at (1, 0)."""
    g = macro_shape("$3=$1x2*1,1,$3,$2,0", "0.5X1")
    assert bounds_ok(g.bounds, (0.5, -0.5, 1.5, 0.5))
    assert area_ok(g.area, math.pi / 4, math.pi)


def test_precedence_inside_macro():
    """§4.5.4: 1+2x0.5 = 2 (not 1.5): a circle of diameter 2."""
    g = macro_shape("1,1,1+2x0.5,0,0")
    assert bounds_ok(g.bounds, (-1, -1, 1, 1))


# ---------------------------------------------------------------- primitives
def test_circle_rotates_about_macro_origin():
    """§4.5.1.4 [Circle, code 1]: centre (2, 0) rotated 90 deg about the origin -> (0, 2)."""
    g = macro_shape("1,1,1.5,2,0,90")
    assert bounds_ok(g.bounds, (-0.75, 1.25, 0.75, 2.75))
    assert area_ok(g.area, math.pi * 0.5625, math.pi * 1.5)


@pytest.mark.parametrize("code", ["20", "2"])
def test_vector_line(code):
    """§4.5.1.5 [Vector line, code 20] (and deprecated code 2): square ends at the end
    points; (1,1)-(3,1) width 0.5 rotated 90 deg about the origin -> (-1,1)-(-1,3)."""
    g = macro_shape(f"{code},1,0.5,0,0,4,0,0")
    assert g.area == pytest.approx(2.0) and bounds_ok(g.bounds, (0, -0.25, 4, 0.25), 1e-9)
    g = macro_shape(f"{code},1,0.5,1,1,3,1,90")
    assert bounds_ok(g.bounds, (-1.25, 1, -0.75, 3), 1e-9)
    g = macro_shape(f"{code},1,1,0,0,3,4,0")   # slanted, length 5
    assert g.area == pytest.approx(5.0)


def test_centre_line():
    """§4.5.1.6 [Center line, code 21]: 4 x 1 centred at (5, 0), rotated 90 deg about the
    ORIGIN -> centred at (0, 5), 1 wide and 4 tall.  (About its own centre it would stay at
    x = 5.)"""
    g = macro_shape("21,1,4,1,5,0,90")
    assert bounds_ok(g.bounds, (-0.5, 3, 0.5, 7), 1e-9)
    assert g.area == pytest.approx(4.0)


def test_lower_left_line():
    """§8.2 [deprecated primitive 22, lower-left line]: 4 x 1 with its lower-left corner at
    (1, 1); rotated 90 deg about the origin the corners go to (-1,1), (-1,5), (-2,5), (-2,1)."""
    g = macro_shape("22,1,4,1,1,1,0")
    assert bounds_ok(g.bounds, (1, 1, 5, 2), 1e-9)
    g = macro_shape("22,1,4,1,1,1,90")
    assert bounds_ok(g.bounds, (-2, 1, -1, 5), 1e-9)


def test_outline():
    """§4.5.1.7 [Outline, code 4]: triangle (0,0),(2,0),(0,1): area 1; rotated 90 deg the
    vertices go to (0,0),(0,2),(-1,0)."""
    g = macro_shape("4,1,3,0,0,2,0,0,1,0,0,0")
    assert g.area == pytest.approx(1.0) and bounds_ok(g.bounds, (0, 0, 2, 1), 1e-9)
    g = macro_shape("4,1,3,0,0,2,0,0,1,0,0,90")
    assert bounds_ok(g.bounds, (-1, 0, 0, 2), 1e-9)


def test_outline_must_close_and_count():
    """§4.5.1.7: the last point equals the first; n vertices need 2n+5 parameters."""
    with pytest.raises(InputFileError):
        macro_shape("4,1,3,0,0,2,0,0,1,0,0.5,0")
    with pytest.raises(InputFileError) as e:
        macro_shape("4,1,3,0,0,2,0,0,1,0,0")
    assert e.value.line == 3


def test_polygon_primitive():
    """§4.5.1.8 [Polygon, code 5]: 4 vertices, centre (3, 0), diameter 2 -> a square of
    diagonal 2 (area 2); rotated 90 deg about the origin the centre goes to (0, 3)."""
    g = macro_shape("5,1,4,3,0,2,0")
    assert g.area == pytest.approx(2.0) and bounds_ok(g.bounds, (2, -1, 4, 1), 1e-9)
    g = macro_shape("5,1,4,3,0,2,90")
    assert bounds_ok(g.bounds, (-1, 2, 1, 4), 1e-9)
    with pytest.raises(InputFileError):
        macro_shape("5,1,13,0,0,2,0")


def test_thermal():
    """§4.5.1.9 [Thermal, code 7]: annulus 4/2 with gap 0.5 along the axes.  Removed by the
    two bars: 2 * (band(R=2) - band(r=1)) with half-gap h = 0.25 (the bars cross inside the
    inner circle, so they do not double count)."""
    g = macro_shape("7,0,0,4,2,0.5,0")
    h = 0.25
    exact = math.pi * (4 - 1) - 2 * (disc_band_area(2, h) - disc_band_area(1, h))
    assert area_ok(g.area, exact, 2 * math.pi * 3)
    assert not g.contains(Point(1.5, 0))            # gap on +X
    assert g.contains(Point(1.5 * math.cos(math.pi / 4), 1.5 * math.sin(math.pi / 4)))
    g = macro_shape("7,0,0,4,2,0.5,45")            # gaps turn to the diagonals
    assert g.contains(Point(1.5, 0))
    assert not g.contains(Point(1.5 * math.cos(math.pi / 4), 1.5 * math.sin(math.pi / 4)))
    # centre (3,0) -> (0,3); the gaps sit on the extremes, so the extent is the point of
    # the outer circle at the gap edge: sqrt(R^2 - h^2)
    g = macro_shape("7,3,0,4,2,0.5,90")
    e = math.sqrt(4 - h * h)
    assert bounds_ok(g.bounds, (-e, 3 - e, e, 3 + e))


def test_moire():
    """§8.2 [deprecated primitive 6, moire]: rings 10/8 and 6/4 (thickness 1, gap 1, two
    rings) plus a cross-hair 0.2 x 12.  Area = rings + bars - bars inside rings:
    14 pi + (2*12*0.2 - 0.2^2) - 2 * (band(5)-band(4)+band(3)-band(2)) with h = 0.1."""
    g = macro_shape("6,0,0,10,1,1,2,0.2,12,0")
    h = 0.1
    rings = math.pi * (25 - 16) + math.pi * (9 - 4)
    bars = 2 * 12 * 0.2 - 0.2 ** 2
    overlap = 2 * (disc_band_area(5, h) - disc_band_area(4, h) + disc_band_area(3, h)
                   - disc_band_area(2, h))
    assert area_ok(g.area, rings + bars - overlap, 2 * math.pi * (5 + 4 + 3 + 2))
    assert bounds_ok(g.bounds, (-6, -6, 6, 6), 1e-9)
    assert not g.contains(Point(3.5, 0.5))          # the gap between the rings


def test_exposure_off_subtracts_what_came_before():
    """§4.5.2 [Exposure]: off subtracts from what the macro built so far, and a later 'on'
    primitive adds again: disc 2 - disc 1 + disc 0.5 = pi(1 - 1/4 + 1/16)."""
    g = macro_shape("1,1,2,0,0*1,0,1,0,0")
    assert area_ok(g.area, math.pi * 0.75, math.pi * 3)
    assert not g.contains(Point(0, 0))
    g = macro_shape("1,1,2,0,0*1,0,1,0,0*1,1,0.5,0,0")
    assert area_ok(g.area, math.pi * (0.75 + 0.0625), math.pi * 3.5)
    assert g.contains(Point(0, 0))


def test_comment_primitive_and_multiline_macro():
    """§4.5.1.3 [Comment, code 0]; CR/LF inside the AM carry no meaning (§3)."""
    text = "%AMDONUT*\n0 a ring, $1 outer*\n1,1,$1,0,0*\n1,0,\n$2,0,0*%\n%ADD10DONUT,2X1*%\nD10*\n"
    gf = parse(text + f"{xy(0, 0)}D03*\n")
    assert area_ok(gf.objects[0].geometry.area, math.pi * 0.75, math.pi * 3)


def test_macro_in_inches():
    """§4.5: macro sizes are in the MO unit: a 0.1 in circle is 2.54 mm."""
    gf = parse("%AMC1*1,1,$1,0,0*%\n%ADD10C1,0.1*%\nD10*\nX0Y0D03*\n",
               header="%FSLAX25Y25*%\n%MOIN*%\n")
    assert bounds_ok(gf.objects[0].geometry.bounds, (-1.27, -1.27, 1.27, 1.27))


# ---------------------------------------------------------------- bad macros
def test_unknown_primitive_code_line():
    """§4.5.1: codes are 0, 1, 2, 4, 5, 6, 7, 20, 21, 22; code 3 is not one."""
    with pytest.raises(InputFileError) as e:
        parse("%AMBAD*\n1,1,1,0,0*\n3,1,1,0,0*%\n")
    assert e.value.line == 5 and "primitive code" in e.value.message


def test_wrong_parameter_count_line():
    """§4.5.1.5: a vector line has 7 parameters."""
    with pytest.raises(InputFileError) as e:
        parse("%AMBAD*\n20,1,0.5,0,0,4,0*%\n")
    assert e.value.line == 4


def test_bad_expression_line():
    with pytest.raises(InputFileError) as e:
        parse("%AMBAD*\n1,1,2x,0,0*%\n")
    assert e.value.line == 4


def test_bad_exposure_and_undefined_macro():
    with pytest.raises(InputFileError):
        macro_shape("1,2,1,0,0")
    with pytest.raises(InputFileError) as e:
        parse("%ADD10NOPE,1*%\n")
    assert e.value.line == 3


def test_outline_vertex_limit():
    """layoutcheck.limits.Limits.max_outline_vertices (the spec caps outlines at 5000)."""
    pts = ",".join(["0,0", "1,0", "1,1", "0,1", "0,0"])
    with pytest.raises(ResourceLimitError):
        parse(f"%AMQ*4,1,4,{pts},0*%\n%ADD10Q*%\n", limits=Limits(max_outline_vertices=3))
    gf = parse(f"%AMQ*4,1,4,{pts},0*%\n%ADD10Q*%\nD10*\n{xy(0, 0)}D03*\n")
    assert gf.objects[0].geometry.area == pytest.approx(1.0)
