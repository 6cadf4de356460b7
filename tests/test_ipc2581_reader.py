"""IPC-2581 reader: hand-written documents whose geometry is worked out by hand.

Sources
- IPC-2581 revisions B and C as summarised in the shared format notes, section 3 (element
  and attribute names, standard primitive definitions, units, Xform, Sets, holes, stackup;
  marked [M] there: recalled from memory, no copy of the standard or its schema at hand).
  Where a test pins down an interpretation the notes call an assumption (mirror before
  rotate, corner flags, SQUARE/NONE line ends) the docstring says so.
- Areas: plane geometry worked out by hand (rectangle, circle pi r^2, stadium, rounded
  corner r^2 (1 - pi/4), chamfer r^2/2, Minkowski sum A + P r + pi r^2 of a convex polygon
  and a disc, strip-annulus integral for thermal spokes).
- XML safety: the classic "billion laughs" (entity expansion) and external-entity
  documents, common practice in XML security testing.
Tolerances: straight-edged shapes 1e-9 mm^2; curved shapes 0.01 mm^2 / 0.001 mm (arcs are
flattened with a chord error under 0.5 um, circles circumscribed; layoutcheck.geometry.arcs).
"""
from __future__ import annotations

import math
from pathlib import Path

import pytest
import shapely

from layoutcheck.cli import main
from layoutcheck.errors import InputFileError, UnsupportedFeatureError
from layoutcheck.project import load_project
from layoutcheck.readers import ipc2581_xml, read_board
from layoutcheck.readers.ipc2581 import is_ipc2581, read_ipc2581

NS = "http://webstds.ipc.org/2581"
TWO_LAYERS = ('<Layer name="TOP" layerFunction="CONDUCTOR" side="TOP" polarity="POSITIVE"/>'
              '<Layer name="BOT" layerFunction="CONDUCTOR" side="BOTTOM" polarity="POSITIVE"/>'
              '<Layer name="DRL" layerFunction="DRILL" side="ALL"><Span fromLayer="TOP" '
              'toLayer="BOT"/></Layer>')


def square(x0, y0, x1, y1, tag="Polygon") -> str:
    return (f'<{tag}><PolyBegin x="{x0}" y="{y0}"/><PolyStepSegment x="{x1}" y="{y0}"/>'
            f'<PolyStepSegment x="{x1}" y="{y1}"/><PolyStepSegment x="{x0}" y="{y1}"/>'
            f'<PolyStepSegment x="{x0}" y="{y0}"/></{tag}>')


PROFILE = "<Profile>" + square(0, 0, 100, 100) + "</Profile>"


def doc(step: str = "", *, dicts: str = "", units: str = "MILLIMETER", revision: str = "C",
        layers: str = TWO_LAYERS, stackup: str = "", profile: str = PROFILE, bom: str = "",
        prolog: str = "") -> str:
    """A minimal IPC-2581 document (revision C element order, from memory)."""
    return (f'<?xml version="1.0" encoding="UTF-8"?>\n{prolog}'
            f'<IPC-2581 revision="{revision}" xmlns="{NS}">\n'
            f'<Content roleRef="Owner"><FunctionMode mode="FABRICATION"/>'
            f'<StepRef name="board"/>{dicts}</Content>\n{bom}\n'
            f'<Ecad name="t"><CadHeader units="{units}"/><CadData>\n{layers}\n{stackup}\n'
            f'<Step name="board">{profile}\n{step}\n</Step></CadData></Ecad>\n</IPC-2581>\n')


def std(entries: str, units: str = "MILLIMETER") -> str:
    return f'<DictionaryStandard units="{units}">{entries}</DictionaryStandard>'


def lines(entries: str, units: str = "MILLIMETER") -> str:
    return f'<DictionaryLineDesc units="{units}">{entries}</DictionaryLineDesc>'


def feature(layer: str, body: str, set_attrs: str = "") -> str:
    return f'<LayerFeature layerRef="{layer}"><Set{set_attrs}>{body}</Set></LayerFeature>'


def read(tmp_path: Path, text: str, name: str = "board.xml"):
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return read_ipc2581(p)


def copper(board, layer: str = "top"):
    return shapely.union_all([s.geometry for s in board.shapes if s.layer == layer])


def pad_at(prim: str, xform: str = "", at=(10, 20)) -> str:
    """One pad on TOP at ``at`` whose shape is the standard primitive ``prim`` (inline)."""
    return doc(feature("TOP", f'<Pad>{xform}<Location x="{at[0]}" y="{at[1]}"/>{prim}</Pad>'))


def _thermal_area(R, r, gap, n):
    """Annulus minus n radial strips of width ``gap``: strip area inside a disc of radius a
    is F(a) = h sqrt(a^2 - h^2) + a^2 asin(h / a), h = gap / 2 (integral of sqrt(a^2-t^2))."""
    h = gap / 2

    def F(a):
        return h * math.sqrt(a * a - h * h) + a * a * math.asin(h / a)
    return math.pi * (R * R - r * r) - n * (F(R) - F(r))


