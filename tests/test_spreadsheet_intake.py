"""Spreadsheet intake (CSV, XLSX), the table layouts shared with PDFs, hostile files, and
folders of mixed documents through ``check``.

The expected values are what the test writes into the cells (or, for the layout corpus,
the designs ``tools/make_layout_corpus.py`` draws from ``sheetlint.synth``): checks against
what was put on the sheet, not against the reader's own output.
"""

from __future__ import annotations

import importlib.util
import json
import shutil
import time
import zipfile
from pathlib import Path
from typing import Any

import pytest

from sheetlint.cli import main
from sheetlint.intake.spreadsheet import (
    SpreadsheetError,
    extract_spreadsheet,
    shown_text,
    sniff_delimiter,
)
from tools import make_layout_corpus

ROOT = Path(__file__).resolve().parent.parent


def records_of(path: Path) -> list[dict[str, Any]]:
    return [r.data for r in extract_spreadsheet(path).records]


def test_semicolon_csv_with_bom_decimal_comma_and_a_title_row(tmp_path: Path) -> None:
    path = tmp_path / "katalog.csv"
    path.write_bytes("\ufeffBaureihe NW-K (erfunden), 400 V, 6-polig, 40 °C Kühlmittel\n"
                     "Typ;Nennleistung;Nenndrehzahl;Nennmoment;Wirkungsgrad\n"
                     ";kW;min-1;Nm;%\n"
                     "NW-K 11;11;3 000;35,01;94,1\n"
                     "NW-K 15;15;3 000;47,75;94,5\n".encode())
    first, second = records_of(path)
    assert first["id"] == "NW-K 11"
    assert first["rated"] == {"power": "11 kW", "speed": "3000 min-1", "torque": "35.01 Nm",
                              "efficiency": "94.1 %", "voltage": "400 V"}
    assert first["machine"] == {"poles": 6, "ambient": "40 °C"}
    assert second["rated"]["torque"] == "47.75 Nm"
    locations = extract_spreadsheet(path).records[0].locations
    assert locations["rated.torque"] == {"line": 4, "cell": "D4"}


def test_one_machine_per_column_with_unit_column_and_footnote_marks(tmp_path: Path) -> None:
    path = tmp_path / "variants.csv"
    path.write_text("Parameter,Unit,KS-A 1,KS-A 2\n"
                    "Rated power,kW,5.5,7.5\n"
                    "Rated speed,rpm,1500¹,1500\n"
                    "Number of poles,,4,4\n"
                    "Efficiency,%,92.1 *,93.0\n"
                    "Paint colour,,RAL 5010,RAL 5010\n", encoding="utf-8")
    extraction = extract_spreadsheet(path)
    first, second = (r.data for r in extraction.records)
    assert first == {"id": "KS-A 1", "rated": {"power": "5.5 kW", "speed": "1500 rpm",
                                               "efficiency": "92.1 %"},
                     "machine": {"poles": 4}}
    assert second["rated"]["power"] == "7.5 kW"
    assert any(u["label"] == "Paint colour" for u in extraction.unmapped)


def test_delimiter_is_the_one_that_makes_a_regular_table() -> None:
    assert sniff_delimiter(["a;b;c", "1,5;2,5;3"]) == ";"
    assert sniff_delimiter(["a\tb\tc", "1\t2\t3"]) == "\t"
    assert sniff_delimiter(["a,b,c", "1,2,3"]) == ","


@pytest.mark.parametrize(("value", "number_format", "shown"), [
    (0.925, "0.0%", "92.5 %"),
    (0.925, "0%", "92 %"),  # Python rounds half to even, as the sheet's display may not
    (1500, '#,##0 "rpm"', "1500 rpm"),
    (0.12345, "0.00", "0.12"),
    (0.12345, "General", "0.12345"),
    (75, "General", "75"),
    ("star", "General", "star"),
])
def test_number_formats_are_read_as_shown(value: Any, number_format: str, shown: str) -> None:
    assert shown_text(value, number_format) == shown


