"""End to end: distances the review reports on the sample board agree with shapely's own
distance between independently built polygons (the design's ideal copper, made by the
sample generator without any reader) to 1 um, as issue 2 requires."""
import sys
from pathlib import Path

import pytest
import shapely
from shapely.geometry import box

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "sample_boards"))

import fullbridge  # noqa: E402

from layoutcheck.review import review  # noqa: E402


@pytest.fixture(scope="module")
def rev_a():
    return review(ROOT / "sample_boards" / "fullbridge-rev-a"), fullbridge.build("a")


def test_reported_gaps_match_shapely_on_design_copper(rev_a):
    r, design = rev_a
    pieces = design.copper()
    clear = [f for f in r.findings if f.rule == "clearance"]
    assert clear
    for f in clear:
        x, y = f.where
        window = box(x - 6, y - 6, x + 6, y + 6)
        a = shapely.union_all([p.geometry for p in pieces
                               if p.layer == f.layer and p.net == f.nets[0]])
        b = shapely.union_all([p.geometry for p in pieces
                               if p.layer == f.layer and p.net == f.nets[1]])
        # the nearest copper of each net around the reported place
        d_design = min(shapely.distance(a.intersection(window), b),
                       shapely.distance(a, b.intersection(window)))
        assert abs(f.extra["closest_mm"] - d_design) <= 0.001, (f.message, d_design)
        # the two reported points lie on the two nets' copper (within 1 um)
        on = [shapely.distance(shapely.Point(f.where), a), shapely.distance(shapely.Point(f.to), b)]
        on_swapped = [shapely.distance(shapely.Point(f.where), b),
                      shapely.distance(shapely.Point(f.to), a)]
        assert max(on) <= 0.001 or max(on_swapped) <= 0.001
        # and their separation is the reported measured distance
        assert abs(shapely.distance(shapely.Point(f.where), shapely.Point(f.to))
                   - f.measured_mm) <= 1e-6


def test_plain_gerber_nets_are_named_and_listed(tmp_path):
    """Without X2 attributes the copper still forms the design's nets (one conductor per
    design net, counted from the generator's own net list), named N1.. and listed with a
    location; every undeclared voltage is an assumption (issue 2, item 6)."""
    from layoutcheck.reports import json_report, text_report
    from layoutcheck.writers.drill import write_drill
    from layoutcheck.writers.gerber import write_gerbers

    design = fullbridge.build("b")
    write_gerbers(design, tmp_path, x2=False)
    write_drill(design, tmp_path)
    r = review(tmp_path)
    n = len(design.nets())
    # GND and HV_RTN are separate nets in the design joined only through the 0-ohm R7's
    # two pads, so copper alone sees exactly one conductor per design net
    assert sorted(r.graph.nets, key=lambda s: int(s[1:])) == [f"N{i}" for i in range(1, n + 1)]
    named = json_report.report_dict(r)["board"]["named_by_layoutcheck"]
    assert [x["name"] for x in named] == [f"N{i}" for i in range(1, n + 1)]
    assert "Nets named by layoutcheck" in text_report.render(r)
    assert sum(a.topic == "voltage" and a.text.startswith("net ") for a in r.assumptions) == n
