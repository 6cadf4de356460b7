"""Robustness of the Gerber and NC drill readers against damaged and hostile files.

What is checked, and against what:

* REQUIREMENT -- the project's issue for the readers: "it must read them or stop with a
  clear error naming what it does not support, never crash and never report a clean board
  it did not fully read", and "absurd aperture sizes, coordinate counts or step-and-repeat
  counts stop with a clear error instead of exhausting memory".  So every input either
  parses or raises :class:`layoutcheck.errors.LayoutcheckError` (any subclass); the error
  names the file, and a line number, when given, lies inside the file.
* SHAPELY -- a parsed object's geometry must pass shapely's own ``is_valid`` and have
  finite coordinates (``numpy.isfinite`` over ``shapely.get_coordinates``); the geometry
  types are those the reader's data classes promise (``types.py``, ``holes.py``).
* LIMITS -- ``layoutcheck.limits.Limits``: each named limit stops a file that exceeds it
  with :class:`ResourceLimitError`.

The property tests start from small valid files written here in several exporter styles of
our own invention (every one is checked to parse cleanly first) and damage them: lines
deleted, duplicated or swapped, the text cut short, characters replaced, huge numbers and
stray command words put in.  Hypothesis (``derandomize=True``) makes the runs repeatable.
A reader's last-resort guard turns an unexpected exception into an InputFileError whose
message starts "internal reader failure"; such an error counts as a FAILURE here, since the
root cause must be fixed where it arises.

Set ``LAYOUTCHECK_FUZZ_EXAMPLES`` to run more examples per property (default 200).
"""
from __future__ import annotations

import os
import re
import time
from dataclasses import dataclass

import numpy as np
import pytest
import shapely
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from layoutcheck.errors import (InputFileError, LayoutcheckError, ResourceLimitError,
                                UnsupportedFeatureError)
from layoutcheck.geometry import arcs
from layoutcheck.limits import Limits
from layoutcheck.readers.drill import drill_from_gerber, parse_drill, read_drill
from layoutcheck.readers.gerber import image, parse_gerber, read_gerber, resolve_polarity

# --------------------------------------------------------------------------- seeds
# Gerber seeds: each a complete, valid file in one invented exporter style.

G_X2 = """\
G04 seed: X2 attributes as extended commands, metric 4.6*
%TF.GenerationSoftware,Invented,SeedWriter,1.0*%
%TF.FileFunction,Copper,L1,Top*%
%TF.FilePolarity,Positive*%
%FSLAX46Y46*%
%MOMM*%
%TA.AperFunction,SMDPad,CuDef*%
%ADD10R,1.2X0.8*%
%ADD11O,2.0X1.0*%
%TA.AperFunction,Conductor*%
%ADD12C,0.25*%
%TD*%
%ADD13P,1.5X6X15*%
%ADD14C,1.0X0.4*%
G01*
%TO.N,VBUS*%
%TO.P,Q1,1*%
D10*
X1000000Y1000000D03*
X3000000Y1000000D03*
%TD.P*%
D12*
X1000000Y1000000D02*
X3000000Y1000000D01*
Y3000000D01*
G75*
G03X5000000Y3000000I1000000J0D01*
%TO.N,GND*%
D11*
X6000000Y1000000D03*
D13*
X8000000Y2000000D03*
D14*
X9000000Y4000000D03*
%TD*%
M02*
"""

G_COMMENT_ATTRS = (
    "G04 #@! TF.FileFunction,Copper,L2,Bot*\r\n"
    "G04 #@! TF.FilePolarity,Positive*\r\n"
    "%FSLAX26Y26*%\r\n"
    "%MOIN*%\r\n"
    "%LPD*%\r\n"
    "G04 #@! TA.AperFunction,ComponentPad*\r\n"
    "%ADD10C,0.060000*%\r\n"
    "G04 #@! TD*\r\n"
    "%ADD11R,0.080000X0.050000*%\r\n"
    "%ADD12C,0.010000*%\r\n"
    "G04 #@! TO.N,PHASE_A*\r\n"
    "D10*\r\n"
    "X100000Y100000D03*\r\n"
    "X200000Y100000D03*\r\n"
    "D11*\r\n"
    "X300000Y100000D03*\r\n"
    "D12*\r\n"
    "G01X100000Y100000D02*\r\n"
    "X200000Y200000D01*\r\n"
    "G04 #@! TD*\r\n"
    "G36*\r\n"
    "X400000Y400000D02*\r\n"
    "X500000Y400000D01*\r\n"
    "X500000Y500000D01*\r\n"
    "X400000Y500000D01*\r\n"
    "X400000Y400000D01*\r\n"
    "G37*\r\n"
    "M02*\r\n")

G_LEGACY_UNITS = """\
G04 legacy writer: units only by G70, FSLAX24Y24, G54 prefixes, modal D01*
%FSLAX24Y24*%
G70*
%ADD10C,0.0100*%
%ADD11C,0.0600*%
G90*
G54D11*
X10000Y10000D03*
X20000Y10000D03*
G54D10*
G01X10000Y10000D02*
X20000Y10000D01*
X20000Y20000*
X10000Y20000*
M02*
"""

G_LEGACY_METRIC = """\
G04 legacy writer, metric by G71, several parameters in one block*
%FSLAX33Y33*MOMM*%
G71*
%ADD10C,0.250*%
%ADD11R,1.500X1.000*%
G54D11*
X5000Y5000D03*
G54D10*
G01*
X0Y0D02*
X5000Y0D01*
X5000Y5000D01*
M00*
"""

G_TRAILING_NEG = """\
%FSTAX23Y23*%
%MOIN*%
%IPNEG*%
%ADD10C,0.010*%
%ADD12R,0.050X0.050*%
G74*
D10*
G01X02Y01D02*
G02X025Y015I005J0D01*
D12*
X03Y03D03*
M02*
"""

