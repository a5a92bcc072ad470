"""Standards relations: efficiency class, temperature rise, and the plausibility bands on trial.

Expected limits come from the published tables named beside each test (SI 2021/745 Schedule 16
Tables 21-23, the same limits as Regulation (EU) 2019/1781 Annex I) or from IEC 60034-1 as quoted;
values from memory are marked [M], derived arithmetic [D].
"""

from __future__ import annotations

import math
from typing import Any

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sheetlint.engine.core import Known, Sheet
from sheetlint.relations.registry import relation_for
from sheetlint.relations.standards import (
    EfficiencyClass,
    OverloadRatio,
    RotorTorqueDensity,
    ShortTimeRating,
    SpecificLosses,
    TemperatureRise,
)
from sheetlint.standards.efficiency import line_operated_minimum

RPM = 2 * math.pi / 60
ZERO_C = 273.15


def written(value: float, digits_after_point: int, scale: float = 1.0) -> Known:
    """A value as a sheet prints it: uncertainty is half a unit of the last written digit."""
    return Known(value * scale, 0.5 * 10.0 ** -digits_after_point / abs(value))


def sheet(values: dict[str, Known], **attributes: Any) -> Sheet:
    return Sheet("demo", values, {k.replace("__", "."): v for k, v in attributes.items()})


def efficiency_sheet(percent: float, digits: int, kw: float, claim: str, poles: float = 4.0,
                     standard: str | None = "IEC 60034-30-1", frequency: float | None = 50.0,
                     **extra: Known) -> Sheet:
    values = {"rated.power": Known(kw * 1e3, 0.0005), "rated.efficiency":
              written(percent, digits, 0.01), "machine.poles": Known(poles)}
    if frequency is not None:
        values["rated.frequency"] = Known(frequency, 0.005)
    values.update({k.replace("__", "."): v for k, v in extra.items()})
    attributes: dict[str, Any] = {"efficiency_class": claim}
    if standard is not None:
        attributes["efficiency_class.standard"] = standard
    return Sheet("demo", values, attributes)


def severities(findings: list) -> list[str]:
    return [f.severity for f in findings]


# --- efficiency-class: line-operated (IEC 60034-30-1) -------------------------------------------
def test_ie4_claim_one_class_too_high_is_an_error_si_2021_745_table_23() -> None:
    # 11 kW 4 poles 50 Hz: IE3 91.4 %, IE4 93.3 % (SI 2021/745 Schedule 16 Tables 22-23 [R])
    findings = list(EfficiencyClass().check(efficiency_sheet(91.5, 1, 11.0, "IE4")))
    assert severities(findings) == ["error"]
    assert "IE3" in findings[0].message and "93.3" in findings[0].message
    # the claim is what to correct: the finding names efficiency_class first
    assert findings[0].fields[0] == "efficiency_class"
    assert findings[0].cause is not None and "reaches IE3" in findings[0].cause


@pytest.mark.parametrize(("kw", "poles", "claim", "declared", "lower_class_minimum"), [
    (0.75, 2, "IE3", 79.0, 77.4),   # Table 28 lower end; IE2 77.4, IE3 80.7 [R]
    (4.0, 6, "IE4", 88.0, 86.8),    # IE3 86.8, IE4 89.5 [R]
    (55.0, 4, "IE3", 94.0, 93.5),   # IE2 93.5, IE3 94.6 [R, 4-pole column]
    (200.0, 4, "IE4", 96.2, 96.0),  # Table 28 upper end: IE3 96.0, IE4 96.7 [R]
])
def test_claims_one_class_too_high_are_errors_at_published_ratings(
    kw: float, poles: int, claim: str, declared: float, lower_class_minimum: float
) -> None:
    # SI 2021/745 Schedule 16 Tables 21-23: the declared value reaches the class below only
    assert declared >= lower_class_minimum
    findings = list(EfficiencyClass().check(efficiency_sheet(declared, 1, kw, claim, poles)))
    assert severities(findings) == ["error"]
    assert findings[0].cause is not None


