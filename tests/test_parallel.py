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


# --- streaming reports over a repository of a few hundred files ---------------------------------
def _repository(root: Path, count: int = 300) -> Path:
    """Single-record JSON and YAML files of consistent synthetic machines (invented), with
    planted slips, repeated keys, several-record files and unreadable files among them."""
    import yaml

    from sheetlint.synth import MachineSpec, record

    folder = root / "repository"
    bases = [record(MachineSpec(power, speed, poles), f"BASE-{i}")
             for i, (power, speed, poles) in enumerate(
                 [(5.5, 1500, 4), (15, 1000, 6), (45, 3000, 8), (90, 750, 10)])]
    for i in range(count):
        sub = folder / f"lot-{i // 100}"
        sub.mkdir(parents=True, exist_ok=True)
        data = json.loads(json.dumps(bases[i % len(bases)]))
        data["id"] = f"RP-{i:04d} (invented)"
        if i % 5 == 1:
            data["rated"]["torque"] = data["rated"]["torque"].replace(" ", "0 ", 1)
        if i % 37 == 5:
            (sub / f"m{i:04d}.json").write_text('{"id": "broken", ', encoding="utf-8")
        elif i % 41 == 7:
            text = json.dumps(data, indent=2).replace(
                '"maker":', '"maker": "Twice Works (invented)",\n  "maker":', 1)
            (sub / f"m{i:04d}.json").write_text(text, encoding="utf-8")
        elif i % 43 == 9:
            (sub / f"m{i:04d}.json").write_text(json.dumps(
                {"records": [data, {"id": "RP-bad", "rated": {"power": "15 kg"}}]}),
                encoding="utf-8")
        elif i % 3 == 0:
            (sub / f"m{i:04d}.yaml").write_text(yaml.safe_dump(data, sort_keys=False),
                                                encoding="utf-8")
        else:
            (sub / f"m{i:04d}.json").write_text(json.dumps(data, indent=2), encoding="utf-8")
    return folder


def _stream(report: object, paths: list[str], jobs: int) -> tuple[str, int]:
    import io

    from sheetlint.report import ReportWriter

    buffer = io.StringIO()
    writer = ReportWriter(report, buffer)  # type: ignore[arg-type]
    writer.start()
    for part in check_paths(paths, jobs=jobs, render=report.part):  # type: ignore[attr-defined]
        writer.add(part)
    status = writer.finish().exit_status()
    return buffer.getvalue(), status


class _EveryReport:
    """The parts of the three streaming reports of one file, made in one check."""

    def __init__(self) -> None:
        from sheetlint.report.json_report import JsonReport
        from sheetlint.report.sarif import SarifReport
        from sheetlint.report.text_stream import TextReport

        self.reports = (TextReport(), JsonReport(), SarifReport())

    def part(self, result: FileResult) -> tuple[object, ...]:
        return tuple(report.part(result) for report in self.reports)


def _stream_every_report(paths: list[str], jobs: int) -> list[tuple[str, int]]:
    import io

    from sheetlint.report import ReportWriter

    every = _EveryReport()
    buffers = [io.StringIO() for _ in every.reports]
    writers = [ReportWriter(r, b) for r, b in zip(every.reports, buffers, strict=True)]
    for parts in check_paths(paths, jobs=jobs, render=every.part):
        for writer, part in zip(writers, parts, strict=True):
            writer.add(part)
    statuses = [writer.finish().exit_status() for writer in writers]
    return [(b.getvalue(), status) for b, status in zip(buffers, statuses, strict=True)]


def test_streamed_reports_of_serial_and_parallel_runs_are_byte_identical(tmp_path):
    paths = [str(_repository(tmp_path)), str(tmp_path / "missing")]
    serial = _stream_every_report(paths, jobs=1)
    workers = _stream_every_report(paths, jobs=2)
    for (serial_text, status_1), (workers_text, status_2) in zip(serial, workers, strict=True):
        assert serial_text == workers_text
        assert status_1 == status_2 == 2
    assert len(json.loads(workers[1][0])["files"]) == 301  # JSON: one valid document
    assert len(json.loads(workers[2][0])["runs"][0]["artifacts"]) == 301  # SARIF too


def test_streamed_json_is_one_document_with_the_contract_summary(tmp_path):
    from sheetlint.report.json_report import JsonReport

    folder = _repository(tmp_path, 60)
    streamed, _ = _stream(JsonReport(), [str(folder)], jobs=1)
    document = json.loads(streamed)
    results = list(check_paths([str(folder)], jobs=1))
    assert document["summary"] == json_report.summary(results)
    assert document["summary"]["files"] == 60
    assert document["files"] == json.loads(json_report.render(results))["files"]
    assert json.loads(_stream(JsonReport(), [], jobs=1)[0])["files"] == []


def test_streamed_text_is_the_text_report_with_its_final_newline(tmp_path):
    from sheetlint.report.text_stream import TextReport

    folder = _mixed_folder(tmp_path, 2)
    streamed, _ = _stream(TextReport(show_derived=True), [str(folder)], jobs=1)
    results = list(check_paths([str(folder)], jobs=1))
    assert streamed == text.render(results, show_derived=True) + "\n"


