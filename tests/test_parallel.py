"""Worker processes: the same output as a serial run, in the same order; limits still hold."""

from __future__ import annotations

import json
import math
import os
import pickle
import shutil
import time
from pathlib import Path

import pytest

from sheetlint import batch, parallel
from sheetlint.batch import FileResult, check_file, check_paths, exit_status
from sheetlint.cli import main
from sheetlint.report import json_report, text

FIXTURES = Path(__file__).resolve().parent.parent / "fixtures"
needs_fork = pytest.mark.skipif(not hasattr(os, "fork"), reason="monkeypatching workers needs fork")


def _mixed_folder(root: Path, copies: int) -> Path:
    """Good, planted and unreadable files, several records per file, in nested folders."""
    folder = root / "batch"
    sources = sorted(FIXTURES.glob("*.yaml"))
    bad = {
        "broken.json": '{"id": "A", ',
        "nan.json": '{"id": "A", "rated": {"power": NaN}}',
        "mixed.json": json.dumps({"records": [{"id": "M-1", "rated": {"power": "15 kW"}},
                                              {"id": "M-2", "rated": {"power": "15 furlong"}},
                                              3]}),
        "empty.yaml": "",
    }
    for i in range(copies):
        sub = folder / f"group-{i % 3}"
        sub.mkdir(parents=True, exist_ok=True)
        for src in sources:
            shutil.copy(src, sub / f"{i:03d}-{src.name}")
        for name, content in bad.items():
            (sub / f"{i:03d}-{name}").write_text(content)
    return folder


def test_parallel_output_is_identical_to_serial_and_in_the_same_order(tmp_path):
    folder = _mixed_folder(tmp_path, 6)
    serial = list(check_paths([str(folder), str(tmp_path / "missing")], jobs=1))
    workers = list(check_paths([str(folder), str(tmp_path / "missing")], jobs=2))
    assert [r.path for r in serial] == [r.path for r in workers]
    assert json_report.render(serial) == json_report.render(workers)
    assert text.render(serial, show_derived=True) == text.render(workers, show_derived=True)
    assert exit_status(serial) == exit_status(workers) == 2
    assert len(serial) > 60 and any(r.error for r in serial)


def test_serial_results_keep_the_sheet_worker_results_drop_it(tmp_path):
    folder = _mixed_folder(tmp_path, 2)
    serial = [r for f in check_paths([str(folder)], jobs=1) for r in f.records if not r.error]
    workers = [r for f in check_paths([str(folder)], jobs=2) for r in f.records if not r.error]
    assert serial and all(r.sheet is not None for r in serial)
    assert workers and all(r.sheet is None for r in workers)


def test_worker_results_pickle_round_trip():
    result = check_file(str(FIXTURES / "planted-ke-per-phase.yaml"))
    result = parallel._portable(result)
    again = pickle.loads(pickle.dumps(result))
    assert json_report.render([again]) == json_report.render([result])


def test_cli_jobs_option_gives_the_serial_report(tmp_path, capsys):
    folder = _mixed_folder(tmp_path, 3)
    status_1 = main(["check", "--format", "json", "--jobs", "1", str(folder)])
    out_1 = capsys.readouterr().out
    status_2 = main(["check", "--format", "json", "--jobs", "2", str(folder)])
    out_2 = capsys.readouterr().out
    assert status_1 == status_2 == 2
    assert out_1 == out_2


@pytest.mark.parametrize("files,jobs,expected", [
    (1, None, 1), (10, None, 1), (1, 8, 1), (5, 3, 3), (3, 8, 3), (0, 4, 1),
])
def test_plan_workers_small_batches_and_explicit_jobs(files, jobs, expected):
    assert parallel.plan_workers(files, jobs) == expected


def test_plan_workers_default_uses_every_cpu_only_for_a_large_batch():
    cpus = parallel.cpu_count()
    assert parallel.plan_workers(parallel.PARALLEL_MIN_FILES - 1, None) == 1
    assert parallel.plan_workers(parallel.PARALLEL_MIN_FILES, None) == cpus
    assert parallel.plan_workers(10_000, 0) == cpus


def test_chunks_give_each_worker_several_tasks_of_bounded_size():
    for count in (2, 7, 200, 5000):
        size = parallel.chunk_size(count, 2)
        assert 1 <= size <= parallel.MAX_CHUNK
        assert math.ceil(count / size) >= min(count, 4 * 2)


@needs_fork
def test_time_limit_holds_in_workers_and_the_batch_goes_on(tmp_path, monkeypatch):
    folder = _mixed_folder(tmp_path, 2)
    slow = folder / "group-0" / "001-slow.json"
    slow.write_text(json.dumps({"id": "SLOW-1", "rated": {"power": "15 kW"}}))
    real_check_record = batch.check_record

    def sometimes_slow(raw, settings=None):  # type: ignore[no-untyped-def]
        if isinstance(raw.data, dict) and raw.data.get("id") == "SLOW-1":
            while True:
                time.sleep(0.01)
        return real_check_record(raw, settings)

    monkeypatch.setattr(batch, "check_record", sometimes_slow)  # inherited by forked workers
    results = list(check_paths([str(folder)], jobs=2, time_limit=0.3))
    by_path = {r.path: r for r in results}
    assert by_path[str(slow)].error == f"{slow}: time limit of 0.3 s exceeded"
    assert sum(1 for r in results if r.records) > 10


@needs_fork
def test_a_worker_that_dies_is_named_and_the_other_files_are_checked(tmp_path, monkeypatch):
    folder = _mixed_folder(tmp_path, 2)
    fatal = folder / "group-1" / "001-fatal.json"
    fatal.write_text(json.dumps({"id": "FATAL-1", "rated": {"power": "15 kW"}}))
    real_check_record = batch.check_record

    def sometimes_fatal(raw, settings=None):  # type: ignore[no-untyped-def]
        if isinstance(raw.data, dict) and raw.data.get("id") == "FATAL-1":
            os._exit(9)  # as if killed for memory
        return real_check_record(raw, settings)

    monkeypatch.setattr(batch, "check_record", sometimes_fatal)
    serial_paths = [p for p in batch.collect_files([str(folder)])[0]]
    start = time.perf_counter()
    results = list(check_paths([str(folder)], jobs=2, time_limit=5))
    assert time.perf_counter() - start < 60
    assert [r.path for r in results] == serial_paths
    errors = {r.path: r.error for r in results if r.error}
    assert "stopped responding or died" in errors[str(fatal)]
    assert all("stopped responding" not in e for p, e in errors.items() if p != str(fatal))


def test_generator_can_be_abandoned_without_leaving_workers(tmp_path):
    folder = _mixed_folder(tmp_path, 4)
    results = check_paths([str(folder)], jobs=2)
    first = next(results)
    assert isinstance(first, FileResult)
    results.close()  # stops the pool
    import multiprocessing

    deadline = time.monotonic() + 10
    while multiprocessing.active_children() and time.monotonic() < deadline:
        time.sleep(0.05)
    assert not multiprocessing.active_children()