G_REGIONS = """\
%FSLAX46Y46*%
%MOMM*%
%TF.FileFunction,Copper,L1,Top,Plane*%
G75*
G36*
G01X0Y0D02*
X10000000Y0D01*
X10000000Y5000000D01*
G03X0Y5000000I-5000000J0D01*
G01X0Y0D01*
G37*
%LPC*%
G36*
X2000000Y1000000D02*
X4000000Y1000000D01*
X4000000Y3000000D01*
X2000000Y3000000D01*
X2000000Y1000000D01*
G37*
%ADD10C,0.5*%
D10*
X7000000Y2000000D03*
%LPD*%
%ADD11C,0.3*%
D11*
X7000000Y2000000D03*
G36*
X20000000Y0D02*
X30000000Y0D01*
X30000000Y10000000D01*
X20000000Y10000000D01*
X20000000Y0D01*
X22000000Y2000000D02*
G02X22000000Y2000000I1000000J0D01*
G37*
M02*
"""

G_MACROS = """\
%FSLAX46Y46*%
%MOMM*%
%AMTHERM*
0 thermal relief: outer $1, inner $2, gap $3*
7,0,0,$1,$2,$3,45*%
%AMRNDRECT*
0 rounded rectangle: width $1, height $2, corner radius $3*
$4=$1/2-$3*
$5=$2/2-$3*
21,1,$1,$2-$3x2,0,0,0*
21,1,$1-$3x2,$2,0,0,0*
1,1,$3x2,-$4,-$5*
1,1,$3x2,$4,-$5*
1,1,$3x2,$4,$5*
1,1,$3x2,-$4,$5*%
%AMMIX*
1,1,1.0,0,0*
1,0,0.4,0,0*
20,1,0.2,-1,0,1,0,30*
22,1,0.5,0.3,-0.25,-0.15,0*
4,1,4,0,0,1,0,1,1,0,1,0,0,10*
5,1,6,2,0,0.8,0*
6,0,-2,1.0,0.1,0.1,3,0.05,1.2,0*%
%ADD10THERM,2.0X1.4X0.3*%
%ADD11RNDRECT,3.0X2.0X0.4*%
%ADD12MIX*%
D10*
X0Y0D03*
%LR30*%
D11*
X5000000Y0D03*
%LMX*%
%LS1.5*%
D12*
X10000000Y0D03*
%LMN*%
%LR0*%
%LS1*%
M02*
"""

G_BLOCKS = """\
%FSLAX46Y46*%
%MOMM*%
%ADD10C,0.5*%
%ABD20*%
%ADD11R,1X1*%
D11*
X0Y0D03*
%ABD21*%
D10*
X0Y0D03*
%AB*%
%LPC*%
D21*
X0Y0D03*
%LPD*%
%AB*%
%SRX3Y2I5.0J4.0*%
D20*
X1000000Y1000000D03*
D10*
X1000000Y1000000D02*
X3000000Y1000000D01*
%SR*%
%LPC*%
D20*
X20000000Y0D03*
%LPD*%
M02*
"""

G_DEPRECATED = """\
%INBOARD*%
%FSLIX35Y35*%
%MOMM*%
%OFA0B0*%
%SFA1.0B1.0*%
%MIA0B0*%
%ASAXBY*%
%IR0*%
%IPPOS*%
%LNCOPPER*%
%ADD10C,0.2*%
%ADD11O,1.0X2.0*%
D11*
X100000Y100000D03*
X200000D03*
D10*
G01*
X0Y100000D01*
X-100000D01*
M02*
"""

G_DRILL = """\
%TF.FileFunction,Plated,1,2,PTH,Mixed*%
%FSLAX46Y46*%
%MOMM*%
%TA.AperFunction,ViaDrill*%
%ADD10C,0.300*%
%TA.AperFunction,ComponentDrill*%
%ADD11C,1.000*%
%TD*%
D10*
X1000000Y1000000D03*
%TO.N,DC_LINK*%
X2000000Y1000000D03*
%TD*%
D11*
X5000000Y5000000D03*
G01*
X8000000Y5000000D02*
X9500000Y5000000D01*
M02*
"""

GERBER_SEEDS = {
    "x2": G_X2, "comment-attrs": G_COMMENT_ATTRS, "legacy-inch": G_LEGACY_UNITS,
    "legacy-metric": G_LEGACY_METRIC, "trailing-negative": G_TRAILING_NEG,
    "regions": G_REGIONS, "macros": G_MACROS, "blocks": G_BLOCKS,
    "deprecated": G_DEPRECATED, "gerber-drill": G_DRILL,
}

# NC drill seeds.
D_METRIC_TZ = """\
M48
; #@! TF.FileFunction,Plated,1,2,PTH
FMAT,2
METRIC,TZ,000.000
; #@! TA.AperFunction,Plated,PTH,ViaDrill
T1C0.300
; #@! TA.AperFunction,Plated,PTH,ComponentDrill
T2C1.000
%
G90
G05
T1
X10000Y10000
X12500Y10000
T2
X20000Y5000
Y7500
M30
"""

D_INCH_LZ = """\
M48
VER,1
INCH,LZ
ICI,OFF
T01C0.0320
T02C0.0400F200S65
%
T01
X0100Y0100
X015Y0100
T02
X02Y02
R3X001
M30
"""

D_NO_HEADER = """\
T1C0.8
X1.0Y1.0
X2.0Y1.0
T2C1.2
X5.0Y5.0
M30
"""

D_ROUTED = """\
M48
;TYPE=NON_PLATED
METRIC
T3C2.0
T4C1.0
%
T3
G00X10.0Y10.0
M15
G01X20.0Y10.0
G03X25.0Y15.0A5.0
G02X30.0Y20.0I5.0J0.0
M16
G05
T4
X40.0Y40.0G85X45.0Y40.0
X50.0Y50.0
M30
"""

D_MIXED_UNITS = """\
M48
; FORMAT={2:4/ absolute / inch / suppress trailing zeros}
INCH,TZ
T1C0.035
%
T1
G93X1.0Y1.0
X0.5Y0.5
G91
X0.1Y0.0
X0.1
G90
M71
X10.0Y10.0
M72
X00500Y00500
M30
"""

DRILL_SEEDS = {
    "metric-tz": D_METRIC_TZ, "inch-lz": D_INCH_LZ, "no-header": D_NO_HEADER,
    "routed": D_ROUTED, "mixed-units": D_MIXED_UNITS,
}

# Small limits keep damaged files (a step-and-repeat count turned huge...) fast to refuse.
FUZZ_LIMITS = Limits(max_objects_per_file=20_000, max_step_repeat=1_000,
                     max_step_repeat_objects=20_000, max_region_vertices=200_000,
                     max_drill_hits=20_000, max_macro_primitives=2_000)