def test_claim_met_as_declared_is_not_flagged_although_tolerance_would_allow_less() -> None:
    # IE3 11 kW 4p minimum 91.4 % (SI 2021/745 Table 22 [R]). IEC 60034-1:2010 (as quoted)
    # lets a test result fall to 91.4 - 0.15*8.6 = 90.11 %: the claim rests on the declared
    # value, which reaches the minimum [M: class rule from memory] -> an info, never an error.
    findings = list(EfficiencyClass().check(efficiency_sheet(91.4, 1, 11.0, "IE3")))
    assert severities(findings) == ["info"]
    assert "90.11" in findings[0].message


def test_claim_met_only_within_the_rounding_of_a_coarse_value_is_an_info() -> None:
    # "91 %" may be anything from 90.5 to 91.5 %: it may reach 91.4 % (Table 22 [R])
    findings = list(EfficiencyClass().check(efficiency_sheet(91.0, 0, 11.0, "IE3")))
    assert severities(findings) == ["info"] and "rounding" in findings[0].message


def test_declared_below_minimum_beyond_rounding_is_an_error_even_within_tolerance() -> None:
    # 91.0 % is within the IEC 60034-1 tolerance of 91.4 % but the declared value itself must
    # reach the class minimum (REFERENCES.md section 2 [M]); 91.4 % from SI 2021/745 Table 22.
    findings = list(EfficiencyClass().check(efficiency_sheet(91.0, 1, 11.0, "IE3")))
    assert severities(findings) == ["error"]


def test_interpolated_rating_is_compared_with_the_rounded_formula_value() -> None:
    # 7.5 kW IE3 4p: 4 and 11 kW published neighbours 88.6 / 91.4 % (Table 22 [R]); the formula
    # gives 90.4 % after rounding to 0.1 %.
    assert "error" not in severities(list(EfficiencyClass().check(
        efficiency_sheet(90.4, 1, 7.5, "IE3"))))
    assert severities(list(EfficiencyClass().check(
        efficiency_sheet(90.3, 1, 7.5, "IE3")))) == ["error"]


def test_plateau_above_200_kw_uses_the_200_kw_row_eu_2019_1781_annex_i() -> None:
    # IE3 8 poles 200-1000 kW: 94.6 % ([D] row of REFERENCES.md); 4 poles 96.0 % [R]
    assert severities(list(EfficiencyClass().check(
        efficiency_sheet(94.5, 1, 500.0, "IE3", poles=8)))) == ["error"]
    assert "error" not in severities(list(EfficiencyClass().check(
        efficiency_sheet(96.0, 1, 800.0, "IE3"))))


def test_unstated_frequency_assumes_50hz_and_raises_at_most_a_warning() -> None:
    findings = list(EfficiencyClass().check(efficiency_sheet(91.5, 1, 11.0, "IE4",
                                                             frequency=None)))
    assert severities(findings) == ["warning"] and "50 Hz assumed" in findings[0].message


def test_60hz_is_reported_as_not_checked_rather_than_guessed() -> None:
    findings = list(EfficiencyClass().check(efficiency_sheet(80.0, 1, 11.0, "IE4",
                                                             frequency=60.0)))
    assert severities(findings) == ["info"] and "60 Hz" in findings[0].message


@pytest.mark.parametrize(("kw", "poles", "word"), [(0.09, 4, "scope"), (2000.0, 4, "scope"),
                                                   (11.0, 10, "poles"), (11.0, 4.5, "integer")])
def test_out_of_scope_line_operated_is_an_info(kw: float, poles: float, word: str) -> None:
    findings = list(EfficiencyClass().check(efficiency_sheet(50.0, 1, kw, "IE3", poles)))
    assert severities(findings) == ["info"] and word in findings[0].message


def test_gap_between_0_55_and_0_75_kw_uses_only_the_tabulated_neighbours() -> None:
    # neighbours: 0.75 kW IE3 4p 82.5 % (SI 2021/745 Table 22 [R]); 0.55 kW 80.8 % [M]
    assert severities(list(EfficiencyClass().check(
        efficiency_sheet(70.0, 1, 0.65, "IE3")))) == ["warning"]
    assert severities(list(EfficiencyClass().check(
        efficiency_sheet(81.5, 1, 0.65, "IE3")))) == ["info"]


