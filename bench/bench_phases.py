"""Where the engine's time goes: microseconds per record in each phase and each relation.

Runs the engine's phases one by one on the benchmark records of ``bench_engine.py`` (validate,
build the sheet, screen, derive, each relation's check, cause diagnosis, estimates) and prints
the mean time per record of each, largest first. The phases are timed separately, so the sum
is a little above what ``bench_engine.py`` measures for the whole path. Then the same phases on
one record, each repeated, where code and data stay in the CPU's caches: about the least the
present code can cost per record. Prints figures; asserts nothing.

Run: python bench/bench_phases.py [N]
"""

from __future__ import annotations

import copy
import sys
import time
import timeit
from collections import Counter
from collections.abc import Callable

from bench_engine import make_records  # the same records (this script's folder is on the path)

from sheetlint.engine import run as engine
from sheetlint.engine.build import build_sheet
from sheetlint.engine.core import SEVERITY_RANK, Settings, Sheet
from sheetlint.intake.records import RawRecord
from sheetlint.model import MachineRecord
from sheetlint.relations.registry import all_relations


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 3000
    records = make_records(n)
    engine.check_record(RawRecord(copy.deepcopy(records[0]), None, ""))  # warm imports
    relations = all_relations()
    clock = time.perf_counter
    spent: Counter[str] = Counter()
    for data in records:
        data = copy.deepcopy(data)
        t0 = clock()
        record = MachineRecord.model_validate(data)
        t1 = clock()
        sheet, notes = build_sheet(record, Settings())
        given, attributes = dict(sheet.values), dict(sheet.attributes)
        t2 = clock()
        findings = list(notes)
        for relation in relations:
            screen = getattr(relation, "screen", None)
            if screen is not None:
                findings.extend(screen(sheet))
        t3 = clock()
        engine.derive(sheet, relations)
        t4 = clock()
        spent["validate (pydantic, units)"] += t1 - t0
        spent["build sheet"] += t2 - t1
        spent["screen"] += t3 - t2
        spent["derive"] += t4 - t3
        evaluations: list = []
        for relation in relations:
            start = clock()
            engine.check_relation(relation, sheet, findings, evaluations)
            spent[f"check {relation.rule}"] += clock() - start
        t5 = clock()
        findings.extend(e.finding for e in evaluations if e.finding is not None)

        def recheck(values: dict, record_id: str = record.id, attributes: dict = attributes
                    ) -> list:
            settings = Settings()
            return engine.check_sheet(Sheet(record_id, values, dict(attributes), settings),
                                      settings)

        findings = engine.explain(sheet, given, findings, recheck)
        t6 = clock()
        engine._estimate(sheet, relations)
        findings.sort(key=lambda f: (-SEVERITY_RANK[f.severity], f.rule, f.fields))
        t7 = clock()
        spent["diagnose causes"] += t6 - t5
        spent["estimate, sort"] += t7 - t6
    total = sum(spent.values())
    print(f"records: {n}; µs per record (phases timed one by one)")
    for name, seconds in spent.most_common():
        print(f"  {name:34s} {seconds / n * 1e6:8.1f}")
    print(f"  {'total':34s} {total / n * 1e6:8.1f}")
    validation = spent["validate (pydantic, units)"]
    print(f"  {'total after validation':34s} {(total - validation) / n * 1e6:8.1f}")
    warm_floor(records[1], relations)


def warm_floor(data: dict, relations: list) -> None:
    """The same phases on one record, each repeated: code and data stay in the CPU's caches,
    so this is about the least the present code can cost per record."""
    repeat = 3000

    def per_call(action: Callable[[], object]) -> float:
        return timeit.timeit(action, number=repeat) / repeat * 1e6

    record = MachineRecord.model_validate(copy.deepcopy(data))
    validate = per_call(lambda: MachineRecord.model_validate(data))
    build = per_call(lambda: build_sheet(record, Settings()))

    def build_and_derive() -> None:
        engine.derive(build_sheet(record, Settings())[0], relations)

    derive = per_call(build_and_derive) - build
    sheet = build_sheet(record, Settings())[0]
    engine.derive(sheet, relations)
    checks = 0.0
    for relation in relations:
        def check(relation: object = relation) -> None:
            sheet.memo.clear()  # no shared work carried over from the last repetition
            engine.check_relation(relation, sheet, [], [])
        checks += per_call(check)
    print(f"one record, each phase repeated (warm caches), µs: validate {validate:.1f}; "
          f"build {build:.1f}, derive {derive:.1f}, every relation's check {checks:.1f}: "
          f"{build + derive + checks:.1f} after validation")


if __name__ == "__main__":
    main()