# --------------------------------------------------------------------- standard primitives
PRIMITIVES = [
    # (id, primitive xml, area mm^2, bounds relative to the Location, curved)
    ("circle", '<Circle diameter="2"/>', math.pi, (-1, -1, 1, 1), True),
    ("rectcenter", '<RectCenter width="2" height="1"/>', 2.0, (-1, -0.5, 1, 0.5), False),
    ("rectcorner", '<RectCorner lowerLeftX="1" lowerLeftY="1" upperRightX="3" '
                   'upperRightY="2"/>', 2.0, (1, 1, 3, 2), False),
    ("rectround-all", '<RectRound width="4" height="2" radius="0.5" upperRight="true" '
                      'upperLeft="true" lowerLeft="true" lowerRight="true"/>',
     8 - 4 * 0.25 * (1 - math.pi / 4), (-2, -1, 2, 1), True),
    ("rectround-one", '<RectRound width="4" height="2" radius="0.5" upperRight="true" '
                      'upperLeft="false" lowerLeft="false" lowerRight="false"/>',
     8 - 0.25 * (1 - math.pi / 4), (-2, -1, 2, 1), True),
    ("rectcham-all", '<RectCham width="4" height="2" chamfer="0.5" upperRight="true" '
                     'upperLeft="true" lowerLeft="true" lowerRight="true"/>',
     8 - 4 * 0.5 * 0.5 / 2, (-2, -1, 2, 1), False),
    ("rectcham-two", '<RectCham width="4" height="2" chamfer="0.5" upperRight="true" '
                     'lowerLeft="true"/>', 8 - 2 * 0.125, (-2, -1, 2, 1), False),
    ("oval-wide", '<Oval width="4" height="2"/>', 2 * 2 + math.pi, (-2, -1, 2, 1), True),
    ("oval-tall", '<Oval width="1" height="3"/>', 2 * 1 + math.pi / 4, (-0.5, -1.5, 0.5, 1.5),
     True),
    ("donut-round", '<Donut shape="ROUND" outerDiameter="4" innerDiameter="2"/>',
     math.pi * (4 - 1), (-2, -2, 2, 2), True),
    ("donut-square", '<Donut shape="SQUARE" outerDiameter="4" innerDiameter="2"/>', 12.0,
     (-2, -2, 2, 2), False),
    ("diamond", '<Diamond width="4" height="2"/>', 4.0, (-2, -1, 2, 1), False),
    ("ellipse", '<Ellipse width="4" height="2"/>', math.pi * 2 * 1, (-2, -1, 2, 1), True),
    ("thermal", '<Thermal shape="ROUND" outerDiameter="4" innerDiameter="2" spokeCount="4" '
                'gap="0.5" spokeStartAngle="45"/>', _thermal_area(2, 1, 0.5, 4),
     (-2, -2, 2, 2), True),
    ("contour-cutout", '<Contour>' + square(-5, -5, 5, 5) + square(-1, -1, 1, 1, "Cutout")
     + '</Contour>', 100 - 4, (-5, -5, 5, 5), False),
    ("polygon-halfdisc", '<Polygon><PolyBegin x="-1" y="0"/><PolyStepSegment x="1" y="0"/>'
                         '<PolyStepCurve x="-1" y="0" centerX="0" centerY="0" '
                         'clockwise="false"/></Polygon>', math.pi / 2, (-1, 0, 1, 1), True),
    ("polygon-halfdisc-cw", '<Polygon><PolyBegin x="-1" y="0"/><PolyStepSegment x="1" y="0"/>'
                            '<PolyStepCurve x="-1" y="0" centerX="0" centerY="0" '
                            'clockwise="true"/></Polygon>', math.pi / 2, (-1, -1, 1, 0), True),
]


@pytest.mark.parametrize("ident,prim,area,bounds,curved", PRIMITIVES,
                         ids=[p[0] for p in PRIMITIVES])
def test_standard_primitive_area_and_bounds(tmp_path, ident, prim, area, bounds, curved):
    """Each standard primitive (inline in a Pad at Location (10, 20)): area and bounds
    worked out by hand from its definition (notes 3.3 [M]; RectRound corner radius r
    removes r^2 (1 - pi/4) per corner, RectCham chamfer c removes c^2 / 2 per corner,
    Oval = rectangle + disc, Thermal = annulus minus strips).  ``rectcham-two`` names only
    some corner flags, so the unnamed ones are square (reader's stated assumption)."""
    b = read(tmp_path, pad_at(prim))
    g = copper(b)
    tol_a, tol_b = (0.01, 0.001) if curved else (1e-9, 1e-9)
    assert abs(g.area - area) < tol_a
    want = (bounds[0] + 10, bounds[1] + 20, bounds[2] + 10, bounds[3] + 20)
    assert g.bounds == pytest.approx(want, abs=tol_b)


def test_dictionary_reference_equals_inline(tmp_path):
    """StandardPrimitiveRef@id resolves to DictionaryStandard/EntryStandard@id (notes 3.3):
    the referenced shape equals the same primitive written inline."""
    text = doc(feature("TOP", '<Pad><Location x="3" y="4"/><StandardPrimitiveRef id="R1"/>'
                              '</Pad>'),
               dicts=std('<EntryStandard id="R1"><RectCenter width="3" height="1"/>'
                         '</EntryStandard>'))
    g = copper(read(tmp_path, text))
    assert g.bounds == pytest.approx((1.5, 3.5, 4.5, 4.5))
    assert g.area == pytest.approx(3.0)


