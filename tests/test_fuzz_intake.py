"""Fuzzing the JSON/YAML loaders: any bytes give raw records or an InputProblem, nothing else.

Arbitrary JSON-like structures (written as JSON and as YAML), arbitrary text and bytes, and
YAML-specific constructs (anchors, aliases, tags, flow and block styles) go through
``load_records``; every raw record then goes through ``check_record``, which must return a
result (findings or an error message) for any structure.
"""

from __future__ import annotations

import json
import math
from pathlib import Path
from typing import Any

import yaml
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from sheetlint.engine.run import RecordResult, check_record
from sheetlint.intake.records import InputProblem, load_records

FUZZ = settings(max_examples=120, deadline=None,
                suppress_health_check=[HealthCheck.too_slow,
                                       HealthCheck.function_scoped_fixture])

KEYS = st.one_of(
    st.sampled_from(["id", "records", "rated", "machine", "power", "value", "unit", "basis",
                     "poles", "speed", "torque", "emf", "constant", "points", "accepted", "rule",
                     "reason", "temperature", "losses", "copper", "efficiency_class", "maker"]),
    st.text(max_size=8),
)
SCALARS = st.one_of(
    st.none(), st.booleans(), st.integers(min_value=-(10**30), max_value=10**30),
    st.floats(allow_nan=False, allow_infinity=False),
    st.text(max_size=16),
    st.sampled_from(["15 kW", "1500 rpm", "95.5 N*m", "nan kW", "1e308 kW", "-1 V", "0.95",
                     "101 %", "F", "IE4", "spm", "ipm"]),
)
JSON_LIKE = st.recursive(
    SCALARS,
    lambda children: st.one_of(st.lists(children, max_size=4),
                               st.dictionaries(KEYS, children, max_size=5)),
    max_leaves=25,
)


def _load(path: Path) -> list[Any] | None:
    """Raw records, or None for a refused file; fails on any other exception."""
    try:
        loaded = load_records(path)
    except InputProblem as exc:
        assert str(path) in str(exc), "the message names the file"
        return None
    return loaded.records


def _check_all(records: list[Any]) -> None:
    for raw in records:
        result = check_record(raw)
        assert isinstance(result, RecordResult)
        assert result.error is None or (isinstance(result.error, str) and result.error)


@FUZZ
@given(data=JSON_LIKE, wrap=st.booleans(), give_id=st.booleans())
@example(data=[1, 2], wrap=False, give_id=False)
@example(data={"records": 5}, wrap=False, give_id=False)
@example(data={"<<": None}, wrap=False, give_id=False)  # quoted in YAML: a key, not a merge
def test_any_structure_as_json_and_yaml(tmp_path, data, wrap, give_id):
    if give_id and isinstance(data, dict):
        data = {"id": "FZ-1", **data}
    if wrap:
        data = {"records": [data, {"id": "FZ-2", "rated": {"power": "15 kW"}}]}
    json_path = tmp_path / "doc.json"
    json_path.write_text(json.dumps(data), encoding="utf-8")
    yaml_path = tmp_path / "doc.yaml"
    yaml_path.write_text(yaml.safe_dump(data, allow_unicode=True), encoding="utf-8")
    from_json, from_yaml = _load(json_path), _load(yaml_path)
    assert (from_json is None) == (from_yaml is None), "JSON and YAML are equivalent"
    if from_json is not None and from_yaml is not None:
        assert len(from_json) == len(from_yaml)
        _check_all(from_json)
        _check_all(from_yaml)


@FUZZ
@given(content=st.binary(max_size=300), suffix=st.sampled_from([".json", ".yaml", ".yml"]))
def test_any_bytes(tmp_path, content, suffix):
    path = tmp_path / f"blob{suffix}"
    path.write_bytes(content)
    records = _load(path)
    if records is not None:
        _check_all(records)


YAML_PIECES = st.sampled_from([
    "id: A\n", "records:\n", "- ", "  ", "&a ", "*a", "!!str ", "!!float ", "!!binary ", "!!set ",
    "!!python/object:os.system ", "? ", ": ", "{", "}", "[", "]", ",", "|\n", ">\n", "'", '"',
    "\t", "\n", "---\n", "...\n", "<<: *a\n", "rated:\n", "  power: 15 kW\n", ".nan", ".inf",
    "-.inf", "0x1F", "0o17", "1_000", "1e3", "12:30:00", "2024-01-01", "~", "null", "yes", "no",
    "%YAML 1.1\n", "#", "\\u0000", "é", "°C", "\ufeff",
])


@FUZZ
@given(pieces=st.lists(YAML_PIECES, max_size=30))
@example(pieces=["a: &a [1]\n", "b: *a\n", "id: A\n"])
@example(pieces=["!!python/object:os.system ", "x"])
def test_yaml_token_soup(tmp_path, pieces):
    path = tmp_path / "soup.yaml"
    path.write_text("".join(pieces), encoding="utf-8")
    records = _load(path)
    if records is not None:
        _check_all(records)


@FUZZ
@given(number=st.one_of(st.floats(allow_nan=False, allow_infinity=False),
                        st.integers(min_value=-(10**400), max_value=10**400)))
def test_numbers_keep_their_written_text_or_are_refused(tmp_path, number):
    """A number read from JSON keeps its value (finite) so uncertainty can use its digits."""
    path = tmp_path / "n.json"
    path.write_text(json.dumps({"id": "A", "maker": "x", "n": number}), encoding="utf-8")
    records = _load(path)
    assert records is not None
    value = records[0].data["n"]
    if isinstance(number, float):
        assert value == number and math.isfinite(value)
    _check_all(records)


@FUZZ
@given(depth=st.integers(min_value=1, max_value=3000), kind=st.sampled_from(["[", "{"]),
       suffix=st.sampled_from([".json", ".yaml"]))
def test_nesting_at_any_depth_is_read_or_refused(tmp_path, depth, kind, suffix):
    if kind == "[":
        body = "[" * depth + "]" * depth
    else:
        body = '{"a": ' * depth + "1" + "}" * depth
    path = tmp_path / f"deep{suffix}"
    path.write_text('{"id": "A", "x": ' + body + "}", encoding="utf-8")
    records = _load(path)
    if depth > 70:
        assert records is None
    if records is not None:
        _check_all(records)
