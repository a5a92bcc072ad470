"""The dq machine model (sheetlint.physics.dq) against outside references.

- scipy.optimize as an independent solver of the same equations (SLSQP for the constrained
  minimum, then fsolve on the active constraints to polish), over hypothesis-generated machines;
- the REFERENCES.md section 4 worked vector: our own derived consistency vector, not an outside
  source;
- a published textbook worked example (Chapman), from memory, not verified;
- REFERENCES.md section 8 converter vectors (derived arithmetic from the power-electronics
  relations).
"""

from __future__ import annotations

import itertools
import json
import math
import warnings

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from scipy import optimize

from sheetlint.physics.dq import (
    RPM,
    SQRT2,
    DqMachine,
    base_speed,
    characteristic_current,
    diode_bridge_dc_voltage,
    electromagnetic_torque,
    flux_linkage_from_ke,
    ke_from_flux_linkage,
    max_speed_at_current,
    max_torque_at_speed,
    mtpa_currents_at_current,
    mtpa_currents_for_torque,
    open_loop_load_angle,
    operating_point,
    pull_out,
    speed_at_back_emf,
    stator_voltage,
    svpwm_line_voltage,
    torque_speed_envelope,
)

SQRT_3_2 = math.sqrt(1.5)


# --- REFERENCES.md §4: our own derived consistency vector (not an outside source) -------------
REF4 = DqMachine(flux_linkage=0.100, ld=1.0e-3, lq=2.5e-3, resistance=0.050, pole_pairs=4)


def test_mtpa_at_current_reproduces_references_s4_derived_vector() -> None:
    i_d, i_q = mtpa_currents_at_current(REF4, 100.0)
    assert i_d == pytest.approx(-55.982, abs=5e-4)
    assert i_q == pytest.approx(82.862, abs=5e-4)
    assert electromagnetic_torque(REF4, i_d, i_q) == pytest.approx(91.466, abs=5e-4)


def test_operating_point_reproduces_references_s4_derived_vector() -> None:
    point = operating_point(REF4, 91.46558913801215, 3000 * RPM)
    assert point.region == "mtpa"
    assert point.current_rms * SQRT2 == pytest.approx(100.0, rel=1e-9)
    assert point.ud == pytest.approx(-263.117, abs=5e-4)
    assert point.uq == pytest.approx(59.458, abs=5e-4)
    assert point.line_voltage_rms == pytest.approx(330.376, abs=5e-4)
    assert point.input_power == pytest.approx(29484.76, abs=5e-3)
    assert point.copper_loss == pytest.approx(750.0, abs=1e-6)
    assert point.input_power - point.copper_loss == pytest.approx(28734.76, abs=5e-3)
    assert point.power_factor == pytest.approx(0.7287, abs=5e-5)
    assert not point.leading


def test_constants_reproduce_references_s4_derived_vector() -> None:
    ke = ke_from_flux_linkage(0.100, 4)
    assert ke * RPM * 1000 == pytest.approx(51.302, abs=5e-4)  # V/krpm
    assert math.sqrt(3) * ke == pytest.approx(0.84853, abs=5e-6)  # Kt, N*m/A rms
    assert ke * 3000 * RPM == pytest.approx(153.906, abs=5e-4)  # E_LL at 3000 r/min
    assert characteristic_current(REF4) == pytest.approx(100.0)
    assert flux_linkage_from_ke(ke, 4) == pytest.approx(0.100, rel=1e-15)


# --- REFERENCES.md §8: converter vectors (derived arithmetic) -----------------------------------
def test_converter_voltages_match_references_s8_derived_vectors() -> None:
    u_dc = diode_bridge_dc_voltage(400.0)
    assert u_dc == pytest.approx(540.19, abs=5e-3)
    assert SQRT2 * 400.0 == pytest.approx(565.69, abs=5e-3)
    assert svpwm_line_voltage(u_dc) == pytest.approx(381.97, abs=5e-3)
    ke = 51.3 / (1000 * RPM)
    assert speed_at_back_emf(ke, u_dc) / RPM == pytest.approx(7446, abs=0.5)
    assert speed_at_back_emf(ke, 540.0) / RPM == pytest.approx(7443, abs=0.5)


