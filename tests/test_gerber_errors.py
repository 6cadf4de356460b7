"""Malformed Gerber input: each case raises InputFileError naming the file and the line.

Source: Gerber Layer Format Specification rev. 2024.05 chapter 3 [Syntax] (every word
ends in '*'), §4.2.2 [FS must come before coordinates], §4.6 [Current aperture must be
defined], §4.13 [End-of-file M02], and the lists of valid codes in chapter 4 (section
numbers recalled from memory; titles in brackets).
"""
from __future__ import annotations

import pytest

from gerber_samples import parse
from layoutcheck.errors import InputFileError, ResourceLimitError
from layoutcheck.limits import Limits
from layoutcheck.readers.gerber import parse_gerber

HEAD = "%FSLAX46Y46*%\n%MOMM*%\n"


def line_of_error(text: str, exc=InputFileError, **kw) -> int:
    with pytest.raises(exc) as e:
        parse_gerber(text, "bad.gbr", **kw)
    assert e.value.file == "bad.gbr"
    return e.value.line


def test_truncated_file_without_m02():
    """§4.13: a file ends with M02; without it the file is taken as truncated."""
    text = HEAD + "%ADD10C,1*%\nD10*\nX0Y0D03*\n\n"
    assert line_of_error(text) == 5


def test_truncated_inside_word():
    """§3: a word must end in '*'."""
    assert line_of_error(HEAD + "%ADD10C,1*%\nD10*\nX0Y0D0") == 5


def test_word_not_ending_in_star_inside_block():
    assert line_of_error("%FSLAX46Y46*%\n%MOMM%\n") == 2


def test_unknown_aperture():
    """§4.6: Dnn must have been defined by AD."""
    assert line_of_error(HEAD + "%ADD10C,1*%\nD11*\nX0Y0D03*\nM02*\n") == 4


def test_operation_before_aperture():
    """§4.8: D01/D03 need a current aperture."""
    assert line_of_error(HEAD + "%ADD10C,1*%\nX0Y0D03*\nM02*\n") == 4


def test_bad_macro():
    """§4.5: a bad macro primitive is reported at its own line."""
    assert line_of_error(HEAD + "%AMX*\n1,1,0.5,0,0*\n9,1*%\nM02*\n") == 5


def test_coordinates_before_fs():
    """§4.2.2: FS must come before any coordinate."""
    assert line_of_error("%MOMM*%\n%ADD10C,1*%\nD10*\nX0Y0D03*\n%FSLAX46Y46*%\nM02*\n") == 4


@pytest.mark.parametrize("body, line", [
    ("G10*\n", 3),                      # linear interpolation x10: changes the image
    ("M05*\n", 3),
    ("%KOC*%\n", 3),                    # unknown extended command
    ("%LPX*%\n", 3),
    ("%ADD10C,1*%\nD10*\nX1A2D03*\n", 5),   # letter A is not a Gerber code
    ("%ADD10C,1*%\nD10*\nX1.2.3D03*\n", 5),  # not a number
    ("%ADD10C,1*%\nD10*\nXD03*\n", 5),
    ("%ADD10C,1*%\nD10*\nX1Y2D07*\n", 5),   # D04..D09 do not exist
    ("%ADD10C,1*%\nD10*\nX1X2D03*\n", 5),
    ("%FSLAX46*%\n", 3),
    ("%MOFT*%\n", 3),
    ("%ADD10C,1*%\nX1Y2D10*\n", 4),
])
def test_unknown_or_malformed_codes(body, line):
    """Chapter 4: unknown G/M codes and extended commands could change the image, so they
    are errors, never skipped."""
    assert line_of_error(HEAD + body + "M02*\n") == line


def test_flash_in_region():
    assert line_of_error(HEAD + "%ADD10C,1*%\nD10*\nG36*\nX0Y0D03*\nG37*\nM02*\n") == 6


def test_coordinate_limit():
    """layoutcheck.limits.Limits.max_coordinate_mm (safety limit)."""
    text = HEAD + "%ADD10C,1*%\nD10*\nX200000000Y0D03*\nM02*\n"
    assert line_of_error(text, ResourceLimitError, limits=Limits(max_coordinate_mm=100)) == 5
    assert len(parse_gerber(text, "ok.gbr").objects) == 1


def test_error_message_names_file_and_line():
    with pytest.raises(InputFileError) as e:
        parse("%ADD10C,1*%\nD12*\n")
    assert str(e.value).startswith("test.gbr, line 4: ")
    assert "D12" in e.value.message


def test_ls_cannot_grow_aperture_past_limit():
    """layoutcheck.limits.Limits.max_aperture_mm also bounds an aperture scaled by LS."""
    text = HEAD + "%ADD10C,2*%\n%LS10*%\nD10*\nX0Y0D03*\nM02*\n"
    assert line_of_error(text, ResourceLimitError, limits=Limits(max_aperture_mm=5)) == 6
    text = HEAD + "%ADD10C,2*%\n%LS2*%\nD10*\nX0Y0D03*\nM02*\n"
    assert len(parse_gerber(text, "ok.gbr", limits=Limits(max_aperture_mm=5)).objects) == 1


def test_step_repeat_reach_limit():
    """layoutcheck.limits.Limits.max_coordinate_mm also bounds SR copies."""
    text = HEAD + "%SRX3Y1I80J0*%\n%SR*%\nM02*\n"
    assert line_of_error(text, ResourceLimitError, limits=Limits(max_coordinate_mm=100)) == 3


def test_empty_percent_pair_is_harmless():
    """Chapter 3: '%%' holds no command; it is skipped."""
    gf = parse_gerber(HEAD + "%%\n%ADD10C,1*%\nD10*\nX0Y0D03*\nM02*\n", "e.gbr")
    assert len(gf.objects) == 1