INTERNAL = "internal reader failure"

# --------------------------------------------------------------------------- checks


def line_count(text: str) -> int:
    """Lines as an editor counts them: CR LF, lone CR and LF each end a line."""
    return len(re.split(r"\r\n|\r|\n", text))


def check_error(e: LayoutcheckError, text: str, name: str) -> None:
    """REQUIREMENT: a clear error naming the file; a line, if given, lies in the file; the
    root cause was met where it arose (no last-resort 'internal reader failure')."""
    assert e.file == name
    assert name in str(e)
    assert INTERNAL not in e.message, f"unhandled cause reached the guard: {e}"
    if e.line is not None:
        assert 1 <= e.line <= line_count(text), (e.line, line_count(text), str(e))


def check_geometry(g, allowed: tuple[str, ...]) -> None:
    """SHAPELY: valid by shapely's own test, finite coordinates, an allowed type."""
    assert g is not None
    assert g.geom_type in allowed, g.geom_type
    assert shapely.is_valid(g), shapely.is_valid_reason(g)
    assert np.isfinite(shapely.get_coordinates(g)).all()


POLYGONAL = ("Polygon", "MultiPolygon")


def check_gerber(text: str, name: str = "fuzz.gbr", limits: Limits = FUZZ_LIMITS):
    """Parse; on success check every object and the polarity-resolved image."""
    try:
        gf = parse_gerber(text, name, limits)
    except LayoutcheckError as e:
        check_error(e, text, name)
        return None
    assert gf.name == name
    n = line_count(text)
    for o in gf.objects:
        check_geometry(o.geometry, POLYGONAL)
        assert o.polarity in ("dark", "clear")
        assert 1 <= o.line <= n
        if o.path is not None:
            # a zero-length draw (a dot) has a centre line of two equal points, which
            # shapely calls invalid ("Too few points"); it must still be a finite line
            assert o.path.geom_type == "LineString"
            assert np.isfinite(shapely.get_coordinates(o.path)).all()
        if o.point is not None:
            assert np.isfinite(o.point).all()
    for piece, _ in resolve_polarity(gf.objects):
        check_geometry(piece, ("Polygon",))
    whole = image(gf)
    assert shapely.is_valid(whole)
    return gf


def check_drill(text: str, name: str = "fuzz.drl", limits: Limits = FUZZ_LIMITS):
    try:
        df = parse_drill(text, name, limits)
    except LayoutcheckError as e:
        check_error(e, text, name)
        return None
    n = line_count(text)
    for h in df.holes:
        check_geometry(h.geometry, ("Polygon",))
        check_geometry(h.path, ("Point", "LineString"))
        assert h.is_slot == (h.path.geom_type == "LineString")
        assert np.isfinite(h.diameter) and h.diameter > 0
        assert 1 <= h.line <= n
    return df


@pytest.mark.parametrize("key", sorted(GERBER_SEEDS))
def test_gerber_seeds_are_valid(key):
    """Each seed is a valid file (Gerber Layer Format Specification rev. 2024.05, chapters
    3-5 and 8 for the deprecated forms) and reads without error into objects."""
    gf = check_gerber(GERBER_SEEDS[key], limits=Limits())
    assert gf is not None and len(gf.objects) > 0


@pytest.mark.parametrize("key", sorted(DRILL_SEEDS))
def test_drill_seeds_are_valid(key):
    """Each seed is a valid NC drill file (programming manual, format 2, as summarised in
    our format notes, section 2) and reads into holes."""
    df = check_drill(DRILL_SEEDS[key], limits=Limits())
    assert df is not None and len(df.holes) > 0


def test_gerber_drill_seed_makes_holes():
    """Gerber drill layer seed -> holes (format notes 2.6: flash = hole, draw = slot)."""
    df = drill_from_gerber(parse_gerber(G_DRILL, "drill.gbr"))
    assert len(df.holes) == 4 and sum(h.is_slot for h in df.holes) == 1


# --------------------------------------------------------------------------- mutations

HUGE = ["9" * 12, "9" * 25, "1" + "0" * 400, "9" * 5000, "-" + "9" * 40,
        "1" + "0" * 320 + ".5", "0." + "0" * 30 + "1", "99999999999", "4294967296"]

GERBER_WORDS = [
    "%LPC*%", "%LPD*%", "G36*", "G37*", "G74*", "G75*", "G02*", "G03*", "G91*", "D03*",
    "D01*", "D02*", "M02*", "%SRX3Y3I1J1*%", "%SR*%", "%ABD30*%", "%AB*%", "D30*", "D10*",
    "%LR45*%", "%LS2*%", "%LS0.0001*%", "%LMXY*%", "%TD*%", "%TO.N,X*%", "%ADD15R,1X2X0.5*%",
    "%ADD16P,1X3*%", "%ADD17O,0X1*%", "%ADD18C,0*%", "D15*", "D16*", "D17*", "D18*",
    "%AMQ*1,1,$1,0,0*%", "%ADD19Q,0.5*%", "D19*", "%FSLAX26Y26*%", "%MOIN*%", "G70*",
    "%IPNEG*%", "G04 #@! TA.AperFunction,Conductor*", "X1Y1D03*", "X0Y0I1J0D01*",
    "G03X5000000Y0I-1J-1D01*", "X-99999Y99999D01*", "%SFA2B2*%", "%MIA1B0*%",
    "%AMW*4,1,3,0,0,1,0,0,1,0,0,0*%", "%ADD20W*%", "D20*", "%AMZ*$1=1/0*1,1,$1,0,0*%",
    "%ADD21Z*%", "%AMV*5,1,12,0,0,$1,$2*%", "%ADD22V,1X1e5*%", "G01X1Y1*", "%*%",
    "%%", "*", "%FSLAX06Y06*%", "%ADD23C,0.001X0.001X0.001*%",
]

