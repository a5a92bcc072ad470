"""PDF extraction against the committed fixtures of ``fixtures/pdf/``.

The fixtures are drawn by ``tools/make_pdf_fixtures.py`` from the layouts real sheets use,
independently of the extractor; each ``*.expected`` lists every field the sheet holds.
Comparing extraction with them is a check against what was drawn on the page, not against
the extractor's own output.
"""

from __future__ import annotations

import json
import math
import sys
from pathlib import Path
from typing import Any

import pytest
import yaml

from sheetlint.intake.pdf import (
    PdfError,
    dump_records,
    extract_pdf,
    normalise_number,
    vocabulary,
)

FIXTURES = Path(__file__).resolve().parent.parent / "fixtures" / "pdf"
EXPECTED = sorted(FIXTURES.glob("*.expected"))


def flatten(data: dict[str, Any], prefix: str = "") -> dict[str, Any]:
    """Dotted paths to leaf values; object-form values (with "value") are leaves."""
    flat: dict[str, Any] = {}
    for key, value in data.items():
        path = f"{prefix}{key}"
        if isinstance(value, dict) and "value" not in value:
            flat.update(flatten(value, path + "."))
        else:
            flat[path] = value
    return flat


def same_value(actual: Any, expected: Any) -> bool:
    if isinstance(expected, dict):
        if not isinstance(actual, dict) or set(actual) != set(expected):
            return False
        return all(math.isclose(actual[k], v) if k == "value" else actual[k] == v
                   for k, v in expected.items())
    return actual == expected


def load(path: Path) -> dict[str, Any]:
    return json.loads(path.read_text(encoding="utf-8"))


@pytest.mark.parametrize("expected_file", EXPECTED, ids=lambda p: p.name.split(".")[0])
def test_fixture_fields_match_what_was_drawn(expected_file: Path) -> None:
    expected = load(expected_file)
    pdf = FIXTURES / expected["pdf"]
    if "error_contains" in expected:
        with pytest.raises(PdfError, match=expected["error_contains"]):
            extract_pdf(pdf)
        return
    extraction = extract_pdf(pdf)
    assert extraction.pages == expected["pages"]
    assert len(extraction.records) == len(expected["records"])
    for record, wanted in zip(extraction.records, expected["records"], strict=True):
        actual_flat = flatten(record.data)
        wanted_flat = flatten(wanted["data"])
        missing = sorted(set(wanted_flat) - set(actual_flat))
        extra = sorted(set(actual_flat) - set(wanted_flat))
        wrong = {p: (actual_flat[p], wanted_flat[p]) for p in wanted_flat
                 if p in actual_flat and not same_value(actual_flat[p], wanted_flat[p])}
        assert (missing, extra, wrong) == ([], [], {}), record.data.get("id")
        for path in wanted_flat:
            where = record.locations.get(path)
            if path == "emf.magnet_temperature" or where is None:
                where = record.locations.get(path.rsplit(".", 1)[0] + ".constant", where)
            assert where is not None, path
            assert where["page"] == wanted.get("field_pages", {}).get(path, wanted["page"]), path
            assert where["cell"], path
    labels = [u["label"] for u in extraction.unmapped]
    for label in expected["unmapped_labels"]:
        assert label in labels
    for text in expected["notes_contain"]:
        assert any(text in note for note in extraction.notes), extraction.notes


def test_every_cell_location_holds_the_number_it_gave() -> None:
    extraction = extract_pdf(FIXTURES / "pump_motor_en.pdf")
    record = extraction.records[0]
    assert record.locations["rated.power"] == {"page": 1,
                                               "cell": "Rated output power | 75 | kW"}
    assert "51.6" in record.locations["circuit.resistance"]["cell"]


def test_catalogue_rows_keep_their_page_across_the_continuation() -> None:
    extraction = extract_pdf(FIXTURES / "blower_catalogue.pdf")
    pages = [r.locations["rated.power"]["page"] for r in extraction.records]
    assert pages == [1] * 5 + [2] * 3 + [3] * 2
    assert extraction.records[-1].locations["rated.power"]["cell"].startswith("NW-G 90-6")


@pytest.mark.parametrize("expected_file", [p for p in EXPECTED if "error" not in load(p)],
                         ids=lambda p: p.name.split(".")[0])
def test_fixture_data_obey_power_torque_speed_and_synchronous_speed(expected_file: Path
                                                                    ) -> None:
    """The invented data are physically consistent: P = T*2*pi*n/60 (SI definition of
    power), f = p*n/60, P = eta*sqrt(3)*U*I*cos(phi) (three-phase power), each within the
    rounding of the printed digits (4 significant digits -> a few 1e-4)."""
    for record in load(expected_file)["records"]:
        rated = record["data"]["rated"]
        number = {k: float(str(v).split()[0]) for k, v in rated.items()}
        power = number["power"] * 1e3
        torque, speed = number["torque"], number["speed"]
        assert math.isclose(power, torque * 2 * math.pi * speed / 60, rel_tol=1e-3)
        machine = record["data"].get("machine", {})
        pole_pairs = machine.get("pole_pairs") or machine.get("poles", 0) / 2
        if "frequency" in number:
            assert math.isclose(number["frequency"], pole_pairs * speed / 60, rel_tol=1e-9)
        if {"voltage", "current", "power_factor", "efficiency"} <= set(number):
            electrical = (number["efficiency"] / 100 * math.sqrt(3) * number["voltage"]
                          * number["current"] * number["power_factor"])
            assert math.isclose(power, electrical, rel_tol=6e-3)


