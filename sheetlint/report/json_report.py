"""The JSON output contract of DESIGN.md ("Output contract"). Formats only.

Written as a stream: the head, then one line per file (the file's object, compact, encoded by
the standard library's C encoder), then the summary; the whole is one JSON document:

    {"tool": "sheetlint", "version": "...", "files": [
    {"path": "a.json", "error": null, "records": [...]},
    {"path": "b.yaml", "error": null, "records": [...]}
    ],
    "summary": {"files": 2, "records": 2, "error": 0, "warning": 1, "info": 3}}
"""

from __future__ import annotations

import json
from typing import Any

from sheetlint import __version__
from sheetlint.batch import FileResult
from sheetlint.coverage import coverage_of
from sheetlint.engine.run import derived_payload
from sheetlint.report import FilePart, Tally, count_part, render_all

_encode = json.JSONEncoder(ensure_ascii=False).encode


def summary(results: list[FileResult]) -> dict[str, int]:
    """The ``summary`` object of a list of results (the streaming report counts as it goes)."""
    tally = Tally()
    for f in results:
        tally.add(count_part(f, ""))
    return tally.summary()


def file_payload(f: FileResult) -> dict[str, Any]:
    """One entry of ``files`` in the output contract."""
    return {"path": f.path, "error": f.error,
            **({"skipped": f.skipped} if f.skipped else {}),
            "records": [{"id": r.id, "error": r.error,
                         "findings": [x.to_dict() for x in r.findings],
                         "coverage": coverage_of(r),
                         "derived": derived_payload(r.derived)} for r in f.records]}


class JsonReport:
    """The streaming JSON report (see the module docstring for its layout)."""

    separator = ",\n"

    def head(self) -> str:
        return (f'{{"tool": "sheetlint", "version": {_encode(__version__)}, '
                '"files": [\n')

    def part(self, result: FileResult) -> FilePart:
        return count_part(result, _encode(file_payload(result)))

    def tail(self, tally: Tally, parts_extra: list[Any]) -> str:
        return f'\n],\n"summary": {_encode(tally.summary())}}}\n'


def payload(results: list[FileResult]) -> dict[str, Any]:
    return json.loads(render(results))


def render(results: list[FileResult]) -> str:
    """The whole document (without its final newline), as the stream writes it."""
    return render_all(JsonReport(), results)[:-1]
