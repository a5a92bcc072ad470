"""The realistic-catalogue generator, checked against outside sources, and sheetlint judged on it.

The generator (``tools/realistic_catalogue.py``) is written apart from the engine; these tests
first check the generator itself (its dq solution against scipy's optimiser as an independent
solver, the power balance, the IEC 60034-1 tolerance sense, the 235 rule), then run sheetlint's
public command line (JSON output contract) once on a fixed small sample: consistent sheets
must raise no error and no warning; each planted slip must be flagged and the corrupted field
named. Tests that today's engine fails are marked xfail (issues 15/16: judgement being
rebuilt), case by case.
"""

from __future__ import annotations

import math
import re
from typing import Any

import pytest
from scipy.optimize import minimize, minimize_scalar

from tools.realistic_catalogue import (
    CONVENTIONS,
    SLIP_BY_NAME,
    SLIPS,
    WATT_PER_HP,
    Machine,
    check_with_sheetlint,
    consistent,
    dq_torque,
    dq_voltages,
    efficiency_tolerance,
    hot_resistance,
    ke_line_rms,
    mtpa_current_for_torque,
    mtpa_currents,
    planted,
    power_factor_tolerance,
    significant,
    solve_point,
    v_per_krpm,
    write_sheets,
)

CONSISTENT_SAMPLE = [(c, s) for c in CONVENTIONS for s in range(3)]
SLIP_SAMPLE = [(s.name, seed) for s in SLIPS for seed in range(2)]
#: known misses, strict: a case that starts to pass fails the suite until its mark is removed
REBUILDING = pytest.mark.xfail(reason="known miss (issue 15): the sheet does not over-determine "
                               "the corrupted field enough to see the slip", strict=True)
DIAGNOSIS = pytest.mark.xfail(reason="known miss (issue 16): no cause named for this slip",
                              strict=True)


# ------------------------------------------------------------------------------------------
# the generator's physics against outside references
# ------------------------------------------------------------------------------------------

SALIENT = {"pole_pairs": 4, "psi": 0.100, "ld": 1.0e-3, "lq": 2.5e-3}


@pytest.mark.parametrize("amplitude", [20.0, 100.0, 400.0])
def test_mtpa_angle_matches_scipy_bounded_maximisation_of_torque(amplitude: float) -> None:
    """MTPA i_d from the closed form vs scipy's bounded scalar optimiser maximising
    T(γ) = 1.5·p·(ψ·I·cos γ + (L_d − L_q)·I²·(−sin γ)·cos γ) over the current angle
    (independent solver)."""
    p, psi, ld, lq = SALIENT.values()
    i_d, i_q = mtpa_currents(amplitude, psi, ld, lq)

    def negative_torque(angle: float) -> float:
        return -dq_torque(p, psi, ld, lq, -amplitude * math.sin(angle), amplitude * math.cos(angle))

    best = minimize_scalar(negative_torque, bounds=(0.0, math.pi / 2), method="bounded",
                           options={"xatol": 1e-10})
    assert i_d == pytest.approx(-amplitude * math.sin(best.x), rel=1e-5, abs=1e-6)
    assert i_q == pytest.approx(amplitude * math.cos(best.x), rel=1e-5)


def test_least_current_for_torque_matches_scipy_constrained_minimisation() -> None:
    """The generator's least current for 150 N·m vs scipy SLSQP minimising i_d² + i_q² subject
    to T(i_d, i_q) = 150 N·m (independent solver)."""
    p, psi, ld, lq = SALIENT.values()
    torque = 150.0
    amplitude = mtpa_current_for_torque(torque, p, psi, ld, lq)
    result = minimize(lambda x: x[0] ** 2 + x[1] ** 2, x0=[-50.0, 150.0], method="SLSQP",
                      constraints=[{"type": "eq", "fun": lambda x: dq_torque(
                          p, psi, ld, lq, x[0], x[1]) - torque}],
                      options={"ftol": 1e-12, "maxiter": 200})
    assert result.success
    assert amplitude == pytest.approx(math.hypot(*result.x), rel=1e-5)


