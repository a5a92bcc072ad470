"""Realistic-catalogue generator: consistent PM machine sheets, and sheets with one planted slip.

Written apart from sheetlint's engine, from textbook physics and from the way catalogues
print their data; it imports nothing from ``sheetlint``. Each sheet is a record in the data
contract of DESIGN.md (a dict ready for YAML or JSON).

The physics, all three-phase, sinusoidal, amplitude-invariant dq quantities (peak phase):

- steady-state voltages  u_d = R·i_d − ω_e·L_q·i_q,  u_q = R·i_q + ω_e·(L_d·i_d + ψ)
- torque                 T = 1.5·p·(ψ·i_q + (L_d − L_q)·i_d·i_q)
- MTPA at current amplitude I (L_q > L_d):
  i_d = ψ/(4(L_q − L_d)) − √(ψ²/(16(L_q − L_d)²) + I²/2),  i_q = √(I² − i_d²);  SPM: i_d = 0
  (R. Krishnan, *Permanent Magnet Synchronous and Brushless DC Motor Drives*, CRC Press 2010,
  the dq model and MTPA chapters.)
- line-rms back-EMF constant Ke = √(3/2)·p·ψ [V·s/rad]; Kt = √3·Ke [N·m/A rms] (power balance)
- winding resistance R₂/R₁ = (235 + θ₂)/(235 + θ₁) for copper (IEC 60034-1, from memory)
- magnet flux scales with remanence, linear in temperature with the reversible coefficient
  of the material (magnet makers' technical notes, as quoted: sintered NdFeB −0.09…−0.12 %/K,
  SmCo −0.03…−0.05 %/K, hard ferrite ≈ −0.2 %/K).

Losses: copper 3·I²·R at the winding temperature of the rated point; iron, friction and
stray losses as powers at the rated speed, drawn as shares of a total loss budget that falls
with size (common practice). The electromagnetic torque is the shaft torque plus the loss
torque (iron + friction + stray)/ω, so that the electrical input √3·U·I·cos φ equals shaft
power plus every loss exactly.

Declared η and cos φ obey the sense of IEC 60034-1's tolerances: a test result may fall short
of the declared value by the tolerance, so the declared value is the model value plus a
fraction (0–30 %) of the tolerance, never below it.

Conventions (each a name the benchmark reports separately) and slips: see CONVENTIONS and
SLIPS below. Every maker and model designation is invented.

Run: ``python tools/realistic_catalogue.py --convention servo --count 3`` prints YAML.
"""

from __future__ import annotations

import argparse
import copy
import math
import random
import re
import sys
from collections.abc import Callable
from contextvars import ContextVar
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from scipy.optimize import brentq

SQRT2 = math.sqrt(2.0)
SQRT3 = math.sqrt(3.0)
#: W per mechanical horsepower (550 ft·lbf/s), NIST SP 811 (2008), Appendix B
WATT_PER_HP = 745.6999
#: copper's temperature constant of resistance, IEC 60034-1 (from memory: the 235 rule)
COPPER_TEMPERATURE_CONSTANT = 235.0
#: reversible remanence temperature coefficients [1/K], ranges from magnet makers' technical
#: notes (as quoted); a machine draws its own value inside the range
REMANENCE_COEFFICIENT_RANGE = {
    "NdFeB": (-0.0012, -0.0009),
    "SmCo": (-0.0005, -0.0003),
    "ferrite": (-0.0020, -0.0019),
}
#: winding temperature-rise limits [K] of IEC 60034-1 for indirectly cooled windings,
#: resistance method, 40 °C coolant (as quoted): class 130 (B), 155 (F), 180 (H)
RISE_LIMIT = {130: 80.0, 155: 105.0, 180: 125.0}
#: reference temperatures [°C] of IEC 60034-2-1 by the class whose rise applies (from memory)
REFERENCE_TEMPERATURE = {130: 95.0, 155: 115.0, 180: 135.0}
#: IEC 60034-1 declared-efficiency tolerance: −15 % of (1 − η) up to 150 kW, −10 % above
#: (as quoted; current edition split at 150 kW)
EFFICIENCY_TOLERANCE_SPLIT_W = 150e3

STANDARD_RATINGS_KW = (0.75, 1.1, 1.5, 2.2, 3, 4, 5.5, 7.5, 11, 15, 18.5, 22, 30, 37, 45, 55,
                       75, 90, 110, 132, 160, 200, 250, 315, 355, 400, 450, 500)
SERVO_RATINGS_KW = (0.2, 0.4, 0.6, 0.75, 1.0, 1.2, 1.5, 2.0, 2.6, 3.1, 4.0, 5.0, 6.3, 7.5, 9.4,
                    11, 15)
INDUSTRIAL_SPEEDS = (600, 750, 1000, 1200, 1500, 1500, 1800, 2000, 2200, 3000, 3000, 3600)
SERVO_SPEEDS = (2000, 3000, 3000, 4500, 6000)

MAKERS = ("Quillmarsh Motorworks (invented)", "Brackwater Drives (invented)",
          "Tessaly Servo Systems (invented)", "Orrinvale Electric (invented)",
          "Harrowgate Traction (invented)")


# --------------------------------------------------------------------------------------------
# dq physics
# --------------------------------------------------------------------------------------------

def mtpa_currents(current_peak: float, psi: float, ld: float, lq: float) -> tuple[float, float]:
    """d and q current [A peak] of maximum torque per ampere at amplitude ``current_peak``.

    .. math:: i_d = \\frac{\\psi}{4(L_q-L_d)} - \\sqrt{\\frac{\\psi^2}{16(L_q-L_d)^2}
              + \\frac{I^2}{2}},\\quad i_q = \\sqrt{I^2 - i_d^2}

    Surface magnets (L_q = L_d): i_d = 0. Krishnan (2010), MTPA of the IPM machine.
    """
    saliency = lq - ld
    if abs(saliency) < 1e-12 * max(lq, ld, 1e-30):
        return 0.0, current_peak
    a = psi / (4.0 * saliency)
    i_d = a - math.sqrt(a * a + current_peak * current_peak / 2.0)
    i_q = math.sqrt(max(current_peak * current_peak - i_d * i_d, 0.0))
    return i_d, i_q


