"""Gerber drill layers turned into drill holes (millimetres).

Source: Gerber Layer Format Specification rev. 2024.05, drill and rout layers, as summarised
in our format notes sections 1.10 and 2.6: ``.FileFunction,Plated|NonPlated,<from>,<to>,
<type>[,Drill|Rout|Mixed]``; circle apertures only; a flash is a hole, a draw or arc a slot
of the aperture width; ``.AperFunction`` gives the hole type; ``.N`` may sit on plated
holes.  Geometry checks use handbook formulas (disc pi d^2/4, stadium d*L + pi d^2/4).
"""
import importlib
import math

import pytest
from shapely.geometry import LineString, Point

from layoutcheck.errors import InputFileError, UnsupportedFeatureError
from layoutcheck.geometry import arcs
from layoutcheck.readers.drill import drill_from_gerber
from layoutcheck.readers.gerber.types import GerberFile, GraphicObject
from layoutcheck.units import CHORD_TOLERANCE_MM as TOL


def _flash(x, y, d, line, **attrs):
    return GraphicObject(geometry=arcs.circle(x, y, d), polarity="dark", kind="flash",
                         attributes=attrs, line=line, aperture="D10", point=(x, y),
                         aperture_diameter=d)


def _draw(coords, d, line, **attrs):
    path = LineString(coords)
    return GraphicObject(geometry=path.buffer(d / 2, quad_segs=arcs.quad_segs_for(d / 2)),
                         polarity="dark", kind="draw", attributes=attrs, line=line,
                         aperture="D11", path=path, aperture_diameter=d)


def _file(objects, function=("Plated", "1", "2", "PTH", "Drill"), **kw):
    return GerberFile(name="drill.gbr", file_attributes={".FileFunction": function},
                      objects=objects, **kw)


def test_flashes_and_draws_become_holes_and_slots():
    """Spec: flash = hole of the circle diameter; draw = slot of the aperture width;
    .AperFunction -> function, .N -> net; span and plating from the file function."""
    gf = _file([
        _flash(1.0, 2.0, 0.3, 12, **{".AperFunction": ("ViaDrill",), ".N": ("GND",)}),
        _flash(5.0, 5.0, 1.0, 14, **{".AperFunction": ("ComponentDrill", "PressFit")}),
        _draw([(0, 0), (4, 0)], 1.2, 16, **{".AperFunction": ("ComponentDrill",),
                                          ".N": ("",)}),
    ])
    df = drill_from_gerber(gf)
    assert df.span == (1, 2) and df.plated is True
    assert "TF.FileFunction Plated,1,2,PTH,Drill" in df.plating_basis
    via, pin, slot = df.holes
    assert (via.diameter, via.function, via.net, via.is_slot, via.line) == \
        (0.3, "ViaDrill", "GND", False, 12)
    assert via.path.equals(Point(1, 2)) and via.tool == "D10"
    assert via.geometry.area == pytest.approx(math.pi * 0.3 ** 2 / 4, abs=math.pi * 0.3 * TOL)
    assert (pin.function, pin.net) == ("ComponentDrill", None)
    assert slot.is_slot and slot.net == "" and slot.diameter == 1.2
    # stadium: d*L + pi d^2/4 = 1.2*4 + pi*0.36 = 5.93097 mm^2
    assert slot.geometry.area == pytest.approx(1.2 * 4 + math.pi * 0.36,
                                               abs=(8 + math.pi * 1.2) * TOL)
    assert all(h.plated is True for h in df.holes)


def test_nonplated_blind_backdrill_layer():
    """Spec: backdrills go in NonPlated,<from>,<to>,Blind files with BackDrill holes."""
    gf = _file([_flash(0, 0, 0.6, 9, **{".AperFunction": ("BackDrill",)})],
               function=("NonPlated", "1", "3", "Blind", "Drill"))
    df = drill_from_gerber(gf)
    assert (df.plated, df.span) == (False, (1, 3))
    assert df.holes[0].plated is False and df.holes[0].function == "BackDrill"


