"""Servo catalogue units and fields at the boundary.

Conversion factors derived from NIST SP 811 (2008), Appendix B, as quoted in REFERENCES.md §3:
1 lbf·ft = 1.355818 N·m, so 1 lbf·in = 1.355818/12 = 0.1129848 N·m and
1 ozf·in = 0.1129848/16 = 7.061552e-3 N·m (derived); 1 kg·cm² = 1e-4 kg·m² and
1 ms = 1e-3 s (SI prefixes); V/krpm → V·s/rad by 1 r/min = 2π/60 rad/s.
"""

from __future__ import annotations

import math

import pytest

from sheetlint.units import UnitProblem, read_value
from tests.conftest import run

LBF_IN = 1.355818 / 12
OZF_IN = LBF_IN / 16


@pytest.mark.parametrize("text,kind,si", [
    ("12 lb*in", "torque", 12 * LBF_IN),
    ("12 lb-in", "torque", 12 * LBF_IN),
    ("100 oz*in", "torque", 100 * OZF_IN),
    ("1.2 kg·cm²", "inertia", 1.2e-4),
    ("4.0 ms", "time", 4.0e-3),
    ("58 V/krpm", "emf_constant", 58 / (1000 * 2 * math.pi / 60)),
    ("0.51 N·m/√W", "motor_constant", 0.51),
    ("0.51 Nm/sqrt(W)", "motor_constant", 0.51),
    ("72 oz*in/√W", "motor_constant", 72 * OZF_IN),
    ("8.5 lb*in/A", "torque_constant", 8.5 * LBF_IN),
    ("560 V DC", "voltage", 560.0),
    ("400 V rms", "voltage", 400.0),
])
def test_servo_units_convert_by_nist_sp_811_factors(text, kind, si):
    assert read_value(text, None, kind, False).value == pytest.approx(si, rel=2e-6)


def test_a_motor_constant_in_another_unit_is_refused_naming_the_accepted_ones():
    with pytest.raises(UnitProblem, match="N·m/√W"):
        read_value("0.5 N*m/A", None, "motor_constant", False)


def test_servo_fields_are_known_and_bad_values_are_messages_not_tracebacks():
    data = {"id": "S (invented)",
            "dynamics": {"motor_constant": "0.51 N*m/√W", "thermal_time_constant": "25 min"},
            "limits": {"no_load_speed": {"value": 6500, "unit": "rpm", "supply": "560 V DC"},
                       "demagnetisation_current": {"value": 25, "unit": "A",
                                                   "magnet_temperature": "120 °C"}}}
    result = run(data)
    assert result.error is None
    assert not [f for f in result.findings if f.rule == "unknown-field"]
    bad = dict(data, limits={"no_load_speed": {"value": 6500, "unit": "rpm",
                                               "supply": "lots"}})
    result = run(bad)
    assert result.error and "no_load_speed" in result.error
    bad = dict(data, dynamics={"motor_constant": "0.5 N*m/A"})
    result = run(bad)
    assert result.error and "dynamics.motor_constant" in result.error


def test_the_supply_mark_decides_the_no_load_reading():
    from sheetlint.engine.build import supply_kind
    from sheetlint.model import Measured

    def kind(text: str) -> str | None:
        return supply_kind(Measured(read_value(text, None, "voltage", True)))

    assert [kind(t) for t in ("560 V DC", "560 VDC", "560 Vdc", "400 V AC", "400 Vac",
                              "400 V rms", "400 V")] == ["dc", "dc", "dc", "ac", "ac", "ac",
                                                           None]