def dq_torque(pole_pairs: int, psi: float, ld: float, lq: float, i_d: float, i_q: float) -> float:
    """Electromagnetic torque [N·m]: T = 1.5·p·(ψ·i_q + (L_d − L_q)·i_d·i_q)."""
    return 1.5 * pole_pairs * (psi * i_q + (ld - lq) * i_d * i_q)


def dq_voltages(resistance: float, omega_e: float, psi: float, ld: float, lq: float,
                i_d: float, i_q: float) -> tuple[float, float]:
    r"""Steady-state u_d, u_q [V peak phase].

    .. math:: u_d = R i_d - \omega_e L_q i_q,\quad u_q = R i_q + \omega_e (L_d i_d + \psi)
    """
    u_d = resistance * i_d - omega_e * lq * i_q
    u_q = resistance * i_q + omega_e * (ld * i_d + psi)
    return u_d, u_q


def mtpa_current_for_torque(torque: float, pole_pairs: int, psi: float, ld: float,
                            lq: float) -> float:
    """Least current amplitude [A peak] that makes ``torque`` [N·m] on the MTPA locus (brentq)."""
    def excess(current: float) -> float:
        return dq_torque(pole_pairs, psi, ld, lq, *mtpa_currents(current, psi, ld, lq)) - torque

    upper = max(torque / (1.5 * pole_pairs * max(psi, 1e-6)), 1e-3)
    while excess(upper) < 0.0:
        upper *= 2.0
    return brentq(excess, 0.0, upper, xtol=1e-12, rtol=1e-13)


def hot_resistance(r20: float, temperature_c: float) -> float:
    """Copper resistance [Ω] at ``temperature_c``: R·(235 + θ)/(235 + 20) (IEC 60034-1)."""
    k = COPPER_TEMPERATURE_CONSTANT
    return r20 * (k + temperature_c) / (k + 20.0)


def ke_line_rms(pole_pairs: int, psi: float) -> float:
    """Back-EMF constant, line rms per mechanical rad/s: Ke = √(3/2)·p·ψ [V·s/rad]."""
    return math.sqrt(1.5) * pole_pairs * psi


def v_per_krpm(ke_si: float) -> float:
    """V·s/rad → V/krpm (1 krpm = 1000·2π/60 rad/s)."""
    return ke_si * 1000.0 * 2.0 * math.pi / 60.0


@dataclass
class Machine:
    """True parameters of one invented machine, SI, phase of the equivalent star."""

    topology: str
    poles: int
    psi20: float                 # magnet flux linkage at 20 °C [Wb peak per phase]
    ld: float                    # [H]
    lq: float                    # [H]
    r20: float                   # phase resistance at 20 °C [Ω]
    remanence_coefficient: float  # [1/K]
    magnet: str = "NdFeB"
    inertia: float = 0.0         # [kg·m²]

    @property
    def pole_pairs(self) -> int:
        return self.poles // 2

    def psi_at(self, magnet_temperature: float) -> float:
        """ψ(θ) = ψ20·(1 + α·(θ − 20))."""
        return self.psi20 * (1.0 + self.remanence_coefficient * (magnet_temperature - 20.0))


@dataclass
class OperatingPoint:
    """A solved operating point; voltages line rms, currents rms, powers in W."""

    speed_rpm: float
    shaft_torque: float
    electromagnetic_torque: float
    current: float
    voltage: float
    i_d: float                   # [A peak]
    i_q: float                   # [A peak]
    input_power: float
    shaft_power: float
    copper_loss: float
    iron_loss: float
    friction_loss: float
    stray_loss: float
    back_emf: float              # hot, line rms at this speed
    winding_temperature: float
    magnet_temperature: float

    @property
    def losses(self) -> float:
        return self.copper_loss + self.iron_loss + self.friction_loss + self.stray_loss

    @property
    def efficiency(self) -> float:
        return self.shaft_power / (self.shaft_power + self.losses)

    @property
    def power_factor(self) -> float:
        return self.input_power / (SQRT3 * self.voltage * self.current)


def solve_point(machine: Machine, speed_rpm: float, shaft_torque: float, *,
                winding_temperature: float, magnet_temperature: float,
                iron_loss: float = 0.0, friction_loss: float = 0.0,
                stray_loss: float = 0.0) -> OperatingPoint:
    """Operating point on the MTPA locus (below base speed) with losses.

    Electromagnetic torque = shaft torque + (iron + friction + stray)/ω; current from MTPA;
    voltage from the steady-state dq equations with R at the winding temperature; input power
    1.5·(u_d·i_d + u_q·i_q) = T_em·ω + 3·I²·R.
    """
    omega = speed_rpm * 2.0 * math.pi / 60.0
    omega_e = omega * machine.pole_pairs
    psi = machine.psi_at(magnet_temperature)
    resistance = hot_resistance(machine.r20, winding_temperature)
    loss_torque = (iron_loss + friction_loss + stray_loss) / omega if omega > 0 else 0.0
    torque_em = shaft_torque + loss_torque
    amplitude = mtpa_current_for_torque(torque_em, machine.pole_pairs, psi, machine.ld, machine.lq)
    i_d, i_q = mtpa_currents(amplitude, psi, machine.ld, machine.lq)
    u_d, u_q = dq_voltages(resistance, omega_e, psi, machine.ld, machine.lq, i_d, i_q)
    voltage = math.hypot(u_d, u_q) * math.sqrt(1.5)
    current = amplitude / SQRT2
    input_power = 1.5 * (u_d * i_d + u_q * i_q)
    return OperatingPoint(
        speed_rpm=speed_rpm, shaft_torque=shaft_torque, electromagnetic_torque=torque_em,
        current=current, voltage=voltage, i_d=i_d, i_q=i_q, input_power=input_power,
        shaft_power=shaft_torque * omega, copper_loss=3.0 * current * current * resistance,
        iron_loss=iron_loss, friction_loss=friction_loss, stray_loss=stray_loss,
        back_emf=ke_line_rms(machine.pole_pairs, psi) * omega,
        winding_temperature=winding_temperature, magnet_temperature=magnet_temperature)


# --------------------------------------------------------------------------------------------
# printing the way catalogues print
# --------------------------------------------------------------------------------------------

#: set while a sheet is printed whose catalogue keeps trailing zeros ("118.0", not "118")
KEEP_TRAILING_ZEROS: ContextVar[bool] = ContextVar("keep_trailing_zeros", default=False)


