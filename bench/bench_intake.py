"""Intake accuracy per layout: records found, field recall and precision, PDF, CSV and XLSX.

Builds the layout corpus (``tools/make_layout_corpus.py``: invented catalogues in every
layout, answers written from the designs) into a temporary folder, reads every document and
compares each record's fields with the answer as SI values (relative 1e-6, after the reading
of units that ``check`` uses). Prints a table; asserts nothing.

    python bench/bench_intake.py [--booklet-pages N] [--kinds pdf,csv,xlsx] [--show LAYOUT]
                                 [--seeds 1,2,3]

Targets of issue 18: records found >= 95 %, field recall >= 95 %, precision >= 99 %.
"""

from __future__ import annotations

import argparse
import json
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from sheetlint.fields import ATTRIBUTE_FIELDS, FIELDS  # noqa: E402
from sheetlint.units import UnitProblem, read_value  # noqa: E402
from tools import make_layout_corpus  # noqa: E402


def flatten(data: dict[str, Any], prefix: str = "") -> dict[str, Any]:
    flat: dict[str, Any] = {}
    for key, value in data.items():
        path = f"{prefix}{key}"
        if isinstance(value, dict) and "value" not in value:
            flat.update(flatten(value, path + "."))
        else:
            flat[path] = value
    return flat


def si_value(path: str, raw: Any) -> Any:
    """The SI value of an extracted field, or the text of an attribute; None if unreadable."""
    if path in ATTRIBUTE_FIELDS or path not in FIELDS:
        return raw
    spec = FIELDS[path]
    if spec.kind == "count":
        return float(raw) if isinstance(raw, int | float) else None
    try:
        if isinstance(raw, dict):
            return read_value(raw.get("value"), raw.get("unit"), spec.kind, False).value
        return read_value(raw, None, spec.kind, False).value
    except (UnitProblem, KeyError, TypeError, ValueError):
        return None


def same(expected: Any, actual: Any) -> bool:
    if isinstance(expected, float) and isinstance(actual, float):
        return abs(actual - expected) <= 1e-6 * max(abs(expected), 1e-12)
    return expected == actual


def score(answers: list[dict[str, Any]], records: list[tuple[dict[str, Any], dict[str, Any]]]
          ) -> dict[str, Any]:
    """Counts of records found, fields expected / extracted / right, pages right."""
    by_id = {}
    for data, locations in records:
        by_id.setdefault(str(data.get("id")), (data, locations))
    found = right = extracted = expected = pages_right = pages_expected = 0
    wrong: list[str] = []
    for item in answers:
        fields = {k: v for k, v in item.items() if k not in ("id", "page")}
        expected += len(fields)
        got = by_id.pop(item["id"], None)
        if got is None:
            wrong.append(f"{item['id']}: not found")
            continue
        found += 1
        data, locations = got
        flat = {k: v for k, v in flatten(data).items() if k != "id"}
        extracted += len(flat)
        for path, value in fields.items():
            actual = si_value(path, flat.get(path)) if path in flat else None
            if actual is not None and same(value, actual):
                right += 1
            else:
                wrong.append(f"{item['id']}: {path} expected {value!r}, read "
                             f"{flat.get(path)!r}")
        for path in flat:
            if path not in fields:
                wrong.append(f"{item['id']}: {path} not in the answer: {flat[path]!r}")
        if "page" in item:
            pages_expected += 1
            pages_right += int((locations.get("id") or {}).get("page") == item["page"])
    for data, _locations in by_id.values():  # records that are not machines of the answer
        extracted += len([k for k in flatten(data) if k != "id"])
        wrong.append(f"extra record {data.get('id')!r}")
    return {"records": len(answers), "found": found, "expected": expected,
            "extracted": extracted, "right": right, "pages_expected": pages_expected,
            "pages_right": pages_right, "wrong": wrong}


def read_document(path: Path) -> list[tuple[dict[str, Any], dict[str, Any]]]:
    if path.suffix == ".pdf":
        from sheetlint.intake.pdf import PdfError, extract_pdf

        try:
            extraction = extract_pdf(path)
        except PdfError:
            return []
        return [(r.data, r.locations) for r in extraction.records]
    from sheetlint.intake.spreadsheet import SpreadsheetError, extract_spreadsheet

    try:
        sheet = extract_spreadsheet(path)
    except SpreadsheetError:
        return []
    return [(r.data, r.locations) for r in sheet.records]


def percent(part: int, whole: int) -> str:
    return f"{100 * part / whole:5.1f}" if whole else "    -"


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--booklet-pages", type=int, default=40)
    parser.add_argument("--kinds", default="pdf,csv,xlsx")
    parser.add_argument("--show", default="", help="print the misses of this layout")
    parser.add_argument("--seeds", default="",
                        help="comma-separated seeds of varied corpora (default: the fixed one)")
    args = parser.parse_args()

    kinds = args.kinds.split(",")
    totals = {kind: {"records": 0, "found": 0, "expected": 0, "extracted": 0, "right": 0}
              for kind in kinds}
    seeds = [int(x) for x in args.seeds.split(",") if x] or [None]
    for seed in seeds:
        if seed is not None:
            print(f"\ncorpus drawn with seed {seed} (varied order, units, separators, fonts)")
        run_corpus(seed, args, kinds, totals)
    print()
    for kind, t in totals.items():
        print(f"all layouts, {kind:5}: records found {percent(t['found'], t['records'])} %, "
              f"field recall {percent(t['right'], t['expected'])} %, precision "
              f"{percent(t['right'], t['extracted'])} %  (targets 95 / 95 / 99)")


def run_corpus(seed: int | None, args: argparse.Namespace, kinds: list[str],
               totals: dict[str, dict[str, int]]) -> None:
    with tempfile.TemporaryDirectory() as folder:
        if seed is None:
            names = make_layout_corpus.build(Path(folder), args.booklet_pages)
        else:
            names = make_layout_corpus.build(Path(folder), args.booklet_pages, seed, True)
        print(f"{'layout':30} {'kind':5} {'records':>9} {'found%':>7} {'recall%':>8} "
              f"{'precision%':>10} {'pages':>7} {'s':>6}")
        for name in names:
            answers = json.loads((Path(folder) / f"{name}.answer.json").read_text())["records"]
            for kind in kinds:
                started = time.perf_counter()
                records = read_document(Path(folder) / f"{name}.{kind}")
                elapsed = time.perf_counter() - started
                result = score(answers, records)
                for key in totals[kind]:
                    totals[kind][key] += result[key]
                pages = (f"{result['pages_right']}/{result['pages_expected']}"
                         if kind == "pdf" and result["pages_expected"] else "")
                print(f"{name:30} {kind:5} {result['found']:>4}/{result['records']:<4} "
                      f"{percent(result['found'], result['records']):>7} "
                      f"{percent(result['right'], result['expected']):>8} "
                      f"{percent(result['right'], result['extracted']):>10} {pages:>7} "
                      f"{elapsed:6.2f}")
                if args.show in (name, "all", f"{name}.{kind}") and result["wrong"]:
                    for line in result["wrong"][:25]:
                        print(f"    {kind}: {line}")


if __name__ == "__main__":
    main()
