"""Project file: the contract shape of issue 2 and its voltage resolution rules."""
from pathlib import Path

import pytest

from layoutcheck.errors import ProjectFileError
from layoutcheck.project import load_project
from layoutcheck.units import VoltageRange, parse_voltage


def write(tmp_path: Path, text: str) -> Path:
    p = tmp_path / "layoutcheck.toml"
    p.write_text(text, encoding="utf-8")
    return p


CONTRACT = '''
[board]
files = "."
[voltages]
"HV_BUS" = 340
"SW_*" = "0..340"
"*" = "0..15"
[environment]
altitude_m = 0
coating = "none"
'''


def test_contract_shape_loads(tmp_path):
    proj = load_project(write(tmp_path, CONTRACT))
    assert proj.board_files == tmp_path.resolve()
    assert proj.voltage_of("HV_BUS") == (VoltageRange(340, 340), "exact")
    assert proj.voltage_of("SW_A")[0] == VoltageRange(0, 340)
    assert proj.voltage_of("IN_A") == (VoltageRange(0, 15), "fallback *")
    assert proj.environment.coating == "none"


def test_exact_beats_glob_and_first_glob_wins(tmp_path):
    proj = load_project(write(tmp_path, '''
[voltages]
"SW_*" = "0..400"
"S*" = 5
"SW_A" = 12
'''))
    assert proj.voltage_of("SW_A")[0] == VoltageRange(12, 12)      # exact wins
    assert proj.voltage_of("SW_B")[0] == VoltageRange(0, 400)      # first glob in file
    assert proj.voltage_of("SX")[0] == VoltageRange(5, 5)


def test_no_fallback_gives_0_15_and_assumption(tmp_path):
    proj = load_project(write(tmp_path, '[voltages]\n"HV" = 400\n'))
    v, how = proj.voltage_of("LOGIC")
    assert v == VoltageRange(0, 15) and how == "undeclared"
    texts = [a.text for a in proj.voltage_assumptions(["HV", "LOGIC"])]
    assert len(texts) == 1 and "LOGIC" in texts[0]


def test_working_voltage_is_largest_difference():
    # issue 2: "the working voltage between two nets is the largest difference between
    # their ranges" -- worked by hand: 0..340 against 15 -> 340 - 0... max(340-15, 15-0)=325
    assert VoltageRange(0, 340).difference_to(VoltageRange(15, 15)) == 325
    assert VoltageRange(340, 340).difference_to(VoltageRange(-15, 0)) == 355


@pytest.mark.parametrize("text,line", [
    ('[voltages]\n"A" = "lots"\n', 2),
    ('[environment]\ncoating = "paint"\n', 2),
    ('[environment]\naltitude_m = "high"\n', 2),
])
def test_bad_values_name_file_and_line(tmp_path, text, line):
    p = write(tmp_path, text)
    with pytest.raises(ProjectFileError) as e:
        load_project(p)
    assert e.value.line == line and str(p) in str(e.value)


def test_invalid_toml(tmp_path):
    with pytest.raises(ProjectFileError) as e:
        load_project(write(tmp_path, "[voltages\n"))
    assert e.value.line == 1


@pytest.mark.parametrize("value,expected", [(340, (340, 340)), ("0..340", (0, 340)),
                                            ("-15 .. 15", (-15, 15)), ("12V", (12, 12))])
def test_parse_voltage(value, expected):
    assert parse_voltage(value) == VoltageRange(*expected)


def test_relative_voltage_rides_on_switch_node(tmp_path):
    """A bootstrap supply sits 15 V above the switch node it rides on (common practice for
    bootstrap gate drivers): 15 V to the switch node, bus + 15 V to ground."""
    proj = load_project(write(tmp_path, '''
[voltages]
"SW_A" = "0..400"
"VB_A" = { on = "SW_A", volts = 15 }
"HO_A" = { on = "SW_A", volts = "0..15" }
"GND" = 0
'''))
    assert proj.voltage_of("VB_A")[0] == VoltageRange(15, 415)
    assert proj.working_voltage("VB_A", "SW_A") == 15
    assert proj.working_voltage("HO_A", "VB_A") == 15
    assert proj.working_voltage("VB_A", "GND") == 415
    assert proj.working_voltage("SW_A", "GND") == 400


def test_relative_voltage_cycle_is_an_error(tmp_path):
    with pytest.raises(ProjectFileError) as e:
        load_project(write(tmp_path, '[voltages]\n"A" = { on = "B", volts = 1 }\n'
                                     '"B" = { on = "A", volts = 1 }\n'))
    assert "circle" in str(e.value)


ISSUE3 = '''
[environment]
standard = "both"
pollution_degree = 3
cti = 250
overvoltage_category = "III"
altitude_m = 3000
coating = "conformal"
[[insulation]]
between = ["HV_*", "SW_*"]
and = ["LOGIC_*", "+5V"]
kind = "reinforced"
[earth]
edge = true
mounting_holes = true
'''


def test_issue3_profile_keys(tmp_path):
    """The IEC 60664-1 profile of issue 3 (contract shape).  CTI 250 -> group IIIa
    (IEC 60112 groups as reproduced in our standards notes 2g: 175 <= CTI < 400)."""
    proj = load_project(write(tmp_path, ISSUE3))
    e = proj.environment
    assert (e.standard, e.pollution_degree, e.material_group, e.overvoltage_category,
            e.altitude_m, e.coating) == ("both", 3, "IIIa", "III", 3000.0, "conformal")
    assert proj.insulation_between("HV_BUS", "+5V")[0] == "reinforced"
    assert proj.insulation_between("LOGIC_A", "SW_B")[0] == "reinforced"   # either order
    assert proj.insulation_between("HV_BUS", "GND")[0] == "functional"
    assert proj.earth.edge and proj.earth.mounting_holes


@pytest.mark.parametrize("cti,group", [(600, "I"), (400, "II"), (399, "IIIa"), (175, "IIIa"),
                                       (174, "IIIb"), (100, "IIIb")])
def test_cti_to_material_group(tmp_path, cti, group):
    """IEC 60664-1 material groups by CTI (notes 2g, confidence high)."""
    proj = load_project(write(tmp_path, f"[environment]\ncti = {cti}\n"))
    assert proj.environment.material_group == group


@pytest.mark.parametrize("text", [
    '[environment]\nstandard = "nec"\n',
    '[environment]\npollution_degree = 4\n',
    '[environment]\nmaterial_group = "IV"\n',
    '[environment]\nmaterial_group = "I"\ncti = 600\n',
    '[environment]\nhumidity = 90\n',
    '[[insulation]]\nbetween = ["A"]\nand = ["B"]\nkind = "double"\n',
    '[[insulation]]\nbetween = []\nand = ["B"]\n',
    '[earth]\nedge = "yes"\n',
])
def test_issue3_bad_keys(tmp_path, text):
    with pytest.raises(ProjectFileError):
        load_project(write(tmp_path, text))
