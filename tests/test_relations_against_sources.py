"""Each basic relation against an outside source named beside the check.

Tags as in REFERENCES.md: [R] read in the named text, [Q] quoted, [M] from memory, [D] derived
by arithmetic. Facts of the trade with no published source are marked common practice.
"""

from __future__ import annotations

import math

import pytest
from scipy.optimize import brentq

from sheetlint.engine.core import Known, Sheet
from sheetlint.engine.run import derive
from sheetlint.physics.magnets import remanence_factor
from sheetlint.relations.registry import all_relations
from tests.conftest import run, serious

RPM = 2 * math.pi / 60


def _derived(values: dict[str, float], attributes=None) -> Sheet:
    sheet = Sheet("T", {k: Known(v, 1e-6, sensitivity={k: 1.0}) for k, v in values.items()},
                  attributes or {"machine.topology": "spm"})
    derive(sheet, all_relations())
    return sheet


def test_torque_from_power_and_speed_matches_the_9549_rule_of_nist_sp811_factors():
    # REFERENCES §3 [D from NIST SP 811]: P[kW] = T[N·m]·n[r/min]/9549.3
    sheet = _derived({"rated.power": 15e3, "rated.speed": 1500 * RPM})
    assert sheet.value("rated.torque") == pytest.approx(15 * 9549.3 / 1500, rel=1e-4)


def test_torque_in_lbf_ft_matches_the_5252_rule_for_horsepower():
    # REFERENCES §3 [D from NIST SP 811]: P[hp] = T[lbf·ft]·n[r/min]/5252.1
    sheet = _derived({"rated.power": 20 * 745.6999, "rated.speed": 1750 * RPM})
    assert sheet.value("rated.torque") / 1.355818 == pytest.approx(20 * 5252.1 / 1750,
                                                                   rel=1e-4)


@pytest.mark.parametrize("poles,frequency,speed", [(2, 50, 3000), (4, 50, 1500), (6, 50, 1000),
                                                   (8, 60, 900), (4, 60, 1800)])
def test_synchronous_speed_table_n_equals_120f_over_poles(poles, frequency, speed):
    # n = 120·f/poles: the synchronous-speed table of any machines text, e.g. Fitzgerald,
    # Kingsley & Umans, Electric Machinery, 6th ed., ch. 4 [M: chapter from memory]
    sheet = _derived({"machine.poles": poles, "rated.frequency": frequency})
    assert sheet.value("rated.speed") / RPM == pytest.approx(speed)
    sheet = _derived({"rated.speed": speed * RPM, "rated.frequency": frequency})
    assert sheet.value("machine.pole_pairs") == poles // 2


def test_a_speed_four_percent_under_synchronous_reads_as_induction_slip():
    # 4-pole 50 Hz induction motors run near 1440-1470 r/min (slip of a few %): any machines text
    data = {"id": "S", "machine": {"poles": 4}, "rated": {"speed": "1440 rpm",
                                                        "frequency": "50 Hz"}}
    hits = [f for f in serious(run(data)) if f.rule == "synchronous-speed"]
    assert hits and "slip" in (hits[0].cause or "")


def test_no_pole_count_stated_and_no_integral_one_fits_frequency_and_speed_is_an_error():
    # n = 120·f/poles (Fitzgerald, Kingsley & Umans, Electric Machinery, 6th ed., ch. 4
    # [M: chapter from memory]): 1440 r/min at 50 Hz gives 120·50/1440 = 4.167 poles, no
    # integer; 4 poles would turn at 1500 r/min, so the speed is 4.0 % under synchronous:
    # a 4-pole induction motor's slip (a few %: any machines text).
    data = {"id": "S", "rated": {"speed": "1440 rpm", "frequency": "50 Hz"}}
    hits = [f for f in serious(run(data)) if f.rule == "synchronous-speed"]
    assert len(hits) == 1 and hits[0].severity == "error"
    assert "4.167 poles" in hits[0].message
    assert hits[0].cause is not None and "4.0% under the synchronous speed of 4 poles" in \
        hits[0].cause
    # the same sheet at 1500 r/min derives 2 pole pairs and says nothing
    synchronous = {"id": "S", "rated": {"speed": "1500 rpm", "frequency": "50 Hz"}}
    result = run(synchronous)
    assert not [f for f in result.findings if f.rule == "synchronous-speed"]
    assert result.derived["machine.pole_pairs"].value == 2


def test_kt_without_magnet_temperature_says_which_reading_of_ke_it_fits():
    # Kt = √3·Ke from the power balance T·ω = √3·E·I (Krishnan, Permanent Magnet Synchronous
    # and Brushless DC Motor Drives, CRC 2010; from memory: chapter). Ke 100 V/krpm at 20 °C
    # gives Kt 1.654 N·m/A at 20 °C; NdFeB at 120 °C (α −0.11 %/K referred to 20 °C, magnet
    # makers' notes as quoted) 1.472 N·m/A. A Kt with no stated temperature gets an info naming
    # the reading that fits.
    base = {"id": "K", "machine": {"topology": "spm"},
            "rated": {"magnet_temperature": "120 °C"},
            "emf": {"constant": "100.0 V/krpm", "magnet_temperature": "20 °C"}}
    for kt, reading in (("1.654 N*m/A", "the 20 °C constant"),
                        ("1.472 N*m/A", "the constant at about 120 °C")):
        result = run(dict(base, torque_constant=kt))
        assert not [f for f in serious(result) if f.rule == "emf-constant"]
        infos = [f for f in result.findings if f.rule == "emf-constant" and
                 "does not state Kt's magnet temperature" in f.message]
        assert len(infos) == 1 and infos[0].message.endswith(reading)
    # a Kt that fits no reading (Ke per phase: √3 off) fails the relation and is named; no
    # "reads as" info beside that failure
    result = run(dict(base, torque_constant="2.865 N*m/A"))
    failing = [f for f in serious(result) if f.rule == "emf-constant"]
    assert failing and "√3" in (failing[0].cause or "")
    assert not [f for f in result.findings if "reads as" in f.message]


