"""IPC-D-356(A) netlist reader and writer.

Source of every expected value: the record layout in shared/reference/formats.md section 4
(from a public application note on IPC-D-356A and a public sample file, marked [S]):
columns 1-3 operation code, 4-17 net, 21-26 reference, 27 ``-``, 28-31 pin, 32 ``M``,
33 ``D`` + 34-37 hole + 38 ``P``/``U``, 39-41 access, 42-57 ``X``/``Y`` sign + 6 digits,
58-71 feature size and rotation; units CUST 0 / CUST (0.0001 in), CUST 1 (0.001 mm),
CUST 2 (0.0001 in, radians), SI (0.001 mm); NNAME aliases; 999 end.  Inch-to-millimetre
conversions are worked by hand (1 in = 25.4 mm exactly).  Continuation (017/027) records
continue the 317/327 before them (same notes, "the hole of the previous feature").
"""
from __future__ import annotations

import pytest

from layoutcheck.errors import InputFileError, UnsupportedFeatureError
from layoutcheck.readers.ipc356 import looks_like_ipc356, parse_ipc356
from layoutcheck.writers.design import Design, NonPlatedHole, Pad, Part, Via
from layoutcheck.writers.ipc356 import ipc356_text

#: The public worked example quoted in the format notes, section 4.2.
EXAMPLE = ("317+3.3V            J13   -2    D0400PA00X+043550Y+006480\n"
           "327+3.3V            C171  -1          A01X+041900Y+006660\n")


def netlist(body: str, units: str | None = "CUST 0", end: bool = True) -> str:
    head = "C  test netlist\nP  JOB   test\n"
    if units is not None:
        head += f"P  UNITS {units}\n"
    return head + body + ("999\n" if end else "")


def test_worked_example_from_the_notes():
    """Format notes 4.2: 'net +3.3V: pin J13-2 with a 0.0400 in plated hole, testable from
    both sides, at (4.3550, 0.6480) in; and SMD pad C171-1 on the top' (at (4.1900, 0.6660)
    in).  In mm by hand: 0.04 * 25.4 = 1.016; 4.355 * 25.4 = 110.617; 0.648 * 25.4 =
    16.4592; 4.19 * 25.4 = 106.426; 0.666 * 25.4 = 16.9164."""
    nl = parse_ipc356(netlist(EXAMPLE), "ex.ipc")
    a, b = nl.records
    assert (a.code, a.net, a.ref, a.pin, a.access) == ("317", "+3.3V", "J13", "2", 0)
    assert a.plated is True and a.hole_mm == pytest.approx(1.016, abs=1e-12)
    assert (a.x, a.y) == pytest.approx((110.617, 16.4592), abs=1e-9)
    assert a.line == 4 and a.through and not a.is_via and not a.mid
    assert (b.code, b.net, b.ref, b.pin, b.access) == ("327", "+3.3V", "C171", "1", 1)
    assert b.hole_mm is None and b.plated is None
    assert (b.x, b.y) == pytest.approx((106.426, 16.9164), abs=1e-9)
    assert nl.nets() == ["+3.3V"] and nl.units == "CUST 0" and nl.job == "test"


@pytest.mark.parametrize("units,mm_per_unit", [
    ("CUST 0", 0.00254), ("CUST", 0.00254), ("CUST 1", 0.001), ("CUST 2", 0.00254),
    ("SI", 0.001)])
def test_units(units, mm_per_unit):
    """Format notes 4.1: CUST 0/CUST/CUST 2 count 0.0001 in (= 0.00254 mm), CUST 1 and SI
    0.001 mm.  X+043550 is 43550 units; the hole D0400 400 units."""
    nl = parse_ipc356(netlist(EXAMPLE, units), "u.ipc")
    r = nl.records[0]
    assert r.x == pytest.approx(43550 * mm_per_unit, rel=1e-12)
    assert r.y == pytest.approx(6480 * mm_per_unit, rel=1e-12)
    assert r.hole_mm == pytest.approx(400 * mm_per_unit, rel=1e-12)


