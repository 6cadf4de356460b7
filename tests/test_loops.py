"""Part roles, leg finding and loop assembly (layoutcheck.loops).

Sources
-------
* Pin numbering of three-lead power packages (TO-220, TO-247: 1 gate, 2 drain/collector,
  3 source/emitter; D2PAK: the tab is the drain) -- common practice.
* Reference-designator class letters (Q transistor, C capacitor; IEEE 315 / ASME Y14.44)
  -- common practice.
* The commutation loop cap+ -> high D -> high S -> low D -> low S -> cap- of a half-bridge
  leg: shared power-layout notes, PL-1.
* Rectangle of round wire: F. W. Grover, *Inductance Calculations* (1946), recalled from
  memory (also in tests/test_inductance.py).
Boards are the hand-drawn ones of tests/boards.py; their loops are worked out by hand there.
"""
from __future__ import annotations

import math

import pytest
import shapely
from shapely.geometry import Polygon

from boards import StraightPaths, add_components, half_bridge, make_board, part_pad, project
from layoutcheck.errors import ProjectFileError, UsageError
from layoutcheck.loops import LoopContext, PadIndex, PadRef, evaluate_legs, part_roles
from layoutcheck.loops.assemble import assemble, plan_steps
from layoutcheck.loops.finder import find_legs, leg_loop_pads
from layoutcheck.loops.packages import find_package, normalise
from layoutcheck.netgraph import build_netgraph
from layoutcheck.physics.inductance import loop_inductance
from layoutcheck.project import project_from_data

MU0 = 4e-7 * math.pi * 1e-3      # H/mm
VOLTS = {"HV_BUS": 400, "HV_RTN": 0, "SW_A": "0..400", "*": "0..15"}


def roles_of(board, proj=None):
    g = build_netgraph(board)
    proj = proj or project(VOLTS)
    return part_roles(board, g, proj)[0]


def toml_project(text: str):
    import tomllib
    return project_from_data(tomllib.loads(text), None, text)


# ---------------------------------------------------------------------------------------
# roles
def test_roles_from_pin_names_override_numbering():
    """Pins named S, G, D on pads 1, 2, 3 (not the common numbering): the names win, no
    pin-role assumption is made (the names are facts from the files)."""
    names = {("Q1", "1"): "S", ("Q1", "2"): "G", ("Q1", "3"): "D",
             ("Q2", "1"): "SOURCE", ("Q2", "2"): "GATE", ("Q2", "3"): "DRAIN"}
    b = half_bridge(q_pins=("2", "3", "1"), names=names)
    roles = roles_of(b)
    for ref in ("Q1", "Q2"):
        r = roles[ref]
        assert r.kind == "mosfet" and r.pins == {"S": ("1",), "G": ("2",), "D": ("3",)}
        assert not [a for a in r.notes if a.topic == "pin-role"]


def test_igbt_from_collector_and_emitter_names():
    """Pins named G, C, E make an IGBT; collector plays the drain's part, emitter the
    source's, and the letters shown are C and E (common practice)."""
    names = {(q, p): n for q in ("Q1", "Q2") for p, n in (("1", "G"), ("2", "C"), ("3", "E"))}
    r = roles_of(half_bridge(names=names))["Q1"]
    assert r.kind == "igbt" and r.pad("D") == "2" and r.pad("S") == "3"
    assert (r.letter("D"), r.letter("S")) == ("C", "E")


@pytest.mark.parametrize("package,expect", [
    ("TO-247-3", "TO-247"), ("TO247", "TO-247"), ("TO-3P", "TO-247"),
    ("TO-220AB", "TO-220"), ("TO-263-2", "TO-263 (D2PAK)"), ("D2PAK", "TO-263 (D2PAK)"),
    ("TO-247-4", "TO-247-4"), ("BOX-P7.5", "film capacitor, box, radial leads"),
    ("RADIAL-D16-P7.5", "aluminium electrolytic, radial"), ("QFN-32", None), (None, None),
])
def test_package_names_match_the_table(package, expect):
    """Package names as boards write them find their entry; the four-lead outline is not
    taken for the three-lead one (their numberings differ, common practice)."""
    info = find_package(package)
    assert (info.name if info else None) == expect
    if package:
        assert normalise(package).isalnum()


def test_roles_from_package_numbering_are_assumptions():
    """TO-247 with unnamed pins: 1 G, 2 D, 3 S from the package table (common practice),
    reported as an assumption; internal inductance from the table (10 nH, from memory)."""
    b = half_bridge(packages={"Q1": "TO-247-3", "Q2": "TO-247-3"})
    r = roles_of(b)["Q1"]
    assert r.pins == {"G": ("1",), "D": ("2",), "S": ("3",)}
    texts = [a.text for a in r.notes if a.topic == "pin-role"]
    assert len(texts) == 1 and "TO-247" in texts[0] and "common practice" in texts[0]
    assert r.internal_h == pytest.approx(10e-9)


