"""The power-loop rule: overshoot, derating, ringing, severities, project keys, reports.

Sources
-------
* Shared power-layout notes PL-1: dV = L di/dt, V_pk = V_bus + dV, V_pk <= 0.8 V_BR [N];
  worked example: 70 nH at 1 A/ns overshoots 70 V, a 400 V bus peaks at 470 V, a 600 V
  part runs at 78 % (pass), a 500 V part at 94 % (fail), L_max = 80 nH.
* PL-2: f_r = 1 / (2 pi sqrt(L C_oss)); 70 nH with 100 pF rings at 60 MHz, Z0 = 26 ohm.
  Textbook circuit theory.
* PL-3: a leg needs a local capacitor across its bus.
* Warning threshold 20 nH and derating 80 %: common practice as stated in the notes.
"""
from __future__ import annotations

import json
import math
import tomllib

import pytest

from boards import StraightPaths, half_bridge, project
from layoutcheck.checks import CheckContext, power_loop
from layoutcheck.errors import ProjectFileError
from layoutcheck.loops import consequences, grade
from layoutcheck.netgraph import build_netgraph
from layoutcheck.project import load_project, project_from_data
from layoutcheck.reports import json_report, text_report
from layoutcheck.review import Review

VOLTS = '[voltages]\n"HV_BUS" = 400\n"HV_RTN" = 0\n"SW_A" = "0..400"\n"*" = "0..15"\n'


# ---------------------------------------------------------------------------------------
# the numbers (notes PL-1 / PL-2, worked by hand)
def test_notes_example_600_v_part_passes():
    """70 nH, 1 A/ns, 400 V bus, 600 V part: 70 V overshoot, 470 V peak = 78.3 % of the
    rating, within 80 %; L_max = (0.8 * 600 - 400) / 1 A/ns = 80 nH."""
    c = consequences(70e-9, 1.0, 400.0, 600.0, 0.8)
    assert c.overshoot_v == pytest.approx(70.0)
    assert c.peak_v == pytest.approx(470.0)
    assert c.ratio == pytest.approx(470 / 600) and round(100 * c.ratio) == 78
    assert not c.exceeds_rating
    assert c.max_inductance_h == pytest.approx(80e-9)
    assert grade(c, 20.0) == "warning"           # 70 nH > 20 nH
    assert grade(c, 100.0) == "info"


def test_notes_example_500_v_part_fails():
    """The same loop on a 500 V part: 470 / 500 = 94 % > 80 % -> error; L_max =
    (400 - 400) / di/dt = 0 (the bus alone uses the whole derated rating)."""
    c = consequences(70e-9, 1.0, 400.0, 500.0, 0.8)
    assert c.ratio == pytest.approx(0.94)
    assert c.exceeds_rating and grade(c, 100.0) == "error"
    assert c.max_inductance_h == pytest.approx(0.0, abs=1e-18)


def test_notes_example_ringing():
    """70 nH with 100 pF: 1 / (2 pi sqrt(7e-18)) = 60.2 MHz, Z0 = sqrt(700) = 26.5 ohm,
    inside the 30-300 MHz radiated band (notes PL-2, [M])."""
    c = consequences(70e-9, 1.0, 400.0, coss_f=100e-12)
    assert c.ringing_hz == pytest.approx(1 / (2 * math.pi * math.sqrt(70e-9 * 100e-12)))
    assert round(c.ringing_hz / 1e6) == 60
    assert c.z0_ohm == pytest.approx(26.46, abs=0.01)
    assert c.rings_in_radiated_band
    assert c.rating_v is None and not c.exceeds_rating


def test_di_dt_from_current_and_time():
    """current_a / switch_time_ns: 20 A in 10 ns is 2 A/ns, so 70 nH overshoots 140 V."""
    proj = project_from_data(tomllib.loads(
        VOLTS + "[switching]\ncurrent_a = 20\nswitch_time_ns = 10\n"), None)
    assert proj.switching.di_dt() == pytest.approx(2.0)
    assert consequences(70e-9, proj.switching.di_dt(), 400).overshoot_v == pytest.approx(140)


