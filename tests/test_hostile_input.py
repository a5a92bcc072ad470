"""Every class of bad input gets a message naming the file, exit status 2, and no traceback.

Impossible but readable values are different: they are ``value-range`` errors (exit 1), never
unreadable input. One bad file or record never stops the others.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import time
from pathlib import Path

import pytest

from sheetlint import batch
from sheetlint.cli import main

GOOD = {"id": "HX-GOOD-1", "maker": "Testbench Motors (invented)",
        "rated": {"power": "15 kW", "speed": "1500 rpm", "torque": "95.5 N*m"}}
FIXTURES = Path(__file__).resolve().parent.parent / "fixtures"


def _run(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    status = main(["check", "--notes", *args])
    captured = capsys.readouterr()
    assert "Traceback" not in captured.out + captured.err
    return status, captured.out, captured.err


def _check_text(tmp_path: Path, capsys: pytest.CaptureFixture[str], name: str,
                content: str | bytes, *extra: str) -> tuple[int, str]:
    path = tmp_path / name
    if isinstance(content, bytes):
        path.write_bytes(content)
    else:
        path.write_text(content, encoding="utf-8")
    status, out, err = _run(capsys, str(path), *extra)
    assert name in err, "the message names the file"
    return status, out + err


def _yaml_record(**rated: str) -> str:
    lines = ["id: HX-1", "rated:"] + [f"  {k}: {v}" for k, v in rated.items()]
    return "\n".join(lines) + "\n"


@pytest.mark.parametrize("name,content,words", [
    ("broken.json", '{"id": "A", "rated": {', "broken JSON"),
    ("trailing.json", '{"id": "A"} {"id": "B"}', "broken JSON"),
    ("broken.yaml", "id: A\nrated: {power: [15 kW\n", "broken YAML"),
    ("tabs.yaml", "id: A\nrated:\n\tpower: 15 kW\n", "broken YAML"),
    ("zero.json", b"", "file is empty"),
    ("zero.yaml", b"", "file is empty"),
    ("blank.json", "  \n\n", "file is empty"),
    ("comments.yaml", "# nothing but a comment\n---\n", "file is empty"),
    ("garbage.yaml", bytes(range(256)) * 8, "not UTF-8"),
    ("garbage.json", b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR\xff\xfe", "not UTF-8"),
    ("controls.yaml", "id: A\x00\x01\x02\n", "broken YAML"),
    ("latin1.yaml", "id: A\nmachine:\n  ambient: 40 \xb0C\n".encode("latin-1"), "not UTF-8"),
    ("list.json", "[1, 2, 3]", "found list"),
    ("list.yaml", "- id: A\n- id: B\n", "found list"),
    ("scalar.json", "42", "found int"),
    ("scalar.yaml", "just some words\n", "found str"),
    ("records-dict.json", '{"records": {"id": "A"}}', "'records' must be a list"),
    ("records-text.yaml", "records: many\n", "'records' must be a list"),
    ("merge.yaml", "base: &b {power: 15 kW}\nid: A\nrated:\n  <<: *b\n", "merge keys"),
    ("listkey.yaml", "? [a, b]\n: 1\nid: A\n", "mapping keys must be text"),
])
def test_unreadable_file_is_refused_with_a_message(tmp_path, capsys, name, content, words):
    status, out = _check_text(tmp_path, capsys, name, content)
    assert status == 2
    assert words in out


def test_a_quoted_merge_sign_is_an_ordinary_key(tmp_path, capsys):
    """YAML 1.1: only a plain ``<<`` is a merge key; ``'<<'`` in quotes is text, as in JSON."""
    path = tmp_path / "quoted.yaml"
    path.write_text("id: QK-1\n'<<': a note\nrated: {power: 15 kW}\n", encoding="utf-8")
    status, out, err = _run(capsys, str(path))
    assert status == 0, out + err
    assert "field '<<' is not part of the schema" in out


@pytest.mark.parametrize("name,content,words", [
    ("not-mapping.json", json.dumps({"records": [GOOD, 7]}), "expected a mapping, found int"),
    ("missing-id.json", json.dumps({"rated": {"power": "15 kW"}}), "'id'"),
    ("empty-id.json", json.dumps({"id": "", "rated": {"power": "15 kW"}}), "id"),
    ("unknown-unit.yaml", _yaml_record(power="15 furlong"), "unit 'furlong'"),
    ("unknown-unit2.yaml", "id: HX-1\nemf:\n  constant: 100 V/furlong\n", "emf.constant"),
    ("wrong-dimension.yaml", _yaml_record(power="15 kg"), "not a power"),
    ("wrong-dimension2.yaml", _yaml_record(voltage="400 N*m"), "not a voltage"),
    ("speed-in-hz.yaml", _yaml_record(speed="25 Hz"), "rpm"),
    ("text-number.yaml", _yaml_record(power="fifteen kW"), "not a number with a unit"),
    ("text-count.yaml", "id: HX-1\nmachine:\n  poles: eight\n", "expected a number"),
    # the structural (JSON Schema) message may come first: the field is named either way
    ("no-unit.json", json.dumps({"id": "A", "rated": {"power": 15}}), "rated.power"),
    ("no-unit.yaml", _yaml_record(torque="95.5"), "rated.torque"),
    ("bool-value.yaml", _yaml_record(power="true"), "rated.power"),
    ("bool-object.json", json.dumps({"id": "A", "rated": {"power": {"value": True,
                                                                      "unit": "kW"}}}),
     "rated.power"),
    ("bool-count.yaml", "id: HX-1\nmachine:\n  poles: yes\n", "machine.poles"),
    ("huge.yaml", _yaml_record(power="1e308 kW"), "out of range"),
    ("huge-int.json", '{"id": "A", "machine": {"poles": 1' + "0" * 400 + "}}", "out of range"),
    ("long-number.yaml", _yaml_record(power="1e" + "0" * 5000 + "1 kW"), "characters"),
    ("unit-twice.json", json.dumps({"id": "A", "rated": {"power": {"value": "15 kW",
                                                                     "unit": "kW"}}}),
     "unit in the value and in 'unit'"),
    ("bad-basis.json", json.dumps({"id": "A", "rated": {"voltage": {"value": 400, "unit": "V",
                                                                      "basis": "diagonal"}}}),
     "rated.voltage"),
])
def test_unreadable_record_is_refused_with_field_and_message(tmp_path, capsys, name, content,
                                                            words):
    status, out = _check_text(tmp_path, capsys, name, content)
    assert status == 2
    assert words in out


@pytest.mark.parametrize("name,content", [
    ("nan.json", '{"id": "A", "rated": {"power": {"value": NaN, "unit": "kW"}}}'),
    ("infinity.json", '{"id": "A", "rated": {"power": {"value": Infinity, "unit": "kW"}}}'),
    ("minus-infinity.json", '{"id": "A", "rated": {"torque": {"value": -Infinity, '
                            '"unit": "N*m"}}}'),
    ("nan.yaml", "id: A\nrated:\n  power: {value: .nan, unit: kW}\n"),
    ("inf.yaml", "id: A\nrated:\n  power: {value: .inf, unit: kW}\n"),
    ("nan-text.yaml", _yaml_record(power="nan kW")),
    ("inf-text.json", json.dumps({"id": "A", "rated": {"power": "inf kW"}})),
    ("nan-count.yaml", "id: A\nmachine:\n  poles: .nan\n"),
    ("nan-count-text.json", json.dumps({"id": "A", "machine": {"poles": "nan"}})),
])
def test_nan_and_infinity_are_refused(tmp_path, capsys, name, content):
    status, out = _check_text(tmp_path, capsys, name, content)
    assert status == 2
    assert "not a finite number" in out or "not a number" in out


@pytest.mark.parametrize("suffix", [".json", ".yaml"])
def test_deeply_nested_document_is_refused(tmp_path, capsys, suffix):
    depth = 5000
    content = '{"id": "A", "x": ' + "[" * depth + "]" * depth + "}"
    status, out = _check_text(tmp_path, capsys, "deep" + suffix, content)
    assert status == 2
    assert "nest" in out  # "nested too deeply" / "nesting depth"


def test_deep_yaml_block_mapping_is_refused(tmp_path, capsys):
    content = "id: A\n" + "".join(" " * i + f"k{i}:\n" for i in range(200)) + " " * 200 + "v\n"
    status, out = _check_text(tmp_path, capsys, "deepmap.yaml", content)
    assert status == 2
    assert "deeper than" in out


def test_yaml_alias_bomb_is_refused_quickly(tmp_path, capsys):
    lines = ['a0: &a0 ["lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol"]']
    for i in range(1, 10):
        refs = ", ".join([f"*a{i - 1}"] * 9)
        lines.append(f"a{i}: &a{i} [{refs}]")
    start = time.perf_counter()
    status, out = _check_text(tmp_path, capsys, "bomb.yaml", "\n".join(lines) + "\nid: A\n")
    assert status == 2
    assert "aliases" in out and "refused" in out
    assert time.perf_counter() - start < 20  # 9**10 nodes would never finish


def test_oversize_file_is_refused_by_the_size_limit(tmp_path, capsys):
    content = json.dumps({"id": "A", "maker": "x" * 5000})
    status, out = _check_text(tmp_path, capsys, "big.json", content, "--max-file-size", "1000")
    assert status == 2
    assert "over the limit of 1000" in out


def test_oversize_pdf_is_refused_before_extraction(tmp_path, capsys):
    status, out = _check_text(tmp_path, capsys, "big.pdf", b"%PDF-1.4\n" + b"0" * 5000,
                              "--max-file-size", "1000")
    assert status == 2
    assert "over the limit of 1000" in out


def test_path_that_does_not_exist(tmp_path, capsys):
    missing = tmp_path / "nowhere" / "m.yaml"
    status, _out, err = _run(capsys, str(missing))
    assert status == 2
    assert "no such file or folder" in err and "m.yaml" in err


def test_missing_path_does_not_stop_the_other_paths(tmp_path, capsys):
    good = tmp_path / "good.json"
    good.write_text(json.dumps(GOOD))
    status, out, err = _run(capsys, str(tmp_path / "missing.yaml"), str(good))
    assert status == 2
    assert "HX-GOOD-1" in out and "missing.yaml" in err


@pytest.mark.skipif(not hasattr(os, "geteuid") or os.geteuid() == 0,
                    reason="permissions do not bind root")
def test_unreadable_file_and_folder_by_permission(tmp_path, capsys):
    folder = tmp_path / "data"
    folder.mkdir()
    (folder / "good.json").write_text(json.dumps(GOOD))
    locked = folder / "locked.json"
    locked.write_text(json.dumps(GOOD))
    locked.chmod(0)
    closed = folder / "closed"
    closed.mkdir()
    (closed / "inside.json").write_text(json.dumps(GOOD))
    closed.chmod(0)
    try:
        status, out, err = _run(capsys, str(folder))
    finally:
        locked.chmod(0o600)
        closed.chmod(0o700)
    assert status == 2
    assert "locked.json: cannot read file" in err
    assert "closed: cannot read folder" in err
    assert "HX-GOOD-1" in out


def test_unreadable_file_and_folder_reported_when_the_os_refuses(tmp_path, capsys,
                                                                  monkeypatch):
    """The same as above for any user (root included): the OS refusal is simulated."""
    folder = tmp_path / "data"
    folder.mkdir()
    (folder / "good.json").write_text(json.dumps(GOOD))
    (folder / "locked.json").write_text(json.dumps(GOOD))
    closed = folder / "closed"
    closed.mkdir()
    (closed / "inside.json").write_text(json.dumps(GOOD))
    real_read_bytes = Path.read_bytes
    real_scandir = os.scandir

    def read_bytes(self: Path) -> bytes:
        if self.name == "locked.json":
            raise PermissionError(13, "Permission denied", str(self))
        return real_read_bytes(self)

    def scandir(path=".", *args, **kwargs):  # type: ignore[no-untyped-def]
        if os.fspath(path) == str(closed):
            raise PermissionError(13, "Permission denied", os.fspath(path))
        return real_scandir(path, *args, **kwargs)

    monkeypatch.setattr(Path, "read_bytes", read_bytes)
    monkeypatch.setattr(os, "scandir", scandir)
    status, out, err = _run(capsys, str(folder))
    assert status == 2
    assert "locked.json: cannot read file (Permission denied)" in err
    assert "closed: cannot read folder (Permission denied)" in err
    assert "HX-GOOD-1" in out


def test_one_bad_record_among_several_gets_its_own_error(tmp_path, capsys):
    bad = {"id": "HX-BAD", "rated": {"power": "15 parsecs"}}
    other = dict(GOOD, id="HX-GOOD-2")
    status, out = _check_text(tmp_path, capsys, "three.json",
                              json.dumps({"records": [GOOD, bad, other, "text"]}))
    assert status == 2
    assert "records[1] ('HX-BAD')" in out and "parsecs" in out
    assert "records[3]" in out and "expected a mapping" in out
    assert "HX-GOOD-1" in out and "HX-GOOD-2" in out


def test_time_limit_exceeded_is_a_file_error_and_the_batch_goes_on(tmp_path, capsys,
                                                                   monkeypatch):
    slow = tmp_path / "a-slow.json"
    slow.write_text(json.dumps(dict(GOOD, id="HX-SLOW")))
    good = tmp_path / "b-good.json"
    good.write_text(json.dumps(GOOD))
    real_check_record = batch.check_record

    def sometimes_slow(raw, settings=None):  # type: ignore[no-untyped-def]
        if raw.data.get("id") == "HX-SLOW":
            while True:  # a check that never ends on its own
                time.sleep(0.01)
        return real_check_record(raw, settings)

    monkeypatch.setattr(batch, "check_record", sometimes_slow)
    start = time.perf_counter()
    status, out, err = _run(capsys, str(tmp_path), "--time-limit", "0.3", "--jobs", "1")
    assert time.perf_counter() - start < 10
    assert status == 2
    assert "a-slow.json: time limit of 0.3 s exceeded" in err
    assert "HX-GOOD-1" in out


def test_an_internal_failure_is_a_record_error_not_a_crash(tmp_path, capsys, monkeypatch):
    path = tmp_path / "two.json"
    path.write_text(json.dumps({"records": [dict(GOOD, id="HX-BOOM"), GOOD]}))
    real_check_record = batch.check_record

    def failing(raw, settings=None):  # type: ignore[no-untyped-def]
        if raw.data.get("id") == "HX-BOOM":
            raise ZeroDivisionError("float division by zero")
        return real_check_record(raw, settings)

    monkeypatch.setattr(batch, "check_record", failing)
    status, out, err = _run(capsys, str(path))
    assert status == 2
    assert "records[0] ('HX-BOOM'): internal error of sheetlint (ZeroDivisionError" in err
    assert "HX-GOOD-1" in out


@pytest.mark.parametrize("field,value,words", [
    (("rated", "power"), "-5.5 kW", "must be positive"),
    (("machine", "poles"), 7, "even integer"),
    (("rated", "efficiency"), "101 %", "between 0 and 100 %"),
    (("rated", "power_factor"), 1.2, "power factor must lie in (0, 1]"),
    (("rated", "current"), "0 A", "must be positive"),
])
def test_impossible_but_readable_value_is_a_value_range_error_exit_1(tmp_path, capsys, field,
                                                                     value, words):
    import yaml

    data = yaml.safe_load((FIXTURES / "consistent-spm-5k5-dosing-pump.yaml").read_text())
    data[field[0]][field[1]] = value
    path = tmp_path / "impossible.json"
    path.write_text(json.dumps(data))
    status = main(["check", "--format", "json", str(path)])
    captured = capsys.readouterr()
    assert "Traceback" not in captured.err
    assert status == 1
    record = json.loads(captured.out)["files"][0]["records"][0]
    assert record["error"] is None
    hits = [f for f in record["findings"] if f["rule"] == "value-range"]
    assert any(f["severity"] == "error" and words in f["message"] for f in hits), hits


@pytest.mark.parametrize("content,words", [
    (b"\xff\xfe\x00garbage", "not UTF-8"),
    (b'{"id": "A", "rated": {"power": NaN}}', "not a finite number"),
])
def test_cli_subprocess_bad_input_exit_2_without_traceback(tmp_path, content, words):
    path = tmp_path / "input.json"
    path.write_bytes(content)
    done = subprocess.run([sys.executable, "-m", "sheetlint", "check", str(path)],
                          capture_output=True, text=True, timeout=60)
    assert done.returncode == 2
    assert "Traceback" not in done.stderr
    assert words in done.stderr and "input.json" in done.stderr


def test_a_thermal_class_beyond_any_float_is_an_unknown_class_not_an_arithmetic_failure(
        tmp_path, capsys):
    # 10**400 cannot become a float (OverflowError): IEC 60085 knows no such class, which
    # value-range says; temperature-rise has no class to check against and stays quiet
    from sheetlint.standards.thermal import class_number

    assert class_number(10**400) is None
    content = ("id: HX-1\nmachine:\n  thermal_class: " + "1" + "0" * 400 + "\n"
               "rated:\n  temperature_rise: 80 K\n")
    path = tmp_path / "huge-class.yaml"
    path.write_text(content, encoding="utf-8")
    status, out, err = _run(capsys, str(path))
    text = out + err
    assert status == 0
    assert "not an IEC 60085 thermal class" in text
    assert "could not be evaluated" not in text
