"""Steady-state dq model of a three-phase sinusoidal permanent-magnet synchronous machine.

Amplitude-invariant Park transform: currents and voltages are **peak phase** values of the
equivalent star circuit; ``p`` pole pairs; ``omega_e = p * omega_mech``.

.. math::

    u_d = R\\,i_d - \\omega_e L_q i_q, \\qquad
    u_q = R\\,i_q + \\omega_e (L_d i_d + \\psi), \\qquad
    T = \\tfrac{3}{2}\\,p\\,\\bigl(\\psi i_q + (L_d - L_q)\\,i_d i_q\\bigr)

Line-to-line rms = peak phase x sqrt(3/2). Back-EMF constant (line rms per mechanical rad/s)
``Ke = sqrt(3/2) * p * psi``.

Everything here is a pure function of SI floats: closed forms and a few safeguarded Newton
steps, no scipy (scipy is the independent solver of the tests only).

References
----------
.. [1] R. Krishnan, *Permanent Magnet Synchronous and Brushless DC Motor Drives*, CRC Press,
   2010 (dq model, MTPA, flux weakening; chapter and page from memory).
.. [2] W. L. Soong, T. J. E. Miller, "Field-weakening performance of brushless synchronous AC
   motor drives", IEE Proc. Electr. Power Appl. 141(6), 1994 (characteristic current; from
   memory).
.. [3] Power-electronics texts for the converter voltages: six-pulse diode bridge
   ``U_dc = 3 sqrt(2)/pi * U_LL``; space-vector modulation ``U_LL,rms <= U_dc/sqrt(2)``
   (REFERENCES.md section 8).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import Any, NamedTuple

SQRT2 = math.sqrt(2.0)
SQRT3 = math.sqrt(3.0)
SQRT_3_2 = math.sqrt(1.5)
RPM = 2.0 * math.pi / 60.0  # rad/s per r/min

#: mean DC voltage of a six-pulse diode bridge per volt of line rms mains, 3*sqrt(2)/pi
DIODE_BRIDGE_DC_RATIO = 3.0 * SQRT2 / math.pi

_REL_TOL = 1e-13
_MAX_ITER = 100


def _clip(value: float, low: float, high: float) -> float:
    """``max(low, min(high, value))`` to the bit, NaN giving ``high`` as there, in a quarter
    of the time of the two builtins (which the solvers' inner loops call)."""
    value = value if value < high else high
    return value if value > low else low


class DqMachine(NamedTuple):
    """Parameters of the linear dq model (immutable; a named tuple, which is built several
    times faster than a frozen dataclass).

    Attributes
    ----------
    flux_linkage : float
        PM flux linkage psi, peak per phase. [Wb]
    ld, lq : float
        d- and q-axis inductance per phase of the equivalent star. [H]
    resistance : float
        Phase resistance of the equivalent star (hot). [ohm]
    pole_pairs : float
        Pole pairs p. [-]
    """

    flux_linkage: float
    ld: float
    lq: float
    resistance: float
    pole_pairs: float

    def valid(self) -> bool:
        """True when every parameter is finite and in range (psi, L, p > 0, R >= 0)."""
        isfinite = math.isfinite
        psi, ld, lq, r, p = (self.flux_linkage, self.ld, self.lq, self.resistance,
                             self.pole_pairs)
        return (isfinite(psi) and isfinite(ld) and isfinite(lq) and isfinite(r)
                and isfinite(p) and psi > 0.0 and ld > 0.0 and lq > 0.0 and r >= 0.0
                and p > 0.0)


class OperatingPoint(NamedTuple):
    """A solved steady-state operating point (peak phase dq quantities, SI; immutable).

    ``region`` is ``"mtpa"`` (least current, voltage limit not reached), ``"field-weakening"``
    (on the voltage limit, more negative i_d than MTPA) or ``"unreachable"`` (the torque cannot
    be made at this speed within the voltage limit; the MTPA point is returned).
    ``load_angle`` is the angle from the q-axis (back-EMF) to the voltage vector [rad];
    ``power_factor`` the displacement factor cos(phi) >= 0 when motoring; ``leading`` True
    when the current leads the voltage.
    """

    id: float
    iq: float
    ud: float
    uq: float
    torque: float
    speed: float
    current_rms: float
    line_voltage_rms: float
    power_factor: float
    leading: bool
    load_angle: float
    copper_loss: float
    input_power: float
    region: str

    @property
    def feasible(self) -> bool:
        return self.region != "unreachable"


# --- conversions -----------------------------------------------------------------------------
def flux_linkage_from_ke(ke: float, pole_pairs: float) -> float:
    """psi [Wb peak/phase] from Ke [V line rms per mechanical rad/s]: psi = Ke/(sqrt(3/2) p).

    Worked vector (REFERENCES.md section 4, our own derived consistency vector): p = 4,
    Ke = 51.302 V/krpm = 0.48990 V*s/rad gives psi = 0.100 Wb.
    """
    return ke / (SQRT_3_2 * pole_pairs)


def ke_from_flux_linkage(psi: float, pole_pairs: float) -> float:
    """Ke [V line rms per mechanical rad/s] = sqrt(3/2) * p * psi."""
    return SQRT_3_2 * pole_pairs * psi


def line_rms_from_peak_phase(u_peak_phase: float) -> float:
    """Line-to-line rms voltage of a balanced set from its peak phase value: x sqrt(3/2)."""
    return u_peak_phase * SQRT_3_2


def peak_phase_from_line_rms(u_line_rms: float) -> float:
    """Peak phase voltage from a line-to-line rms voltage: / sqrt(3/2)."""
    return u_line_rms / SQRT_3_2


# --- converter voltage (REFERENCES.md section 8) -------------------------------------------
def diode_bridge_dc_voltage(mains_line_rms: float) -> float:
    """Mean DC-link voltage of a six-pulse diode bridge under load: 3 sqrt(2)/pi * U_LL [V]."""
    return DIODE_BRIDGE_DC_RATIO * mains_line_rms


def svpwm_line_voltage(dc_link: float) -> float:
    """Largest linear fundamental line rms voltage with space-vector modulation: U_dc/sqrt(2)."""
    return dc_link / SQRT2


def peak_line_back_emf(ke: float, speed: float) -> float:
    """Peak line-to-line back-EMF [V] at a mechanical speed [rad/s]: sqrt(2) * Ke * omega."""
    return SQRT2 * ke * speed


def speed_at_back_emf(ke: float, peak_line_voltage: float) -> float:
    """Mechanical speed [rad/s] at which the peak line back-EMF reaches a voltage (DC link).

    Vector (REFERENCES.md section 8, derived): Ke = 51.3 V/krpm on 540.19 V -> 7446 r/min.
    """
    return peak_line_voltage / (SQRT2 * ke)


# --- torque and voltage ----------------------------------------------------------------------
def electromagnetic_torque(machine: DqMachine, i_d: float, i_q: float) -> float:
    """T = 3/2 p (psi i_q + (L_d - L_q) i_d i_q) [N*m], currents in A peak."""
    return 1.5 * machine.pole_pairs * i_q * (machine.flux_linkage
                                              + (machine.ld - machine.lq) * i_d)


def stator_voltage(machine: DqMachine, i_d: float, i_q: float,
                   omega_e: float) -> tuple[float, float]:
    """(u_d, u_q) [V peak phase] at electrical speed omega_e [rad/s], steady state."""
    r = machine.resistance
    return (r * i_d - omega_e * machine.lq * i_q,
            r * i_q + omega_e * (machine.ld * i_d + machine.flux_linkage))


def mtpa_currents_at_current(machine: DqMachine, current_peak: float) -> tuple[float, float]:
    """Maximum-torque-per-ampere (i_d, i_q) for a current amplitude [A peak].

    .. math:: i_d = \\frac{2\\,\\Delta L\\, I^2}{\\psi + \\sqrt{\\psi^2 + 8\\,\\Delta L^2 I^2}},
        \\quad \\Delta L = L_d - L_q, \\quad i_q = \\sqrt{I^2 - i_d^2}

    the rationalised form of i_d = psi/(4(L_q-L_d)) - sqrt(psi^2/(16(L_q-L_d)^2) + I^2/2)
    (REFERENCES.md section 4), which stays exact as L_d -> L_q (SPM: i_d = 0).
    """
    delta_l = machine.ld - machine.lq
    psi = machine.flux_linkage
    i_d = 2.0 * delta_l * current_peak ** 2 / (
        psi + math.sqrt(psi * psi + 8.0 * delta_l * delta_l * current_peak ** 2))
    return i_d, math.sqrt(max(current_peak ** 2 - i_d * i_d, 0.0))


def _mtpa_id_for_iq(psi: float, delta_l: float, i_q: float) -> float:
    """i_d on the MTPA curve psi i_d + dL (i_d^2 - i_q^2) = 0 for a given i_q (rationalised)."""
    return 2.0 * delta_l * i_q * i_q / (psi + math.sqrt(psi * psi + 4.0 * delta_l * delta_l
                                                         * i_q * i_q))


def mtpa_currents_for_torque(machine: DqMachine, torque: float) -> tuple[float, float]:
    """Least-current (i_d, i_q) [A peak] that makes ``torque`` [N*m] (no voltage limit).

    Newton iteration on i_q along the MTPA curve, started above the root (torque is convex in
    i_q there, so the iteration falls monotonically); i_d = 0 exactly when L_d = L_q.
    Negative torque mirrors i_q.
    """
    sign = -1.0 if torque < 0.0 else 1.0
    target = abs(torque) / (1.5 * machine.pole_pairs)  # psi i_q + dL i_d i_q
    if target == 0.0:
        return 0.0, 0.0
    psi = machine.flux_linkage
    delta_l = machine.ld - machine.lq
    if delta_l == 0.0:
        return 0.0, sign * target / psi
    i_q, i_q_reluctance = target / psi, math.sqrt(target / abs(delta_l))
    if i_q_reluctance < i_q:  # the smaller start (min() costs more)
        i_q = i_q_reluctance
    psi2, two_dl, four_dl2 = psi * psi, 2.0 * delta_l, 4.0 * delta_l * delta_l
    for _ in range(_MAX_ITER):
        root = math.sqrt(psi2 + four_dl2 * i_q * i_q)
        two_dl_iq = two_dl * i_q
        i_d = two_dl_iq * i_q / (psi + root)  # _mtpa_id_for_iq
        flux = psi + delta_l * i_d
        f = i_q * flux - target
        slope = flux + delta_l * i_q * (two_dl_iq / root)  # d(i_q flux)/di_q on the curve
        step = f / slope
        i_q_new = i_q - step
        if i_q_new <= 0.0:
            i_q_new = 0.5 * i_q
        if abs(i_q_new - i_q) <= _REL_TOL * i_q:
            i_q = i_q_new
            break
        i_q = i_q_new
    return _mtpa_id_for_iq(psi, delta_l, i_q), sign * i_q


# --- operating point with a voltage limit ----------------------------------------------------
def _torque_curve_voltage(machine: DqMachine, c: float, omega_e: float,
                          i_d: float) -> tuple[float, float]:
    """|u|^2 and d|u|^2/di_d along the constant-torque curve i_q = c/(psi + dL i_d)."""
    delta_l = machine.ld - machine.lq
    s = machine.flux_linkage + delta_l * i_d
    i_q = c / s
    di_q = -delta_l * i_q / s
    r = machine.resistance
    u_d = r * i_d - omega_e * machine.lq * i_q
    u_q = r * i_q + omega_e * (machine.ld * i_d + machine.flux_linkage)
    du_d = r - omega_e * machine.lq * di_q
    du_q = r * di_q + omega_e * machine.ld
    return u_d * u_d + u_q * u_q, 2.0 * (u_d * du_d + u_q * du_q)


def _field_weakening_id(machine: DqMachine, c: float, omega_e: float, u2: float,
                        id_mtpa: float) -> float | None:
    """Largest i_d < id_mtpa on the torque curve with |u|^2 = u2, or None when none exists.

    Walks left from the MTPA point (doubling steps) until the voltage is within the limit or
    has passed its minimum; then a Newton iteration safeguarded by bisection on the bracket.
    Assumes |u|^2 is unimodal along the curve (true for the linear model with psi > 0).
    """
    psi, ld = machine.flux_linkage, machine.ld
    delta_l = ld - machine.lq
    lower = -math.inf if delta_l <= 0.0 else -psi / delta_l  # torque curve needs psi+dL*id > 0
    hi = id_mtpa
    _, dh_hi = _torque_curve_voltage(machine, c, omega_e, hi)
    if dh_hi <= 0.0:
        return None
    step = max(0.5 * psi / ld, abs(id_mtpa), 1e-9)
    lo = None
    for _ in range(200):
        a = hi - step
        if a <= lower:
            a = 0.5 * (hi + lower)
        h_a, dh_a = _torque_curve_voltage(machine, c, omega_e, a)
        if h_a <= u2:
            lo = a
            break
        if dh_a <= 0.0:
            # passed the voltage minimum above the limit: locate it by bisection on the slope
            left, right = a, hi
            for _ in range(200):
                mid = 0.5 * (left + right)
                h_m, dh_m = _torque_curve_voltage(machine, c, omega_e, mid)
                if h_m <= u2:
                    lo = mid
                    break
                if dh_m > 0.0:
                    right = mid
                else:
                    left = mid
                if right - left <= _REL_TOL * (abs(left) + abs(right)):
                    break
            if lo is None:
                return None
            break
        hi = a
        step *= 2.0
    if lo is None:
        return None
    return _bracketed_newton(lambda x: _shifted(machine, c, omega_e, u2, x), lo, hi)


def _shifted(machine: DqMachine, c: float, omega_e: float, u2: float,
             i_d: float) -> tuple[float, float]:
    h, dh = _torque_curve_voltage(machine, c, omega_e, i_d)
    return h - u2, dh


def _bracketed_newton(f: Callable[[float], tuple[float, float]], lo: float, hi: float,
                      start: float | None = None) -> float:
    """Root of an increasing function on [lo, hi] (f(lo) <= 0 <= f(hi)); Newton + bisection."""
    x = hi if start is None or not lo < start < hi else start
    fx, dfx = f(x)
    for _ in range(_MAX_ITER):
        if fx == 0.0:
            return x
        if fx > 0.0:
            hi = x
        else:
            lo = x
        x_new = x - fx / dfx if dfx > 0.0 else 0.5 * (lo + hi)
        if not lo < x_new < hi:
            x_new = 0.5 * (lo + hi)
        if abs(x_new - x) <= _REL_TOL * (abs(x_new) + abs(hi - lo) * 1e-3 + 1e-300):
            return x_new
        x = x_new
        fx, dfx = f(x)
        if hi - lo <= _REL_TOL * (abs(lo) + abs(hi)):
            return x
    return x


def solve_point(machine: DqMachine, i_d: float, i_q: float, speed: float,
                region: str) -> OperatingPoint:
    """All derived quantities of a given current vector at a mechanical speed [rad/s]."""
    omega_e = machine.pole_pairs * speed
    psi, ld, lq, r = machine.flux_linkage, machine.ld, machine.lq, machine.resistance
    u_d = r * i_d - omega_e * lq * i_q  # stator_voltage
    u_q = r * i_q + omega_e * (ld * i_d + psi)
    i_mag = math.hypot(i_d, i_q)
    u_mag = math.hypot(u_d, u_q)
    p_in = 1.5 * (u_d * i_d + u_q * i_q)
    if i_mag > 0.0 and u_mag > 0.0:
        power_factor = abs(p_in) / (1.5 * u_mag * i_mag)
        if power_factor > 1.0:  # rounding; min() would cost more than this whole line
            power_factor = 1.0
        # reactive power q = 3/2 (u_q i_d - u_d i_q): negative -> current leads voltage
        leading = (u_q * i_d - u_d * i_q) < 0.0
    else:
        power_factor, leading = 1.0, False
    torque = 1.5 * machine.pole_pairs * i_q * (psi + (ld - lq) * i_d)  # electromagnetic_torque
    return OperatingPoint(i_d, i_q, u_d, u_q, torque, speed, i_mag / SQRT2, u_mag * SQRT_3_2,
                          power_factor, leading, math.atan2(-u_d, u_q),
                          1.5 * r * i_mag * i_mag, p_in, region)


def operating_point(machine: DqMachine, torque: float, speed: float,
                    line_voltage_limit: float | None = None, *,
                    mtpa: OperatingPoint | None = None) -> OperatingPoint:
    """Least-current operating point for a torque [N*m] at a mechanical speed [rad/s].

    Below base speed the MTPA point (closed form / Newton); when its voltage exceeds
    ``line_voltage_limit`` [V line rms] the point on the voltage limit with the least current
    (field weakening: i_d more negative than MTPA, same torque). ``region`` says which.
    ``mtpa`` is ``operating_point(machine, torque, speed)`` (no limit) when the caller has it
    already; the limit is then applied to it instead of solving it again.
    """
    if mtpa is None:
        i_d, i_q = mtpa_currents_for_torque(machine, torque)
        if line_voltage_limit is None:
            return solve_point(machine, i_d, i_q, speed, "mtpa")
        u_d, u_q = stator_voltage(machine, i_d, i_q, machine.pole_pairs * speed)
    elif line_voltage_limit is None:
        return mtpa
    else:
        i_d, i_q, u_d, u_q = mtpa.id, mtpa.iq, mtpa.ud, mtpa.uq
    u_limit = peak_phase_from_line_rms(line_voltage_limit)
    u2 = u_limit * u_limit
    if u_d * u_d + u_q * u_q <= u2 * (1.0 + 1e-12) or torque == 0.0:
        return mtpa if mtpa is not None else solve_point(machine, i_d, i_q, speed, "mtpa")
    c = torque / (1.5 * machine.pole_pairs)
    i_d_fw = _field_weakening_id(machine, c, machine.pole_pairs * speed, u2, i_d)
    if i_d_fw is None:
        return (mtpa._replace(region="unreachable") if mtpa is not None
                else solve_point(machine, i_d, i_q, speed, "unreachable"))
    i_q_fw = c / (machine.flux_linkage + (machine.ld - machine.lq) * i_d_fw)
    return solve_point(machine, i_d_fw, i_q_fw, speed, "field-weakening")


# --- field weakening, limits -----------------------------------------------------------------
def characteristic_current(machine: DqMachine) -> float:
    """Characteristic (short-circuit) current psi/L_d [A peak] (Soong & Miller 1994)."""
    return machine.flux_linkage / machine.ld


def max_speed_at_current(machine: DqMachine, current_rms: float,
                         line_voltage_limit: float) -> float:
    """Highest mechanical speed [rad/s] reachable with |i| <= current within the voltage limit.

    The no-load point of deepest field weakening, i_d = -I, i_q = 0:

    .. math:: \\omega_e = \\frac{\\sqrt{U^2 - (R I)^2}}{\\psi - L_d I}

    ``math.inf`` when I >= psi/L_d (the drive is not voltage-limited in this model), 0.0 when
    R I alone exceeds the voltage.
    """
    current = current_rms * SQRT2
    u = peak_phase_from_line_rms(line_voltage_limit)
    resistive = machine.resistance * current
    if resistive >= u:
        return 0.0
    net_flux = machine.flux_linkage - machine.ld * current
    if net_flux <= 1e-12 * machine.flux_linkage:
        return math.inf
    return math.sqrt(u * u - resistive * resistive) / net_flux / machine.pole_pairs


def base_speed(machine: DqMachine, current_rms: float, line_voltage_limit: float) -> float:
    """Speed [rad/s] at which the MTPA point of ``current_rms`` reaches the voltage limit.

    |u(omega)|^2 is a quadratic in omega_e for fixed currents; its positive root.
    """
    i_d, i_q = mtpa_currents_at_current(machine, current_rms * SQRT2)
    r = machine.resistance
    u = peak_phase_from_line_rms(line_voltage_limit)
    a_d, b_d = -machine.lq * i_q, r * i_d
    a_q, b_q = machine.ld * i_d + machine.flux_linkage, r * i_q
    a = a_d * a_d + a_q * a_q
    b = 2.0 * (a_d * b_d + a_q * b_q)
    c = b_d * b_d + b_q * b_q - u * u
    if c >= 0.0:
        return 0.0
    omega_e = (-b + math.sqrt(b * b - 4.0 * a * c)) / (2.0 * a)
    return omega_e / machine.pole_pairs


class _LoadAngleTorque:
    """Torque against the angle of a voltage vector of fixed amplitude, at a fixed frequency.

    The voltage vector of amplitude u [V peak] leads the q-axis by the load angle d:
    u_d = -u sin d, u_q = u cos d; the steady-state currents follow from the dq equations,

    .. math:: i_d = \\frac{R u_d' + \\omega_e L_q u_q'}{R^2 + \\omega_e^2 L_d L_q}, \\quad
        i_q = \\frac{R u_q' - \\omega_e L_d u_d'}{R^2 + \\omega_e^2 L_d L_q}, \\quad
        u_d' = u_d, \\ u_q' = u_q - \\omega_e \\psi

    and T = 3/2 p (psi i_q + (L_d - L_q) i_d i_q). The terms that do not depend on the angle
    are worked out once; the derivatives in the angle are exact (d/dd of sin and cos).
    Evaluated term by term as the dq equations read, for the search of the maximum torque
    on the voltage limit (MTPV); :class:`_UfTorque` is the cheaper form for U/f operation.
    """

    __slots__ = ("det", "dl", "k", "neg_u", "psi", "r", "u", "w_psi", "wld", "wlq")

    def __init__(self, machine: DqMachine, u: float, omega_e: float) -> None:
        r = machine.resistance
        self.r = r
        self.det = r * r + omega_e * omega_e * machine.ld * machine.lq
        self.u, self.neg_u = u, -u
        self.w_psi = omega_e * machine.flux_linkage
        self.wlq, self.wld = omega_e * machine.lq, omega_e * machine.ld
        self.k = 1.5 * machine.pole_pairs
        self.psi, self.dl = machine.flux_linkage, machine.ld - machine.lq

    def currents(self, angle: float) -> tuple[float, float]:
        """(i_d, i_q) [A peak] at the load angle."""
        r, det = self.r, self.det
        u_d = self.neg_u * math.sin(angle)
        u_q = self.u * math.cos(angle) - self.w_psi
        return (r * u_d + self.wlq * u_q) / det, (r * u_q - self.wld * u_d) / det

    def torque_at(self, sin_angle: float, cos_angle: float) -> float:
        """T [N*m] at the load angle given by its sine and cosine."""
        r, det = self.r, self.det
        u_d = self.neg_u * sin_angle
        u_q = self.u * cos_angle - self.w_psi
        i_d = (r * u_d + self.wlq * u_q) / det
        i_q = (r * u_q - self.wld * u_d) / det
        return self.k * (self.psi * i_q + self.dl * i_d * i_q)

    def torque(self, angle: float) -> float:
        """T [N*m] at the load angle [rad]."""
        return self.torque_at(math.sin(angle), math.cos(angle))

    def slope_and_curvature(self, angle: float) -> tuple[float, float]:
        """(dT/dd, d2T/dd2) at the load angle: what a search for the maximum wants."""
        r, det, wlq, wld = self.r, self.det, self.wlq, self.wld
        us, uc = self.u * math.sin(angle), self.u * math.cos(angle)
        u_d, u_q = -us, uc - self.w_psi  # first derivatives -uc, -us; second us, -uc
        i_d = (r * u_d + wlq * u_q) / det
        i_q = (r * u_q - wld * u_d) / det
        di_d = (r * -uc + wlq * u_d) / det
        di_q = (r * u_d - wld * -uc) / det
        ddi_d = (r * us + wlq * -uc) / det
        ddi_q = (r * -uc - wld * us) / det
        k, psi, dl = self.k, self.psi, self.dl
        return (k * (psi * di_q + dl * (di_d * i_q + i_d * di_q)),
                k * (psi * ddi_q + dl * (ddi_d * i_q + 2.0 * di_d * di_q + i_d * ddi_q)))


class _UfTorque:
    """Torque against the load angle at fixed voltage and frequency, as a trigonometric sum.

    With u_d = -U sin d and u_q = U cos d the steady-state currents are affine in sin d and
    cos d (D = R^2 + w^2 L_d L_q):

    .. math:: i_d = \\frac{-R U \\sin\\delta + \\omega L_q U \\cos\\delta
        - \\omega^2 L_q \\psi}{D}, \\quad
        i_q = \\frac{\\omega L_d U \\sin\\delta + R U \\cos\\delta - R \\omega \\psi}{D}

    so T = 3/2 p (psi i_q + (L_d - L_q) i_d i_q) is a trigonometric polynomial of order two,

    .. math:: T(\\delta) = T_0 + T_{1s}\\sin\\delta + T_{1c}\\cos\\delta
        + T_{2s}\\sin 2\\delta + T_{2c}\\cos 2\\delta

    whose coefficients are worked out once; T and its derivatives in the angle then cost one
    sine and one cosine each. (With R = 0: T_1s = a, T_2s = b of :func:`pull_out`.)
    """

    __slots__ = ("t0", "t1c", "t1s", "t2c", "t2s")

    def __init__(self, machine: DqMachine, u: float, omega_e: float) -> None:
        r, ld, lq, psi = machine.resistance, machine.ld, machine.lq, machine.flux_linkage
        det = r * r + omega_e * omega_e * ld * lq
        # i_d = a_d sin + b_d cos + c_d, i_q = a_q sin + b_q cos + c_q
        a_d, b_d, c_d = -r * u / det, omega_e * lq * u / det, -omega_e * omega_e * lq * psi / det
        a_q, b_q, c_q = omega_e * ld * u / det, r * u / det, -r * omega_e * psi / det
        k = 1.5 * machine.pole_pairs
        k_dl = k * (ld - lq)
        # i_d i_q with sin^2 = (1 - cos 2d)/2, cos^2 = (1 + cos 2d)/2, sin cos = sin 2d / 2
        self.t0 = k * psi * c_q + k_dl * (0.5 * (a_d * a_q + b_d * b_q) + c_d * c_q)
        self.t1s = k * psi * a_q + k_dl * (a_d * c_q + c_d * a_q)
        self.t1c = k * psi * b_q + k_dl * (b_d * c_q + c_d * b_q)
        self.t2s = 0.5 * k_dl * (a_d * b_q + b_d * a_q)
        self.t2c = 0.5 * k_dl * (b_d * b_q - a_d * a_q)

    def torque(self, angle: float) -> float:
        """T [N*m] at the load angle [rad]."""
        return self.torque_at(math.sin(angle), math.cos(angle))

    def torque_at(self, s: float, c: float) -> float:
        """T [N*m] at the load angle given by its sine ``s`` and cosine ``c``."""
        return (self.t0 + self.t1s * s + self.t1c * c + self.t2s * (2.0 * s * c)
                + self.t2c * ((c - s) * (c + s)))

    def peak_from(self, angle: float) -> tuple[float, float] | None:
        """(angle, T) of the maximum that Newton on dT/d(angle) = 0 reaches from ``angle``;
        None when it leaves a maximum's basin or ends below the torque it started from.

        Steps are clipped to 0.2 rad; converged when a step is below 1e-13 rad. The sine and
        cosine of each angle serve its step and, at the ends, its torque.
        """
        t1s, t1c, t2s, t2c = self.t1s, self.t1c, self.t2s, self.t2c
        sin, cos = math.sin, math.cos
        s, c = sin(angle), cos(angle)
        start_torque = self.torque_at(s, c)
        for _ in range(30):
            s2, c2 = 2.0 * s * c, (c - s) * (c + s)
            curvature = -(t1s * s + t1c * c) - 4.0 * (t2s * s2 + t2c * c2)
            if curvature >= 0.0:
                return None
            slope = t1s * c - t1c * s + 2.0 * (t2s * c2 - t2c * s2)
            step = _clip(slope / curvature, -0.2, 0.2)
            angle -= step
            s, c = sin(angle), cos(angle)
            if abs(step) < 1e-13:
                break
        torque = self.torque_at(s, c)
        return (angle, torque) if torque >= start_torque else None

    def angle_at(self, torque: float, lo: float, hi: float, start: float) -> float:
        """Load angle in [lo, hi] where T = ``torque``, T rising there (T(lo) <= torque).

        Newton from ``start``, kept inside the bracket that each step narrows (bisection when a
        step would leave it); converged when a step is below the relative tolerance.
        """
        t0, t1s, t1c, t2s, t2c = self.t0, self.t1s, self.t1c, self.t2s, self.t2c
        x = start if lo < start < hi else hi
        for _ in range(_MAX_ITER):
            s, c = math.sin(x), math.cos(x)
            s2, c2 = 2.0 * s * c, (c - s) * (c + s)
            excess = t0 + t1s * s + t1c * c + t2s * s2 + t2c * c2 - torque
            if excess == 0.0:
                return x
            if excess > 0.0:
                hi = x
            else:
                lo = x
            slope = t1s * c - t1c * s + 2.0 * (t2s * c2 - t2c * s2)
            if slope > 0.0:
                step = excess / slope
                if abs(step) <= _REL_TOL * (abs(x) + abs(hi - lo) * 1e-3 + 1e-300):
                    return x - step
                if lo < x - step < hi:
                    x -= step
                    continue
            x = 0.5 * (lo + hi)
            if hi - lo <= _REL_TOL * (abs(lo) + abs(hi)):
                return x
        return x


def pull_out(machine: DqMachine, line_voltage: float, speed: float) -> tuple[float, float]:
    """Pull-out torque [N*m] and its load angle [rad] at fixed voltage and frequency (U/f).

    With R = 0 the torque is T = a sin d + b sin 2d, a = 3/2 p psi U/(w L_d),
    b = 3/4 p U^2/w^2 (1/L_q - 1/L_d); its maximum is at cos d = 4b/(a + sqrt(a^2 + 32 b^2)).
    That is the start of a Newton iteration on dT/dd = 0 with R included; should it leave the
    maximum's basin, a scan of the full circle finds the maximum instead.
    """
    u = peak_phase_from_line_rms(line_voltage)
    omega_e = machine.pole_pairs * speed
    return _pull_out(machine, u, omega_e, _UfTorque(machine, u, omega_e))


def _pull_out(machine: DqMachine, u: float, omega_e: float,
              curve: _UfTorque) -> tuple[float, float]:
    k = 1.5 * machine.pole_pairs
    a = k * machine.flux_linkage * u / (omega_e * machine.ld)
    b = 0.5 * k * u * u / (omega_e * omega_e) * (1.0 / machine.lq - 1.0 / machine.ld)
    start = math.acos(_clip(4.0 * b / (a + math.sqrt(a * a + 32.0 * b * b)), -1.0, 1.0))
    peak = curve.peak_from(start)
    if peak is not None:
        angle, torque = peak
        return torque, angle
    return _scan_maximum(_LoadAngleTorque(machine, u, omega_e))


def _newton_maximum(curve: _LoadAngleTorque, angle: float) -> float | None:
    """Newton on dT/d(angle) = 0 from ``angle``; None when it leaves a maximum's basin."""
    slope_and_curvature = curve.slope_and_curvature
    for _ in range(30):
        dt, ddt = slope_and_curvature(angle)
        if ddt >= 0.0:
            return None
        step = _clip(dt / ddt, -0.2, 0.2)
        angle -= step
        if abs(step) < 1e-13:
            return angle
    return angle


#: the 48 load angles of the coarse scan for the torque maximum, with their sine and cosine
_SCAN_ANGLES = tuple((angle, math.sin(angle), math.cos(angle))
                     for angle in (-math.pi + 2.0 * math.pi * j / 48.0 for j in range(48)))


def _scan_maximum(curve: _LoadAngleTorque) -> tuple[float, float]:
    """Largest torque over the load angle: a scan of the full circle, then Newton."""
    best_t, best = -math.inf, 0.0
    torque_at = curve.torque_at
    for angle, sin_angle, cos_angle in _SCAN_ANGLES:
        t = torque_at(sin_angle, cos_angle)
        if t > best_t:
            best_t, best = t, angle
    refined = _newton_maximum(curve, best)
    if refined is not None:
        t = curve.torque(refined)
        if t >= best_t:
            return t, refined
    return best_t, best


def open_loop_load_angle(machine: DqMachine, line_voltage: float, speed: float,
                         torque: float,
                         pull_out_point: tuple[float, float] | None = None) -> float | None:
    """Load angle [rad] of the stable U/f point that makes ``torque``; None beyond pull-out.

    ``pull_out_point`` is the result of :func:`pull_out` when the caller has it already.
    """
    u = peak_phase_from_line_rms(line_voltage)
    omega_e = machine.pole_pairs * speed
    curve = _UfTorque(machine, u, omega_e)
    t_max, angle_max = pull_out_point or _pull_out(machine, u, omega_e, curve)
    return _load_angle(curve, torque, t_max, angle_max)


def open_loop_operation(machine: DqMachine, line_voltage: float, speed: float,
                        torque: float) -> tuple[float, float, float | None]:
    """:func:`pull_out` and :func:`open_loop_load_angle` at once, from one torque curve.

    Returns the pull-out torque [N*m], its load angle [rad] and the load angle at ``torque``
    [rad] (None beyond pull-out).
    """
    u = peak_phase_from_line_rms(line_voltage)
    omega_e = machine.pole_pairs * speed
    curve = _UfTorque(machine, u, omega_e)
    t_max, angle_max = _pull_out(machine, u, omega_e, curve)
    return t_max, angle_max, _load_angle(curve, torque, t_max, angle_max)


def _load_angle(curve: _UfTorque, torque: float, t_max: float,
                angle_max: float) -> float | None:
    """Load angle of the stable point at ``torque`` below the pull-out point (t_max, angle_max)."""
    if torque > t_max:
        return None
    # half a turn back from pull-out the machine generates; else take the torque minimum
    lo = angle_max - math.pi
    if curve.torque(lo) > torque:
        lo = min((angle_max - 2.0 * math.pi * j / 48.0 for j in range(1, 48)),
                 key=curve.torque)
        if curve.torque(lo) > torque:
            return None
    # start: the R = 0 SPM answer asin(T/T_max), stretched to the pull-out angle
    guess = math.asin(_clip(torque / t_max, 0.0, 1.0)) * angle_max / (0.5 * math.pi)
    return curve.angle_at(torque, lo, angle_max, guess)


def _max_torque_on_voltage_limit(machine: DqMachine, u: float,
                                 omega_e: float) -> tuple[float, float, float]:
    """Maximum torque on the voltage limit (MTPV point): (torque, i_d, i_q)."""
    curve = _LoadAngleTorque(machine, u, max(omega_e, 1e-12))
    t, angle = _scan_maximum(curve)
    i_d, i_q = curve.currents(angle)
    return t, i_d, i_q


def max_torque_at_speed(machine: DqMachine, current_rms: float, line_voltage_limit: float,
                        speed: float) -> tuple[float, float, float, str]:
    """Largest torque [N*m] with |i| <= current and |u| <= voltage at a speed [rad/s].

    Returns (torque, i_d, i_q, region) with region ``"mtpa"`` (current limit only),
    ``"field-weakening"`` (both limits), ``"mtpv"`` (voltage limit only) or
    ``"unreachable"`` (no motoring point).
    """
    current = current_rms * SQRT2
    u = peak_phase_from_line_rms(line_voltage_limit)
    omega_e = machine.pole_pairs * speed
    i_d, i_q = mtpa_currents_at_current(machine, current)
    u_d, u_q = stator_voltage(machine, i_d, i_q, omega_e)
    if u_d * u_d + u_q * u_q <= u * u:
        return electromagnetic_torque(machine, i_d, i_q), i_d, i_q, "mtpa"
    t_v, id_v, iq_v = _max_torque_on_voltage_limit(machine, u, omega_e)
    if math.hypot(id_v, iq_v) <= current and t_v > 0.0:
        return t_v, id_v, iq_v, "mtpv"
    # intersection of current circle and voltage limit: gamma from the MTPA angle to pi/2
    gamma_mtpa = math.atan2(-i_d, i_q)

    def excess(gamma: float) -> tuple[float, float]:
        jd, jq = -current * math.sin(gamma), current * math.cos(gamma)
        vd, vq = stator_voltage(machine, jd, jq, omega_e)
        dvd = machine.resistance * (-current * math.cos(gamma)) - omega_e * machine.lq * (
            -current * math.sin(gamma))
        dvq = machine.resistance * (-current * math.sin(gamma)) + omega_e * machine.ld * (
            -current * math.cos(gamma))
        # decreasing in gamma on the arc; return the negative so it increases
        return -(vd * vd + vq * vq - u * u), -2.0 * (vd * dvd + vq * dvq)

    if excess(0.5 * math.pi)[0] < 0.0:
        return 0.0, 0.0, 0.0, "unreachable"
    gamma = _bracketed_newton(excess, gamma_mtpa, 0.5 * math.pi)
    jd, jq = -current * math.sin(gamma), current * math.cos(gamma)
    t = electromagnetic_torque(machine, jd, jq)
    if t <= 0.0:
        return 0.0, 0.0, 0.0, "unreachable"
    return t, jd, jq, "field-weakening"


def torque_speed_envelope(params: DqMachine, current_limit_rms: float,
                          line_voltage_limit_rms: float, max_speed: float,
                          n_points: int = 60) -> dict[str, Any]:
    """Torque-speed envelope (current and voltage limit) as plain JSON-serialisable lists.

    Parameters
    ----------
    params : DqMachine
        The machine. [SI]
    current_limit_rms : float
        Converter/machine current limit. [A rms]
    line_voltage_limit_rms : float
        Largest line voltage the converter gives. [V rms]
    max_speed : float
        Upper end of the speed axis. [rad/s]
    n_points : int
        Number of speeds, evenly spaced from 0 to ``max_speed`` (the base speed is added).

    Returns
    -------
    dict
        ``speed_rpm``, ``torque_Nm``, ``power_kW``, ``current_A`` (rms), ``region`` (lists of
        equal length), ``base_speed_rpm``, ``max_speed_rpm``, ``characteristic_current_A``
        (rms), ``current_limit_A``, ``voltage_limit_V``, ``speed_limit_rpm`` (highest speed
        reachable at the current limit; None when unlimited).
    """
    n_points = max(2, int(n_points))
    speeds = [max_speed * j / (n_points - 1) for j in range(n_points)]
    omega_base = base_speed(params, current_limit_rms, line_voltage_limit_rms)
    if 0.0 < omega_base < max_speed:
        speeds.append(omega_base)
        speeds.sort()
    out: dict[str, Any] = {"speed_rpm": [], "torque_Nm": [], "power_kW": [], "current_A": [],
                           "region": []}
    for speed in speeds:
        t, i_d, i_q, region = max_torque_at_speed(params, current_limit_rms,
                                                  line_voltage_limit_rms, speed)
        out["speed_rpm"].append(speed / RPM)
        out["torque_Nm"].append(t)
        out["power_kW"].append(t * speed / 1e3)
        out["current_A"].append(math.hypot(i_d, i_q) / SQRT2)
        out["region"].append(region)
    limit = max_speed_at_current(params, current_limit_rms, line_voltage_limit_rms)
    out["base_speed_rpm"] = omega_base / RPM
    out["max_speed_rpm"] = max_speed / RPM
    out["characteristic_current_A"] = characteristic_current(params) / SQRT2
    out["current_limit_A"] = current_limit_rms
    out["voltage_limit_V"] = line_voltage_limit_rms
    out["speed_limit_rpm"] = None if math.isinf(limit) else limit / RPM
    return out
