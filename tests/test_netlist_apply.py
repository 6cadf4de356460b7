"""A netlist names plain copper; where they disagree, ``netlist-mismatch`` errors.

Sources: shared/reference/formats.md section 4.3 ("match 356 points to Gerber pads by
location, then compare with the geometric connectivity of the copper"; "317 ties a net
through all layers (plated hole); 327 sits on the access-side outer layer; 367 carries no
net") and 4.2 (access codes: A00 both sides, A01 top, A0n layer n).  Geometry is built by
hand (axis-aligned rectangles and discs) so which point lies on which copper is evident;
meeting places are compared with shapely's own intersection of the hand-built shapes.
"""
from __future__ import annotations

import pytest
import shapely

from boards import cu, disc, hole, htrack, make_board, project, rect
from layoutcheck.checks import CheckContext, netlist as netlist_rule
from layoutcheck.cli import main
from layoutcheck.errors import InputFileError, ProjectFileError
from layoutcheck.netgraph import build_netgraph
from layoutcheck.readers import read_board
from layoutcheck.readers.ipc356 import parse_ipc356
from layoutcheck.readers.netlist_apply import apply_netlist, record_layers
from layoutcheck.review import review
from layoutcheck.writers.design import Design, Pad, Part, Track
from layoutcheck.writers.drill import write_drill
from layoutcheck.writers.gerber import write_gerbers


def rec(code, net, ref, pin, x_mm, y_mm, access=0, hole_mm=None, plated=True) -> str:
    """One record in the fixed columns of the format notes 4.2 (CUST 1: 0.001 mm)."""
    drill = f"D{round(hole_mm * 1000):04d}{'P' if plated else 'U'}" if hole_mm else " " * 6
    dash = "-" if ref or pin else " "
    x, y = round(x_mm * 1000), round(y_mm * 1000)
    return (f"{code}{net:<14}   {ref:<6}{dash}{pin:<4} {drill}A{access:02d}"
            f"X{'-' if x < 0 else '+'}{abs(x):06d}Y{'-' if y < 0 else '+'}{abs(y):06d}")


def ipc(*records: str) -> str:
    return "C  test\nP  UNITS CUST 1\nP  IMAGE PRIMARY\n" + "\n".join(records) + "\n999\n"


def findings(board):
    ctx = CheckContext(board, build_netgraph(board), project())
    return netlist_rule.run(ctx)


def two_pads_and_track(joined: bool):
    """Two round pads (flashes) on top at (0, 0) and (10, 0), d = 2; a 0.5 mm track from
    x = 0.9 to 9.1 (overlapping both pads) when ``joined``, else from 0.9 to 4."""
    shapes = [cu(disc(0, 0, 2), kind="flash"), cu(disc(10, 0, 2), kind="flash"),
              cu(htrack(0.9, 9.1 if joined else 4.0, 0, 0.5), kind="draw")]
    return make_board(shapes, has_net_names=False)


def test_names_copper_and_pins_from_points():
    """Each conductor a point lands on gets the point's net; the pad (the flash under the
    point, not the track) gets the reference and pin; the board then carries names."""
    b = two_pads_and_track(joined=False)
    nl = parse_ipc356(ipc(rec("327", "A", "R1", "1", 0, 0, 1),
                          rec("327", "B", "R1", "2", 10, 0, 1)), "t.ipc")
    assert apply_netlist(b, nl) == []
    assert [s.net for s in b.shapes] == ["A", "B", "A"]
    assert (b.shapes[0].component, b.shapes[0].pin) == ("R1", "1")
    assert b.shapes[2].pin is None and b.shapes[2].component is None
    assert b.has_net_names and sorted(b.components["R1"].pins) == ["1", "2"]
    assert sorted(build_netgraph(b).nets) == ["A", "B"]
    assert findings(b) == []


