"""Time the machine model: the operating-point solver alone, and all machine-model relations
per record, on generated machines (invented parameters, a quarter of them in field weakening).

Run:  /work/venv/bin/python bench/bench_dq.py [--records 10000]
"""

from __future__ import annotations

import argparse
import math
import random
import time

from sheetlint.engine.core import Known, Sheet
from sheetlint.physics.dq import DqMachine, ke_from_flux_linkage, operating_point
from sheetlint.relations.machine import (
    DqOperatingPoint,
    FieldWeakeningSpeed,
    OverspeedEmf,
    PullOutMargin,
    VoltageLimitRelation,
)
from sheetlint.relations.servo import ShortCircuitCurrent

RELATIONS = (DqOperatingPoint(), VoltageLimitRelation(), FieldWeakeningSpeed(), OverspeedEmf(),
             PullOutMargin(), ShortCircuitCurrent())


def generated_machines(count: int, seed: int = 4) -> list[tuple[DqMachine, float, float, float]]:
    """(machine, torque N*m, speed rad/s, line voltage limit V rms) for ``count`` records."""
    rng = random.Random(seed)
    out = []
    for _ in range(count):
        pole_pairs = rng.randint(1, 8)
        psi = rng.uniform(0.03, 0.8)
        current = rng.uniform(5.0, 300.0)
        ld = rng.uniform(0.2, 0.9) * psi / current
        machine = DqMachine(psi, ld, ld * rng.uniform(1.0, 3.0),
                            rng.uniform(0.005, 0.05) * psi * pole_pairs * 300 / current,
                            pole_pairs)
        speed = rng.uniform(100.0, 600.0)
        torque = 1.5 * pole_pairs * psi * current * 0.7
        need = operating_point(machine, torque, speed).line_voltage_rms
        limit = need * (rng.uniform(0.8, 0.97) if rng.random() < 0.25 else 1.05)
        out.append((machine, torque, speed, limit))
    return out


def sheet_for(machine: DqMachine, torque: float, speed: float, limit: float) -> Sheet:
    point = operating_point(machine, torque, speed, limit)
    ke = ke_from_flux_linkage(machine.flux_linkage, machine.pole_pairs)
    values = {
        "machine.poles": Known(2.0 * machine.pole_pairs),
        "emf.constant_hot": Known(ke, 5e-4), "emf.constant_cold": Known(ke * 1.1, 5e-4),
        "circuit.ld": Known(machine.ld, 5e-4), "circuit.lq": Known(machine.lq, 5e-4),
        "circuit.resistance_hot": Known(machine.resistance, 5e-4),
        "rated.torque": Known(torque, 5e-4), "rated.speed": Known(speed, 5e-4),
        "rated.current": Known(point.current_rms, 5e-4),
        "rated.voltage": Known(limit, 5e-4),
        "rated.power_factor": Known(point.power_factor, 5e-3),
        "supply.dc_link_voltage": Known(limit * 1.5, 5e-4),
        "limits.max_speed": Known(speed * 2.0, 5e-4),
        "limits.peak_current": Known(point.current_rms * 2.5, 5e-4),
    }
    return Sheet("bench", values, {"machine.topology": "ipm"})


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--records", type=int, default=10_000)
    args = parser.parse_args()
    cases = generated_machines(args.records)

    start = time.perf_counter()
    regions: dict[str, int] = {}
    for machine, torque, speed, limit in cases:
        region = operating_point(machine, torque, speed, limit).region
        regions[region] = regions.get(region, 0) + 1
    solver = time.perf_counter() - start

    sheets = [sheet_for(*case) for case in cases]
    start = time.perf_counter()
    findings = 0
    for sheet in sheets:
        for relation in RELATIONS:
            findings += sum(1 for _ in relation.check(sheet))
    relations = time.perf_counter() - start

    per_relation = []
    for relation in RELATIONS:
        start = time.perf_counter()
        for sheet in sheets:
            for _ in relation.check(sheet):
                pass
        per_relation.append((relation.rule, (time.perf_counter() - start) / len(sheets)))

    # the same records without inductances (most catalogue sheets): the cheap paths
    bare = []
    for sheet in sheets:
        values = {k: v for k, v in sheet.values.items() if k not in ("circuit.ld", "circuit.lq")}
        bare.append(Sheet("bench", values, sheet.attributes))
    start = time.perf_counter()
    for sheet in bare:
        for relation in RELATIONS:
            for _ in relation.check(sheet):
                pass
    without_inductances = time.perf_counter() - start

    n = len(cases)
    print(f"records: {n}; solver regions: {regions}")
    print(f"operating-point solver: {solver / n * 1e6:.1f} us per record")
    print(f"all machine-model relations: {relations / n * 1e6:.1f} us per record "
          f"({findings} findings, {relations:.3f} s total)")
    print(f"same records without L_d/L_q: {without_inductances / n * 1e6:.1f} us per record")
    print("per relation (each over all records, so the shared input cache misses):")
    for rule, seconds in per_relation:
        print(f"  {rule:24s} {seconds * 1e6:7.1f} us per record")
    if not math.isfinite(relations):
        raise SystemExit(1)


if __name__ == "__main__":
    main()

