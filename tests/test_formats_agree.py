"""One board, three input formats, one answer (issue 5 acceptance).

The rev-a sample board (sample_boards/, our own invented demo design) is kept as Gerber X2
+ NC drill (``fullbridge-rev-a/``), as plain Gerber + NC drill + IPC-D-356A netlist
(``fullbridge-rev-a-plain/``) and as IPC-2581 (``fullbridge-rev-a.xml``).  Three readers
take three different routes to the nets: X2 ``.N`` attributes on every object, netlist
test points matched to the copper by location (shared/reference/formats.md section 4.3),
and IPC-2581 ``Set@net``.  Reviewed with the same project file they must give the same
net names and the same spacing findings (rule, layer, nets, required distance; measured
distance within 1 um).  The power-loop rule is left out: IPC-2581 carries package names
that the Gerber routes do not.
"""
from __future__ import annotations

import sys
from pathlib import Path

import pytest

from layoutcheck.review import review

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = ROOT / "sample_boards"
sys.path.insert(0, str(SAMPLES))

import make_samples  # noqa: E402

SPACING_RULES = ("clearance", "creepage")
#: Measured distances may differ by the flattening of arcs in each format (mm).
TOL_MM = 0.001


@pytest.fixture(scope="module")
def three():
    x2 = review(SAMPLES / "fullbridge-rev-a")
    plain = review(SAMPLES / "fullbridge-rev-a-plain")
    xml = review(SAMPLES / "fullbridge-rev-a.xml",
                 SAMPLES / "fullbridge-rev-a" / "layoutcheck.toml")
    return {"x2": x2, "plain": plain, "ipc2581": xml}


def spacing(r):
    return sorted(((f.rule, f.layer or "", tuple(f.nets), round(f.required_mm, 6),
                    f.measured_mm) for f in r.findings if f.rule in SPACING_RULES),
                  key=lambda t: (t[:4], t[4]))


def test_the_plain_folder_really_is_plain(three):
    """The plain route must not get its names from anywhere but the netlist: no X2
    attributes in its Gerber files, and the names come from the .ipc file."""
    for p in (SAMPLES / "fullbridge-rev-a-plain").glob("*.gbr"):
        text = p.read_text()
        assert "%TF" not in text and "%TO" not in text and "%TA" not in text, p.name
    assert any(a.topic == "nets" and "IPC-D-356" in a.text
               for a in three["plain"].assumptions)


def test_same_net_names(three):
    names = {k: sorted(r.graph.nets) for k, r in three.items()}
    assert names["plain"] == names["x2"] == names["ipc2581"]
    assert len(names["x2"]) >= 15 and not three["plain"].graph.auto_named


def test_same_spacing_findings_within_1um(three):
    """Same (rule, layer, nets, required) findings in the three readings, measured
    distances within 1 um pairwise; rev-a has planted spacing problems, so the lists are
    not empty."""
    ref = spacing(three["x2"])
    assert ref, "rev-a should show its planted spacing problems"
    for name in ("plain", "ipc2581"):
        got = spacing(three[name])
        assert [g[:4] for g in got] == [r[:4] for r in ref], name
        for g, r in zip(got, ref):
            assert abs(g[4] - r[4]) <= TOL_MM, (name, g, r)


def test_no_netlist_mismatch_on_the_sample(three):
    """The netlist written from the same design agrees with its copper."""
    assert not [f for f in three["plain"].findings if f.rule == "netlist-mismatch"]
    assert not [f for f in three["plain"].findings if f.rule.startswith("net-")]


def test_other_format_samples_are_up_to_date(tmp_path):
    """The plain folder and the IPC-2581 file in the repository are byte-identical to a
    fresh run of make_samples.make_other_formats (regenerate with make_samples.py)."""
    fresh = make_samples.make_other_formats("a", tmp_path)
    for p in fresh:
        kept = SAMPLES / p.relative_to(tmp_path)
        assert kept.read_bytes() == p.read_bytes(), kept.name
