"""Keys written twice: found while loading, reported with both lines, never picked silently.

The rule behind it: IETF RFC 8259 (2017), section 4 — "The names within an object SHOULD be
unique", and software receiving repeated names behaves unpredictably ("many implementations
report the last name/value pair only"); YAML 1.2.2 (2021), mapping nodes: "each of the keys is
unique". The line numbers below are counted by hand in the texts written out in each test.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from sheetlint.batch import check_file
from sheetlint.cli import main
from sheetlint.intake.records import DuplicateKey, InputProblem, load_records

#: 15 kW at 1500 rpm: P/ω = 15000/(2π·1500/60) = 95.49 N·m (hand calculation), so 95.5 N·m
#: agrees and 110 N·m is 15 % off (power-torque-speed, P = T·ω)
JSON_TWICE = """{
  "id": "Invented DK-1",
  "rated": {
    "power": "15 kW",
    "speed": "1500 rpm",
    "torque": "110 N*m",
    "torque": "95.5 N*m"
  }
}
"""

YAML_TWICE = """\
id: Invented DK-2
rated:
  power: 15 kW
  speed: 1500 rpm
  torque: 95.5 N*m
points:
  - speed: 750 rpm
    torque: 95.5 N*m
    speed: 700 rpm
"""


def _write(tmp_path: Path, name: str, text: str) -> str:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return str(path)


def test_json_repeat_is_found_with_both_lines(tmp_path):
    loaded = load_records(_write(tmp_path, "dk.json", JSON_TWICE))
    assert loaded.records[0].duplicates == (DuplicateKey("rated.torque", 6, 7),)


def test_yaml_repeat_inside_a_list_item_is_found_with_both_lines(tmp_path):
    loaded = load_records(_write(tmp_path, "dk.yaml", YAML_TWICE))
    assert loaded.records[0].duplicates == (DuplicateKey("points[0].speed", 7, 9),)


def test_a_file_without_repeats_carries_none(tmp_path):
    text = JSON_TWICE.replace('    "torque": "110 N*m",\n', "")
    assert load_records(_write(tmp_path, "ok.json", text)).records[0].duplicates == ()


def test_duplicate_key_is_an_error_naming_both_lines_and_the_value_checked(tmp_path):
    result = check_file(_write(tmp_path, "dk.json", JSON_TWICE))
    record = result.records[0]
    found = [f for f in record.findings if f.rule == "duplicate-key"]
    assert len(found) == 1
    finding = found[0]
    assert finding.severity == "error"
    assert finding.fields == ("rated.torque",)
    assert "lines 6 and 7" in finding.message and "line 7 was checked" in finding.message
    assert finding.location == {"line": 6}
    # the later value (95.5 N·m) is the one checked: it agrees with P = T·ω
    assert not [f for f in record.findings if f.rule == "power-torque-speed"
                and f.severity == "error"]


def test_the_yaml_repeat_reaches_the_json_output(tmp_path, capsys):
    path = _write(tmp_path, "dk.yaml", YAML_TWICE)
    status = main(["check", "--no-settings", "--format", "json", path])
    out = json.loads(capsys.readouterr().out)
    assert status == 1
    finding = next(f for f in out["files"][0]["records"][0]["findings"]
                   if f["rule"] == "duplicate-key")
    assert finding["fields"] == ["points[0].speed"]
    assert "lines 7 and 9" in finding["message"]


def test_repeats_belong_to_their_own_record_of_a_records_file(tmp_path):
    text = ('{"records": [\n'
            '  {"id": "Invented A", "maker": "X (invented)"},\n'
            '  {"id": "Invented B",\n'
            '   "maker": "Y (invented)", "maker": "Z (invented)"}\n'
            ']}\n')
    records = load_records(_write(tmp_path, "many.json", text)).records
    assert records[0].duplicates == ()
    assert records[1].duplicates == (DuplicateKey("maker", 4, 4),)


def test_two_records_lists_make_the_file_unreadable(tmp_path):
    text = '{"records": [{"id": "Invented A"}],\n "records": [{"id": "Invented B"}]}\n'
    with pytest.raises(InputProblem, match="'records' is written twice, at lines 1 and 2"):
        load_records(_write(tmp_path, "lists.json", text))


def test_an_unreadable_record_still_names_its_repeated_keys(tmp_path):
    text = '{"id": "Invented DK-3",\n "rated": {"power": "15 kW",\n "power": "15 kg"}}\n'
    result = check_file(_write(tmp_path, "bad.json", text))
    error = result.records[0].error or ""
    assert "15 kg" in error and "rated.power is written twice, at lines 2 and 3" in error


def test_the_rule_can_be_left_out_like_any_other(tmp_path, capsys):
    path = _write(tmp_path, "dk.json", JSON_TWICE)
    main(["check", "--no-settings", "--format", "json", "--skip", "duplicate-key", path])
    out = json.loads(capsys.readouterr().out)
    assert not [f for f in out["files"][0]["records"][0]["findings"]
                if f["rule"] == "duplicate-key"]


def test_the_rule_is_documented(capsys):
    assert main(["rules", "duplicate-key"]) == 0
    assert "RFC 8259" in capsys.readouterr().out


# --- repeated keys anywhere, against the layout of an indented JSON text ----------------------
from hypothesis import given  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

from sheetlint.intake.records import _json_duplicates  # noqa: E402


class _Pairs(list):
    """An object written as its (key, value) pairs, so that a key may come twice."""


def _dump(value: object, indent: str = "") -> str:
    """JSON in the layout of json.dumps(indent=2), objects given as pairs."""
    inner = indent + "  "
    if isinstance(value, _Pairs):
        if not value:
            return "{}"
        members = [f"{inner}{json.dumps(k)}: {_dump(v, inner)}" for k, v in value]
        return "{\n" + ",\n".join(members) + "\n" + indent + "}"
    if isinstance(value, list):
        if not value:
            return "[]"
        return "[\n" + ",\n".join(inner + _dump(v, inner) for v in value) + "\n" + indent + "]"
    return json.dumps(value)


def _height(value: object) -> int:
    if isinstance(value, _Pairs) and value:
        return 2 + sum(_height(v) for _k, v in value)
    if isinstance(value, list) and value:
        return 2 + sum(_height(v) for v in value)
    return 1


def _expected(value: object, path: str, line: int, out: list[DuplicateKey]) -> None:
    """Repeats with the lines of the layout: a member's key sits on the member's first line."""
    below = line + 1
    if isinstance(value, _Pairs):
        first: dict[str, int] = {}
        for key, child in value:
            child_path = f"{path}.{key}" if path else key
            if key in first:
                out.append(DuplicateKey(child_path, first[key], below))
            else:
                first[key] = below
            _expected(child, child_path, below, out)
            below += _height(child)
    elif isinstance(value, list):
        for i, child in enumerate(value):
            _expected(child, f"{path}[{i}]", below, out)
            below += _height(child)


_keys = st.sampled_from(["a", "b", "c"])
_values = st.recursive(
    st.one_of(st.integers(0, 9), st.text(alphabet="xyz{}[],:", max_size=4)),
    lambda inner: st.lists(inner, max_size=3) | st.lists(st.tuples(_keys, inner), max_size=4)
    .map(_Pairs), max_leaves=10)


@given(st.lists(st.tuples(_keys, _values), max_size=5).map(_Pairs))
def test_every_repeat_is_found_with_the_lines_of_the_layout(document: _Pairs):
    expected: list[DuplicateKey] = []
    _expected(document, "", 1, expected)
    # depth-first order of the text: sort both by the line of the second key
    found = _json_duplicates(_dump(document))
    assert sorted(found, key=lambda d: (d.second_line, d.path)) == sorted(
        expected, key=lambda d: (d.second_line, d.path))
