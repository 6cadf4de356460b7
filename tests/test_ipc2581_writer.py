"""IPC-2581 writer and round trips through the reader.

Sources
- Ground truth for geometry is the design itself: :meth:`Design.copper` builds every pad,
  track and zone with shapely directly from the design numbers (independent of any file
  format); after writing and reading back, copper per (layer, net) must lie within 1 um
  (Hausdorff distance, shapely) of it in millimetres, inches and microns (1 in = 25.4 mm,
  1 um = 0.001 mm by definition).
- Document structure: IPC-2581 B/C element names as summarised in the shared format notes
  section 3 (from memory, [M]); "definitions come before their first reference" is the
  revision C ordering rule the notes mark [S].
- The full-bridge sample boards: reviewing the IPC-2581 file must give the same copper
  findings as reviewing the same design's Gerber X2 + NC drill files (an independent
  reader).
"""
from __future__ import annotations

import sys
from pathlib import Path

import pytest
import shapely
from lxml import etree

from layoutcheck.errors import UsageError
from layoutcheck.project import load_project
from layoutcheck.readers import read_board
from layoutcheck.review import review
from layoutcheck.writers.design import (Design, NonPlatedHole, Pad, Part, Slot, Track, Via,
                                        Zone, hole_polygon, slot_polygon)
from layoutcheck.writers.drill import write_drill
from layoutcheck.writers.gerber import write_gerbers
from layoutcheck.writers.ipc2581 import ipc2581_text, write_ipc2581

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "sample_boards"))
import fullbridge  # noqa: E402

NS = "{http://webstds.ipc.org/2581}"


def design() -> Design:
    """Four copper layers; every pad shape, rotations (30 and 90 degrees), a bottom part,
    through-hole and SMD pads, a free pad, tracks, a zone with two cut-outs, a via, a
    mounting hole, a plated and a non-plated slot, and BOM properties (mm)."""
    parts = [Part("Q1", "mosfet", "650 V 40 A", "TO-247-3", {"1": "G", "2": "D", "3": "S"},
                  (15.45, 10.0), properties={"vds_max_v": 650, "coss_pf": 120.0}),
             Part("C1", "capacitor", "100 nF 630 V", "1206", {"1": "", "2": ""}, (30.0, 20.0),
                  30.0, properties={"capacitance_f": 1e-7, "rating_v": 630}),
             Part("R1", "resistor", "4.7 Ohm", "0805", {"1": "", "2": ""}, (12.0, 30.0), 90.0,
                  side="bottom", properties={"resistance_ohm": 4.7, "tolerance": "1 %"})]
    pads = [Pad("Q1", "1", "G", 10.0, 10.0, "oval", 2.4, 3.2, "all", 1.4),
            Pad("Q1", "2", "BUS", 15.45, 10.0, "circle", 2.4, None, "all", 1.4),
            Pad("Q1", "3", "SW", 20.9, 10.0, "rect", 2.4, 2.4, "all", 1.4),
            Pad("C1", "1", "BUS", 29.0, 19.4, "roundrect", 1.0, 1.6, "top", rotation=30,
                corner_radius=0.25),
            Pad("C1", "2", "SW", 31.0, 20.6, "roundrect", 1.0, 1.6, "top", rotation=30),
            Pad("R1", "1", "G", 12.0, 29.0, "rect", 0.9, 1.0, "bottom", rotation=90),
            Pad("R1", "2", "DRV", 12.0, 31.0, "oval", 0.8, 1.1, "bottom", rotation=90),
            Pad("", "TP", "SW", 40.0, 5.0, "circle", 1.0)]
    return Design(
        "rt", [(0, 0), (50, 0), (50, 40), (0, 40)], copper_layers=4, thickness_mm=1.2,
        copper_um=70.0, parts=parts, pads=pads,
        tracks=[Track("G", "top", 0.5, [(10.0, 10.0), (10.0, 20.0), (12.5, 22.5)]),
                Track("SW", "in2", 1.0, [(20.9, 10.0), (31.0, 20.6)]),
                Track("DRV", "bottom", 0.3, [(12.0, 31.0), (20.0, 31.0)])],
        zones=[Zone("BUS", "in1", [(2, 2), (48, 2), (48, 38), (2, 38)],
                    [[(8, 8), (12, 8), (12, 12), (8, 12)],
                     [(18.5, 7), (23.3, 7), (23.3, 13), (18.5, 13)]])],
        vias=[Via("SW", 25.0, 15.0, 0.8, 0.4)],
        holes=[NonPlatedHole(3.0, 37.0, 3.2)],
        slots=[Slot([(20.0, 35.0), (30.0, 35.0)], 1.0),
               Slot([(40.0, 30.0), (40.0, 34.0)], 1.2, plated=True, net="SW")])


def by_layer_net(pieces):
    out: dict = {}
    for layer, net, g in pieces:
        out.setdefault((layer, net), []).append(g)
    return {k: shapely.union_all(v) for k, v in out.items()}