def test_xlsx_percent_format_and_sheet_cell_provenance(tmp_path: Path) -> None:
    openpyxl = pytest.importorskip("openpyxl")
    path = tmp_path / "catalogue.xlsx"
    workbook = openpyxl.Workbook()
    sheet = workbook.active
    sheet.title = "Catalogue"
    sheet.append(["Series BW-X (invented), 690 V, 8 poles"])
    sheet.append([])
    sheet.append(["Type", "Rated power [kW]", "Rated speed [rpm]", "Efficiency"])
    sheet.append(["BW-X 90", 90, 1000, 0.962])
    sheet["D4"].number_format = "0.0%"
    workbook.save(path)
    extraction = extract_spreadsheet(path)
    (record,) = extraction.records
    assert record.data["rated"] == {"power": "90 kW", "speed": "1000 rpm",
                                    "efficiency": "96.2 %", "voltage": "690 V"}
    assert record.data["machine"] == {"poles": 8}
    assert record.locations["rated.efficiency"] == {"sheet": "Catalogue", "cell": "D4"}
    assert record.locations["rated.voltage"] == {"sheet": "Catalogue", "cell": "A1"}


# --------------------------------------------------------------------------- hostile files


def refused(path: Path) -> str:
    started = time.perf_counter()
    with pytest.raises(SpreadsheetError) as caught:
        extract_spreadsheet(path)
    assert time.perf_counter() - started < 10
    assert str(path) in str(caught.value)
    return str(caught.value)


def test_zero_bytes(tmp_path: Path) -> None:
    for name in ("empty.csv", "empty.xlsx"):
        path = tmp_path / name
        path.write_bytes(b"")
        assert "empty (0 bytes)" in refused(path)


def test_text_named_xlsx(tmp_path: Path) -> None:
    path = tmp_path / "notes.xlsx"
    path.write_text("Rated power;75 kW\n", encoding="utf-8")
    assert "not an .xlsx workbook" in refused(path)