DRILL_WORDS = [
    "M48", "%", "M95", "METRIC", "INCH,LZ", "INCH,TZ,00.0000", "METRIC,LZ,0000.00",
    "T1", "T2", "T0", "T9C0.5", "T3C0", "X1.0Y1.0", "X0Y0", "R5X1.0", "R0", "G85X2.0Y2.0",
    "G00X0Y0", "G01X1.0Y0", "G02X2.0Y0A1.0", "G03X0Y0I1.0J0", "M15", "M16", "M17", "M30",
    "G05", "G90", "G91", "G93X1Y1", "M71", "M72", "ICI,ON", "FMAT,1", "; FORMAT={9:9/ inch}",
    ";FILE_FORMAT=0:0", "; #@! TF.FileFunction,NonPlated,1,2,NPTH", ";TYPE=PLATED", "P01",
    "M25", "G84", "X", "Y-", "T", "R", "M47 hello",
]


@st.composite
def mutations(draw, words: list[str]):
    """One damage: (kind, arguments).  Positions are fractions of the current text."""
    pos = st.floats(0.0, 1.0, allow_nan=False)
    kind = draw(st.sampled_from(["delete", "duplicate", "swap", "truncate", "flip", "huge",
                                 "insert", "insert-random"]))
    if kind in ("delete", "duplicate", "truncate"):
        return kind, (draw(pos),)
    if kind == "swap":
        return kind, (draw(pos), draw(pos))
    if kind == "flip":
        ch = draw(st.one_of(st.sampled_from(list("%*,.-+XYIJDGMTRAC0123456789\n\r \x00$()/x"
                                                 "\udcff\ufeff\u2028")),
                            st.characters(codec="utf-8")))
        return kind, (draw(pos), ch)
    if kind == "huge":
        return kind, (draw(pos), draw(st.sampled_from(HUGE)))
    if kind == "insert":
        return kind, (draw(pos), draw(st.sampled_from(words)))
    letter = draw(st.sampled_from(list("GDMXYIJTRAC%*")))
    number = draw(st.one_of(st.integers(-10**6, 10**6).map(str), st.sampled_from(HUGE)))
    return kind, (draw(pos), letter + number + draw(st.sampled_from(["*", "", "*%", "%"])))


def _at(frac: float, n: int) -> int:
    return min(int(frac * n), max(n - 1, 0))


def apply_mutation(text: str, mutation) -> str:
    kind, args = mutation
    lines = text.split("\n")
    if kind == "delete" and len(lines) > 1:
        del lines[_at(args[0], len(lines))]
    elif kind == "duplicate":
        i = _at(args[0], len(lines))
        lines.insert(i, lines[i])
    elif kind == "swap":
        i, j = _at(args[0], len(lines)), _at(args[1], len(lines))
        lines[i], lines[j] = lines[j], lines[i]
    elif kind == "truncate":
        return text[:_at(args[0], len(text) + 1)]
    elif kind == "flip" and text:
        p = _at(args[0], len(text))
        return text[:p] + args[1] + text[p + 1:]
    elif kind == "huge":
        p = _at(args[0], len(text))
        m = re.compile(r"\d+(?:\.\d+)?").search(text, p) or re.compile(r"\d+").search(text)
        if m is None:
            return text
        return text[:m.start()] + args[1] + text[m.end():]
    elif kind in ("insert", "insert-random"):
        lines.insert(_at(args[0], len(lines) + 1), args[1])
    return "\n".join(lines)


def _examples(default: int) -> int:
    return int(os.environ.get("LAYOUTCHECK_FUZZ_EXAMPLES", default))


FUZZ = settings(max_examples=_examples(200), deadline=None, derandomize=True, database=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])


@FUZZ
@given(key=st.sampled_from(sorted(GERBER_SEEDS)),
       damage=st.lists(mutations(GERBER_WORDS), min_size=1, max_size=4))
def test_damaged_gerber_parses_or_raises_clear_error(key, damage):
    """REQUIREMENT + SHAPELY: a damaged Gerber file reads into valid finite geometry or
    raises a LayoutcheckError naming the file and a line inside it."""
    text = GERBER_SEEDS[key]
    for m in damage:
        text = apply_mutation(text, m)
    check_gerber(text)


@FUZZ
@given(key=st.sampled_from(sorted(DRILL_SEEDS)),
       damage=st.lists(mutations(DRILL_WORDS), min_size=1, max_size=4))
def test_damaged_drill_parses_or_raises_clear_error(key, damage):
    """REQUIREMENT + SHAPELY for NC drill: holes are valid finite polygons, or a clear
    LayoutcheckError naming the file and a line inside it."""
    text = DRILL_SEEDS[key]
    for m in damage:
        text = apply_mutation(text, m)
    check_drill(text)


@settings(max_examples=_examples(150), deadline=None, derandomize=True, database=None,
          suppress_health_check=[HealthCheck.too_slow])
@given(damage=st.lists(mutations(GERBER_WORDS), min_size=1, max_size=3))
def test_damaged_gerber_drill_layer(damage):
    """REQUIREMENT: a damaged Gerber drill layer gives holes of valid geometry (SHAPELY) or
    a LayoutcheckError naming the file."""
    text = G_DRILL
    for m in damage:
        text = apply_mutation(text, m)
    gf = check_gerber(text, "drill.gbr")
    if gf is None:
        return
    try:
        df = drill_from_gerber(gf)
    except LayoutcheckError as e:
        check_error(e, text, "drill.gbr")
        return
    for h in df.holes:
        check_geometry(h.geometry, POLYGONAL)
        assert h.diameter > 0


@settings(max_examples=_examples(150), deadline=None, derandomize=True, database=None)
@given(pieces=st.lists(st.sampled_from(list("%*GDMXYIJTCRA0123456789.,-+\n;$") +
                                        ["FSLAX26Y26", "MOMM", "ADD10C,", "M48", "METRIC",
                                         "INCH", "D03", "M02", "M30", "G36", "G37", "AM"]),
                       max_size=120))
def test_random_command_soup(pieces):
    """REQUIREMENT: text made of random command fragments never crashes either reader."""
    text = "".join(pieces)
    check_gerber(text, "soup.gbr")
    check_drill(text, "soup.drl")


# --------------------------------------------------------------------------- hostile input

HEAD = "%FSLAX46Y46*%\n%MOMM*%\n"


def gerber_error(text: str, cls=InputFileError, **limits):
    """Parse and return the error, checking it names the file and a line inside it."""
    with pytest.raises(cls) as info:
        parse_gerber(text, "hostile.gbr", Limits(**limits))
    check_error(info.value, text, "hostile.gbr")
    return info.value


