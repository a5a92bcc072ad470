"""Shared helpers: run the engine on an in-memory record."""

from __future__ import annotations

import copy
from typing import Any

import pytest

from sheetlint.engine.run import RecordResult, check_record
from sheetlint.intake.records import RawRecord
from sheetlint.synth import MachineSpec, record


def run(data: dict[str, Any]) -> RecordResult:
    return check_record(RawRecord(copy.deepcopy(data), None, ""))


def serious(result: RecordResult) -> list:
    return [f for f in result.findings if f.severity in ("error", "warning")]


@pytest.fixture
def spm_15kw() -> dict[str, Any]:
    """A consistent 15 kW, 1500 rpm, 8-pole surface-magnet machine (synthetic, invented)."""
    return record(MachineSpec(15, 1500, 8), "SYN-SPM-15")


@pytest.fixture
def ipm_90kw() -> dict[str, Any]:
    """A consistent 90 kW, 1500 rpm, 8-pole interior-magnet machine (synthetic, invented)."""
    return record(MachineSpec(90, 1500, 8, topology="ipm"), "SYN-IPM-90")