def test_user_primitive_union_of_shapes(tmp_path):
    """UserPrimitiveRef -> DictionaryUser/EntryUser/UserSpecial: the union of its shapes
    (notes 3.3); two disjoint 1 x 1 squares and a 2 mm circle referenced from the standard
    dictionary-free body: area 1 + 1 + pi (circumscribed circle, 0.01 tolerance)."""
    user = ('<DictionaryUser units="MILLIMETER"><EntryUser id="U1"><UserSpecial>'
            + square(0, 0, 1, 1) + square(3, 0, 4, 1) +
            '<Circle diameter="2"/></UserSpecial></EntryUser></DictionaryUser>')
    text = doc(feature("TOP", '<Pad><Location x="50" y="50"/><UserPrimitiveRef id="U1"/>'
                              '</Pad>'), dicts=user)
    g = copper(read(tmp_path, text))
    # the circle (centred on the origin) overlaps the first square by a quarter disc
    quarter = math.pi / 4
    assert abs(g.area - (1 + 1 + math.pi - quarter)) < 0.01
    assert g.bounds == pytest.approx((49, 49, 54, 51), abs=1e-3)


def test_unknown_primitive_kind_is_an_error_with_path(tmp_path):
    """A standard primitive the reader cannot draw (Octagon) on copper is an error naming
    the element, never skipped (issue: anything that changes copper and is not understood
    is an error with the element path)."""
    with pytest.raises(UnsupportedFeatureError) as e:
        read(tmp_path, pad_at('<Octagon length="2"/>'))
    assert "Octagon" in str(e.value)
    assert "LayerFeature[TOP]/Set[1]/Pad[1]/Octagon" in e.value.element


# --------------------------------------------------------------------- Xform
@pytest.mark.parametrize("xform,bounds", [
    ('<Xform rotation="90"/>', (10 - 0.5, 20 - 1, 10 + 0.5, 20 + 1)),
    ('<Xform rotation="180"/>', (10 - 3, 20 - 2, 10 - 1, 20 - 1)),
    ('<Xform mirror="true"/>', (10 - 3, 20 + 1, 10 - 1, 20 + 2)),
    # mirror first (x -> -x: [-3,-1] x [1,2]), then rotate 90 CCW ((x, y) -> (-y, x))
    ('<Xform mirror="true" rotation="90"/>', (10 - 2, 20 - 3, 10 - 1, 20 - 1)),
    ('<Xform scale="2"/>', (10 + 2, 20 + 2, 10 + 6, 20 + 4)),
])
def test_xform_rotation_mirror_scale(tmp_path, xform, bounds):
    """Xform about the local origin, then Location (notes 3.2 [M]): rotation degrees CCW;
    mirror x -> -x applied before rotation (the notes' 'safest assumption'); scale.
    Shape: RectCorner (1,1)-(3,2) except for the first case (RectCenter 1 x 2)."""
    prim = ('<RectCenter width="2" height="1"/>' if "90\"/" in xform and "mirror" not in xform
            else '<RectCorner lowerLeftX="1" lowerLeftY="1" upperRightX="3" upperRightY="2"/>')
    g = copper(read(tmp_path, pad_at(prim, xform)))
    assert g.bounds == pytest.approx(bounds, abs=1e-9)


# --------------------------------------------------------------------- lines and arcs
LINE_CASES = [
    # (id, feature xml (line desc LD), line desc, area, bounds)
    ("line-round", '<Line startX="0" startY="0" endX="10" endY="0"><LineDescRef id="LD"/></Line>',
     ("ROUND", 1.0), 10 + math.pi / 4, (-0.5, -0.5, 10.5, 0.5)),
    ("line-square", '<Line startX="0" startY="0" endX="10" endY="0"><LineDescRef id="LD"/>'
                    '</Line>', ("SQUARE", 1.0), 11.0, (-0.5, -0.5, 10.5, 0.5)),
    ("line-none", '<Line startX="0" startY="0" endX="10" endY="0"><LineDescRef id="LD"/></Line>',
     ("NONE", 1.0), 10.0, (0, -0.5, 10, 0.5)),
    ("line-inline-desc", '<Line startX="0" startY="0" endX="0" endY="4"><LineDesc '
                         'lineEnd="ROUND" lineWidth="0.5"/></Line>', ("ROUND", 9.0),
     4 * 0.5 + math.pi * 0.0625, (-0.25, -0.25, 0.25, 4.25)),
    ("arc-ccw-quarter", '<Arc startX="5" startY="0" endX="0" endY="5" centerX="0" centerY="0" '
                        'clockwise="false"><LineDescRef id="LD"/></Arc>', ("ROUND", 1.0),
     math.pi / 2 * 5 * 1 + math.pi / 4, (-0.5, -0.5, 5.5, 5.5)),
    ("arc-cw-three-quarters", '<Arc startX="5" startY="0" endX="0" endY="5" centerX="0" '
                              'centerY="0" clockwise="true"><LineDescRef id="LD"/></Arc>',
     ("ROUND", 1.0), 3 * math.pi / 2 * 5 + math.pi / 4, (-5.5, -5.5, 5.5, 5.5)),
    ("polyline-with-curve", '<Polyline><PolyBegin x="0" y="0"/><PolyStepSegment x="5" y="0"/>'
                            '<PolyStepCurve x="10" y="5" centerX="5" centerY="5" '
                            'clockwise="false"/><LineDescRef id="LD"/></Polyline>',
     ("ROUND", 0.2), (5 + math.pi / 2 * 5) * 0.2 + math.pi * 0.01, (-0.1, -0.1, 10.1, 5.1)),
    ("outline", '<Outline>' + square(0, 0, 10, 10) + '<LineDescRef id="LD"/></Outline>',
     ("ROUND", 1.0), (100 + 40 * 0.5 + math.pi * 0.25) - 81, (-0.5, -0.5, 10.5, 10.5)),
]


