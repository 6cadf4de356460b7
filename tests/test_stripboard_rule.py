"""Stripboard rule: strip-spacing, strip-cut, pin-on-other-net, link-bridges-cut.

Required spacings come from the requirement function (IPC-2221B Table 6-1 via
``ipc2221b_spacing``), never typed in; gaps are worked out by hand from pitch 2.54 mm and
strip width 2.0 mm (common practice).
"""
from pathlib import Path

import pytest

from layoutcheck.physics.spacing import ipc2221b_column, ipc2221b_spacing
from layoutcheck.review import review

HEAD = ('[stripboard]\nholes = [10, 6]\npitch_mm = 2.54\nstrips = "rows"\n'
        'strip_width_mm = 2.0\n')
VOLTS = '[voltages]\nHV = 340\nLV = 12\n'


def _rev(tmp_path: Path, body: str):
    p = tmp_path / "p.toml"
    p.write_text(HEAD + body, encoding="utf-8")
    return review(p)


def _need(volts):
    col, _ = ipc2221b_column(True, "none", 0.0, False)
    return ipc2221b_spacing(volts, col).mm


def test_hv_beside_lv_is_error_with_gap(tmp_path):
    """340 V strip A beside 12 V strip B: gap 2.54 - 2.0 = 0.54 mm (by hand)."""
    r = _rev(tmp_path, '[labels]\nHV = "A1"\nLV = "B1"\n' + VOLTS)
    f = [x for x in r.findings if x.rule == "strip-spacing"]
    assert len(f) == 1 and f[0].severity == "error"
    assert f[0].measured_mm == pytest.approx(0.54)
    assert f[0].required_mm == pytest.approx(_need(328))
    assert f[0].extra["strips"] == ["A", "B"]


def test_removed_strip_clears_it(tmp_path):
    """With strip B cut away between A (340 V) and C (12 V) the gap is 2 * 2.54 - 2.0 =
    3.08 mm, above the IPC-2221B requirement: no finding."""
    assert 2 * 2.54 - 2.0 > _need(328)
    r = _rev(tmp_path, 'removed_strips = ["B"]\n[labels]\nHV = "A1"\nLV = "C1"\n' + VOLTS)
    assert not [x for x in r.findings if x.rule in ("strip-spacing", "clearance")]


def test_floating_strip_between_does_not_help(tmp_path):
    """An unused strip left in place bridges the gap: 2 * (2.54 - 2.0) = 1.08 mm
    (power-layout notes CU-2: floating copper bridges the path, from memory)."""
    r = _rev(tmp_path, '[labels]\nHV = "A1"\nLV = "C1"\n' + VOLTS)
    f = [x for x in r.findings if x.rule == "strip-spacing"]
    assert len(f) == 1 and f[0].measured_mm == pytest.approx(1.08)


def test_cut_and_pins_and_links(tmp_path):
    """A narrow cutter, a part shorted by its strip, a link across a cut."""
    r = _rev(tmp_path, 'cutter_mm = 1.5\ncuts = ["D5", "F5"]\n'
                       '[[part]]\nref = "R1"\npins = { "1" = "A2", "2" = "A6" }\n'
                       '[[link]]\nfrom = "F2"\nto = "F8"\n')
    rules = sorted(x.rule for x in r.findings if x.rule in
                   ("strip-cut", "pin-on-other-net", "link-bridges-cut"))
    # D5 and F5 both fail to separate with a 1.5 mm cutter on a 2.0 mm strip
    assert rules == ["pin-on-other-net", "strip-cut", "strip-cut"]
    r2 = _rev(tmp_path, 'cuts = ["F5"]\n[[link]]\nfrom = "F2"\nto = "F8"\n')
    assert [x.rule for x in r2.findings if x.rule == "link-bridges-cut"] == \
        ["link-bridges-cut"]


def test_rule_not_for_fab_boards():
    """The rule applies only to plan boards."""
    from layoutcheck.checks import CheckContext
    from layoutcheck.checks.stripboard import applies
    from layoutcheck.model import Board
    from layoutcheck.project import Project
    assert applies(CheckContext(Board("x"), None, Project())) is not None