# --- published textbook worked example (from memory, not verified) ----------------------------
def test_field_weakening_point_matches_chapman_synchronous_motor_example_from_memory() -> None:
    """S. J. Chapman, *Electric Machinery Fundamentals*, 4th ed., McGraw-Hill 2005, chapter
    "Synchronous motors", Example 5-1 -- from memory, not verified (edition and page not
    checked). A 208 V, delta-connected, 60 Hz synchronous motor with X_S = 2.5 ohm (per delta
    phase), R_A neglected, friction and windage 1.5 kW, core loss 1.0 kW, drives a 15 hp load
    at 0.8 power factor leading. Published answers: I_A = 27.4 A per delta phase
    (I_L = 47.5 A), E_A = 255 V at -12.4 deg.

    A round-rotor machine at fixed terminal voltage is our SPM model on its voltage limit: with
    E_A = 255 V and U = 208 V the least-current point for the converted power is the book's
    operating point. Converted to the equivalent star: X = 2.5/3 ohm, E = 255/sqrt(3) V.
    """
    omega_e = 2 * math.pi * 60
    pole_pairs = 2
    x_star = 2.5 / 3
    e_star_rms = 255.0 / math.sqrt(3)
    machine = DqMachine(SQRT2 * e_star_rms / omega_e, x_star / omega_e, x_star / omega_e, 0.0,
                        pole_pairs)
    speed = omega_e / pole_pairs
    power_converted = 15 * 746.0 + 1500.0 + 1000.0  # 13.69 kW, R_A = 0
    point = operating_point(machine, power_converted / speed, speed, 208.0)
    assert point.region == "field-weakening"
    assert point.current_rms == pytest.approx(47.5, rel=0.01)  # line current
    assert point.current_rms / math.sqrt(3) == pytest.approx(27.4, rel=0.01)  # delta phase
    assert point.power_factor == pytest.approx(0.8, abs=0.01)
    assert point.leading
    assert math.degrees(point.load_angle) == pytest.approx(12.4, abs=0.2)


# --- independent numerical solution with scipy ---------------------------------------------------
def _scipy_operating_point(machine: DqMachine, torque: float, speed: float,
                           line_voltage: float) -> tuple[float, float] | None:
    """Least |i| with T = torque and |u| <= U: SLSQP, then fsolve on the active constraints."""
    omega_e = machine.pole_pairs * speed
    u_max = line_voltage / SQRT_3_2
    scale = torque / (1.5 * machine.pole_pairs * machine.flux_linkage)

    def torque_of(x: np.ndarray) -> float:
        return electromagnetic_torque(machine, x[0] * scale, x[1] * scale) / torque - 1.0

    def voltage_room(x: np.ndarray) -> float:
        u_d, u_q = stator_voltage(machine, x[0] * scale, x[1] * scale, omega_e)
        return 1.0 - (u_d * u_d + u_q * u_q) / (u_max * u_max)

    best = None
    # starts: the SPM-like point, a few angles, and the d-current that would bring the no-load
    # flux down to the voltage limit (a rough guess, independent of the solver under test)
    flux_guess = min(0.0, (u_max / omega_e - machine.flux_linkage) / machine.ld) / scale
    for start in ([0.0, 1.0], [-0.5, 0.8], [-1.5, 1.0], [-3.0, 1.5], [flux_guess, 1.0],
                  [1.2 * flux_guess, 1.2]):
        result = optimize.minimize(
            lambda x: x[0] ** 2 + x[1] ** 2, np.array(start), method="SLSQP",
            constraints=[{"type": "eq", "fun": torque_of},
                         {"type": "ineq", "fun": voltage_room}],
            options={"ftol": 1e-14, "maxiter": 500})
        # status 8 ("positive directional derivative") is SLSQP stopping at machine precision
        if (result.status in (0, 8) and abs(torque_of(result.x)) < 1e-7
                and voltage_room(result.x) > -1e-7
                and (best is None or result.fun < best.fun)):
            best = result
    if best is None:
        return None
    x = best.x
    with warnings.catch_warnings():  # fsolve says when it cannot improve at machine precision
        warnings.simplefilter("ignore", RuntimeWarning)
        return _polish(machine, x, scale, torque_of, voltage_room)