def test_copper_joining_two_nets_is_one_error_located_where_they_meet():
    """The track joins the pads of A and B: one error naming both nets, located on the
    copper where B's pad and the track (reached from A's pad) meet: the lens
    track & pad(10, 0) computed by shapely.  The joined copper is checked as A."""
    b = two_pads_and_track(joined=True)
    nl = parse_ipc356(ipc(rec("327", "A", "R1", "1", 0, 0, 1),
                          rec("327", "B", "R2", "1", 10, 0, 1)), "t.ipc")
    apply_netlist(b, nl)
    fs = findings(b)
    assert len(fs) == 1
    f = fs[0]
    assert (f.rule, f.severity, f.nets, f.layer) == ("netlist-mismatch", "error",
                                                      ["A", "B"], "top")
    meet = shapely.intersection(htrack(0.9, 9.1, 0, 0.5), disc(10, 0, 2))
    assert shapely.distance(shapely.Point(f.where), meet) < 1e-9
    assert f.extra["kind"] == "joined" and f.extra["lines"] == [4, 5]
    assert {s.net for s in b.shapes} == {"A"}


def test_net_split_in_copper_locates_every_piece():
    """Net A's two points land on unconnected copper: one error listing both pieces (the
    larger piece, pad + track, first), located on the second piece."""
    b = two_pads_and_track(joined=False)
    nl = parse_ipc356(ipc(rec("327", "A", "R1", "1", 0, 0, 1),
                          rec("327", "A", "R2", "1", 10, 0, 1)), "t.ipc")
    apply_netlist(b, nl)
    fs = findings(b)
    assert len(fs) == 1 and fs[0].extra["kind"] == "split" and fs[0].nets == ["A"]
    pieces = fs[0].extra["pieces"]
    assert [p["where"] for p in pieces] == [[0.0, 0.0], [10.0, 0.0]]
    assert fs[0].where == (10.0, 0.0) and [p["line"] for p in pieces] == [4, 5]


def test_record_on_no_copper_is_an_error_naming_its_line():
    """A point on no copper of its access side: an error naming the netlist line (here
    line 5), located at the point.  A02 on a 2-layer board is the bottom side, where
    there is no copper although the top has a pad there."""
    b = two_pads_and_track(joined=False)
    nl = parse_ipc356(ipc(rec("327", "A", "R1", "1", 0, 0, 1),
                          rec("327", "B", "R1", "2", 10, 0, 2)), "t.ipc")
    apply_netlist(b, nl)
    fs = findings(b)
    assert len(fs) == 1
    f = fs[0]
    assert f.extra["kind"] == "no-copper" and f.extra["lines"] == [5]
    assert "t.ipc line 5" in f.message and f.where == (10.0, 0.0) and f.layer == "bottom"
    assert f.severity == "error"


def test_netlist_on_no_copper_at_all_is_an_input_error():
    """Not one point on copper: not this board's netlist (or wrong units) -> exit 2 error
    naming the first record's line."""
    b = two_pads_and_track(joined=False)
    nl = parse_ipc356(ipc(rec("327", "A", "R1", "1", 50, 50, 1),
                          rec("327", "B", "R1", "2", 60, 50, 1)), "t.ipc")
    with pytest.raises(InputFileError) as e:
        apply_netlist(b, nl)
    assert e.value.line == 4 and e.value.file == "t.ipc"


@pytest.mark.parametrize("code,access,layers,want", [
    ("327", 1, ["top", "bottom"], ["top"]),
    ("327", 2, ["top", "bottom"], ["bottom"]),
    ("327", 8, ["top", "in1", "in2", "bottom"], ["bottom"]),
    ("327", 2, ["top", "in1", "in2", "bottom"], ["in1"]),
    ("327", 0, ["top", "in1", "bottom"], ["top", "bottom"]),
    ("317", 1, ["top", "in1", "bottom"], ["top", "in1", "bottom"]),
    ("367", 0, ["top", "bottom"], []),
])
def test_access_codes(code, access, layers, want):
    """Format notes 4.2/4.3: A00 both sides, A01 top, A0n layer n (the bottom on boards
    with fewer layers); 317 reaches every layer; 367 names nothing."""
    r = parse_ipc356(ipc(rec(code, "N", "X1", "1", 1, 1, access, 0.8)), "a.ipc").records[0]
    assert record_layers(r, layers) == want


