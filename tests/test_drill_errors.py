"""NC drill input errors: each names the file and line, what was seen and what was expected.

Sources: MANUAL = "NC drill programming manual (format 2), as summarised in our format
notes" (section 2.2 header, 2.4 body codes: what each code means, so which inputs make no
sense); the project's safety limits (layoutcheck.limits) for the resource errors; and the
project rule "never silently skip something that changes the image" for unsupported codes.
"""
import pytest

from layoutcheck.errors import InputFileError, ResourceLimitError, UnsupportedFeatureError
from layoutcheck.limits import Limits
from layoutcheck.readers.drill import looks_like_drill, parse_drill, read_drill

HEAD = "M48\nMETRIC\nT1C1.0\n%\n"      # lines 1-4; the body starts at line 5


@pytest.mark.parametrize("body, cls, line, words", [
    # MANUAL: a hit drills with the loaded tool; none is loaded yet
    ("X1.0Y1.0", InputFileError, 5, "no tool selected"),
    # MANUAL: T0 unloads the tool
    ("T1\nX1.0Y1.0\nT0\nX2.0Y2.0", InputFileError, 8, "T0 at line 7"),
    # MANUAL: a tool's diameter comes from T<n>C<d>; T5 never got one
    ("T5\nX1.0Y1.0", InputFileError, 6, "T5 (selected at line 5) was never given a diameter"),
    # MANUAL: coordinates are signed numbers
    ("T1\nX1.2.3Y0", InputFileError, 6, "X"),
    ("T1\nX--1Y0", InputFileError, 6, "X"),
    ("T1\nXY1.0", InputFileError, 6, "X"),
    # not drill words at all
    ("T1\nhello world", InputFileError, 6, "expected"),
    # MANUAL: M25/M01/M02/M08 step-and-repeat, P repeats, % in the body: not implemented
    ("T1\nM25\nX1.0Y1.0\nM01\nM02X10.0Y0\nM08", UnsupportedFeatureError, 6, "M25"),
    ("T1\nX1.0Y1.0\nP01X10.0Y0", UnsupportedFeatureError, 7, "P<k>"),
    ("T1\nX1.0Y1.0\n%\nX2.0Y2.0", UnsupportedFeatureError, 7, "pattern"),
    # unknown codes that may move or cut are never skipped
    ("T1\nG84X1.0Y1.0", UnsupportedFeatureError, 6, "G84"),
    ("T1\nM09", UnsupportedFeatureError, 6, "M09"),
    # MANUAL: R repeats the previous hit; there is none
    ("T1\nR3X1.0", InputFileError, 6, "without a hit"),
    # MANUAL: G00 is a rapid move, never a cut; the router is down
    ("T1\nG00X0Y0\nM15\nG00X5.0Y0", InputFileError, 8, "plunged"),
    # MANUAL: M15 plunges the router in rout mode, entered by G00
    ("T1\nM15", InputFileError, 6, "drill mode"),
    # MANUAL: G02 needs A or I/J
    ("T1\nG00X0Y0\nM15\nG02X5.0Y0", InputFileError, 8, "A<radius>"),
    # I/J that no centre candidate satisfies (radii 5 vs 15 or 5.83)
    ("T1\nG00X0Y0\nM15\nG02X20.0Y0I5.0J3.0", InputFileError, 8, "equidistant"),
    # A shorter than half the chord
    ("T1\nG00X0Y0\nM15\nG02X20.0Y0A2.0", InputFileError, 8, "shorter than half"),
])
def test_body_errors_name_the_line(body, cls, line, words):
    with pytest.raises(cls) as exc:
        parse_drill(HEAD + body + "\nM30\n", "bad.drl")
    e = exc.value
    assert type(e) is cls
    assert e.file == "bad.drl" and e.line == line
    assert words in e.message


@pytest.mark.parametrize("text, cls, line, words", [
    # MANUAL: the header (M48) must close with % or M95 before drill data
    ("M48\nMETRIC\nT1C1.0\nT1\nX1.0Y1.0\n", InputFileError, 5, "M48 at line 1"),
    # diameters must be positive
    ("M48\nMETRIC\nT1C0.0\n%\n", InputFileError, 3, "above 0"),
    ("M48\nMETRIC\nT1C-1.0\n%\n", InputFileError, 3, "above 0"),
    # limits: 1 m tool
    ("M48\nMETRIC\nT1C2000.0\n%\n", ResourceLimitError, 3, "max_aperture_mm"),
    # MANUAL: only format 2 is read
    ("M48\nFMAT,1\nMETRIC\n%\n", UnsupportedFeatureError, 2, "FMAT,1"),
    # MANUAL: INCH/METRIC take LZ, TZ or a digit template
    ("M48\nMETRIC,QZ\n%\n", InputFileError, 2, "QZ"),
    # a second header
    ("M48\nMETRIC\n%\nM48\n", InputFileError, 4, "M48"),
    # keyword lines only belong in a header
    ("METRIC\nT1C1.0\nT1\nX1.0Y1.0\nDETECT,ON\n", InputFileError, 5, "DETECT,ON"),
])
def test_header_errors_name_the_line(text, cls, line, words):
    with pytest.raises(cls) as exc:
        parse_drill(text, "bad.drl")
    e = exc.value
    assert type(e) is cls and e.line == line and words in e.message


