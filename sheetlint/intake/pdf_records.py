"""PDF datasheets and spreadsheets as raw records for the engine, each value located
by page and cell (PDF) or sheet and cell (spreadsheet)."""

from __future__ import annotations

from typing import Any

from sheetlint.intake.records import InputProblem, RawRecord


class NoMachineTable(InputProblem):
    """A readable document that holds no machine table (a folder walk lists it as skipped)."""


def _raw(records: list[Any]) -> list[RawRecord]:
    many = len(records) > 1
    out = []
    for i, record in enumerate(records):
        locations = record.locations
        out.append(RawRecord(record.data, i if many else None, "",
                             lambda p, loc=locations: loc.get(p)))
    return out


def pdf_raw_records(path: str) -> list[RawRecord]:
    """Extract the machine tables of a PDF. Raises InputProblem for unreadable files and
    NoMachineTable for a readable PDF without machine data."""
    from sheetlint.intake.pdf import PdfError, PdfNoText, extract_pdf

    try:
        extraction = extract_pdf(path)
    except PdfNoText as exc:
        raise NoMachineTable(str(exc)) from None
    except PdfError as exc:
        raise InputProblem(str(exc)) from None
    if not extraction.records:
        notes = "; ".join(extraction.notes) if extraction.notes else "no machine table found"
        raise NoMachineTable(f"{path}: no machine data extracted ({notes})")
    return _raw(extraction.records)


def spreadsheet_raw_records(path: str, max_bytes: int | None = None) -> list[RawRecord]:
    """The machine tables of a ``.csv`` or ``.xlsx`` file, like :func:`pdf_raw_records`."""
    from sheetlint.intake.spreadsheet import MAX_BYTES, SpreadsheetError, extract_spreadsheet

    try:
        extraction = extract_spreadsheet(path, max_bytes or MAX_BYTES)
    except SpreadsheetError as exc:
        raise InputProblem(str(exc)) from None
    if not extraction.records:
        raise NoMachineTable(f"{path}: no machine table found")
    return _raw(extraction.records)


def extract_document(path: str) -> Any:
    """The extraction of a PDF, CSV or XLSX file (records with locations, unmapped cells,
    notes), for ``sheetlint extract``. Raises InputProblem for an unreadable file."""
    if path.lower().endswith((".csv", ".xlsx")):
        from sheetlint.intake.spreadsheet import SpreadsheetError, extract_spreadsheet

        try:
            return extract_spreadsheet(path)
        except SpreadsheetError as exc:
            raise InputProblem(str(exc)) from None
    from sheetlint.intake.pdf import PdfError, extract_pdf

    try:
        return extract_pdf(path)
    except PdfError as exc:
        raise InputProblem(str(exc)) from None
