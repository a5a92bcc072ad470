"""Engine throughput: 10,000 generated records from raw input to findings, unit parsing included.

Prints records/s of the whole engine path (pydantic validation with unit parsing, sheet
building, derive, check, cause diagnosis) and, measured in the same run on the same records,
records/s of pydantic validation alone, and their ratio (a figure to watch: the former
engine-throughput budget is withdrawn; DESIGN.md's budgets are bench/bench_repository.py's).
Also splits the engine path into validation and what follows
it: validation costs more there than in a loop of its own, where its code stays in the CPU's
caches. The measurements take turns in blocks of 250 records, so that a shared machine's
drifting speed falls on all of them alike; the median ratio of the blocks is printed beside the
whole run's. Prints figures; asserts nothing.

Run: python bench/bench_engine.py [N] [--only RULE,RULE,...]

``--only`` times the engine with only those rules checked, as ``sheetlint check --only``
runs it (rules left out are not checked; monomial relations still are, for the cause
diagnosis); validation alone is the same either way.
"""

from __future__ import annotations

import argparse
import copy
import random
import statistics
import time

from sheetlint.engine.core import Settings
from sheetlint.engine.run import check_record, run_engine
from sheetlint.intake.records import RawRecord
from sheetlint.model import MachineRecord
from sheetlint.synth import MachineSpec, record

BLOCK = 250  # records per turn of the three measurements


def make_records(n: int, seed: int = 7) -> list[dict]:
    rnd = random.Random(seed)
    bases = []
    for i in range(64):
        spec = MachineSpec(
            power_kw=rnd.choice([1.5, 5.5, 15, 45, 90, 160, 315]),
            speed_rpm=rnd.choice([750, 1000, 1500, 3000]),
            poles=rnd.choice([4, 6, 8, 10]),
            topology=rnd.choice(["spm", "ipm"]),
            voltage_ratio=rnd.uniform(0.85, 0.93))
        bases.append(record(spec, f"BENCH-{i}"))
    out = []
    for i in range(n):
        data = copy.deepcopy(bases[i % len(bases)])
        data["id"] = f"BENCH-{i}"
        if i % 7 == 0:  # a share of sheets with a slip, as in real batches
            data["rated"]["torque"] = data["rated"]["torque"].replace(" ", "0 ", 1)
        out.append(data)
    return out


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("n", nargs="?", type=int, default=10_000, help="number of records")
    parser.add_argument("--only", help="comma-separated rules to check (default: all)")
    args = parser.parse_args()
    n = args.n
    settings = (Settings(only=frozenset(args.only.split(","))) if args.only
                else Settings())
    records = make_records(n)
    check_record(RawRecord(copy.deepcopy(records[0]), None, ""))  # warm caches and imports

    # The three measurements take turns block by block, so that each sees the machine in the
    # same state: on a shared machine the speed drifts by tens of percent within a minute.
    validate_s = engine_s = in_path_s = after_s = 0.0
    findings = 0
    block_ratios = []
    clock = time.perf_counter
    for first in range(0, n, BLOCK):
        block = records[first:first + BLOCK]

        raws = [RawRecord(copy.deepcopy(r), None, "") for r in block]
        start = clock()
        for raw in raws:
            MachineRecord.model_validate(raw.data)
        block_validate = clock() - start

        raws = [RawRecord(copy.deepcopy(r), None, "") for r in block]
        start = clock()
        for raw in raws:
            findings += len(check_record(raw, settings).findings)
        block_engine = clock() - start

        # the same path split in two: validation as it costs between the engine's phases,
        # and everything after it
        raws = [RawRecord(copy.deepcopy(r), None, "") for r in block]
        for raw in raws:
            start = clock()
            record = MachineRecord.model_validate(raw.data)
            middle = clock()
            run_engine(record, settings)
            in_path_s += middle - start
            after_s += clock() - middle

        validate_s += block_validate
        engine_s += block_engine
        block_ratios.append(block_validate / block_engine)

    print(f"records:                     {n}"
          + (f" (rules checked: {args.only})" if args.only else ""))
    print(f"pydantic validation alone:   {n / validate_s:10.0f} records/s ({validate_s:.2f} s)")
    print(f"engine, raw to findings:     {n / engine_s:10.0f} records/s ({engine_s:.2f} s)")
    print(f"engine / validation ratio:   {validate_s / engine_s:10.3f}  "
          f"(median of blocks of {BLOCK}: {statistics.median(block_ratios):.3f})")
    print(f"findings:                    {findings}")
    print(f"per record: validation alone {validate_s / n * 1e6:.0f} µs; inside the engine path "
          f"{in_path_s / n * 1e6:.0f} µs for validation + {after_s / n * 1e6:.0f} µs after it")


if __name__ == "__main__":
    main()