def significant(value: float, digits: int) -> str:
    """``value`` rounded to ``digits`` significant digits, in plain decimal notation.

    A whole number of 10 or more is printed without a decimal point ("20", "100", "1420"), as
    catalogues print round numbers, unless ``KEEP_TRAILING_ZEROS`` is set ("118.0"); otherwise
    every kept digit is printed ("1.00", "0.9570").
    """
    if value == 0.0:
        return "0"
    exponent = math.floor(math.log10(abs(value)))
    decimals = digits - 1 - exponent
    rounded = round(value, decimals)
    # rounding can carry into a new digit (9.996 → 10.00)
    if rounded != 0.0 and math.floor(math.log10(abs(rounded))) > exponent:
        decimals -= 1
        rounded = round(value, decimals)
    whole = float(rounded).is_integer() and abs(rounded) >= 10
    if decimals <= 0 or (whole and not KEEP_TRAILING_ZEROS.get()):
        return str(round(float(rounded)))
    return f"{rounded:.{decimals}f}"


def number(value: float, digits: int) -> int | float:
    """``value`` at ``digits`` significant digits as a YAML/JSON number: an int for a whole
    number of 10 or more ("118"), else a float (a float keeps no trailing zero of its
    decimals: "5.630" is written 5.63, one digit less, never more)."""
    text = significant(value, digits)
    return float(text) if "." in text else int(text)


def rating_text(value: float) -> str:
    """A standard rating exactly as written in a rating list (5.5, 0.75, 110)."""
    return f"{value:g}"


def efficiency_tolerance(efficiency: float, power: float) -> float:
    """IEC 60034-1 tolerance on a declared efficiency (absolute, as a fraction)."""
    share = 0.15 if power <= EFFICIENCY_TOLERANCE_SPLIT_W else 0.10
    return share * (1.0 - efficiency)


def power_factor_tolerance(power_factor: float) -> float:
    """IEC 60034-1 tolerance on a declared power factor: (1 − cos φ)/6 within 0.02…0.07."""
    return min(max((1.0 - power_factor) / 6.0, 0.02), 0.07)


# --------------------------------------------------------------------------------------------
# sheets
# --------------------------------------------------------------------------------------------

@dataclass
class Sheet:
    """One generated record with what the generator knows about it."""

    record: dict[str, Any]
    convention: str
    machine: Machine
    rated: OperatingPoint
    slip: str | None = None
    corrupted_fields: tuple[str, ...] = ()
    keyword: str | None = None   # regex a diagnosis should match (None: not a known slip)
    truth: dict[str, Any] = field(default_factory=dict)
    #: the record as it was before a slip was planted (set by ``planted``)
    consistent_record: dict[str, Any] | None = None


class Rejected(Exception):
    """The drawn machine is not a sensible catalogue machine; draw again."""


def _loss_fraction(power: float, rng: random.Random) -> float:
    """Total losses as a fraction of input, falling with size (common practice):
    about 0.10·(P/1 kW)^−0.25, ±15 %."""
    return min(0.10 * (power / 1000.0) ** -0.25 * rng.uniform(0.85, 1.15), 0.25)


def _design(rng: random.Random, *, topology: str, power: float, speed: float, poles: int,
            rated_voltage: float, winding_temperature: float, magnet_temperature: float,
            magnet: str, copper_share: tuple[float, float]) -> tuple[Machine, OperatingPoint]:
    """Draw inductances, resistance and losses; solve ψ so that the MTPA rated point needs
    exactly ``rated_voltage`` (line rms)."""
    omega = speed * 2.0 * math.pi / 60.0
    pole_pairs = poles // 2
    omega_e = omega * pole_pairs
    torque = power / omega
    loss_fraction = _loss_fraction(power, rng)
    total_loss = power * loss_fraction / (1.0 - loss_fraction)
    shares = {"copper": rng.uniform(*copper_share), "iron": rng.uniform(0.2, 0.35),
              "friction": rng.uniform(0.05, 0.15), "stray": rng.uniform(0.0, 0.1)}
    norm = sum(shares.values())
    losses = {k: total_loss * v / norm for k, v in shares.items()}
    cos_guess = {"spm": 0.95, "ipm": 0.88, "pmasynrm": 0.8}[topology]
    current_guess = (power + total_loss) / (SQRT3 * rated_voltage * cos_guess)
    phase_voltage = rated_voltage / SQRT3
    if topology == "spm":
        x_q, saliency = rng.triangular(0.12, 0.42, 0.25), 1.0
    elif topology == "ipm":
        x_q, saliency = rng.uniform(0.5, 0.95), rng.uniform(1.6, 2.8)
    else:
        x_q, saliency = rng.uniform(0.9, 1.5), rng.uniform(3.0, 5.5)
    lq = x_q * phase_voltage / (current_guess * omega_e)
    ld = lq / saliency
    machine = Machine(topology, poles, 0.0, ld, lq, 0.0,
                      rng.uniform(*REMANENCE_COEFFICIENT_RANGE[magnet]), magnet)
    temperature_factor = 1.0 + machine.remanence_coefficient * (magnet_temperature - 20.0)
    point: OperatingPoint | None = None
    current = current_guess
    for _ in range(4):
        r_hot = losses["copper"] / (3.0 * current * current)
        machine.r20 = r_hot * (COPPER_TEMPERATURE_CONSTANT + 20.0) / (
            COPPER_TEMPERATURE_CONSTANT + winding_temperature)

        def voltage_excess(psi_hot: float) -> float:
            machine.psi20 = psi_hot / temperature_factor
            return solve_point(machine, speed, torque, winding_temperature=winding_temperature,
                               magnet_temperature=magnet_temperature,
                               iron_loss=losses["iron"], friction_loss=losses["friction"],
                               stray_loss=losses["stray"]).voltage - rated_voltage

        # the high-power-factor branch: the largest ψ whose voltage need is the rated voltage
        psi_full = SQRT2 * phase_voltage / omega_e
        hi = 1.3 * psi_full
        if voltage_excess(hi) <= 0.0:
            raise Rejected("voltage never reached")
        lo = hi
        while voltage_excess(lo) > 0.0:
            lo *= 0.9
            if lo < 0.05 * psi_full:
                raise Rejected("no ψ meets the rated voltage")
        psi_hot = brentq(voltage_excess, lo, lo / 0.9, xtol=1e-14, rtol=1e-13)
        machine.psi20 = psi_hot / temperature_factor
        point = solve_point(machine, speed, torque, winding_temperature=winding_temperature,
                            magnet_temperature=magnet_temperature, iron_loss=losses["iron"],
                            friction_loss=losses["friction"], stray_loss=losses["stray"])
        current = point.current
    assert point is not None
    return machine, point


