"""Start-up of a one-file check: wall time of cold processes and the slowest imports.

Runs ``python -m sheetlint check FILE`` in fresh processes (best and median wall time; budget
0.6 s in DESIGN.md) for a usual file, for a file with a unit outside the fast table (which
loads pint) and for an unreadable record; then ``-X importtime`` for the usual file, listing
the imports that cost most. Prints figures; asserts nothing.

    /work/venv/bin/python bench/bench_startup.py [--repeat 7] [FILE]
"""

from __future__ import annotations

import argparse
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

FIXTURE = (Path(__file__).resolve().parent.parent / "fixtures"
           / "consistent-spm-5k5-dosing-pump.yaml")
UNUSUAL_UNIT = "id: BENCH-1\nmaker: Quarrystone Drives (invented)\nrated:\n  power: 51200 BTU/h\n"
UNREADABLE = "id: BENCH-2\nrated:\n  power: 15 kg\n"


def wall_times(path: str, repeat: int) -> list[float]:
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        subprocess.run([sys.executable, "-m", "sheetlint", "check", "--no-progress", path],
                       capture_output=True)
        times.append(time.perf_counter() - start)
    return times


def slowest_imports(path: str, count: int) -> list[tuple[int, str]]:
    done = subprocess.run([sys.executable, "-X", "importtime", "-m", "sheetlint", "check",
                           "--no-progress", path], capture_output=True, text=True)
    rows = []
    for line in done.stderr.splitlines():
        if not line.startswith("import time:") or "cumulative" in line:
            continue
        _self, cumulative, name = line.removeprefix("import time:").split("|")
        depth = len(name) - len(name.lstrip()) - 1
        if depth <= 4:  # top-level and the first nested imports only
            rows.append((int(cumulative), name.strip()))
    return sorted(rows, reverse=True)[:count]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("file", nargs="?", default=str(FIXTURE))
    parser.add_argument("--repeat", type=int, default=7)
    options = parser.parse_args()
    with tempfile.TemporaryDirectory(prefix="sheetlint-start-") as tmp:
        unusual = Path(tmp, "unusual-unit.yaml")
        unusual.write_text(UNUSUAL_UNIT, encoding="utf-8")
        unreadable = Path(tmp, "unreadable.yaml")
        unreadable.write_text(UNREADABLE, encoding="utf-8")
        for label, path in (("usual file", options.file), ("unit outside the fast table",
                                                           str(unusual)),
                            ("unreadable record", str(unreadable))):
            times = wall_times(path, options.repeat)
            print(f"{label:<30} best {min(times):.3f} s  median {statistics.median(times):.3f} s"
                  f"  ({options.repeat} cold runs; budget 0.6 s)")
    start = time.perf_counter()
    subprocess.run([sys.executable, "-c", "pass"], capture_output=True)
    print(f"{'bare interpreter':<30} {time.perf_counter() - start:.3f} s")
    print("slowest imports of the usual file (cumulative ms):")
    for micros, name in slowest_imports(options.file, 12):
        print(f"  {micros / 1000:7.1f}  {name}")


if __name__ == "__main__":
    main()
