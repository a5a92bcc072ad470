"""Line numbers of JSON values, found only for the paths a finding names.

The expected lines come from outside the locator: counted by hand in texts written out here,
or from the layout the standard library's ``json.dumps(indent=2)`` documents (each member and
item on its own line; a non-empty container opens on its key's line, closes on a line of its
own; an empty one is ``{}`` or ``[]`` on one line), modelled independently below.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

from hypothesis import given
from hypothesis import strategies as st

from sheetlint.batch import check_file
from sheetlint.intake.records import JsonLines, load_records

HAND_COUNTED = """{
  "id": "Invented LN-1",
  "rated": {"power": "15 kW",
    "speed": "1500 rpm", "odd.key": 3},
  "points": [ {"speed": "750 rpm"},
     {"torque": [1, 2,
       3]} ],
  "esc\\u0061ped": {"x": 1}
}"""


def test_lines_counted_by_hand():
    lines = JsonLines(HAND_COUNTED)
    expected = {"id": 2, "rated": 3, "rated.power": 3, "rated.speed": 4, "rated.odd.key": 4,
                "points": 5, "points[0]": 5, "points[0].speed": 5, "points[1].torque": 6,
                "points[1].torque[2]": 7, "escaped.x": 8}
    assert {path: lines(path) for path in expected} == {
        path: {"line": line} for path, line in expected.items()}


def test_absent_paths_have_no_line():
    lines = JsonLines(HAND_COUNTED)
    for path in ("nope", "rated.nope", "points[2]", "points[0].speed.deeper", "id[0]"):
        assert lines(path) is None


def test_only_the_text_before_the_value_is_read():
    # everything after the value asked for is not JSON at all: the locator never looks there
    text = '{"id": "Invented LN-2",\n "rated": {"power": "15 kW"},\n "tail": [[[[ not json'
    assert JsonLines(text)("rated.power") == {"line": 2}


def test_loading_locates_nothing_until_asked(tmp_path: Path):
    path = tmp_path / "one.json"
    path.write_text(HAND_COUNTED, encoding="utf-8")
    raw = load_records(path).records[0]
    locator = raw.locate_in_file
    assert isinstance(locator, JsonLines) and locator.found == {}
    assert raw.locate("rated.speed") == {"line": 4}
    assert set(locator.found) == {"rated.speed"}


def test_a_finding_in_a_json_file_names_its_line(tmp_path: Path):
    # 15 kW at 1500 rpm needs 95.5 N·m (P = T·ω, hand calculation); 110 N·m is on line 5
    text = ('{\n  "id": "Invented LN-3",\n  "rated": {\n    "power": "15 kW",\n'
            '    "torque": "110 N*m",\n    "speed": "1500 rpm"\n  }\n}\n')
    path = tmp_path / "planted.json"
    path.write_text(text, encoding="utf-8")
    record = check_file(str(path)).records[0]
    finding = next(f for f in record.findings if f.rule == "power-torque-speed")
    assert finding.location == {"line": 5}


# --- against the layout of json.dumps(indent=2) ----------------------------------------------
def _height(value: Any) -> int:
    """Lines that json.dumps(indent=2) gives a value."""
    if isinstance(value, dict) and value:
        return 2 + sum(_height(v) for v in value.values())
    if isinstance(value, list) and value:
        return 2 + sum(_height(v) for v in value)
    return 1


def _expected_lines(value: Any, path: str, line: int, out: dict[str, int]) -> None:
    if path:
        out[path] = line
    if isinstance(value, dict):
        children = [(f"{path}.{k}" if path else k, v) for k, v in value.items()]
    elif isinstance(value, list):
        children = [(f"{path}[{i}]", v) for i, v in enumerate(value)]
    else:
        return
    below = line + 1
    for child_path, child in children:
        _expected_lines(child, child_path, below, out)
        below += _height(child)


_keys = st.text(alphabet="abcdefghij_", min_size=1, max_size=6)
_leaves = st.one_of(st.integers(-5, 5), st.text(max_size=5), st.booleans(), st.none(),
                    st.floats(allow_nan=False, allow_infinity=False))
_documents = st.dictionaries(_keys, st.recursive(
    _leaves, lambda inner: st.lists(inner, max_size=3) | st.dictionaries(_keys, inner,
                                                                          max_size=3),
    max_leaves=12), max_size=5)


@given(_documents)
def test_every_path_of_an_indented_dump_has_the_line_of_the_layout(document: dict):
    expected: dict[str, int] = {}
    _expected_lines(document, "", 1, expected)
    lines = JsonLines(json.dumps(document, indent=2))
    for path, line in expected.items():
        assert lines(path) == {"line": line}, path
