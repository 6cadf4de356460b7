"""Stripboard plan reader: geometry, connectivity, bad plans.

Dimensions are those stated in the plan (pitch 2.54 mm, strip width 2.0 mm: common
practice); expected values are worked out by hand from them and compared with shapely's
own computations on the shapes the reader built.
"""
from pathlib import Path

import pytest
import shapely

from layoutcheck.cli import main
from layoutcheck.errors import InputFileError
from layoutcheck.netgraph import build_netgraph
from layoutcheck.readers.plan import hole_name, read_plan, row_index, row_name

HEAD = '[stripboard]\nholes = [10, 6]\npitch_mm = 2.54\nstrips = "rows"\nstrip_width_mm = 2.0\n'


def _plan(tmp_path: Path, body: str, name="p.toml") -> Path:
    p = tmp_path / name
    p.write_text(HEAD + body, encoding="utf-8")
    return p


def _net(board, graph, hole):
    plan = board.plan
    seg = plan.segments[plan.hole_segments[hole][0]]
    return graph.island_net[int(graph.shape_island[seg.shape])]


def test_row_names():
    """Hole references: rows A..Z then AA (bijective base 26), as the issue states."""
    assert [row_name(i) for i in (0, 25, 26, 27)] == ["A", "Z", "AA", "AB"]
    assert all(row_index(row_name(i)) == i for i in range(100))
    assert hole_name((3, 11)) == "D12"


def test_strip_geometry_and_gap(tmp_path):
    """Pitch 2.54, width 2.0 -> gap 0.54 mm between neighbouring strips (hand worked);
    a strip is 10 * 2.54 long, 2.0 wide, minus ten 1.0 mm holes (area by hand)."""
    b = read_plan(_plan(tmp_path, ""))
    plan = b.plan
    a = b.shapes[plan.segments[0].shape].geometry
    n = b.shapes[plan.segments[1].shape].geometry
    assert shapely.distance(a, n) == pytest.approx(0.54, abs=1e-9)
    expect = 25.4 * 2.0 - 10 * 3.141592653589793 * 0.25
    assert a.area == pytest.approx(expect, rel=2e-3)
    assert a.bounds[3] - a.bounds[1] == pytest.approx(2.0)


def test_cut_at_hole_separates_and_link_joins(tmp_path):
    """A 3.0 mm cutter at B5 wider than the 2.0 mm strip splits it in two (hand worked);
    a link from B2 to B8 joins the two pieces again in the net graph."""
    p = _plan(tmp_path, 'cuts = ["B5"]\n[[part]]\nref = "R1"\npins = { "1" = "B2", '
                        '"2" = "B8" }\n[labels]\nX = "B1"\n')
    b = read_plan(p)
    g = build_netgraph(b)
    assert b.plan.cuts[0].separates
    assert _net(b, g, (1, 0)) == "X"
    assert len(b.plan.hole_segments[(1, 7)]) == 1
    assert _net(b, g, (1, 7)) != "X"          # the cut separates
    b2 = read_plan(_plan(tmp_path, 'cuts = ["B5"]\n[[link]]\nfrom = "B2"\nto = "B8"\n'
                                   '[labels]\nX = "B1"\n', "q.toml"))
    g2 = build_netgraph(b2)
    assert _net(b2, g2, (1, 9)) == "X"        # joined across the cut by the link


def test_narrow_cutter_does_not_separate(tmp_path):
    """A 1.8 mm cutter on a 2.0 mm strip leaves 0.1 mm each side: one piece (by hand)."""
    b = read_plan(_plan(tmp_path, 'cutter_mm = 1.8\ncuts = ["B5"]\n'))
    assert not b.plan.cuts[0].separates


def test_cut_between_holes(tmp_path):
    """A knife cut between B5 and B6 of width 0.8 mm: the gap between the pieces is 0.8."""
    b = read_plan(_plan(tmp_path, 'cuts = ["B5-B6"]\n'))
    plan = b.plan
    s1 = b.shapes[plan.segments[plan.hole_segments[(1, 4)][0]].shape].geometry
    s2 = b.shapes[plan.segments[plan.hole_segments[(1, 5)][0]].shape].geometry
    assert shapely.distance(s1, s2) == pytest.approx(0.8, abs=1e-6)


@pytest.mark.parametrize("body,needle", [
    ('[[part]]\nref = "Q1"\npins = { G = "A3", D = "Z40" }\n', 'Z40'),
    ('[[part]]\nref = "Q1"\npins = { G = "A3" }\n[[part]]\nref = "Q2"\npins = { G = "A3" }\n',
     'ref = "Q2"'),
    ('[[part]]\nref = "Q1"\npins = { G = "3A" }\n', '3A'),
])
def test_bad_plans_exit_2_with_line(tmp_path, capsys, body, needle):
    """Outside the board, two parts on one hole, unknown reference: InputFileError naming
    the plan and the line (issue 6 acceptance)."""
    p = _plan(tmp_path, body)
    text = p.read_text().splitlines()
    want = next(i + 1 for i, ln in enumerate(text) if needle in ln)
    if "Q2" in needle:
        want += 1   # the pins line of the second part
    with pytest.raises(InputFileError) as e:
        read_plan(p)
    assert e.value.line == want and e.value.file == str(p)
    assert main(["review", str(p)]) == 2
    assert f"line {want}" in capsys.readouterr().err


def test_sample_plan_reviews(tmp_path, capsys):
    """The sample plan reviews with the short command and draws an SVG."""
    sample = Path(__file__).parent.parent / "sample_boards" / "stripboard-stage.toml"
    svg = tmp_path / "s.svg"
    assert main(["review", str(sample), "--svg", str(svg)]) == 0
    assert "strip-spacing" in capsys.readouterr().out
    assert svg.read_text().startswith("<svg")
