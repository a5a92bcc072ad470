"""Requirement file errors, the requirement's JSON Schema, and the output formats of compare.

These are structural tests (shape, exit status, messages); the statuses themselves are
checked against hand calculations in test_compare_tender.py.
"""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import jsonschema
import pytest
import yaml

from sheetlint.compare import formats
from sheetlint.compare.offers import compare_offers
from sheetlint.compare.requirement import (
    RequirementProblem,
    read_requirement,
    requirement_from_data,
    requirement_json_schema,
)

TENDER = Path(__file__).resolve().parent.parent / "fixtures" / "tender"
OFFERS = sorted(str(p) for p in TENDER.glob("offer-*.yaml"))
REQUIREMENT = str(TENDER / "raw-water-pump.requirement")


@pytest.fixture(scope="module")
def comparison():
    return compare_offers(OFFERS, read_requirement(REQUIREMENT))


@pytest.mark.parametrize(("data", "named"), [
    ({"duty": [{"speed": "1500 rpm", "torque": "1000 kW"}]}, "duty[0].torque"),
    ({"duty": [{"speed": "1500 Hz", "torque": "1000 N*m"}]}, "duty[0].speed"),
    ({"duty": [{"torque": "1000 N*m"}]}, "duty[0].speed"),
    ({"converter": {"max_curent": "190 A"}}, "converter.max_curent"),
    ({"site": {"ambient": "hot"}}, "site.ambient"),
    ({"efficiency_class": "IE7"}, "efficiency_class"),
    ({"thermal": {"class": "Z"}}, "thermal.class"),
    ({"limits": {"emf_margin": "150 %"}}, "limits.emf_margin"),
    ({"speed_range": {"min": "2000 rpm", "max": "1800 rpm"}}, "speed_range"),
    (["not", "a", "mapping"], "mapping"),
])
def test_bad_requirement_names_the_field(data, named):
    with pytest.raises(RequirementProblem) as caught:
        requirement_from_data(data, "req.yaml")
    assert named in str(caught.value) and "req.yaml" in str(caught.value)


def test_requirement_schema_accepts_the_fixture_and_rejects_a_typo():
    schema = requirement_json_schema()
    jsonschema.Draft202012Validator.check_schema(schema)
    data = yaml.safe_load(Path(REQUIREMENT).read_text(encoding="utf-8"))
    jsonschema.validate(data, schema)
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate({**data, "convertor": {}}, schema)


def test_json_follows_the_design_shape(comparison):
    doc = json.loads(formats.render_json(comparison))
    assert doc["tool"] == "sheetlint" and doc["requirement"] == "Raw-water pump, line 2 (invented)"
    offer = doc["offers"][0]
    assert {"path", "id", "verdict", "findings", "figures", "requirements",
            "questions"} <= set(offer)
    assert offer["figures"]["rated.power"] == {"value": 170000.0, "unit": "W",
                                               "provenance": "stated"}
    row = offer["requirements"][1]
    assert {"requirement", "status", "detail", "margin", "needs"} <= set(row)
    assert any("not an approval" in c for c in doc["cautions"])


def test_csv_has_one_row_per_requirement_and_one_column_per_offer(comparison):
    rows = list(csv.reader(io.StringIO(formats.render_csv(comparison))))
    assert rows[0][0] == "offer" and len(rows[0]) == 1 + len(OFFERS)
    labels = [r[0] for r in rows]
    names = formats.requirement_names(comparison)
    for name in names:
        matching = [label for label in labels if label.startswith(name + ":")]
        assert len(matching) == 1, name
        assert matching[0].endswith("]")  # the unit in brackets
    assert "duty[0]: converter current at 1000 N·m, 1500 r/min [A]" in labels


def test_xlsx_reads_back_with_the_same_table(tmp_path, comparison):
    openpyxl = pytest.importorskip("openpyxl")
    path = tmp_path / "tender.xlsx"
    path.write_bytes(formats.render_xlsx(comparison))
    book = openpyxl.load_workbook(path)
    sheet = book["Comparison"]
    assert [c.value for c in sheet[1]][: 1 + len(OFFERS)] == ["offer", *[
        o.id for o in comparison.offers]]
    labels = [sheet.cell(row=r, column=1).value for r in range(1, sheet.max_row + 1)]
    assert "rated.power [kW]" in labels
    power_row = labels.index("rated.power [kW]") + 1
    assert sheet.cell(row=power_row, column=2).value == 170  # a number, not text
    assert {"Details", "Questions"} <= set(book.sheetnames)


@pytest.mark.parametrize(("text", "named"), [
    ("a: &x [1, 2]\nb: [*x, *x]\n", "aliases"),
    ("duty: [{speed: 1500 rpm, torque: 1000 N*m}\n", "not valid YAML"),
    ("[" * 5000 + "]" * 5000, "nested too deeply"),
    ("".join(" " * (2 * k) + f"k{k}:\n" for k in range(40)) + " " * 80 + "x: 1\n",
     "nested too deeply"),
])
def test_hostile_requirement_files_give_a_message(tmp_path, text, named):
    path = tmp_path / "req.yaml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(RequirementProblem) as caught:
        read_requirement(str(path))
    assert named in str(caught.value) and "req.yaml" in str(caught.value)