def test_missing_units_assumes_inches_and_says_so():
    """Format notes 4.1 [M]: no UNITS line -> assume CUST 0 (and say so)."""
    nl = parse_ipc356(netlist(EXAMPLE, units=None), "n.ipc")
    assert nl.units == "CUST 0"
    assert nl.records[0].x == pytest.approx(110.617, abs=1e-9)
    assert any(a.topic == "units" and "CUST 0" in a.text for a in nl.notes)


def test_rotation_in_radians_under_cust_2():
    """Format notes 4.1: CUST 2 is inches and radians; R003 = 3 rad = 171.887 degrees."""
    rec = "327NET1              C1    -1          A01X+001000Y+002000X0100Y0200R003\n"
    r = parse_ipc356(netlist(rec, "CUST 2"), "r.ipc").records[0]
    assert r.rotation == pytest.approx(3 * 180 / 3.141592653589793, rel=1e-12)
    assert (r.size_x, r.size_y) == pytest.approx((0.254, 0.508), abs=1e-12)
    r1 = parse_ipc356(netlist(rec, "CUST 1"), "r.ipc").records[0]
    assert r1.rotation == 3.0 and (r1.size_x, r1.size_y) == pytest.approx((0.1, 0.2))


def test_nname_alias_gives_the_full_name():
    """Format notes 4.1: names longer than the 14-column net field are given as an alias
    defined by a P NNAME record (full name from column 15)."""
    body = ("P  NNAME1     GATE_DRIVE_HIGH_SIDE_A\n"
            "317NNAME1              Q1    -1    D0400PA00X+001000Y+001000\n"
            "327SHORT_NAME          R1    -1          A01X+002000Y+001000\n")
    nl = parse_ipc356(netlist(body), "a.ipc")
    assert nl.aliases == {"NNAME1": "GATE_DRIVE_HIGH_SIDE_A"}
    assert [r.net for r in nl.records] == ["GATE_DRIVE_HIGH_SIDE_A", "SHORT_NAME"]
    assert nl.nets() == ["GATE_DRIVE_HIGH_SIDE_A", "SHORT_NAME"]


def test_undefined_alias_is_an_error_with_its_line():
    """An alias no NNAME line defines would silently become a wrong net name."""
    body = ("P  NNAME1     LONG_NAME_NUMBER_ONE\n"
            "317NNAME2              Q1    -1    D0400PA00X+001000Y+001000\n")
    with pytest.raises(InputFileError) as e:
        parse_ipc356(netlist(body), "a.ipc")
    assert e.value.line == 5 and "NNAME2" in e.value.message


def test_continuation_inherits_net_reference_and_kind():
    """Format notes 4.2: 017/027 continue the record before them; a blank net field takes
    the previous record's net; 017 after 317 is a through-hole point like it."""
    body = ("317HV                J1    -1    D0600PA00X+010000Y+010000\n"
            "017                              D0600PA00X+012000Y+010000\n"
            "327LV                U1    -3          A01X+020000Y+010000\n"
            "027                                    A01X+020500Y+010000\n")
    nl = parse_ipc356(netlist(body, "CUST 1"), "c.ipc")
    c1, c2 = nl.records[1], nl.records[3]
    assert (c1.code, c1.kind, c1.net, c1.ref, c1.pin) == ("017", "317", "HV", "J1", "1")
    assert c1.through and (c1.x, c1.y) == pytest.approx((12.0, 10.0))
    assert (c2.code, c2.kind, c2.net, c2.ref) == ("027", "327", "LV", "U1")


@pytest.mark.parametrize("body,line,words", [
    ("017HV                J1    -1    D0600PA00X+010000Y+010000\n", 4, "follows nothing"),
    ("317HV                J1    -1    D0600PA00X+010000Y+010000\n"
     "027                                    A01X+020500Y+010000\n", 5, "317 record"),
])
def test_continuation_without_its_record_is_an_error(body, line, words):
    """A continuation must follow the kind it continues (format notes 4.2)."""
    with pytest.raises(InputFileError) as e:
        parse_ipc356(netlist(body, "CUST 1"), "c.ipc")
    assert e.value.line == line and words in e.value.message