# ---------------------------------------------------------------------------------------
# the rule on the hand-drawn leg (stand-in straight copper)
def _ctx(text: str = "", board=None, provider=None):
    board = board or half_bridge()
    proj = project_from_data(tomllib.loads(VOLTS + text), None, VOLTS + text)
    ctx = CheckContext(board, build_netgraph(board), proj)
    ctx.path_provider = provider or StraightPaths()
    return ctx


def _loop_L() -> float:
    """The leg loop's inductance (H) as the rule computes it (geometry only)."""
    ctx = _ctx()
    (f,) = power_loop.run(ctx)
    return f.extra["loop"]["inductance_nh"] * 1e-9


def test_rule_severity_follows_the_derated_rating():
    """Error exactly when V_bus + L di/dt > 0.8 V_rating (notes PL-1): with the loop's own
    L, ratings just above and below the limit (V_bus + L di/dt) / 0.8 give info and error
    (warn_nh raised out of the way)."""
    L = _loop_L()
    limit = (400 + L * 1e9) / 0.8            # V, at 1 A/ns
    for rating, sev in ((limit * 1.01, "info"), (limit * 0.99, "error")):
        ctx = _ctx(f"[switching]\ndi_dt_a_per_ns = 1.0\nwarn_nh = 1000\n"
                   f"[parts.Q1]\nvds_max_v = {rating}\n[parts.Q2]\nvds_max_v = {rating}\n")
        (f,) = power_loop.run(ctx)
        assert f.severity == sev, f.message
        e = f.extra["loop"]
        assert e["peak_v"] == pytest.approx(400 + L * 1e9)
        assert e["rating_pct"] == pytest.approx(100 * (400 + L * 1e9) / rating)


def test_rule_warns_above_warn_nh_and_uses_the_lower_rating():
    """warn_nh below the loop's L gives a warning; the lower of the two switch ratings is
    the one judged (either part sees the peak)."""
    L_nh = _loop_L() * 1e9
    ctx = _ctx(f"[switching]\ndi_dt_a_per_ns = 1\nwarn_nh = {L_nh * 0.9}\n"
               "[parts.Q1]\nvds_max_v = 1200\n[parts.Q2]\nvds_max_v = 900\n")
    (f,) = power_loop.run(ctx)
    assert f.severity == "warning" and f.extra["loop"]["rating_v"] == 900
    ctx = _ctx(f"[switching]\ndi_dt_a_per_ns = 1\nwarn_nh = {L_nh * 1.1}\n")
    (f,) = power_loop.run(ctx)
    assert f.severity == "info" and f.extra["loop"]["rating_v"] is None


def test_rule_overshoot_scales_with_di_dt_and_reports_ringing():
    """dV = L di/dt: at 3 A/ns the overshoot is three times L in nH (V); with C_oss 100 pF
    the ringing is 1 / (2 pi sqrt(L C)) (notes PL-2)."""
    L = _loop_L()
    ctx = _ctx("[switching]\ndi_dt_a_per_ns = 3\n[parts.Q2]\ncoss_pf = 100\n")
    (f,) = power_loop.run(ctx)
    e = f.extra["loop"]
    assert e["overshoot_v"] == pytest.approx(3 * L * 1e9)
    assert e["ringing_mhz"] == pytest.approx(1 / (2 * math.pi * math.sqrt(L * 100e-12)) / 1e6)
    assert "rings at" in f.message


