"""Regions (G36/G37): contours, cut-ins, arcs in contours, closure.

Source: Gerber Layer Format Specification rev. 2024.05 §4.10 [Region statement]
(section numbers recalled from memory; titles in brackets).
"""
from __future__ import annotations

import math

import pytest
from shapely.geometry import Point

from gerber_samples import area_ok, bounds_ok, ij, parse, xy
from layoutcheck.errors import InputFileError, ResourceLimitError
from layoutcheck.limits import Limits


def contour(points, start_move=True):
    words = [f"{xy(*points[0])}D02*"] if start_move else []
    words += [f"{xy(*p)}D01*" for p in points[1:]]
    return "\n".join(words) + "\n"


SQUARE = [(0, 0), (10, 0), (10, 10), (0, 10), (0, 0)]


def test_square_region():
    """§4.10.1 [Region overview]: a closed contour is filled: 10 x 10 = 100."""
    gf = parse("G01*\nG36*\n" + contour(SQUARE) + "G37*\n")
    o = gf.objects[0]
    assert o.kind == "region" and o.aperture is None and o.line == 10
    assert o.geometry.area == pytest.approx(100.0)


def test_cut_in_becomes_hole():
    """§4.10.3 [Valid contours]: a cut-in (two coincident segments joining a hole to the
    outer boundary) makes a hole: 10 x 10 minus 6 x 6 = 64, the middle is not filled."""
    ring = [(0, 0), (10, 0), (10, 10), (0, 10), (0, 5), (2, 5), (2, 8), (8, 8), (8, 2),
            (2, 2), (2, 5), (0, 5), (0, 0)]
    gf = parse("G01*\nG36*\n" + contour(ring) + "G37*\n")
    g = gf.objects[0].geometry
    assert g.area == pytest.approx(64.0)
    assert not g.contains(Point(5, 5)) and g.contains(Point(1, 1))
    assert g.geom_type == "Polygon" and len(g.interiors) == 1


def test_contours_filled_separately_then_united():
    """§4.10.1: D02 starts a new contour; each is filled and the fills are united:
    [0,2]^2 and [1,3]^2 overlap in 1 -> 4 + 4 - 1 = 7."""
    a = [(0, 0), (2, 0), (2, 2), (0, 2), (0, 0)]
    b = [(1, 1), (3, 1), (3, 3), (1, 3), (1, 1)]
    gf = parse("G01*\nG36*\n" + contour(a) + contour(b) + "G37*\n")
    assert len(gf.objects) == 1
    assert gf.objects[0].geometry.area == pytest.approx(7.0)


def test_arc_in_contour():
    """§4.10.2: arcs may form contours.  Half disc of radius 5: area 25 pi / 2; chords sit
    inside the arc, so the area is short by at most (arc length) x 0.5 um."""
    body = (f"G75*\nG36*\n{xy(5, 0)}D02*\nG03{xy(-5, 0)}{ij(-5, 0)}D01*\n"
            f"G01{xy(5, 0)}D01*\nG37*\n")
    gf = parse(body)
    g = gf.objects[0].geometry
    assert area_ok(g.area, 25 * math.pi / 2, 5 * math.pi)
    assert g.area <= 25 * math.pi / 2
    assert bounds_ok(g.bounds, (-5, 0, 5, 5))


def test_full_circle_contour():
    """§4.10.2 with §4.7.2: one G75 full circle closes a contour by itself."""
    gf = parse(f"G75*\nG36*\n{xy(3, 0)}D02*\nG03{xy(3, 0)}{ij(-3, 0)}D01*\nG37*\n")
    assert area_ok(gf.objects[0].geometry.area, 9 * math.pi, 6 * math.pi)


def test_zero_length_steps_dropped():
    """§4.10.3: zero-length segments are not allowed; tolerated by dropping them."""
    pts = [(0, 0), (4, 0), (4, 0), (4, 4), (0, 4), (0, 4), (0, 0)]
    gf = parse("G01*\nG36*\n" + contour(pts) + "G37*\n")
    assert gf.objects[0].geometry.area == pytest.approx(16.0)


def test_unclosed_contour_names_line():
    """§4.10.3: a contour must end on its start point.  Ends 1 mm away -> error naming the
    line of its last segment (line 9 here: FS, MO, G01, G36, D02 and four D01s)."""
    pts = [(0, 0), (4, 0), (4, 4), (0, 4), (0, 1)]
    with pytest.raises(InputFileError) as e:
        parse("G01*\nG36*\n" + contour(pts) + "G37*\n")
    assert e.value.line == 9
    assert "close" in e.value.message


def test_nearly_closed_contour_closed_with_note():
    """formats.md 1.12 [M]: a gap of one coordinate step (1 nm at FSLAX46Y46) is closed."""
    body = "G01*\nG36*\nX0Y0D02*\nX4000000Y0D01*\nX4000000Y4000000D01*\nX0Y4000000D01*\nX0Y1D01*\nG37*\n"
    gf = parse(body)
    assert gf.objects[0].geometry.area == pytest.approx(16.0, abs=1e-5)
    assert any("closed it" in n.text for n in gf.notes)


def test_flash_inside_region_is_an_error():
    """§4.10.2: D03 is not allowed inside a region statement."""
    with pytest.raises(InputFileError) as e:
        parse("%ADD10C,1*%\nD10*\nG36*\nX0Y0D03*\nG37*\n")
    assert e.value.line == 6


def test_region_ignores_aperture_transforms_and_keeps_polarity():
    """§4.9.1 [Aperture transformations]: LM/LR/LS do not act on regions; LP does."""
    gf = parse("%LR45*%\n%LS2*%\n%LPC*%\nG01*\nG36*\n" + contour(SQUARE) + "G37*\n")
    o = gf.objects[0]
    assert o.geometry.bounds == (0, 0, 10, 10) and o.polarity == "clear"


def test_region_vertex_limit():
    """layoutcheck.limits.Limits.max_region_vertices (safety limit)."""
    with pytest.raises(ResourceLimitError):
        parse("G01*\nG36*\n" + contour(SQUARE) + "G37*\n",
              limits=Limits(max_region_vertices=3))


def test_g37_without_g36_and_open_region_at_end():
    with pytest.raises(InputFileError):
        parse("G37*\n")
    with pytest.raises(InputFileError) as e:
        parse("G01*\nG36*\n" + contour(SQUARE))
    assert e.value.line == 10   # the M02 line
