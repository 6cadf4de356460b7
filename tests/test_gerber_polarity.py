"""Polarity (LP), resolve_polarity/image, step and repeat (SR), block apertures (AB).

Source: Gerber Layer Format Specification rev. 2024.05 §4.9.2 [Load polarity (LP)],
§4.11 [Block aperture (AB)], §4.12 [Step and repeat (SR)], §8.3.4 [deprecated SR usage]
(section numbers recalled from memory; titles in brackets).  Expected geometry is worked
from those definitions; "independent" references are built directly with shapely.
"""
from __future__ import annotations

import math

import pytest
import shapely
from shapely.geometry import Point

from gerber_samples import area_ok, bounds_ok, parse, xy
from layoutcheck.errors import InputFileError, ResourceLimitError
from layoutcheck.limits import Limits
from layoutcheck.readers.gerber import image, resolve_polarity

REGION_10 = ("G01*\nG36*\n" + xy(0, 0) + "D02*\n" + xy(10, 0) + "D01*\n" + xy(10, 10)
             + "D01*\n" + xy(0, 10) + "D01*\n" + xy(0, 0) + "D01*\nG37*\n")


def test_clear_erases_earlier_but_not_later():
    """§4.9.2: a clear object erases what was made before it only.  Region 10 x 10, clear
    C 2 at the centre, then dark C 1 at the centre: image = 100 - pi + pi/4."""
    gf = parse("%ADD10C,2*%\n%ADD11C,1*%\n%TO.N,PLANE*%\n" + REGION_10
               + "%LPC*%\nD10*\n" + xy(5, 5) + "D03*\n%LPD*%\n%TO.N,PAD*%\nD11*\n"
               + xy(5, 5) + "D03*\n")
    pol = [o.polarity for o in gf.objects]
    assert pol == ["dark", "clear", "dark"]
    pieces = resolve_polarity(gf.objects)
    assert [o.attributes[".N"] for _, o in pieces] == [("PLANE",), ("PAD",)]
    plane, pad = pieces[0][0], pieces[1][0]
    assert area_ok(plane.area, 100 - math.pi, 2 * math.pi)
    assert len(plane.interiors) == 1
    assert area_ok(pad.area, math.pi / 4, math.pi)
    img = image(gf)
    assert area_ok(img.area, 100 - math.pi + math.pi / 4, 3 * math.pi)
    assert img.contains(Point(5, 5)) and not img.contains(Point(5, 5.75))


def test_clear_splits_object_into_pieces():
    """§4.9.2: a clear bar across a dark rectangle leaves two single polygons, both paired
    with the rectangle's object."""
    gf = parse("%ADD10R,10X2*%\n%ADD11R,1X4*%\nD10*\n" + xy(0, 0) + "D03*\n%LPC*%\nD11*\n"
               + xy(0, 0) + "D03*\n")
    pieces = resolve_polarity(gf.objects)
    assert len(pieces) == 2
    assert all(o is gf.objects[0] for _, o in pieces)
    assert sorted(p.area for p, _ in pieces) == pytest.approx([9.0, 9.0])
    assert all(p.geom_type == "Polygon" for p, _ in pieces)


def test_resolve_matches_run_by_run_reference():
    """§4.9.2: the image is built in file order.  Reference: shapely applied run by run
    (dark union, clear difference) on the same shapes, built independently."""
    body = ("%ADD10C,2*%\n%ADD11R,3X1*%\nD10*\n" + xy(0, 0) + "D03*\n" + xy(1.5, 0) + "D03*\n"
            "%LPC*%\nD11*\n" + xy(1, 0) + "D03*\n%LPD*%\nD10*\n" + xy(2, 1) + "D03*\n"
            "%LPC*%\nD11*\n" + xy(2, 1.5) + "D03*\n")
    gf = parse(body)
    c = lambda x, y: Point(x, y).buffer(1, quad_segs=64)   # noqa: E731
    r = lambda x, y: shapely.box(x - 1.5, y - 0.5, x + 1.5, y + 0.5)   # noqa: E731
    ref = c(0, 0).union(c(1.5, 0)).difference(r(1, 0)).union(c(2, 1)).difference(r(2, 1.5))
    got = shapely.union_all([p for p, _ in resolve_polarity(gf.objects)])
    assert got.symmetric_difference(ref).area < 2 * math.pi * 2 * 1e-3
    assert image(gf).symmetric_difference(ref).area < 2 * math.pi * 2 * 1e-3


