"""A repository of single-record files: ``sheetlint check`` against the floor, in one run.

Generates N single-record JSON files of consistent synthetic machines (invented makers,
``sheetlint.synth``; one file in seven carries a usual slip, one in 500 is broken JSON), then
runs, each in a fresh process and one after the other:

- the floor: one Python process that walks the folder, reads, parses and pydantic-validates
  every file with the project's own model (what any schema-based checker pays);
- ``sheetlint check`` with default options, once per requested output format.

For each run it prints the wall time and the CPU time (user + system of every process of the
run) with their ratios to the floor's, and two memory figures: the
largest resident set of any one process of the run (``ru_maxrss`` of the waited-for process
tree, what ``/usr/bin/time -v`` reports), and the peak of the sum of proportional set sizes
(PSS, shared pages split between the processes that share them) over the run's process tree,
sampled every 20 ms from ``/proc`` (Linux only; "n/a" elsewhere). DESIGN.md budgets: check at
most 4x the floor for 10,000 files; peak memory under 150 MB for 10,000 and 100,000 files.
Prints figures; asserts nothing. On a shared machine the times drift by tens of per cent:
compare the ratio, which the floor and the check measure on the same machine state.

    python bench/bench_repository.py [--files 1000|10000|100000] [--formats text,json]
                                     [--keep DIR] [--jobs N]
"""

from __future__ import annotations

import argparse
import json
import os
import random
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path

from sheetlint.synth import MachineSpec, record

MAKERS = ("Fenwick Hollow Motors (invented)", "Quarrystone Drives (invented)",
          "Ottermere Electric (invented)", "Brackenfold Machines (invented)")
FILES_PER_FOLDER = 1000
SAMPLE_SECONDS = 0.02

FLOOR = """
import json, os, sys
from sheetlint.model import MachineRecord
top = sys.argv[1]
count = bad = 0
for folder, subfolders, names in os.walk(top):
    subfolders.sort()
    for name in sorted(names):
        if not name.endswith(".json"):
            continue
        with open(os.path.join(folder, name), "rb") as handle:
            raw = handle.read()
        count += 1
        try:
            MachineRecord.model_validate(json.loads(raw))
        except ValueError:
            bad += 1
print(count, bad)
"""


def base_records(count: int = 64, seed: int = 22) -> list[dict]:
    """Consistent machines of several sizes, speeds, pole counts and topologies."""
    rng = random.Random(seed)
    out = []
    for i in range(count):
        spec = MachineSpec(power_kw=rng.choice([1.5, 5.5, 15, 45, 90, 160, 315]),
                           speed_rpm=rng.choice([750, 1000, 1500, 3000]),
                           poles=rng.choice([4, 6, 8, 10]),
                           topology=rng.choice(["spm", "ipm"]),
                           voltage_ratio=rng.uniform(0.85, 0.93))
        out.append(record(spec, f"BASE-{i}", maker=MAKERS[i % len(MAKERS)]))
    return out


def generate(folder: Path, count: int) -> None:
    """``count`` single-record JSON files under ``folder``, 1,000 to a subfolder."""
    bases = base_records()
    for i in range(count):
        sub = folder / f"lot-{i // FILES_PER_FOLDER:03d}"
        if i % FILES_PER_FOLDER == 0:
            sub.mkdir(parents=True, exist_ok=True)
        path = sub / f"m{i:06d}.json"
        if i % 500 == 499:
            path.write_text('{"id": "broken", ', encoding="utf-8")
            continue
        data = json.loads(json.dumps(bases[i % len(bases)]))
        data["id"] = f"RX-{i:06d} (invented)"
        if i % 7 == 3:  # a usual slip: the torque written ten times too large
            data["rated"]["torque"] = data["rated"]["torque"].replace(" ", "0 ", 1)
        path.write_text(json.dumps(data, indent=2, ensure_ascii=False), encoding="utf-8")


def _tree(pid: int) -> list[int]:
    """``pid`` and its descendants (Linux /proc)."""
    out, todo = [], [pid]
    while todo:
        current = todo.pop()
        out.append(current)
        try:
            for task in os.listdir(f"/proc/{current}/task"):
                with open(f"/proc/{current}/task/{task}/children") as handle:
                    todo.extend(int(c) for c in handle.read().split())
        except OSError:
            continue
    return out


