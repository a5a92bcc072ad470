"""Throughput of ``sheetlint check`` on 5,000 record files: serial, ``--jobs 2``, and default.

Generates plausible records (invented makers, clearly fictitious) into a temporary folder,
then runs the CLI as a user would, in a fresh process each time, and prints files per second.
Also prints the wall time of a one-file check. Prints figures; asserts nothing.

    /work/venv/bin/python bench/bench_batch.py [--files 5000] [--jobs 2]
"""

from __future__ import annotations

import argparse
import json
import math
import random
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

MAKERS = ("Fenwick Hollow Motors (invented)", "Quarrystone Drives (invented)",
          "Ottermere Electric (invented)", "Brackenfold Machines (invented)")
SQRT3 = math.sqrt(3.0)


def _round(value: float, digits: int = 4) -> float:
    return float(f"{value:.{digits}g}")


def plausible_record(index: int, rng: random.Random) -> dict:
    """A surface-magnet machine whose fields roughly agree (steady state, no saliency)."""
    power_kw = rng.choice([1.5, 2.2, 4.0, 5.5, 7.5, 11, 15, 22, 30, 45, 55, 75, 90, 110])
    speed_rpm = rng.choice([1000, 1500, 1800, 3000, 3600])
    poles = rng.choice([4, 6, 8, 10])
    voltage = rng.choice([380.0, 400.0, 460.0])
    efficiency = rng.uniform(0.93, 0.97)
    power_factor = rng.uniform(0.88, 0.97)
    omega = speed_rpm * 2 * math.pi / 60
    power = power_kw * 1e3
    torque = power / omega
    current = power / (efficiency * SQRT3 * voltage * power_factor)
    emf_line = voltage / 1.065  # line rms back-EMF at rated speed, hot magnets
    ke_v_per_krpm = emf_line / speed_rpm * 1000
    record = {
        "id": f"BX-{index:05d}-{power_kw:g}",
        "maker": rng.choice(MAKERS),
        "machine": {"topology": "spm", "poles": poles, "thermal_class": "F",
                    "ambient": "40 °C"},
        "rated": {"power": f"{power_kw:g} kW", "speed": f"{speed_rpm} rpm",
                  "frequency": f"{poles * speed_rpm / 120:.2f} Hz",
                  "torque": f"{_round(torque)} N*m", "voltage": f"{voltage:.1f} V",
                  "current": f"{_round(current)} A",
                  "power_factor": f"{power_factor:.3f}",
                  "efficiency": f"{efficiency * 100:.2f} %"},
        "emf": {"constant": f"{_round(ke_v_per_krpm)} V/krpm"},
        "circuit": {"resistance": f"{_round(0.01 * voltage / SQRT3 / current)} ohm"},
        "limits": {"max_speed": f"{int(speed_rpm * 1.2)} rpm"},
    }
    if index % 50 == 7:  # a planted slip: Ke per phase
        record["emf"]["constant"] = f"{_round(ke_v_per_krpm / SQRT3)} V/krpm"
    return record


def generate(folder: Path, count: int, seed: int = 8) -> None:
    rng = random.Random(seed)
    for i in range(count):
        sub = folder / f"lot-{i // 500:02d}"
        sub.mkdir(parents=True, exist_ok=True)
        data = plausible_record(i, rng)
        if i % 500 == 499:  # an unreadable file now and then
            (sub / f"m{i:05d}.json").write_text('{"id": "broken", ', encoding="utf-8")
        elif i % 2:
            (sub / f"m{i:05d}.json").write_text(json.dumps(data, ensure_ascii=False),
                                                encoding="utf-8")
        else:
            import yaml

            (sub / f"m{i:05d}.yaml").write_text(yaml.safe_dump(data, allow_unicode=True,
                                                               sort_keys=False),
                                                encoding="utf-8")


def _spin(_: int) -> float:
    start = time.perf_counter()
    total = 0
    for i in range(3_000_000):
        total += i * i
    return time.perf_counter() - start


def machine_scaling(jobs: int) -> float:
    """How much faster ``jobs`` processes finish ``jobs`` equal CPU loops than one process
    does them in turn (jobs·1.0 on an idle machine; less when other work holds the CPUs)."""
    import multiprocessing

    one = _spin(0)
    with multiprocessing.Pool(jobs) as pool:
        start = time.perf_counter()
        pool.map(_spin, range(jobs), chunksize=1)
        together = time.perf_counter() - start
    return jobs * one / together


def run_cli(*args: str) -> tuple[float, int]:
    start = time.perf_counter()
    done = subprocess.run([sys.executable, "-m", "sheetlint", "check", "--no-progress", *args],
                          capture_output=True, text=True)
    elapsed = time.perf_counter() - start
    if "Traceback" in done.stderr:
        print(done.stderr[-2000:], file=sys.stderr)
    return elapsed, done.returncode


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--files", type=int, default=5000)
    parser.add_argument("--jobs", type=int, default=2)
    parser.add_argument("--repeat", type=int, default=5, help="runs of the one-file check")
    options = parser.parse_args()
    with tempfile.TemporaryDirectory(prefix="sheetlint-bench-") as tmp:
        folder = Path(tmp, "records")
        start = time.perf_counter()
        generate(folder, options.files)
        print(f"generated {options.files} files in {time.perf_counter() - start:.1f} s")
        print(f"CPU scaling available with {options.jobs} processes right now: "
              f"{machine_scaling(options.jobs):.2f} (ideal {options.jobs})")
        out = str(Path(tmp, "report.json"))
        runs = [("serial (--jobs 1)", ["--jobs", "1"]),
                (f"--jobs {options.jobs}", ["--jobs", str(options.jobs)]),
                ("default (no --jobs)", [])]
        serial = None
        for label, extra in runs:
            elapsed, status = run_cli("--format", "json", "-o", out, *extra, str(folder))
            rate = options.files / elapsed
            serial = serial or elapsed
            print(f"{label:<22} {elapsed:6.2f} s  {rate:7.0f} files/s  "
                  f"speed-up {serial / elapsed:4.2f}  (exit {status})")
        one = next(folder.rglob("*.yaml"))
        times = [run_cli(str(one))[0] for _ in range(options.repeat)]
        print(f"one-file check (cold process): best {min(times):.3f} s, "
              f"median {statistics.median(times):.3f} s over {options.repeat} runs "
              "(budget 0.3 s, DESIGN.md)")


if __name__ == "__main__":
    main()