def _polish(machine: DqMachine, x: np.ndarray, scale: float, torque_of, voltage_room
            ) -> tuple[float, float]:
    if voltage_room(x) < 1e-6:  # voltage limit active: T = T*, |u| = U
        x = optimize.fsolve(lambda y: [torque_of(y), voltage_room(y)], x, xtol=1e-14)
    else:  # stationary point of |i|^2 on the torque curve (Lagrange): grad|i|^2 || grad T
        def stationary(y: np.ndarray) -> list[float]:
            i_d, i_q = y * scale
            dt_did = (machine.ld - machine.lq) * i_q
            dt_diq = machine.flux_linkage + (machine.ld - machine.lq) * i_d
            return [torque_of(y), (i_d * dt_diq - i_q * dt_did) / (scale * machine.flux_linkage)]
        x = optimize.fsolve(stationary, x, xtol=1e-14)
    return float(x[0] * scale), float(x[1] * scale)


def _scipy_max_torque_on_voltage(machine: DqMachine, speed: float, line_voltage: float) -> float:
    omega_e = machine.pole_pairs * speed
    u_max = line_voltage / SQRT_3_2

    def negative_torque(angle: float) -> float:
        u_d, u_q = -u_max * math.sin(angle), u_max * math.cos(angle)
        a = np.array([[machine.resistance, -omega_e * machine.lq],
                      [omega_e * machine.ld, machine.resistance]])
        i_d, i_q = np.linalg.solve(a, [u_d, u_q - omega_e * machine.flux_linkage])
        return -electromagnetic_torque(machine, i_d, i_q)

    grid = np.linspace(0.01, math.pi - 0.01, 200)
    start = grid[int(np.argmin([negative_torque(a) for a in grid]))]
    result = optimize.minimize_scalar(negative_torque, bounds=(start - 0.02, start + 0.02),
                                      method="bounded", options={"xatol": 1e-12})
    return -float(result.fun)


machines = st.builds(
    lambda p, psi, xd, saliency, r_pu, speed, current, v_pu: (
        DqMachine(psi, xd * psi / current, saliency * xd * psi / current,
                  r_pu * psi * p * speed / current, p),
        speed, current, v_pu),
    st.integers(1, 8),
    st.floats(0.02, 1.0),
    st.floats(0.05, 1.5),  # L_d I / psi
    st.floats(0.7, 4.0),  # L_q / L_d
    st.floats(0.0, 0.08),  # R I / (omega_e psi)
    st.floats(30.0, 1000.0),  # mechanical speed, rad/s
    st.floats(1.0, 500.0),  # MTPA current amplitude, A peak
    st.floats(0.55, 1.4),  # voltage limit / MTPA voltage
)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(machines)
def test_operating_point_agrees_with_scipy_slsqp_to_1e6(case: tuple) -> None:
    machine, speed, current, v_pu = case
    i_d0, i_q0 = mtpa_currents_at_current(machine, current)
    torque = electromagnetic_torque(machine, i_d0, i_q0)
    mtpa = operating_point(machine, torque, speed)
    limit = mtpa.line_voltage_rms * v_pu
    ours = operating_point(machine, torque, speed, limit)
    if not ours.feasible:
        # nothing on the voltage limit makes this torque: scipy's best is below it
        assert _scipy_max_torque_on_voltage(machine, speed, limit) < torque * (1 + 1e-6)
        return
    reference = _scipy_operating_point(machine, torque, speed, limit)
    assert reference is not None
    scale = math.hypot(*reference)
    assert math.hypot(ours.id - reference[0], ours.iq - reference[1]) <= 1e-6 * scale
    assert ours.torque == pytest.approx(torque, rel=1e-9)
    assert ours.line_voltage_rms <= limit * (1 + 1e-9)


