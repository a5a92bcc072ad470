"""Unreadable input (exit 2, message with file and field) versus impossible values (exit 1)."""

from __future__ import annotations

import json

import pytest

from sheetlint.cli import main

GOOD = {"id": "TEST-1", "rated": {"power": "15 kW", "speed": "1500 rpm", "torque": "95.5 N*m"}}


def _check(tmp_path, capsys, text, name="m.json"):
    path = tmp_path / name
    path.write_text(text)
    status = main(["check", "--notes", str(path)])
    captured = capsys.readouterr()
    assert "Traceback" not in captured.err + captured.out
    return status, captured.out + captured.err


@pytest.mark.parametrize("text,words", [
    ('{"id": "A", "rated": {', "broken JSON"),
    ('{"rated": {"power": "15 kW"}}', "'id' is a required property"),
    ('{"id": "A", "rated": {"power": "15 kg"}}', "rated.power"),
    ('{"id": "A", "rated": {"power": "fifteen kW"}}', "rated.power"),
    ('{"id": "A", "rated": {"power": NaN}}', "not a finite number"),
    ('{"id": "A", "rated": {"speed": "1500 Hz"}}', "rpm"),
    ('{"id": "A", "rated": {"power": 15}}', "rated.power"),
    ('{"id": "A", "emf": {"constant": "100 furlong"}}', "emf.constant"),
])
def test_unreadable_input_is_exit_2_with_file_and_field(tmp_path, capsys, text, words):
    status, out = _check(tmp_path, capsys, text)
    assert status == 2
    assert words in out and "m.json" in out


def test_one_bad_record_does_not_stop_the_others(tmp_path, capsys):
    bad = {"id": "B", "rated": {"power": "15 parsecs"}}
    status, out = _check(tmp_path, capsys, json.dumps({"records": [GOOD, bad, GOOD]}))
    assert status == 2
    assert "records[1]" in out and out.count("TEST-1") >= 2


@pytest.mark.parametrize("field,value,words", [
    (("machine", "poles"), 7, "even integer"),
    (("rated", "efficiency"), "101 %", "efficiency"),
    (("rated", "power_factor"), 1.2, "power factor"),
    (("rated", "power"), "-15 kW", "positive"),
])
def test_impossible_values_are_value_range_errors_exit_1(tmp_path, capsys, field, value, words):
    data = json.loads(json.dumps(GOOD))
    data.setdefault(field[0], {})[field[1]] = value
    status, out = _check(tmp_path, capsys, json.dumps(data))
    assert status == 1
    assert "value-range" in out and words in out


def test_misspelt_field_is_a_warning_naming_the_field_meant(tmp_path, capsys):
    data = json.loads(json.dumps(GOOD))
    data["rated"]["powr"] = "15 kW"
    _status, out = _check(tmp_path, capsys, json.dumps(data))
    assert "rated.powr" in out and "rated.power" in out and "misspelling" in out
