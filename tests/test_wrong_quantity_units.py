"""Units of the right dimension but the wrong quantity are refused with a clear message.

pint reads kVA as 1000 W and J as N·m (the same SI dimensions), so a dimension check alone lets
an apparent power pass as a shaft power. IEC 60050-131 (IEV 131-11-41 apparent power, volt-
ampere; 131-11-44 reactive power, var; entry numbers from memory) keeps VA and var for
apparent and reactive power; the SI Brochure (9th ed., 2019, tables 4 and 5, from memory)
names the joule for energy and the newton metre for moment of force. The refusal is a record
error (exit 2), the message naming the field."""

from __future__ import annotations

from pathlib import Path

import pytest

from sheetlint.cli import main

BASE = 'id: "Invented PMX-15"\nrated: {{power: "{power}", speed: "1500 rpm", torque: "{torque}"}}\n'


@pytest.mark.parametrize(("power", "torque", "field", "needle"), [
    ("15 kVA", "95.5 N*m", "rated.power", "apparent power"),
    ("15 kvar", "95.5 N*m", "rated.power", "reactive power"),
    ("15000 VA", "95.5 N*m", "rated.power", "apparent power"),
    ("15 kW", "95.5 J", "rated.torque", "an energy, not a torque"),
    ("15 kW", "0.0265 kWh", "rated.torque", "an energy, not a torque"),
])
def test_wrong_quantity_is_a_record_error_naming_the_field(
        tmp_path: Path, capsys: pytest.CaptureFixture[str], power: str, torque: str,
        field: str, needle: str):
    path = tmp_path / "m.yaml"
    path.write_text(BASE.format(power=power, torque=torque), encoding="utf-8")
    status = main(["check", "--no-settings", "--no-progress", str(path)])
    err = capsys.readouterr().err
    assert status == 2
    assert f"{field}: unit" in err and needle in err
    assert "Traceback" not in err


def test_real_power_units_still_read(tmp_path: Path, capsys: pytest.CaptureFixture[str]):
    # control: P = T·ω holds for 15 kW, 95.5 N·m, 1500 r/min (SI definition of the watt)
    path = tmp_path / "m.yaml"
    path.write_text(BASE.format(power="15 kW", torque="95.5 N*m"), encoding="utf-8")
    assert main(["check", "--no-settings", "--no-progress", str(path)]) == 0
    capsys.readouterr()
