"""Standard apertures, holes, aperture transforms and strokes.

Source: Gerber Layer Format Specification rev. 2024.05 (section numbers recalled from
memory; the titles in brackets identify the sections).  Expected areas and bounds are
worked by hand from the definitions; tolerances follow the 0.5 um chord tolerance
(see tests/gerber_samples.py).
"""
from __future__ import annotations

import math

import pytest
from shapely.geometry import Point

from gerber_samples import area_ok, bounds_ok, parse, xy
from layoutcheck.errors import InputFileError, ResourceLimitError, UnsupportedFeatureError
from layoutcheck.limits import Limits


def flash(ad: str, at=(0.0, 0.0), pre: str = ""):
    gf = parse(f"%ADD10{ad}*%\n{pre}D10*\n{xy(*at)}D03*\n")
    assert len(gf.objects) == 1
    return gf.objects[0]


@pytest.mark.parametrize("ad, area, curved, bounds", [
    # §4.4.2 [Circle]: diameter 1 -> pi/4, perimeter pi
    ("C,1", math.pi / 4, math.pi, (1.5, 2.5, 2.5, 3.5)),
    # §4.4.2 + §4.4.6 [Transparency of holes]: shape minus a round hole of 0.4
    ("C,1X0.4", math.pi * (0.25 - 0.04), math.pi * 1.4, (1.5, 2.5, 2.5, 3.5)),
    # §4.4.3 [Rectangle]: 2 x 1 centred
    ("R,2X1", 2.0, 0.0, (1.0, 2.5, 3.0, 3.5)),
    ("R,2X1X0.5", 2.0 - math.pi * 0.0625, math.pi * 0.5, (1.0, 2.5, 3.0, 3.5)),
    # §4.4.4 [Obround]: box (3-1) x 1 plus two half discs of diameter 1
    ("O,3X1", 2.0 + math.pi / 4, math.pi, (0.5, 2.5, 3.5, 3.5)),
    ("O,1X3", 2.0 + math.pi / 4, math.pi, (1.5, 1.5, 2.5, 4.5)),
    ("O,3X1X0.4", 2.0 + math.pi / 4 - math.pi * 0.04, math.pi * 1.4, (0.5, 2.5, 3.5, 3.5)),
    # §4.4.5 [Polygon]: 4 vertices on a circle of diameter 2, first on +X: a square of
    # diagonal 2 -> area 2, vertices on the axes
    ("P,2X4", 2.0, 0.0, (1.0, 2.0, 3.0, 4.0)),
    # hexagon, r = 1: area 3*sqrt(3)/2, first vertex on +X, y extent +-sin(60 deg)
    ("P,2X6", 1.5 * math.sqrt(3), 0.0, (1.0, 3 - math.sqrt(3) / 2, 3.0, 3 + math.sqrt(3) / 2)),
    # rotated 30 deg counter-clockwise: a vertex on +Y, x extent +-cos(30 deg)
    ("P,2X6X30", 1.5 * math.sqrt(3), 0.0, (2 - math.sqrt(3) / 2, 2.0, 2 + math.sqrt(3) / 2, 4.0)),
    ("P,2X4X0X0.5", 2.0 - math.pi * 0.0625, math.pi * 0.5, (1.0, 2.0, 3.0, 4.0)),
])
def test_standard_aperture_flash(ad, area, curved, bounds):
    """Gerber spec rev. 2024.05 §4.4 [Standard aperture templates]; flash at (2, 3)."""
    o = flash(ad, (2.0, 3.0))
    assert o.kind == "flash" and o.point == (2.0, 3.0) and o.aperture == "D10"
    assert area_ok(o.geometry.area, area, curved)
    assert bounds_ok(o.geometry.bounds, bounds)
    holed = len(ad.split(",")[1].split("X")) == {"C": 2, "R": 3, "O": 3, "P": 4}[ad[0]]
    # a hole is transparent, so the centre is not covered (§4.4.6)
    assert o.geometry.contains(Point(2.0, 3.0)) is not holed


def test_plain_circle_diameter_recorded():
    """GraphicObject.aperture_diameter is set for a hole-free circle only (spec §4.4.2)."""
    assert flash("C,0.8").aperture_diameter == pytest.approx(0.8)
    assert flash("C,0.8X0.2").aperture_diameter is None
    assert flash("R,1X1").aperture_diameter is None


