"""Sample writers: Gerber X2 and NC drill text, the sample boards, the benchmark generator.

Sources (section numbers of the Gerber Layer Format Specification rev. 2024.05 are given
from memory; the rules themselves are those summarised, with source marks, in the shared
format notes of this project, sections 1 and 2):
- Gerber spec 3.4 (data types: integers, decimals, strings, fields, names, \\u escapes),
  4.1 (G04), 4.2.1 (MO), 4.2.2 (FS: coordinate = integer / 10^d, leading zeros omitted),
  4.3/4.4 (AD and the C/R/O/P templates, D codes >= 10), 4.5 (AM primitives 1 and 21,
  arithmetic with x as multiply), 4.6 (Dnn), 4.7 (G01/G02/G03/G75), 4.8 (D01/D02/D03),
  4.9 (LP/LM/LR/LS), 4.10 (G36/G37 regions), 4.11 (AB), 4.12 (SR), 4.13 (M02),
  5.1-5.6 (TF/TA/TO/TD and the standard attributes .FileFunction, .FilePolarity,
  .GenerationSoftware, .AperFunction, .N, .P, .C).
- NC drill: the drilling-machine programming manual summarised in the shared notes
  section 2 (M48 header, METRIC, T<n>C<d> tools, % end of header, G05 drill mode,
  G00/M15/G01/M16 routed paths, M30); the ``; #@! TF./TA.`` comments are common practice.
- IPC-2221B Table 6-1 values used for the sample boards as quoted in the project brief.
Geometry interpretation of the files is left to the readers' tests.
"""
from __future__ import annotations

import functools
import math
import re
import sys
import tomllib
from pathlib import Path

import pytest
import shapely

from layoutcheck.physics.iec60664 import groove_width_x_mm
from layoutcheck.physics.requirements import SpacingProfile, required_spacing
from layoutcheck.project import load_project
from layoutcheck.writers.design import (Design, NonPlatedHole, Pad, Part, Slot, Track, Via,
                                        Zone, pad_polygon, slot_polygon)
from layoutcheck.writers.drill import drill_text, write_drill
from layoutcheck.writers.gerber import (GerberWriter, coordinate_text, escape_field,
                                        gerber_layer_text, write_gerbers)

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "sample_boards"))
sys.path.insert(0, str(ROOT / "benchmarks"))

import big_board  # noqa: E402
import fullbridge  # noqa: E402
import make_samples  # noqa: E402
import spacing_check  # noqa: E402
from surface_path import surface_path  # noqa: E402

# --------------------------------------------------------------------- a small design


def small_design() -> Design:
    """Two parts, one THT and one SMD pad shape of each kind, a track, a zone with a hole,
    a via, a mounting hole and a slot (mm)."""
    parts = [Part("Q1", "mosfet", "demo", "TO-247-3", {"1": "G", "2": "D", "3": "S"}),
             Part("R1", "resistor", "demo", "1206", {"1": "", "2": ""}),
             Part("J1", "connector", "demo", "T", {"1": "A,B"})]
    pads = [Pad("Q1", "1", "G1", 10.0, 10.0, "oval", 2.4, 3.2, "all", 1.4),
            Pad("Q1", "2", "BUS", 15.45, 10.0, "circle", 2.4, None, "all", 1.4),
            Pad("Q1", "3", "SW", 20.9, 10.0, "rect", 2.4, 2.4, "all", 1.4),
            Pad("R1", "1", "G1", 12.5, 20.0, "roundrect", 1.0, 1.6, "top",
                corner_radius=0.25),
            Pad("R1", "2", "N,2", 15.7, 20.0, "rect", 1.0, 1.6, "top", rotation=90),
            Pad("J1", "1", "SW", 30.0, 5.0, "rect", 1.0, 2.0, "bottom", rotation=30)]
    return Design(
        "demo", [(0, 0), (40, 0), (40, 30), (0, 30)], parts=parts, pads=pads,
        tracks=[Track("G1", "top", 0.5, [(10.0, 10.0), (10.0, 20.0), (12.5, 20.0)])],
        zones=[Zone("BUS", "bottom", [(2, 2), (38, 2), (38, 8), (2, 8)],
                    [[(5, 4), (7, 4), (7, 6), (5, 6)]])],
        vias=[Via("SW", 25.0, 15.0, 0.8, 0.4)],
        holes=[NonPlatedHole(3.0, 27.0, 3.2)],
        slots=[Slot([(20.0, 25.0), (30.0, 25.0)], 1.0)])


def lines(text: str) -> list[str]:
    return text.splitlines()


# --------------------------------------------------------------------- Gerber: header and end

def test_header_order_and_end():
    """Spec 5.2 (TF in the header), 4.2.1/4.2.2 (MO and FS once, before any coordinate),
    4.13 (M02 ends the file): comment, GenerationSoftware, FileFunction, FilePolarity,
    FS, MO, then the body; M02 once, last."""
    ls = lines(gerber_layer_text(small_design(), "top"))
    assert ls[:6] == ["G04 layoutcheck sample writer*",
                      "%TF.GenerationSoftware,layoutcheck,sample-writer,0.1*%",
                      "%TF.FileFunction,Copper,L1,Top*%",
                      "%TF.FilePolarity,Positive*%",
                      "%FSLAX46Y46*%",
                      "%MOMM*%"]
    assert ls[-1] == "M02*" and ls.count("M02*") == 1
    assert sum(1 for l in ls if l.startswith("%FS")) == 1
    assert sum(1 for l in ls if l.startswith("%MO")) == 1
    first_coord = next(i for i, l in enumerate(ls) if re.match(r"^X-?\d", l))
    assert first_coord > 5


@pytest.mark.parametrize("layer,function", [
    ("top", "%TF.FileFunction,Copper,L1,Top*%"),
    ("bottom", "%TF.FileFunction,Copper,L2,Bot*%"),
    ("profile", "%TF.FileFunction,Profile,NP*%"),
])
def test_file_functions(layer, function):
    """Spec 5.6 .FileFunction: Copper,L<n>,Top|Bot (L1 is the top) and Profile,NP."""
    assert function in lines(gerber_layer_text(small_design(), layer))


def test_inner_layer_function():
    """Spec 5.6 .FileFunction: an inner copper layer is Copper,L<n>,Inr."""
    d = small_design()
    d.copper_layers = 4
    d.tracks.append(Track("G1", "in2", 0.3, [(1.0, 1.0), (2.0, 1.0)]))
    assert "%TF.FileFunction,Copper,L3,Inr*%" in lines(gerber_layer_text(d, "in2"))


# --------------------------------------------------------------------- coordinates

@pytest.mark.parametrize("mm,text", [
    (12.5, "12500000"), (0.0, "0"), (-3.2, "-3200000"), (0.000001, "1"),
    (1.0000004, "1000000"), (1.0000006, "1000001"), (9999.999999, "9999999999"),
])
def test_coordinate_numbers(mm, text):
    """Spec 4.2.2: with FSLAX46Y46 a coordinate is value * 10^6 written as an integer with
    leading zeros omitted (worked by hand for each value; 1 nm resolution)."""
    assert coordinate_text(mm) == text


def test_coordinate_overflow_refused():
    """Spec 4.2.2: 4 integer digits hold at most 9999.999999 mm."""
    with pytest.raises(ValueError):
        coordinate_text(10000.0)


def test_other_coordinate_format():
    """Spec 4.2.2: FSLAX24Y24 in inches: 1.5 in -> 15000 (value * 10^4)."""
    w = GerberWriter(integer_digits=2, decimal_digits=4, units="inch")
    w.flash(1.5, -0.25, w.circle(0.01))
    ls = lines(w.text())
    assert "%FSLAX24Y24*%" in ls and "%MOIN*%" in ls
    assert "X15000Y-2500D03*" in ls


def test_operation_words_are_integers_and_decode_to_the_design():
    """Spec 4.8: every operation is X<int>Y<int>[I<int>J<int>]D0n*; decoding the flashes
    (integer / 10^6) gives back every pad and via centre on the layer."""
    d = small_design()
    ls = lines(gerber_layer_text(d, "top"))
    op = re.compile(r"^X(-?\d+)Y(-?\d+)(?:I-?\d+J-?\d+)?D0([123])\*$")
    flashes = set()
    for l in ls:
        if l.startswith("X"):
            m = op.match(l)
            assert m, l
            if m.group(3) == "3":
                flashes.add((int(m.group(1)) / 1e6, int(m.group(2)) / 1e6))
    want = {(p.x, p.y) for p in d.pads if "top" in d.pad_layers(p)} | {(v.x, v.y)
                                                                      for v in d.vias}
    assert flashes == want