def test_through_hole_point_names_both_layers_and_checks_the_hole():
    """A 317 point names the copper on every layer (here a top pad and a bottom pour
    joined by the plated hole); the pour is not marked as the pin.  A 317 with a plated
    hole where the drill files have none is an error naming its line."""
    shapes = [cu(disc(5, 5, 2), "top", kind="flash"), cu(rect(0, 0, 20, 10), "bottom"),
              cu(disc(15, 5, 2), "top", kind="flash")]
    b = make_board(shapes, [hole(5, 5, 1.0)], has_net_names=False)
    nl = parse_ipc356(ipc(rec("317", "GND", "J1", "1", 5, 5, 0, 1.0),
                          rec("317", "SIG", "J1", "2", 15, 5, 0, 1.0)), "h.ipc")
    apply_netlist(b, nl)
    assert [s.net for s in b.shapes] == ["GND", "GND", "SIG"]
    assert b.shapes[1].pin is None and b.shapes[0].pin == "1"
    fs = findings(b)
    kinds = sorted(f.extra["kind"] for f in fs)
    # J1-2: no hole at (15, 5); and the bottom pour under it is GND's copper, so SIG's
    # point joins SIG (top pad) and GND (bottom pour) -> the bottom pour carries both.
    assert "no-hole" in kinds
    nohole = next(f for f in fs if f.extra["kind"] == "no-hole")
    assert nohole.extra["lines"] == [5] and nohole.where == (15.0, 5.0)
    assert "joined" in kinds


def test_single_point_net_joined_to_a_net_is_reported():
    """N/C marks a single-point net (format notes 4.1); copper joining it to a named net is
    a mismatch; alone it stays an N/C conductor."""
    b = two_pads_and_track(joined=True)
    nl = parse_ipc356(ipc(rec("327", "N/C", "R1", "1", 0, 0, 1),
                          rec("327", "B", "R2", "1", 10, 0, 1)), "nc.ipc")
    apply_netlist(b, nl)
    fs = findings(b)
    assert len(fs) == 1 and fs[0].extra["kind"] == "joined" and fs[0].nets == ["B"]
    assert "N/C" in fs[0].message
    b2 = two_pads_and_track(joined=False)
    apply_netlist(b2, parse_ipc356(ipc(rec("327", "N/C", "R1", "1", 0, 0, 1),
                                       rec("327", "B", "R2", "1", 10, 0, 1)), "nc.ipc"))
    assert findings(b2) == [] and "N/C-1" in build_netgraph(b2).nets


def test_board_with_its_own_names_is_only_checked():
    """When the board files already name the copper (X2, IPC-2581), the netlist renames
    nothing and a different name under a point is a mismatch."""
    shapes = [cu(disc(0, 0, 2), net="A", kind="flash"), cu(disc(10, 0, 2), net="B",
                                                           kind="flash")]
    b = make_board(shapes, has_net_names=True)
    apply_netlist(b, parse_ipc356(ipc(rec("327", "A", "R1", "1", 0, 0, 1),
                                      rec("327", "C", "R1", "2", 10, 0, 1)), "n.ipc"))
    fs = findings(b)
    assert [s.net for s in b.shapes] == ["A", "B"]
    assert len(fs) == 1 and fs[0].extra["kind"] == "name-differs"
    assert fs[0].nets == ["B", "C"] and fs[0].extra["lines"] == [5]