@pytest.mark.parametrize("ident,body,ld,area,bounds", LINE_CASES,
                         ids=[c[0] for c in LINE_CASES])
def test_lines_arcs_polylines_outlines(tmp_path, ident, body, ld, area, bounds):
    """Strokes with LineDesc(lineWidth, lineEnd): ROUND adds half-discs at the ends
    (area = length x width + pi w^2/4), SQUARE extends each end by w/2, NONE stops flat
    (notes 3.4 [M]).  Arc/PolyStepCurve sweep follows the clockwise flag.  An Outline is
    the boundary stroked: Minkowski sum A + P r + pi r^2 outside, (10 - 2r)^2 inside."""
    end, width = ld
    text = doc(feature("TOP", f"<Features>{body}</Features>", ' net="N1"'),
               dicts=lines(f'<EntryLineDesc id="LD"><LineDesc lineEnd="{end}" '
                           f'lineWidth="{width}"/></EntryLineDesc>'))
    b = read(tmp_path, text)
    g = copper(b)
    assert abs(g.area - area) < 0.01
    assert g.bounds == pytest.approx(bounds, abs=1e-3)
    assert {s.function for s in b.shapes} == {"Conductor"}
    assert {s.net for s in b.shapes} == {"N1"}


def test_arc_with_unequal_radii_is_an_error(tmp_path):
    """An Arc whose end is not on the start's circle is not a circular arc (notes 3.6:
    'clockwise flags that disagree with the radius'); error with the element path."""
    body = ('<Features><Arc startX="5" startY="0" endX="0" endY="6" centerX="0" centerY="0" '
            'clockwise="false"><LineDesc lineEnd="ROUND" lineWidth="1"/></Arc></Features>')
    with pytest.raises(InputFileError) as e:
        read(tmp_path, doc(feature("TOP", body)))
    assert "radii" in e.value.message and "Features" in e.value.element


# --------------------------------------------------------------------- units
@pytest.mark.parametrize("units,scale", [("MILLIMETER", 1.0), ("INCH", 1 / 25.4),
                                         ("MICRON", 1000.0)])
def test_units_from_cad_header(tmp_path, units, scale):
    """CadHeader@units applies to all Ecad coordinates (notes 3.2): the same 2.54 x 1.27 mm
    rectangle at (25.4, 12.7) mm written in mm, inch (0.1 x 0.05 in at (1, 0.5) in) and
    micron; 1 in = 25.4 mm, 1 um = 0.001 mm (definitions)."""
    w, h, x, y = (v * scale for v in (2.54, 1.27, 25.4, 12.7))
    prof = "<Profile>" + square(0, 0, 100 * scale, 100 * scale) + "</Profile>"
    text = doc(feature("TOP", f'<Pad><Location x="{x!r}" y="{y!r}"/><RectCenter width="{w!r}" '
                              f'height="{h!r}"/></Pad>'), units=units, profile=prof)
    b = read(tmp_path, text)
    assert copper(b).bounds == pytest.approx((24.13, 12.065, 26.67, 13.335), abs=1e-9)
    assert b.outline.bounds == pytest.approx((0, 0, 100, 100), abs=1e-9)


def test_dictionary_units_differ_from_cad_header(tmp_path):
    """Each dictionary has its own units (notes 3.2, 3.6): a DictionaryStandard in INCH
    used from MILLIMETER coordinates; 0.1 in circle = 2.54 mm (area pi 1.27^2)."""
    text = doc(feature("TOP", '<Pad><Location x="10" y="10"/><StandardPrimitiveRef id="C"/>'
                              '</Pad>'),
               dicts=std('<EntryStandard id="C"><Circle diameter="0.1"/></EntryStandard>',
                         units="INCH"))
    g = copper(read(tmp_path, text))
    assert abs(g.area - math.pi * 1.27 ** 2) < 0.01
    assert g.bounds == pytest.approx((8.73, 8.73, 11.27, 11.27), abs=1e-3)


def test_unknown_units_is_an_error(tmp_path):
    """Units other than MILLIMETER, MICRON, INCH are refused, listing the valid ones."""
    with pytest.raises(InputFileError) as e:
        read(tmp_path, doc("", units="FURLONG"))
    assert "MILLIMETER" in e.value.message