@pytest.mark.parametrize("fmt", ["json", "yaml"])
def test_dump_records_loads_back_to_the_same_records(fmt: str) -> None:
    extraction = extract_pdf(FIXTURES / "blower_motor_de.pdf")
    text = dump_records(extraction, fmt)
    loaded = json.loads(text) if fmt == "json" else yaml.safe_load(text)
    assert loaded["records"] == [r.data for r in extraction.records]


def test_extract_writes_where_each_value_was_read() -> None:
    """Issue 18: provenance beside each value (YAML comment, JSON "locations")."""
    extraction = extract_pdf(FIXTURES / "blower_catalogue.pdf")
    text = dump_records(extraction, "yaml")
    power_lines = [line for line in text.splitlines() if line.strip().startswith("power:")]
    assert len(power_lines) == len(extraction.records)
    assert all("  # p." in line for line in power_lines)
    assert "  # p.2: " in text and "  # p.3: " in text
    document = json.loads(dump_records(extraction, "json"))
    assert [loc["rated.power"]["page"] for loc in document["locations"]] == [
        r.locations["rated.power"]["page"] for r in extraction.records]


def test_dump_records_rejects_an_unknown_format() -> None:
    extraction = extract_pdf(FIXTURES / "blower_motor_de.pdf")
    with pytest.raises(ValueError, match="unknown format"):
        dump_records(extraction, "toml")


@pytest.mark.parametrize(("text", "decimal_comma", "expected"), [
    ("0,95", None, "0.95"),
    ("1\u2009500", None, "1500"),
    ("1 500", True, "1500"),
    ("1.500", True, "1500"),  # German thousands point on a decimal-comma page
    ("1,500", False, "1500"),  # English thousands comma on a decimal-point page
    ("1,5", False, "1.5"),
    ("1.234,5", None, "1234.5"),
    ("1,234.5", None, "1234.5"),
    ("0.0250", None, "0.0250"),  # trailing zeros are digits the engine counts
    ("12 34", None, None),
    ("-40", None, "-40"),
])
def test_number_spellings_of_the_trade(text: str, decimal_comma: bool | None,
                                       expected: str | None) -> None:
    # common practice: DIN 1333 / ISO 80000-1 write a decimal comma and group digits by three
    assert normalise_number(text, decimal_comma) == expected


@pytest.mark.parametrize(("label", "path", "unit", "qualifiers"), [
    ("Rated power [kW]", "rated.power", "kW", {}),
    ("Bemessungsmoment (Nm)", "rated.torque", "Nm", {}),
    ("Rated speed / rpm", "rated.speed", "rpm", {}),
    ("Peak torque (10 s)", "limits.peak_torque", None, {"duration": "10 s"}),
    ("Back-EMF constant L-L rms", "emf.constant", None, {"line": "line", "rms": "rms"}),
    ("EMK-Konstante (Strang)", "emf.constant", None, {"phase": "phase"}),
    ("R (line-line) at 20 °C", "circuit.resistance", None,
     {"line": "line", "temperature": "20 °C"}),
    ("Leistungsfaktor cos φ", "rated.power_factor", None, {}),
    ("Rated power P_N", "rated.power", None, {}),
    ("Polpaarzahl", "machine.pole_pairs", None, {}),
    ("No-load current", None, None, {}),
])
def test_labels_in_english_and_german(label: str, path: str | None, unit: str | None,
                                      qualifiers: dict[str, str]) -> None:
    match = vocabulary().match_label(label)
    if path is None:
        assert match is None
        return
    assert match is not None
    assert (match.path, match.unit, match.qualifiers) == (path, unit, qualifiers)


def test_fixture_generator_is_deterministic(tmp_path: Path) -> None:
    """Regenerating the fixtures reproduces the committed bytes (fixed creation date)."""
    pytest.importorskip("fpdf")
    import importlib.util

    spec = importlib.util.spec_from_file_location(
        "make_pdf_fixtures", FIXTURES.parent.parent / "tools" / "make_pdf_fixtures.py")
    assert spec and spec.loader
    generator = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = generator
    try:
        spec.loader.exec_module(generator)
    finally:
        del sys.modules[spec.name]
    if generator.find_font() is None:
        pytest.skip("DejaVuSans.ttf is not installed")
    generator.build("pump_motor_en", tmp_path)
    assert (tmp_path / "pump_motor_en.pdf").read_bytes() == \
        (FIXTURES / "pump_motor_en.pdf").read_bytes()
    assert load(tmp_path / "pump_motor_en.expected") == \
        load(FIXTURES / "pump_motor_en.expected")


@pytest.mark.parametrize("fmt", ["json", "yaml"])
@pytest.mark.parametrize("name", ["pump_motor_en", "blower_motor_de", "blower_catalogue",
                                  "pump_two_tables", "scanned_appendix"])
def test_dumped_records_pass_the_normal_intake_and_model(tmp_path: Path, name: str,
                                                        fmt: str) -> None:
    """What ``sheetlint extract`` writes loads back through the JSON/YAML intake and the
    record model without a file or record error."""
    from sheetlint.intake.records import load_records
    from sheetlint.model import MachineRecord

    extraction = extract_pdf(FIXTURES / f"{name}.pdf")
    path = tmp_path / f"{name}.{fmt}"
    path.write_text(dump_records(extraction, fmt), encoding="utf-8")
    loaded = load_records(path)
    assert len(loaded.records) == len(extraction.records)
    for raw, record in zip(loaded.records, extraction.records, strict=True):
        assert raw.data == record.data
        MachineRecord.model_validate(raw.data)
