"""Folders of mixed documents through ``check``: JSON, YAML, PDF, CSV and XLSX all checked,
a document without a machine table listed as skipped, findings located by page or cell."""

from __future__ import annotations

import importlib.util
import json
import shutil
import sys
from pathlib import Path
from typing import Any

import pytest

from sheetlint.cli import main

ROOT = Path(__file__).resolve().parent.parent


def corpus_tool() -> Any:
    spec = importlib.util.spec_from_file_location("make_layout_corpus",
                                                  ROOT / "tools" / "make_layout_corpus.py")
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def corpus(tmp_path_factory: pytest.TempPathFactory) -> Path:
    pytest.importorskip("fpdf")
    pytest.importorskip("openpyxl")
    folder = tmp_path_factory.mktemp("corpus")
    corpus_tool().build(folder, booklet_pages=6)
    return folder


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
