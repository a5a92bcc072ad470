"""Checking files: find them, read them, run every record through the engine.

One bad file never stops the batch: an unreadable file becomes a :class:`FileResult` with an
``error`` message naming the file; an unreadable record inside a readable file gets its own
error and the file's other records are still checked. A file that takes longer than the time
limit, or is larger than the size limit, is reported as a file error and the batch goes on.

Large batches run in worker processes (:mod:`sheetlint.parallel`); the results come back in
the same order and with the same content as a serial run, except that ``RecordResult.sheet``
(the engine's working object, which the HTML report reads) is kept only in serial runs.
"""

from __future__ import annotations

import fnmatch
import math
import os
import signal
import threading
from collections.abc import Callable, Iterable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path
from types import FrameType
from typing import Any

from sheetlint.engine.core import SEVERITY_RANK, Settings
from sheetlint.engine.run import RecordResult, check_record
from sheetlint.intake.records import MAX_BYTES, InputProblem, RawRecord, load_records

DATA_SUFFIXES = (".json", ".yaml", ".yml", ".pdf", ".csv", ".xlsx")
#: seconds allowed per file when the caller gives no limit
DEFAULT_TIME_LIMIT = 30.0
#: re-arm interval of the time-limit timer, in case the first interruption is swallowed by
#: code that catches every exception
_REARM_SECONDS = 1.0


@dataclass(slots=True)
class FileResult:
    path: str
    error: str | None = None
    records: list[RecordResult] = field(default_factory=list)
    #: why a readable file holding no machine record was left out (no exit status effect)
    skipped: str | None = None


#: top-level keys of which a machine record has at least one (DESIGN.md "Data contract")
RECORD_KEYS = frozenset({"id", "records", "maker", "machine", "rated", "emf", "circuit",
                         "limits", "supply", "torque_constant", "efficiency_class", "points",
                         "accepted", "dynamics"})


def not_a_record(records: list[RawRecord]) -> str | None:
    """The reason to skip a JSON/YAML file that is plainly something else (a CI workflow, a
    ``package.json``): one top-level mapping with keys, none of them a record's. ``None`` for
    anything that may be meant as a record (it is then checked, and a bad one is an error)."""
    if len(records) != 1 or records[0].index is not None:
        return None
    data = records[0].data
    if not isinstance(data, dict) or not data or any(
            isinstance(k, str) and k in RECORD_KEYS for k in data):
        return None
    keys = ", ".join(sorted(str(k) for k in data)[:4])
    return f"holds no machine record (top-level keys: {keys})"


def foreign_yaml(path: str) -> str | None:
    """The reason to skip a YAML file that our loader refused but whose top level is a mapping
    with none of a record's keys (a CI workflow: its ``on:`` key reads as a boolean). Reads
    only the top-level keys, as text, without building the document (no alias expansion)."""
    if not path.lower().endswith((".yaml", ".yml")):
        return None
    try:
        if os.path.getsize(path) > MAX_BYTES:
            return None
        import yaml

        with open(path, encoding="utf-8") as handle:
            node = yaml.compose(handle, Loader=yaml.BaseLoader)
    except Exception:  # anything unreadable stays the loader's error
        return None
    if not isinstance(node, yaml.MappingNode) or not node.value:
        return None
    keys = [k.value for k, _ in node.value if isinstance(k, yaml.ScalarNode)]
    if len(keys) != len(node.value) or any(k in RECORD_KEYS for k in keys):
        return None
    return f"holds no machine record (top-level keys: {', '.join(sorted(keys)[:4])})"


def excluded(path: str, patterns: Iterable[str]) -> bool:
    """True when ``path`` matches one of the globs (``exclude`` / ``--exclude``): against its
    path relative to the current folder (``*`` crosses folders, ``**/`` may match none), and a
    glob without ``/`` also against the file name alone."""
    posix = relative(path).replace(os.sep, "/")
    name = posix.rsplit("/", 1)[-1]
    for pattern in patterns:
        if fnmatch.fnmatchcase(posix, pattern) or (
                pattern.startswith("**/") and fnmatch.fnmatchcase(posix, pattern[3:])):
            return True
        if "/" not in pattern and fnmatch.fnmatchcase(name, pattern):
            return True
    return False


class TimeLimitExceeded(BaseException):
    """Raised inside a file check when its time is up.

    A ``BaseException`` so that code which turns ``Exception`` into a user message (unit
    parsing, validators) cannot swallow it.
    """