def test_worked_vector_is_reproduced_as_a_consistency_vector() -> None:
    """The team's worked dq vector (p = 4, ψ = 0.100 Wb, L_d = 1.0 mH, L_q = 2.5 mH, R = 0.050 Ω,
    100 A peak, 3000 r/min). The numbers are the team's own arithmetic, not a published
    example: this is a consistency vector, not a check against an outside source."""
    p, psi, ld, lq = SALIENT.values()
    i_d, i_q = mtpa_currents(100.0, psi, ld, lq)
    assert i_d == pytest.approx(-55.982, abs=1e-3)
    assert i_q == pytest.approx(82.862, abs=1e-3)
    assert dq_torque(p, psi, ld, lq, i_d, i_q) == pytest.approx(91.466, abs=1e-3)
    omega_e = 3000 * 2 * math.pi / 60 * p
    u_d, u_q = dq_voltages(0.050, omega_e, psi, ld, lq, i_d, i_q)
    assert u_d == pytest.approx(-263.117, abs=1e-3)
    assert u_q == pytest.approx(59.458, abs=1e-3)
    assert math.hypot(u_d, u_q) * math.sqrt(1.5) == pytest.approx(330.376, abs=1e-3)
    assert v_per_krpm(ke_line_rms(p, psi)) == pytest.approx(51.302, abs=1e-3)


def test_kt_equals_sqrt3_ke_by_power_balance_for_surface_magnets() -> None:
    """T·ω = √3·E_LL·I with i_d = 0 (power balance, textbook): torque per rms ampere from the
    dq torque equals √3 × the line-rms Ke from ψ."""
    p, psi = 3, 0.2
    current_rms = 10.0
    torque = dq_torque(p, psi, 2e-3, 2e-3, 0.0, current_rms * math.sqrt(2))
    assert torque / current_rms == pytest.approx(math.sqrt(3) * ke_line_rms(p, psi), rel=1e-12)
    # Kt [N·m/A] = 0.016540 · Ke [V/krpm], i.e. √3·60/(2π·1000) (unit arithmetic)
    assert math.sqrt(3) * 60 / (2 * math.pi * 1000) == pytest.approx(0.016540, abs=5e-7)


def test_hot_resistance_follows_the_235_rule_of_iec_60034_1() -> None:
    """R₂/R₁ = (235 + θ₂)/(235 + θ₁), copper (IEC 60034-1, from memory): 1 Ω at 20 °C is
    1.21569 Ω at 75 °C and 1.52941 Ω at 155 °C (hand arithmetic: 310/255, 390/255)."""
    assert hot_resistance(1.0, 75.0) == pytest.approx(310 / 255, rel=1e-12)
    assert hot_resistance(1.0, 75.0) == pytest.approx(1.21569, abs=1e-5)
    assert hot_resistance(1.0, 155.0) == pytest.approx(1.52941, abs=1e-5)


def test_iec_60034_1_tolerances_on_declared_values() -> None:
    """IEC 60034-1 tolerances (as quoted): efficiency −15 % of (1 − η) up to 150 kW, −10 %
    above; power factor −(1 − cos φ)/6 within 0.02…0.07. Hand vectors: η 95 % at 75 kW →
    0.75 points; cos φ 0.85 → 0.025, 0.95 → 0.02, 0.40 → 0.07."""
    assert efficiency_tolerance(0.95, 75e3) == pytest.approx(0.0075)
    assert efficiency_tolerance(0.95, 200e3) == pytest.approx(0.005)
    assert power_factor_tolerance(0.85) == pytest.approx(0.025)
    assert power_factor_tolerance(0.95) == pytest.approx(0.02)
    assert power_factor_tolerance(0.40) == pytest.approx(0.07)


def test_nist_horsepower() -> None:
    """1 hp (550 ft·lbf/s) = 745.6999 W (NIST SP 811, 2008, Appendix B)."""
    assert WATT_PER_HP == pytest.approx(550 * 0.3048 * 4.4482216152605, rel=1e-6)


@pytest.mark.parametrize(("value", "digits", "text"), [
    # whole numbers of 10 or more print as catalogues print round numbers
    (100.02, 3, "100"), (1423.6, 3, "1420"), (20.004, 4, "20"), (95.7241, 3, "95.7"),
    (0.0058712, 4, "0.005871"), (9.9996, 4, "10"), (1.0, 3, "1.00"), (7.5, 3, "7.50"),
])
def test_printing_at_significant_digits(value: float, digits: int, text: str) -> None:
    """Rounding to significant digits, checked by hand."""
    assert significant(value, digits) == text