def _inertia(torque: float, servo: bool, rng: random.Random) -> float:
    """Rotor inertia [kg·m²] growing with torque (common practice, rough)."""
    if servo:
        return 1.2e-4 * torque ** 1.3 * rng.uniform(0.6, 1.6)
    return 1.5e-3 * torque ** 1.15 * rng.uniform(0.6, 1.6)


SPEED_UNITS = ("rpm", "rpm", "min-1", "1/min", "r/min")
TORQUE_UNITS = ("N*m", "N*m", "N·m", "Nm")


def _q(value: float, unit: str, digits: int) -> str:
    return f"{significant(value, digits)} {unit}"


def _resistance_text(value: float, digits: int, rng: random.Random) -> tuple[float, str]:
    if value < 1.0 and rng.random() < 0.5:
        return value * 1000.0, "mohm"
    return value, "ohm"


@dataclass
class Style:
    """How one sheet prints: digits and units."""

    digits: int
    speed_unit: str
    torque_unit: str
    efficiency_as_percent: bool
    power_factor_decimals: int


def _style(rng: random.Random, digits: int | None = None) -> Style:
    return Style(digits or rng.choice((3, 4, 4)), rng.choice(SPEED_UNITS), rng.choice(TORQUE_UNITS),
                 rng.random() < 0.75, rng.choice((2, 2, 3)))


def _designation(rng: random.Random, kind: str, power_kw: float, speed: float) -> str:
    letters = "".join(rng.choice("ABCDEFGHKLMNPRSTVWXZ") for _ in range(2))
    serial = rng.randrange(100, 999)
    return f"{letters}{kind}-{rating_text(power_kw)}-{int(speed / 100):02d}-{serial}"


CONVENTIONS = (
    "industrial_magnet_stated",   # Kt = rated T/I hot; rated and EMF magnet temperatures stated
    "industrial_magnet_unstated",  # the same sheets with no magnet temperature anywhere
    "servo",                       # Kt at 20 °C, standstill point, supply class as rated voltage
    "unstated_bases",              # Ke, Kt, R printed with no basis or definition
    "three_digits",                # every derived value at 3 significant digits, round ratings
)


def industrial(rng: random.Random, convention: str, *, topology: str | None = None,
               speed: float | None = None, poles: int | None = None,
               power_kw: float | None = None) -> Sheet:
    """An industrial sheet (0.75–500 kW), Kt printed as rated T/I at the hot rated point."""
    token = KEEP_TRAILING_ZEROS.set(rng.random() < 0.25)
    try:
        return _industrial_drawn(rng, convention, topology, speed, poles, power_kw)
    finally:
        KEEP_TRAILING_ZEROS.reset(token)


def _industrial_drawn(rng: random.Random, convention: str, topology: str | None,
                      speed: float | None, poles: int | None, power_kw: float | None) -> Sheet:
    for _ in range(200):
        try:
            sheet = _industrial_once(rng, convention, topology, speed, poles, power_kw)
            sheet.consistent_record = copy.deepcopy(sheet.record)
            return sheet
        except Rejected:
            continue
    raise RuntimeError("no acceptable machine in 200 draws")