def test_truncated_workbook(tmp_path: Path) -> None:
    openpyxl = pytest.importorskip("openpyxl")
    whole = tmp_path / "whole.xlsx"
    workbook = openpyxl.Workbook()
    workbook.active.append(["Type", "Rated power [kW]", "Rated speed [rpm]"])
    workbook.save(whole)
    path = tmp_path / "cut.xlsx"
    path.write_bytes(whole.read_bytes()[: whole.stat().st_size // 2])
    assert "damaged or truncated" in refused(path)


def test_huge_shared_string_table(tmp_path: Path) -> None:
    path = tmp_path / "strings.xlsx"
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as archive:
        archive.writestr("[Content_Types].xml", "<Types/>")
        archive.writestr("xl/sharedStrings.xml", "<sst>" + "<si><t>x</t></si>" * 1_500_000
                         + "</sst>")
    assert "shared-string table" in refused(path)


def test_ten_megabyte_single_line_csv(tmp_path: Path) -> None:
    path = tmp_path / "line.csv"
    path.write_bytes(b"1," * 5_000_000)
    assert "characters, more than" in refused(path)


def test_a_workbook_with_a_million_formatted_rows_is_read_in_bounded_time(
        tmp_path: Path) -> None:
    """A sheet formatted down to row 1,048,576 (the last row a workbook has): reading stops
    at the first long run of empty rows and at the row limit."""
    openpyxl = pytest.importorskip("openpyxl")
    from openpyxl.styles import Font

    plain = tmp_path / "plain.xlsx"
    workbook = openpyxl.Workbook()
    sheet = workbook.active
    sheet.append(["Type", "Rated power [kW]", "Rated speed [rpm]", "Rated torque [Nm]"])
    sheet.append(["NW-Z 1", 15, 1500, 95.5])
    sheet["A3"].font = Font(bold=True)  # a second cell style, index 1
    workbook.save(plain)
    path = tmp_path / "formatted.xlsx"
    empty_rows = "".join(f'<row r="{r}" s="1" customFormat="1"/>'
                         for r in range(4, 1_048_577))
    with zipfile.ZipFile(plain) as source, zipfile.ZipFile(path, "w",
                                                          zipfile.ZIP_DEFLATED) as target:
        for item in source.infolist():
            data = source.read(item.filename)
            if item.filename == "xl/worksheets/sheet1.xml":
                text = data.decode()
                text = text.replace("</sheetData>", empty_rows + "</sheetData>")
                text = text.replace('<dimension ref="A1:D3"/>', '<dimension ref="A1:D1048576"/>')
                data = text.encode()
            target.writestr(item, data)
    started = time.perf_counter()
    extraction = extract_spreadsheet(path)
    assert time.perf_counter() - started < 10
    assert [r.data["id"] for r in extraction.records] == ["NW-Z 1"]


# --------------------------------------------------------------------------- layouts


def bench_module() -> Any:
    spec = importlib.util.spec_from_file_location("bench_intake",
                                                  ROOT / "bench" / "bench_intake.py")
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def corpus(tmp_path_factory: pytest.TempPathFactory) -> Path:
    pytest.importorskip("fpdf")
    pytest.importorskip("openpyxl")
    folder = tmp_path_factory.mktemp("corpus")
    make_layout_corpus.build(folder, booklet_pages=6)
    return folder


@pytest.mark.parametrize("kind", ["csv", "xlsx", "pdf"])
def test_layout_corpus_fields_match_the_designs_drawn(corpus: Path, kind: str) -> None:
    """Every layout of the corpus, scored against the designs it was drawn from."""
    bench = bench_module()
    totals = {"records": 0, "found": 0, "expected": 0, "extracted": 0, "right": 0}
    for answer_file in sorted(corpus.glob("*.answer.json")):
        layout = answer_file.name.split(".")[0]
        answers = json.loads(answer_file.read_text())["records"]
        result = bench.score(answers, bench.read_document(corpus / f"{layout}.{kind}"))
        for key in totals:
            totals[key] += result[key]
    assert totals["found"] >= 0.95 * totals["records"]
    assert totals["right"] >= 0.95 * totals["expected"]
    assert totals["right"] >= 0.99 * totals["extracted"]


def test_catalogue_of_30_machines_over_two_pages_gives_30_records_with_their_page(
        corpus: Path) -> None:
    from sheetlint.intake.pdf import extract_pdf

    extraction = extract_pdf(corpus / "catalogue_30_two_pages.pdf")
    answers = json.loads((corpus / "catalogue_30_two_pages.answer.json").read_text())
    pages = {item["id"]: item["page"] for item in answers["records"]}
    assert len(extraction.records) == 30
    for record in extraction.records:
        assert record.locations["id"]["page"] == pages[record.data["id"]]


def test_booklet_gives_one_record_per_page(corpus: Path) -> None:
    from sheetlint.intake.pdf import extract_pdf

    extraction = extract_pdf(corpus / "booklet.pdf")
    assert [r.locations["rated.power"]["page"] for r in extraction.records] == list(
        range(1, 7))


def test_check_on_a_folder_of_json_yaml_pdf_csv_and_xlsx_checks_them_all(
        corpus: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    folder = tmp_path / "mixed"
    folder.mkdir()
    shutil.copy(ROOT / "fixtures" / "consistent-spm-160k-raw-water-pump.yaml", folder)
    (folder / "one.json").write_text(json.dumps({"id": "J-1 (invented)",
                                                 "rated": {"power": "15 kW"}}))
    for name in ("catalogue_units_row.pdf", "symbol_headers.csv", "booklet.xlsx"):
        shutil.copy(corpus / name, folder)
    (folder / "notes.csv").write_text("just,some,words\n", encoding="utf-8")
    main(["check", "--format", "json", str(folder)])
    files = {Path(f["path"]).name: f for f in json.loads(capsys.readouterr().out)["files"]}
    assert set(files) == {"consistent-spm-160k-raw-water-pump.yaml", "one.json",
                          "catalogue_units_row.pdf", "symbol_headers.csv", "booklet.xlsx",
                          "notes.csv"}
    assert len(files["catalogue_units_row.pdf"]["records"]) == 12
    assert len(files["symbol_headers.csv"]["records"]) == 10
    assert len(files["booklet.xlsx"]["records"]) == 6
    assert "no machine table" in files["notes.csv"]["skipped"]
    finding_locations = [x["location"] for f in ("catalogue_units_row.pdf", "booklet.xlsx")
                         for r in files[f]["records"] for x in r["findings"]
                         if x["location"]]
    assert all("page" in loc or "sheet" in loc for loc in finding_locations)


def test_findings_carry_sheet_and_cell_in_json_sarif_html_and_text(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    """f = p·n/60 (synchronous speed): 4 poles at 1800 rpm make 60 Hz, not 50 Hz. The
    finding must point at a workbook cell of the fields it names."""
    openpyxl = pytest.importorskip("openpyxl")
    path = tmp_path / "offer.xlsx"
    workbook = openpyxl.Workbook()
    sheet = workbook.active
    sheet.title = "Offer"
    sheet.append(["Type", "Rated power [kW]", "Rated speed [rpm]", "Frequency [Hz]",
                  "Number of poles"])
    sheet.append(["KS-O 20 (invented)", 20, 1800, 50, 4])
    workbook.save(path)
    cells = {"C2", "D2", "E2"}
    main(["check", "--format", "json", str(path)])
    (record,) = json.loads(capsys.readouterr().out)["files"][0]["records"]
    found = [x for x in record["findings"] if x["rule"] == "synchronous-speed"]
    assert found and found[0]["location"]["sheet"] == "Offer"
    cell = found[0]["location"]["cell"]
    assert cell in cells
    main(["check", "--format", "sarif", str(path)])
    sarif = json.loads(capsys.readouterr().out)
    locations = [r["locations"][0] for r in sarif["runs"][0]["results"]
                 if r["ruleId"] == "synchronous-speed"]
    assert locations[0]["properties"] == {"sheet": "Offer", "cell": cell}
    main(["check", str(path)])
    assert f"Offer!{cell}" in capsys.readouterr().out
    out = tmp_path / "report.html"
    main(["report", str(path), "-o", str(out)])
    assert f"Offer!{cell}" in out.read_text(encoding="utf-8")


def test_extract_reads_a_csv_and_lists_what_it_could_not_map(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = tmp_path / "variants.csv"
    path.write_text("Parameter,Unit,KS-A 1\nRated power,kW,5.5\nPaint colour,,RAL 5010\n",
                    encoding="utf-8")
    assert main(["extract", str(path), "--show-unmapped"]) == 0
    captured = capsys.readouterr()
    document = json.loads(captured.out)
    assert document["records"] == [{"id": "KS-A 1", "rated": {"power": "5.5 kW"}}]
    assert document["locations"][0]["rated.power"] == {"line": 2, "cell": "C2"}
    assert "line 3, cell A3: Paint colour = RAL 5010" in captured.err


@pytest.mark.parametrize(("title", "expected"), [
    ("400 V, 6 poles, 40 °C coolant", {"rated.voltage": "400 V", "machine.poles": 6,
                                       "machine.ambient": "40 °C"}),
    ("Baureihe TS-K (erfunden), 690 V, 4-polig, IC411, S1",
     {"rated.voltage": "690 V", "machine.poles": 4, "machine.cooling": "IC411",
      "machine.duty": "S1"}),
    ("Series KS-S1 (invented), IE4-ready frame", {}),
    ("¹ at 20 °C winding temperature", {}),
    ("The motor drives the booster pump of the reservoir (invented). It is fed by a 400 V "
     "converter.", {}),
])
def test_values_common_to_a_table_from_its_title(title: str, expected: dict[str, Any]) -> None:
    from sheetlint.intake.spreadsheet_grid import GridReader, _Row

    reader = GridReader("title")
    found = reader.context_values(_Row(0, [(0, title)]), lambda r, c: {"cell": "A1"})
    assert {path: value for path, value, _where, _text in found} == expected


def test_hostile_spreadsheets_in_a_folder_exit_2_name_the_file_and_spare_the_others(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    (tmp_path / "empty.xlsx").write_bytes(b"")
    (tmp_path / "text.xlsx").write_text("Rated power;75 kW\n", encoding="utf-8")
    (tmp_path / "line.csv").write_bytes(b"1;" * 200_000)
    (tmp_path / "good.csv").write_text("Type;Rated power [kW];Rated speed [rpm]\n"
                                       "NW-G 1 (invented);15;1500\n", encoding="utf-8")
    status = main(["check", "--format", "json", str(tmp_path)])
    captured = capsys.readouterr()
    assert status == 2 and "Traceback" not in captured.err
    files = {Path(f["path"]).name: f for f in json.loads(captured.out)["files"]}
    for name in ("empty.xlsx", "text.xlsx", "line.csv"):
        assert name in files[name]["error"]
    assert [r["id"] for r in files["good.csv"]["records"]] == ["NW-G 1 (invented)"]


def test_group_header_row_and_a_header_cell_over_two_lines(tmp_path: Path) -> None:
    """A row naming groups of columns above the header, and a quoted header cell with a
    line break: the CSV's line of each value is its line in the file."""
    path = tmp_path / "group.csv"
    path.write_text(',Rated values,,,Winding\nType,Power [kW],Speed [rpm],Torque [Nm],'
                    '"Resistance\n[ohm]"\nX1 (invented),15,1500,95.5,0.12\n', encoding="utf-8")
    (record,) = extract_spreadsheet(path).records
    assert record.data == {"id": "X1 (invented)",
                           "rated": {"power": "15 kW", "speed": "1500 rpm",
                                     "torque": "95.5 Nm"},
                           "circuit": {"resistance": "0.12 ohm"}}
    assert record.locations["circuit.resistance"] == {"line": 4, "cell": "E3"}