# --------------------------------------------------------------------- apertures

AD = re.compile(r"^%ADD(\d+)([A-Za-z_.$][A-Za-z0-9_.$]*)(?:,([^*%]*))?\*%$")


def apertures(text: str) -> dict[int, tuple[str, list[str]]]:
    out = {}
    for l in lines(text):
        m = AD.match(l)
        if m:
            code = int(m.group(1))
            assert code not in out, f"D{code} defined twice"
            out[code] = (m.group(2), m.group(3).split("X") if m.group(3) else [])
    return out


def test_aperture_definitions_valid_and_defined_before_use():
    """Spec 4.3: D codes start at 10, are defined once, before they are selected (4.6)."""
    text = gerber_layer_text(small_design(), "top")
    defined = set()
    for l in lines(text):
        m = AD.match(l)
        if m:
            defined.add(int(m.group(1)))
            continue
        m = re.match(r"^D(\d+)\*$", l)
        if m:
            assert int(m.group(1)) >= 10 and int(m.group(1)) in defined, l
    assert min(defined) == 10


def test_aperture_sizes():
    """Spec 4.4: C,<diameter>; R,<x>X<y>; O,<x>X<y>.  The track pen is C 0.5, the circle
    pad C 2.4, the oval TO pad O 2.4X3.2, the 90-degree rect 1.0x1.6 pad R 1.6X1.0, the
    round rectangle uses the RoundRect macro with (w, h, r, rotation)."""
    ap = apertures(gerber_layer_text(small_design(), "top"))
    values = {(t, tuple(float(p) for p in ps)) for t, ps in ap.values()}
    assert ("C", (0.5,)) in values
    assert ("C", (2.4,)) in values
    assert ("O", (2.4, 3.2)) in values
    assert ("R", (1.6, 1.0)) in values
    assert ("R", (2.4, 2.4)) in values
    assert ("RoundRect", (1.0, 1.6, 0.25, 0.0)) in values
    assert ("C", (0.8,)) in values      # via pad


def test_odd_rotation_uses_rotated_rectangle_macro():
    """Spec 4.5 primitive 21 (centre line: exposure, width, height, x, y, rotation): a
    rectangle at 30 degrees is a macro aperture carrying the rotation."""
    text = gerber_layer_text(small_design(), "bottom")
    assert "%AMRotRect*" in text
    ap = apertures(text)
    assert ("RotRect", ["1.000000", "2.000000", "30.000000"]) in ap.values()


def _eval(expr: str, params: list[float]) -> float:
    """Macro arithmetic by the spec 4.5 rules: $n variables, x multiplies, / divides,
    + and - lowest, left to right (written for this test, independent of the writer)."""
    tokens = re.findall(r"\$\d+|\d*\.\d+|\d+|[-+x/()]", expr)
    pos = 0

    def atom():
        nonlocal pos
        t = tokens[pos]
        pos += 1
        if t == "(":
            v = add()
            pos += 1
            return v
        if t == "-":
            return -atom()
        if t.startswith("$"):
            return params[int(t[1:]) - 1]
        return float(t)

    def mul():
        nonlocal pos
        v = atom()
        while pos < len(tokens) and tokens[pos] in "x/":
            op = tokens[pos]
            pos += 1
            v = v * atom() if op == "x" else v / atom()
        return v

    def add():
        nonlocal pos
        v = mul()
        while pos < len(tokens) and tokens[pos] in "+-":
            op = tokens[pos]
            pos += 1
            v = v + mul() if op == "+" else v - mul()
        return v

    return add()


def test_roundrect_macro_worked_by_hand():
    """Spec 4.5: the RoundRect macro with $1=1.0, $2=1.6, $3=0.25, $4=0 must give two
    centre lines 1.0x1.1 and 0.5x1.6 and four circles of 0.5 at (+-0.25, +-0.55) - the
    rounded rectangle 1.0 x 1.6 with 0.25 corners, worked by hand."""
    text = gerber_layer_text(small_design(), "top")
    body = text[text.index("%AMRoundRect*") + len("%AMRoundRect*"):]
    body = body[:body.index("%")]
    words = [w.strip() for w in body.split("*") if w.strip()]
    params = [1.0, 1.6, 0.25, 0.0]
    lines21, circles = [], []
    for w in words:
        if w.startswith("0 "):               # comment primitive
            continue
        f = w.split(",")
        vals = [_eval(x, params) for x in f[1:]]
        assert vals[0] == 1                      # exposure on
        if f[0] == "21":
            assert len(vals) == 6
            lines21.append(tuple(round(v, 9) for v in vals[1:5]))
        else:
            assert f[0] == "1" and len(vals) == 5
            circles.append(tuple(round(v, 9) for v in vals[1:4]))
    assert sorted(lines21) == sorted([(1.0, 1.1, 0.0, 0.0), (0.5, 1.6, 0.0, 0.0)])
    assert sorted(circles) == sorted((0.5, sx * 0.25, sy * 0.55)
                                     for sx in (1, -1) for sy in (1, -1))


# --------------------------------------------------------------------- attributes

ATTR = re.compile(r"^%T([FAO])(\.?[A-Za-z_$][A-Za-z0-9_.$]*)((?:,[^,*%]*)*)\*%$")
TD = re.compile(r"^%TD(\.?[A-Za-z_$][A-Za-z0-9_.$]*)?\*%$")


def simulate(text: str):
    """Walk the file keeping the attribute dictionary as spec 5.1/5.4/5.5 define it
    (TA/TO add or replace, TD removes one or all aperture+object attributes) and return
    [(kind, dict)] for every object: 'flash', 'draw', 'region' (G36 takes the
    dictionary's attributes)."""
    d: dict[str, tuple[str, ...]] = {}
    objects = []
    in_region = False
    polarity = "dark"
    for l in lines(text):
        m = ATTR.match(l)
        if m:
            if m.group(1) != "F":
                d[m.group(2)] = tuple(m.group(3)[1:].split(",")) if m.group(3) else ()
            continue
        m = TD.match(l)
        if m:
            if m.group(1):
                d.pop(m.group(1), None)
            else:
                d.clear()
            continue
        if l in ("%LPD*%", "%LPC*%"):
            polarity = "dark" if l == "%LPD*%" else "clear"
        elif l == "G36*":
            in_region = True
            objects.append(("region", dict(d), polarity))
        elif l == "G37*":
            in_region = False
        elif l.endswith("D03*"):
            objects.append(("flash", dict(d), polarity))
        elif l.endswith("D01*") and not in_region:
            objects.append(("draw", dict(d), polarity))
    return objects


def test_attribute_syntax():
    """Spec 3.4 and 5.2-5.5: %T{F,A,O}<name>[,<field>...]*% with no ',' '*' '%' inside a
    field, and %TD[<name>]*%; standard names start with a dot."""
    for layer in ("top", "bottom", "profile"):
        for l in lines(gerber_layer_text(small_design(), layer)):
            if l.startswith("%T"):
                assert ATTR.match(l) or TD.match(l), l


def test_escaped_fields():
    """Spec 3.4 (strings and fields): ',' '*' '%' and backslash are written as \\uXXXX."""
    assert escape_field("a,b*c%d\\e") == "a\\u002Cb\\u002Ac\\u0025d\\u005Ce"
    text = gerber_layer_text(small_design(), "top")
    assert "%TO.N,N\\u002C2*%" in lines(text)


