"""NC drill number formats: units, zero modes, digit templates, format comments.

Sources named beside each check:
* MANUAL = "NC drill programming manual (format 2), as summarised in our format notes"
  (section 2.2/2.3: LZ = leading zeros present, TZ = trailing zeros present, a decimal
  point always overrides, inch 2.4 / metric 3.3 digits);
* "common practice" for exporter habits (format comments, METRIC,TZ,000.000).
Worked numbers are done by hand in each docstring.
"""
import math

import pytest

from layoutcheck.errors import InputFileError
from layoutcheck.readers.drill import parse_drill

MM = 25.4


def _one_hit(header_lines, hit, name="t.drl"):
    text = "M48\n" + "\n".join(header_lines) + "\nT1C0.5\n%\nT1\n" + hit + "\nM30\n"
    df = parse_drill(text, name)
    assert len(df.holes) == 1
    p = df.holes[0].path
    return (p.x, p.y), df


@pytest.mark.parametrize("header, hit, expected_mm, why", [
    # MANUAL: inch LZ, 2.4 digits: "0075" right-padded to "007500" = 00.7500 in = 19.05 mm
    (["INCH,LZ"], "X0075Y0075", (0.75 * MM, 0.75 * MM), "inch LZ"),
    # MANUAL: inch TZ: "7500" / 10^4 = 0.75 in = 19.05 mm; "15" / 10^4 = 0.0015 in
    (["INCH,TZ"], "X7500Y15", (0.75 * MM, 0.0015 * MM), "inch TZ"),
    # MANUAL: metric LZ, 3.3 digits: "0125" -> "012500" = 12.500 mm; "1" -> "100000" = 100 mm
    (["METRIC,LZ"], "X0125Y1", (12.5, 100.0), "metric LZ"),
    # MANUAL: metric TZ, 3.3: "125" / 10^3 = 0.125 mm
    (["METRIC,TZ"], "X125Y-2500", (0.125, -2.5), "metric TZ with sign"),
    # MANUAL: template 0000.00 -> 4.2 digits; LZ "0125" -> "012500" / 100 = 125.00 mm,
    # "00005" -> "000050" / 100 = 0.50 mm
    (["METRIC,LZ,0000.00"], "X0125Y00005", (125.0, 0.5), "metric LZ 4.2 template"),
    # MANUAL: template 000.00 with TZ: "1234" / 100 = 12.34 mm
    (["METRIC,TZ,000.00"], "X1234Y+50", (12.34, 0.5), "metric TZ 3.2 template"),
    # MANUAL: a decimal point overrides the zero mode: X1.5 = 1.5 in = 38.1 mm
    (["INCH,LZ"], "X1.5Y.25", (1.5 * MM, 0.25 * MM), "decimal point in inch LZ file"),
    (["METRIC,TZ,000.000"], "X12.5Y5.", (12.5, 5.0), "decimal point in metric TZ file"),
    # MANUAL: sign before the digits; LZ "-0075" = -0.75 in
    (["INCH,LZ"], "X-0075Y+0100", (-0.75 * MM, 1.0 * MM), "inch LZ signs"),
])
def test_coordinate_formats(header, hit, expected_mm, why):
    """MANUAL, zero flags and digit formats (worked numbers in the parameter comments)."""
    (x, y), _ = _one_hit(header, hit)
    assert x == pytest.approx(expected_mm[0], abs=1e-9), why
    assert y == pytest.approx(expected_mm[1], abs=1e-9), why


def test_common_writer_metric_tz_with_suppress_leading_comment():
    """Common practice: a writer emits METRIC,TZ,000.000 plus a FORMAT comment saying
    leading zeros are suppressed, with X5080Y12560; under the manual's TZ definition both
    agree: 5080 / 10^3 = 5.080 mm, 12560 / 10^3 = 12.560 mm.  No format note is needed."""
    (x, y), df = _one_hit(["; FORMAT={3:3/ absolute / metric / suppress leading zeros}",
                           "METRIC,TZ,000.000"], "X5080Y12560")
    assert (x, y) == pytest.approx((5.08, 12.56))
    assert not [n for n in df.notes if n.topic == "drill-format"]


def test_format_comment_alone_sets_unit_digits_and_zeros():
    """Common practice: ``; FORMAT={2:4/ absolute / inch / suppress trailing zeros}`` gives
    inch 2.4 with trailing zeros dropped (= leading present, LZ): X01 -> 010000 -> 1.0000 in
    = 25.4 mm; Y0005 -> 000500 -> 0.05 in = 1.27 mm."""
    text = ("M48\n; FORMAT={2:4/ absolute / inch / suppress trailing zeros}\nT1C0.02\n%\n"
            "T1\nX01Y0005\nM30\n")
    df = parse_drill(text, "c.drl")
    p = df.holes[0].path
    assert (p.x, p.y) == pytest.approx((25.4, 1.27))
    assert df.holes[0].diameter == pytest.approx(0.02 * MM)
    assert df.units == "inch"


def test_file_format_comment_digits():
    """Common practice: ``;FILE_FORMAT=2:5`` gives 2.5 digits; with INCH,TZ (manual: integer
    / 10^decimals) X12345 = 0.12345 in = 3.13563 mm."""
    (x, _), df = _one_hit([";FILE_FORMAT=2:5", "INCH,TZ"], "X12345Y0")
    assert x == pytest.approx(0.12345 * MM, abs=1e-9)
    assert not [n for n in df.notes if n.topic == "drill-format"]


def test_command_beats_conflicting_comment_with_note():
    """The unit line is a command of the format (MANUAL); a comment is only metadata
    (common practice), so the command wins and the disagreement is reported."""
    (x, _), df = _one_hit(["; FORMAT={3:3/ absolute / metric / suppress trailing zeros}",
                           "METRIC,TZ"], "X125Y0")
    assert x == pytest.approx(0.125)
    assert any("zero mode" in n.text for n in df.notes)


