"""The committed JSON Schema stays in sync; the JSON output follows DESIGN.md's contract."""

from __future__ import annotations

import json
from pathlib import Path

import jsonschema

from sheetlint.cli import main
from sheetlint.model import file_json_schema

ROOT = Path(__file__).resolve().parent.parent

# The output contract of DESIGN.md ("Output contract"), written out as a schema by hand.
OUTPUT_CONTRACT = {
    "type": "object",
    "required": ["tool", "version", "files", "summary"],
    "properties": {
        "tool": {"const": "sheetlint"},
        "version": {"type": "string"},
        "files": {"type": "array", "items": {
            "type": "object", "required": ["path", "error", "records"],
            "properties": {
                "path": {"type": "string"}, "error": {"type": ["string", "null"]},
                "records": {"type": "array", "items": {
                    "type": "object", "required": ["id", "error", "findings", "derived"],
                    "properties": {
                        "id": {"type": "string"}, "error": {"type": ["string", "null"]},
                        "findings": {"type": "array", "items": {
                            "type": "object",
                            "required": ["rule", "severity", "message", "fields", "expected",
                                         "actual", "deviation", "cause", "source", "location"],
                            "properties": {
                                "rule": {"type": "string"},
                                "severity": {"enum": ["error", "warning", "info"]},
                                "message": {"type": "string"},
                                "fields": {"type": "array", "items": {"type": "string"}},
                                "expected": {"type": "object",
                                             "additionalProperties": {"type": "string"}},
                                "actual": {"type": "object",
                                           "additionalProperties": {"type": "string"}},
                                "deviation": {"type": ["number", "null"]},
                                "cause": {"type": ["string", "null"]},
                                "source": {"type": "string"},
                                "location": {"anyOf": [
                                    {"type": "null"},
                                    {"type": "object", "required": ["line"]},
                                    {"type": "object", "required": ["page"]}]}}}},
                        "derived": {"type": "object", "additionalProperties": {
                            "type": "object",
                            "required": ["value", "unit", "estimate", "rule", "from"],
                            "properties": {"value": {"type": "number"},
                                           "unit": {"type": "string"},
                                           "estimate": {"type": "boolean"},
                                           "rule": {"type": "string"},
                                           "from": {"type": "array"}}}}}}}}}},
        "summary": {"type": "object",
                    "required": ["files", "records", "error", "warning", "info"]},
    },
}


def test_committed_schema_matches_the_model():
    committed = json.loads((ROOT / "schema" / "pm-machine.schema.json").read_text())
    assert committed == json.loads(json.dumps(file_json_schema())), (
        "schema/pm-machine.schema.json is stale: "
        "run `sheetlint schema > schema/pm-machine.schema.json`")


def test_demo_records_validate_against_the_committed_schema():
    import yaml

    schema = json.loads((ROOT / "schema" / "pm-machine.schema.json").read_text())
    for path in sorted((ROOT / "fixtures").glob("*.yaml")):
        jsonschema.validate(yaml.safe_load(path.read_text()), schema)


def test_json_output_follows_the_contract(capsys):
    status = main(["check", "--format", "json", str(ROOT / "fixtures")])
    out = json.loads(capsys.readouterr().out)
    jsonschema.validate(out, OUTPUT_CONTRACT)
    assert status == 1  # planted errors in the demo data
    finding = next(f for file in out["files"] for r in file["records"] for f in r["findings"]
                   if f["rule"] == "power-torque-speed")
    assert finding["location"]["line"] > 0
    assert finding["deviation"] == finding["deviation"]  # a number
