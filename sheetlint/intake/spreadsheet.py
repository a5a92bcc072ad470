"""Spreadsheet intake: machine tables of ``.csv`` and ``.xlsx`` files as raw records.

Cells are read as they are shown (a workbook cell holding 0.925 formatted ``0.0%`` reads
``92.5 %``; a format ``0.00 "kW"`` adds its unit), then the grid goes through the same table
reader as PDF pages (:mod:`sheetlint.intake.spreadsheet_grid`): the same layouts, label
vocabulary and unit handling. Every value keeps its place: ``{"sheet": "Catalogue",
"cell": "D7"}`` in a workbook, ``{"line": 7, "cell": "D7"}`` in a CSV file.

CSV: any of the delimiters ``; , TAB |`` (the one that gives the most regular table), UTF-8
with or without BOM (Windows-1252 as fallback), decimal comma or point. XLSX: openpyxl in
read-only mode. Hostile files are refused with :class:`SpreadsheetError` naming the file and
what is wrong, in bounded time and memory: empty files, files that are not what their name
says, damaged or truncated workbooks, archives that unpack to more than a limit (a huge
string table), more rows or columns than a datasheet has, lines longer than any table's.
"""

from __future__ import annotations

import csv
import io
import os
import re
import zipfile
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from sheetlint.intake.spreadsheet_grid import GridReader, GridRecord

SPREADSHEET_SUFFIXES = (".csv", ".xlsx")
MAX_BYTES = 20_000_000
#: rows and columns read from one sheet; a catalogue export is smaller
MAX_ROWS = 20_000
MAX_COLUMNS = 200
#: a CSV line longer than this is not a table row
MAX_LINE_CHARS = 100_000
#: a run of empty rows this long ends a sheet (formatted but empty rows to the million)
MAX_EMPTY_RUN = 500
#: unpacked size of a workbook, and of its shared-string table
MAX_UNPACKED_BYTES = 200_000_000
MAX_SHARED_STRINGS_BYTES = 20_000_000
DELIMITERS = (";", "\t", "|", ",")


class SpreadsheetError(Exception):
    """A spreadsheet that cannot be read; the message names the file and what is wrong."""


@dataclass
class SpreadsheetExtraction:
    """Everything read from one spreadsheet file."""

    path: str
    records: list[GridRecord]
    unmapped: list[dict[str, Any]] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    sheets: int = 0


def column_letter(index: int) -> str:
    """0 -> ``A``, 25 -> ``Z``, 26 -> ``AA`` (spreadsheet column names)."""
    letters = ""
    index += 1
    while index:
        index, remainder = divmod(index - 1, 26)
        letters = chr(65 + remainder) + letters
    return letters


def extract_spreadsheet(path: str | os.PathLike[str],
                        max_bytes: int = MAX_BYTES) -> SpreadsheetExtraction:
    """Read the machine tables of a ``.csv`` or ``.xlsx`` file into raw records.

    Raises :class:`SpreadsheetError` (and nothing else) for a file that cannot be read.
    A readable file without a machine table gives an extraction with no records.
    """
    name = os.fspath(path)
    try:
        size = os.path.getsize(name)
    except OSError as exc:
        raise SpreadsheetError(f"{name}: cannot be read ({exc.strerror or exc})") from None
    if os.path.isdir(name):
        raise SpreadsheetError(f"{name}: is a folder, not a spreadsheet")
    if size == 0:
        raise SpreadsheetError(f"{name}: is empty (0 bytes)")
    if size > max_bytes:
        raise SpreadsheetError(f"{name}: is {size:,} bytes, more than the limit of "
                               f"{max_bytes:,} bytes")
    reader = GridReader(Path(name).stem)
    try:
        if name.lower().endswith(".xlsx"):
            sheets = _read_xlsx(name, reader)
        else:
            sheets = _read_csv(name, reader)
    except SpreadsheetError:
        raise
    except MemoryError:
        raise SpreadsheetError(f"{name}: too large to read (out of memory)") from None
    except Exception as exc:  # a damaged file must never give a traceback
        raise SpreadsheetError(f"{name}: cannot be read ({type(exc).__name__}: "
                               f"{str(exc)[:200]})") from None
    records = reader.finish(Path(name).stem)
    if not records:
        reader.notes.append("no machine table found")
    return SpreadsheetExtraction(name, records, reader.unmapped, reader.notes, sheets)


# --------------------------------------------------------------------------- CSV


def _decode(name: str, raw: bytes) -> str:
    if b"\x00" in raw[:4096]:
        raise SpreadsheetError(f"{name}: is a binary file, not CSV text")
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        try:
            return raw.decode("cp1252")
        except UnicodeDecodeError as exc:
            raise SpreadsheetError(f"{name}: is neither UTF-8 nor Windows-1252 text (byte "
                                   f"{exc.start})") from None


def sniff_delimiter(lines: list[str]) -> str:
    """The delimiter that splits the first lines into the most regular table."""
    best, best_score = ",", -1
    for delimiter in DELIMITERS:
        widths = [len(row) for row in csv.reader(lines, delimiter=delimiter) if any(row)]
        widths = [w for w in widths if w > 1]
        if not widths:
            continue
        common = max(set(widths), key=widths.count)
        score = widths.count(common) * (common - 1) + len(widths)
        if score > best_score:
            best, best_score = delimiter, score
    return best