def test_deprecated_rectangular_hole_not_rotated():
    """Gerber spec rev. 2024.05 §8.2 [Rectangular hole in standard apertures]: an X/Y hole
    pair is centred and does not rotate with a polygon's rotation.  Square of diagonal 2
    rotated 45 deg (sides parallel to the axes, area 2) minus a 0.2 x 0.4 hole = 1.92."""
    o = flash("P,2X4X45X0.2X0.4")
    g = o.geometry
    assert g.area == pytest.approx(2.0 - 0.08, abs=1e-9)
    hole = g.interiors[0]
    assert bounds_ok(hole.bounds, (-0.1, -0.2, 0.1, 0.2), 1e-9)
    o = flash("R,2X1X0.5X0.4")
    assert o.geometry.area == pytest.approx(2.0 - 0.2, abs=1e-9)


def test_zero_size_circle_has_no_image():
    """Gerber spec rev. 2024.05 §4.3.2 [Zero-size apertures]: C,0 is allowed and makes no
    image; the object still exists (it may carry attributes)."""
    o = flash("C,0")
    assert o.geometry.is_empty and o.aperture_diameter == 0


@pytest.mark.parametrize("ad", ["P,2X2", "P,2X13", "P,2X4.5"])
def test_polygon_vertex_count(ad):
    """Gerber spec rev. 2024.05 §4.4.5 [Polygon]: 3 to 12 vertices."""
    with pytest.raises(InputFileError) as e:
        parse(f"%ADD10{ad}*%\n")
    assert e.value.line == 3 and not isinstance(e.value, ResourceLimitError)


def test_wrong_parameter_count_and_negative_size():
    """Gerber spec rev. 2024.05 §4.4.3: R takes x size X y size [X hole]."""
    with pytest.raises(InputFileError):
        parse("%ADD10R,1*%\n")
    with pytest.raises(InputFileError):
        parse("%ADD10C,-1*%\n")
    with pytest.raises(InputFileError):
        parse("%ADD10C,1Q*%\n")
    with pytest.raises(InputFileError):
        parse("%ADD05C,1*%\n")  # D00-D09 reserved (§4.3.1)


def test_aperture_size_limit():
    """layoutcheck.limits.Limits.max_aperture_mm (safety limit, not from the spec)."""
    with pytest.raises(ResourceLimitError) as e:
        parse("%ADD10C,6*%\n", limits=Limits(max_aperture_mm=5.0))
    assert e.value.line == 3
    parse("%ADD10C,4*%\n", limits=Limits(max_aperture_mm=5.0))


# ---------------------------------------------------------------- LM / LR / LS
def test_lr_rotates_rectangle():
    """Gerber spec rev. 2024.05 §4.9.4 [Load rotation]: LR90 turns a 2 x 1 rectangle into
    1 x 2 (counter-clockwise about the aperture origin, i.e. the flash point)."""
    o = flash("R,2X1", (5.0, 5.0), pre="%LR90*%\n")
    assert bounds_ok(o.geometry.bounds, (4.5, 4.0, 5.5, 6.0), 1e-9)


def test_mirror_before_rotate():
    """Gerber spec rev. 2024.05 §4.9 [Aperture transformations]: mirroring is applied
    before rotation.  Triangle (0,0),(2,0),(0,1): mirror x -> (0,0),(-2,0),(0,1); rotate 90
    -> (0,0),(0,-2),(-1,0): bounds (-1,-2,0,0).  (Rotating first would give (0,0,1,2).)"""
    gf = parse("%AMT*4,1,3,0,0,2,0,0,1,0,0,0*%\n%ADD10T*%\n%LMX*%\n%LR90*%\nD10*\n"
               f"{xy(0, 0)}D03*\n")
    assert bounds_ok(gf.objects[0].geometry.bounds, (-1.0, -2.0, 0.0, 0.0), 1e-9)
    gf = parse("%AMT*4,1,3,0,0,2,0,0,1,0,0,0*%\n%ADD10T*%\n%LMY*%\nD10*\n"
               f"{xy(0, 0)}D03*\n%LMXY*%\n{xy(0, 0)}D03*\n%LMN*%\n{xy(0, 0)}D03*\n")
    b = [o.geometry.bounds for o in gf.objects]
    assert bounds_ok(b[0], (0.0, -1.0, 2.0, 0.0), 1e-9)      # y negated
    assert bounds_ok(b[1], (-2.0, -1.0, 0.0, 0.0), 1e-9)     # both negated
    assert bounds_ok(b[2], (0.0, 0.0, 2.0, 1.0), 1e-9)       # LMN: none