def _pss_kib(pid: int) -> int:
    try:
        with open(f"/proc/{pid}/smaps_rollup") as handle:
            for line in handle:
                if line.startswith("Pss:"):
                    return int(line.split()[1])
    except (OSError, ValueError):
        pass
    return 0


def run_measured(command: list[str]) -> tuple[float, float, int, float, float | None, str]:
    """Wall seconds, CPU seconds (user + system, all processes), exit status, largest RSS
    (MB), peak summed PSS (MB or None), stderr."""
    start = time.perf_counter()
    process = subprocess.Popen(command, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    peak = {"pss": 0}
    sampling = os.path.exists("/proc/self/smaps_rollup")
    done = threading.Event()

    def sample() -> None:
        while not done.is_set():
            total = sum(_pss_kib(p) for p in _tree(process.pid))
            peak["pss"] = max(peak["pss"], total)
            done.wait(SAMPLE_SECONDS)

    sampler = threading.Thread(target=sample, daemon=True)
    if sampling:
        sampler.start()
    stderr_chunks = []
    assert process.stderr is not None
    for chunk in iter(lambda: process.stderr.read(65536), b""):  # type: ignore[union-attr]
        stderr_chunks.append(chunk[-4000:])
    _pid, status, usage = os.wait4(process.pid, 0)
    elapsed = time.perf_counter() - start
    done.set()
    if sampling:
        sampler.join()
    process.returncode = os.waitstatus_to_exitcode(status)
    stderr = b"".join(stderr_chunks).decode("utf-8", "replace")
    return (elapsed, usage.ru_utime + usage.ru_stime, process.returncode, usage.ru_maxrss / 1024,
            peak["pss"] / 1024 if sampling else None, stderr)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--files", type=int, default=1000)
    parser.add_argument("--formats", default="text,json",
                        help="comma-separated output formats of the check runs")
    parser.add_argument("--jobs", type=int, default=None,
                        help="pass --jobs N to check (default: check's own default)")
    parser.add_argument("--keep", default=None, metavar="DIR",
                        help="generate into DIR (reused when it holds the files already)")
    parser.add_argument("--repeat", type=int, default=1, help="rounds of floor and checks")
    options = parser.parse_args()
    with tempfile.TemporaryDirectory(prefix="sheetlint-repo-") as tmp:
        folder = Path(options.keep) if options.keep else Path(tmp, "records")
        marker = folder / f".generated-{options.files}"
        if not marker.exists():
            start = time.perf_counter()
            generate(folder, options.files)
            marker.write_text("")
            print(f"generated {options.files} files in {time.perf_counter() - start:.1f} s")
        print(f"load average before the runs: {' '.join(f'{x:.2f}' for x in os.getloadavg())} "
              f"on {os.cpu_count()} CPUs (other work on a shared machine slows every run)")
        python = sys.executable
        out = str(Path(tmp, "report.out"))
        jobs = ["--jobs", str(options.jobs)] if options.jobs is not None else []
        print(f"{'run':<28} {'wall s':>7} {'x floor':>8} {'CPU s':>7} {'x floor':>8} "
              f"{'max RSS MB':>11} {'peak PSS MB':>12} exit")
        for _ in range(options.repeat):
            floor = run_measured([python, "-c", FLOOR, str(folder)])
            _row("floor (read+parse+validate)", floor, floor)
            for fmt in options.formats.split(","):
                command = [python, "-m", "sheetlint", "check", "--no-progress", "--format",
                           fmt, "-o", out, *jobs, str(folder)]
                _row(f"check --format {fmt}", run_measured(command), floor)


def _row(label: str, run: tuple[float, float, int, float, float | None, str],
         floor: tuple[float, float, int, float, float | None, str]) -> None:
    elapsed, cpu, status, rss, pss, stderr = run
    shown = f"{pss:12.0f}" if pss is not None else f"{'n/a':>12}"
    print(f"{label:<28} {elapsed:7.2f} {elapsed / floor[0]:8.2f} {cpu:7.2f} "
          f"{cpu / floor[1]:8.2f} {rss:11.0f} {shown} {status}", flush=True)
    if "Traceback" in stderr:
        print(stderr[-2000:], file=sys.stderr)


if __name__ == "__main__":
    main()