def test_ie1_claim_is_not_checked() -> None:
    findings = list(EfficiencyClass().check(efficiency_sheet(50.0, 1, 11.0, "IE1")))
    assert severities(findings) == ["info"] and "IE1" in findings[0].message


# --- efficiency-class: converter-fed (default) --------------------------------------------------
def test_converter_fed_claim_too_high_is_a_warning_that_says_approximation() -> None:
    # approximated by the 4-pole IEC 60034-30-1 limit: 11 kW IE4 93.3 % (SI 2021/745 Table 23)
    findings = list(EfficiencyClass().check(efficiency_sheet(
        91.5, 1, 11.0, "IE4", poles=8.0, standard=None, frequency=100.0,
        rated__speed=Known(1500 * RPM, 0.0003))))
    assert severities(findings) == ["warning"]
    assert "approximation" in findings[0].message and "IEC TS 60034-30-2" in findings[0].source


def test_converter_fed_ie5_uses_the_approximate_rule_and_says_so() -> None:
    # IE4 11 kW 93.3 % [R] -> IE5 about 94.6 % ((1 - eta) x 0.8, [M] approximate)
    findings = list(EfficiencyClass().check(efficiency_sheet(
        94.0, 1, 11.0, "IE5", standard="IEC TS 60034-30-2", frequency=None)))
    assert severities(findings) == ["warning"] and "approximate" in findings[0].message
    assert severities(list(EfficiencyClass().check(efficiency_sheet(
        94.7, 1, 11.0, "IE5", standard=None, frequency=None)))) == ["info"]  # borderline note


def test_converter_fed_outside_speed_scope_is_an_info() -> None:
    findings = list(EfficiencyClass().check(efficiency_sheet(
        80.0, 1, 11.0, "IE4", standard=None, rated__speed=Known(12000 * RPM))))
    assert severities(findings) == ["info"] and "speed scope" in findings[0].message


def test_efficiency_class_needs_efficiency_and_skips_estimates() -> None:
    no_eta = Sheet("demo", {"rated.power": Known(11e3)}, {"efficiency_class": "IE3"})
    assert severities(list(EfficiencyClass().check(no_eta))) == ["info"]
    estimate = efficiency_sheet(80.0, 1, 11.0, "IE4")
    estimate.values["rated.efficiency"].origin = "estimate"
    assert list(EfficiencyClass().check(estimate)) == []
    odd = efficiency_sheet(91.5, 1, 11.0, "premium")
    assert severities(list(EfficiencyClass().check(odd))) == ["info"]


# --- temperature-rise: check --------------------------------------------------------------------
def rise_sheet(rise: float, thermal: Any = 155, rise_class: Any = None, ambient_c: float | None
               = None, altitude: float | None = None, cooling: str | None = "IC411") -> Sheet:
    """A sheet with a stated rise; fan-cooled (IC411) by default, where IEC 60034-1's main row
    of limits applies."""
    values = {"rated.temperature_rise": written(rise, 0)}
    if ambient_c is not None:
        values["machine.ambient"] = Known(ambient_c + ZERO_C, 0.5 / (ambient_c + ZERO_C))
    if altitude is not None:
        values["machine.altitude"] = Known(altitude, 0.0005)
    attributes = {"machine.thermal_class": thermal, "machine.temperature_rise_class": rise_class,
                  "machine.cooling": cooling}
    return Sheet("demo", values, attributes)


def check_rise(s: Sheet) -> list[str]:
    return severities(list(TemperatureRise().check(s)))


@pytest.mark.parametrize(("thermal", "limit"), [(130, 80), (155, 105), (180, 125)])
def test_rise_above_class_limit_is_an_error_iec_60034_1_as_quoted(thermal: int,
                                                                  limit: int) -> None:
    assert check_rise(rise_sheet(limit, thermal)) == []
    assert check_rise(rise_sheet(limit + 1, thermal)) == ["error"]