def test_body_unit_switch_m71_m72():
    """MANUAL: M71 switches to metric, M72 to inch; decimal values: 1.0 in = 25.4 mm, then
    1.0 mm, then 2.0 in = 50.8 mm."""
    text = "M48\nINCH\nT1C0.04\n%\nT1\nX1.0Y0\nM71\nX1.0Y1.0\nM72\nX2.0Y0\nM30\n"
    df = parse_drill(text, "u.drl")
    xs = [h.path.x for h in df.holes]
    assert xs == pytest.approx([25.4, 1.0, 50.8])
    # the tool keeps the diameter it was defined with: 0.04 in = 1.016 mm
    assert [h.diameter for h in df.holes] == pytest.approx([1.016] * 3)


def test_tool_table_with_extra_fields_any_order():
    """MANUAL: T<n>C<d> with optional F/S/B/H/Z fields in any order, read left to right,
    later ones override; a 4-digit T0302 is tool 3 (compensation index 2).
    Metric: C0.800 = 0.8 mm; C1.25 then C1.5 -> 1.5 mm."""
    text = ("M48\nMETRIC\nT1F200S55C0.800B1.0H2000Z-0.1\nT02C1.25Z+0.2C1.5F100\n"
            "T0302C3.0\n%\nT01\nX1.0Y1.0\nT2\nX2.0Y1.0\nT0302\nX3.0Y1.0\nM30\n")
    df = parse_drill(text, "tt.drl")
    assert [h.diameter for h in df.holes] == pytest.approx([0.8, 1.5, 3.0])
    assert [h.tool for h in df.holes] == ["T1", "T2", "T3"]


def test_no_header_uses_default_format_with_note():
    """Format notes section 2.3 (from memory): with nothing stated, inch 2.4 with leading
    zeros suppressed: X015000 = 15000 / 10^4 = 1.5 in = 38.1 mm, Y010000 = 1.0 in.  The
    reader must say what it assumed (unit, zero mode, digits) and that there was no M48."""
    text = "T1C0.0320\nT1\nX015000Y010000\nX020000\nM30\n"
    df = parse_drill(text, "old.drl")
    pts = [(h.path.x, h.path.y) for h in df.holes]
    assert pts == [pytest.approx((38.1, 25.4)), pytest.approx((50.8, 25.4))]
    assert df.holes[0].diameter == pytest.approx(0.032 * MM)
    fmt = [n.text for n in df.notes if n.topic == "drill-format"]
    assert any("inch was assumed" in t for t in fmt)
    assert any("2.4" in t and "leading zeros suppressed" in t for t in fmt)
    assert any("M48" in n.text for n in df.notes)


def test_decimal_only_file_needs_no_zero_mode_note():
    """MANUAL: a decimal point overrides zero mode and digits, so a METRIC file written with
    decimals has nothing to assume."""
    (x, y), df = _one_hit(["METRIC"], "X10.0Y-3.5")
    assert (x, y) == (10.0, -3.5)
    assert df.notes == []


def test_lz_with_too_many_digits_is_an_error():
    """MANUAL: LZ right-pads to the full digit count (inch 2.4 = 6 digits); seven digits
    cannot be placed, so the line must be rejected, not guessed."""
    with pytest.raises(InputFileError) as exc:
        _one_hit(["INCH,LZ"], "X1234567Y0")
    assert exc.value.line == 6 and "LZ" in exc.value.message


def test_lz_and_tz_agree_on_full_width_numbers():
    """MANUAL: with all digits written the zero mode does not matter: metric 3.3
    "012500" = 12.5 mm both ways."""
    (a, _), _ = _one_hit(["METRIC,LZ"], "X012500Y0")
    (b, _), _ = _one_hit(["METRIC,TZ"], "X012500Y0")
    assert a == b == pytest.approx(12.5)


def test_incremental_header_ici_on():
    """MANUAL: ICI,ON = incremental input: each coordinate adds to the last point:
    X1.0 -> 1, X1.0 -> 2, Y2.0 -> (2, 2) mm."""
    text = "M48\nMETRIC\nICI,ON\nT1C0.5\n%\nT1\nX1.0Y0\nX1.0\nY2.0\nM30\n"
    pts = [(h.path.x, h.path.y) for h in parse_drill(text, "i.drl").holes]
    assert pts == [(1.0, 0.0), (2.0, 0.0), (2.0, 2.0)]
    assert math.isclose(sum(x for x, _ in pts), 5.0)


def test_header_closed_by_m95_and_stated_unit_needs_no_digit_note():
    """MANUAL: M95 also closes the header; with INCH,TZ stated, 2.4 digits is the manual's
    inch format, so nothing is assumed: X7500 = 0.75 in = 19.05 mm."""
    text = "M48\nINCH,TZ\nT1C0.03\nM95\nT1\nX7500Y0\nM30\n"
    df = parse_drill(text, "m95.drl")
    assert df.holes[0].path.x == pytest.approx(19.05)
    assert not [n for n in df.notes if n.topic == "drill-format"]


def test_unit_without_zero_mode_notes_the_zero_assumption():
    """Format notes 2.3 (from memory): leading zeros suppressed when the zero mode is not
    stated: METRIC with X12500 -> 12500 / 10^3 = 12.5 mm, and a note says so."""
    (x, _), df = _one_hit(["METRIC"], "X12500Y0")
    assert x == pytest.approx(12.5)
    texts = [n.text for n in df.notes if n.topic == "drill-format"]
    assert len(texts) == 1 and "leading zeros suppressed" in texts[0]
    assert "inch was assumed" not in texts[0]