def drill_error(text: str, cls=InputFileError, **limits):
    with pytest.raises(cls) as info:
        parse_drill(text, "hostile.drl", Limits(**limits))
    check_error(info.value, text, "hostile.drl")
    return info.value


def test_aperture_of_a_billion_mm():
    """LIMITS max_aperture_mm (1000 mm): a 1e9 mm circle is refused at its AD line."""
    e = gerber_error(HEAD + "%ADD10C,1000000000*%\nD10*\nX0Y0D03*\nM02*\n", ResourceLimitError)
    assert e.line == 3 and "max_aperture_mm" in e.message


def test_aperture_overflowing_to_infinity():
    """LIMITS: a size too large for a double is refused, not turned into inf geometry."""
    e = gerber_error(HEAD + "%ADD10R,1" + "0" * 400 + "X1*%\nD10*\nX0Y0D03*\nM02*\n",
                     ResourceLimitError)
    assert e.line == 3


def test_coordinate_of_1e12():
    """LIMITS max_coordinate_mm: X = 1e12 mm (format 4.6 -> 1e18 file units)."""
    e = gerber_error(HEAD + "%ADD10C,1*%\nD10*\nX1000000000000000000Y0D03*\nM02*\n",
                     ResourceLimitError)
    assert e.line == 5 and "max_coordinate_mm" in e.message


def test_coordinate_of_five_thousand_digits():
    """A coordinate with more digits than Python turns into an int by default (4300): an
    InputFileError at its line, not a ValueError."""
    e = gerber_error(HEAD + "%ADD10C,1*%\nD10*\nX" + "9" * 5000 + "Y0D03*\nM02*\n")
    assert e.line == 5


def test_arc_centre_far_away():
    """LIMITS max_coordinate_mm: an arc whose centre offset puts the arc 1e12 mm away."""
    e = gerber_error(HEAD + "%ADD10C,1*%\nD10*\nG75*\nX0Y0D02*\n"
                     "G03X1000000Y0I500000J-1000000000000000000D01*\nM02*\n",
                     ResourceLimitError)
    assert e.line == 7


def test_step_repeat_of_ten_billion_copies():
    """LIMITS max_step_repeat: %SRX100000Y100000I1J1*% asks for 1e10 copies; refused at
    the SR line, before any copy is made (I1J1 keeps the panel 100 m wide, so the
    coordinate limit is lifted here to reach the count check)."""
    text = HEAD + "%ADD10C,1*%\n%SRX100000Y100000I1J1*%\nD10*\nX0Y0D03*\n%SR*%\nM02*\n"
    t0 = time.perf_counter()
    e = gerber_error(text, ResourceLimitError, max_coordinate_mm=1e9)
    assert time.perf_counter() - t0 < 1.0
    assert e.line == 4 and "max_step_repeat" in e.message
    # with the default limits the same file is refused too (by its reach)
    gerber_error(text, ResourceLimitError)


def test_step_repeat_count_of_five_thousand_digits():
    e = gerber_error(HEAD + "%SRX" + "9" * 5000 + "Y1I1J1*%\nM02*\n", ResourceLimitError)
    assert e.line == 3


def test_step_repeat_step_overflowing():
    """An SR step too large for a double (inf) is refused, not turned into NaN offsets."""
    e = gerber_error(HEAD + "%ADD10C,1*%\n%SRX1Y2I0J1" + "0" * 400 + "*%\nD10*\nX0Y0D03*\n"
                     "%SR*%\nM02*\n")
    assert e.line == 4


def test_macro_outline_of_a_million_points():
    """LIMITS max_outline_vertices (5000, the Gerber specification's own limit for the
    outline primitive): 10^6 points are refused while the macro is read, quickly."""
    n = 10**6
    pts = ",".join(f"{i % 7},{i % 5}" for i in range(n)) + ",0,0"
    text = HEAD + f"%AMBIG*4,1,{n},{pts},0*%\n%ADD10BIG*%\nD10*\nX0Y0D03*\nM02*\n"
    t0 = time.perf_counter()
    e = gerber_error(text, ResourceLimitError)
    assert time.perf_counter() - t0 < 2.0
    assert e.line == 3 and "max_outline_vertices" in e.message


def test_moire_with_a_billion_rings():
    """A moire (spec rev. 2024.05, primitive 6: centre, outer diameter, ring thickness, gap,
    maximum rings, cross-hair) asking for 1e9 rings is read quickly when the rings run out
    early, and refused as unsupported when more than 100 would be drawn (a moire is a
    registration target of a few rings, common practice).

    Outer 5, thickness 1, gap 0: rings 5..3, 3..1 and the disc of 1 -- together the whole
    disc of diameter 5, area pi * 6.25 within the flattening allowance (circumference x
    0.5 um, arcs.circle).  Thickness 0: every ring is empty, so the aperture is empty.
    """
    t0 = time.perf_counter()
    text = HEAD + "%AMMO*6,0,0,5,1,0,1000000000,0,0,0*%\n%ADD10MO*%\nD10*\nX0Y0D03*\nM02*\n"
    gf = check_gerber(text, "hostile.gbr", Limits())
    area = gf.objects[0].geometry.area
    assert abs(area - np.pi * 6.25) <= np.pi * 5 * 0.0005 * 1.05
    text = HEAD + "%AMMO*6,0,0,5,0,0,1000000000,0,0,0*%\n%ADD10MO*%\nD10*\nX0Y0D03*\nM02*\n"
    gf = check_gerber(text, "hostile.gbr", Limits())
    assert gf.objects[0].geometry.is_empty
    assert time.perf_counter() - t0 < 2.0
    for thick, gap in (("0.00001", "0.00001"), ("0.04", "0.01")):
        text = HEAD + f"%AMMO*6,0,0,100,{thick},{gap},1000000000,5,100,0*%\n%ADD10MO*%\n" \
                      "D10*\nX0Y0D03*\nM02*\n"
        t0 = time.perf_counter()
        e = gerber_error(text, UnsupportedFeatureError)
        assert time.perf_counter() - t0 < 2.0
        assert e.line == 3 and "moire" in e.message


