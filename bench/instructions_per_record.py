"""Machine instructions the engine spends per record after validation, counted by callgrind.

On a shared machine a timing drifts by tens of percent within a minute; an instruction count
does not. For speed work that changes a few percent, compare this figure before and after
(it ignores cache misses, so confirm a real change with ``bench_engine.py`` as well).

The script runs itself under valgrind's callgrind with instrumentation switched off, warms up
on 20 records, switches instrumentation on with ``callgrind_control`` around the engine loop
only (validated records in, findings out), and prints the count divided by the number of
records. Needs valgrind (Debian package ``valgrind``); about 30 s for the default 256 records.

Run: python bench/instructions_per_record.py [N] [--only RULE,RULE,...]
"""

from __future__ import annotations

import argparse
import copy
import os
import re
import shutil
import subprocess
import sys
import tempfile

INNER = "--inner"


def outer(argv: list[str]) -> None:
    if shutil.which("valgrind") is None or shutil.which("callgrind_control") is None:
        sys.exit("instructions_per_record: valgrind (with callgrind_control) is not installed")
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("n", nargs="?", type=int, default=256, help="number of records")
    parser.add_argument("--only", help="comma-separated rules to check (default: all)")
    args = parser.parse_args(argv)
    with tempfile.TemporaryDirectory() as tmp:
        command = ["valgrind", "--tool=callgrind", "--instr-atstart=no",
                   f"--callgrind-out-file={tmp}/callgrind.out", sys.executable, __file__, INNER,
                   str(args.n), args.only or ""]
        run = subprocess.run(command, capture_output=True, text=True, check=False)
    found = re.search(r"Collected : (\d+)", run.stderr)
    if run.returncode != 0 or found is None:
        sys.exit(f"instructions_per_record: the callgrind run failed:\n{run.stderr[-2000:]}")
    print(f"records:                    {args.n}"
          + (f" (rules checked: {args.only})" if args.only else ""))
    print(f"instructions per record:    {int(found.group(1)) / args.n:,.0f} "
          "(engine after validation)")


def inner(n: int, only: str) -> None:
    sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
    from bench_engine import make_records

    from sheetlint.engine.core import Settings
    from sheetlint.engine.run import run_engine
    from sheetlint.model import MachineRecord

    settings = Settings(only=frozenset(only.split(","))) if only else Settings()
    records = [MachineRecord.model_validate(copy.deepcopy(r)) for r in make_records(n)]
    for record in records[:20]:  # imports, caches and the interpreter's specialisation
        run_engine(record, settings)
    switch = ["callgrind_control", "--instr=on", str(os.getpid())]
    subprocess.run(switch, capture_output=True, check=True)
    for record in records:
        run_engine(record, settings)
    switch[1] = "--instr=off"
    subprocess.run(switch, capture_output=True, check=True)


if __name__ == "__main__":
    if len(sys.argv) > 1 and sys.argv[1] == INNER:
        inner(int(sys.argv[2]), sys.argv[3])
    else:
        outer(sys.argv[1:])
