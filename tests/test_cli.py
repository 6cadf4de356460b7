"""The command line, in-process: exit codes, JSON contract, atomic --out, bad input -> 2.

Sources: the issue's CLI and JSON contract (layoutcheck-report/1); Gerber Layer Format
Specification rev. 2024.05 for what makes the corrupted files invalid (M02 ends a file, an
aperture must be defined before use, FS precedes coordinates, macro primitive codes).
"""
import json
import shutil
import zipfile
from pathlib import Path

import pytest

from layoutcheck.cli import main

SAMPLES = Path(__file__).resolve().parent.parent / "sample_boards"
REV_A = SAMPLES / "fullbridge-rev-a"
REV_B = SAMPLES / "fullbridge-rev-b"


def run(argv, capsys):
    rc = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return rc, out, err


def copper_top(folder: Path) -> Path:
    return next(folder.glob("*copper-top.gbr"))


def test_review_rev_a_exit_1_and_json_contract(capsys):
    rc, out, _ = run(["review", REV_A, "--format", "json"], capsys)
    assert rc == 1
    rep = json.loads(out)
    assert rep["schema"] == "layoutcheck-report/1"
    assert set(rep["board"]) >= {"name", "layers", "nets", "components", "size_mm"}
    assert all(set(l) >= {"name", "kind", "side"} for l in rep["board"]["layers"])
    assert {"top", "bottom"} <= {l["name"] for l in rep["board"]["layers"]}
    assert rep["board"]["size_mm"] == [120.0, 90.0]
    assert all(set(a) == {"topic", "text"} for a in rep["assumptions"])
    keys = {"rule", "severity", "layer", "nets", "measured_mm", "required_mm", "voltage_v",
            "basis", "where", "to", "message"}
    assert rep["findings"] and all(keys <= set(f) for f in rep["findings"])
    for f in rep["findings"]:
        assert f["nets"] == sorted(f["nets"])
        assert set(f["where"]) == {"x_mm", "y_mm"}
    s = rep["summary"]
    assert s["errors"] == sum(f["severity"] == "error" for f in rep["findings"]) > 0
    assert "CAUTION" in rep["caution"]


def test_review_rev_b_exit_0(capsys):
    rc, out, _ = run(["review", REV_B], capsys)
    assert rc == 0, out
    assert "CAUTION" in out and "Assumptions" in out


def test_same_input_same_bytes(capsys):
    _, a, _ = run(["review", REV_A, "--format", "json"], capsys)
    _, b, _ = run(["review", REV_A, "--format", "json"], capsys)
    assert a == b


def test_project_file_as_path_and_zip_give_same_findings(tmp_path, capsys):
    _, base, _ = run(["review", REV_A, "--format", "json"], capsys)
    _, via_project, _ = run(["review", REV_A / "layoutcheck.toml", "--format", "json"], capsys)
    z = tmp_path / "rev-a.zip"
    with zipfile.ZipFile(z, "w") as zf:
        for p in sorted(REV_A.iterdir()):
            zf.write(p, p.name)
    _, via_zip, _ = run(["review", z, "--format", "json"], capsys)
    f = lambda t: json.loads(t)["findings"]  # noqa: E731
    assert f(base) == f(via_project) == f(via_zip)


def test_out_file_written_atomically(tmp_path, capsys):
    out = tmp_path / "r.json"
    rc, stdout, _ = run(["review", REV_A, "--format", "json", "--out", out], capsys)
    assert rc == 1 and stdout == ""
    assert json.loads(out.read_text())["schema"] == "layoutcheck-report/1"
    assert [p.name for p in tmp_path.iterdir()] == ["r.json"]


def corrupt(tmp_path: Path, edit) -> Path:
    d = tmp_path / "board"
    shutil.copytree(REV_A, d)
    p = copper_top(d)
    p.write_text(edit(p.read_text()))
    return d


@pytest.mark.parametrize("name,edit,needle", [
    ("truncated", lambda t: t[: len(t) // 2], "M02"),
    ("unknown aperture", lambda t: t.replace("D10*", "D999*", 1), "D999"),
    ("coordinates before FS", lambda t: t.replace("%FSLAX46Y46*%", "X0Y0D02*\n%FSLAX46Y46*%", 1),
     "FS"),
    ("bad macro", lambda t: t.replace("%FSLAX46Y46*%", "%FSLAX46Y46*%\n%AMBAD*9,1,2*%", 1),
     "BAD"),
])
def test_malformed_file_exit_2_names_file_and_line(tmp_path, capsys, name, edit, needle):
    d = corrupt(tmp_path, edit)
    out = tmp_path / "report.txt"
    rc, stdout, err = run(["review", d, "--out", out], capsys)
    assert rc == 2, (name, err)
    assert copper_top(d).name in err
    assert "line" in err
    assert not out.exists()          # nothing half-written
    assert stdout == ""


def test_missing_outline_is_an_error_unless_size_given(tmp_path, capsys):
    d = tmp_path / "board"
    shutil.copytree(REV_B, d)
    next(d.glob("*profile.gbr")).unlink()
    rc, _, err = run(["review", d], capsys)
    assert rc == 2 and "outline" in err
    proj = d / "layoutcheck.toml"
    proj.write_text(proj.read_text().replace('[board]\n', '[board]\nsize_mm = [120, 90]\n'))
    rc, out, _ = run(["review", d], capsys)
    assert rc in (0, 1) and "[outline]" in out


def test_usage_errors_exit_2(tmp_path, capsys):
    assert run(["review", tmp_path / "nothing"], capsys)[0] == 2
    assert run(["review", REV_A, "--format", "pdf"], capsys)[0] == 2
    assert run(["frobnicate"], capsys)[0] == 2


def test_init_lists_every_net(tmp_path, capsys):
    d = tmp_path / "board"
    shutil.copytree(REV_B, d)
    (d / "layoutcheck.toml").unlink()
    rc, out, _ = run(["init", d], capsys)
    assert rc == 0
    text = (d / "layoutcheck.toml").read_text()
    import tomllib
    data = tomllib.loads(text)
    assert data["voltages"]["GND"] == 0 and data["voltages"]["+15V"] == 15
    assert "GUESS" in text
    rep = json.loads(run(["review", REV_B, "--format", "json"], capsys)[1])
    for net in rep["board"]["nets"]:
        assert f'"{net}"' in text
    assert run(["init", d], capsys)[0] == 2          # refuses to overwrite
