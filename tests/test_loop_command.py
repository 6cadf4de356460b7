"""``layoutcheck loop PATH --through ...`` on the sample board, in-process.

Sources
-------
* The sample scenario (sample_boards/fullbridge.py, our own invented board): rev-a places
  the film capacitor C5 about 40 mm from leg A (a large commutation loop), rev-b right
  beside it (a small loop); C5 pad 1 at (10, 84.5) in rev-a, pads on HV_BUS / HV_RTN;
  Q1/Q2 in TO-247 style with 1 G, 2 D, 3 S; HV_BUS declared 400 V.
* Shared power-layout notes PL-1: dV = L di/dt, V_pk = V_bus + dV <= 0.8 V_BR [N].
* shapely's own polygon area of the reported path, for the enclosed area.
"""
from __future__ import annotations

import json
from pathlib import Path

import pytest
from shapely.geometry import Polygon

from layoutcheck.cli import main

SAMPLES = Path(__file__).resolve().parent.parent / "sample_boards"
REV_A = SAMPLES / "fullbridge-rev-a"
REV_B = SAMPLES / "fullbridge-rev-b"
LEG_A = "C5.1,Q1.2,Q1.3,Q2.2,Q2.3,C5.2"


def run(argv, capsys):
    rc = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return rc, out, err


def bare_text(folder) -> str:
    """The sample's project file without its power-loop data ([switching], [legs],
    [parts]): voltages and environment only, so the rule's defaults apply (1 A/ns, no
    rating, no C_oss, no package)."""
    text = (folder / "layoutcheck.toml").read_text(encoding="utf-8")
    return text.split("\n[switching]")[0] + "\n"


@pytest.fixture
def bare(tmp_path):
    def make(folder):
        p = tmp_path / f"bare-{folder.name}.toml"
        p.write_text(bare_text(folder), encoding="utf-8")
        return p
    return make


def loop_of(folder, capsys, *extra, rc_want=0):
    rc, out, err = run(["loop", folder, "--through", LEG_A, "--format", "json", *extra],
                       capsys)
    assert rc == rc_want, err
    doc = json.loads(out)
    assert len(doc["loops"]) == 1
    return doc


def test_json_shape_on_the_sample(capsys, bare):
    """The contract keys; the parts in loop order; the path starts at C5 pad 1 (10, 84.5)
    as the sample places it; the enclosed area is shapely's area of that path; the
    overshoot at the assumed 1 A/ns equals L in nH (notes PL-1) and the peak adds the
    400 V of HV_BUS."""
    doc = loop_of(REV_A, capsys, "--project", bare(REV_A))
    (e,) = doc["loops"]
    assert {"name", "parts", "inductance_nh", "area_mm2", "length_mm", "stacked_return_nh",
            "overshoot_v", "ringing_mhz", "path"} <= set(e)
    assert e["parts"] == ["C5", "Q1", "Q2"]
    x, y, _ = e["path"][0]
    assert (x, y) == pytest.approx((10.0, 84.5), abs=1e-3)
    assert all(len(p) == 3 and p[2] in ("top", "bottom", None) for p in e["path"])
    area = Polygon([(p[0], p[1]) for p in e["path"]]).area
    assert e["area_mm2"] == pytest.approx(area, rel=1e-3)
    assert e["overshoot_v"] == pytest.approx(e["inductance_nh"], rel=1e-3)
    assert e["peak_v"] == pytest.approx(400 + e["overshoot_v"], abs=1e-3)
    assert e["ringing_mhz"] is None                   # no C_oss given
    assert 0 < e["stacked_return_nh"] < e["inductance_nh"]
    assert any("1 A/ns" in a["text"] for a in doc["assumptions"])
    assert "CAUTION" in doc["caution"]