def test_each_file_is_written_as_soon_as_it_is_checked(tmp_path):
    import io

    from sheetlint.report import ReportWriter
    from sheetlint.report.json_report import JsonReport

    folder = _repository(tmp_path, 12)
    report = JsonReport()
    buffer = io.StringIO()
    writer = ReportWriter(report, buffer)
    parts = check_paths([str(folder)], jobs=1, render=report.part)
    writer.add(next(parts))
    assert buffer.getvalue().count('{"path": ') == 1  # the other 11 files are not checked yet
    parts.close()


def test_cli_streams_the_same_bytes_with_and_without_workers(tmp_path):
    folder = _repository(tmp_path, 80)
    outputs = []
    for jobs in ("1", "2"):
        out = tmp_path / f"report-{jobs}.sarif"
        status = main(["check", "--no-settings", "--format", "sarif", "--jobs", jobs,
                       "-o", str(out), str(folder)])
        assert status == 2
        outputs.append(out.read_bytes())
    assert outputs[0] == outputs[1]


def test_quiet_text_skips_info_lines_yet_prints_the_same_report(tmp_path, capsys):
    # errors and warnings keep their lines; only the infos, which the default text output
    # hides (shown with --notes), lose them
    folder = _repository(tmp_path, 40)
    status = main(["check", "--no-settings", "--jobs", "1", str(folder)])
    quiet = capsys.readouterr().out
    results = list(check_paths([str(folder)], jobs=1))
    assert quiet == text.render(results) + "\n"
    assert status == exit_status(results) == 2
    assert "  line " in quiet  # findings shown with their lines


def test_notes_text_streams_the_same_report_with_info_lines_and_coverage(tmp_path, capsys):
    from sheetlint.engine.core import Settings

    folder = _repository(tmp_path, 40)
    status = main(["check", "--no-settings", "--notes", "--jobs", "2", str(folder)])
    shown = capsys.readouterr().out
    results = list(check_paths([str(folder)], Settings(coverage=True), jobs=1))
    assert shown == text.render(results, notes=True) + "\n"
    assert status == exit_status(results) == 2
    assert "    note " in shown and "coverage: " in shown


def test_settings_without_info_lines_leave_other_findings_located(tmp_path):
    from sheetlint.engine.core import Settings

    folder = _repository(tmp_path, 12)
    full = list(check_paths([str(folder)], jobs=1))
    lean = list(check_paths([str(folder)], Settings(locate_info=False), jobs=1))
    pairs = [(a, b) for f, g in zip(full, lean, strict=True)
             for r, s in zip(f.records, g.records, strict=True)
             for a, b in zip(r.findings, s.findings, strict=True)]
    assert pairs
    for located, lean_finding in pairs:
        expected = None if located.severity == "info" else located.location
        assert lean_finding.location == expected


def test_a_walk_of_the_current_folder_names_files_as_before(tmp_path, monkeypatch):
    # pathlib shows Path(".", "a.json") as "a.json": the walk on strings must name it the same
    (tmp_path / "sub").mkdir()
    for name in ("b.json", "a-b.json", "sub/a.yaml"):
        (tmp_path / name).write_text("{}", encoding="utf-8")
    monkeypatch.chdir(tmp_path)
    assert batch.collect_files(["."])[0] == ["a-b.json", "b.json", "sub/a.yaml"]
    assert batch.collect_files(["./sub/"])[0] == ["sub/a.yaml"]


def test_a_new_report_file_inside_the_checked_folder_is_not_read_as_data(tmp_path,
                                                                          monkeypatch):
    monkeypatch.chdir(tmp_path)
    shutil.copy(FIXTURES / "consistent-spm-5k5-dosing-pump.yaml", tmp_path / "m.yaml")
    status = main(["check", "--no-settings", "--format", "json", "-o", "report.json", "."])
    document = json.loads((tmp_path / "report.json").read_text(encoding="utf-8"))
    assert [f["path"] for f in document["files"]] == ["m.yaml"]
    assert status in (0, 1)


def test_the_report_does_not_depend_on_string_hashing(tmp_path):
    # a worker may hash strings with another seed than the parent (spawn, another machine):
    # findings grouped under a cause must come out in the same order whatever the seed
    import subprocess
    import sys

    outputs = []
    for seed in ("1", "2"):
        done = subprocess.run(
            [sys.executable, "-m", "sheetlint", "check", "--no-settings", "--no-progress",
             "--format", "json", "--jobs", "1", str(FIXTURES)],
            capture_output=True, text=True, env={**os.environ, "PYTHONHASHSEED": seed},
            check=False)
        assert done.returncode == 1, done.stderr
        outputs.append(done.stdout)
    assert '"consequences": ["' in outputs[0]
    assert outputs[0] == outputs[1]


def test_an_info_the_severity_table_lifts_keeps_its_line():
    # the default text output hides infos and so skips their lines; a rule the settings'
    # severity table lifts to a warning is shown, so its line is looked up
    from sheetlint.engine.core import Settings

    lifted = Settings(locate_info=False, severity={"field-weakening-speed": "warning"})
    result = check_file(str(FIXTURES / "planted-hp-as-kw.yaml"), lifted)
    findings = [x for r in result.records for x in r.findings]
    shown = [x for x in findings if x.rule == "field-weakening-speed"]
    assert shown and shown[0].severity == "warning"
    assert shown[0].location is not None and "line" in shown[0].location
    assert all(x.location is None for x in findings if x.severity == "info")