def test_moire_rings_with_gaps():
    """Moire rings that do not touch stay separate: outer 10, thickness 1, gap 1, 3 rings
    -> annuli 10..8, 6..4, 2..0 (the last a disc): area pi (25 - 16 + 9 - 4 + 1) = 15 pi
    (spec rev. 2024.05, primitive 6), and the gap at radius 3.5 stays empty (shapely
    contains on independently placed points)."""
    from shapely.geometry import Point

    text = HEAD + "%AMMO*6,0,0,10,1,1,3,0,0,0*%\n%ADD10MO*%\nD10*\nX0Y0D03*\nM02*\n"
    g = check_gerber(text, "moire.gbr", Limits()).objects[0].geometry
    assert abs(g.area - 15 * np.pi) <= 2 * np.pi * (5 + 4 + 3 + 2 + 1) * 0.0005 * 1.05
    assert g.contains(Point(4.5, 0)) and not g.contains(Point(3.5, 0))
    assert g.contains(Point(0, 0)) and not g.contains(Point(1.5, 0))


@pytest.mark.parametrize("depth, limit", [(30, 20), (8, 5)])
def test_deeply_nested_block_apertures(depth, limit):
    """LIMITS max_block_depth: the AB that goes one level too deep is named."""
    nest = "".join(f"%ABD{10 + i}*%\n" for i in range(depth))
    text = HEAD + "%ADD99C,1*%\n" + nest + "D99*\nX0Y0D03*\n" + "%AB*%\n" * depth + "M02*\n"
    e = gerber_error(text, ResourceLimitError, max_block_depth=limit)
    assert e.line == 4 + limit and "max_block_depth" in e.message


def test_block_scaled_beyond_the_coordinate_limit():
    """LIMITS max_coordinate_mm: LS scales a block aperture's objects about the file origin
    (spec rev. 2024.05, "Block aperture (AB)" and "LS"), so a 1 mm pad at x = 5 mm under
    LS 1e6 lands 5e6 mm away: refused at the flash (line 10)."""
    text = HEAD + ("%ADD10C,1*%\n%ABD20*%\nD10*\nX5000000Y0D03*\n%AB*%\n%LS1000000*%\n"
                   "D20*\nX0Y0D03*\nM02*\n")
    e = gerber_error(text, ResourceLimitError)
    assert e.line == 10 and "max_coordinate_mm" in e.message


def test_nested_blocks_flashed_many_times_stay_bounded():
    """LIMITS max_objects_per_file: each block level flashes the one below ten times, so
    six levels would make 10^6 objects; the object limit stops it."""
    text = HEAD + "%ADD10C,0.1*%\n"
    prev = 10
    for lvl in range(6):
        num = 20 + lvl
        flashes = "".join(f"X{k * 1000}Y0D03*\n" for k in range(10))
        text += f"%ABD{num}*%\nD{prev}*\n{flashes}%AB*%\n"
        prev = num
    text += f"D{prev}*\nX0Y0D03*\nM02*\n"
    t0 = time.perf_counter()
    gerber_error(text, ResourceLimitError, max_objects_per_file=50_000)
    assert time.perf_counter() - t0 < 5.0