@pytest.mark.parametrize("convention", CONVENTIONS)
def test_power_balance_of_the_rated_point(convention: str) -> None:
    """Electrical input from the dq voltages and currents, 1.5·(u_d·i_d + u_q·i_q), equals shaft
    power plus copper, iron, friction and stray losses computed separately (energy balance)."""
    for seed in range(5):
        sheet = consistent(convention, seed)
        point = sheet.rated
        assert point.input_power == pytest.approx(point.shaft_power + point.losses, rel=1e-9)
        assert 0.5 < point.power_factor <= 1.0
        assert 0.7 < point.efficiency < 1.0


@pytest.mark.parametrize("convention", [c for c in CONVENTIONS if c != "servo"])
def test_industrial_sheets_declare_eta_and_cos_phi_in_the_iec_sense(convention: str) -> None:
    """The declared η and cos φ lie at or above the model's values and within the IEC 60034-1
    tolerance of them (a test result may fall short of a declared value by the tolerance)."""
    for seed in range(10):
        sheet = consistent(convention, seed)
        truth, point = sheet.truth, sheet.rated
        eta = truth["declared_efficiency"]
        assert point.efficiency <= eta <= point.efficiency + efficiency_tolerance(
            point.efficiency, point.shaft_power)
        pf = truth["declared_power_factor"]
        assert point.power_factor <= pf <= point.power_factor + power_factor_tolerance(
            point.power_factor)


def test_rated_voltage_is_the_voltage_the_dq_model_needs() -> None:
    """Industrial sheets: the printed rated voltage is what the MTPA rated point needs."""
    for seed in range(10):
        sheet = consistent("industrial_magnet_stated", seed)
        assert sheet.rated.voltage == pytest.approx(sheet.truth["rated_voltage"], rel=1e-9)


def test_servo_sheets_follow_the_servo_catalogue_convention() -> None:
    """Servo: Kt is the 20 °C constant √3·Ke(20 °C); rated T/I 6–12 % under it; a standstill
    point at 0 rpm; R and L terminal to terminal; the supply class as rated voltage."""
    for seed in range(10):
        sheet = consistent("servo", seed)
        machine: Machine = sheet.machine
        record = sheet.record
        kt20 = math.sqrt(3) * ke_line_rms(machine.pole_pairs, machine.psi20)
        assert sheet.truth["kt20"] == pytest.approx(kt20)
        assert 0.88 <= sheet.rated.shaft_torque / sheet.rated.current / kt20 <= 0.94
        assert record["points"][0]["speed"].startswith("0 ")
        assert record["circuit"]["resistance"]["basis"] == "line"
        assert record["circuit"]["resistance"]["value"] == pytest.approx(
            2 * machine.r20, rel=5e-3)
        assert record["rated"]["voltage"] == record["supply"]["mains_voltage"]
        assert "magnet_temperature" not in record["rated"]


def test_consistent_sheets_stay_clear_of_the_dc_link_and_overspeed_slips_do_not() -> None:
    """√2·E_LL(cold, top speed) against √2·U_mains (a stopped diode front end's DC link)."""
    for seed in range(10):
        sheet = consistent("industrial_magnet_unstated", seed)
        top = float(sheet.record["limits"]["max_speed"].split()[0])
        assert sheet.truth["ke20_v_per_krpm"] * top / 1000 < sheet.truth["mains"]
        slipped = planted("overspeed", seed)
        top = float(slipped.record["limits"]["max_speed"].split()[0])
        assert slipped.truth["ke20_v_per_krpm"] * top / 1000 > 1.05 * slipped.truth["mains"]


def _changed_paths(a: Any, b: Any, prefix: str = "") -> set[str]:
    if isinstance(a, dict) and isinstance(b, dict):
        paths: set[str] = set()
        for key in set(a) | set(b):
            paths |= _changed_paths(a.get(key), b.get(key), f"{prefix}{key}.")
        return paths
    return set() if a == b else {prefix.rstrip(".").split(".value")[0].split(".unit")[0]}


@pytest.mark.parametrize("slip", [s.name for s in SLIPS])
def test_a_planted_slip_changes_only_its_named_fields(slip: str) -> None:
    """Bookkeeping: the planted sheet differs from its consistent twin in the named fields only
    (an induction-motor slip also rewrites torque and frequency to match the slipped speed)."""
    allowed = set(SLIP_BY_NAME[slip].fields) | {"id"}
    if slip == "induction_slip":
        allowed |= {"rated.torque", "rated.frequency"}
    for seed in range(5):
        sheet = planted(slip, seed)
        changed = _changed_paths(sheet.record, sheet.consistent_record)
        assert changed - {"id"}, f"{slip} seed {seed} changed nothing"
        assert changed <= allowed