def test_d2pak_drain_is_the_tab():
    """D2PAK footprints number the drain tab 2, 4 or TAB; with pads 1, 3 and TAB the tab is
    the drain (common practice)."""
    b = make_board([part_pad("Q5", "1", 0, 0, "G"), part_pad("Q5", "3", 5, 0, "S"),
                    part_pad("Q5", "TAB", 2.5, 8, "D", size=6)])
    add_components(b, packages={"Q5": "TO-263-2"})
    r = roles_of(b)["Q5"]
    assert r.pins == {"G": ("1",), "D": ("TAB",), "S": ("3",)}


def test_four_lead_package_needs_named_pins():
    """A four-lead outline has no assumed numbering: the switch is left out of the loops
    and the assumption says to name its pins."""
    b = make_board([part_pad("Q8", str(k), 5 * k, 0, f"N{k}") for k in range(1, 5)])
    add_components(b, packages={"Q8": "TO-247-4"})
    r = roles_of(b)["Q8"]
    assert r.kind == "mosfet" and not r.has_terminals
    assert any("[parts.Q8] pins" in a.text for a in r.notes)


def test_reference_designator_fallback():
    """No names, no package: Q with pads 1..3 gets the common three-lead numbering and C is
    a capacitor, both from the class letters (common practice) and both assumptions."""
    roles = roles_of(half_bridge())
    q, c = roles["Q1"], roles["C3"]
    assert q.kind == "mosfet" and q.pins == {"G": ("1",), "D": ("2",), "S": ("3",)}
    assert {a.topic for a in q.notes} >= {"part-role", "pin-role", "package"}
    assert c.kind == "capacitor" and any(a.topic == "part-role" for a in c.notes)


def test_unknown_package_is_named_in_the_assumption():
    """A package the table does not know adds no internal inductance, and the assumption
    names it (nothing is silently taken as zero)."""
    r = roles_of(half_bridge(packages={"Q1": "QFN-32"}))["Q1"]
    assert r.internal_h == 0.0
    assert any("'QFN-32' is not in rules/packages.toml" in a.text for a in r.notes)


def test_roles_from_the_project_file():
    """[parts.Q1] kind and pins (role -> pad) win over everything; an IGBT's C/E map to
    drain/source; internal_nh overrides the package table."""
    proj = toml_project('''
[voltages]
"*" = "0..15"
[parts.Q1]
kind = "igbt"
pins = { G = "3", C = "1", E = "2" }
vds_max_v = 650
coss_pf = 100
[parts.Q2]
package = "TO-247"
internal_nh = 0
''')
    b = half_bridge(packages={"Q1": "TO-247-3"})
    roles = roles_of(b, proj)
    q1, q2 = roles["Q1"], roles["Q2"]
    assert q1.kind == "igbt" and q1.pins == {"G": ("3",), "D": ("1",), "S": ("2",)}
    assert q1.rating_v == 650 and q1.coss_f == pytest.approx(100e-12)
    assert not [a for a in q1.notes if a.topic == "pin-role"]
    assert q2.package.name == "TO-247" and q2.internal_h == 0.0


def test_project_pins_naming_a_missing_pad_is_an_error():
    """A pad the part does not have is a project-file error with the table's line."""
    text = '[voltages]\n"*" = 0\n\n[parts.Q1]\npins = { G = "1", D = "2", S = "9" }\n'
    with pytest.raises(ProjectFileError) as e:
        roles_of(half_bridge(), toml_project(text))
    assert e.value.line == 4 and "no pad '9'" in e.value.message


# ---------------------------------------------------------------------------------------
# legs
def _leg_setup(board, proj=None):
    g = build_netgraph(board)
    proj = proj or project(VOLTS)
    index = PadIndex(board, g)
    roles, _ = part_roles(board, g, proj, index)
    return g, proj, index, roles


def test_leg_found_with_its_capacitor():
    """Q1 source and Q2 drain share SW_A, Q1 drain on HV_BUS, Q2 source on HV_RTN: one leg
    named after its switch node, closed by C3 (notes PL-1)."""
    _, proj, index, roles = _leg_setup(half_bridge())
    legs, _ = find_legs(proj, roles, index)
    assert [(l.name, l.high, l.low, l.bus_net, l.node_net, l.return_net, l.capacitors)
            for l in legs] == [("SW_A", "Q1", "Q2", "HV_BUS", "SW_A", "HV_RTN", ["C3"])]
    pads = leg_loop_pads(legs[0], "C3", roles, index)
    assert [p.text() for p in pads] == ["C3.1", "Q1.2", "Q1.3", "Q2.2", "Q2.3", "C3.2"]


