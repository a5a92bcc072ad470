"""`sheetlint check FILE.pdf`: findings point back to page and cell; clean sheets stay quiet."""

from __future__ import annotations

import json
from pathlib import Path

from sheetlint.cli import main

PDF = Path(__file__).resolve().parent.parent / "fixtures" / "pdf"


def test_consistent_pdf_sheets_give_no_error_or_warning(capsys):
    readable = [p for p in sorted(PDF.glob("*.pdf")) if p.name != "image_only.pdf"]
    status = main(["check", "--format", "json", *map(str, readable)])
    out = json.loads(capsys.readouterr().out)
    assert status == 0
    records = [r for f in out["files"] for r in f["records"]]
    assert len(records) >= 5
    for record in records:
        assert record["error"] is None
        assert [x for x in record["findings"] if x["severity"] != "info"] == []


def test_pdf_findings_carry_page_and_cell(tmp_path, capsys):
    main(["check", "--format", "json", str(PDF / "pump_motor_en.pdf")])
    out = json.loads(capsys.readouterr().out)
    findings = out["files"][0]["records"][0]["findings"]
    located = [f["location"] for f in findings if f["location"]]
    assert located and all(loc["page"] == 1 and loc.get("cell") for loc in located)


def test_image_only_pdf_is_skipped_with_its_reason(capsys):
    """DESIGN.md: a document with no machine table is listed as skipped, exit status
    unchanged; a scan without a text layer holds none we can read."""
    status = main(["check", "--format", "json", str(PDF / "image_only.pdf")])
    captured = capsys.readouterr()
    assert status == 0
    files = json.loads(captured.out)["files"]
    assert "image only" in files[0]["skipped"] and files[0]["records"] == []
    assert "Traceback" not in captured.err