def test_generation_is_deterministic_by_seed() -> None:
    assert consistent("servo", 7).record == consistent("servo", 7).record
    assert planted("ke_peak", 3).record == planted("ke_peak", 3).record
    assert consistent("servo", 7).record != consistent("servo", 8).record


def test_solve_point_below_base_speed_uses_the_mtpa_current() -> None:
    """Regression guard: the operating point's current is the MTPA current for its torque."""
    machine = Machine("ipm", 8, 0.1, 1e-3, 2.5e-3, 0.05, -0.0011)
    point = solve_point(machine, 3000, 80.0, winding_temperature=20.0, magnet_temperature=20.0)
    assert point.current * math.sqrt(2) == pytest.approx(
        mtpa_current_for_torque(80.0, 4, 0.1, 1e-3, 2.5e-3), rel=1e-9)


# ------------------------------------------------------------------------------------------
# sheetlint judged on a fixed small sample
# ------------------------------------------------------------------------------------------

@pytest.fixture(scope="module")
def judged(tmp_path_factory: pytest.TempPathFactory) -> dict[str, dict[str, Any]]:
    """Every sample sheet of this module checked in one run of the command line (JSON
    contract), keyed by "consistent:CONVENTION:SEED", "slip:NAME:SEED", "twin:NAME:SEED"."""
    keys: list[str] = []
    records: list[dict[str, Any]] = []
    for convention, seed in CONSISTENT_SAMPLE:
        keys.append(f"consistent:{convention}:{seed}")
        records.append(consistent(convention, seed).record)
    for slip, seed in SLIP_SAMPLE:
        sheet = planted(slip, seed)
        keys += [f"slip:{slip}:{seed}", f"twin:{slip}:{seed}"]
        records += [sheet.record, sheet.consistent_record or {}]
    folder = tmp_path_factory.mktemp("realistic-catalogue")
    paths = write_sheets(records, folder)
    results = check_with_sheetlint(folder)
    judged = {key: results[path.name] for key, path in zip(keys, paths, strict=True)}
    assert not [key for key, record in judged.items() if record.get("error")]
    return judged


def _loud(record: dict[str, Any]) -> list[dict[str, Any]]:
    return [f for f in record["findings"] if f["severity"] in ("error", "warning")]


#: (convention, seed) pairs that today's engine gets wrong (a warning or error on a
#: consistent sheet); the lead removes entries as the engine catches up
CONSISTENT_FAILING_TODAY: set[tuple[str, int]] = set()


@pytest.mark.parametrize(("convention", "seed"), [
    pytest.param(c, s, marks=[REBUILDING] if (c, s) in CONSISTENT_FAILING_TODAY else [])
    for c, s in CONSISTENT_SAMPLE])
def test_consistent_sheet_gives_no_error_and_no_warning(
        convention: str, seed: int, judged: dict[str, dict[str, Any]]) -> None:
    record = judged[f"consistent:{convention}:{seed}"]
    assert _loud(record) == [], [(f["rule"], f["message"]) for f in _loud(record)]


#: (slip, seed) pairs not flagged today by a new warning/error naming the corrupted field
FLAG_FAILING_TODAY = {
    ("kt_per_peak_ampere", 0), ("r_line_phase", 1), ("l_line_phase", 0), ("l_line_phase", 1)}
#: (slip, seed) pairs whose slip keyword no cause names today
KEYWORD_FAILING_TODAY = {
    ("kt_per_peak_ampere", 0), ("r_line_phase", 1), ("l_line_phase", 0), ("l_line_phase", 1)}


def _names(field_name: str, corrupted: tuple[str, ...]) -> bool:
    aliases = {"machine.poles": {"machine.pole_pairs"}}
    return any(field_name in {c, f"{c}_hot", f"{c}_cold"} | aliases.get(c, set())
               for c in corrupted)


@pytest.mark.parametrize(("slip", "seed"), [
    pytest.param(s, n, marks=[REBUILDING] if (s, n) in FLAG_FAILING_TODAY else [])
    for s, n in SLIP_SAMPLE])