@pytest.mark.parametrize("obj, cls, words", [
    (GraphicObject(geometry=Point(0, 0).buffer(1), polarity="dark", kind="region", line=21),
     UnsupportedFeatureError, "region"),
    (GraphicObject(geometry=arcs.circle(0, 0, 1), polarity="clear", kind="flash", line=21,
                   aperture="D12", point=(0, 0), aperture_diameter=1.0),
     UnsupportedFeatureError, "clear"),
    (GraphicObject(geometry=Point(0, 0).buffer(1, cap_style="square"), polarity="dark",
                   kind="flash", line=21, aperture="D13", point=(0, 0)),
     UnsupportedFeatureError, "circle"),
    (GraphicObject(geometry=Point(0, 0).buffer(0), polarity="dark", kind="flash", line=21,
                   aperture="D14", point=(0, 0), aperture_diameter=0.0),
     InputFileError, "above 0"),
])
def test_objects_a_drill_layer_cannot_hold(obj, cls, words):
    """Spec: drill layers use dark circle-aperture flashes and draws only; anything else
    would change the hole image and must not be skipped silently."""
    with pytest.raises(cls) as exc:
        drill_from_gerber(_file([obj]))
    assert type(exc.value) is cls
    assert exc.value.line == 21 and exc.value.file == "drill.gbr" and words in exc.value.message


@pytest.mark.parametrize("function", [None, ("Copper", "L1", "Top"),
                                      ("MixedPlating", "1", "2")])
def test_not_a_drill_layer(function):
    """Spec: only Plated/NonPlated file functions are drill layers."""
    gf = GerberFile(name="x.gbr", file_attributes={".FileFunction": function} if function
                    else {})
    with pytest.raises(InputFileError) as exc:
        drill_from_gerber(gf)
    assert exc.value.file == "x.gbr"


def test_through_the_gerber_parser():
    """The same rules on a Gerber drill file read by layoutcheck.readers.gerber: inch units
    (FSLAX24Y24: X10000 = 1.0000 in = 25.4 mm), a via with a net, and a routed arc slot.
    Arc slot: start (0,0), end (0.2,0) in, I0.1 -> centre (0.1,0) in, r = 2.54 mm,
    G02 half turn, width 0.04 in = 1.016 mm: area = pi r w + pi w^2/4 (handbook)."""
    try:
        gerber = importlib.import_module("layoutcheck.readers.gerber")
    except ImportError:  # pragma: no cover
        pytest.skip("Gerber reader module absent")
    parse_gerber = getattr(gerber, "parse_gerber", None)
    if parse_gerber is None:  # pragma: no cover
        pytest.skip("layoutcheck.readers.gerber.parse_gerber absent")
    text = "\n".join([
        "%TF.FileFunction,Plated,1,4,PTH,Mixed*%",
        "%FSLAX24Y24*%", "%MOIN*%",
        "%TA.AperFunction,ViaDrill*%", "%ADD10C,0.0120*%",
        "%TA.AperFunction,ComponentDrill*%", "%ADD11C,0.0400*%", "%TD*%",
        "G75*", "G01*",
        "D10*", "%TO.N,VBUS*%", "X10000Y20000D03*", "%TD*%",
        "D11*", "X0Y0D02*", "G02X2000Y0I1000J0D01*",
        "M02*", ""])
    df = drill_from_gerber(parse_gerber(text, "power-PTH.gbr"))
    assert df.span == (1, 4) and df.plated is True and df.units == "inch"
    via, slot = df.holes
    assert via.path.equals(Point(25.4, 50.8)) and via.net == "VBUS"
    assert via.function == "ViaDrill" and via.diameter == pytest.approx(0.012 * 25.4)
    assert slot.is_slot and slot.function == "ComponentDrill" and via.line == 13
    r, w = 0.1 * 25.4, 0.04 * 25.4
    assert slot.geometry.area == pytest.approx(math.pi * r * w + math.pi * w * w / 4,
                                               abs=(2 * math.pi * r + math.pi * w) * 2 * TOL)
    # clockwise from (0,0) to (5.08,0) about (2.54,0) passes over the top (y = +r)
    assert slot.path.bounds[3] == pytest.approx(r, abs=TOL)
