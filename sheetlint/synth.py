"""Consistent synthetic machines for tests, benchmarks and demo data.

A small steady-state dq model (amplitude-invariant, peak phase quantities) with MTPA and a
loss model produces a record whose every field belongs to one physical machine; the record is
then rounded to catalogue precision. The equations are those of REFERENCES.md §4:

    u_d = R·i_d − ω_e·L_q·i_q,  u_q = R·i_q + ω_e·(L_d·i_d + ψ),
    T = 1.5·p·(ψ·i_q + (L_d − L_q)·i_d·i_q),
    MTPA: i_d = ψ/(4(L_q − L_d)) − √(ψ²/(16(L_q − L_d)²) + I²/2).

Losses: copper 3·I²·R_hot (R corrected with 235 + T, IEC 60034-1), iron and friction as fixed
fractions of rated power, taken as a drag torque on the shaft. Nothing here is used by the
engine: the engine checks what this module produces.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

SQRT2 = math.sqrt(2.0)
SQRT3 = math.sqrt(3.0)
NDFEB_ALPHA = -0.0011


@dataclass
class MachineSpec:
    """Design choices of a synthetic machine (SI unless named otherwise)."""

    power_kw: float
    speed_rpm: float
    poles: int
    topology: str = "spm"  # spm | ipm
    mains_voltage: float = 400.0
    voltage_ratio: float = 0.9  # rated voltage / mains voltage
    margin: float = 0.065  # spm: U/E_hot − 1
    saliency: float = 2.2  # ipm: Lq/Ld
    copper_fraction: float = 0.02  # copper loss / rated power
    iron_fraction: float = 0.010
    friction_fraction: float = 0.005
    winding_rise_k: float = 80.0  # rated temperature rise
    ambient_c: float = 40.0
    magnet_c: float = 100.0
    ipm_psi_share: float = 0.75  # ipm: share of E_hot in the rated voltage


def _mtpa_currents(psi: float, ld: float, lq: float, amplitude: float) -> tuple[float, float]:
    if abs(lq - ld) < 1e-15:
        return 0.0, amplitude
    d = lq - ld
    i_d = psi / (4 * d) - math.sqrt(psi ** 2 / (16 * d ** 2) + amplitude ** 2 / 2)
    return i_d, math.sqrt(max(amplitude ** 2 - i_d ** 2, 0.0))


def _torque(p: int, psi: float, ld: float, lq: float, i_d: float, i_q: float) -> float:
    return 1.5 * p * (psi * i_q + (ld - lq) * i_d * i_q)


def _mtpa_for_torque(p: int, psi: float, ld: float, lq: float, torque: float) -> tuple[float,
                                                                                         float]:
    lo, hi = 0.0, 1.0
    while _torque(p, psi, ld, lq, *_mtpa_currents(psi, ld, lq, hi)) < torque:
        hi *= 2.0
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if _torque(p, psi, ld, lq, *_mtpa_currents(psi, ld, lq, mid)) < torque:
            lo = mid
        else:
            hi = mid
    return _mtpa_currents(psi, ld, lq, 0.5 * (lo + hi))


def design(spec: MachineSpec) -> dict[str, float]:
    """Exact (unrounded) quantities of the machine, SI."""
    p = spec.poles // 2
    omega = spec.speed_rpm * 2 * math.pi / 60
    omega_e = p * omega
    power = spec.power_kw * 1e3
    torque = power / omega
    drag = (spec.iron_fraction + spec.friction_fraction) * power / omega
    t_em = torque + drag
    u_rated = spec.voltage_ratio * spec.mains_voltage
    u_peak = u_rated * SQRT2 / SQRT3  # peak phase
    winding_c = spec.ambient_c + spec.winding_rise_k
    hot_factor = (235 + winding_c) / (235 + 20)
    if spec.topology == "spm":
        e_peak = u_peak / (1 + spec.margin)
        psi = e_peak / omega_e
        i_q = t_em / (1.5 * p * psi)
        i_d = 0.0
        r_hot = spec.copper_fraction * power / (1.5 * i_q ** 2)
        if r_hot * i_q > 0.5 * (u_peak - e_peak):
            r_hot = 0.5 * (u_peak - e_peak) / i_q
        x = math.sqrt(max(u_peak ** 2 - (e_peak + r_hot * i_q) ** 2, 1e-12))
        lq = x / (omega_e * i_q)
        ld = lq
    else:
        e_peak = spec.ipm_psi_share * u_peak
        psi = e_peak / omega_e
        # choose Lq so that the MTPA voltage at rated torque meets the rated voltage
        lo, hi = 1e-7, 1.0
        for _ in range(200):
            lq = math.sqrt(lo * hi)
            ld = lq / spec.saliency
            i_d, i_q = _mtpa_for_torque(p, psi, ld, lq, t_em)
            u_d = -omega_e * lq * i_q
            u_q = omega_e * (ld * i_d + psi)
            if math.hypot(u_d, u_q) > u_peak:
                hi = lq
            else:
                lo = lq
        lq = math.sqrt(lo * hi)
        ld = lq / spec.saliency
        i_d, i_q = _mtpa_for_torque(p, psi, ld, lq, t_em)
        amplitude = math.hypot(i_d, i_q)
        r_hot = spec.copper_fraction * power / (1.5 * amplitude ** 2)
    u_d = r_hot * i_d - omega_e * lq * i_q
    u_q = r_hot * i_q + omega_e * (ld * i_d + psi)
    amplitude = math.hypot(i_d, i_q)
    p_in = 1.5 * (u_d * i_d + u_q * i_q)
    u_line = math.hypot(u_d, u_q) * SQRT3 / SQRT2
    i_rms = amplitude / SQRT2
    cos_phi = p_in / (1.5 * math.hypot(u_d, u_q) * amplitude)
    magnet_factor = 1 + NDFEB_ALPHA * (spec.magnet_c - 20)
    ke_hot = SQRT3 * psi * p / SQRT2  # V_LL,rms per rad/s  (√(3/2)·p·ψ)
    return {
        "p": p, "omega": omega, "frequency": omega_e / (2 * math.pi), "power": power,
        "torque": torque, "voltage": u_line, "current": i_rms, "power_factor": cos_phi,
        "efficiency": power / p_in, "losses": p_in - power, "psi_hot": psi,
        "ke_hot": ke_hot, "ke_20": ke_hot / magnet_factor, "ld": ld, "lq": lq,
        "r_hot": r_hot, "r_20": r_hot / hot_factor, "winding_c": winding_c,
    }


def _fmt(value: float, digits: int) -> str:
    """Catalogue rounding to ``digits`` significant digits, written without exponent."""
    if value == 0:
        return "0"
    exponent = math.floor(math.log10(abs(value)))
    decimals = max(digits - 1 - exponent, 0)
    text = f"{round(value, decimals):.{decimals}f}"
    return text


def record(spec: MachineSpec, record_id: str, maker: str = "Synthetic Test Works (invented)",
           digits: int = 4) -> dict[str, Any]:
    """A consistent record in the input schema, rounded to ``digits`` significant digits."""
    d = design(spec)
    speed = spec.speed_rpm
    out: dict[str, Any] = {
        "id": record_id,
        "maker": maker,
        "machine": {"topology": spec.topology, "poles": spec.poles, "thermal_class": 155,
                    "connection": "star",
                    "ambient": {"value": spec.ambient_c, "unit": "°C"}},
        "rated": {
            "power": f"{_fmt(spec.power_kw, 6).rstrip('0').rstrip('.')} kW",
            "speed": f"{speed:g} rpm",
            "frequency": f"{_fmt(d['frequency'], digits + 1)} Hz",
            "torque": f"{_fmt(d['torque'], digits)} N*m",
            "voltage": f"{_fmt(d['voltage'], digits)} V",
            "current": f"{_fmt(d['current'], digits)} A",
            "power_factor": _fmt(d["power_factor"], 3),
            "efficiency": f"{_fmt(d['efficiency'] * 100, digits)} %",
            "losses": f"{_fmt(d['losses'], digits)} W",
            "temperature_rise": f"{spec.winding_rise_k:g} K",
            "magnet_temperature": f"{spec.magnet_c:g} °C",
        },
        "emf": {"constant": {"value": float(_fmt(d["ke_20"] * 2 * math.pi / 60 * 1000,
                                                  digits)),
                             "unit": "V/krpm", "basis": "line_rms"},
                "magnet_temperature": "20 °C"},
        "circuit": {"resistance": {"value": float(_fmt(d["r_20"], digits)), "unit": "ohm",
                                   "basis": "phase", "temperature": "20 °C"},
                    "ld": f"{_fmt(d['ld'] * 1e3, digits)} mH",
                    "lq": f"{_fmt(d['lq'] * 1e3, digits)} mH"},
        "supply": {"mains_voltage": f"{spec.mains_voltage:g} V"},
    }
    return out
