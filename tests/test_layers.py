"""Layer identification: X2 first, then the project map, then the file name (an assumption).
Sources: Gerber Layer Format Specification rev. 2024.05 §5.6 (.FileFunction values);
file-name words and extensions are common practice."""
import pytest

from layoutcheck.errors import ProjectFileError
from layoutcheck.readers.layers import role_from_name, role_from_project, role_from_x2


@pytest.mark.parametrize("ff,kind,side,index", [
    (("Copper", "L1", "Top"), "copper", "top", 1),
    (("Copper", "L4", "Bot", "Plane"), "copper", "bottom", 4),
    (("Copper", "L2", "Inr", "Signal"), "copper", "inner", 2),
    (("Profile", "NP"), "profile", None, None),
    (("Soldermask", "Top"), "soldermask", "top", None),
])
def test_x2(ff, kind, side, index):
    r = role_from_x2(ff, None)
    assert (r.kind, r.side, r.index) == (kind, side, index)


def test_x2_drill_span_and_plating():
    r = role_from_x2(("NonPlated", "1", "4", "NPTH", "Drill"), None)
    assert r.kind == "drill" and r.plated is False and r.span == (1, 4)


def test_negative_polarity():
    assert role_from_x2(("Copper", "L2", "Inr", "Plane"), ("Negative",)).negative


def test_project_map():
    m = {"plane.gbr": "in2", "edge.gbr": "profile", "x.drl": "drill-npth"}
    assert role_from_project("plane.gbr", m, "p").index == 3
    assert role_from_project("edge.gbr", m, "p").kind == "profile"
    assert role_from_project("x.drl", m, "p").plated is False
    with pytest.raises(ProjectFileError):
        role_from_project("a", {"a": "middle"}, "p")


@pytest.mark.parametrize("name,kind,side", [
    ("board-top-copper.gbr", "copper", "top"),
    ("board.gbl", "copper", "bottom"),
    ("board-outline.gbr", "profile", None),
    ("board-top-mask.gbr", "soldermask", "top"),
    ("silk_bottom.gbr", "legend", "bottom"),
])
def test_name_guess(name, kind, side):
    r = role_from_name(name)
    assert (r.kind, r.side, r.basis) == (kind, side, "file name")


def test_name_guess_gives_up():
    assert role_from_name("something.gbr") is None