def test_rev_b_loop_is_smaller(capsys, bare):
    """Moving C5 beside leg A (rev-b) shrinks the loop's area and inductance, as the
    sample scenario intends."""
    a = loop_of(REV_A, capsys, "--project", bare(REV_A))["loops"][0]
    b = loop_of(REV_B, capsys, "--project", bare(REV_B))["loops"][0]
    assert b["area_mm2"] < 0.5 * a["area_mm2"]
    assert b["inductance_nh"] < a["inductance_nh"]


def test_text_output_and_out_file(tmp_path, capsys):
    """With the sample's own project data rev-a's loop is an error (exit 1)."""
    target = tmp_path / "loop.json"
    rc, out, _ = run(["loop", REV_A, "--through", LEG_A, "--format", "json", "--out",
                      target], capsys)
    assert rc == 1 and out == ""
    assert json.loads(target.read_text(encoding="utf-8"))["loops"][0]["parts"] == [
        "C5", "Q1", "Q2"]
    rc, out, _ = run(["loop", REV_A, "--through", LEG_A], capsys)
    assert rc == 1 and LEG_A in out and "nH" in out and "Assumptions" in out


def _project(tmp_path, extra: str) -> Path:
    text = bare_text(REV_A) + "\n" + extra
    p = tmp_path / "project.toml"
    p.write_text(text, encoding="utf-8")
    return p


def test_derated_rating_exceeded_exits_1(tmp_path, capsys):
    """A 450 V rating derated to 80 % allows 360 V, below the 400 V bus alone: error, exit
    1 (notes PL-1).  A 1200 V rating allows 960 V, far above 400 V plus a loop of well
    under 500 nH at 1 A/ns: exit 0."""
    low = _project(tmp_path, '[parts.Q1]\nvds_max_v = 450\n[parts.Q2]\nvds_max_v = 450\n')
    rc, out, _ = run(["loop", REV_A, "--through", LEG_A, "--project", low, "--format",
                      "json"], capsys)
    e = json.loads(out)["loops"][0]
    assert rc == 1 and e["severity"] == "error" and e["rating_v"] == 450
    assert e["rating_pct"] == pytest.approx(100 * e["peak_v"] / 450)
    high = _project(tmp_path, '[parts.Q1]\nvds_max_v = 1200\n[parts.Q2]\nvds_max_v = 1200\n')
    rc, out, _ = run(["loop", REV_A, "--through", LEG_A, "--project", high, "--format",
                      "json"], capsys)
    assert rc == 0 and json.loads(out)["loops"][0]["inductance_nh"] < 500


def test_package_in_project_adds_internal_inductance(tmp_path, capsys, bare):
    """[parts.Qx] package = "TO-247" adds the table's 10 nH per switch (from memory) and
    [parts.C5] internal_nh = 4 adds 4 nH: 24 nH more than without."""
    base = loop_of(REV_A, capsys, "--project", bare(REV_A))["loops"][0]
    p = _project(tmp_path, '[parts.Q1]\npackage = "TO-247"\n[parts.Q2]\npackage = "TO-247"\n'
                           '[parts.C5]\ninternal_nh = 4\n')
    e = loop_of(REV_A, capsys, "--project", p)["loops"][0]
    assert e["internal_nh"] == pytest.approx(24.0)
    # the TO-247 lead is 1.2 mm instead of the default 0.8 mm: the geometry shifts a little
    assert e["inductance_nh"] - base["inductance_nh"] == pytest.approx(24.0, abs=1.0)


@pytest.mark.parametrize("through,needle", [
    ("C5.1,Q9.2,Q1.3", "Q9.2: the board has no part 'Q9'"),
    ("C5.1,Q1.7,Q1.3", "Q1.7: part Q1 has no pad '7'"),
    ("C5.1,Q1,Q1.3", "'Q1' is not a pad reference"),
    ("C5.1,Q1.3,Q2.2", "C5.1 (net HV_BUS) and Q1.3 (net SW_A)"),
    ("C5.1", "at least two pads"),
])
def test_bad_references_exit_2(capsys, through, needle):
    rc, out, err = run(["loop", REV_A, "--through", through], capsys)
    assert rc == 2 and out == ""
    assert needle in err