# --------------------------------------------------------------------- stackup, layers, holes
FOUR = ('<Layer name="L1" layerFunction="CONDUCTOR" side="TOP"/>'
        '<Layer name="D1" layerFunction="DIELPREG" side="INTERNAL"/>'
        '<Layer name="L2" layerFunction="PLANE" side="INTERNAL"/>'
        '<Layer name="D2" layerFunction="DIELCORE" side="INTERNAL"/>'
        '<Layer name="L3" layerFunction="SIGNAL" side="INTERNAL"/>'
        '<Layer name="D3" layerFunction="DIELPREG" side="INTERNAL"/>'
        '<Layer name="L4" layerFunction="CONDUCTOR" side="BOTTOM"/>'
        '<Layer name="SMT" layerFunction="SOLDERMASK" side="TOP"/>'
        '<Layer name="BLIND" layerFunction="DRILL" side="ALL"><Span fromLayer="L1" '
        'toLayer="L2"/></Layer>'
        '<Layer name="THRU" layerFunction="DRILL" side="ALL"><Span fromLayer="L4" '
        'toLayer="L1"/></Layer>')
# listed out of order on purpose: the sequence numbers give the order
FOUR_STACK = ('<Stackup name="S" overallThickness="1.6" stackupStatus="PROPOSED">'
              '<StackupGroup name="G">'
              '<StackupLayer layerOrGroupRef="L4" thickness="0.070" sequence="7"/>'
              '<StackupLayer layerOrGroupRef="L1" thickness="0.070" sequence="1"/>'
              '<StackupLayer layerOrGroupRef="D1" thickness="0.2" sequence="2"/>'
              '<StackupLayer layerOrGroupRef="L2" thickness="0.035" sequence="3"/>'
              '<StackupLayer layerOrGroupRef="D2" thickness="0.96" sequence="4"/>'
              '<StackupLayer layerOrGroupRef="L3" thickness="0.035" sequence="5"/>'
              '<StackupLayer layerOrGroupRef="D3" thickness="0.2" sequence="6"/>'
              '</StackupGroup></Stackup>')


def _four_layer_board(tmp_path):
    body = "".join(feature(L, f'<Pad><Location x="{10 * i}" y="5"/><Circle diameter="1"/></Pad>',
                           f' net="N{i}"') for i, L in enumerate(("L1", "L2", "L3", "L4"), 1))
    body += feature("SMT", '<Features><Location x="1" y="1"/><Octagon length="1"/></Features>')
    body += feature("BLIND", '<Hole name="B1" diameter="0.2" platingStatus="VIA" x="10" '
                             'y="5"/>', ' net="N1" padUsage="VIA"')
    body += feature("THRU", '<Hole name="T1" diameter="3.2" platingStatus="NONPLATED" x="90" '
                            'y="90"/>')
    return read(tmp_path, doc(body, layers=FOUR, stackup=FOUR_STACK))


def test_four_layer_stackup_order_and_thicknesses(tmp_path):
    """Stackup sequence gives the copper order (notes 3.1: StackupLayer(layerOrGroupRef,
    thickness, sequence)); copper and dielectric thicknesses come from the file; board
    layer names top/in1/in2/bottom (model convention).  Dielectric below a copper layer is
    the sum of the dielectric layers up to the next copper layer."""
    b = _four_layer_board(tmp_path)
    assert b.copper_layers == ["top", "in1", "in2", "bottom"]
    by_net = {s.net: s.layer for s in b.shapes}
    assert by_net == {"N1": "top", "N2": "in1", "N3": "in2", "N4": "bottom"}
    st = b.stackup
    assert st.basis == "file"
    assert st.thickness_mm == pytest.approx(1.6)
    assert st.copper_mm == pytest.approx({"top": 0.07, "in1": 0.035, "in2": 0.035,
                                          "bottom": 0.07})
    assert st.dielectric_mm == pytest.approx({"top": 0.2, "in1": 0.96, "in2": 0.2})
    sides = {L.name: L.side for L in b.layers if L.kind == "copper"}
    assert sides == {"top": "top", "in1": "inner", "in2": "inner", "bottom": "bottom"}


def test_drill_spans_and_plating(tmp_path):
    """Holes take their drill layer's Span (fromLayer/toLayer, either order) and plating
    from platingStatus (VIA plated, NONPLATED not) (notes 3.4); features on a solder mask
    layer are not copper and are not read (the Octagon there raises nothing)."""
    b = _four_layer_board(tmp_path)
    holes = sorted(b.holes, key=lambda h: h.diameter)
    assert [(h.diameter, h.plated, h.span, h.function, h.net) for h in holes] == [
        (0.2, True, ("top", "in1"), "ViaDrill", "N1"),
        (pytest.approx(3.2), False, ("top", "bottom"), "MechanicalDrill", None)]
    assert holes[1].geometry.area == pytest.approx(math.pi * 1.6 ** 2, abs=0.01)


def test_slot_cavity_plated_slot(tmp_path):
    """SlotCavity with a routed centre line (Polyline + LineDesc): a slot hole whose
    footprint is the stroke (10 x 1 + pi/4) and whose width is the line width."""
    body = feature("DRL", '<SlotCavity name="S" platingStatus="PLATED"><Polyline>'
                          '<PolyBegin x="20" y="20"/><PolyStepSegment x="30" y="20"/>'
                          '<LineDesc lineEnd="ROUND" lineWidth="1"/></Polyline></SlotCavity>',
                   ' net="P"')
    (h,) = read(tmp_path, doc(body)).holes
    assert h.is_slot and h.plated and h.net == "P" and h.diameter == 1.0
    assert abs(h.geometry.area - (10 + math.pi / 4)) < 0.01


