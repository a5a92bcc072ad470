"""PDF datasheets as raw records for the engine, each value located by page and cell."""

from __future__ import annotations

from sheetlint.intake.records import InputProblem, RawRecord


def pdf_raw_records(path: str) -> list[RawRecord]:
    """Extract the machine tables of a PDF. Raises InputProblem for unreadable files."""
    from sheetlint.intake.pdf import PdfError, extract_pdf

    try:
        extraction = extract_pdf(path)
    except PdfError as exc:
        raise InputProblem(str(exc)) from None
    if not extraction.records:
        notes = "; ".join(extraction.notes) if extraction.notes else "no machine table found"
        raise InputProblem(f"{path}: no machine data extracted ({notes})")
    many = len(extraction.records) > 1
    out = []
    for i, record in enumerate(extraction.records):
        locations = record.locations
        out.append(RawRecord(record.data, i if many else None, "",
                             lambda p, loc=locations: loc.get(p)))
    return out
