"""``--format sarif`` output, validated against the official SARIF 2.1.0 JSON schema.

Schema: OASIS SARIF 2.1.0 (Errata 01), kept in ``tests/data/`` with its source note.
"""

from __future__ import annotations

import inspect
import json
from pathlib import Path
from typing import Any

import jsonschema
import pytest

from sheetlint.cli import main
from sheetlint.relations.registry import all_relations, rule_ids
from tests.conftest import pmx15

SCHEMA_PATH = Path(__file__).parent / "data" / "sarif-schema-2.1.0.json"
PDF_FIXTURE = Path(__file__).parent.parent / "fixtures" / "pdf" / "pump_motor_en.pdf"

CONSISTENT = pmx15()
#: torque 15 % above P/omega: a power-torque-speed error (P = T*omega, SI definition)
PLANTED = CONSISTENT.replace('"95.5 N*m"', '"110 N*m"').replace("PMX-15", "PMX-15T")
TORQUE_LINE = 5  # line of "torque:" in the records above


@pytest.fixture(scope="module")
def validator() -> jsonschema.Draft4Validator:
    schema = json.loads(SCHEMA_PATH.read_text(encoding="utf-8"))
    jsonschema.Draft4Validator.check_schema(schema)
    return jsonschema.Draft4Validator(schema)


def _sarif(capsys: pytest.CaptureFixture[str], *paths: str) -> tuple[int, dict[str, Any]]:
    status = main(["check", "--no-settings", "--format", "sarif", *paths])
    return status, json.loads(capsys.readouterr().out)


def _assert_valid(validator: jsonschema.Draft4Validator, log: dict[str, Any]) -> None:
    errors = sorted(validator.iter_errors(log), key=lambda e: list(e.absolute_path))
    assert not errors, "\n".join(f"{list(e.absolute_path)}: {e.message}" for e in errors[:5])