@pytest.mark.filterwarnings("ignore::RuntimeWarning")
@settings(max_examples=40, deadline=None)
@given(machines)
def test_mtpa_for_torque_agrees_with_scipy_minimize_scalar(case: tuple) -> None:
    machine, _, current, _ = case
    i_d0, i_q0 = mtpa_currents_at_current(machine, current)
    torque = electromagnetic_torque(machine, i_d0, i_q0)
    i_d, i_q = mtpa_currents_for_torque(machine, torque)
    # independent: over the current angle, the amplitude that makes the torque (quadratic)
    def amplitude(angle: float) -> float:
        s, c = math.sin(angle), math.cos(angle)
        a = 1.5 * machine.pole_pairs * (machine.ld - machine.lq) * s * c
        b = 1.5 * machine.pole_pairs * machine.flux_linkage * c
        disc = b * b + 4 * a * torque
        if disc < 0 or b + math.sqrt(disc) <= 0:
            return math.inf
        return 2 * torque / (b + math.sqrt(disc))  # root of a I^2 + b I = T, cancellation-free
    result = optimize.minimize_scalar(amplitude, bounds=(-1.5, 1.5), method="bounded",
                                      options={"xatol": 1e-12})
    assert math.hypot(i_d, i_q) == pytest.approx(result.fun, rel=1e-6)
    assert math.hypot(i_d, i_q) == pytest.approx(current, rel=1e-9)


@settings(max_examples=40, deadline=None)
@given(machines)
def test_pull_out_agrees_with_scipy_bounded_maximum(case: tuple) -> None:
    machine, speed, _, _ = case
    voltage = 1.1 * ke_from_flux_linkage(machine.flux_linkage, machine.pole_pairs) * speed
    ours, _ = pull_out(machine, voltage, speed)
    assert ours == pytest.approx(_scipy_max_torque_on_voltage(machine, speed, voltage),
                                 rel=1e-6)
    angle = open_loop_load_angle(machine, voltage, speed, 0.5 * ours)
    assert angle is not None
    u = voltage / SQRT_3_2
    omega_e = machine.pole_pairs * speed
    a = np.array([[machine.resistance, -omega_e * machine.lq],
                  [omega_e * machine.ld, machine.resistance]])
    i_d, i_q = np.linalg.solve(a, [-u * math.sin(angle),
                                   u * math.cos(angle) - omega_e * machine.flux_linkage])
    assert electromagnetic_torque(machine, i_d, i_q) == pytest.approx(0.5 * ours, rel=1e-6)


@settings(max_examples=40, deadline=None)
@given(machines, st.floats(0.2, 0.95))
def test_max_speed_at_current_agrees_with_scipy_brentq(case: tuple, share: float) -> None:
    machine, _, _, _ = case
    current_rms = share * characteristic_current(machine) / SQRT2
    voltage = 400.0
    ours = max_speed_at_current(machine, current_rms, voltage)

    def excess(speed: float) -> float:
        u_d, u_q = stator_voltage(machine, -current_rms * SQRT2, 0.0,
                                  machine.pole_pairs * speed)
        return math.hypot(u_d, u_q) * SQRT_3_2 - voltage

    if excess(0.0) >= 0:
        assert ours == 0.0
        return
    reference = optimize.brentq(excess, 0.0, 10 * ours + 1.0, xtol=1e-14, rtol=1e-14)
    assert ours == pytest.approx(reference, rel=1e-9)