@pytest.mark.parametrize("body,line,words,kind", [
    ("317HV                J1    -1    D0600PA00X+01O000Y+010000\n", 4, "coordinates",
     InputFileError),
    ("317HV                J1    -1    D0600PX+010000Y+010000\n", 4, "access", InputFileError),
    ("hello world\n", 4, "not a netlist record", InputFileError),
    ("318HV                J1    -1    D0600PA00X+010000Y+010000\n", 4, "318",
     UnsupportedFeatureError),
    ("327HV                J1    -1          A01X+010000Y+010000X0100Y0100R400\n", 4,
     "rotation", InputFileError),
    ("P  UNITS CUST 7\n", 4, "UNITS", InputFileError),
    ("P  UNITS CUST 0\n", 4, "second UNITS", InputFileError),
    ("PX UNITS CUST 1\n", 4, "malformed", InputFileError),
])
def test_malformed_lines_name_their_line(body, line, words, kind):
    """Malformed records raise with file and 1-based line (the header is lines 1-3:
    comment, JOB, UNITS CUST 1), and the message says what was seen or expected."""
    with pytest.raises(kind) as e:
        parse_ipc356(netlist(body, "CUST 1"), "bad.ipc")
    assert e.value.file == "bad.ipc" and e.value.line == line
    assert words in e.value.message


def test_truncated_file_is_an_error():
    """Format notes 4.1: 999 ends the file; without it the file is taken as truncated."""
    with pytest.raises(InputFileError) as e:
        parse_ipc356(netlist(EXAMPLE, end=False), "t.ipc")
    assert e.value.line == 5 and "999" in e.value.message


def test_no_test_records_is_an_error():
    with pytest.raises(InputFileError) as e:
        parse_ipc356(netlist(""), "e.ipc")
    assert "no test records" in e.value.message


def test_shifted_columns_are_read_by_fields_and_noted():
    """Format notes 4.4: columns are sometimes ignored (tabs, shifted fields): parse by
    column, then fall back to per-field patterns.  Same point as the worked example."""
    body = "317+3.3V\tJ13-2 D0400P A00 X+043550Y+006480\n"
    nl = parse_ipc356(netlist(body), "s.ipc")
    r = nl.records[0]
    assert (r.net, r.ref, r.pin, r.access, r.plated) == ("+3.3V", "J13", "2", 0, True)
    assert (r.x, r.y) == pytest.approx((110.617, 16.4592), abs=1e-9)
    assert any("field by field" in a.text and "4" in a.text for a in nl.notes)


def test_other_records_and_panel_images_are_noted_not_read():
    """Format notes 4.1/4.2: conductor (378) and outline (389) records carry no test point;
    records after P IMAGE other than PRIMARY belong to panel copies."""
    body = ("P  IMAGE PRIMARY\n" + EXAMPLE +
            "378HV               L01 0100 X+000000Y+000000 X+001000Y+000000\n"
            "389BOARD_EDGE        X+000000Y+000000 X+010000Y+000000\n"
            "P  IMAGE 1\n" + EXAMPLE)
    nl = parse_ipc356(netlist(body), "o.ipc")
    assert len(nl.records) == 2
    text = " ".join(a.text for a in nl.notes)
    assert "378" in text and "389" in text and "panel" in text


def test_blind_via_span_and_non_plated_hole():
    """Format notes 4.2: 307 carries its layer span in columns 75-80; 367 is a non-plated
    tooling hole (U)."""
    rec307 = ("307SIG               VIA   -     D0200PA00X+001000Y+002000"
              .ljust(74) + "L01L03\n")
    rec367 = "367                              D3200UA00X+050000Y+050000\n"
    nl = parse_ipc356(netlist(rec307 + rec367, "CUST 1"), "v.ipc")
    v, h = nl.records
    assert v.span == (1, 3) and v.is_via and v.hole_mm == pytest.approx(0.2)
    assert h.kind == "367" and h.plated is False and h.hole_mm == pytest.approx(3.2)
    assert h.net == "" and h.ref == ""


def test_sniffing():
    """A netlist is told from Gerber (starts with G04 / %) and NC drill (M48) text."""
    assert looks_like_ipc356(netlist(EXAMPLE))
    assert looks_like_ipc356(EXAMPLE)
    assert not looks_like_ipc356("G04 comment*\n%FSLAX46Y46*%\n%MOMM*%\n")
    assert not looks_like_ipc356("M48\nMETRIC,TZ\nT1C0.8\n%\nT1\nX1.0Y2.0\nM30\n")
    assert not looks_like_ipc356("just some notes\n")