def test_object_attributes_on_every_object():
    """Spec 5.4/5.6: each pad flash carries .P (ref, pin[, name]), .N and .C; each track
    draw carries .N; vias carry .N but no .P; regions carry .AperFunction,Conductor and .N.
    Aperture functions (5.6.10): ComponentPad for THT, SMDPad,CuDef for SMD, ViaPad."""
    d = small_design()
    text = gerber_layer_text(d, "top")
    ap_fn = {}
    cur = {}
    for l in lines(text):
        m = ATTR.match(l)
        if m and m.group(1) == "A":
            cur[m.group(2)] = m.group(3)[1:]
        if TD.match(l):
            cur.clear()
        m = AD.match(l)
        if m:
            ap_fn[int(m.group(1))] = cur.get(".AperFunction")
    objs = simulate(text)
    flashes = [o for o in objs if o[0] == "flash"]
    want_pads = [p for p in d.pads if "top" in d.pad_layers(p)]
    assert len(flashes) == len(want_pads) + len(d.vias)
    for (kind, attrs, pol), pad in zip(flashes, want_pads):
        name = d.pin_name(pad.ref, pad.pin)
        want_p = (pad.ref, pad.pin) + ((name,) if name else ())
        assert attrs[".P"] == want_p
        assert attrs[".C"] == (pad.ref,)
        assert attrs[".N"] == (escape_field(pad.net),)
    via_attrs = flashes[-1][1]
    assert via_attrs == {".N": ("SW",)}
    draws = [o for o in objs if o[0] == "draw"]
    assert draws and all(o[1] == {".N": ("G1",)} for o in draws)
    # aperture functions by object
    selects = []
    cur_d = None
    for l in lines(text):
        m = re.match(r"^D(\d+)\*$", l)
        if m:
            cur_d = int(m.group(1))
        elif l.endswith("D03*"):
            selects.append(ap_fn[cur_d])
    want_fn = ["ComponentPad" if p.drill else "SMDPad,CuDef" for p in want_pads] + ["ViaPad"]
    assert selects == want_fn


def test_zone_with_hole_is_dark_region_then_clear_region():
    """Spec 4.9/4.10: the zone is a dark G36/G37 region with .AperFunction,Conductor and
    .N; its hole follows as a clear-polarity region with no attributes; polarity returns
    to dark; every contour starts with D02 and ends on its first point."""
    text = gerber_layer_text(small_design(), "bottom")
    regions = [o for o in simulate(text) if o[0] == "region"]
    assert regions[0] == ("region", {".AperFunction": ("Conductor",), ".N": ("BUS",)}, "dark")
    assert regions[1] == ("region", {}, "clear")
    ls = lines(text)
    i = ls.index("%LPC*%")
    assert ls[i + 1] == "G36*" and "%LPD*%" in ls[i:]
    start = None
    for l in ls:
        if l == "G36*":
            start, pts = True, []
        elif l == "G37*":
            assert pts[0] == pts[-1] and len(pts) >= 4
            start = None
        elif start:
            assert re.match(r"^X-?\d+Y-?\d+D0[12]\*$", l), l
            if not pts:
                assert l.endswith("D02*")
            pts.append(l[:-4])


def test_plain_gerber_is_the_same_graphics_without_attributes():
    """x2=False: no TF/TA/TO/TD and no attribute comments; every other line identical to
    the X2 file (spec 5.1: attributes do not change the image)."""
    d = small_design()
    for layer in ("top", "bottom", "profile"):
        x2 = lines(gerber_layer_text(d, layer, x2=True))
        plain = lines(gerber_layer_text(d, layer, x2=False))
        assert not [l for l in plain if l.startswith(("%TF", "%TA", "%TO", "%TD", "G04 #@!"))]
        assert [l for l in x2 if not l.startswith(("%TF", "%TA", "%TO", "%TD"))] == plain


def test_profile_is_a_closed_path():
    """Spec 5.6 .AperFunction,Profile on the profile layer; the outline is drawn back to
    its first point."""
    ls = lines(gerber_layer_text(small_design(), "profile"))
    assert "%TA.AperFunction,Profile*%" in ls
    ops = [l for l in ls if l.startswith("X")]
    assert ops[0].endswith("D02*") and ops[0][:-4] == ops[-1][:-4]
    assert len(ops) == 5


# --------------------------------------------------------------------- low-level writer

def test_low_level_operations_syntax():
    """Spec 4.7 (G75 before the first arc, G02/G03 modes), 4.8 (I/J are the centre minus
    the start point), 4.4.5 (P,<d>X<n>[X<rot>]), 4.9 (LM/LR/LS), 4.11 (AB), 4.12 (SR with
    decimal I/J)."""
    w = GerberWriter(comment="odd")
    p = w.polygon(1.0, 6, 15.0)
    o = w.obround(2.0, 1.0, 0.5)
    w.move(1.0, 0.0)
    w.select(w.circle(0.1))
    w.arc(-1.0, 0.0, 0.0, 0.0, clockwise=False)
    w.transform(mirror="XY", rotation=45.0, scale=2.0)
    w.flash(0.0, 0.0, p)
    w.step_repeat(2, 3, 1.0, 2.5)
    w.flash(0.0, 0.0, o)
    w.end_step_repeat()
    blk = w.block_begin()
    w.flash(0.0, 0.0, o)
    w.block_end()
    w.polarity("clear").flash(5.0, 5.0, blk)
    ls = lines(w.text())
    assert "%ADD10P,1.000000X6X15.000000*%" in ls
    assert "%ADD11O,2.000000X1.000000X0.500000*%" in ls
    i = ls.index("G75*")
    assert ls[i + 1] == "G03*" and ls[i + 2] == "X-1000000Y0I-1000000J0D01*"
    assert ["%LMXY*%", "%LR45.000000*%", "%LS2.000000*%"] == [
        l for l in ls if l.startswith(("%LM", "%LR", "%LS"))]
    assert "%SRX2Y3I1.000000J2.500000*%" in ls and "%SR*%" in ls
    assert "%ABD13*%" in ls and "%AB*%" in ls and "%LPC*%" in ls
    assert "X5000000Y5000000D03*" in ls
    assert ls[0] == "G04 odd*" and ls[-1] == "M02*"


def test_low_level_arc_needs_a_current_point():
    """Spec 1.2 of the shared notes: the current point starts undefined."""
    w = GerberWriter()
    with pytest.raises(ValueError):
        w.arc(1.0, 0.0, 0.0, 0.0)


# --------------------------------------------------------------------- NC drill

def test_drill_structure():
    """NC drill (shared notes 2.2-2.4): M48 first; file function comment; METRIC before
    the tools; each T<n>C<d> tool preceded by its TA.AperFunction comment (common
    practice); '%' closes the header; G05 drill mode; M30 last."""
    d = small_design()
    for plated, ff in ((True, "; #@! TF.FileFunction,Plated,1,2,PTH"),
                       (False, "; #@! TF.FileFunction,NonPlated,1,2,NPTH")):
        ls = lines(drill_text(d, plated))
        assert ls[0] == "M48" and ls[-1] == "M30" and ff in ls
        head = ls[:ls.index("%")]
        metric = next(i for i, l in enumerate(head) if l.startswith("METRIC"))
        tools = [i for i, l in enumerate(head) if re.match(r"^T\d+C\d+\.\d+$", l)]
        assert tools and all(i > metric for i in tools)
        for i in tools:
            assert head[i - 1].startswith("; #@! TA.AperFunction,"
                                          + ("Plated,PTH," if plated else "NonPlated,NPTH,"))
        assert "G05" in ls[ls.index("%"):]


def test_drill_hits_and_tools_match_the_design():
    """Every coordinate carries a decimal point (it then overrides any zero mode); the
    plated file holds the THT pads and vias with their diameters, the non-plated one the
    mounting hole and the routed slot G00 / M15 / G01 / M16 / G05."""
    d = small_design()
    pth = lines(drill_text(d, True))
    tools = {m.group(1): float(m.group(2)) for m in
             (re.match(r"^T(\d+)C(\d+\.\d+)$", l) for l in pth) if m}
    hits, tool = [], None
    for l in pth[pth.index("%"):]:
        m = re.match(r"^T(\d+)$", l)
        if m:
            tool = m.group(1)
        m = re.match(r"^X(-?\d+\.\d+)Y(-?\d+\.\d+)$", l)
        if m:
            hits.append((float(m.group(1)), float(m.group(2)), tools[tool]))
    want = sorted([(p.x, p.y, p.drill) for p in d.pads if p.drill]
                  + [(v.x, v.y, v.drill) for v in d.vias])
    assert sorted(hits) == want
    npth = lines(drill_text(d, False))
    i = npth.index("G00X20.000Y25.000")
    assert npth[i:i + 5] == ["G00X20.000Y25.000", "M15", "G01X30.000Y25.000", "M16", "G05"]
    assert "X3.000Y27.000" in npth
    for l in pth + npth:
        if re.match(r"^(G0[01])?X", l):
            assert re.match(r"^(G0[01])?X-?\d+\.\d{3}Y-?\d+\.\d{3}$", l), l