def test_planted_slip_is_flagged_naming_the_corrupted_field(
        slip: str, seed: int, judged: dict[str, dict[str, Any]]) -> None:
    """A warning or error that lists the corrupted field and that the consistent twin of the
    sheet does not get (so a false alarm already present cannot pass for a catch)."""
    sheet = planted(slip, seed)
    record, twin = judged[f"slip:{slip}:{seed}"], judged[f"twin:{slip}:{seed}"]
    twin_keys = {(f["rule"], f["severity"], tuple(f["fields"])) for f in _loud(twin)}
    catches = [f for f in _loud(record)
               if (f["rule"], f["severity"], tuple(f["fields"])) not in twin_keys
               and any(_names(x, sheet.corrupted_fields) for x in f["fields"])]
    assert catches, [(f["rule"], f["fields"][:3]) for f in _loud(record)]


@pytest.mark.parametrize(("slip", "seed"), [
    pytest.param(s, n, marks=[DIAGNOSIS] if (s, n) in KEYWORD_FAILING_TODAY else [])
    for s, n in SLIP_SAMPLE if SLIP_BY_NAME[s].keyword])
def test_planted_slip_cause_names_the_slip(slip: str, seed: int,
                                           judged: dict[str, dict[str, Any]]) -> None:
    """Issue 16: a loud finding's cause names the slip (hp, √3, peak, line, pole, 1000, 50/60…)."""
    record = judged[f"slip:{slip}:{seed}"]
    pattern = re.compile(SLIP_BY_NAME[slip].keyword or "", re.IGNORECASE)
    assert any(pattern.search(f["cause"] or "") for f in _loud(record)), [
        (f["rule"], f["cause"]) for f in _loud(record)]


def test_generated_ipm_machines_bracket_the_open_2k2_ipm_lab_machine() -> None:
    """Realism against outside data: the 2.2 kW IPM of motulator 0.18.0's examples
    (tests/data/open_datasets/drive-simulator-2k2-ipm.yaml: 14 N·m, 4.3 A, 370 V, 75 Hz,
    n_p 3, ψ 0.545 Wb) has rated T/I = 0.939·√3·Ke and a rated voltage 17.6 % over its
    back-EMF (hand arithmetic); the generator's ipm machines span both figures."""
    ke = ke_line_rms(3, 0.545)
    open_ratio = 14.0 / 4.3 / (math.sqrt(3) * ke)
    open_margin = 370.0 / (ke * 2 * math.pi * 75.0 / 3) - 1
    assert open_ratio == pytest.approx(0.939, abs=1e-3)
    assert open_margin == pytest.approx(0.176, abs=1e-3)
    ratios, margins = [], []
    for seed in range(120):
        sheet = consistent("industrial_magnet_unstated", seed)
        if sheet.machine.topology != "ipm":
            continue
        kt20 = math.sqrt(3) * ke_line_rms(sheet.machine.pole_pairs, sheet.machine.psi20)
        ratios.append(sheet.rated.shaft_torque / sheet.rated.current / kt20)
        margins.append(sheet.rated.voltage / sheet.rated.back_emf - 1)
    assert min(ratios) < open_ratio < max(ratios)
    assert min(margins) < open_margin < max(margins)


@pytest.mark.parametrize(("slip", "cause"), [
    # the cause wordings DESIGN.md gives as examples ("Relations", last paragraph)
    ("poles_pm2", "machine.poles: agrees with 6 poles"),
    ("ke_per_phase", "emf.constant: agrees if Ke is per phase, not line-to-line"),
    # wordings of today's engine that do name the slip
    ("hz_50_60", "agrees if rated.frequency is a 50 Hz value next to 60 Hz data (÷1.2)"),
    ("ke_peak", "agrees with the usual margin if Ke is peak rather than rms (×√2)"),
    ("hp_kw", "agrees if rated.power is a power in hp labelled kW (×1.341)"),
])
def test_slip_keywords_accept_the_wordings_that_name_the_slip(slip: str, cause: str) -> None:
    assert re.search(SLIP_BY_NAME[slip].keyword or "", cause, re.IGNORECASE)


@pytest.mark.parametrize(("slip", "message"), [
    ("ke_per_phase", "rated torque per ampere and the hot torque constant √3·Ke disagree"),
    ("ke_peak", "Steady-state short-circuit current ψ/L_d = 24.38 A rms against the peak current"),
    ("r_line_phase", "A terminal short circuit at speed drives more current than the peak current"),
    ("uh_mh", "rated voltage is +18.0% over the hot back-EMF (1000 V line rms)"),
])
def test_slip_keywords_ignore_formula_text_of_any_message(slip: str, message: str) -> None:
    """Text a rule prints whatever the fault must not count as naming the slip."""
    assert not re.search(SLIP_BY_NAME[slip].keyword or "", message, re.IGNORECASE)