def test_default_di_dt_and_derating_are_assumptions():
    """Without [switching]: 1 A/ns (notes: Si 0.5-2 A/ns, from memory) and 80 % are used
    and said; the overshoot in volts then equals L in nH."""
    ctx = _ctx()
    (f,) = power_loop.run(ctx)
    assert f.extra["loop"]["overshoot_v"] == pytest.approx(f.extra["loop"]["inductance_nh"])
    texts = " ".join(a.text for a in ctx.assumptions)
    assert "assumed 1 A/ns" in texts and "80 %" in texts and "20 nH" in texts
    assert "Q1: no voltage rating known" in texts


def test_leg_without_capacitor_is_a_warning():
    """Notes PL-3: nothing closes the fast loop -> warning naming bus and return."""
    ctx = _ctx(board=half_bridge(capacitor=False))
    (f,) = power_loop.run(ctx)
    assert f.severity == "warning" and "no capacitor across HV_BUS and HV_RTN" in f.message
    assert "loop" not in f.extra


def test_smallest_loop_per_leg_and_all_loops_on_request():
    """Two capacitors: the nearer one (C9 at x = 25, beside the switches) makes the smaller
    loop and is the one judged; all_loops adds the other as info, marked not smallest."""
    from boards import add_components, part_pad

    def board():
        b = half_bridge()
        b.shapes += [part_pad("C9", "1", 25, 20, "HV_BUS"), part_pad("C9", "2", 25, 0,
                                                                     "HV_RTN")]
        return add_components(b)

    fs = power_loop.run(_ctx(board=board()))
    assert len(fs) == 1 and fs[0].extra["loop"]["capacitor"] == "C9"
    assert fs[0].extra["loop"]["area_mm2"] == pytest.approx(5 * 20)
    fs = power_loop.run(_ctx("[switching]\nall_loops = true\n", board=board()))
    assert [(f.extra["loop"]["capacitor"], f.extra["loop"]["smallest"]) for f in fs] == [
        ("C9", True), ("C3", False)]
    assert fs[1].severity == "info" and fs[1].extra["loop"]["area_mm2"] == pytest.approx(600)


def test_applies_only_with_a_leg():
    """A board with no half-bridge leg: the rule does not apply and says why."""
    ctx = _ctx(board=half_bridge())
    assert power_loop.applies(ctx) is None
    from boards import make_board, part_pad, add_components
    b = add_components(make_board([part_pad("R1", "1", 0, 0, "A"),
                                   part_pad("R1", "2", 5, 0, "B")]))
    why = power_loop.applies(_ctx(board=b))
    assert why and "no half-bridge leg" in why


def test_untraceable_loop_is_a_warning():
    """A provider that cannot find copper (a split net) leaves a warning naming the
    capacitor and the reason, not a silent gap."""
    from layoutcheck.errors import UsageError

    class Broken(StraightPaths):
        def current_path(self, board, graph, net, start, end):
            raise UsageError(f"pads not connected on {net}")

    (f,) = power_loop.run(_ctx(provider=Broken()))
    assert f.severity == "warning" and "C3" in f.message and "not connected" in f.message


# ---------------------------------------------------------------------------------------
# reports
def _review(ctx):
    fs = power_loop.run(ctx)
    return Review(ctx.board, ctx.graph, ctx.project, fs, list(ctx.assumptions),
                  ["power-loop"])


def test_json_report_lists_loops():
    """Top-level "loops" with the contract keys; the finding names its loop; the path is a
    list of [x, y, layer] starting at the capacitor's bus pad (0, 20) of the drawing."""
    rep = json.loads(json_report.render(_review(_ctx("[parts.Q2]\ncoss_pf = 100\n"))))
    (loop,) = rep["loops"]
    assert {"name", "parts", "inductance_nh", "area_mm2", "length_mm", "stacked_return_nh",
            "overshoot_v", "ringing_mhz", "path"} <= set(loop)
    assert loop["parts"] == ["C3", "Q1", "Q2"]
    assert loop["path"][0] == [0.0, 20.0, "top"]
    assert all(len(p) == 3 for p in loop["path"])
    assert loop["ringing_mhz"] > 0 and loop["area_mm2"] == pytest.approx(600.0)
    (f,) = rep["findings"]
    assert f["rule"] == "power-loop" and f["loop"] == loop["name"]