@pytest.fixture
def batch(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> list[str]:
    monkeypatch.chdir(tmp_path)
    (tmp_path / "motors").mkdir()
    (tmp_path / "motors" / "good.yaml").write_text(CONSISTENT, encoding="utf-8")
    (tmp_path / "motors" / "planted.yaml").write_text(PLANTED, encoding="utf-8")
    (tmp_path / "motors" / "broken.yaml").write_text("id: [unclosed\n", encoding="utf-8")
    (tmp_path / "motors" / "two.json").write_text(json.dumps(
        {"records": [{"id": "Invented A"}, {"maker": "no id"}]}), encoding="utf-8")
    return ["motors", "missing-folder"]


def test_mixed_batch_validates_against_sarif_2_1_0_schema(
        batch: list[str], validator: jsonschema.Draft4Validator,
        capsys: pytest.CaptureFixture[str]):
    status, log = _sarif(capsys, *batch)
    assert status == 2  # unreadable file and record win (DESIGN.md exit status)
    _assert_valid(validator, log)
    assert log["version"] == "2.1.0"
    run = log["runs"][0]
    assert run["invocations"][0]["executionSuccessful"] is False
    assert len(run["invocations"][0]["toolExecutionNotifications"]) == 3


def test_planted_error_is_an_error_result_with_line_and_relative_uri(
        batch: list[str], capsys: pytest.CaptureFixture[str]):
    _, log = _sarif(capsys, *batch)
    run = log["runs"][0]
    result = next(r for r in run["results"] if r["ruleId"] == "power-torque-speed")
    assert result["level"] == "error"
    location = result["locations"][0]["physicalLocation"]
    assert location["artifactLocation"]["uri"] == "motors/planted.yaml"
    assert location["region"]["startLine"] == TORQUE_LINE
    props = result["properties"]
    assert "rated.torque" in props["fields"]
    assert props["actual"]["rated.torque"].startswith("110")
    assert props["expected"]["rated.torque"].startswith("95.")
    assert props["deviation"] == pytest.approx(110 / 95.49 - 1, abs=2e-3)
    assert props["record"] == "Invented PMX-15T"
    assert "110" in result["message"]["text"]
    # ruleIndex points at the descriptor of the same rule
    assert run["tool"]["driver"]["rules"][result["ruleIndex"]]["id"] == "power-torque-speed"


def test_levels_map_info_to_note_and_unreadable_to_error(
        batch: list[str], capsys: pytest.CaptureFixture[str]):
    _, log = _sarif(capsys, *batch)
    results = log["runs"][0]["results"]
    assert {r["level"] for r in results} <= {"error", "warning", "note"}
    unreadable = [r for r in results if r["ruleId"] == "unreadable"]
    uris = sorted(r["locations"][0]["physicalLocation"]["artifactLocation"]["uri"]
                  for r in unreadable)
    assert uris == ["missing-folder", "motors/broken.yaml", "motors/two.json"]
    assert all(r["level"] == "error" for r in unreadable)
    # the JSON report says which findings are info; SARIF must call exactly those "note"
    main(["check", "--no-settings", "--format", "json", *batch])
    data = json.loads(capsys.readouterr().out)
    infos = sum(1 for f in data["files"] for r in f["records"] for x in r["findings"]
                if x["severity"] == "info")
    assert sum(1 for r in results if r["level"] == "note") == infos


def test_driver_rules_describe_every_registered_rule_with_its_docstring(
        batch: list[str], capsys: pytest.CaptureFixture[str]):
    _, log = _sarif(capsys, *batch)
    descriptors = {d["id"]: d for d in log["runs"][0]["tool"]["driver"]["rules"]}
    assert set(rule_ids()) <= set(descriptors)
    for relation in all_relations():
        d = descriptors[relation.rule]
        assert d["shortDescription"]["text"]
        assert d["fullDescription"]["text"]
        first_doc_line = inspect.cleandoc(type(relation).__doc__ or "").splitlines()[0]
        assert first_doc_line in d["help"]["text"]
        assert d["properties"]["status"] in ("established", "trial")


def test_pdf_findings_name_page_and_cell(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                         validator: jsonschema.Draft4Validator,
                                         capsys: pytest.CaptureFixture[str]):
    if not PDF_FIXTURE.exists():
        pytest.skip("demo PDF fixtures/pdf/pump_motor_en.pdf not present")
    monkeypatch.chdir(PDF_FIXTURE.parent)
    status, log = _sarif(capsys, PDF_FIXTURE.name)
    assert status in (0, 1)
    _assert_valid(validator, log)
    located = [r for r in log["runs"][0]["results"]
               if "message" in r["locations"][0]]
    assert located, "the PDF fixture gives at least one finding located by page"
    for r in located:
        location = r["locations"][0]
        assert location["message"]["text"].startswith("page ")
        assert "region" not in location["physicalLocation"]
        assert any(x["kind"] == "element" and x["name"].startswith("page ")
                   for x in location["logicalLocations"])


def test_consistent_record_has_no_error_result(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                               validator: jsonschema.Draft4Validator,
                                               capsys: pytest.CaptureFixture[str]):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "good.yaml").write_text(CONSISTENT, encoding="utf-8")
    status, log = _sarif(capsys, "good.yaml")
    _assert_valid(validator, log)
    assert status == 0
    assert not [r for r in log["runs"][0]["results"] if r["level"] == "error"]
    assert log["runs"][0]["invocations"][0]["executionSuccessful"] is True


def test_sarif_to_file_with_output_option(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                          validator: jsonschema.Draft4Validator,
                                          capsys: pytest.CaptureFixture[str]):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "planted.yaml").write_text(PLANTED, encoding="utf-8")
    status = main(["check", "--no-settings", "--format", "sarif", "planted.yaml",
                   "-o", "out.sarif"])
    assert status == 1
    assert capsys.readouterr().out == ""
    _assert_valid(validator, json.loads((tmp_path / "out.sarif").read_text(encoding="utf-8")))