def test_profile_with_cutout(tmp_path):
    """Profile = Polygon minus Cutouts (notes 3.1): 100 x 100 board with a 10 x 20 slot."""
    prof = "<Profile>" + square(0, 0, 100, 100) + square(40, 40, 50, 60, "Cutout") + "</Profile>"
    b = read(tmp_path, doc("", profile=prof))
    assert b.outline.area == pytest.approx(10000 - 200)
    assert len(b.outline.interiors) == 1


# --------------------------------------------------------------------- nets, pads, polarity
def test_nets_pins_and_functions(tmp_path):
    """Set@net attaches a net to its features; Pad/PinRef gives component and pin; padUsage
    VIA -> via pad, TERMINATION -> a termination (SMD pad without a hole in its pad
    stack, component pad with one); LogicalNet names a pad whose Set has no net;
    'No Net' is a placeholder for no net (notes 3.4, 3.6)."""
    step = ('<PadStackDef name="TH"><PadstackHoleDef name="h" diameter="1" '
            'platingStatus="PLATED" x="0" y="0"/></PadStackDef>'
            '<Component refDes="U1" packageRef="PK" layerRef="TOP"><Location x="5" y="5"/>'
            '</Component><Package name="PK"><Pin number="1" name="VIN"/><Pin number="2"/>'
            '</Package>'
            '<LogicalNet name="LN"><PinRef componentRef="U1" pin="2"/></LogicalNet>'
            '<LayerFeature layerRef="TOP">'
            '<Set net="A" padUsage="TERMINATION"><Pad padstackDefRef="TH"><Location x="1" '
            'y="1"/><Circle diameter="2"/><PinRef componentRef="U1" pin="1"/></Pad></Set>'
            '<Set padUsage="TERMINATION"><Pad><Location x="9" y="1"/><RectCenter width="1" '
            'height="1"/><PinRef componentRef="U1" pin="2"/></Pad></Set>'
            '<Set net="A" padUsage="VIA"><Pad><Location x="20" y="1"/><Circle diameter="0.6"/>'
            '</Pad></Set>'
            '<Set net="No Net"><Features><Location x="50" y="50"/><Circle diameter="1"/>'
            '</Features></Set>'
            '</LayerFeature>')
    b = read(tmp_path, doc(step))
    got = sorted(((s.net, s.component, s.pin, s.function, s.kind) for s in b.shapes), key=str)
    assert got == sorted([("", None, None, "Conductor", "flash"),
                          ("A", None, None, "ViaPad", "flash"),
                          ("A", "U1", "1", "ComponentPad", "flash"),
                          ("LN", "U1", "2", "SMDPad", "flash")], key=str)
    u1 = b.components["U1"]
    assert u1.package == "PK" and u1.position == (5.0, 5.0)
    assert u1.pins["1"].name == "VIN" and u1.pins["1"].net == "A"
    assert u1.pins["1"].position == (1.0, 1.0)
    assert u1.pins["2"].net == "LN"
    assert b.has_net_names
    src = next(s.source for s in b.shapes if s.pin == "1")
    assert src.file == "board.xml" and src.line is not None
    assert src.element.endswith("/Step[board]/LayerFeature[TOP]/Set[1]/Pad[1]")


def test_padstack_shape_when_pad_has_none(tmp_path):
    """A Pad without a shape takes its PadStackDef's PadstackPadDef for that layer (REGULAR
    pads only), offset by its Location, then placed by the Pad's Xform and Location."""
    step = ('<PadStackDef name="PS"><PadstackPadDef layerRef="TOP" padUse="REGULAR">'
            '<Location x="1" y="0"/><RectCenter width="2" height="1"/></PadstackPadDef>'
            '<PadstackPadDef layerRef="TOP" padUse="ANTIPAD"><Location x="0" y="0"/>'
            '<Circle diameter="9"/></PadstackPadDef></PadStackDef>'
            + feature("TOP", '<Pad padstackDefRef="PS"><Xform rotation="90"/><Location x="10" '
                             'y="10"/></Pad>'))
    g = copper(read(tmp_path, doc(step)))
    # local [0,2] x [-0.5,0.5] turned 90 CCW -> [-0.5,0.5] x [0,2]
    assert g.bounds == pytest.approx((9.5, 10, 10.5, 12), abs=1e-9)


def test_negative_set_erases_earlier_copper_only(tmp_path):
    """Set@polarity NEGATIVE subtracts from what was drawn before it on the layer, not from
    what comes after (notes 3.4: 'subtract NEGATIVE sets in document order')."""
    body = ('<LayerFeature layerRef="TOP">'
            '<Set net="P"><Features><Location x="5" y="5"/><RectCenter width="10" height="10"/>'
            '</Features></Set>'
            '<Set polarity="NEGATIVE"><Features><Location x="5" y="5"/><RectCenter width="4" '
            'height="4"/></Features></Set>'
            '<Set net="Q"><Features><Location x="5" y="5"/><RectCenter width="1" height="1"/>'
            '</Features></Set></LayerFeature>')
    b = read(tmp_path, doc(body))
    p = shapely.union_all([s.geometry for s in b.shapes if s.net == "P"])
    q = shapely.union_all([s.geometry for s in b.shapes if s.net == "Q"])
    assert p.area == pytest.approx(100 - 16) and len(p.interiors) == 1
    assert q.area == pytest.approx(1.0)