def test_many_runs_image_equals_pieces():
    """image() with many polarity runs agrees with the union of resolve_polarity pieces."""
    words = ["%ADD10C,1*%", "%ADD11C,0.5*%"]
    for k in range(20):
        words += ["%LPD*%", "D10*", xy(k * 0.6, 0) + "D03*", "%LPC*%", "D11*",
                  xy(k * 0.6 + 0.3, 0) + "D03*"]
    gf = parse("\n".join(words) + "\n")
    a = image(gf)
    b = shapely.union_all([p for p, _ in resolve_polarity(gf.objects)])
    assert a.symmetric_difference(b).area < 1e-9


# ---------------------------------------------------------------- step and repeat
def test_step_repeat_count_and_order():
    """§4.12 [Step and repeat]: X3 Y2 I5 J4 gives 6 copies, +Y first then +X; I and J are
    decimals in the MO unit."""
    gf = parse("%ADD10C,1*%\n%SRX3Y2I5.0J4.0*%\nD10*\n" + xy(1, 1) + "D03*\n%SR*%\n")
    pts = [o.point for o in gf.objects]
    assert pts == [(1, 1), (1, 5), (6, 1), (6, 5), (11, 1), (11, 5)]
    for o in gf.objects:
        assert bounds_ok(o.geometry.bounds, (o.point[0] - 0.5, o.point[1] - 0.5,
                                             o.point[0] + 0.5, o.point[1] + 0.5))
        assert o.line == 6


def test_step_repeat_inch_steps_and_paths():
    """§4.12: steps in inches (25.4 mm); draws keep their centre lines, moved."""
    gf = parse("%ADD10C,0.01*%\n%SRX2Y1I0.5J0*%\nD10*\nG01*\nX0Y0D02*\nX10000Y0D01*\n%SR*%\n",
               header="%FSLAX24Y24*%\n%MOIN*%\n")
    got = [c for o in gf.objects for p in o.path.coords for c in p]
    assert got == pytest.approx([0, 0, 25.4, 0, 12.7, 0, 38.1, 0])


def test_step_repeat_closed_by_sr_x1y1_and_m02():
    """§8.3.4 [deprecated SR usage]: %SRX1Y1I0J0*% closes an open SR; M02 closes one left
    open."""
    gf = parse("%ADD10C,1*%\n%SRX2Y1I3J0*%\nD10*\n" + xy(0, 0) + "D03*\n%SRX1Y1I0J0*%\n"
               + xy(0, 10) + "D03*\n")
    assert [o.point for o in gf.objects] == [(0, 0), (3, 0), (0, 10)]
    gf = parse("%ADD10C,1*%\n%SRX1Y3I0J2*%\nD10*\n" + xy(0, 0) + "D03*\n")
    assert [o.point for o in gf.objects] == [(0, 0), (0, 2), (0, 4)]


def test_step_repeat_limits():
    """layoutcheck.limits: max_step_repeat (nx*ny) and max_step_repeat_objects."""
    with pytest.raises(ResourceLimitError) as e:
        parse("%SRX10Y10I1J1*%\n", limits=Limits(max_step_repeat=99))
    assert e.value.line == 3
    with pytest.raises(ResourceLimitError):
        parse("%ADD10C,1*%\n%SRX5Y2I1J1*%\nD10*\n" + xy(0, 0) + "D03*\n" + xy(0, 0.5)
              + "D03*\n%SR*%\n", limits=Limits(max_step_repeat_objects=19))


# ---------------------------------------------------------------- block apertures
BLOCK = ("%ADD10C,1*%\n%ADD11R,2X1*%\n%ABD100*%\nD10*\n" + xy(1, 0) + "D03*\nD11*\n"
         + xy(0, 2) + "D03*\n%AB*%\n")