@pytest.mark.parametrize("units,revision", [("MILLIMETER", "C"), ("INCH", "C"),
                                            ("MICRON", "C"), ("MILLIMETER", "B")])
def test_round_trip_copper_within_1um(tmp_path, units, revision):
    """Copper per (layer, net) read back equals Design.copper() within 1 um (Hausdorff
    distance) and 1e-4 mm^2 of area, in every unit and both revisions."""
    d = design()
    p = write_ipc2581(d, tmp_path / "rt.xml", revision=revision, units=units)
    b = read_board(p, load_project(None))
    want = by_layer_net((c.layer, c.net, c.geometry) for c in d.copper())
    got = by_layer_net((s.layer, s.net, s.geometry) for s in b.shapes)
    assert sorted(got) == sorted(want)
    for k in want:
        assert shapely.hausdorff_distance(want[k], got[k]) < 0.001, k
        assert abs(want[k].area - got[k].area) < 1e-4, k
    assert b.copper_layers == ["top", "in1", "in2", "bottom"]
    assert shapely.hausdorff_distance(b.outline, d.outline_polygon()) < 1e-6


def test_round_trip_pads_pins_components(tmp_path):
    """Pads keep their part, pin and a termination function; parts keep package, side,
    position, rotation and pin names; free pads have no component."""
    d = design()
    b = read_board(write_ipc2581(d, tmp_path / "rt.xml"), load_project(None))
    pads = {(s.component, s.pin, s.layer): s.function for s in b.shapes if s.kind == "flash"
            and s.function != "ViaPad"}
    want = {(p.ref or None, p.pin if p.ref else None, layer):
            ("ComponentPad" if p.drill else "SMDPad")
            for p in d.pads for layer in d.pad_layers(p)}
    assert pads == want
    assert {s.net for s in b.shapes if s.function == "ViaPad"} == {"SW"}
    q1, r1 = b.components["Q1"], b.components["R1"]
    assert q1.package == "TO-247-3" and q1.position == pytest.approx((15.45, 10.0))
    assert {n: p.name for n, p in q1.pins.items()} == {"1": "G", "2": "D", "3": "S"}
    assert {s.pin: s.pin_name for s in b.shapes if s.component == "Q1"} == \
        {"1": "G", "2": "D", "3": "S"}
    assert {n: p.net for n, p in q1.pins.items()} == {"1": "G", "2": "BUS", "3": "SW"}
    assert q1.pins["2"].position == pytest.approx((15.45, 10.0))
    assert (r1.side, r1.rotation) == ("bottom", 90.0)
    assert b.components["C1"].rotation == 30.0
    assert sorted(b.components) == ["C1", "Q1", "R1"]


def test_round_trip_holes_and_slots(tmp_path):
    """Holes: through-hole pads plated (ComponentDrill), via plated (ViaDrill) with its net,
    mounting hole non-plated; slots keep width, plating and footprint (shapely buffer of
    the centre line, design.slot_polygon); all span top..bottom."""
    d = design()
    b = read_board(write_ipc2581(d, tmp_path / "rt.xml", units="INCH"), load_project(None))
    got = sorted((round(h.centre[0], 4), round(h.centre[1], 4), round(h.diameter, 6), h.plated,
                  h.is_slot, h.net, h.function) for h in b.holes)
    want = sorted([(p.x, p.y, p.drill, True, False, p.net, "ComponentDrill")
                   for p in d.pads if p.drill] +
                  [(25.0, 15.0, 0.4, True, False, "SW", "ViaDrill"),
                   (3.0, 37.0, 3.2, False, False, None, "MechanicalDrill"),
                   (25.0, 35.0, 1.0, False, True, None, "MechanicalDrill"),
                   (40.0, 32.0, 1.2, True, True, "SW", "ComponentDrill")])
    assert got == want
    assert {h.span for h in b.holes} == {("top", "bottom")}
    slot = next(h for h in b.holes if h.is_slot and h.plated)
    assert shapely.hausdorff_distance(slot.geometry, slot_polygon(d.slots[1])) < 0.001
    mh = next(h for h in b.holes if h.diameter == pytest.approx(3.2))
    assert shapely.hausdorff_distance(mh.geometry, hole_polygon(3.0, 37.0, 3.2)) < 0.001


def test_round_trip_stackup_and_bom(tmp_path):
    """Stackup: 4 x 70 um copper, the rest of 1.2 mm split into three dielectrics
    ((1.2 - 0.28) / 3 mm each); BOM numeric properties come back as numbers, text as text,
    kind and value as characteristics."""
    d = design()
    b = read_board(write_ipc2581(d, tmp_path / "rt.xml", units="MICRON"), load_project(None))
    st = b.stackup
    assert st.basis == "file" and st.thickness_mm == pytest.approx(1.2)
    assert st.copper_mm == pytest.approx({n: 0.07 for n in ("top", "in1", "in2", "bottom")})
    # written to 1 nm (3 decimals of a micron)
    assert st.dielectric_mm == pytest.approx({n: (1.2 - 0.28) / 3 for n in ("top", "in1", "in2")},
                                             abs=1e-6)
    q1, c1, r1 = (b.components[r].properties for r in ("Q1", "C1", "R1"))
    assert q1["vds_max_v"] == 650.0 and q1["coss_pf"] == 120.0 and q1["kind"] == "mosfet"
    assert c1["capacitance_f"] == pytest.approx(1e-7) and c1["rating_v"] == 630.0
    assert r1["resistance_ohm"] == 4.7 and r1["tolerance"] == "1 %"
    assert b.components["C1"].value == "100 nF 630 V"