# ---------------------------------------------------------------------------- writer
def small_design() -> Design:
    return Design(
        name="w", outline=[(0, 0), (30, 0), (30, 20), (0, 20)],
        parts=[Part("J1", "connector", pins={"1": "", "2": ""}),
               Part("U1", "driver", side="bottom", pins={"1": "VCC"})],
        pads=[Pad("J1", "1", "HV", 12.5, 3.25, "circle", 2.0, layers="all", drill=0.8),
              Pad("J1", "2", "A_VERY_LONG_NET_NAME", 12.5, 8.0, "rect", 2.0, 1.5,
                  layers="all", drill=0.8, rotation=90),
              Pad("U1", "1", "", 20.0, 10.0, "rect", 1.2, 0.6, layers="bottom")],
        vias=[Via("HV", 5.0, 5.0, 0.8, 0.4)],
        holes=[NonPlatedHole(25.0, 15.0, 3.2)])


def test_writer_columns_by_hand():
    """The writer puts each field in the columns of the format notes 4.2 table (worked by
    hand for a 0.8 mm plated pad J1-1 of net HV at (12.5, 3.25) mm, CUST 1)."""
    text = ipc356_text(small_design())
    lines = text.splitlines()
    assert "P  UNITS CUST 1" in lines and lines[-1] == "999"
    rec = next(ln for ln in lines if ln.startswith("317HV") and "J1" in ln)
    assert rec[0:3] == "317" and rec[3:17] == "HV".ljust(14) and rec[17:20] == "   "
    assert rec[20:26] == "J1    " and rec[26] == "-" and rec[27:31] == "1   "
    assert rec[32:38] == "D0800P" and rec[38:41] == "A00"
    assert rec[41:57] == "X+012500Y+003250"
    alias = next(ln for ln in lines if ln.startswith("P  NNAME"))
    assert alias[3:14].strip() == "NNAME1" and alias[14:] == "A_VERY_LONG_NET_NAME"
    smd = next(ln for ln in lines if ln.startswith("327"))
    assert smd[3:17].strip() == "N/C" and smd[38:41] == "A02"   # bottom of 2 layers
    tool = next(ln for ln in lines if ln.startswith("367"))
    assert tool[32:38] == "D3200U" and tool[3:31].strip() == ""


@pytest.mark.parametrize("units,tol", [("mm", 0.0005), ("inch", 0.00127)])
def test_writer_round_trip(units, tol):
    """What the writer writes, the reader reads back: every pad, via and hole at its
    point within half a unit of the chosen resolution (0.001 mm or 0.0001 in)."""
    d = small_design()
    nl = parse_ipc356(ipc356_text(d, units), "rt.ipc")
    want = ([(p.x, p.y, p.net if p.net != "" else "N/C", p.ref, p.pin) for p in d.pads] +
            [(v.x, v.y, v.net, "VIA", "") for v in d.vias] +
            [(h.x, h.y, "", "", "") for h in d.holes])
    got = [(r.x, r.y, r.net, r.ref, r.pin) for r in nl.records]
    assert len(got) == len(want)
    for (gx, gy, *g), (wx, wy, *w) in zip(got, want):
        assert g == w
        assert abs(gx - wx) <= tol and abs(gy - wy) <= tol
    assert nl.records[0].hole_mm == pytest.approx(0.8, abs=tol)
    assert nl.records[2].access == 2 and nl.records[1].rotation == 90


def test_coordinates_over_six_digits_are_read():
    """Format notes 4.4: large metric boards overflow the 6 coordinate digits; the value
    is read field by field (X+1234567 at CUST 1 = 1234.567 mm)."""
    body = "327BIG                R1    -1          A01X+1234567Y-0000001\n"
    r = parse_ipc356(netlist(body, "CUST 1"), "big.ipc").records[0]
    assert (r.x, r.y) == pytest.approx((1234.567, -0.001), abs=1e-9)