def test_writes_and_determinism(tmp_path):
    """The same design written twice gives identical bytes; file names as documented."""
    d = small_design()
    a = write_gerbers(d, tmp_path / "a") + write_drill(d, tmp_path / "a")
    b = write_gerbers(d, tmp_path / "b") + write_drill(d, tmp_path / "b")
    assert [p.name for p in a] == ["demo-copper-top.gbr", "demo-copper-bottom.gbr",
                                   "demo-profile.gbr", "demo-PTH.drl", "demo-NPTH.drl"]
    assert [p.read_bytes() for p in a] == [p.read_bytes() for p in b]


def test_design_validation():
    """A through-hole pad without layers='all', or a pad of an unknown part, is refused."""
    from layoutcheck.errors import UsageError
    d = small_design()
    d.pads.append(Pad("Q1", "1", "X", 1, 1, "circle", 1.0, None, "top", 0.5))
    with pytest.raises(UsageError):
        d.validate()
    d = small_design()
    d.pads.append(Pad("U9", "1", "X", 1, 1))
    with pytest.raises(UsageError):
        write_gerbers(d, "unused-never-written")


# --------------------------------------------------------------------- sample boards

def _required(volts, standard="both", termination=False):
    """The package's own requirement for the sample's environment (pollution degree 2,
    material group IIIa, overvoltage category II, functional insulation: the project
    file has no [[insulation]] entry), external layer."""
    profile = SpacingProfile(standard=standard, pollution_degree=2, material_group="IIIa",
                             overvoltage_category="II", insulation="functional")
    return required_spacing(profile, volts, rms_v=volts, layer_outer=True,
                            termination=termination)


def test_sample_folders_are_up_to_date(tmp_path):
    """make_samples output is deterministic and the generated folders in the repository
    are byte-identical to a fresh run (regenerate with make_samples.py if this fails)."""
    for rev in ("a", "b"):
        fresh = make_samples.make(rev, tmp_path)
        again = make_samples.make(rev, tmp_path / "again")
        assert [p.read_bytes() for p in fresh] == [p.read_bytes() for p in again]
        for p in fresh:
            kept = ROOT / "sample_boards" / p.parent.name / p.name
            assert kept.read_bytes() == p.read_bytes(), kept.name


def test_project_file_contract():
    """The project file has the agreed [board]/[voltages]/[environment] shape, the nets
    that ride on a switch node are declared relative to it, the IEC 60664-1 conditions
    are written out (each with a comment) rather than left to defaults, the power-loop data
    ([switching], [legs], [parts]) names the packages the boards' parts carry, and both
    folders hold the generator's one PROJECT_TEXT."""
    for rev in ("a", "b"):
        text = (ROOT / "sample_boards" / f"fullbridge-rev-{rev}" /
                "layoutcheck.toml").read_text(encoding="utf-8")
        assert text == fullbridge.PROJECT_TEXT
        t = tomllib.loads(text)
        assert t["board"] == {"files": "."}
        v = t["voltages"]
        assert v["HV_BUS"] == 400 and v["HV_RTN"] == 0 and v["GND"] == 0
        assert v["MID"] == "170..200" and v["SW_*"] == "0..400"
        assert v["+15V"] == 15 and v["+5V"] == 5 and v["*"] == "0..15"
        for leg, gate in (("A", "G_Q1"), ("B", "G_Q3")):
            sw = f"SW_{leg}"
            assert v[f"VB_{leg}"] == {"on": sw, "volts": 15}
            assert v[f"HO_{leg}"] == {"on": sw, "volts": "0..15"}
            assert v[gate] == {"on": sw, "volts": "0..15"}
        assert not any(isinstance(x, str) and x.endswith("415") for x in v.values())
        assert t["environment"] == {"altitude_m": 0, "coating": "none", "standard": "both",
                                    "pollution_degree": 2, "material_group": "IIIa",
                                    "overvoltage_category": "II"}
        iec_keys = ("standard", "pollution_degree", "material_group", "overvoltage_category")
        for key in iec_keys:
            line = next(x for x in text.splitlines() if x.startswith(key + " "))
            assert "#" in line, key
        proj = load_project(ROOT / "sample_boards" / f"fullbridge-rev-{rev}" /
                            "layoutcheck.toml")
        env = proj.environment
        assert set(iec_keys) <= env.explicit and env.standard == "both"
        # the power-loop data: 20 A in 10 ns, the legs, the loop parts and their packages
        assert t["switching"] == {"current_a": 20, "switch_time_ns": 10, "derating": 0.8,
                                  "warn_nh": 40}
        assert proj.switching.di_dt() == pytest.approx(2.0)
        assert t["legs"] == {"A": {"high": "Q1", "low": "Q2"},
                             "B": {"high": "Q3", "low": "Q4"}}
        parts = t["parts"]
        for q in ("Q1", "Q2", "Q3", "Q4"):
            assert parts[q] == {"package": "TO-247", "vds_max_v": 650, "coss_pf": 120}
        for c, package in (("C5", "BOX-P7.5"), ("C6", "BOX-P7.5"), ("C10", "1812"),
                           ("C11", "1812")):
            assert parts[c] == {"kind": "capacitor", "package": package}
            assert all(p.package == package for p in fullbridge.build("b").parts
                       if p.ref == c)


@pytest.mark.parametrize("a,b,volts", [
    ("VB_A", "SW_A", 15), ("HO_A", "VB_A", 15), ("G_Q1", "SW_A", 15), ("HO_B", "G_Q3", 15),
    ("VB_A", "+15V", 400), ("VB_A", "GND", 415), ("HO_A", "LO_A", 415),
    ("VB_A", "VB_B", 400), ("HO_A", "SW_B", 415), ("SW_A", "SW_B", 400),
    ("SW_A", "GND", 400), ("G_Q1", "HV_RTN", 415), ("G_Q1", "HV_BUS", 400),
    ("HV_BUS", "HV_RTN", 400), ("HV_BUS", "+15V", 385), ("HV_BUS", "+5V", 395),
    ("LO_A", "GND", 15), ("MID", "HV_BUS", 230), ("MID", "HV_RTN", 200), ("MID", "VB_A", 245),
])
def test_self_check_working_voltages(a, b, volts):
    """The self-check's working voltages, worked by hand from the stage: the switch node
    swings 0-400 V and the bootstrap supply rides 15 V above it (common practice for a
    bootstrap half-bridge driver), so VB_A is 15..415 V absolute but at most 15 V from
    SW_A, HO_A and G_Q1 (and 400 V from VB_B, 15..415 V too); logic nets are 0..15 V; MID
    is 170..200 V."""
    assert fullbridge.working_voltage(a, b) == pytest.approx(volts)
    assert fullbridge.working_voltage(b, a) == pytest.approx(volts)


@pytest.mark.parametrize("a,b", [("HV_BUS", "HV_RTN"), ("VB_A", "GND"), ("HV_BUS", "+5V"),
                                 ("MID", "HV_BUS"), ("MID", "GND"), ("LO_A", "GND"),
                                 ("+5V", "+15V")])
def test_targets_are_the_requirement_plus_margin(a, b):
    """The design's targets are the package's requirement function for the project's
    conditions (the larger of IPC-2221B Table 6-1 and IEC 60664-1, conductor or
    termination) plus the design margin; the creepage target is never below the clearance
    one (IEC 60664-1: creepage not less than the clearance; from memory)."""
    v = fullbridge.working_voltage(a, b)
    reqs = [_required(v, termination=t) for t in (False, True)]
    got_v, clr, crp = fullbridge.pair_targets(a, b)
    assert got_v == v
    assert clr == pytest.approx(max(r.clearance_mm for r in reqs) + fullbridge.MARGIN)
    assert crp == pytest.approx(max(r.creepage_mm for r in reqs) + fullbridge.MARGIN)
    assert fullbridge.target_gap(a, b) == pytest.approx(crp) and crp >= clr
    assert 0 < fullbridge.MARGIN <= 0.5