def test_fifty_megabytes_of_one_flash_line_stops_quickly():
    """LIMITS max_objects_per_file: 50 MB of 'X0Y0D03*' lines (5.8 million flashes) stops
    at the 10001st object, read lazily, in well under the time a full read would take."""
    line = "X0Y0D03*\n"
    text = HEAD + "%ADD10C,1*%\nD10*\n" + line * (50 * 1024 * 1024 // len(line)) + "M02*\n"
    t0 = time.perf_counter()
    e = gerber_error(text, ResourceLimitError, max_objects_per_file=10_000)
    assert time.perf_counter() - t0 < 3.0
    assert e.line == 10_005 and "max_objects_per_file" in e.message


@dataclass(frozen=True)
class VertexLimits(Limits):
    """Limits with a per-file vertex budget (the readers use ``max_total_vertices`` when
    the limits carry one)."""

    max_total_vertices: int = 10_000


def test_largest_aperture_flashed_a_hundred_thousand_times():
    """REQUIREMENT (no memory exhaustion): a 1.2 MB file flashing a 1000 mm circle (the
    max_aperture_mm limit itself) 100,000 times would need 2e8 vertices (~15 GB); the
    reader's vertex budget (50 million by default) stops it at the first flash over the
    budget, before any of the circles is built.  Expected line: the flash that passes
    50e6 / (vertices of arcs.circle(0, 0, 1000)); 4 header lines before the first."""
    ring = len(arcs.circle(0.0, 0.0, 1000.0).exterior.coords)
    text = HEAD + "%ADD10C,1000*%\nD10*\n" + "".join(f"X{i}Y0D03*\n" for i in range(100_000))
    text += "M02*\n"
    t0 = time.perf_counter()
    e = gerber_error(text, ResourceLimitError)
    assert time.perf_counter() - t0 < 5.0
    assert "max_total_vertices" in e.message
    assert e.line == 4 + 50_000_000 // ring + 1


def test_vertex_budget_from_limits_stops_step_and_repeat():
    """The budget comes from the limits when they carry ``max_total_vertices``: 10,000
    copies of a 1 mm circle (dozens of vertices each) exceed 10,000 vertices, refused at
    the %SR*% that would make the copies."""
    text = HEAD + "%ADD10C,1*%\n%SRX100Y100I2J2*%\nD10*\nX0Y0D03*\n%SR*%\nM02*\n"
    with pytest.raises(ResourceLimitError) as info:
        parse_gerber(text, "hostile.gbr", VertexLimits())
    assert info.value.line == 7 and "max_total_vertices" in info.value.message
    parse_gerber(text, "hostile.gbr", VertexLimits(max_total_vertices=10_000_000))


def test_drill_largest_tool_hit_a_hundred_thousand_times():
    """The same budget for NC drill: 100,000 hits of a 999 mm tool stop at the first hit
    over 50 million vertices (6 lines before the first hit)."""
    ring = len(arcs.circle(0.0, 0.0, 999.0).exterior.coords)
    text = "M48\nMETRIC\nT1C999.0\n%\nT1\n" + "".join(f"X{i * 0.001:.3f}Y0\n"
                                                     for i in range(100_000)) + "M30\n"
    t0 = time.perf_counter()
    e = drill_error(text, ResourceLimitError)
    assert time.perf_counter() - t0 < 5.0
    assert e.line == 5 + 50_000_000 // ring + 1
    with pytest.raises(ResourceLimitError):
        parse_drill(DHEAD + "X1.0Y1.0\nR5000X0.01\nM30\n", "r.drl", VertexLimits())


def test_file_larger_than_max_file_bytes():
    """LIMITS max_file_bytes applies to text handed to the parsers too."""
    text = HEAD + "%ADD10C,1*%\nD10*\n" + "X0Y0D03*\n" * 2000 + "M02*\n"
    e = gerber_error(text, ResourceLimitError, max_file_bytes=10_000)
    assert "max_file_bytes" in e.message
    e = drill_error("M48\nMETRIC\nT1C1.0\n%\nT1\n" + "X1.0Y1.0\n" * 2000 + "M30\n",
                    ResourceLimitError, max_file_bytes=10_000)
    assert "max_file_bytes" in e.message


@pytest.mark.parametrize("inner", ["(" * 10_000 + "1" + ")" * 10_000, "-" * 10_000 + "1",
                                   "+" * 10_000 + "1"])
def test_deeply_nested_macro_expression(inner):
    """Macro arithmetic (spec rev. 2024.05, "Arithmetic expressions") nested 10,000 deep:
    an InputFileError at the macro's line, never a RecursionError."""
    text = HEAD + "%AMEXPR*1,1," + inner + ",0,0*%\n%ADD10EXPR*%\nD10*\nX0Y0D03*\nM02*\n"
    e = gerber_error(text)
    assert e.line == 3 and "nest" in e.message


def test_long_flat_macro_sum_is_read():
    """A flat sum of 100,001 terms is long but not nested (left-associative, spec rev.
    2024.05): it evaluates to 1 + 0 + 0 ... = 1, a circle of diameter 1 mm, area pi/4
    within the flattening allowance (arcs.circle: circumscribed, sagitta <= 0.5 um)."""
    text = HEAD + "%AMEXPR*1,1,1" + "+0" * 100_000 + ",0,0*%\n%ADD10EXPR*%\nD10*\nX0Y0D03*\nM02*\n"
    gf = parse_gerber(text, "long.gbr")
    area = gf.objects[0].geometry.area
    assert abs(area - np.pi / 4) <= np.pi * 1.0 * 0.0005 * 1.05


def test_macro_expression_overflow_is_refused():
    """A macro value that overflows to inf or NaN (1e200 x 1e200) is refused."""
    big = "1" + "0" * 200
    e = gerber_error(HEAD + f"%AMEXPR*1,1,{big}x{big},0,0*%\n%ADD10EXPR*%\nD10*\nX0Y0D03*\nM02*\n")
    assert e.line == 3


def test_huge_code_numbers():
    """G/D/M codes and aperture numbers longer than Python's int conversion allows."""
    gerber_error(HEAD + "G" + "1" * 5000 + "*\nM02*\n")
    gerber_error(HEAD + "%ADD" + "1" * 5000 + "C,1*%\nM02*\n")
    gerber_error(HEAD + "%ABD" + "1" * 5000 + "*%\n%AB*%\nM02*\n")
    gerber_error(HEAD + "%AMEXPR*$" + "1" * 5000 + "=1*1,1,1,0,0*%\nM02*\n")


def test_nul_byte():
    """A NUL byte inside a word is an InputFileError at its line."""
    assert gerber_error(HEAD + "%ADD10C,1*%\nD10*\nX0\x00Y0D03*\nM02*\n").line == 5
    assert drill_error("M48\nMETRIC\nT1C1.0\n%\nT1\nX1.0\x00Y1.0\nM30\n").line == 6


def test_invalid_utf8_files(tmp_path):
    """Bytes that are not UTF-8 (0xFF, a lone continuation byte) are read as latin-1 and the
    resulting strange characters are reported at their line, not crashed on."""
    g = tmp_path / "bad.gbr"
    g.write_bytes((HEAD + "%ADD10C,1*%\nD10*\nX0Y0D03\xff*\nM02*\n").encode("latin-1"))
    with pytest.raises(InputFileError) as info:
        read_gerber(g)
    assert info.value.file == "bad.gbr" and info.value.line == 5
    d = tmp_path / "bad.drl"
    d.write_bytes(b"M48\nMETRIC\nT1C1.0\n%\nT1\nX1.0Y1.0\x80\nM30\n")
    with pytest.raises(InputFileError) as info:
        read_drill(d)
    assert info.value.file == "bad.drl" and info.value.line == 6
    # a surrogate escape in the text (as from errors="surrogateescape") is just a bad char
    check_gerber(HEAD + "%ADD10C,1*%\nD10*\nX0Y0D03\udcff*\nM02*\n")


def test_transform_overflow():
    """LR/LS/SR values beyond a double are refused at their line (not inf geometry)."""
    big = "1" + "0" * 400
    assert gerber_error(HEAD + f"%LR{big}*%\nM02*\n").line == 3
    assert gerber_error(HEAD + f"%LS{big}*%\nM02*\n").line == 3


@pytest.mark.parametrize("scale", ["0.0000000000000000000001", "0.000000000001"])
def test_tiny_scale_gives_valid_geometry(scale):
    """LS > 0 is allowed (spec rev. 2024.05, "LS"); a vanishing scale must still give valid
    geometry (SHAPELY is_valid) or a clear error."""
    text = HEAD + ("%ADD10R,1X1*%\n%ADD11C,1*%\n%AMQ*21,1,1,1,0,0,0*%\n%ADD12Q*%\n"
                   f"%LS{scale}*%\nD10*\nX5000000Y5000000D03*\nD11*\n"
                   "X5000000Y5000000D03*\nX0Y0D01*\nD12*\nX5000000Y5000000D03*\nM02*\n")
    gf = check_gerber(text, "hostile.gbr", Limits())
    if scale.count("0") > 20:  # 1e-22 mm pads at 5 mm: below double resolution there
        assert any("floating-point resolution" in n.text for n in gf.notes)


# ----- NC drill

DHEAD = "M48\nMETRIC\nT1C1.0\n%\nT1\n"


def test_drill_repeat_of_a_billion():
    """LIMITS max_drill_hits: R999999999 is refused at its line before any hit is made."""
    t0 = time.perf_counter()
    e = drill_error(DHEAD + "X1.0Y1.0\nR999999999X0.001\nM30\n", ResourceLimitError)
    assert time.perf_counter() - t0 < 1.0
    assert e.line == 7 and "max_drill_hits" in e.message


def test_drill_repeat_small_limit():
    """LIMITS max_drill_hits with a small limit: R50 after 1 hit exceeds 20."""
    e = drill_error(DHEAD + "X1.0Y1.0\nR50X0.1\nM30\n", ResourceLimitError,
                    max_drill_hits=20)
    assert e.line == 7


@pytest.mark.parametrize("body, line", [
    ("X1.0Y1.0\nR" + "9" * 5000 + "X0.001\nM30\n", 7),
    ("T" + "9" * 5000 + "\nM30\n", 6),
    ("G" + "9" * 5000 + "\nM30\n", 6),
    ("M" + "9" * 5000 + "\nM30\n", 6),
    ("X" + "9" * 5000 + "Y1\nM30\n", 6),
])
def test_drill_numbers_of_five_thousand_digits(body, line):
    """Whole numbers longer than Python converts by default: an error at their line."""
    assert drill_error(DHEAD + body).line == line


def test_thousands_of_leading_zeros_are_just_zeros():
    """Leading zeros carry no value (common practice for code numbers; Gerber spec rev.
    2024.05 and the NC drill manual read coordinates and codes as numbers), so 6000 of them
    must neither crash int() nor change the reading: R002 repeats a hit twice (3 holes),
    D0...010 selects D10, X0...01000000 is 1 mm in format 4.6."""
    zeros = "0" * 6000
    df = parse_drill(DHEAD + f"X1.0Y1.0\nR{zeros}2X0.1\nG{zeros}5\nM{zeros}30\n", "z.drl")
    assert len(df.holes) == 3
    gf = parse_gerber(HEAD + f"%ADD10C,1*%\nD{zeros}10*\nX{zeros}1000000Y0D03*\nM02*\n",
                      "z.gbr")
    assert gf.objects[0].point == (1.0, 0.0)


@pytest.mark.parametrize("text, line", [
    ("M48\n;FILE_FORMAT=2:999999999\nINCH\nT1C0.03\n%\nT1\nX1Y1\nM30\n", 2),
    ("M48\n; FORMAT={999999999:4/ absolute / inch / suppress trailing zeros}\nINCH\n"
     "T1C0.03\n%\nT1\nX1Y1\nM30\n", 2),
    ("M48\nINCH,LZ," + "0" * 5000 + ".0000\nT1C0.03\n%\nT1\nX1Y1\nM30\n", 2),
])
def test_drill_absurd_digit_counts(text, line):
    """A digit count of a billion would make a billion-digit number: refused at its line
    (programming manual: formats such as 2.4 / 3.3, far below 10 digits)."""
    t0 = time.perf_counter()
    assert drill_error(text).line == line
    assert time.perf_counter() - t0 < 1.0


def test_drill_tool_and_coordinate_overflow():
    """LIMITS max_aperture_mm / max_coordinate_mm for NC drill, including values that
    overflow a double."""
    big = "1" + "0" * 400
    assert drill_error(f"M48\nMETRIC\nT1C1000000000.0\n%\nM30\n", ResourceLimitError).line == 3
    assert drill_error(f"M48\nMETRIC\nT1C{big}\n%\nM30\n", ResourceLimitError).line == 3
    assert drill_error(DHEAD + "X1000000000000.0Y1.0\nM30\n", ResourceLimitError).line == 6
    assert drill_error(DHEAD + f"X{big}.0Y1.0\nM30\n", ResourceLimitError).line == 6


def test_drill_rout_arc_far_away():
    """LIMITS max_coordinate_mm: a rout arc whose radius A makes it sweep 1e12 mm out."""
    e = drill_error(DHEAD + "G00X0Y0\nM15\nG03X1.0Y0A1000000000000.0\nM16\nM30\n",
                    InputFileError)
    assert e.line == 8


def test_drill_fifty_megabytes_of_hits_stop_quickly():
    """LIMITS max_drill_hits: 50 MB of one hit line stops at the 10001st hit, quickly."""
    text = DHEAD + "X1.0Y1.0\n" * (50 * 1024 * 1024 // 9) + "M30\n"
    t0 = time.perf_counter()
    e = drill_error(text, ResourceLimitError, max_drill_hits=10_000)
    assert time.perf_counter() - t0 < 3.0
    assert e.line == 10_005 + 1


def test_drill_unusual_line_breaks_keep_line_numbers():
    """Lines of NC drill text end in CR LF, CR or LF (common practice); a form feed or a
    NEL inside a line is not a line break, so the error on 'QQ' is on line 7 (as an editor
    counts), not on line 9 as str.splitlines would count."""
    text = "M48\nMETRIC\x0c\nT1C1.0\n%\nT1\nX1.0Y1.0\x85\nQQ\nM30\n"
    assert drill_error(text).line == 7
    assert drill_error(text.replace("\n", "\r")).line == 7


# --------------------------------------------------------------------------- last resort


def test_gerber_last_resort_guard(monkeypatch):
    """parse_gerber's documented last resort: an unexpected exception inside the reader
    becomes an InputFileError naming the file and the line being read, chained to the
    original (simulated by a flash that fails)."""
    from layoutcheck.readers.gerber import plot

    def broken(self, pt, line):
        raise ZeroDivisionError("simulated")

    monkeypatch.setattr(plot.Plotter, "flash", broken)
    with pytest.raises(InputFileError) as info:
        parse_gerber(HEAD + "%ADD10C,1*%\nD10*\nX0Y0D03*\nM02*\n", "guard.gbr")
    e = info.value
    assert e.file == "guard.gbr" and e.line == 5
    assert e.message.startswith(INTERNAL) and "ZeroDivisionError" in e.message
    assert isinstance(e.__cause__, ZeroDivisionError)


def test_drill_last_resort_guard(monkeypatch):
    """parse_drill's documented last resort, simulated by a hit that fails."""
    from layoutcheck.readers import drill_parser

    def broken(self, target):
        raise IndexError("simulated")

    monkeypatch.setattr(drill_parser.DrillReader, "_hit", broken)
    with pytest.raises(InputFileError) as info:
        parse_drill(DHEAD + "X1.0Y1.0\nM30\n", "guard.drl")
    e = info.value
    assert e.file == "guard.drl" and e.line == 6
    assert e.message.startswith(INTERNAL) and isinstance(e.__cause__, IndexError)