def test_output_is_deterministic_and_well_formed(tmp_path):
    """Same design, same text; the document parses, has the IPC-2581 root in its namespace
    and revision, and every dictionary id is defined before its first use (revision C
    ordering, notes 3.3 [S])."""
    d = design()
    t1, t2 = ipc2581_text(d), ipc2581_text(design())
    assert t1 == t2
    root = etree.fromstring(t1.encode())
    assert root.tag == NS + "IPC-2581" and root.get("revision") == "C"
    defined: set = set()
    for el in root.iter():
        if el.tag in (NS + "EntryStandard", NS + "EntryLineDesc"):
            defined.add(el.get("id"))
        elif el.tag in (NS + "StandardPrimitiveRef", NS + "LineDescRef"):
            assert el.get("id") in defined
    layers = {el.get("name"): el.get("layerFunction") for el in root.iter(NS + "Layer")}
    assert [n for n, f in layers.items() if f == "CONDUCTOR"] == ["TOP", "IN1", "IN2", "BOTTOM"]
    span = next(root.iter(NS + "Span"))
    assert (span.get("fromLayer"), span.get("toLayer")) == ("TOP", "BOTTOM")
    assert ipc2581_text(d, revision="B").startswith(t1.split("\n")[0])
    assert 'revision="B"' in ipc2581_text(d, revision="B")


@pytest.mark.parametrize("kw", [{"units": "MILS"}, {"revision": "A"}])
def test_bad_options_are_usage_errors(kw):
    """Units and revision are checked against their lists (the error lists them)."""
    with pytest.raises(UsageError) as e:
        ipc2581_text(design(), **kw)
    assert "MILLIMETER" in str(e.value) or "'B'" in str(e.value)


#: Rules that look at copper, holes and nets only.  (The power-loop rule also uses the
#: package names and pin names, which IPC-2581 carries and Gerber X2 does not.)
GEOMETRY_RULES = ("clearance", "creepage", "net-short", "net-split", "connectivity",
                  "floating")


@pytest.mark.parametrize("rev", ["a", "b"])
def test_sample_board_findings_match_gerber(tmp_path, rev):
    """The full-bridge sample design written both as IPC-2581 and as Gerber X2 + NC drill
    (an independent reader) and reviewed with the sample's project file gives the same
    copper findings (rule, severity, layer, nets, measured and required distances to
    1 um)."""
    d = fullbridge.build(rev)
    gerber_dir = tmp_path / "gerber"
    write_gerbers(d, gerber_dir)
    write_drill(d, gerber_dir)
    project = gerber_dir / "layoutcheck.toml"
    project.write_text(fullbridge.PROJECT_TEXT, encoding="utf-8")
    xml = write_ipc2581(d, tmp_path / f"fb-{rev}.xml")
    gerber = review(gerber_dir)
    ipc = review(xml, project)

    def keys(findings):
        return sorted(((f.rule, f.severity, f.layer, tuple(f.nets),
                        None if f.measured_mm is None else round(f.measured_mm, 3),
                        None if f.required_mm is None else round(f.required_mm, 3))
                       for f in findings if f.rule.startswith(GEOMETRY_RULES)), key=str)
    assert keys(ipc.findings) == keys(gerber.findings)
    assert len(keys(gerber.findings)) > 0 or rev == "b"
    assert ipc.board.stackup.basis == "file"
    for layer in d.layer_names:
        a, b = (shapely.union_all([s.geometry for s in r.board.shapes if s.layer == layer])
                for r in (ipc, gerber))
        assert shapely.hausdorff_distance(a, b) < 0.001


def test_cli_review_reads_an_ipc2581_file(tmp_path, capsys):
    """``layoutcheck review board.xml``: read_board sniffs the IPC-2581 root element and the
    review runs on it (JSON report names the board and its four copper layers)."""
    import json

    from layoutcheck.cli import main
    p = write_ipc2581(design(), tmp_path / "board.xml")
    rc = main(["review", str(p), "--format", "json"])
    out, err = capsys.readouterr()
    assert rc in (0, 1), err
    rep = json.loads(out)
    assert rep["board"]["name"] == "board"
    copper = [layer["name"] for layer in rep["board"]["layers"] if layer["kind"] == "copper"]
    assert copper == ["top", "in1", "in2", "bottom"]
