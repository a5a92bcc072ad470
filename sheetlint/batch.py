"""Checking files: find them, read them, run every record through the engine.

One bad file never stops the batch: an unreadable file becomes a :class:`FileResult` with an
``error`` message naming the file; an unreadable record inside a readable file gets its own
error and the file's other records are still checked.
"""

from __future__ import annotations

import os
from collections.abc import Iterable, Iterator
from dataclasses import dataclass, field
from pathlib import Path

from sheetlint.engine.core import SEVERITY_RANK, Settings
from sheetlint.engine.run import RecordResult, check_record
from sheetlint.intake.records import MAX_BYTES, InputProblem, RawRecord, load_records

DATA_SUFFIXES = (".json", ".yaml", ".yml")


@dataclass(slots=True)
class FileResult:
    path: str
    error: str | None = None
    records: list[RecordResult] = field(default_factory=list)


def collect_files(paths: Iterable[str]) -> tuple[list[str], list[FileResult]]:
    """Data files under ``paths`` (folders recursively, sorted), and results for missing paths."""
    files: list[str] = []
    missing: list[FileResult] = []
    for raw in paths:
        path = Path(raw)
        if path.is_dir():
            found = [str(p) for p in sorted(path.rglob("*"))
                     if p.suffix.lower() in DATA_SUFFIXES and p.is_file()
                     and not any(part.startswith(".") for part in p.relative_to(path).parts)]
            files.extend(found)
        elif path.is_file():
            files.append(str(path))
        else:
            missing.append(FileResult(str(raw), f"{raw}: no such file or folder"))
    return files, missing


def raw_records(path: str, max_bytes: int | None = None) -> list[RawRecord]:
    """The raw records of one file (JSON, YAML or PDF). Raises InputProblem."""
    if path.lower().endswith(".pdf"):
        from sheetlint.intake.pdf_records import pdf_raw_records

        return pdf_raw_records(path)
    return load_records(path, max_bytes or MAX_BYTES).records


def check_file(path: str, settings: Settings | None = None, *,
               max_bytes: int | None = None) -> FileResult:
    try:
        records = raw_records(path, max_bytes)
    except InputProblem as exc:
        return FileResult(path, str(exc))
    except RecursionError:
        return FileResult(path, f"{path}: document nested too deeply")
    result = FileResult(path)
    for raw in records:
        record = check_record(raw, settings)
        if record.error:
            record.error = f"{path}: {_record_label(raw, record)}: {record.error}"
        result.records.append(record)
    return result


def _record_label(raw: RawRecord, record: RecordResult) -> str:
    if raw.index is None:
        return f"record '{record.id}'" if record.id != "(record)" else "record"
    return f"records[{raw.index}]" + (f" ('{record.id}')" if not record.id.startswith(
        "records[") else "")


def check_paths(paths: Iterable[str], settings: Settings | None = None, *,
                jobs: int | None = None, time_limit: float | None = None,
                max_bytes: int | None = None) -> Iterator[FileResult]:
    """Check every data file under ``paths``, in order.

    ``jobs``: worker processes (None: decide by batch size); ``time_limit``: seconds per file;
    ``max_bytes``: size limit per file.
    """
    files, missing = collect_files(paths)
    yield from missing
    for path in files:
        yield check_file(path, settings, max_bytes=max_bytes)


def exit_status(results: list[FileResult], fail_on: str = "error") -> int:
    """2 if any file or record could not be read; else 1 at or above ``fail_on``; else 0."""
    threshold = SEVERITY_RANK[fail_on]
    failed = False
    for f in results:
        if f.error:
            return 2
        for r in f.records:
            if r.error:
                return 2
            if any(SEVERITY_RANK[x.severity] >= threshold and x.suppressed is None
                   for x in r.findings):
                failed = True
    return 1 if failed else 0


def relative(path: str) -> str:
    try:
        rel = os.path.relpath(path)
    except ValueError:
        return path
    return path if rel.startswith("..") else rel