def test_driver_footprint_worked_by_hand():
    """The drivers' invented 16-position wide-body package with 8 pins fitted: rows at
    x = +-4.65 mm, pitch 1.27 mm, positions 1..8 down the left row and 9..16 up the right
    row (the usual small-outline numbering, common practice), pads 2.0 x 0.6 mm.  Placed at
    (55.355, 27.05) turned 90 degrees CCW, (dx, dy) -> (cx - dy, cy + dx), worked by hand:
    pin 1 at (50.91, 22.4), pin 5 at (55.99, 22.4), pin 14 at (53.45, 31.7), pin 16 at
    (50.91, 31.7); neighbouring pads 1.27 - 0.6 = 0.67 mm apart, the rows 9.3 - 2.0 =
    7.3 mm apart (shapely distances on the pads)."""
    d = fullbridge.build("b")
    pads = {p.pin: p for p in d.pads if p.ref == "U1"}
    assert sorted(pads, key=int) == ["1", "2", "3", "4", "5", "14", "15", "16"]
    want = {"1": (50.91, 22.4), "2": (52.18, 22.4), "3": (53.45, 22.4), "4": (54.72, 22.4),
            "5": (55.99, 22.4), "14": (53.45, 31.7), "15": (52.18, 31.7),
            "16": (50.91, 31.7)}
    for pin, (x, y) in want.items():
        assert (pads[pin].x, pads[pin].y) == pytest.approx((x, y), abs=1e-6), pin
    geo = {pin: pad_polygon(p) for pin, p in pads.items()}
    assert geo["1"].bounds == pytest.approx((50.61, 21.4, 51.21, 23.4), abs=1e-6)
    assert geo["4"].distance(geo["5"]) == pytest.approx(0.67, abs=1e-6)
    assert geo["14"].distance(geo["15"]) == pytest.approx(0.67, abs=1e-6)
    assert geo["3"].distance(geo["14"]) == pytest.approx(7.3, abs=1e-6)
    nets = {pin: p.net for pin, p in pads.items()}
    assert nets == {"1": "+15V", "2": "IN_A", "3": "IN_B", "4": "GND", "5": "LO_A",
                    "14": "SW_A", "15": "HO_A", "16": "VB_A"}
    assert d.part("U1").pins == {"1": "VCC", "2": "HIN", "3": "LIN", "4": "COM", "5": "LO",
                                 "14": "VS", "15": "HO", "16": "VB"}


def test_self_check_counts_the_driver_pins():
    """No copper is exempt: LO moved into the empty position 13, next to VS (1.27 mm
    pitch, 0.6 mm pads: 0.67 mm apart at 400 V, below the 3.0 mm IEC 60664-1 clearance),
    must be reported as a clearance problem (hand-worked gap)."""
    d = fullbridge.build("b")
    lo = next(p for p in d.pads if p.ref == "U1" and p.pin == "5")
    vs = next(p for p in d.pads if p.ref == "U1" and p.pin == "14")
    lo.x, lo.y = round(vs.x + 1.27, 6), vs.y
    found = [v for v in spacing_check.spacing_violations(d)
             if v.nets == ("LO_A", "SW_A") and "U1.5 pad" in v.features
             and "U1.14 pad" in v.features]
    assert len(found) == 1
    assert found[0].gap == pytest.approx(0.67, abs=1e-4) and found[0].voltage == 400
    assert found[0].kind == "clearance" and found[0].gap < _required(400).clearance_mm


def test_sample_nets_match_the_scenario():
    """Every net of the scenario is on the board, and no other."""
    want = {"HV_BUS", "HV_RTN", "MID", "SW_A", "SW_B", "VB_A", "VB_B", "HO_A", "HO_B",
            "LO_A", "LO_B", "G_Q1", "G_Q2", "G_Q3", "G_Q4", "+15V", "+5V", "IN_A", "IN_B",
            "GND"}
    for rev in ("a", "b"):
        assert set(fullbridge.build(rev).nets()) == want


@pytest.mark.parametrize("rev", ["a", "b"])
def test_sample_copper_is_whole_and_apart(rev):
    """Checked with shapely on the design's ideal copper: no two nets touch, and each
    net's copper (joined by overlap on a layer and through plated pads and vias) is one
    piece, pours included (common practice for a board meant to be built)."""
    pieces, root = _plated_conductors(fullbridge.build(rev))
    roots_of = {}
    for p, r in zip(pieces, root):
        roots_of.setdefault(p.net, set()).add(r)
    assert {n: len(r) for n, r in roots_of.items() if len(r) > 1} == {}


@pytest.mark.parametrize("rev", ["a", "b"])
def test_sample_spacing(rev):
    """Shapely distances and surface paths on the sample's own copper against the design
    targets: rev-a shows exactly the five planted spacing problems with their documented
    smallest gaps (+-0.01 mm) and kinds, rev-b nothing.  Each planted clearance gap is below both
    IPC-2221B Table 6-1 (B2 and A6) and the IEC 60664-1 clearance; the planted creepage gap
    keeps both clearances but is below the IEC 60664-1 creepage, on a straight path (all
    requirements from the package's requirement function)."""
    groups = spacing_check.classify(spacing_check.spacing_violations(fullbridge.build(rev)))
    if rev == "b":
        assert groups == {}
        return
    assert set(groups) == {1, 2, 3, 4, 5} == set(fullbridge.spacing_planted())
    for pid, p in fullbridge.spacing_planted().items():
        worst = min(groups[pid], key=lambda v: v.gap)
        assert abs(worst.gap - p.gap) <= 0.01 and worst.kind == p.kind, pid
        v = fullbridge.working_voltage(*p.nets)
        iec = _required(v, "iec60664-1")
        ipc = max(_required(v, "ipc2221b", t).clearance_mm for t in (False, True))
        if p.kind == "clearance":
            assert worst.gap < min(ipc, iec.clearance_mm), pid
        else:
            assert max(ipc, iec.clearance_mm) <= worst.gap < iec.creepage_mm
            assert worst.path == pytest.approx(worst.gap, abs=1e-4)
    assert sum(p.kind == "creepage" for p in fullbridge.PLANTED.values()) == 1
    assert [p.leg for p in fullbridge.PLANTED.values() if p.kind == "loop"] == ["A"]


def test_self_check_sees_the_missing_slot(monkeypatch):
    """Without its slot rev-b fails at exactly the planted creepage spot: the slot is the
    only fix there."""
    monkeypatch.setattr(fullbridge, "CREEPAGE_SLOT", None)
    errors = spacing_check.check(fullbridge.build("b"), "b")
    assert len(errors) == 1 and "('+5V', 'HV_BUS')" in errors[0] and "creepage" in errors[0]


@pytest.mark.parametrize("rev", ["a", "b"])
def test_review_agrees_with_the_self_check(rev):
    """The package's own review of the written folder finds exactly the planted problems
    in rev-a and nothing in rev-b.  Clearance: one finding per planted clearance problem
    (problem 3 on both layers) with the documented smallest copper-to-copper gap
    (+-0.01 mm), required value from the requirement function.  Creepage: exactly one
    finding at the planted creepage spot, on the straight 3.3 mm path, 4.0 mm required
    (IEC 60664-1 Table F.4 via the requirement function); any other creepage finding sits
    on a planted clearance place."""
    from layoutcheck.review import review
    r = review(ROOT / "sample_boards" / f"fullbridge-rev-{rev}")
    spacing = [f for f in r.findings if f.rule in ("clearance", "creepage")]
    if rev == "b":
        assert spacing == []
        return
    assert {f.rule for f in spacing} == {"clearance", "creepage"}
    assert all(f.severity == "error" for f in spacing)
    places = {"clearance": [], "creepage": []}
    for f in spacing:
        pid = spacing_check.planted_of(f.layer, f.nets, f.where)
        assert pid is not None, f.message
        places[f.rule].append((pid, f.layer))
        need = {getattr(_required(f.voltage_v, termination=t), f"{f.rule}_mm")
                for t in (False, True)}
        assert f.required_mm in need, f.message
        if f.rule == "clearance":
            assert abs(f.extra["closest_mm"] - fullbridge.PLANTED[pid].gap) <= 0.01
    assert sorted(places["clearance"]) == [(1, "top"), (2, "top"), (3, "bottom"),
                                           (3, "top"), (4, "bottom")]
    spot = [f for f in spacing if f.rule == "creepage"
            and spacing_check.planted_of(f.layer, f.nets, f.where) == 5]
    assert len(spot) == 1
    f = spot[0]
    assert len(f.extra["path"]) == 2 and "around" not in f.extra
    assert abs(f.measured_mm - fullbridge.CREEPAGE_GAP) <= 0.01
    assert f.measured_mm == pytest.approx(f.extra["straight_mm"], abs=1e-6)
    assert f.required_mm == _required(f.voltage_v, "iec60664-1").creepage_mm
    assert set(places["creepage"]) - {(5, "top")} <= set(places["clearance"])