def test_no_leg_when_the_low_switch_is_reversed():
    """Q2 turned round (drain on HV_RTN, source on SW_A) no longer forms a leg."""
    names = {("Q2", "2"): "S", ("Q2", "3"): "D", ("Q2", "1"): "G"}
    _, proj, index, roles = _leg_setup(half_bridge(names=names))
    assert find_legs(proj, roles, index)[0] == []


def test_leg_without_capacitor_and_two_capacitors():
    """No capacitor across: the leg is found with none; a second capacitor across the bus
    is listed too (sorted)."""
    b = half_bridge(capacitor=False)
    _, proj, index, roles = _leg_setup(b)
    assert find_legs(proj, roles, index)[0][0].capacitors == []
    b = half_bridge()
    b.shapes += [part_pad("C9", "1", 10, 20, "HV_BUS"), part_pad("C9", "2", 10, 0, "HV_RTN")]
    add_components(b)
    _, proj, index, roles = _leg_setup(b)
    assert find_legs(proj, roles, index)[0][0].capacitors == ["C3", "C9"]


def test_legs_named_in_the_project_file():
    """[legs.A] replaces the search; a leg naming a missing part, a non-switch or parts
    that do not meet on one net is a project-file error at the table's line."""
    b = half_bridge()
    ok = toml_project('[voltages]\n"*" = 0\n[legs.A]\nhigh = "Q1"\nlow = "Q2"\n'
                      'capacitor = "C3"\n')
    _, _, index, roles = _leg_setup(b, ok)
    legs, notes = find_legs(ok, roles, index)
    assert [(l.name, l.capacitors, l.named) for l in legs] == [("A", ["C3"], True)]
    assert notes and notes[0].topic == "legs"
    for body, needle in (('high = "Q7"\nlow = "Q2"', "no such part"),
                         ('high = "C3"\nlow = "Q2"', "not a switch"),
                         ('high = "Q2"\nlow = "Q1"', "on one net"),
                         ('high = "Q1"\nlow = "Q2"\ncapacitor = "Q1"', "not across")):
        bad = toml_project(f'[voltages]\n"*" = 0\n\n[legs.A]\n{body}\n')
        _, _, index, roles = _leg_setup(b, bad)
        with pytest.raises(ProjectFileError) as e:
            find_legs(bad, roles, index)
        assert needle in e.value.message and e.value.line == 4


# ---------------------------------------------------------------------------------------
# pad sequences and assembly
def test_plan_steps_copper_then_part():
    """Consecutive pads on one net go through copper, pads of one part through the part,
    the last pad joins the first (the loop command's rule)."""
    b = half_bridge()
    g, _, index, _ = _leg_setup(b)
    pads = [PadRef(*t.split(".")) for t in "C3.1 Q1.2 Q1.3 Q2.2 Q2.3 C3.2".split()]
    steps = plan_steps(pads, index)
    assert [(s.kind, s.net or s.part) for s in steps] == [
        ("copper", "HV_BUS"), ("part", "Q1"), ("copper", "SW_A"), ("part", "Q2"),
        ("copper", "HV_RTN"), ("part", "C3")]
    with pytest.raises(UsageError, match=r"C3\.1 \(net HV_BUS\) and Q1\.3 \(net SW_A\)"):
        plan_steps([PadRef("C3", "1"), PadRef("Q1", "3")], index)
    with pytest.raises(UsageError, match="no part 'Q9'"):
        plan_steps([PadRef("C3", "1"), PadRef("Q9", "2")], index)


def test_assembled_loop_is_closed_and_encloses_the_rectangle():
    """With straight stand-in copper the loop runs round the 30 x 20 mm rectangle: each
    conductor starts where the previous ends, the last ends where the first starts, the
    enclosed area is 600 mm^2 and the length is the perimeter plus the six lead joins up
    to the parts (2 x (half the 35 um copper + half the 0.8 mm lead) each) -- by hand."""
    b = half_bridge()
    g, _, index, roles = _leg_setup(b)
    pads = [PadRef(*t.split(".")) for t in "C3.1 Q1.2 Q1.3 Q2.2 Q2.3 C3.2".split()]
    geo = assemble(b, g, index, plan_steps(pads, index), roles, StraightPaths())
    segs = geo.segments
    for s, t in zip(segs, segs[1:] + segs[:1]):
        assert math.dist(s.end, t.start) < 1e-9
    assert geo.area_mm2 == pytest.approx(600.0, abs=1e-9)
    lift = 0.0175 + 0.4
    assert geo.length_mm == pytest.approx(100.0 + 6 * lift, abs=1e-9)
    assert geo.parts == ["C3", "Q1", "Q2"] and geo.nets == ["HV_BUS", "SW_A", "HV_RTN"]
    # the reported path agrees with shapely's area of the same corners
    assert Polygon([(x, y) for x, y, _ in geo.path]).area == pytest.approx(600.0)