def collect_files(paths: Iterable[str], exclude: Iterable[str] = ()
                  ) -> tuple[list[str], list[FileResult]]:
    """Data files under ``paths`` (folders recursively, sorted), and results for bad paths.

    Hidden files and folders inside a given folder are skipped, and so is every file, named
    or found, that matches a glob of ``exclude``. A path that does not exist, a
    folder that cannot be listed and a path that is neither file nor folder each give a
    :class:`FileResult` with an error; the other paths are still collected.
    """
    files: list[str] = []
    problems: list[FileResult] = []
    for raw in paths:
        path = Path(raw)
        try:
            if path.is_dir():
                files.extend(_walk(path, problems))
            elif path.is_file():
                files.append(str(path))
            elif path.exists():
                problems.append(FileResult(str(raw), f"{raw}: not a regular file or folder"))
            else:
                problems.append(FileResult(str(raw), f"{raw}: no such file or folder"))
        except (OSError, ValueError) as exc:  # e.g. a name too long, an embedded NUL
            problems.append(FileResult(str(raw), f"{raw}: cannot open ({_reason(exc)})"))
    patterns = tuple(exclude)
    if patterns:
        files = [f for f in files if not excluded(f, patterns)]
    return files, problems


def _walk(top: Path, problems: list[FileResult]) -> list[str]:
    """Data files under ``top``, sorted as paths; unreadable folders are reported, not skipped.

    Sorted part by part, as :class:`pathlib.Path` objects sort (``a/b`` before ``a-b``), but
    on strings: a walk of 100,000 files spends no time building path objects.
    """

    def unreadable(exc: OSError) -> None:
        name = exc.filename if exc.filename is not None else str(top)
        problems.append(FileResult(str(name), f"{name}: cannot read folder ({_reason(exc)})"))

    found: list[tuple[tuple[str, ...], str]] = []
    root = str(top)  # normalised by Path: no "." parts, no doubled or trailing separators
    base = "" if root == "." else root  # Path("./a") is shown as "a"
    root_parts = top.parts
    for folder, subfolders, names in os.walk(root, onerror=unreadable):
        subfolders[:] = [d for d in subfolders if not d.startswith(".")]
        below = folder[len(root):].lstrip(os.sep)
        parts = root_parts + tuple(below.split(os.sep)) if below else root_parts
        shown = os.path.join(base, below) if below else base
        for name in names:
            if name.startswith(".") or not name.lower().endswith(DATA_SUFFIXES):
                continue
            candidate = os.path.join(shown, name) if shown else name
            if os.path.isfile(candidate):
                found.append(((*parts, name), candidate))
    found.sort()
    return [path for _key, path in found]


def _reason(exc: BaseException) -> str:
    return getattr(exc, "strerror", None) or str(exc) or type(exc).__name__


def raw_records(path: str, max_bytes: int | None = None) -> list[RawRecord]:
    """The raw records of one file (JSON, YAML, PDF, CSV or XLSX). Raises InputProblem."""
    limit = max_bytes or MAX_BYTES
    if path.lower().endswith((".csv", ".xlsx")):
        from sheetlint.intake.pdf_records import spreadsheet_raw_records

        return spreadsheet_raw_records(path, limit)
    if path.lower().endswith(".pdf"):
        try:
            size = os.path.getsize(path)
        except OSError as exc:
            raise InputProblem(f"{path}: cannot read file ({_reason(exc)})") from None
        if size > limit:
            raise InputProblem(f"{path}: file is {size} bytes, over the limit of {limit}")
        from sheetlint.intake.pdf_records import pdf_raw_records

        return pdf_raw_records(path)
    return load_records(path, limit).records


def check_file(path: str, settings: Settings | None = None, *,
               max_bytes: int | None = None, time_limit: float | None = None) -> FileResult:
    """Read and check one file; never raises for bad input.

    ``time_limit`` in seconds (None or 0: no limit); a file that takes longer becomes a file
    error "time limit of N s exceeded". A failure inside sheetlint itself becomes an error
    naming the file (and record) and asking for a report, so the batch goes on.
    """
    try:
        with _deadline(time_limit):
            return _check_file(path, settings, max_bytes)
    except TimeLimitExceeded:
        return FileResult(path, f"{path}: time limit of {time_limit:g} s exceeded")
    except RecursionError:
        return FileResult(path, f"{path}: document nested too deeply")
    except MemoryError:
        return FileResult(path, f"{path}: out of memory while checking the file")
    except Exception as exc:  # a bug of ours must not stop the batch
        return FileResult(path, f"{path}: {_internal(exc)}")


def _check_file(path: str, settings: Settings | None, max_bytes: int | None) -> FileResult:
    from sheetlint.intake.pdf_records import NoMachineTable

    try:
        records = raw_records(path, max_bytes)
    except NoMachineTable as exc:
        return FileResult(path, skipped=str(exc))
    except InputProblem as exc:
        reason = foreign_yaml(path)
        if reason is not None:
            return FileResult(path, skipped=reason)
        return FileResult(path, str(exc))
    if not path.lower().endswith(".pdf"):
        reason = not_a_record(records)
        if reason is not None:
            return FileResult(path, skipped=reason)
    result = FileResult(path)
    for raw in records:
        try:
            record = check_record(raw, settings)
        except RecursionError:
            record = RecordResult(_raw_label(raw), "record nested too deeply", index=raw.index)
        except MemoryError:
            raise
        except Exception as exc:  # a bug of ours: this record fails, the others go on
            record = RecordResult(_raw_label(raw), _internal(exc), index=raw.index)
        if record.error:
            record.error = f"{path}: {_record_label(raw, record)}: {record.error}"
            if raw.duplicates:  # the record was not checked: name its repeated keys here
                record.error += "; " + "; ".join(
                    f"{d.path} is written twice, at lines {d.first_line} and {d.second_line}"
                    for d in raw.duplicates)
        result.records.append(record)
    return result