def _pads_of(d, ref):
    return shapely.union_all([shapely.Point(p.x, p.y) for p in d.pads if p.ref == ref])


def test_commutation_loop_placement():
    """rev-a: C5 about 40 mm from leg A (Q1/Q2) and C6 in the same corner, far from both
    legs.  rev-b: C5 within 10 mm of leg A, C6 of leg B, and a bottom-side chip capacitor
    (C10 leg A, C11 leg B) on the straight line from each high-side drain to the low-side
    source below it (pin 1 HV_BUS towards the drain), present only in rev-b."""
    for rev, lo, hi in (("a", 35.0, 45.0), ("b", 0.0, 10.0)):
        d = fullbridge.build(rev)
        legs = shapely.union_all([_pads_of(d, "Q1"), _pads_of(d, "Q2")]).centroid
        dist = _pads_of(d, "C5").centroid.distance(legs)
        assert lo <= dist <= hi, (rev, dist)
        legs_b = shapely.union_all([_pads_of(d, "Q3"), _pads_of(d, "Q4")]).centroid
        c6 = _pads_of(d, "C6").centroid
        if rev == "a":
            assert min(c6.distance(legs), c6.distance(legs_b)) >= 35.0
            assert not {"C10", "C11"} & {p.ref for p in d.parts}
            continue
        assert c6.distance(legs_b) <= 10.0
        for ref, high, low in (("C10", "Q1", "Q2"), ("C11", "Q3", "Q4")):
            pads = {p.pin: p for p in d.pads if p.ref == ref}
            drain = next(p for p in d.pads if p.ref == high and p.pin == "2")
            source = next(p for p in d.pads if p.ref == low and p.pin == "3")
            assert {p.layers for p in pads.values()} == {"bottom"}
            assert (pads["1"].net, pads["2"].net) == ("HV_BUS", "HV_RTN")
            line = shapely.LineString([(drain.x, drain.y), (source.x, source.y)])
            for p in pads.values():
                assert line.distance(shapely.Point(p.x, p.y)) < 1e-9
            assert pads["1"].y > pads["2"].y and drain.y > source.y


def _hf_cap_slot(d, dx=0.0):
    (x0, y), (x1, _), width = fullbridge.HF_CAP_SLOT
    return next(s for s in d.slots if s.points == [(x0 + dx, y), (x1 + dx, y)]
                and s.width == width)


def test_hf_cap_slot_path_worked_by_hand():
    """rev-b's C10: pads 1.2 x 3.4 mm (corner radius 0.25 mm) 3.3 mm apart, above the
    3.2 mm clearance target but below the 4.0 mm creepage at 400 V (IEC 60664-1 via the
    requirement function).  Round the slot's right end: from the HV_BUS pad's corner
    (centre (49.45, 65.9)) along the tangent to the end cap (radius 0.6 mm, centre
    (51.0, 64.0), 2.452 mm away): sqrt(2.452^2 - 0.6^2) - 0.25 = 2.127 mm; round the cap
    2 (180 - atan(1.9 / 1.55) - acos(0.6 / 2.452)) = 106.8 degrees = 1.118 mm; the mirror
    tangent 2.127 mm: 5.373 mm (plane geometry, by hand; the README's figure).  The
    generator's surface path agrees to 2 um; without the two capacitor slots the self-check
    finds creepage problems only between C10's and C11's pads and tracks (bottom, HV_BUS /
    HV_RTN, 3.3 mm straight at the closest)."""
    d = fullbridge.build("b")
    (x1, y1), (x2, y2) = fullbridge.HF_CAP_PADS
    along, across = fullbridge.HF_CAP_PAD
    slot = _hf_cap_slot(d)
    cap = slot.points[1]
    corner = (x1 + across / 2 - 0.25, y1 - along / 2 + 0.25)
    dx, dy = cap[0] - corner[0], corner[1] - cap[1]
    dist = math.hypot(dx, dy)
    tangent = math.sqrt(dist ** 2 - 0.6 ** 2) - 0.25
    turn = 2 * (math.pi - math.atan2(dy, dx) - math.acos(0.6 / dist))
    want = 2 * tangent + turn * 0.6
    assert (tangent, turn * 0.6, want) == pytest.approx((2.127, 1.118, 5.373), abs=5e-4)
    pads = {p.pin: pad_polygon(p) for p in d.pads if p.ref == "C10"}
    assert pads["1"].distance(pads["2"]) == pytest.approx(y1 - y2 - along, abs=1e-9)
    got, path = surface_path(pads["1"], pads["2"], spacing_check.obstacles(d), 20.0)
    assert got == pytest.approx(want, abs=0.002) and len(path) > 2
    need = _required(400)
    assert need.clearance_mm + fullbridge.MARGIN <= 3.3 < need.creepage_mm
    assert want > need.creepage_mm + fullbridge.MARGIN
    d.slots = [s for s in d.slots if s not in (slot, _hf_cap_slot(d, 36.0))]
    bad = spacing_check.spacing_violations(d)
    assert {(v.layer, v.nets, v.kind) for v in bad} == {
        ("bottom", ("HV_BUS", "HV_RTN"), "creepage")}
    mids = [((x1 + x2) / 2 + dx, (y1 + y2) / 2) for _, dx in fullbridge.HF_CAPS]
    near = {min(range(len(mids)), key=lambda k: math.dist(v.where, mids[k])) for v in bad}
    assert near == {0, 1}
    assert all(min(math.dist(v.where, m) for m in mids) < 2.0 for v in bad)
    assert min(v.gap for v in bad) == pytest.approx(3.3, abs=1e-6)


@functools.lru_cache(maxsize=None)
def _sample_review(rev):
    from layoutcheck.review import review
    return review(ROOT / "sample_boards" / f"fullbridge-rev-{rev}")


def _leg_loops(rev):
    found = [f for f in _sample_review(rev).findings if f.rule == "power-loop"]
    return found, {f.extra["loop"]["leg"]: (f, f.extra["loop"]) for f in found}


def test_sample_commutation_loops():
    """The review's power-loop findings on the written folders (planted problem 6).

    rev-a: leg A's loop runs through C5 and is an error; rev-b: leg A through C10, leg B
    through C11, neither an error, and no error finding at all.  Checked by hand from the
    project file (shared power-layout notes PL-1, PL-2): di/dt = 20 A / 10 ns = 2 A/ns,
    overshoot = L di/dt, peak = 400 V + overshoot against 0.8 x 650 V = 520 V, largest
    loop (520 - 400) V / 2 A/ns = 60 nH, ringing 1 / (2 pi sqrt(L x 120 pF)); the parts'
    internal inductance is the package table's (rules/packages.toml, from memory): TO-247
    10 nH each, box film 6 nH, chip 1 nH; the enclosed area is shapely's area of the
    reported path, and rev-b's is the leg's own rectangle, one 5.45 mm pin pitch by the
    16 mm between the MOSFET rows (by hand).  rev-a's inductance is at least three times
    rev-b's (the tool's own numbers)."""
    sw = tomllib.loads(fullbridge.PROJECT_TEXT)["switching"]
    di_dt = sw["current_a"] / sw["switch_time_ns"]
    assert di_dt == 2.0
    allowed = sw["derating"] * 650
    got = {}
    for rev, cap, internal in (("a", "C5", 26.0), ("b", "C10", 21.0)):
        found, legs = _leg_loops(rev)
        assert set(legs) == {"A", "B"} and len(found) == 2
        f, e = legs["A"]
        assert e["capacitor"] == cap and e["parts"] == [cap, "Q1", "Q2"]
        assert e["internal_nh"] == pytest.approx(internal)
        assert e["overshoot_v"] == pytest.approx(e["inductance_nh"] * di_dt, rel=1e-9)
        assert e["peak_v"] == pytest.approx(400 + e["overshoot_v"], rel=1e-9)
        assert e["max_inductance_nh"] == pytest.approx((allowed - 400) / di_dt)
        assert e["ringing_mhz"] == pytest.approx(
            1e-6 / (2 * math.pi * math.sqrt(e["inductance_nh"] * 1e-9 * 120e-12)), rel=1e-6)
        area = shapely.Polygon([(p[0], p[1]) for p in e["path"]]).area
        assert e["area_mm2"] == pytest.approx(area, rel=1e-3)
        assert 0 < e["stacked_return_nh"] < e["inductance_nh"]
        assert (f.severity == "error") == (e["peak_v"] > allowed) == (rev == "a")
        got[rev] = e
    assert got["b"]["area_mm2"] == pytest.approx(fullbridge.TO247_PITCH * 16.0, abs=0.5)
    assert got["a"]["inductance_nh"] >= 3 * got["b"]["inductance_nh"]
    assert got["a"]["area_mm2"] >= 10 * got["b"]["area_mm2"]
    found, legs = _leg_loops("b")
    assert legs["B"][1]["capacitor"] == "C11"
    assert all(f.severity != "error" for f in _sample_review("b").findings)


