"""What the engine builds for one record is freed by reference counting, not left to the
cyclic garbage collector.

A reference cycle in the per-record data (a memo pointing back at its sheet, say) keeps every
sheet alive until a collection finds it: in a batch of thousands of records the collector
then runs about once a record and walks every object the process holds, which cost about a
tenth of the engine's time when it happened. The property is checked on generated machines
of both topologies (sheetlint.synth), on a slipped sheet whose cause diagnosis runs, and on
the demo files.
"""

from __future__ import annotations

import gc
from collections.abc import Iterator
from pathlib import Path

import pytest

from sheetlint.engine.run import check_record
from sheetlint.intake.records import RawRecord, load_records
from sheetlint.synth import MachineSpec, record

FIXTURES = Path(__file__).resolve().parents[1] / "fixtures"


def _raw_records() -> Iterator[RawRecord]:
    for i, topology in enumerate(("spm", "ipm")):
        data = record(MachineSpec(power_kw=45, speed_rpm=1500, poles=8, topology=topology,
                                  voltage_ratio=0.9), f"GC-{i}")
        yield RawRecord(data, None, "")
        slipped = record(MachineSpec(power_kw=15, speed_rpm=3000, poles=4, topology=topology,
                                     voltage_ratio=0.9), f"GC-slip-{i}")
        slipped["rated"]["torque"] = slipped["rated"]["torque"].replace(" ", "0 ", 1)
        yield RawRecord(slipped, None, "")
    for path in sorted(FIXTURES.glob("*.yaml")):
        yield from load_records(path).records


@pytest.fixture
def collector_off() -> Iterator[None]:
    was_enabled = gc.isenabled()
    gc.disable()
    gc.collect()
    try:
        yield
    finally:
        if was_enabled:
            gc.enable()


def test_checking_records_leaves_no_cyclic_garbage(collector_off: None) -> None:
    raws = list(_raw_records())
    assert len(raws) >= 10
    gc.collect()
    findings = 0
    for raw in raws:
        findings += len(check_record(raw).findings)
    assert findings > 0  # the engine did run
    assert gc.collect() == 0
