"""Deprecated and legacy forms, text layout (CRLF, split lines), sniffing and file reading.

Source: Gerber Layer Format Specification rev. 2024.05 chapter 8 [Deprecated format
elements] (§8.1 deprecated commands, §8.3 syntax variations, §8.4 G54/G55/G70/G71/G90/G91/
M00/M01) and chapter 3 [Syntax] (section numbers recalled from memory; titles in brackets).
"""
from __future__ import annotations

import math

import pytest

from gerber_samples import area_ok, doc, parse, xy
from layoutcheck.errors import InputFileError, UnsupportedFeatureError
from layoutcheck.readers.gerber import looks_like_gerber, parse_gerber, read_gerber

PRE = "%ADD10C,1*%\n"


def texts(gf):
    return " | ".join(n.text for n in gf.notes)


def test_g54_g55_prefixes():
    """§8.4: G54 before Dnn and G55 before a flash are ignored prefixes."""
    gf = parse(PRE + "G54D10*\nG55" + xy(1, 2) + "D03*\n")
    assert gf.objects[0].point == (1, 2) and gf.objects[0].aperture == "D10"
    assert "G54" in texts(gf) and "G55" in texts(gf)


def test_g70_g71_units():
    """§8.4: G70 = inch, G71 = mm when MO is absent."""
    gf = parse_gerber("%FSLAX24Y24*%\nG70*\n%ADD10C,0.01*%\nD10*\nX10000Y0D03*\nM02*\n", "a")
    assert gf.units == "inch" and gf.objects[0].point == pytest.approx((25.4, 0))
    gf = parse_gerber("%FSLAX24Y24*%\nG71*\n%ADD10C,0.01*%\nD10*\nX10000Y0D03*\nM02*\n", "b")
    assert gf.units == "mm" and gf.objects[0].point == pytest.approx((1, 0))


def test_g90_absolute():
    """§8.4: G90 selects absolute coordinates (the normal reading)."""
    gf = parse(PRE + "G90*\nD10*\n" + xy(1, 1) + "D03*\n")
    assert gf.objects[0].point == (1, 1)


def test_ip_polarity():
    """§8.1 [Image polarity (IP)]: POS is the normal image; NEG marks it negative (we flag
    image_negative and note it rather than inverting)."""
    assert parse("%IPPOS*%\n").image_negative is False
    gf = parse("%IPNEG*%\n")
    assert gf.image_negative is True and "IPNEG" in texts(gf)


@pytest.mark.parametrize("cmd", ["%MIA0B0*%", "%OFA0B0*%", "%SFA1B1*%", "%ASAXBY*%", "%IR0*%",
                                 "%INPANEL_1*%", "%LNTOP*%"])
def test_image_commands_identity_accepted(cmd):
    """§8.1: AS, IN, IR, LN, MI, OF, SF.  Identity values change nothing."""
    gf = parse(PRE + cmd + "\nD10*\n" + xy(1, 1) + "D03*\n")
    assert gf.objects[0].point == (1, 1)


@pytest.mark.parametrize("cmd", ["%MIA1B0*%", "%OFA1.0B0*%", "%SFA2B1*%", "%ASAYBX*%",
                                 "%IR90*%"])
def test_image_transforms_unsupported(cmd):
    """§8.1: whole-image transforms with other values are not implemented: refused."""
    with pytest.raises(UnsupportedFeatureError) as e:
        parse(PRE + cmd + "\n")
    assert e.value.line == 4


def test_m00_and_m01():
    """§8.4: M00 ends the file like M02; M01 is ignored."""
    gf = parse_gerber(doc(PRE + "D10*\nM01*\n" + xy(1, 0) + "D03*\nM00*\n", end=""), "m")
    assert len(gf.objects) == 1 and "M00" in texts(gf) and "M01" in texts(gf)


def test_several_parameters_in_one_block():
    """§8.3 [combining parameters]: %FSLAX26Y26*MOMM*% runs FS then MO."""
    gf = parse_gerber("%FSLAX26Y26*MOMM*%\n%ADD10C,1*%\nD10*\nX1000000Y0D03*\nM02*\n", "p")
    assert gf.units == "mm" and gf.objects[0].point == (1, 0)


def test_spelling_variants():
    """§8.3.3 [Style variations in command codes]: G1, G001, g01, D3, D010 = D10."""
    gf = parse(PRE + "%ADD011C,2*%\nD010*\ng01*\n" + xy(0, 0) + "D2*\n" + xy(1, 0) + "D1*\n"
               "G001*\nD011*\n" + xy(5, 5) + "D3*\n")
    assert [o.kind for o in gf.objects] == ["draw", "flash"]
    assert gf.objects[0].aperture == "D10" and gf.objects[1].aperture == "D11"


def test_crlf_and_split_lines():
    """§3 [Syntax]: CR and LF carry no meaning; a word may be split over lines.  The line
    of an object is the line where its word starts."""
    text = ("%FSLAX46Y46*%\r\n%MOMM*%\r\n%ADD10C,1*%\r\nD10*\r\nX1000000\r\nY2000\r\n000D0\r\n3*"
            "\r\nM02*\r\n")
    gf = parse_gerber(text, "crlf.gbr")
    assert gf.objects[0].point == (1, 2) and gf.objects[0].line == 5
    assert area_ok(gf.objects[0].geometry.area, math.pi / 4, math.pi)


def test_looks_like_gerber():
    """common practice: Gerber starts with %FS/%MO/%TF/G04; NC drill with M48 and tools."""
    assert looks_like_gerber("%FSLAX46Y46*%\n%MOMM*%\n")
    assert looks_like_gerber("G04 written by a CAD tool*\n%MOIN*%")
    assert looks_like_gerber("%TF.FileFunction,Copper,L1,Top*%\n")
    assert not looks_like_gerber("M48\n; #@! TF.FileFunction,Plated,1,2,PTH\nMETRIC,TZ\nT1C0.800\n%\n")
    assert not looks_like_gerber("T1\nX10.0Y5.0\nM30\n")
    assert not looks_like_gerber("P  JOB demo\n317GND  VIA  -  D0400PA00X+010000Y+010000\n999\n")


def test_read_gerber_utf8_and_latin1(tmp_path):
    """read_gerber decodes UTF-8, else latin-1 (common practice for legacy comments)."""
    good = doc("%ADD10C,1*%\n%TO.N,Ω*%\nD10*\n" + xy(0, 0) + "D03*\n")
    p = tmp_path / "a.gbr"
    p.write_bytes(good.encode("utf-8"))
    gf = read_gerber(p)
    assert gf.name == "a.gbr" and gf.objects[0].attributes[".N"] == ("Ω",)
    q = tmp_path / "b.gbr"
    q.write_bytes(doc("G04 caf\xe9*\n%ADD10C,1*%\nD10*\n" + xy(0, 0) + "D03*\n").encode("latin-1"))
    assert len(read_gerber(q).objects) == 1
    with pytest.raises(InputFileError):
        read_gerber(tmp_path / "missing.gbr")


def test_content_after_m02_noted():
    gf = parse_gerber(doc(PRE + "D10*\n" + xy(0, 0) + "D03*\n") + "X1Y1D03*\n", "t")
    assert len(gf.objects) == 1 and "after M02" in texts(gf)