def test_readme_shows_the_loops():
    """The sample README's problem-6 table carries the numbers the review reports (to its
    rounding), so the documentation follows the boards."""
    text = (ROOT / "sample_boards" / "README.md").read_text(encoding="utf-8")
    a, b = (_leg_loops(rev)[1]["A"][1] for rev in ("a", "b"))
    assert (f"| loop inductance L | {a['inductance_nh']:.1f} nH | "
            f"{b['inductance_nh']:.1f} nH |") in text
    assert (f"| enclosed area / length | {a['area_mm2']:.0f} mm^2 / {a['length_mm']:.0f} mm | "
            f"{b['area_mm2']:.0f} mm^2 / {b['length_mm']:.0f} mm |") in text
    assert (f"| overshoot L di/dt at 2 A/ns | {a['overshoot_v']:.0f} V | "
            f"{b['overshoot_v']:.0f} V |") in text
    assert f"| {a['peak_v']:.0f} V = {a['rating_pct']:.1f} % of 650 V" in text
    assert f"| {b['peak_v']:.0f} V = {b['rating_pct']:.1f} %, within" in text
    assert (f"| {a['stacked_return_nh']:.1f} nH | {b['stacked_return_nh']:.1f} nH |") in text
    ratio = a["inductance_nh"] / b["inductance_nh"]
    assert f"rev-a's loop is {ratio:.1f} times rev-b's inductance" in text


def _spot_copper(d, net):
    """``net``'s top copper around the planted creepage spot (mm)."""
    window = shapely.box(3.5, 38.0, 25.0, 47.0)
    return shapely.union_all([p.geometry for p in d.copper()
                              if p.layer == "top" and p.net == net]).intersection(window)


def test_creepage_spot_differs_only_by_the_slot():
    """Both revisions keep the same copper at the creepage spot: the bus bar's lower edge
    3.3 mm straight above the +5V run (shapely distance and symmetric difference); rev-b
    adds the non-plated slot (1.2-1.5 mm wide, at least X of IEC 60664-1 for pollution
    degree 2) between them, touching neither, across the straight gap; the NC drill file
    routes it (G00 to the start, M15 tool down; drill-machine manual, shared notes s. 2)."""
    a, b = fullbridge.build("a"), fullbridge.build("b")
    for net in ("+5V", "HV_BUS"):
        assert shapely.symmetric_difference(_spot_copper(a, net), _spot_copper(b, net)).area \
            < 1e-9
    bus, plus5 = _spot_copper(b, "HV_BUS"), _spot_copper(b, "+5V")
    assert abs(bus.distance(plus5) - fullbridge.CREEPAGE_GAP) < 1e-6
    slot = fullbridge.CREEPAGE_SLOT
    assert slot in b.slots and slot not in a.slots and not slot.plated
    x = groove_width_x_mm(2).mm
    assert 1.2 <= slot.width <= 1.5 and slot.width >= x
    cut = slot_polygon(slot)
    assert cut.distance(bus) > 0.5 and cut.distance(plus5) > 0.5
    assert shapely.shortest_line(plus5, bus).intersects(cut)
    text = drill_text(b, False)
    (x0, y0), (x1, y1) = slot.points
    assert f"G00X{x0:.3f}Y{y0:.3f}" in text and f"X{x1:.3f}Y{y1:.3f}" in text
    assert "M15" in text and "X%.3fY%.3f" % (x0, y0) not in drill_text(a, False)


def _around_end(cap, r, corner, rc, edge_y):
    """Hand-worked shortest path from a horizontal copper edge at ``edge_y`` above a slot
    end cap (centre ``cap``, radius ``r``) down its outer side, round the cap and along the
    tangent to a rounded copper corner (centre ``corner``, radius ``rc``) below the slot:
    vertical drop + arc + (tangent length - rc).  Plane geometry, worked by hand."""
    dx, dy = corner[0] - cap[0], corner[1] - cap[1]
    dist = math.hypot(dx, dy)
    tangent = math.sqrt(dist ** 2 - r ** 2)
    # the path leaves the cap where its radius is perpendicular to the line to the corner
    leave = math.atan2(dy, dx) + math.copysign(math.acos(r / dist), -dx)
    start = math.pi if dx > 0 else 0.0          # the cap's outermost point
    arc = abs((leave - start + math.pi) % (2 * math.pi) - math.pi) * r
    return (edge_y - cap[1]) + arc + tangent - rc


def test_creepage_slot_path_worked_by_hand():
    """Around either end of rev-b's slot: from the bus bar edge (y = 46.0) straight down
    to the cap's outermost point (1.65 mm), round the cap (68.15 degrees of a 0.6 mm
    radius, 0.714 mm), then along the tangent towards the centre of the +5V run's rounded
    corner (radius 0.4 mm): 4.012 - 0.4 = 3.612 mm; 5.975 mm in all (plane geometry, worked
    by hand; the README's figure),
    above the 4.0 mm creepage (+ margin).  The generator's own surface path on the design
    copper agrees to 2 um (flattened arcs)."""
    slot = fullbridge.CREEPAGE_SLOT
    (x0, ys), (x1, _) = slot.points
    track = next(t for t in fullbridge.build("b").tracks if t.net == "+5V")
    left, right = track.points[2], track.points[3]
    want = [_around_end((x0, ys), slot.width / 2, left, track.width / 2,
                        fullbridge.BUS_BAR_Y),
            _around_end((x1, ys), slot.width / 2, right, track.width / 2,
                        fullbridge.BUS_BAR_Y)]
    assert want == pytest.approx([5.975, 5.975], abs=5e-4)
    d = fullbridge.build("b")
    got, path = surface_path(_spot_copper(d, "+5V"), _spot_copper(d, "HV_BUS"),
                             spacing_check.obstacles(d), 20.0)
    assert got == pytest.approx(min(want), abs=0.002) and len(path) > 2
    assert min(want) > _required(395).creepage_mm + fullbridge.MARGIN


def test_review_follows_the_path_round_a_short_slot(tmp_path, monkeypatch):
    """Cut short to end 0.6 mm past the +5V run (cap centre 19.6 mm, right of the run's
    corner at 19.0), the slot leaves 1.65 + 0.342 + 1.650 = 3.642 mm round its end (the
    tangent construction above, by hand): the review then reports that path, round the
    slot, below the 4.0 mm creepage; the straight gap stays 3.3 mm."""
    from layoutcheck.review import review
    (x0, ys), _ = fullbridge.CREEPAGE_SLOT.points
    monkeypatch.setattr(fullbridge, "CREEPAGE_SLOT", Slot([(x0, ys), (19.6, ys)], 1.2))
    d = fullbridge.build("b")
    write_gerbers(d, tmp_path)
    write_drill(d, tmp_path)
    (tmp_path / "layoutcheck.toml").write_text(fullbridge.PROJECT_TEXT, encoding="utf-8")
    track = next(t for t in d.tracks if t.net == "+5V")
    want = _around_end((19.6, ys), 0.6, track.points[3], track.width / 2,
                       fullbridge.BUS_BAR_Y)
    assert want == pytest.approx(3.642, abs=5e-4)
    found = [f for f in review(tmp_path).findings if f.rule != "power-loop"]
    assert [(f.rule, tuple(f.nets)) for f in found] == [("creepage", ("+5V", "HV_BUS"))]
    assert found[0].measured_mm == pytest.approx(want, abs=0.002)
    assert found[0].extra["straight_mm"] == pytest.approx(fullbridge.CREEPAGE_GAP, abs=1e-4)
    assert found[0].extra.get("around")