def test_loop_inductance_of_the_rectangle_matches_grover():
    """Every conductor a 0.8 mm round wire (stand-in copper and the parts' default lead):
    the 30 x 20 mm leg loop against Grover's rectangle of round wire (1946, from memory),
    L = mu0/pi [a ln(2a/r) + b ln(2b/r) - a asinh(a/b) - b asinh(b/a) + 2 sqrt(a^2+b^2)
    - 7/4 (a+b)], r = 0.4 mm.  Within 2 %: the parts lie 0.42 mm above the copper."""
    b = half_bridge()
    lc = LoopContext(b, build_netgraph(b), project(VOLTS), StraightPaths())
    res = evaluate_legs(lc)[0].loops[0]
    a, h, r = 30.0, 20.0, 0.4
    ref = MU0 / math.pi * (a * math.log(2 * a / r) + h * math.log(2 * h / r)
                           - a * math.asinh(a / h) - h * math.asinh(h / a)
                           + 2 * math.hypot(a, h) - 1.75 * (a + h))
    assert abs(res.inductance_h - ref) / ref < 0.02
    # and it is loop_inductance of the very chain plus nothing (no package known)
    assert res.inductance_h == pytest.approx(loop_inductance(res.geometry.segments), rel=1e-12)


def test_internal_inductance_adds_in_series():
    """The package table's internal inductances (TO-247 10 nH each, from memory; film box
    6 nH, from memory) add to the geometric loop exactly."""
    plain = half_bridge()
    pk = half_bridge(packages={"Q1": "TO-247", "Q2": "TO-247", "C3": "BOX-P7.5"})
    L0 = evaluate_legs(LoopContext(plain, build_netgraph(plain), project(VOLTS),
                                   StraightPaths()))[0].loops[0]
    L1 = evaluate_legs(LoopContext(pk, build_netgraph(pk), project(VOLTS),
                                   StraightPaths()))[0].loops[0]
    assert L1.geometry.internal_h == pytest.approx(26e-9)
    # the package also sets the lead size of the part pieces, so compare the geometric parts
    geo1 = loop_inductance(L1.geometry.segments)
    assert L1.inductance_h == pytest.approx(geo1 + 26e-9, rel=1e-12)
    assert L0.geometry.internal_h == 0.0


def test_real_copper_paths_follow_the_tracks():
    """With the board's own current-path module the copper runs along the track centre
    lines: the loop encloses the hand area 600 mm^2, its tracks total 30 + 8 + 30 mm, each
    2 mm wide (by hand from the drawing)."""
    b = half_bridge()
    lc = LoopContext(b, build_netgraph(b), project(VOLTS))
    res = evaluate_legs(lc)[0].loops[0]
    assert res.geometry.area_mm2 == pytest.approx(600.0, abs=1e-6)
    assert res.geometry.copper_length_mm == pytest.approx(68.0, abs=1e-6)
    assert res.geometry.copper_width_mm == pytest.approx(2.0, abs=1e-6)
    ring = shapely.LinearRing([(x, y) for x, y, _ in res.geometry.path])
    assert ring.length == pytest.approx(100.0, abs=1e-6)


def test_stacked_return_estimate_by_hand():
    """Stacked return: half the 68 mm of 2 mm track over the 1.53 mm laminate (1.6 mm board
    minus two 35 um copper layers) with Hammerstad's fringing form (notes PL-4; u = 2w/h),
    plus the parts' internal inductance (none here), worked by hand."""
    b = half_bridge()
    res = evaluate_legs(LoopContext(b, build_netgraph(b), project(VOLTS)))[0].loops[0]
    w, h = 2.0, 1.53 + 2 * 0.035 / 3
    u = 2 * w / h
    per_mm = 2 * MU0 / (u + 1.393 + 0.667 * math.log(u + 1.444))
    assert res.stacked_h == pytest.approx(per_mm * 34.0, rel=1e-9)
    assert res.stacked_h < res.inductance_h


def test_segment_chain_is_reversed_when_a_provider_returns_it_backwards():
    """A provider that returns the copper from end to start still gives a closed loop in
    the direction of the current (same inductance, same area)."""
    class Backwards(StraightPaths):
        def current_path(self, board, graph, net, start, end):
            p = super().current_path(board, graph, net, end, start)
            return p

    b = half_bridge()
    fwd = evaluate_legs(LoopContext(b, build_netgraph(b), project(VOLTS),
                                    StraightPaths()))[0].loops[0]
    bwd = evaluate_legs(LoopContext(b, build_netgraph(b), project(VOLTS),
                                    Backwards()))[0].loops[0]
    assert bwd.inductance_h == pytest.approx(fwd.inductance_h, rel=1e-12)
    assert bwd.geometry.area_mm2 == pytest.approx(600.0)