def _internal(exc: BaseException) -> str:
    text = str(exc)
    detail = f"{type(exc).__name__}: {text[:200]}" if text else type(exc).__name__
    return f"internal error of sheetlint ({detail}); please report it with this input"


def _raw_label(raw: RawRecord) -> str:
    data = raw.data
    if isinstance(data, dict) and data.get("id"):
        return str(data["id"])
    return f"records[{raw.index}]" if raw.index is not None else "(record)"


def _record_label(raw: RawRecord, record: RecordResult) -> str:
    if raw.index is None:
        return f"record '{record.id}'" if record.id != "(record)" else "record"
    return f"records[{raw.index}]" + (f" ('{record.id}')" if not record.id.startswith(
        "records[") else "")


# --- time limit ---------------------------------------------------------------------------------
def alarm_available() -> bool:
    """True where the time limit can be enforced in this thread (POSIX, main thread)."""
    return (hasattr(signal, "setitimer") and hasattr(signal, "SIGALRM")
            and threading.current_thread() is threading.main_thread())


@contextmanager
def _deadline(seconds: float | None) -> Iterator[None]:
    """Raise :class:`TimeLimitExceeded` in the block after ``seconds`` (SIGALRM on POSIX).

    Where SIGALRM cannot be used (Windows, a thread other than the main one) the block runs
    without a limit; in a parallel run the parent still stops a worker that stops responding.
    """
    if not seconds or seconds <= 0 or not math.isfinite(seconds) or not alarm_available():
        yield
        return
    state = {"armed": True}

    def on_alarm(_signum: int, _frame: FrameType | None) -> None:
        if state["armed"]:
            raise TimeLimitExceeded

    previous = signal.signal(signal.SIGALRM, on_alarm)
    signal.setitimer(signal.ITIMER_REAL, seconds, _REARM_SECONDS)
    try:
        yield
    finally:
        state["armed"] = False
        signal.setitimer(signal.ITIMER_REAL, 0.0)
        signal.signal(signal.SIGALRM, previous)


# --- batches ------------------------------------------------------------------------------------
def effective_time_limit(time_limit: float | None) -> float | None:
    """The limit to enforce: the default when None; none at all for 0 or a negative value."""
    if time_limit is None:
        return DEFAULT_TIME_LIMIT
    if time_limit <= 0 or not math.isfinite(time_limit):
        return None
    return float(time_limit)


def check_paths(paths: Iterable[str], settings: Settings | None = None, *,
                jobs: int | None = None, time_limit: float | None = None,
                max_bytes: int | None = None, exclude: Iterable[str] = (),
                render: Callable[[FileResult], Any] | None = None) -> Iterator[Any]:
    """Check every data file under ``paths``, in order.

    ``jobs``: worker processes (None: workers only when the batch is large enough to repay
    their start; 1: serial; 0 or less: one per CPU); ``time_limit``: seconds per file (None:
    30 s; 0: no limit); ``max_bytes``: size limit per file (None: 20 MB); ``exclude``: globs
    of files to leave out. Paths that do not exist come first, then the files in the order
    :func:`collect_files` gives.

    ``render``: applied to each :class:`FileResult` in the process that checked the file (a
    streaming report's ``part``), and its value yielded instead of the result; it must be
    picklable and give the same value in any process.
    """
    files, problems = collect_files(paths, exclude)
    for problem in problems:
        yield render_safely(render, problem)
    limit = effective_time_limit(time_limit)
    from sheetlint.parallel import plan_workers

    workers = plan_workers(len(files), jobs)
    if workers > 1:
        from sheetlint.parallel import check_in_workers

        yield from check_in_workers(files, settings, workers=workers, time_limit=limit,
                                    max_bytes=max_bytes, render=render)
        return
    if files:
        _load_engine()  # before any time limit runs, so that no limit cuts an import in half
    for path in files:
        yield render_safely(render, check_file(path, settings, max_bytes=max_bytes,
                                               time_limit=limit))


def render_safely(render: Callable[[FileResult], Any] | None, result: FileResult) -> Any:
    """``render(result)`` (or ``result`` without a render); a failure of the render becomes
    an error of the file, so the batch goes on."""
    if render is None:
        return result
    try:
        return render(result)
    except Exception as exc:  # a bug of ours in a report must not stop the batch
        return render(FileResult(result.path, f"{result.path}: {_internal(exc)}"))


def _load_engine() -> None:
    from sheetlint.relations.registry import all_relations

    all_relations()


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
            if any(SEVERITY_RANK[x.severity] >= threshold and x.accepted is None
                   for x in r.findings):
                failed = True
    return 1 if failed else 0


def relative(path: str) -> str:
    try:
        rel = os.path.relpath(path)
    except ValueError:
        return path
    return path if rel.startswith("..") else rel