def _industrial_once(rng: random.Random, convention: str, topology: str | None,
                     speed: float | None, poles: int | None, power_kw: float | None) -> Sheet:
    topology = topology or rng.choice(("spm", "spm", "ipm", "ipm", "pmasynrm"))
    power_kw = power_kw or rng.choice(STANDARD_RATINGS_KW)
    speed = speed or rng.choice(INDUSTRIAL_SPEEDS)
    if poles is None:
        poles = rng.choice((4, 6, 8, 8, 10, 12)) if speed <= 3000 else rng.choice((4, 6))
    power = power_kw * 1000.0
    mains = 690.0 if power_kw >= 250 and rng.random() < 0.6 else 400.0
    rated_voltage = mains * rng.choice((0.85, 0.875, 0.9, 0.9, 0.95, 0.95, 1.0))
    thermal_class = rng.choice((155, 155, 180))
    rise_class = rng.choice((130, 130, 155)) if thermal_class == 155 else rng.choice((130, 155))
    rise = RISE_LIMIT[rise_class] * rng.uniform(0.7, 1.0)
    winding_temperature = 40.0 + rise
    magnet_temperature = rng.uniform(max(50.0, winding_temperature - 50.0),
                                     min(winding_temperature - 10.0,
                                         REFERENCE_TEMPERATURE[rise_class]))
    magnet = "ferrite" if topology == "pmasynrm" and rng.random() < 0.4 else "NdFeB"
    machine, point = _design(rng, topology=topology, power=power, speed=speed, poles=poles,
                             rated_voltage=rated_voltage,
                             winding_temperature=winding_temperature,
                             magnet_temperature=magnet_temperature, magnet=magnet,
                             copper_share=(0.35, 0.55))
    if not 0.6 <= point.power_factor <= 0.995:
        raise Rejected("power factor")
    if topology == "spm" and not 0.0 <= rated_voltage / point.back_emf - 1.0 <= 0.35:
        raise Rejected("voltage margin")
    ke20 = ke_line_rms(machine.pole_pairs, machine.psi20)
    # overspeed safety (common practice): cold peak line EMF at the top speed ≥ 4 % under
    # the no-load DC link √2·U_mains
    safe_top = mains / (ke20 * 1.04) * 30.0 / math.pi
    if safe_top < speed:
        raise Rejected("cold back-EMF at rated speed too close to the mains")
    max_speed = min(speed * rng.choice((1.0, 1.1, 1.2, 1.25, 1.5)), safe_top)
    max_speed = math.floor(max_speed / 50.0) * 50.0
    if max_speed < speed:
        max_speed = speed
    machine.inertia = _inertia(point.shaft_torque, False, rng)

    style = _style(rng, 3 if convention == "three_digits" else None)
    d = style.digits
    declared_efficiency = point.efficiency + rng.uniform(0.0, 0.3) * efficiency_tolerance(
        point.efficiency, power)
    declared_pf = min(point.power_factor + rng.uniform(0.0, 0.3) * power_factor_tolerance(
        point.power_factor), 1.0)
    efficiency_text: Any = (f"{significant(declared_efficiency * 100, d)} %"
                            if style.efficiency_as_percent
                            else significant(declared_efficiency, d))
    pf_text = f"{declared_pf:.{style.power_factor_decimals}f}"
    frequency = poles / 2 * speed / 60.0
    record: dict[str, Any] = {
        "id": _designation(rng, {"spm": "PS", "ipm": "PI", "pmasynrm": "PR"}[topology],
                           power_kw, speed),
        "maker": rng.choice(MAKERS),
        "machine": {
            "topology": topology, "poles": poles, "thermal_class": thermal_class,
            "cooling": "IC411", "duty": "S1", "ambient": "40 °C", "magnet": magnet,
            "inertia": _q(machine.inertia, "kg*m^2", d),
        },
        "rated": {
            "power": f"{rating_text(power_kw)} kW",
            "speed": f"{speed:g} {style.speed_unit}",
            "frequency": _q(frequency, "Hz", 4),
            "torque": _q(point.shaft_torque, style.torque_unit, d),
            "voltage": _q(rated_voltage, "V", 3),
            "current": _q(point.current, "A", d),
            "power_factor": pf_text,
            "efficiency": efficiency_text,
        },
        "emf": {"constant": {"value": number(v_per_krpm(ke20), d),
                             "unit": "V/krpm", "basis": "line_rms"}},
        "torque_constant": _q(point.shaft_torque / point.current, "N*m/A", d),
        "circuit": {},
        "limits": {"max_speed": f"{max_speed:g} rpm"},
        "supply": {"mains_voltage": f"{mains:g} V"},
    }
    if rise_class != thermal_class:
        record["machine"]["temperature_rise_class"] = rise_class
    if rng.random() < 0.5:
        record["rated"]["temperature_rise"] = f"{significant(rise, 2)} K"
    if rng.random() < 0.4:
        # catalogues print the losses that go with the declared efficiency
        record["rated"]["losses"] = _q(power / declared_efficiency - power, "W", d)
    r_value, r_unit = _resistance_text(machine.r20, d, rng)
    record["circuit"]["resistance"] = {"value": number(r_value, d), "unit": r_unit,
                                       "basis": "phase", "temperature": "20 °C"}
    record["circuit"]["ld"] = _q(machine.ld * 1000.0, "mH", d)
    record["circuit"]["lq"] = _q(machine.lq * 1000.0, "mH", d)
    if rng.random() < 0.5:
        peak_ratio = rng.uniform(1.5, 2.0)
        record["limits"]["peak_current"] = _q(point.current * peak_ratio, "A", d)
        saturation = rng.uniform(0.85, 0.97)    # common practice: saturation at peak current
        peak_torque = point.shaft_torque * peak_ratio * saturation
        record["limits"]["peak_torque"] = _q(peak_torque, style.torque_unit, d)

    if convention == "industrial_magnet_stated":
        record["rated"]["magnet_temperature"] = f"{magnet_temperature:.0f} °C"
        record["emf"]["magnet_temperature"] = "20 °C"
    elif convention == "unstated_bases":
        record["emf"]["constant"] = f"{significant(v_per_krpm(ke20), d)} V/krpm"
        record["circuit"]["resistance"] = f"{significant(r_value, d)} {r_unit}"
    elif convention == "three_digits":
        if rng.random() < 0.5:
            record["rated"]["magnet_temperature"] = f"{magnet_temperature:.0f} °C"
    truth = {"ke20_v_per_krpm": v_per_krpm(ke20), "mains": mains, "max_speed": max_speed,
             "rated_voltage": rated_voltage, "frequency": frequency,
             "declared_efficiency": declared_efficiency, "declared_power_factor": declared_pf}
    return Sheet(record, convention, machine, point, truth=truth)


def servo(rng: random.Random, convention: str = "servo") -> Sheet:
    """A servo catalogue sheet (0.2–15 kW)."""
    token = KEEP_TRAILING_ZEROS.set(rng.random() < 0.25)
    try:
        return _servo_drawn(rng, convention)
    finally:
        KEEP_TRAILING_ZEROS.reset(token)


def _servo_drawn(rng: random.Random, convention: str) -> Sheet:
    for _ in range(200):
        try:
            sheet = _servo_once(rng, convention)
            sheet.consistent_record = copy.deepcopy(sheet.record)
            return sheet
        except Rejected:
            continue
    raise RuntimeError("no acceptable servo in 200 draws")