def test_block_flash_moves_objects():
    """§4.11 [Block aperture]: a block's origin is the file origin; flashing it at (10,10)
    moves its objects by (10,10)."""
    gf = parse(BLOCK + "D100*\n" + xy(10, 10) + "D03*\n")
    assert [o.point for o in gf.objects] == [(11, 10), (10, 12)]
    assert [o.aperture for o in gf.objects] == ["D10", "D11"]
    assert bounds_ok(gf.objects[1].geometry.bounds, (9, 11.5, 11, 12.5), 1e-9)


def test_block_flash_transformed():
    """§4.11 with §4.9: LR90 turns the whole block about its origin, then it moves to the
    flash point: (1,0) -> (0,1); the 2 x 1 rectangle at (0,2) -> 1 x 2 at (-2,0)."""
    gf = parse(BLOCK + "%LR90*%\nD100*\n" + xy(10, 10) + "D03*\n")
    assert gf.objects[0].point == pytest.approx((10, 11))
    assert gf.objects[1].point == pytest.approx((8, 10))
    assert bounds_ok(gf.objects[1].geometry.bounds, (7.5, 9, 8.5, 11), 1e-9)


def test_block_under_lpc_inverts_polarity():
    """§4.11: flashed under LPC every object's polarity is inverted."""
    text = ("%ADD10C,1*%\n%ADD11R,3X3*%\n%ABD100*%\nD11*\n" + xy(0, 0) + "D03*\n%LPC*%\nD10*\n"
            + xy(0, 0) + "D03*\n%AB*%\n")
    gf = parse(text + "%LPD*%\nD100*\n" + xy(0, 0) + "D03*\n%LPC*%\n" + xy(10, 0) + "D03*\n")
    assert [o.polarity for o in gf.objects] == ["dark", "clear", "clear", "dark"]
    img = image(gf)
    assert area_ok(img.area, 9 - math.pi / 4 + math.pi / 4, 2 * math.pi)
    assert not img.contains(Point(0, 0)) and img.contains(Point(10, 0))


def test_nested_blocks():
    """§4.11: blocks nest; D101 holds D100 flashed at (0,5); D101 flashed at (20,0)."""
    text = ("%ADD10C,1*%\n%ABD101*%\n%ABD100*%\nD10*\n" + xy(1, 0) + "D03*\n%AB*%\nD100*\n"
            + xy(0, 5) + "D03*\n%AB*%\nD101*\n" + xy(20, 0) + "D03*\n")
    gf = parse(text)
    assert [o.point for o in gf.objects] == [(21, 5)]


def test_block_depth_limit_and_errors():
    """layoutcheck.limits.Limits.max_block_depth; unbalanced %AB*% is an error."""
    with pytest.raises(ResourceLimitError) as e:
        parse("%ABD100*%\n%ABD101*%\n%ABD102*%\n%AB*%\n%AB*%\n%AB*%\n",
              limits=Limits(max_block_depth=2))
    assert e.value.line == 5
    with pytest.raises(InputFileError):
        parse("%AB*%\n")
    with pytest.raises(InputFileError):
        parse("%ABD100*%\n")   # M02 inside an open block


def test_block_in_step_repeat():
    """§4.12: SR copies the objects a block flash made."""
    gf = parse(BLOCK + "%SRX2Y1I5J0*%\nD100*\n" + xy(0, 0) + "D03*\n%SR*%\n")
    assert [o.point for o in gf.objects] == [(1, 0), (0, 2), (6, 0), (5, 2)]


def test_object_limit():
    """layoutcheck.limits.Limits.max_objects_per_file."""
    body = "%ADD10C,1*%\nD10*\n" + "".join(xy(k, 0) + "D03*\n" for k in range(4))
    with pytest.raises(ResourceLimitError) as e:
        parse(body, limits=Limits(max_objects_per_file=3))
    assert e.value.line == 8
    assert len(parse(body, limits=Limits(max_objects_per_file=4)).objects) == 4
