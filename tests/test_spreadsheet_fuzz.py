"""Any grid of cells through the table reader: records or nothing, never an exception.

Grids are drawn from the words tables are made of (labels, symbols, units, numbers in
several notations, footnote marks, model names) and from arbitrary text, so that the
reader meets headers without data, data without headers, labels in odd places and cells
that are almost numbers.
"""

from __future__ import annotations

import csv
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from sheetlint.intake.spreadsheet import SpreadsheetError, extract_spreadsheet
from sheetlint.intake.spreadsheet_grid import GridReader

WORDS = ["Type", "Typ", "Rated power", "Nennleistung", "Speed", "P_N", "n_N", "cos φ", "η",
         "K_E", "Efficiency [%]", "Rated torque (Nm)", "kW", "rpm", "min-1", "%", "V/krpm",
         "400 V, 6 poles, 40 °C coolant", "Section 690 V", "Manufacturer: X (invented)",
         "Parameter", "Unit", "star", "F", "IC411", "NW-1 (invented)", "1 500", "1,500",
         "0,95", "95.1¹", "92.5 *", "kW 75", "75 kW", "-", "", "", "", "n/a", "3.000,5",
         "Back-EMF constant [V/krpm] 137.3", ":", "1)", "[kW]", "/ A"]
CELL = st.one_of(st.sampled_from(WORDS), st.text(max_size=12),
                 st.floats(allow_nan=True, allow_infinity=True).map(str))
GRID = st.lists(st.lists(CELL, max_size=8), max_size=14)


@settings(max_examples=150, deadline=None)
@given(GRID)
def test_any_grid_gives_records_or_nothing(rows: list[list[str]]) -> None:
    reader = GridReader("fuzz")
    reader.read_grid(rows, lambda r, c: {"line": r + 1, "cell": f"{c}:{r}"}, {"line": 1})
    reader.read_grid(rows, lambda r, c: {"line": r + 1, "cell": f"{c}:{r}"}, {"line": 1},
                     decimal_comma=True)
    for record in reader.finish("fuzz"):
        assert isinstance(record.data.get("id"), str)
        for location in record.locations.values():
            assert "line" in location


@settings(max_examples=60, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(GRID, st.sampled_from([",", ";", "\t", "|"]))
def test_any_csv_is_read_or_refused_with_a_message(tmp_path: Path, rows: list[list[str]],
                                                   delimiter: str) -> None:
    path = tmp_path / "fuzz.csv"
    with open(path, "w", encoding="utf-8", newline="", errors="surrogatepass") as handle:
        csv.writer(handle, delimiter=delimiter).writerows(rows)
    try:
        extract_spreadsheet(path)
    except SpreadsheetError as exc:
        assert str(path) in str(exc)
