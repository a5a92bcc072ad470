"""Write every finding and derived value of a fixed set of records, to compare two versions.

For speed work that must change no result: write a snapshot before the change and one after,
then compare the two files (``cmp`` or ``diff``). The records are the benchmark's generated
machines, the same machines with one usual slip each (√2, √3, 2, ½, 1000, 60, hp/kW, 1.2), and
the demo files in ``fixtures/``; 2,010 records in all.

Run: python tools/result_snapshot.py OUT.jsonl
"""

from __future__ import annotations

import copy
import json
import random
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "bench"))

from bench_engine import make_records  # noqa: E402

from sheetlint.engine.run import check_record, derived_payload  # noqa: E402
from sheetlint.intake.records import InputProblem, RawRecord, load_records  # noqa: E402

SLIPS = (1.4142, 1.732, 2.0, 0.5, 1000.0, 60.0, 0.7457, 1.2)


def with_slips(records: list[dict], seed: int = 11) -> list[dict]:
    """Each record with one number of one section multiplied by a usual slip factor."""
    rnd = random.Random(seed)
    out = []
    for record in records:
        data = copy.deepcopy(record)
        section = rnd.choice([k for k, v in data.items() if isinstance(v, dict)])
        names = [k for k, v in data[section].items() if isinstance(v, str) and v[:1].isdigit()]
        if names:
            name = rnd.choice(names)
            number, _, unit = data[section][name].partition(" ")
            try:
                data[section][name] = f"{float(number) * rnd.choice(SLIPS):.4g} {unit}"
            except ValueError:
                pass
        out.append(data)
    return out


def main() -> None:
    if len(sys.argv) != 2:
        sys.exit("usage: python tools/result_snapshot.py OUT.jsonl")
    raws = [RawRecord(copy.deepcopy(r), None, "") for r in make_records(1200)]
    raws += [RawRecord(d, None, "") for d in with_slips(make_records(800, seed=3))]
    for path in sorted((ROOT / "fixtures").glob("*.yaml")):
        try:
            raws += load_records(path).records
        except InputProblem:
            pass
    with open(sys.argv[1], "w", encoding="utf-8") as out:
        for raw in raws:
            result = check_record(raw)
            out.write(json.dumps({"id": result.id, "error": result.error,
                                  "findings": [f.to_dict() for f in result.findings],
                                  "derived": derived_payload(result.derived)},
                                 sort_keys=True) + "\n")
    print(f"{len(raws)} records written to {sys.argv[1]}")


if __name__ == "__main__":
    main()