@pytest.mark.parametrize(("thermal", "limit"), [(130, 85), (155, 110), (180, 130)])
def test_small_or_fanless_machines_have_the_higher_limits_iec_60034_1_from_memory(
        thermal: int, limit: int) -> None:
    # IEC 60034-1's row for machines under 600 W and self-cooled machines without a fan (IC410)
    # or with encapsulated windings: 85/110/130 K (from memory; REFERENCES.md §1 tags it [M])
    fanless = rise_sheet(limit, thermal, cooling="IC410")
    assert check_rise(fanless) == []
    assert check_rise(rise_sheet(limit + 1, thermal, cooling="IC410")) == ["error"]
    small = rise_sheet(limit, thermal, cooling="IC411")
    small.values["rated.power"] = Known(400.0, 0.00125)
    assert check_rise(small) == []
    # cooling unstated: the higher row may apply, so only an info that asks for the cooling
    assert check_rise(rise_sheet(limit, thermal, cooling=None)) == ["info"]


def test_rise_class_governs_when_given() -> None:
    # class F insulation used at class B rise: limit 80 K (IEC 60034-1 as quoted)
    assert check_rise(rise_sheet(90, thermal=155, rise_class=130)) == ["error"]
    assert check_rise(rise_sheet(80, thermal=155, rise_class=130)) == []


def test_rise_class_above_thermal_class_is_an_error() -> None:
    findings = list(TemperatureRise().check(rise_sheet(80, thermal=130, rise_class=155)))
    assert severities(findings) == ["error"]
    assert "thermal class" in findings[0].message


def test_hot_coolant_lowers_the_limit_from_memory() -> None:
    # [M] coolant 50 degC: 105 - 10 = 95 K for class F
    assert check_rise(rise_sheet(100, ambient_c=50)) == ["error"]
    assert check_rise(rise_sheet(95, ambient_c=50)) == []
    assert check_rise(rise_sheet(80, thermal=130, ambient_c=70)) == ["warning"]  # beyond rule


def test_altitude_lowers_the_limit_when_the_coolant_is_stated_from_memory() -> None:
    # [M] 2000 m at 40 degC: 105 K x (1 - 0.10) = 94.5 K; [Q] unstated ambient up to 4000 m: none
    assert check_rise(rise_sheet(100, ambient_c=40, altitude=2000)) == ["error"]
    assert check_rise(rise_sheet(105, altitude=3000)) == []


def test_cool_coolant_downgrades_a_small_excess_to_a_warning() -> None:
    # [M] below 40 degC a higher rise needs agreement: 110 K at 25 degC is possible, not certain
    assert check_rise(rise_sheet(110, ambient_c=25)) == ["warning"]
    assert check_rise(rise_sheet(125, ambient_c=25)) == ["error"]


def test_class_120_limit_is_from_memory_so_at_most_a_warning() -> None:
    findings = list(TemperatureRise().check(rise_sheet(78, thermal=120)))
    assert severities(findings) == ["warning"] and "approximate" in findings[0].message


def test_unknown_class_is_noted_not_judged() -> None:
    assert check_rise(rise_sheet(150, thermal=200)) == ["info"]
    assert check_rise(rise_sheet(150, thermal="X")) == []


# --- temperature-rise: derivations --------------------------------------------------------------
def hot_resistance(values: dict[str, Known], **attributes: Any) -> Any:
    s = sheet(values, **attributes)
    out = {d.field: d for d in TemperatureRise().derive(s)}
    return out.get("circuit.resistance_hot"), out.get("rated.magnet_temperature")


def test_hot_resistance_from_stated_rise_matches_copper_vector() -> None:
    # [D] REFERENCES.md section 5: 1.000 ohm at 20 degC -> 1.37255 ohm at 115 degC (40 + 75 K)
    hot, _ = hot_resistance({"circuit.resistance": Known(1.0, 0.0005),
                             "rated.temperature_rise": Known(75.0, 0.5 / 75)})
    assert hot.value == pytest.approx(1.37255, abs=5e-6)
    assert hot.inputs == ("circuit.resistance", "rated.temperature_rise") and not hot.estimate
    assert hot.uncertainty > 0.0005


