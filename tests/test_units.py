"""Unit reading at the boundary, checked against published conversion factors."""

from __future__ import annotations

import math

import pytest

from sheetlint.units import UnitProblem, read_value, unit_factor, written_uncertainty


def test_hp_is_745_6999_watt_per_nist_sp811_appendix_b():
    # NIST SP 811 (2008), App. B: horsepower (550 ft·lbf/s) = 7.456 999 E+02 W
    assert read_value("1 hp", None, "power", True).value == pytest.approx(745.6999, rel=1e-7)


def test_lbf_ft_is_1_355818_newton_metre_per_nist_sp811_appendix_b():
    # NIST SP 811 (2008), App. B: pound-force foot = 1.355 818 N·m
    assert read_value("1 lbf·ft", None, "torque", False).value == pytest.approx(1.355818,
                                                                                 rel=1e-6)


def test_metric_horsepower_is_735_49875_watt_per_nist_sp811():
    assert read_value("1 PS", None, "power", True).value == pytest.approx(735.49875, rel=1e-9)


@pytest.mark.parametrize("spelling", ["rpm", "r/min", "min-1", "1/min", "U/min", "rev/min"])
def test_every_trade_spelling_of_a_speed_is_revolutions_per_minute(spelling):
    # SI Brochure, 9th ed.: 1 r/min = 2π/60 rad/s (the radian is the coherent unit of angle)
    assert read_value(f"1500 {spelling}", None, "speed", True).value == pytest.approx(
        1500 * 2 * math.pi / 60)


def test_krpm_per_volt_constant_converts_with_two_pi_not_one():
    # 1 V/krpm = 1 V per (1000·2π/60 rad/s) = 0.0095493 V·s/rad (SI: rad = 1 but kept explicit)
    factor, _ = unit_factor("V/krpm", "emf_constant")
    assert factor == pytest.approx(60 / (2 * math.pi * 1000))
    assert unit_factor("V / 1000 rpm", "emf_constant")[0] == pytest.approx(factor)


@pytest.mark.parametrize("text,kind", [("1500 Hz", "speed"), ("0.25 V/Hz", "emf_constant"),
                                       ("1.2 V*s/rad", "flux_linkage"), ("15 kg", "power"),
                                       ("3 blorbs", "length"), ("12 Wb", "torque_constant")])
def test_ambiguous_or_wrong_units_are_refused_with_the_accepted_list(text, kind):
    with pytest.raises(UnitProblem) as info:
        read_value(text, None, kind, True)
    assert "'" in str(info.value)


def test_trade_spellings_of_small_units():
    assert read_value("52 mΩ", None, "resistance", False).value == pytest.approx(0.052)
    assert read_value("850 µH", None, "inductance", False).value == pytest.approx(850e-6)
    assert read_value("850 uH", None, "inductance", False).value == pytest.approx(850e-6)
    assert read_value("12.5 kg·cm²", None, "inertia", False).value == pytest.approx(12.5e-4)
    assert read_value("400 Vrms", None, "voltage", True).value == 400.0
    assert read_value("95.2 %", None, "ratio", False).value == pytest.approx(0.952)


def test_megawatt_and_milliwatt_are_not_confused():
    assert read_value("1 MW", None, "power", True).value == 1e6
    assert read_value("1 mW", None, "power", True).value == 1e-3


@pytest.mark.parametrize("text,half", [
    # DESIGN.md "Judgement" 1, its own examples: an integer keeps at least three significant
    # digits (100 N·m ± 0.5, 1420 N·m ± 5, 20 A ± 0.05); a decimal point counts every digit
    # (1.5 kW ± 0.05)
    ("100", 0.5), ("1420", 5.0), ("20", 0.05), ("1.5", 0.05), ("1420.0", 0.05),
    # the same rule for a rating: 1500 rpm ± 5, 4 kW ± 0.005 (never ±12.5 %)
    ("1500", 5.0), ("4", 0.005), ("15000", 50.0), ("12345", 0.5),
])
def test_written_precision_follows_the_design_rule(text, half):
    value = float(text)
    assert written_uncertainty(text, value) * value == pytest.approx(half)


def test_a_round_number_never_buys_tens_of_percent():
    # issue 15: 100 N·m was read as ±50 %, 20 A as ±25 %, 4 kW as ±12.5 %
    for text in ("100", "20", "4", "1000", "50000"):
        assert written_uncertainty(text, float(text)) <= 0.005


@pytest.mark.parametrize("text", ["nan kW", "inf kW", "1e999 kW", "fifteen kW", ""])
def test_non_finite_or_non_numeric_values_are_unreadable(text):
    with pytest.raises(UnitProblem):
        read_value(text, None, "power", True)


@pytest.mark.parametrize("text,kind,si", [
    # NIST SP 811 (2008), App. B: ounce-force inch = 7.061 552 E-03 N·m
    ("1 oz·in", "torque", 7.061552e-3),
    # NIST SP 811 (2008), App. B: pound-force inch = 1.129 848 E-01 N·m
    ("1 lbf·in", "torque", 0.1129848),
    # NIST SP 811 (2008), App. B: kilogram-force meter = 9.806 65 N·m
    ("1 kgf·m", "torque", 9.80665),
    # NIST SP 811 (2008), App. B: pound foot squared = 4.214 011 E-02 kg·m²
    ("1 lb·ft²", "inertia", 0.04214011),
    ("1 g·cm²", "inertia", 1e-7),
])
def test_small_motor_units_convert_per_nist_sp811_appendix_b(text, kind, si):
    assert read_value(text, None, kind, False).value == pytest.approx(si, rel=1e-6)
