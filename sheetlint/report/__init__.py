"""Streaming reports: each file's part of the output is written as soon as the file is done.

A streaming report turns one :class:`~sheetlint.batch.FileResult` into a :class:`FilePart`
(its text plus the few numbers the summary and the exit status need) where the file was
checked, in a worker process or in this one, so that only text crosses between processes and
nothing of a file stays in memory once its part is written. :class:`ReportWriter` writes the
head, the parts in input order and the tail; :class:`Tally` keeps the counts. The parts do not
depend on which process made them, so a parallel run writes the same bytes as a serial one.

The reports: text (:mod:`sheetlint.report.text`), JSON (:mod:`sheetlint.report.json_report`,
DESIGN.md "Output contract") and SARIF (:mod:`sheetlint.report.sarif`). The HTML report draws
every record at the end and is not streamed.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, Protocol, TextIO

if TYPE_CHECKING:
    from sheetlint.batch import FileResult

#: severity names in rising order (the engine's SEVERITY_RANK, without importing the engine)
SEVERITIES = ("info", "warning", "error")


@dataclass(frozen=True, slots=True)
class FilePart:
    """One file's part of a report and what the run's summary needs from it."""

    path: str
    text: str  # the file's part of the output ("" when it adds nothing)
    records: int
    findings: tuple[int, int, int]  # info, warning, error findings not accepted
    accepted: int  # findings an ``accepted`` entry of their record covers
    unreadable: bool  # the file, or a record in it, could not be read
    worst: int  # highest severity rank among findings not accepted; -1 for none
    messages: tuple[str, ...] = ()  # read errors, repeated on stderr after the report
    extra: Any = None  # what a report keeps for its tail (SARIF: artifacts, notifications)
    skipped: bool = False  # a readable file holding no machine record, left out


def count_part(result: FileResult, text: str, extra: Any = None) -> FilePart:
    """The :class:`FilePart` of ``result`` with ``text``: its counts worked out here."""
    counts = [0, 0, 0]
    accepted = 0
    worst = -1
    messages = [result.error] if result.error else []
    for record in result.records:
        if record.error:
            messages.append(record.error)
        for finding in record.findings:
            if finding.accepted is not None:
                accepted += 1
                continue
            rank = SEVERITIES.index(finding.severity)
            counts[rank] += 1
            if rank > worst:
                worst = rank
    return FilePart(result.path, text, len(result.records), (counts[0], counts[1], counts[2]),
                    accepted, bool(messages), worst, tuple(messages), extra,
                    bool(result.skipped))


@dataclass(slots=True)
class Tally:
    """Counts of a whole run, added up part by part: the summary and the exit status."""

    files: int = 0
    records: int = 0
    findings: list[int] = field(default_factory=lambda: [0, 0, 0])
    accepted: int = 0
    skipped: int = 0
    unreadable: bool = False
    worst: int = -1

    def add(self, part: FilePart) -> None:
        self.files += 1
        self.records += part.records
        for rank, count in enumerate(part.findings):
            self.findings[rank] += count
        self.accepted += part.accepted
        self.skipped += part.skipped
        self.unreadable = self.unreadable or part.unreadable
        self.worst = max(self.worst, part.worst)

    def summary(self) -> dict[str, int]:
        """The ``summary`` object of the JSON output contract."""
        out = {"files": self.files, "records": self.records, "error": self.findings[2],
               "warning": self.findings[1], "info": self.findings[0]}
        if self.skipped:
            out["skipped"] = self.skipped
        if self.accepted:
            out["accepted"] = self.accepted
        return out

    def exit_status(self, fail_on: str = "error") -> int:
        """2 if a file or record could not be read; else 1 at or above ``fail_on``; else 0."""
        if self.unreadable:
            return 2
        return 1 if self.worst >= SEVERITIES.index(fail_on) else 0


class StreamingReport(Protocol):
    """A report written part by part: ``part`` runs wherever the file was checked."""

    #: written between two non-empty parts
    separator: str

    def head(self) -> str: ...

    def part(self, result: FileResult) -> FilePart: ...

    def tail(self, tally: Tally, parts_extra: list[Any]) -> str: ...


class ReportWriter:
    """Writes a streaming report to ``stream``: head, each part as it comes, tail.

    Keeps only the :class:`Tally`, the read-error messages and what the report asks to keep
    for its tail (``FilePart.extra``, e.g. SARIF's artifact list).
    """

    def __init__(self, report: StreamingReport, stream: TextIO) -> None:
        self.report = report
        self.stream = stream
        self.tally = Tally()
        self.messages: list[str] = []
        self.extras: list[Any] = []
        self._written_parts = 0
        self._started = False

    def start(self) -> None:
        self.stream.write(self.report.head())
        self._started = True

    def add(self, part: FilePart) -> None:
        if not self._started:
            self.start()
        self.tally.add(part)
        self.messages.extend(part.messages)
        if part.extra is not None:
            self.extras.append(part.extra)
        if part.text:
            if self._written_parts:
                self.stream.write(self.report.separator)
            self.stream.write(part.text)
            self._written_parts += 1

    def finish(self) -> Tally:
        if not self._started:
            self.start()
        self.stream.write(self.report.tail(self.tally, self.extras))
        self.stream.flush()
        return self.tally


def render_all(report: StreamingReport, results: list[FileResult]) -> str:
    """The whole report of ``results`` as one string, byte for byte what streaming writes."""
    import io

    buffer = io.StringIO()
    writer = ReportWriter(report, buffer)
    writer.start()
    for result in results:
        writer.add(report.part(result))
    writer.finish()
    return buffer.getvalue()