def test_phy_net_point_names_unnamed_copper(tmp_path):
    """PhyNet/PhyNetPoint (physical net records, notes 3.1) name copper the Sets leave
    unnamed when the point lies on it."""
    step = ('<PhyNetGroup name="g"><PhyNet name="PN"><PhyNetPoint x="3" y="3" layerRef="TOP" '
            'netNode="END" exposure="EXPOSED"/></PhyNet></PhyNetGroup>'
            + feature("TOP", '<Features><Location x="3" y="3"/><Circle diameter="1"/>'
                             '</Features>'))
    b = read(tmp_path, doc(step))
    assert [s.net for s in b.shapes] == ["PN"]


def test_revision_b_padstack_instances(tmp_path):
    """Revision B PadStack(net) with LayerPad(layerRef, Location, shape, PinRef) and
    LayerHole(diameter, platingStatus, x, y, Span) (notes 3.5: B form, removed in C)."""
    step = ('<PadStack net="B1"><LayerHole name="h" diameter="0.8" platingStatus="PLATED" '
            'x="30" y="30"><Span fromLayer="TOP" toLayer="BOT"/></LayerHole>'
            '<LayerPad layerRef="TOP"><Location x="30" y="30"/><Circle diameter="1.6"/>'
            '<PinRef componentRef="J1" pin="1"/></LayerPad>'
            '<LayerPad layerRef="BOT"><Location x="30" y="30"/><Circle diameter="1.6"/>'
            '</LayerPad></PadStack>')
    b = read(tmp_path, doc(step, revision="B"))
    assert sorted((s.layer, s.net, s.function) for s in b.shapes) == [
        ("bottom", "B1", "ComponentPad"), ("top", "B1", "ComponentPad")]
    (h,) = b.holes
    assert h.plated and h.net == "B1" and h.diameter == pytest.approx(0.8)
    assert b.components["J1"].pins["1"].net == "B1"


# --------------------------------------------------------------------- BOM
def test_bom_characteristics_on_components(tmp_path):
    """BomItem/RefDes + Characteristics (notes 3.1): Measured values become numbers under
    their characteristic name, or under a key from definition and unit
    (CAPACITANCE/FARAD -> capacitance_f); an SI prefix multiplies (n = 1e-9, definition);
    Textual values stay text; populate is kept."""
    bom = ('<Bom name="b"><BomItem OEMDesignNumberRef="CAP-1" quantity="2" category="ELECTRICAL">'
           '<RefDes name="C1" packageRef="P" populate="true" layerRef="TOP"/>'
           '<RefDes name="C2" packageRef="P" populate="false" layerRef="TOP"/>'
           '<Characteristics category="ELECTRICAL">'
           '<Measured definition="CAPACITANCE" engineeringUnit="FARAD" '
           'measuredCharacteristicValue="100n"/>'
           '<Measured definition="VOLTAGE" engineeringUnit="VOLT" '
           'measuredCharacteristicName="rating_v" measuredCharacteristicValue="630"/>'
           '<Textual definition="OTHER" textualCharacteristicName="value" '
           'textualCharacteristicValue="100 nF 630 V"/>'
           '</Characteristics></BomItem></Bom>')
    step = ('<Component refDes="C1" packageRef="P" layerRef="TOP"><Location x="1" y="1"/>'
            '</Component><Component refDes="C2" packageRef="P" layerRef="BOT">'
            '<Xform rotation="90" mirror="true"/><Location x="5" y="1"/></Component>')
    b = read(tmp_path, doc(step, bom=bom))
    c1, c2 = b.components["C1"], b.components["C2"]
    assert c1.properties["capacitance_f"] == pytest.approx(100e-9)
    assert c1.properties["rating_v"] == 630.0
    assert c1.value == "100 nF 630 V" and c1.properties["part"] == "CAP-1"
    assert c1.properties["populate"] is True and c2.properties["populate"] is False
    assert (c1.side, c2.side, c2.rotation) == ("top", "bottom", 90.0)


# --------------------------------------------------------------------- errors and safety
def test_malformed_xml_names_file_and_line(tmp_path):
    """An unclosed tag: not well-formed XML (XML 1.0) -> InputFileError with the line."""
    text = doc(feature("TOP", "<Pad><Location x='1' y='1'/><Circle diameter='1'/></Pad>"))
    text = text.replace("</Set>", "", 1)
    with pytest.raises(InputFileError) as e:
        read(tmp_path, text, "bad.xml")
    assert e.value.file == "bad.xml" and e.value.line is not None
    assert "well-formed" in e.value.message