def test_max_torque_at_speed_agrees_with_scipy_slsqp() -> None:
    limit_i, limit_u = 70.0, 330.0
    for speed_rpm in (1000, 3000, 4500, 6000, 9000):
        speed = speed_rpm * RPM
        ours, _, _, region = max_torque_at_speed(REF4, limit_i, limit_u, speed)
        best = _scipy_max_torque(REF4, limit_i * SQRT2, limit_u / SQRT_3_2,
                                 REF4.pole_pairs * speed)
        assert ours == pytest.approx(best, rel=1e-6), (speed_rpm, region)


def _scipy_max_torque(machine: DqMachine, i_max: float, u_max: float, omega_e: float) -> float:
    def voltage_room(x: np.ndarray) -> float:
        u_d, u_q = stator_voltage(machine, x[0] * i_max, x[1] * i_max, omega_e)
        return 1 - (u_d * u_d + u_q * u_q) / u_max ** 2

    best = -math.inf
    for start in ([-0.1, 0.9], [-0.7, 0.3], [-0.9, 0.1]):
        result = optimize.minimize(
            lambda x: -electromagnetic_torque(machine, x[0] * i_max, x[1] * i_max) / 100,
            np.array(start), method="SLSQP", options={"ftol": 1e-15, "maxiter": 500},
            constraints=[{"type": "ineq", "fun": lambda x: 1 - x[0] ** 2 - x[1] ** 2},
                         {"type": "ineq", "fun": voltage_room}])
        if result.status in (0, 8) and voltage_room(result.x) > -1e-9:
            best = max(best, -result.fun * 100)
    return best


def test_base_speed_puts_mtpa_point_on_the_voltage_limit() -> None:
    speed = base_speed(REF4, 70.0, 330.0)
    i_d, i_q = mtpa_currents_at_current(REF4, 70.0 * SQRT2)
    u_d, u_q = stator_voltage(REF4, i_d, i_q, REF4.pole_pairs * speed)
    assert math.hypot(u_d, u_q) * SQRT_3_2 == pytest.approx(330.0, rel=1e-12)


def test_envelope_is_plain_json_and_follows_both_limits() -> None:
    envelope = torque_speed_envelope(REF4, 70.0, 330.0, 8000 * RPM, n_points=40)
    text = json.dumps(envelope, allow_nan=False)
    assert json.loads(text)["speed_rpm"][0] == 0.0
    torque = envelope["torque_Nm"]
    assert len(torque) == len(envelope["speed_rpm"]) == len(envelope["power_kW"]) == 41
    i_d, i_q = mtpa_currents_at_current(REF4, 70.0 * SQRT2)
    assert torque[0] == pytest.approx(electromagnetic_torque(REF4, i_d, i_q), rel=1e-12)
    assert all(b <= a * (1 + 1e-9) for a, b in itertools.pairwise(torque))
    assert all(c <= 70.0 * (1 + 1e-9) for c in envelope["current_A"])
    assert 0 < envelope["base_speed_rpm"] < 8000
    assert envelope["base_speed_rpm"] in envelope["speed_rpm"]


def test_characteristic_current_design_holds_power_at_high_speed_derived() -> None:
    """SPM, R = 0, psi/L = I_max: P(omega -> inf) -> 3/2 U I (peak phase), derived here from
    the dq equations (the constant-power property of Soong & Miller 1994, from memory)."""
    machine = DqMachine(0.1, 1e-3, 1e-3, 0.0, 4)
    current_rms = characteristic_current(machine) / SQRT2
    voltage = 400.0
    torque, _, _, _ = max_torque_at_speed(machine, current_rms, voltage, 200000 * RPM)
    power = torque * 200000 * RPM
    assert power == pytest.approx(1.5 * voltage / SQRT_3_2 * current_rms * SQRT2, rel=1e-3)
    assert math.isinf(max_speed_at_current(machine, current_rms * 1.01, voltage))