# ------------------------------------------------------------------ reading folders
def plain_folder(tmp_path, *, joined: bool):
    """Plain Gerber (no X2 attributes) + NC drill of two pads joined (or not) by a track,
    written by the package's writers; the netlist comes separately."""
    d = Design(name="t", outline=[(0, 0), (20, 0), (20, 10), (0, 10)],
               parts=[Part("R1", "resistor", pins={"1": "", "2": ""})],
               pads=[Pad("R1", "1", None, 5, 5, "circle", 2.0, layers="all", drill=0.8),
                     Pad("R1", "2", None, 15, 5, "circle", 2.0, layers="all", drill=0.8)],
               tracks=[Track(None, "top", 0.5, [(5, 5), (15, 5) if joined else (8, 5)])])
    folder = tmp_path / "board"
    write_gerbers(d, folder, x2=False)
    write_drill(d, folder)
    return folder


def two_nets() -> str:
    return ipc(rec("317", "HV", "R1", "1", 5, 5, 0, 0.8), rec("317", "LV", "R1", "2", 15, 5,
                                                             0, 0.8))


def test_folder_picks_up_its_one_netlist_and_says_so(tmp_path):
    """A single IPC-D-356 file in the folder is used (and said so); it is not passed to
    the Gerber reader as an unrecognised file."""
    folder = plain_folder(tmp_path, joined=False)
    (folder / "t.ipc").write_text(two_nets())
    r = review(folder)
    assert sorted(r.graph.nets) == ["HV", "LV"]
    text = " ".join(a.text for a in r.assumptions)
    assert "t.ipc: read as the board's IPC-D-356 netlist" in text
    assert "not recognised" not in text
    assert not [f for f in r.findings if f.rule == "netlist-mismatch"]


def test_joined_nets_are_never_a_clean_report(tmp_path, capsys):
    """Copper joining the netlist's HV and LV: an error finding, exit code 1."""
    folder = plain_folder(tmp_path, joined=True)
    (folder / "t.ipc").write_text(two_nets())
    r = review(folder)
    bad = [f for f in r.findings if f.rule == "netlist-mismatch"]
    assert len(bad) == 1 and bad[0].nets == ["HV", "LV"] and r.errors >= 1
    assert main(["review", str(folder)]) == 1
    capsys.readouterr()


def test_project_key_chooses_the_netlist(tmp_path):
    """[board] netlist names the file; another netlist beside it is not read (noted).
    Two netlists and no key is an input error; a key naming a missing file is a project
    file error; a netlist given alone has no copper (input error)."""
    folder = plain_folder(tmp_path, joined=False)
    (folder / "a.ipc").write_text(two_nets())
    (folder / "b.ipc").write_text(two_nets().replace("HV", "XX"))
    with pytest.raises(InputFileError) as e:
        review(folder)
    assert "several IPC-D-356" in e.value.message
    (folder / "layoutcheck.toml").write_text('[board]\nnetlist = "b.ipc"\n')
    r = review(folder)
    assert sorted(r.graph.nets) == ["LV", "XX"]
    assert any("a.ipc" in a.text and "not read" in a.text for a in r.assumptions)
    (folder / "layoutcheck.toml").write_text('[board]\nnetlist = "c.ipc"\n')
    with pytest.raises(ProjectFileError):
        review(folder)
    with pytest.raises(InputFileError) as e:
        read_board(folder / "a.ipc", project())
    assert "no copper" in e.value.message


def test_zip_with_project_file_naming_its_netlist(tmp_path):
    """In a zip the project file's [board] netlist names a member (nothing on disk):
    that member is read as the netlist and kept out of the Gerber set."""
    import zipfile

    folder = plain_folder(tmp_path, joined=False)
    (folder / "nets.txt").write_text(two_nets())
    (folder / "other.ipc").write_text(two_nets().replace("HV", "XX"))
    (folder / "layoutcheck.toml").write_text('[board]\nnetlist = "nets.txt"\n')
    z = tmp_path / "board.zip"
    with zipfile.ZipFile(z, "w") as zf:
        for p in sorted(folder.iterdir()):
            zf.write(p, p.name)
    r = review(z)
    assert sorted(r.graph.nets) == ["HV", "LV"]
    assert not any("nets.txt" in a.text and "not recognised" in a.text
                   for a in r.assumptions)
    assert any("other.ipc" in a.text and "not read" in a.text for a in r.assumptions)