def test_leg_slots_worked_by_hand():
    """The slot between a TO-247 gate and drain (1.2 mm wide, tool path 3.0 mm either side
    of the pin row) on the bottom layer: from the gate pad's upper cap (radius 1.1 mm,
    centre 0.5 mm above the row) along the tangent to the slot's top cap (radius 0.6 mm,
    2.725 mm to the side, 2.5 mm above that centre), over the cap (103.74 degrees) and down
    the mirror tangent to the drain pad: 2 x (3.649 - 1.1) + 1.086 = 6.185 mm (by hand;
    plane geometry), above the
    4.0 mm creepage; the straight pad gap is 5.45 - 2.2 = 3.25 mm, above the 3.0 mm
    clearance."""
    d = fullbridge.build("b")
    pads = {p.pin: pad_polygon(p) for p in d.pads if p.ref == "Q1"}
    ac = math.hypot(fullbridge.TO247_PITCH / 2, fullbridge.LEG_SLOT_HALF - 0.5)
    tangent = math.sqrt(ac ** 2 - 0.6 ** 2)
    # the tangent leaves the cap at 180 + phi - psi degrees (phi: direction of the pad's
    # cap centre, psi = acos(r / distance)); the path turns over the top to the mirror point
    phi = math.atan2(fullbridge.LEG_SLOT_HALF - 0.5, fullbridge.TO247_PITCH / 2)
    turn = math.pi + 2 * phi - 2 * math.acos(0.6 / ac)
    want = 2 * (tangent - 1.1) + turn * 0.6
    assert want == pytest.approx(6.185, abs=5e-4)
    got, _ = surface_path(pads["1"], pads["2"], spacing_check.obstacles(d), 20.0)
    assert got == pytest.approx(want, abs=0.002)
    assert pads["1"].distance(pads["2"]) == pytest.approx(3.25, abs=1e-3)
    assert want > _required(400).creepage_mm + fullbridge.MARGIN
    assert 3.25 >= _required(400).clearance_mm + fullbridge.MARGIN


@pytest.mark.parametrize("wall,want", [(False, 2.0), (True, 1 + math.sqrt(5))])
def test_surface_path_worked_by_hand(wall, want):
    """Independent geometry: two 2 x 1 mm copper blocks 2 mm apart; a 1 mm wide wall
    from x = -10 to 3 between them makes the path go round its end: corner (2, 1) to wall
    corner (3, 1.5), up the wall's end (1 mm), to corner (2, 3): 1 + 2 sqrt(1.25) =
    1 + sqrt(5) mm (Pythagoras, by hand); without the wall, 2 mm straight."""
    a, b = shapely.box(0, 0, 2, 1), shapely.box(0, 3, 2, 4)
    walls = [shapely.box(-10, 1.5, 3, 2.5)] if wall else []
    got, path = surface_path(a, b, walls, 10.0)
    assert got == pytest.approx(want, abs=1e-9)
    if walls:
        assert surface_path(a, b, walls, 3.0)[0] >= 3.0     # not followed past the limit
        assert [tuple(p) for p in path] == [(2.0, 1.0), (3.0, 1.5), (3.0, 2.5), (2.0, 3.0)]


# --------------------------------------------------------------------- benchmark generator

def test_big_board_generator(tmp_path):
    """About the requested number of features (within 10 %), and the same bytes for the
    same seed; a different seed gives a different board."""
    d = big_board.build_big_board(3000, seed=1)
    assert abs(big_board.feature_count(d) - 3000) / 3000 < 0.10
    a = big_board.make_big_board(tmp_path / "a", 3000, seed=1)
    b = big_board.make_big_board(tmp_path / "b", 3000, seed=1)
    names = sorted(p.name for p in a.iterdir())
    assert "layoutcheck.toml" in names and "bigboard-copper-top.gbr" in names
    assert all((a / n).read_bytes() == (b / n).read_bytes() for n in names)
    c = big_board.make_big_board(tmp_path / "c", 3000, seed=2)
    assert (c / "bigboard-copper-top.gbr").read_bytes() != \
        (a / "bigboard-copper-top.gbr").read_bytes()


def _plated_conductors(d):
    """Union-find over ``d.copper()``: pieces of one net that overlap on a layer, and the
    layers of one plated pad or via, are joined.  Returns (pieces, root of each piece);
    raises AssertionError when pieces of two different nets overlap (a short)."""
    pieces = d.copper()
    parent = list(range(len(pieces)))

    def find(i):
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    def join(i, j):
        parent[find(i)] = find(j)

    first = {}
    for k, p in enumerate(pieces):   # a plated feature: one geometry object per layer
        if p.kind in ("pad", "via"):
            key = id(p.geometry)
            if key in first:
                join(k, first[key])
            first.setdefault(key, k)
    for layer in d.layer_names:
        idx = [k for k, p in enumerate(pieces) if p.layer == layer]
        geo = [pieces[k].geometry for k in idx]
        a, b = shapely.STRtree(geo).query(geo, predicate="intersects")
        for x, y in zip(a.tolist(), b.tolist()):
            i, j = idx[x], idx[y]
            assert pieces[i].net == pieces[j].net, \
                f"{pieces[i].net} touches {pieces[j].net} on {layer}"
            join(i, j)
    return pieces, [find(k) for k in range(len(pieces))]


@pytest.mark.parametrize("seed", [1, 5])
def test_big_board_nets_are_whole_and_apart(seed):
    """Checked with shapely on the design's ideal copper (not through the readers or the
    net graph): no two nets touch, and each net's copper (joined by overlap on a layer and
    through its plated pads and vias) is one piece -- common practice for a board that is
    meant to be built."""
    d = big_board.build_big_board(3000, seed=seed)
    pieces, root = _plated_conductors(d)
    roots_of = {}
    for p, r in zip(pieces, root):
        roots_of.setdefault(p.net, set()).add(r)
    split = {n: len(r) for n, r in roots_of.items() if len(r) > 1}
    assert not split
    assert len(roots_of) > 400          # a few hundred nets on this small board
    drilled = sum(p.drill is not None for p in d.pads) + len(d.vias)
    assert drilled > 50 and sum(len(z.holes) for z in d.zones) > 20


def test_big_board_review_finds_only_the_deliberate_places(tmp_path):
    """The review of the written board gives no short or split and exactly the deliberate
    clearance places, each with the gap it was built with.  Requirements: IPC-2221B Table
    6-1 (values from memory, as in rules/ipc2221b.toml): A6 0.13 mm and B2 0.10 mm at
    0-15 V, A6 1.5 mm and B2 2.5 mm at 301-500 V.  Gaps as laid out by hand in
    benchmarks/big_board.py: capacitor pads 1.05 mm apart, 0.97 mm long -> 0.08 mm; a jog
    0.07 mm from the next rail; the bus tab 2.4 mm from the gate track; a 1.2 mm antipad.
    Flattened arcs (antipads, round pad corners) may make a gap up to 5 um smaller."""
    from layoutcheck.review import review

    r = review(big_board.make_big_board(tmp_path, 3000, seed=1))
    found = [f for f in r.findings if f.rule != "power-loop"]
    assert sorted({f.rule for f in found}) == ["clearance"]
    assert len(found) == big_board.DELIBERATE_VIOLATIONS == 16
    got = sorted((round(f.required_mm, 2), f.layer, tuple(sorted(set(f.nets) & {
        "GND", "GH_A", "HV_BUS", "HV_RTN"}))) for f in found)
    assert got == sorted([(0.13, "top", ("GND",))] * 8 + [(0.1, "top", ("GND",))] * 6 +
                         [(2.5, "top", ("GH_A", "HV_BUS")),
                          (1.5, "bottom", ("HV_BUS", "HV_RTN"))])
    want = {0.13: 0.08, 0.1: 0.07, 2.5: 2.4, 1.5: 1.2}
    for f in found:
        assert -1e-6 <= want[round(f.required_mm, 2)] - f.measured_mm <= 0.005