def _servo_once(rng: random.Random, convention: str) -> Sheet:
    power_kw = rng.choice(SERVO_RATINGS_KW)
    speed = rng.choice(SERVO_SPEEDS if power_kw <= 5 else (1500, 2000, 3000))
    poles = rng.choice((6, 8, 8, 10))
    power = power_kw * 1000.0
    mains = 230.0 if power_kw < 0.75 and rng.random() < 0.5 else 400.0
    winding_temperature = 40.0 + rng.uniform(90.0, 105.0)     # class F, ΔT 100 K common
    magnet_temperature = rng.uniform(60.0, 100.0)
    omega = speed * math.pi / 30.0
    # back-EMF at rated speed, cold, as a share of the mains voltage
    ke20_target = rng.uniform(0.55, 0.78) * mains / omega
    torque = power / omega
    loss_fraction = _loss_fraction(power, rng) * 1.1
    total_loss = power * loss_fraction / (1.0 - loss_fraction)
    shares = {"copper": rng.uniform(0.6, 0.78), "iron": rng.uniform(0.12, 0.25),
              "friction": rng.uniform(0.04, 0.1), "stray": 0.0}
    norm = sum(shares.values())
    losses = {k: total_loss * v / norm for k, v in shares.items()}
    psi20 = ke20_target / (math.sqrt(1.5) * poles / 2)
    machine = Machine("spm", poles, psi20, 0.0, 0.0, 0.0,
                      rng.uniform(*REMANENCE_COEFFICIENT_RANGE["NdFeB"]))
    current_guess = torque / (SQRT3 * ke20_target * 0.9)
    # reactance drop ω_e·L·I as a share x of the back-EMF ω_e·ψ (peak phase): L = x·ψ/I
    x_pu = rng.uniform(0.08, 0.3)
    inductance = x_pu * psi20 / (current_guess * SQRT2)
    machine.ld = machine.lq = inductance
    r_hot = losses["copper"] / (3.0 * current_guess ** 2)
    machine.r20 = r_hot * (COPPER_TEMPERATURE_CONSTANT + 20.0) / (
        COPPER_TEMPERATURE_CONSTANT + winding_temperature)
    point = solve_point(machine, speed, torque, winding_temperature=winding_temperature,
                        magnet_temperature=magnet_temperature, iron_loss=losses["iron"],
                        friction_loss=losses["friction"])
    kt20 = SQRT3 * ke_line_rms(machine.pole_pairs, machine.psi20)
    ratio = point.shaft_torque / point.current / kt20
    if not 0.88 <= ratio <= 0.94:
        raise Rejected("rated T/I not 6–12 % under Kt")
    linear_limit = 1.35 * mains / SQRT2
    if point.voltage > 0.97 * linear_limit:
        raise Rejected("voltage need above the linear limit")
    ke20 = ke_line_rms(machine.pole_pairs, machine.psi20)
    safe_top = mains / (ke20 * 1.04) * 30.0 / math.pi
    max_speed = math.floor(min(speed * rng.uniform(1.0, 1.6), safe_top) / 100.0) * 100.0
    if max_speed < speed:
        raise Rejected("rated speed above the safe top speed")
    machine.inertia = _inertia(torque, True, rng)
    style = _style(rng)
    d = style.digits
    stall_torque = point.shaft_torque * rng.uniform(1.05, 1.25)
    stall_current = stall_torque / kt20 * rng.uniform(1.0, 1.03)
    peak_current = stall_current * rng.uniform(3.0, 4.0)
    # peak torque: hot magnets, saturation at high current (common practice: 3–15 %), and the
    # loss torque of the rated speed
    kt_hot = kt20 * machine.psi_at(magnet_temperature) / machine.psi20
    loss_torque = point.electromagnetic_torque - point.shaft_torque
    peak_torque = peak_current * kt_hot * rng.uniform(0.85, 0.97) - loss_torque
    power_text = (f"{power:g} W" if power < 1000 and rng.random() < 0.7
                  else f"{rating_text(power_kw)} kW")
    r_line = 2.0 * machine.r20
    l_line = 2.0 * inductance
    record: dict[str, Any] = {
        "id": _designation(rng, "SV", power_kw, speed),
        "maker": rng.choice(MAKERS),
        "machine": {"topology": "spm", "poles": poles, "thermal_class": 155,
                    "inertia": _q(machine.inertia * 1e4, "kg*cm^2", d)},
        "rated": {
            "power": power_text,
            "speed": f"{speed:g} {style.speed_unit}",
            "torque": _q(point.shaft_torque, style.torque_unit, d),
            "current": _q(point.current, "A", d),
            "voltage": f"{mains:g} V",
        },
        "points": [{"speed": f"0 {style.speed_unit}",
                    "torque": _q(stall_torque, style.torque_unit, d),
                    "current": _q(stall_current, "A", d)}],
        "emf": {"constant": {"value": number(v_per_krpm(ke20), d),
                             "unit": "V/krpm", "basis": "line_rms"}},
        "torque_constant": _q(kt20, "N*m/A", d),
        "circuit": {
            "resistance": {"value": number(r_line, d), "unit": "ohm",
                           "basis": "line", "temperature": "20 °C"},
            "ld": {"value": number(l_line * 1000, d), "unit": "mH", "basis": "line"},
            "lq": {"value": number(l_line * 1000, d), "unit": "mH", "basis": "line"},
        },
        "limits": {"max_speed": f"{max_speed:g} rpm",
                   "peak_current": _q(peak_current, "A", d),
                   "peak_torque": _q(peak_torque, style.torque_unit, d)},
        "supply": {"mains_voltage": f"{mains:g} V"},
    }
    if rng.random() < 0.6:
        record["dynamics"] = {
            "electrical_time_constant": _q(inductance / machine.r20 * 1000, "ms", d),
            "mechanical_time_constant": _q(
                3.0 * machine.inertia * machine.r20 / kt20 ** 2 * 1000, "ms", d)}
    truth = {"ke20_v_per_krpm": v_per_krpm(ke20), "mains": mains, "max_speed": max_speed,
             "kt20": kt20, "rated_ti_over_kt": ratio, "stall_torque": stall_torque,
             "stall_current": stall_current}
    return Sheet(record, convention, machine, point, truth=truth)


def consistent(convention: str, seed: int) -> Sheet:
    """One consistent sheet of ``convention``, deterministic by ``seed``."""
    rng = random.Random(f"{convention}:{seed}")
    if convention == "servo":
        return servo(rng)
    if convention not in CONVENTIONS:
        raise ValueError(f"unknown convention {convention!r}; known: {', '.join(CONVENTIONS)}")
    return industrial(rng, convention)


# --------------------------------------------------------------------------------------------
# planted slips
# --------------------------------------------------------------------------------------------

def _split(text: str) -> tuple[float, str]:
    number, _, unit = text.strip().partition(" ")
    return float(number), unit


def _value_of(entry: Any) -> tuple[float, str]:
    if isinstance(entry, dict):
        return float(entry["value"]), str(entry["unit"])
    return _split(str(entry))


def _set_value(record: dict[str, Any], path: str, value: float, unit: str,
               digits: int = 4) -> None:
    section, _, key = path.rpartition(".")
    target = record
    for part in section.split(".") if section else ():
        target = target[part]
    entry = target[key]
    if isinstance(entry, dict):
        entry["value"] = number(value, digits)
        entry["unit"] = unit
    else:
        target[key] = f"{significant(value, digits)} {unit}"


def _get(record: dict[str, Any], path: str) -> Any:
    target: Any = record
    for part in path.split("."):
        target = target[part]
    return target


@dataclass(frozen=True)
class Slip:
    name: str
    fields: tuple[str, ...]
    keyword: str | None   # regex a diagnosis names; None: not a known slip
    plant: Callable[[random.Random], Sheet]


def _base(rng: random.Random, **kwargs: Any) -> Sheet:
    convention = rng.choice(("industrial_magnet_stated", "industrial_magnet_unstated",
                             "unstated_bases"))
    return industrial(rng, convention, **kwargs)


