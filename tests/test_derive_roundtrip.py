"""``sheetlint derive -o OUT``: a completed file that ``check`` reads back with no error and
the same findings, with the input's comments, order and layout kept."""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from ruamel.yaml import YAML

from sheetlint.cli import main

ROOT = Path(__file__).resolve().parent.parent
DEMO = sorted((ROOT / "fixtures").glob("*.yaml"))

#: an invented machine with gaps for derive to fill; the first line and the trailing comments
#: must survive
GAPPY = """\
# Invented test machine (invented) -- kept by derive
id: "Invented PMX-15G"   # model designation
machine: {topology: spm, poles: 8, thermal_class: 155}
rated:
  power: "15 kW"
  speed: "1500 rpm"      # nameplate
  voltage: "400 V"
  current: "26.5 A"
  power_factor: 0.9
  efficiency: "94 %"
  losses: 957 W
emf: {constant: "240 V/krpm"}
circuit:
  resistance: {value: 0.25, unit: ohm, basis: phase, temperature: 20 °C}
"""


def _findings(capsys: pytest.CaptureFixture[str], path: Path) -> tuple[int, list[tuple]]:
    status = main(["check", "--no-settings", "--no-progress", "--format", "json", str(path)])
    data = json.loads(capsys.readouterr().out)
    out = []
    for file in data["files"]:
        assert file["error"] is None, file["error"]
        for record in file["records"]:
            assert record["error"] is None, record["error"]
            out += [(f["rule"], f["severity"], f["message"], tuple(f["fields"]))
                    for f in record["findings"]]
    return status, sorted(out)


def _derive(capsys: pytest.CaptureFixture[str], source: Path, target: str) -> tuple[int, str,
                                                                                    str]:
    status = main(["derive", str(source), "-o", target])
    out = capsys.readouterr()
    return status, out.out, out.err


@pytest.mark.parametrize("fixture", DEMO, ids=[p.stem for p in DEMO])
def test_every_demo_file_round_trips_with_the_same_findings(
        tmp_path: Path, capsys: pytest.CaptureFixture[str], fixture: Path):
    target = tmp_path / "completed.yaml"
    status, _, err = _derive(capsys, fixture, str(target))
    assert status == 0, err
    assert _findings(capsys, target) == _findings(capsys, fixture)


def test_gaps_are_filled_with_numbers_units_bases_temperatures_and_a_marker(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]):
    source = tmp_path / "m.yaml"
    source.write_text(GAPPY, encoding="utf-8")
    target = tmp_path / "m.completed.yaml"
    assert _derive(capsys, source, str(target))[0] == 0
    text = target.read_text(encoding="utf-8")
    # comments, order and layout of the input are kept
    assert text.startswith("# Invented test machine (invented) -- kept by derive\n")
    assert 'id: "Invented PMX-15G"   # model designation\n' in text
    assert '  speed: "1500 rpm"      # nameplate\n' in text
    assert text.index("power:") < text.index("speed:") < text.index("voltage:")
    data = YAML(typ="safe", pure=True).load(text)
    torque = data["rated"]["torque"]
    # P = T·ω (SI definition of the watt), by hand: 15 000 W / (2π·1500/60 s⁻¹) = 95.49 N·m
    assert isinstance(torque["value"], float) and torque["unit"] == "N*m"
    assert math.isclose(torque["value"], 15_000 / (2 * math.pi * 25), rel_tol=5e-4)
    assert torque["derived"] is True and torque["rule"] == "power-torque-speed"
    # Kt = √3·Ke for a sinusoidal machine (power balance T·ω = √3·E·I with i_d = 0), by hand:
    # Ke = 240 V per 1000 r/min = 240 / (1000·2π/60) V·s/rad = 2.2918 -> Kt = 3.970 N·m/A
    kt = data["torque_constant"]
    assert math.isclose(kt["value"], math.sqrt(3) * 240 / (1000 * 2 * math.pi / 60),
                        rel_tol=5e-4)
    assert kt["basis"] == "rms" and kt["magnet_temperature"] == "20 °C"
    # the back-EMF at rated speed, with the speed and the magnet temperature it holds at
    emf = data["emf"]["voltage"]
    assert emf["value"] == 360 and emf["basis"] == "line_rms"
    assert emf["speed"] == "1500 r/min" and emf["magnet_temperature"] == "20 °C"
    # a derived loss part goes under the total, which turns into the object form
    losses = data["rated"]["losses"]
    assert losses["value"] == 957 and losses["unit"] == "W"
    assert losses["copper"]["derived"] is True and losses["copper"]["value"] > 0
    assert _findings(capsys, target) == _findings(capsys, source)


def test_output_to_standard_output_in_the_input_format(tmp_path: Path,
                                                       capsys: pytest.CaptureFixture[str]):
    source = tmp_path / "m.yaml"
    source.write_text(GAPPY, encoding="utf-8")
    status, out, _ = _derive(capsys, source, "-")
    assert status == 0
    assert out.startswith("# Invented test machine (invented)")
    assert "derived: true" in out


def test_a_json_file_with_several_records_round_trips(tmp_path: Path,
                                                      capsys: pytest.CaptureFixture[str]):
    one = YAML(typ="safe", pure=True).load(GAPPY)
    source = tmp_path / "two.json"
    source.write_text(json.dumps({"records": [one, dict(one, id="Invented PMX-15H")]}),
                      encoding="utf-8")
    target = tmp_path / "two.completed.json"
    assert _derive(capsys, source, str(target))[0] == 0
    completed = json.loads(target.read_text(encoding="utf-8"))
    assert [r["id"] for r in completed["records"]] == ["Invented PMX-15G", "Invented PMX-15H"]
    assert all(r["rated"]["torque"]["derived"] is True for r in completed["records"])
    assert _findings(capsys, target) == _findings(capsys, source)


def test_a_value_marked_derived_is_worked_out_again_not_read(tmp_path: Path,
                                                             capsys: pytest.CaptureFixture[str]):
    # a derived torque edited by hand to a wrong number changes nothing: the engine derives it
    source = tmp_path / "m.yaml"
    source.write_text(GAPPY + 'torque_constant: {value: 9.99, unit: N*m/A, derived: true}\n',
                      encoding="utf-8")
    status, findings = _findings(capsys, source)
    assert status == 0
    assert not [f for f in findings if f[0] == "emf-constant" and f[1] != "info"]


def test_derive_on_a_pdf_points_to_extract(tmp_path: Path, capsys: pytest.CaptureFixture[str]):
    pdf = tmp_path / "sheet.pdf"
    pdf.write_bytes(b"%PDF-1.4\n%\xff\xfe\n")
    status, out, err = _derive(capsys, pdf, str(tmp_path / "out.yaml"))
    assert status == 2 and out == ""
    assert "sheetlint extract" in err and "UTF-8" not in err


def test_derive_never_overwrites_its_input(tmp_path: Path, capsys: pytest.CaptureFixture[str]):
    source = tmp_path / "m.yaml"
    source.write_text(GAPPY, encoding="utf-8")
    status, _, err = _derive(capsys, source, str(source))
    assert status == 2 and "never overwrites" in err
    assert source.read_text(encoding="utf-8") == GAPPY