def test_truncated_file(tmp_path):
    """A file cut short ends inside the document -> InputFileError, never a board."""
    text = doc(feature("TOP", "<Pad><Location x='1' y='1'/><Circle diameter='1'/></Pad>"))
    with pytest.raises(InputFileError) as e:
        read(tmp_path, text[: len(text) // 2 + 7], "cut.xml")
    assert e.value.file == "cut.xml"
    assert "truncated" in e.value.message or "well-formed" in e.value.message


def test_unknown_primitive_reference(tmp_path):
    """StandardPrimitiveRef to an id no dictionary defines -> error naming the id and the
    element path."""
    text = doc(feature("TOP", '<Pad><Location x="1" y="1"/><StandardPrimitiveRef id="NOPE"/>'
                              '</Pad>'))
    with pytest.raises(InputFileError) as e:
        read(tmp_path, text)
    assert "NOPE" in e.value.message
    assert e.value.element.endswith("LayerFeature[TOP]/Set[1]/Pad[1]/StandardPrimitiveRef")


def test_unknown_layer_reference(tmp_path):
    """LayerFeature@layerRef naming no Layer -> error naming it and the valid layers."""
    with pytest.raises(InputFileError) as e:
        read(tmp_path, doc(feature("L9", '<Features><Circle diameter="1"/></Features>')))
    assert "'L9'" in e.value.message and "TOP" in e.value.message
    assert "LayerFeature[L9]" in e.value.element


def test_unknown_set_child_on_copper(tmp_path):
    """Something in a copper Set the reader does not understand is an error, not skipped."""
    with pytest.raises(UnsupportedFeatureError) as e:
        read(tmp_path, doc(feature("TOP", '<Blob x="1"/>')))
    assert "Blob" in e.value.message and "Set[1]/Blob[1]" in e.value.element


BILLION_LAUGHS = ('<!DOCTYPE IPC-2581 [\n <!ENTITY lol "lol">\n'
                  ' <!ENTITY lol2 "&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;">\n'
                  ' <!ENTITY lol3 "&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;">\n'
                  ' <!ENTITY lol4 "&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;">\n'
                  ']>\n')
EXTERNAL = '<!DOCTYPE IPC-2581 [\n <!ENTITY xxe SYSTEM "file:///etc/passwd">\n]>\n'


@pytest.mark.parametrize("prolog,entity", [(BILLION_LAUGHS, "&lol4;"), (EXTERNAL, "&xxe;")],
                         ids=["entity-expansion", "external-entity"])
def test_entity_documents_are_refused(tmp_path, prolog, entity, capsys):
    """Entity-expansion ('billion laughs') and external-entity documents (common practice
    in XML security testing) are refused before parsing: InputFileError naming the file,
    'DTD/entity declarations are not accepted', nothing of the entity's content anywhere;
    through read_board and the command line too (exit 2, no report)."""
    text = doc(feature("TOP", f'<Features><Location x="1" y="1"/><Circle diameter="1"/>'
                              f'</Features>'), prolog=prolog).replace(
        '<Set>', f'<Set net="{entity}">')
    p = tmp_path / "evil.xml"
    p.write_text(text)
    with pytest.raises(InputFileError) as e:
        read_ipc2581(p)
    assert "DTD/entity declarations are not accepted" in str(e.value)
    assert e.value.file == "evil.xml" and e.value.line == 2
    assert "root:" not in str(e.value) and "lollol" not in str(e.value)
    with pytest.raises(InputFileError):
        read_board(p, load_project(None))
    rc = main(["review", str(p)])
    out, err = capsys.readouterr()
    assert rc == 2 and out == "" and "DTD/entity" in err and "root:" not in err


def test_parser_itself_does_not_expand_entities(tmp_path, monkeypatch):
    """Second line of defence: with the prolog check switched off, lxml's settings
    (resolve_entities=False, load_dtd=False, no_network=True) still expand nothing and the
    internal subset is refused at the root element."""
    monkeypatch.setattr(ipc2581_xml, "check_prolog", lambda path, file: None)
    text = doc(feature("TOP", '<Features><Location x="1" y="1"/><Circle diameter="1"/>'
                              '</Features>'), prolog=EXTERNAL).replace('<Set>',
                                                                       '<Set net="&xxe;">')
    p = tmp_path / "evil.xml"
    p.write_text(text)
    with pytest.raises(InputFileError) as e:
        read_ipc2581(p)
    assert "DTD/entity" in e.value.message and "root:" not in str(e.value)


def test_root_must_be_ipc2581(tmp_path):
    """A different XML root is refused, naming what was seen."""
    p = tmp_path / "x.xml"
    p.write_text('<?xml version="1.0"?><Other/>')
    with pytest.raises(InputFileError) as e:
        read_ipc2581(p)
    assert "<Other>" in e.value.message and not is_ipc2581(p)


def test_cli_review_of_a_bad_reference_exits_2(tmp_path, capsys):
    """The command line turns a reader error into exit 2 and prints no report."""
    p = tmp_path / "bad.xml"
    p.write_text(doc(feature("TOP", '<Pad><Location x="1" y="1"/><StandardPrimitiveRef '
                                    'id="X"/></Pad>')))
    rc = main(["review", str(p)])
    out, err = capsys.readouterr()
    assert rc == 2 and out == "" and "bad.xml" in err and "'X'" in err