def _plant_hp(rng: random.Random) -> Sheet:
    sheet = _base(rng)
    power_kw = _value_of(sheet.record["rated"]["power"])[0]
    if rng.random() < 0.5:      # a kW value labelled hp
        sheet.record["rated"]["power"] = f"{rating_text(power_kw)} hp"
        sheet.truth["direction"] = "kW written as hp"
    else:                       # a hp value labelled kW
        sheet.record["rated"]["power"] = f"{significant(power_kw * 1000 / WATT_PER_HP, 3)} kW"
        sheet.truth["direction"] = "hp written as kW"
    return sheet


def _plant_w_kw(rng: random.Random) -> Sheet:
    sheet = _base(rng)
    power_kw = _value_of(sheet.record["rated"]["power"])[0]
    if rng.random() < 0.5:
        sheet.record["rated"]["power"] = f"{rating_text(power_kw * 1000)} kW"
    else:
        sheet.record["rated"]["power"] = f"{rating_text(power_kw)} W"
    return sheet


def _plant_uh_mh(rng: random.Random) -> Sheet:
    sheet = _base(rng)
    factor = 1000.0 if rng.random() < 0.5 else 0.001   # µH number labelled mH, or vice versa
    for key in ("ld", "lq"):
        value, _ = _value_of(sheet.record["circuit"][key])
        sheet.record["circuit"][key] = f"{significant(value * factor, 4)} mH"
    return sheet


def _plant_ke(factor: float) -> Callable[[random.Random], Sheet]:
    def plant(rng: random.Random) -> Sheet:
        sheet = _base(rng)
        value, unit = _value_of(sheet.record["emf"]["constant"])
        _set_value(sheet.record, "emf.constant", value * factor, unit)
        return sheet
    return plant


def _plant_kt_peak(rng: random.Random) -> Sheet:
    sheet = _base(rng)
    value, unit = _value_of(sheet.record["torque_constant"])
    sheet.record["torque_constant"] = f"{significant(value / SQRT2, 4)} {unit}"
    return sheet


def _plant_line_phase(key: str) -> Callable[[random.Random], Sheet]:
    def plant(rng: random.Random) -> Sheet:
        if rng.random() < 0.3:    # servo: a phase value labelled line (÷2)
            sheet = servo(rng)
            factor = 0.5
        else:                     # industrial: a line-to-line measurement labelled phase (×2)
            sheet = _base(rng)
            factor = 2.0
        keys = ("resistance",) if key == "resistance" else ("ld", "lq")
        for k in keys:
            value, unit = _value_of(sheet.record["circuit"][k])
            _set_value(sheet.record, f"circuit.{k}", value * factor, unit)
        return sheet
    return plant


def _plant_poles(rng: random.Random) -> Sheet:
    sheet = _base(rng)
    poles = sheet.record["machine"]["poles"]
    sheet.record["machine"]["poles"] = poles + (2 if poles <= 4 or rng.random() < 0.5 else -2)
    return sheet


def _plant_50_60(rng: random.Random) -> Sheet:
    frequency = rng.choice((50.0, 60.0))
    poles = rng.choice((4, 6, 8))
    sheet = _base(rng, speed=120.0 * frequency / poles, poles=poles)
    other = 60.0 if frequency == 50.0 else 50.0
    sheet.record["rated"]["frequency"] = f"{other:g} Hz"
    return sheet


def _plant_induction(rng: random.Random) -> Sheet:
    frequency = rng.choice((50.0, 60.0))
    poles = rng.choice((4, 6, 8))
    synchronous = 120.0 * frequency / poles
    sheet = _base(rng, speed=synchronous, poles=poles)
    slip_speed = round(synchronous * (1.0 - rng.uniform(0.015, 0.04)))
    power = sheet.rated.shaft_power
    unit = _split(sheet.record["rated"]["speed"])[1]
    sheet.record["rated"]["speed"] = f"{slip_speed:g} {unit}"
    torque_unit = _split(sheet.record["rated"]["torque"])[1]
    sheet.record["rated"]["torque"] = _q(power / (slip_speed * math.pi / 30.0), torque_unit, 4)
    sheet.record["rated"]["frequency"] = f"{frequency:g} Hz"
    return sheet


def _swap_digits(text: str) -> str | None:
    """96.3 → 93.6: swap the second and third significant digits; None if they are equal."""
    positions = [i for i, c in enumerate(text) if c.isdigit()]
    while positions and text[positions[0]] == "0":
        positions.pop(0)
    if len(positions) < 3:
        return None
    a, b = positions[1], positions[2]
    if text[a] == text[b]:
        return None
    chars = list(text)
    chars[a], chars[b] = chars[b], chars[a]
    return "".join(chars)


def _plant_efficiency_digits(rng: random.Random) -> Sheet:
    for _ in range(100):
        sheet = _base(rng)
        entry = sheet.record["rated"]["efficiency"]
        text = entry if isinstance(entry, str) else str(entry)
        number, _, unit = text.partition(" ")
        swapped = _swap_digits(number)
        if swapped is None or float(swapped) >= (100.0 if unit else 1.0):
            continue
        sheet.record["rated"]["efficiency"] = f"{swapped} {unit}".strip()
        return sheet
    raise RuntimeError("no efficiency with swappable digits")


def _plant_power_factor(rng: random.Random) -> Sheet:
    sheet = _base(rng)
    value = float(sheet.record["rated"]["power_factor"])
    new = value - 0.15 if value + 0.15 > 0.99 or rng.random() < 0.5 else value + 0.15
    sheet.record["rated"]["power_factor"] = f"{new:.2f}"
    return sheet


def _plant_current(rng: random.Random) -> Sheet:
    sheet = _base(rng)
    value, unit = _value_of(sheet.record["rated"]["current"])
    sheet.record["rated"]["current"] = f"{significant(value * 1.15, 4)} {unit}"
    return sheet


def _plant_voltage_under_emf(rng: random.Random) -> Sheet:
    sheet = _base(rng, topology="spm")
    voltage = sheet.rated.back_emf * rng.uniform(0.82, 0.95)
    sheet.record["rated"]["voltage"] = f"{significant(voltage, 3)} V"
    return sheet


def _plant_overspeed(rng: random.Random) -> Sheet:
    sheet = _base(rng)
    ke20 = sheet.truth["ke20_v_per_krpm"] / 1000.0      # V per rpm
    threshold = sheet.truth["mains"] / ke20             # cold peak EMF = √2·U_mains
    top = math.ceil(threshold * rng.uniform(1.1, 1.4) / 50) * 50
    sheet.record["limits"]["max_speed"] = f"{top:g} rpm"
    return sheet