def _read_csv(name: str, reader: GridReader) -> int:
    text = _decode(name, Path(name).read_bytes())
    lines = text.splitlines()
    for number, line in enumerate(lines, start=1):
        if len(line) > MAX_LINE_CHARS:
            raise SpreadsheetError(f"{name}: line {number} has {len(line):,} characters, more "
                                   f"than the {MAX_LINE_CHARS:,} a table row can have")
    if len(lines) > MAX_ROWS:
        raise SpreadsheetError(f"{name}: has {len(lines):,} lines, more than the limit of "
                               f"{MAX_ROWS:,} for a datasheet table")
    delimiter = sniff_delimiter(lines[:50])
    csv.field_size_limit(MAX_LINE_CHARS)
    rows: list[list[str]] = []
    starts: list[int] = []  # the text line each row starts on (a quoted cell may span lines)
    parsed = csv.reader(io.StringIO(text), delimiter=delimiter)
    line = 0
    for row in parsed:
        starts.append(line + 1)
        line = parsed.line_num
        rows.append(row[:MAX_COLUMNS])

    def locate(row: int, column: int) -> dict[str, Any]:
        return {"line": starts[row], "cell": f"{column_letter(column)}{row + 1}"}

    reader.read_grid(rows, locate, {"line": 1}, decimal_comma=_decimal_comma(rows))
    return 1


def _decimal_comma(rows: list[list[str]]) -> bool | None:
    """Whether the cells write decimal commas (True), points (False) or cannot tell."""
    commas = points = 0
    for row in rows:
        for text in row:
            if not text or len(text) > 40:
                continue
            commas += len(re.findall(r"(?<![\d.,])0,\d|\d,\d{1,2}(?![\d.,])|\d,\d{4,}", text))
            points += len(re.findall(r"(?<![\d.,])0\.\d|\d\.\d{1,2}(?![\d.,])|\d\.\d{4,}", text))
    if commas == points:
        return None
    return commas > points


# --------------------------------------------------------------------------- XLSX


def _check_workbook(name: str) -> None:
    with open(name, "rb") as handle:
        head = handle.read(4)
    if head != b"PK\x03\x04":
        raise SpreadsheetError(f"{name}: is not an .xlsx workbook (not a zip archive)")
    try:
        with zipfile.ZipFile(name) as archive:
            members = archive.infolist()
            total = sum(member.file_size for member in members)
            names = {member.filename for member in members}
            strings = sum(m.file_size for m in members
                          if m.filename.lower().endswith("sharedstrings.xml"))
    except zipfile.BadZipFile as exc:
        raise SpreadsheetError(f"{name}: is a damaged or truncated workbook ({exc})") from None
    if "[Content_Types].xml" not in names:
        raise SpreadsheetError(f"{name}: is a zip archive but not an .xlsx workbook")
    if strings > MAX_SHARED_STRINGS_BYTES:
        raise SpreadsheetError(f"{name}: its shared-string table unpacks to {strings:,} bytes, "
                               f"more than the limit of {MAX_SHARED_STRINGS_BYTES:,}")
    if total > MAX_UNPACKED_BYTES:
        raise SpreadsheetError(f"{name}: unpacks to {total:,} bytes, more than the limit of "
                               f"{MAX_UNPACKED_BYTES:,}")


def shown_text(value: Any, number_format: str | None) -> str:
    """A cell value as the sheet shows it: ``0.925`` in ``0.0%`` -> ``'92.5 %'``,
    ``1500`` in ``#,##0 "rpm"`` -> ``'1500 rpm'``, ``0.1234`` in ``0.00`` -> ``'0.12'``."""
    if value is None:
        return ""
    if isinstance(value, bool):
        return "yes" if value else "no"
    if not isinstance(value, int | float):
        return str(value)
    fmt = (number_format or "General").split(";")[0]
    literal = " ".join(re.findall(r'"([^"]*)"', fmt)).strip()
    bare = re.sub(r'"[^"]*"|\\.|\[[^\]]*\]|_.|\*.', "", fmt)
    if fmt == "General" or not re.search(r"[0#?]", bare):
        number = float(value)
        text = str(int(number)) if number.is_integer() and abs(number) < 1e15 else repr(number)
        return f"{text} {literal}".strip()
    percent = "%" in bare
    number = float(value) * (100 if percent else 1)
    decimals_match = re.search(r"\.([0#?]+)", bare)
    decimals = len(decimals_match.group(1)) if decimals_match else 0
    text = f"{number:.{decimals}f}"
    unit = "%" if percent else literal
    return f"{text} {unit}".strip()


def _read_xlsx(name: str, reader: GridReader) -> int:
    _check_workbook(name)
    import openpyxl

    workbook = openpyxl.load_workbook(name, read_only=True, data_only=True)
    try:
        sheets = 0
        for sheet in workbook.worksheets:
            sheets += 1
            rows: list[list[str]] = []
            empty_run = 0
            filled = 0
            for cells in sheet.iter_rows(max_row=MAX_ROWS, max_col=MAX_COLUMNS):
                row = [shown_text(getattr(c, "value", None), getattr(c, "number_format", None))
                       for c in cells]
                if any(row):
                    empty_run = 0
                    filled = len(rows) + 1
                else:
                    empty_run += 1
                    if empty_run > MAX_EMPTY_RUN:
                        break
                rows.append(row)
            title = sheet.title
            if filled >= MAX_ROWS:
                reader.notes.append(f"sheet {title}: only the first {MAX_ROWS:,} rows were "
                                    "read")

            def locate(row: int, column: int, title: str = title) -> dict[str, Any]:
                return {"sheet": title, "cell": f"{column_letter(column)}{row + 1}"}

            reader.read_grid(rows, locate, {"sheet": title}, decimal_comma=_decimal_comma(rows))
        return sheets
    finally:
        workbook.close()
