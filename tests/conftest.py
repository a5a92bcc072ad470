"""Shared helpers: run the engine on an in-memory record."""

from __future__ import annotations

import copy
import os
from typing import Any

import pytest
from hypothesis import settings as hypothesis_settings

from sheetlint.engine.run import RecordResult, check_record
from sheetlint.intake.records import RawRecord
from sheetlint.synth import MachineSpec, record

# CI draws a fixed set of examples (a seed per test, SHEETLINT_CI set by .ci/run), so that
# whether a change lands never depends on the draw; other runs draw anew and keep exploring.
hypothesis_settings.register_profile("ci", derandomize=True)
if os.environ.get("SHEETLINT_CI"):
    hypothesis_settings.load_profile("ci")

#: an invented 15 kW, 1500 rpm, 8-pole surface-magnet record (YAML) shared by the output tests;
#: consistent in power, torque, speed and frequency
PMX15_YAML = """\
id: "Invented PMX-15"
machine: {topology: spm, poles: 8}
rated:
  power: "15 kW"
  torque: "95.5 N*m"
  speed: "1500 rpm"
  frequency: "100 Hz"
  voltage: "400 V"
  current: "26.5 A"
  power_factor: 0.9
  efficiency: "94 %"
emf: {constant: "240 V/krpm"}
"""


def pmx15(record_id: str = "Invented PMX-15", torque: str = "95.5 N*m",
          ke: str = "240 V/krpm") -> str:
    """The shared invented record with another id, torque or Ke."""
    return (PMX15_YAML.replace('"Invented PMX-15"', f'"{record_id}"')
            .replace('"95.5 N*m"', f'"{torque}"').replace('"240 V/krpm"', f'"{ke}"'))


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