def test_ls_scales_flash_and_stroke_width():
    """Gerber spec rev. 2024.05 §4.9.5 [Load scaling]: LS scales the aperture, so a circle
    of 1 becomes 2 (area pi) and a stroke of C 0.5 under LS 2 is 1 mm wide."""
    o = flash("C,1", pre="%LS2*%\n")
    assert area_ok(o.geometry.area, math.pi, 2 * math.pi)
    assert o.aperture_diameter == pytest.approx(2.0)
    gf = parse(f"%ADD10C,0.5*%\n%LS2*%\nD10*\nG01*\n{xy(0, 0)}D02*\n{xy(10, 0)}D01*\n")
    g = gf.objects[0].geometry
    assert bounds_ok(g.bounds, (-0.5, -0.5, 10.5, 0.5))
    assert gf.objects[0].aperture_diameter == pytest.approx(1.0)


def test_ls_must_be_positive():
    with pytest.raises(InputFileError):
        parse("%LS0*%\n")


# ---------------------------------------------------------------- strokes
def test_round_draw():
    """Gerber spec rev. 2024.05 §4.7.1 [Linear plotting]: a C 0.5 draw of length 10 is a
    10 x 0.5 box plus two half discs: area 5 + pi/16; the path is the centre line."""
    gf = parse(f"%ADD10C,0.5*%\nD10*\nG01*\n{xy(0, 0)}D02*\n{xy(10, 0)}D01*\n")
    o = gf.objects[0]
    assert o.kind == "draw" and o.aperture_diameter == pytest.approx(0.5)
    assert area_ok(o.geometry.area, 5 + math.pi / 16, math.pi * 0.5)
    assert o.path.length == pytest.approx(10.0)
    assert list(o.path.coords) == [(0.0, 0.0), (10.0, 0.0)]


def test_zero_length_draw_is_a_dot():
    """common practice: a zero-length draw images the aperture once (a disc)."""
    gf = parse(f"%ADD10C,1*%\nD10*\nG01*\n{xy(1, 1)}D02*\n{xy(1, 1)}D01*\n")
    assert area_ok(gf.objects[0].geometry.area, math.pi / 4, math.pi)


def test_rectangle_draw_is_convex_hull():
    """Gerber spec rev. 2024.05 §8.2 [Draws with rectangular apertures]: the image is the
    rectangle swept along the segment, i.e. the convex hull of it at both ends.  For a
    convex shape K and a segment v, area = area(K) + |v| * (width of K across v):
    R 1 x 0.5 along (3, 4): width across = 1*0.8 + 0.5*0.6 = 1.1, area = 0.5 + 5*1.1 = 6."""
    gf = parse(f"%ADD10R,1X0.5*%\nD10*\nG01*\n{xy(0, 0)}D02*\n{xy(3, 4)}D01*\n")
    o = gf.objects[0]
    assert o.geometry.area == pytest.approx(6.0, abs=1e-9)
    assert bounds_ok(o.geometry.bounds, (-0.5, -0.25, 3.5, 4.25), 1e-9)
    assert any("non-circular" in n.text for n in gf.notes)


def test_arc_with_rectangle_unsupported():
    """Gerber spec rev. 2024.05 §8.2: arcs with rectangular apertures are undefined."""
    with pytest.raises(UnsupportedFeatureError) as e:
        parse(f"%ADD10R,1X0.5*%\nD10*\nG75*\nG03*\n{xy(5, 0)}D02*\n{xy(0, 5)}I-{5000000}J0D01*\n")
    assert e.value.line == 8


def test_draw_with_holed_circle_unsupported():
    """Gerber spec rev. 2024.05 §4.7: only solid circles may stroke."""
    with pytest.raises(UnsupportedFeatureError):
        parse(f"%ADD10C,1X0.5*%\nD10*\nG01*\n{xy(0, 0)}D02*\n{xy(3, 0)}D01*\n")


def test_aperture_cache_does_not_leak_between_transforms():
    """The same aperture flashed with and without LR gives different shapes (spec §4.9)."""
    gf = parse(f"%ADD10R,2X1*%\nD10*\n{xy(0, 0)}D03*\n%LR90*%\n{xy(0, 0)}D03*\n%LR0*%\n"
               f"{xy(0, 0)}D03*\n")
    b = [o.geometry.bounds for o in gf.objects]
    assert bounds_ok(b[0], (-1, -0.5, 1, 0.5), 1e-9)
    assert bounds_ok(b[1], (-0.5, -1, 0.5, 1), 1e-9)
    assert bounds_ok(b[2], (-1, -0.5, 1, 0.5), 1e-9)