LINE_PHASE_KEYWORD = r"[×÷]\s*2(?![.\d/])|terminal[- ]to[- ]terminal|between terminals|delta"
#: keyword patterns name the slip itself, not formula text that every message of a rule
#: carries ("√3·Ke", "peak current", "line rms"): a factor with its operator, or the reading
SLIPS: tuple[Slip, ...] = (
    Slip("hp_kw", ("rated.power",), r"\bhp\b", _plant_hp),
    Slip("w_kw", ("rated.power",),
         r"[×÷]\s*1000|prefix|kilo|\bW\b.{0,30}\bkW\b|\bkW\b.{0,30}\bW\b", _plant_w_kw),
    Slip("uh_mh", ("circuit.ld", "circuit.lq"), r"[×÷]\s*1000|prefix|µH|μH|micro",
         _plant_uh_mh),
    Slip("ke_per_phase", ("emf.constant",), r"[×÷]\s*√3|per phase|phase rather than|phase value",
         _plant_ke(1 / SQRT3)),
    Slip("ke_peak", ("emf.constant",), r"[×÷]\s*√2|peak rather than|peak value|is peak|a peak",
         _plant_ke(SQRT2)),
    Slip("kt_per_peak_ampere", ("torque_constant",), r"[×÷]\s*√2|peak ampere|peak rather than",
         _plant_kt_peak),
    Slip("r_line_phase", ("circuit.resistance",),
         LINE_PHASE_KEYWORD + r"|resistance.{0,40}\bline\b|\bline\b.{0,40}resistance",
         _plant_line_phase("resistance")),
    Slip("l_line_phase", ("circuit.ld", "circuit.lq"),
         LINE_PHASE_KEYWORD + r"|inductance.{0,40}\bline\b|\bline\b.{0,40}inductance",
         _plant_line_phase("inductance")),
    Slip("poles_pm2", ("machine.poles",),
         r"\b\d+[ -]poles?\b|\b\d+ pole pairs\b|poles?\s*[±+-]\s*2", _plant_poles),
    Slip("hz_50_60", ("rated.frequency",),
         r"50\s*Hz.{0,40}60\s*Hz|60\s*Hz.{0,40}50\s*Hz|50\s*/\s*60|60\s*/\s*50|[×÷]\s*1\.2\b",
         _plant_50_60),
    Slip("induction_slip", ("rated.speed",), r"slip|induction|asynchronous", _plant_induction),
    Slip("efficiency_digits", ("rated.efficiency",), r"swap|digits|transpos",
         _plant_efficiency_digits),
    Slip("power_factor_015", ("rated.power_factor",), None, _plant_power_factor),
    Slip("current_plus15", ("rated.current",), None, _plant_current),
    Slip("voltage_under_emf", ("rated.voltage",), r"back-EMF|field.weakening",
         _plant_voltage_under_emf),
    Slip("overspeed", ("limits.max_speed",), r"DC[- ]link|overspeed", _plant_overspeed),
)
SLIP_BY_NAME = {slip.name: slip for slip in SLIPS}


def planted(slip_name: str, seed: int) -> Sheet:
    """One sheet with the slip ``slip_name`` planted, deterministic by ``seed``."""
    slip = SLIP_BY_NAME[slip_name]
    rng = random.Random(f"slip:{slip_name}:{seed}")
    sheet = slip.plant(rng)
    sheet.slip = slip.name
    sheet.corrupted_fields = slip.fields
    sheet.keyword = slip.keyword
    sheet.record["id"] = f"{sheet.record['id']} [{slip.name}]"
    assert sheet.consistent_record is not None
    sheet.consistent_record["id"] = sheet.record["id"].replace("]", ", consistent twin]")
    return sheet


def keyword_named(slip: Slip, texts: list[str]) -> bool:
    """Whether any of ``texts`` names the slip's keyword."""
    if slip.keyword is None:
        return False
    pattern = re.compile(slip.keyword, re.IGNORECASE)
    return any(pattern.search(text or "") for text in texts)


def write_sheets(records: list[dict[str, Any]], folder: Path) -> list[Path]:
    """Write each record as its own YAML file ``00000.yaml``, ``00001.yaml``… in ``folder``."""
    import yaml

    folder.mkdir(parents=True, exist_ok=True)
    paths = []
    for index, record in enumerate(records):
        path = folder / f"{index:05d}.yaml"
        path.write_text(yaml.safe_dump(record, allow_unicode=True, sort_keys=False),
                        encoding="utf-8")
        paths.append(path)
    return paths


def check_with_sheetlint(folder: Path) -> dict[str, dict[str, Any]]:
    """Run the public command line, ``sheetlint check --format json --no-settings FOLDER``, and
    return each file's first record result by file name (a file error becomes a record with
    that error and no findings). Only the JSON output contract of DESIGN.md is read."""
    import json
    import subprocess

    command = [sys.executable, "-m", "sheetlint", "check", "--format", "json", "--no-settings",
               "--no-progress", str(folder)]
    done = subprocess.run(command, capture_output=True, text=True, check=False)
    if done.returncode not in (0, 1, 2) or not done.stdout.strip():
        raise RuntimeError(f"sheetlint failed ({done.returncode}): {done.stderr[-2000:]}")
    results: dict[str, dict[str, Any]] = {}
    for entry in json.loads(done.stdout)["files"]:
        name = Path(entry["path"]).name
        if entry.get("error") or not entry.get("records"):
            results[name] = {"error": entry.get("error") or "no record", "findings": []}
        else:
            results[name] = entry["records"][0]
    return results


def main(argv: list[str] | None = None) -> int:
    import yaml

    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--convention", default="industrial_magnet_stated",
                        help=f"one of {', '.join(CONVENTIONS)}")
    parser.add_argument("--slip", default=None, help=f"one of {', '.join(SLIP_BY_NAME)}")
    parser.add_argument("--count", type=int, default=1)
    parser.add_argument("--seed", type=int, default=0)
    args = parser.parse_args(argv)
    records = []
    for index in range(args.count):
        seed = args.seed + index
        sheet = planted(args.slip, seed) if args.slip else consistent(args.convention, seed)
        records.append(sheet.record)
    yaml.safe_dump({"records": records}, sys.stdout, allow_unicode=True, sort_keys=False)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