def test_electrical_power_allows_the_iec_60034_1_tolerance_on_efficiency_and_power_factor():
    # IEC 60034-1:2010 tolerances as quoted in REFERENCES §1: η −15 % of (1 − η) (≤150 kW),
    # cos φ −(1 − cos φ)/6 (min 0.02). 15 kW, 400 V, η 0.93, cos φ 0.85:
    # I = P/(η·√3·U·cos φ) = 27.39 A. Allowed relative slack ≈ 0.0105/0.93 + 0.025/0.85 = 4.07 %.
    base = {"id": "E", "rated": {"power": "15.00 kW", "voltage": "400.0 V", "efficiency": "93.00 %",
                                 "power_factor": "0.850"}}
    exact = 15e3 / (0.93 * math.sqrt(3) * 400 * 0.85)
    inside = dict(base, rated=dict(base["rated"], current=f"{exact * 1.035:.2f} A"))
    outside = dict(base, rated=dict(base["rated"], current=f"{exact * 1.06:.2f} A"))
    assert not [f for f in serious(run(inside)) if f.rule == "electrical-power"]
    assert [f for f in serious(run(outside)) if f.rule == "electrical-power"]


def test_losses_are_input_minus_output_per_iec_60034_2_1_summation():
    # IEC 60034-2-1 [M]: total losses = P_in − P_out; 15 kW at η = 93.75 % → 1000 W
    sheet = _derived({"rated.power": 15e3, "rated.efficiency": 0.9375})
    assert sheet.value("rated.losses") == pytest.approx(1000.0)


def test_kt_from_ke_matches_the_servo_catalogue_rule_kt_equals_ke_over_60_5():
    # Servo catalogues' rule Kt[N·m/A rms] ≈ Ke[V_LL,rms/krpm]/60.46 [M: from memory]; the
    # power balance T·ω = √3·E·I gives 0.016540 (REFERENCES §4 [D]).
    sheet = _derived({"emf.constant": 100.0 * 60 / (2 * math.pi * 1000)})
    assert sheet.value("torque_constant") == pytest.approx(100.0 / 60.46, rel=2e-4)
    assert sheet.value("torque_constant") == pytest.approx(100.0 * 0.016540, rel=1e-4)


def test_hot_ke_matches_the_remanence_vector_of_references_6():
    # REFERENCES §6 [D]: α = −0.11 %/K, 50.0 V/krpm at 20 °C → 44.5 V/krpm at 120 °C
    assert 50.0 * remanence_factor("NdFeB", 293.15, 393.15) == pytest.approx(44.5)
    sheet = _derived({"emf.constant": 50.0 * 60 / (2 * math.pi * 1000),
                      "rated.magnet_temperature": 393.15})
    assert sheet.value("emf.constant_hot") * 2 * math.pi * 1000 / 60 == pytest.approx(44.5)


def test_monomial_solutions_agree_with_scipy_brentq_as_an_independent_solver():
    # scipy.optimize.brentq solves f(I) = η·√3·U·I·cos φ − P = 0 without our closed form
    sheet = _derived({"rated.power": 45e3, "rated.efficiency": 0.955, "rated.voltage": 400.0,
                      "rated.power_factor": 0.91})
    current = brentq(lambda i: 0.955 * math.sqrt(3) * 400 * i * 0.91 - 45e3, 1.0, 1e4,
                     xtol=1e-12)
    assert sheet.value("rated.current") == pytest.approx(current, rel=1e-9)


def test_voltage_margin_band_is_common_practice_six_to_seven_percent(spm_15kw):
    # common practice (REFERENCES §9, no published source): U_rated ≈ 1.06–1.07·E_hot
    result = run(spm_15kw)
    margin = [f for f in result.findings if f.rule == "voltage-margin"]
    assert margin and margin[0].severity == "info" and "usual" in margin[0].message


def test_standstill_voltage_is_small_next_to_rated_voltage_common_practice(spm_15kw):
    # common practice (REFERENCES §9): at zero speed rated current needs only I·R
    result = run(spm_15kw)
    drop = [f for f in result.findings if f.rule == "resistance-drop"]
    assert drop and drop[0].severity == "info" and "standstill" in drop[0].message


def test_spm_rated_voltage_is_estimated_from_hot_back_emf_by_the_usual_margin(spm_15kw):
    # common practice (REFERENCES §9): U_rated ≈ 1.065·E_hot; an estimate, flagged, checks nothing
    data = spm_15kw
    voltage = float(data["rated"].pop("voltage").split()[0])
    result = run(data)
    estimate = result.derived["rated.voltage"]
    assert estimate.is_estimate and "common practice" in (estimate.note or "")
    assert estimate.value == pytest.approx(voltage, rel=0.01)
    assert serious(result) == []


def test_spm_ke_is_estimated_from_rated_voltage_when_the_sheet_lacks_it(spm_15kw):
    data = spm_15kw
    ke = data["emf"].pop("constant")["value"]
    result = run(data)
    estimate = result.derived["emf.constant"]
    assert estimate.is_estimate
    assert estimate.value * 2 * math.pi * 1000 / 60 == pytest.approx(ke, rel=0.01)
