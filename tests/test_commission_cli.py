"""``sheetlint commission`` through the command line: formats, output file, exit status."""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import pytest

from sheetlint.cli import main

ROOT = Path(__file__).resolve().parents[1]
PUMP_160K = str(ROOT / "fixtures" / "consistent-spm-160k-raw-water-pump.yaml")
MEASURED = ROOT / "fixtures" / "commissioning"


def test_text_output_shows_units_provenance_checklist_and_cautions(capsys):
    assert main(["commission", PUMP_160K]) == 0
    out = capsys.readouterr().out
    assert "NHE-PM 160-15" in out and "V/krpm" in out and "r/min" in out
    assert "derived by temperature-rise" in out
    assert "Commissioning checklist" in out
    assert "voltage at its terminals even with the converter off" in out


def test_consistent_measurements_exit_0_and_a_planted_error_exits_1(capsys):
    consistent = str(MEASURED / "consistent-nhe-pm-160-15-at-24c.measured")
    assert main(["commission", PUMP_160K, "--measured", consistent]) == 0
    assert "no findings" in capsys.readouterr().out
    planted = str(MEASURED / "planted-milliohm-as-ohm.measured")
    assert main(["commission", PUMP_160K, "--measured", planted, "--format", "json"]) == 1
    data = json.loads(capsys.readouterr().out)
    assert data["identification"]["findings"][0]["cause"].startswith("mΩ written as Ω")


@pytest.mark.parametrize("args", [
    ["--measured", str(MEASURED / "planted-other-machine.measured")],
    ["--measured", "no-such-file.measured"],
    ["--id", "no such id"],
])
def test_unusable_input_exits_2_with_a_message_and_no_traceback(capsys, args):
    assert main(["commission", PUMP_160K, *args]) == 2
    err = capsys.readouterr().err
    assert err.startswith("sheetlint: ") and "Traceback" not in err


def test_a_missing_record_file_exits_2(capsys):
    assert main(["commission", "no-such-record.yaml"]) == 2
    assert "no-such-record.yaml" in capsys.readouterr().err


def test_csv_written_to_a_file_reads_back(tmp_path, capsys):
    out = tmp_path / "pump.csv"
    assert main(["commission", PUMP_160K, "--format", "csv", "-o", str(out)]) == 0
    rows = list(csv.DictReader(io.StringIO(out.read_text(encoding="utf-8"), newline="")))
    by_name = {r["name"]: r for r in rows if r["section"] == "parameter"}
    assert by_name["rated_voltage"]["value"] == "621.0" and by_name["rated_voltage"]["unit"] == "V"
    assert capsys.readouterr().out == ""


def test_test_speed_and_temperature_set_the_expected_values(capsys):
    # R_line(40 °C) = 2 · 0.01778 · 275/255 = 0.038349 Ω (235 rule, IEC 60034-1, from memory);
    # E(1000 r/min, 40 °C) = 426.2 · (1 − 0.0011 · 20) = 416.82 V (NdFeB −0.11 %/K, as quoted)
    assert main(["commission", PUMP_160K, "--format", "json", "--test-speed", "1000",
                 "--test-temperature", "40"]) == 0
    expected = {v["name"]: v["value"] for v in
                json.loads(capsys.readouterr().out)["identification"]["expected"]["values"]}
    assert expected["resistance_line"] == pytest.approx(0.03835, abs=0.000005)
    assert expected["emf_voltage"] == pytest.approx(416.8, abs=0.05)