def test_hot_resistance_uses_the_stated_ambient() -> None:
    # [D] 30 degC + 45 K = 75 degC -> 1.21569 ohm (REFERENCES.md section 5)
    hot, _ = hot_resistance({"circuit.resistance": Known(1.0),
                             "rated.temperature_rise": Known(45.0),
                             "machine.ambient": Known(30.0 + ZERO_C)})
    assert hot.value == pytest.approx(1.21569, abs=5e-6)


@pytest.mark.parametrize(("cls", "celsius"), [(130, 95.0), (155, 115.0), (180, 135.0)])
def test_hot_resistance_at_iec_60034_2_1_reference_temperature_from_memory(cls: int,
                                                                           celsius: float) -> None:
    # [M] reference temperatures 95/115/135 degC; [D] copper ratio (235 + t)/(235 + 20)
    hot, magnet = hot_resistance({"circuit.resistance": Known(2.0, 0.005)},
                                 machine__thermal_class=cls)
    assert hot.value == pytest.approx(2.0 * (235 + celsius) / 255)
    assert "reference temperature" in hot.note
    assert magnet.estimate and magnet.value == pytest.approx(celsius + ZERO_C)
    assert "assumed" in magnet.note


def test_rise_class_picks_the_reference_temperature_over_the_thermal_class() -> None:
    # [M] "when the rated rise is that of a lower class, that class's reference applies"
    hot, magnet = hot_resistance({"circuit.resistance": Known(1.0)},
                                 machine__thermal_class=155, machine__temperature_rise_class=130)
    assert hot.value == pytest.approx(330 / 255)
    assert magnet.value == pytest.approx(95.0 + ZERO_C)


def test_hot_resistance_from_25_degc_aluminium() -> None:
    # [M] k = 225 for aluminium; resistance stated at 25 degC -> 115 degC: (225+115)/(225+25)
    hot, _ = hot_resistance({"circuit.resistance": Known(1.0, 0.0, temperature=298.15)},
                            machine__thermal_class=155, machine__conductor="aluminium")
    assert hot.value == pytest.approx(340 / 250)


def test_nothing_is_derived_without_a_class_or_a_rise() -> None:
    hot, magnet = hot_resistance({"circuit.resistance": Known(1.0)})
    assert hot is None and magnet is None
    hot, magnet = hot_resistance({"circuit.resistance": Known(1.0),
                                  "rated.magnet_temperature": Known(400.0)},
                                 machine__thermal_class=200)
    assert hot is None and magnet is None


def test_estimate_resistance_gives_an_estimate() -> None:
    hot, _ = hot_resistance({"circuit.resistance": Known(1.0, origin="estimate")},
                            machine__thermal_class=155)
    assert hot.estimate


# --- plausibility bands on trial ------------------------------------------------------------------
def test_torque_per_rotor_volume_band_by_cooling_from_memory() -> None:
    # [M] Miller; Hendershot & Miller: fan-cooled up to about 50 kN*m/m^3, liquid up to 250
    values = {"rated.torque": Known(200.0, 0.005), "machine.rotor_diameter": Known(0.1, 0.005),
              "machine.stack_length": Known(0.1, 0.005)}  # 254.6 kN*m/m^3 [D]
    assert severities(list(RotorTorqueDensity().check(sheet(dict(values),
                                                            machine__cooling="IC411")))) \
        == ["warning"]
    assert severities(list(RotorTorqueDensity().check(sheet(dict(values),
                                                            machine__cooling="IC71W")))) \
        == ["warning"]
    values["rated.torque"] = Known(20.0, 0.005)  # 25.5 kN*m/m^3
    assert list(RotorTorqueDensity().check(sheet(values, machine__cooling="IC411"))) == []


def test_torque_per_rotor_volume_band_can_be_overridden() -> None:
    from sheetlint.engine.core import Settings

    values = {"rated.torque": Known(20.0), "machine.rotor_diameter": Known(0.1),
              "machine.stack_length": Known(0.1)}
    s = Sheet("demo", values, {"machine.cooling": "IC411"},
              Settings(options={"rotor-torque-density": {"band_knm_per_m3": [1.0, 10.0]}}))
    assert severities(list(RotorTorqueDensity().check(s))) == ["warning"]


