"""The text report as a stream: each file's lines from :func:`sheetlint.report.text.file_lines`
as the file finishes, then the summary line and the one cautions line of
:func:`~sheetlint.report.text.tail_lines`. The layout belongs to :mod:`sheetlint.report.text`;
this only writes it."""

from __future__ import annotations

from typing import Any

from sheetlint.batch import FileResult
from sheetlint.report import FilePart, Tally, count_part
from sheetlint.report.text import file_lines, tail_lines


class TextReport:
    """The streaming text report (the same bytes as ``text.render`` plus a final newline)."""

    separator = ""

    def __init__(self, notes: bool = False, show_derived: bool = False) -> None:
        self.notes = notes
        self.show_derived = show_derived

    def head(self) -> str:
        return ""

    def part(self, result: FileResult) -> FilePart:
        lines = file_lines(result, self.notes, self.show_derived)
        return count_part(result, "".join(line + "\n" for line in lines))

    def tail(self, tally: Tally, parts_extra: list[Any]) -> str:
        return "".join(line + "\n" for line in tail_lines(tally.summary(), self.notes))