def test_json_report_has_empty_loops_without_the_rule():
    rep = json_report.report_dict(Review(half_bridge(), build_netgraph(half_bridge()),
                                         project({}), [], [], []))
    assert rep["loops"] == []


def test_text_report_shows_the_loop_table():
    text = text_report.render(_review(_ctx()))
    assert "Power loops (1)" in text and "SW_A: C3-Q1-Q2" in text
    assert "C3.1 -> Q1.2 -> Q1.3 -> Q2.2 -> Q2.3 -> C3.2" in text


# ---------------------------------------------------------------------------------------
# project-file keys
def _write(tmp_path, text):
    p = tmp_path / "layoutcheck.toml"
    p.write_text(text, encoding="utf-8")
    return p


def test_switching_parts_legs_load(tmp_path):
    proj = load_project(_write(tmp_path, VOLTS + '''
[switching]
di_dt_a_per_ns = 2.5
derating = 0.75
warn_nh = 15
[parts.Q1]
kind = "mosfet"
pins = { G = "1", D = "2", S = "3" }
vds_max_v = 600
coss_pf = 110
[parts.C3]
internal_nh = 0
[legs.A]
capacitor = "C3"
high = "Q1"
low = "Q2"
'''))
    s = proj.switching
    assert (s.di_dt(), s.derating, s.warn_nh) == (2.5, 0.75, 15.0)
    q1 = proj.parts["Q1"]
    assert (q1.kind, q1.pins, q1.vds_max_v, q1.coss_pf) == (
        "mosfet", {"G": "1", "D": "2", "S": "3"}, 600.0, 110.0)
    assert proj.parts["C3"].internal_nh == 0.0
    leg = proj.legs["A"]
    assert (leg.high, leg.low, leg.capacitor) == ("Q1", "Q2", "C3")


@pytest.mark.parametrize("body,line,needle", [
    ('[switching]\ndi_dt_a_per_ns = -1\n', 2, "di_dt_a_per_ns must be a number > 0"),
    ('[switching]\nderating = 1.5\n', 2, "0 < derating <= 1"),
    ('[switching]\ncurrent_a = 10\n', 2, "switch_time_ns is missing"),
    ('[switching]\ndi_dt_a_per_ns = 1\ncurrent_a = 5\nswitch_time_ns = 5\n', 3, "not both"),
    ('[switching]\nspeed = 3\n', 2, "unknown key(s) speed"),
    ('[parts.Q1]\nkind = "thyristor"\n', 2, "kind must be one of mosfet"),
    ('[parts.Q1]\nkind = "mosfet"\npins = { G = "1", C = "2" }\n', 3, "role 'C'"),
    ('[parts.Q1]\npins = { D = "2", S = "2" }\n', 2, "two roles"),
    ('[parts.Q1]\nvds_max_v = 0\n', 2, "vds_max_v must be a number > 0"),
    ('[parts.Q1]\ninternal_nh = -2\n', 2, "internal_nh must be a number >= 0"),
    ('[parts.Q1]\ncolour = "red"\n', 2, "unknown key(s) colour"),
    ('[legs.A]\nhigh = "Q1"\n', 1, "needs low"),
    ('[legs.A]\nhigh = "Q1"\nlow = "Q1"\n', 3, "the same part"),
])
def test_bad_keys_name_the_line(tmp_path, body, line, needle):
    """Each bad value is a ProjectFileError naming the file and the line (counted in the
    text after the voltages table)."""
    p = _write(tmp_path, VOLTS + body)
    with pytest.raises(ProjectFileError) as e:
        load_project(p)
    assert needle in e.value.message
    assert e.value.line == VOLTS.count("\n") + line and str(p) in str(e.value)