def test_specific_losses_rough_bound_from_memory() -> None:
    losses = {"rated.losses": Known(2000.0), "machine.mass": Known(10.0)}  # 200 W/kg
    assert severities(list(SpecificLosses().check(sheet(losses, machine__cooling="IC410")))) \
        == ["warning"]
    assert list(SpecificLosses().check(sheet(losses, machine__cooling="IC71W"))) == []
    from_eta = {"rated.power": Known(11e3), "rated.efficiency": Known(0.5),
                "machine.mass": Known(50.0)}  # 11 kW of losses in 50 kg = 220 W/kg [D]
    assert severities(list(SpecificLosses().check(sheet(from_eta, machine__cooling="IC411")))) \
        == ["warning"]


def test_overload_ratios_peak_below_rated_is_an_error_band_is_practice() -> None:
    # a short-time peak below the continuous rating is a hard contradiction (DESIGN.md,
    # Judgement 4); the 1-6 band of peak-to-rated ratios is common practice: outside it an
    # info, more than twice beyond it a warning
    base = {"rated.torque": Known(10.0, 0.005), "rated.current": Known(5.0, 0.005)}
    low = dict(base, **{"limits.peak_torque": Known(8.0, 0.005)})
    assert severities(list(OverloadRatio().check(sheet(low)))) == ["error"]
    servo = dict(base, **{"limits.peak_torque": Known(40.0, 0.005),
                          "limits.peak_current": Known(20.0, 0.005)})
    assert list(OverloadRatio().check(sheet(servo, machine__topology="spm"))) == []
    high = dict(base, **{"limits.peak_torque": Known(80.0, 0.005)})
    assert severities(list(OverloadRatio().check(sheet(high)))) == ["info"]
    far = dict(base, **{"limits.peak_torque": Known(130.0, 0.005)})
    assert severities(list(OverloadRatio().check(sheet(far)))) == ["warning"]


def test_short_time_rating_held_for_hours_is_a_warning() -> None:
    values = {"rated.torque": Known(100.0), "limits.peak_torque": Known(150.0)}
    assert severities(list(ShortTimeRating().check(sheet(
        dict(values), machine__duty="S1", limits__peak_torque__duration=7200.0)))) == ["warning"]
    assert list(ShortTimeRating().check(sheet(
        dict(values), machine__duty="S1", limits__peak_torque__duration=60.0))) == []
    assert list(ShortTimeRating().check(sheet(
        dict(values), limits__peak_torque__duration="long"))) == []


# --- registry and a consistent sheet ------------------------------------------------------------
def test_rules_are_registered_with_their_order_and_status() -> None:
    expected = {"temperature-rise": ("established", 20), "efficiency-class": ("established", 80),
                "rotor-torque-density": ("trial", 80), "specific-losses": ("trial", 80),
                "overload-ratio": ("trial", 80), "short-time-rating": ("trial", 80)}
    for rule, (status, order) in expected.items():
        relation = relation_for(rule)
        assert relation is not None and (relation.status, relation.order) == (status, order)
        assert relation.__doc__ and "Example that fails" in relation.__doc__


def test_a_consistent_catalogue_sheet_raises_no_warning_or_error() -> None:
    # invented machine: 15 kW, 4 poles, 1500 r/min, eta 94.5 % (IE4 4p 15 kW is about 93.9 %),
    # class F, rise 80 K, IC411, 95.5 N*m on a 0.15 m x 0.2 m rotor (27 kN*m/m^3), 90 kg
    values = {"rated.power": Known(15e3, 0.0005 / 15), "rated.efficiency": written(94.5, 1, 0.01),
              "rated.torque": Known(95.5, 0.0005), "rated.current": Known(27.0, 0.002),
              "rated.speed": Known(1500 * RPM, 0.0003), "rated.temperature_rise": Known(80.0),
              "machine.rotor_diameter": Known(0.15), "machine.stack_length": Known(0.2),
              "machine.mass": Known(90.0), "limits.peak_torque": Known(190.0),
              "limits.peak_current": Known(55.0), "circuit.resistance": Known(0.2)}
    s = sheet(values, machine__thermal_class=155, machine__cooling="IC411",
              machine__topology="spm", machine__duty="S1", efficiency_class="IE4",
              limits__peak_torque__duration=10.0)
    findings = []
    for relation in (TemperatureRise(), EfficiencyClass(), RotorTorqueDensity(),
                     SpecificLosses(), OverloadRatio(), ShortTimeRating()):
        for d in relation.derive(s):
            s.values.setdefault(d.field, Known(d.value, d.uncertainty, "derived", relation.rule))
        findings += list(relation.check(s))
    assert [f for f in findings if f.severity != "info"] == []