def test_hit_count_limit():
    """Project limits: more hits than max_drill_hits -> ResourceLimitError (a repeat is
    checked before it is expanded)."""
    lim = Limits(max_drill_hits=3)
    with pytest.raises(ResourceLimitError) as exc:
        parse_drill(HEAD + "T1\nX0Y0\nR5X1.0\n", "big.drl", lim)
    assert exc.value.line == 7 and "max_drill_hits" in exc.value.message
    with pytest.raises(ResourceLimitError) as exc:
        parse_drill(HEAD + "T1\nX0Y0\nX1.0\nX2.0\nX3.0\n", "big.drl", lim)
    assert exc.value.line == 9
    # exactly at the limit is fine
    assert len(parse_drill(HEAD + "T1\nX0Y0\nR2X1.0\n", "ok.drl", lim).holes) == 3


def test_coordinate_limit():
    """Project limits: |x| beyond max_coordinate_mm (10 m by default) is refused; an inch
    TZ coordinate X999999999 = 99999.9999 in = 2540 m is far beyond."""
    with pytest.raises(ResourceLimitError) as exc:
        parse_drill("M48\nINCH,TZ\nT1C0.03\n%\nT1\nX999999999Y0\n", "far.drl")
    assert exc.value.line == 6
    with pytest.raises(ResourceLimitError):
        parse_drill(HEAD + "T1\nX1.0Y0\nR3X5000.0\n", "far.drl")


def test_open_header_without_hits_is_a_note():
    """MANUAL: a header that never closes is only an error once drill data appears; a file
    that is all header has no holes, and the reader says why."""
    df = parse_drill("M48\nMETRIC\nT1C1.0\n", "hdr.drl")
    assert df.holes == [] and any("never closed" in n.text for n in df.notes)


def test_unknown_header_settings_are_noted_not_silent():
    """MANUAL: header lines such as machine settings do not move the tool; they are skipped
    with a note listing them."""
    df = parse_drill("M48\nMETRIC\nDETECT,ON\nATC,ON\nT1C1.0\n%\nT1\nX0Y0\n", "s.drl")
    assert len(df.holes) == 1
    assert any("DETECT,ON" in n.text and "ATC,ON" in n.text for n in df.notes)


def test_read_drill_from_file(tmp_path):
    """read_drill opens the file and names it by its file name in errors and results."""
    p = tmp_path / "board-NPTH.drl"
    p.write_text("M48\nMETRIC\nT1C3.0\n%\nT1\nX5.0Y5.0\nM30\n")
    df = read_drill(p)
    assert df.name == "board-NPTH.drl" and df.plated is False and len(df.holes) == 1
    bad = tmp_path / "bad.drl"
    bad.write_text("M48\nMETRIC\n%\nX1.0Y1.0\n")
    with pytest.raises(InputFileError) as exc:
        read_drill(bad)
    assert exc.value.file == "bad.drl" and exc.value.line == 4
    with pytest.raises(ResourceLimitError):
        read_drill(p, Limits(max_file_bytes=10))


@pytest.mark.parametrize("head, expected", [
    ("M48\n;comment\nMETRIC,TZ\nT1C0.8\n%\n", True),          # MANUAL header
    ("; #@! TF.FileFunction,Plated,1,2,PTH\nFMAT,2\n", True),   # common practice
    ("INCH,LZ\nT01C0.0320\n", True),                           # MANUAL units line
    ("T01C0.0320\n%\nT01\nX010000Y020000\n", True),             # tool table, no M48
    ("T1\nX1.0Y2.0\nX3.0Y2.0\nM30\n", True),                     # bare body
    # Gerber (format notes 1.1/1.3): words end with '*', FS/MO in % ... %
    ("G04 comment*\n%FSLAX46Y46*%\n%MOMM*%\nX100Y200D03*\n", False),
    ("%MOIN*%\nD10*\nX100Y200D03*\nM02*\n", False),
    ('<?xml version="1.0"?>\n<IPC-2581 revision="C">\n', False),  # IPC-2581 is XML
    ("P  JOB test\n317GND   VIA -  D0400PA00X+001000Y+002000\n999\n", False),  # IPC-D-356
])
def test_looks_like_drill(head, expected):
    """Sniffing: drill header/body words (MANUAL) versus Gerber, XML and IPC-D-356 text."""
    assert looks_like_drill(head) is expected