@settings(max_examples=150, deadline=None)
@given(kw=st.floats(0.75, 1000.0), poles=st.sampled_from([2, 4, 6, 8]),
       ie_class=st.integers(2, 4), margin_tenths=st.integers(0, 20))
def test_claims_met_at_catalogue_precision_raise_no_warning(kw: float, poles: int,
                                                            ie_class: int,
                                                            margin_tenths: int) -> None:
    # DESIGN.md: a consistent sheet rounded to catalogue precision yields no error or warning.
    minimum = line_operated_minimum(ie_class, poles, kw * 1e3).efficiency
    assert minimum is not None
    declared = round(100 * minimum + margin_tenths / 10, 1)
    findings = list(EfficiencyClass().check(efficiency_sheet(declared, 1, kw, f"IE{ie_class}",
                                                             poles)))
    assert all(f.severity == "info" for f in findings)


@settings(max_examples=150, deadline=None)
@given(kw=st.floats(0.75, 1000.0), poles=st.sampled_from([2, 4, 6, 8]),
       ie_class=st.integers(2, 3))
def test_claims_one_class_above_the_class_reached_are_errors(kw: float, poles: int,
                                                             ie_class: int) -> None:
    # property over the whole range: declared exactly at one class's minimum, next class claimed
    minimum = line_operated_minimum(ie_class, poles, kw * 1e3).efficiency
    higher = line_operated_minimum(ie_class + 1, poles, kw * 1e3).efficiency
    assert minimum is not None and higher is not None and higher > minimum
    findings = list(EfficiencyClass().check(efficiency_sheet(
        round(100 * minimum, 1), 1, kw, f"IE{ie_class + 1}", poles)))
    assert severities(findings) == ["error"] and f"IE{ie_class}" in findings[0].message


def test_end_to_end_through_the_cli(tmp_path: Any, capsys: Any) -> None:
    # invented machine; 11 kW 4p IE4 minimum 93.3 % (SI 2021/745 Schedule 16 Table 23 [R]);
    # class B rise limit 80 K (IEC 60034-1 as quoted); 0.400 ohm at 20 degC -> 40 + 85 = 125 degC
    # -> 0.400 x 360/255 = 0.56471 ohm ([D], k = 235)
    import json

    from sheetlint.cli import main

    path = tmp_path / "demo.yaml"
    path.write_text(
        "id: DEMO-Q11\nmachine:\n  poles: 4\n  thermal_class: F\n  temperature_rise_class: B\n"
        "  cooling: IC411\n"
        "rated:\n  power: 11 kW\n  speed: 1500 rpm\n  frequency: 50 Hz\n"
        "  efficiency: 91.5 %\n  temperature_rise: 85 K\n"
        "circuit:\n  resistance: 0.400 ohm\n"
        "efficiency_class:\n  value: IE4\n  standard: IEC 60034-30-1\n", encoding="utf-8")
    main(["check", "--format", "json", str(path)])
    record = json.loads(capsys.readouterr().out)["files"][0]["records"][0]
    by_rule = {f["rule"]: f for f in record["findings"]}
    assert by_rule["efficiency-class"]["severity"] == "error"
    assert by_rule["temperature-rise"]["severity"] == "error"
    hot = record["derived"]["circuit.resistance_hot"]
    assert hot["rule"] == "temperature-rise" and hot["value"] == pytest.approx(0.564706, rel=1e-5)
    assert record["derived"]["rated.magnet_temperature"]["estimate"] is True
