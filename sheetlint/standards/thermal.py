"""Temperature-rise limits, winding resistance versus temperature, and sizing bands.

Tables are read once from ``data/iec_60034_1_thermal.json`` and ``data/sizing_bands.json``.
Temperatures in the names ending ``_c`` are in degrees Celsius (the standards' own tables);
everything else is SI.
"""

from __future__ import annotations

import math
import re
from functools import cache, lru_cache
from typing import Any, NamedTuple

from sheetlint.standards import load_table

THERMAL_FILE = "iec_60034_1_thermal.json"
BANDS_FILE = "sizing_bands.json"

TEMPERATURE_RISE_SOURCE = (
    "IEC 60034-1:2010, temperature-rise limits for indirectly air-cooled windings, resistance "
    "method; IEC 60085 thermal classes; IEC 60034-2-1:2014 reference temperatures"
)
SIZING_SOURCE = (
    "T. J. E. Miller, Brushless Permanent-Magnet and Reluctance Motor Drives, Oxford "
    "University Press, 1989; J. R. Hendershot and T. J. E. Miller, Design of Brushless "
    "Permanent-Magnet Machines, Motor Design Books, 2010 (approximate bands)"
)
ZERO_CELSIUS_K = 273.15


def thermal_table() -> dict[str, Any]:
    """The IEC 60034-1 / 60085 / 60034-2-1 table with its source and provenance."""
    return load_table(THERMAL_FILE)


def sizing_bands() -> dict[str, Any]:
    """The sizing plausibility bands with their source and provenance (all from memory)."""
    return load_table(BANDS_FILE)


_CLASS_TYPES = (int, float, str)
#: an integer of at most this size is exact as a float: ``class_number`` returns it unchanged
_EXACT_IN_FLOAT = 2**53


def class_number(value: object) -> int | None:
    """An IEC 60085 class number from a sheet attribute (``155``, ``"155"``, ``155.0``), or None."""
    if value is None:
        return None
    if type(value) is int and -_EXACT_IN_FLOAT <= value <= _EXACT_IN_FLOAT:
        return value  # the usual attribute; what the float round trip below would give
    if isinstance(value, bool) or not isinstance(value, _CLASS_TYPES):
        return None
    try:
        number = float(value)
    except (ValueError, OverflowError):  # not a number, or an integer beyond any float
        return None
    if not math.isfinite(number) or number != int(number):
        return None
    return int(number)


def _class_key(thermal_class: object) -> str | None:
    number = class_number(thermal_class)
    return None if number is None else str(number)


@cache
def _rise_limits() -> dict[int, float]:
    """Temperature-rise limit [K] by class number, from the table."""
    rows = thermal_table()["temperature_rise_limit_k"]
    return {int(key): float(row["limit"]) for key, row in rows.items()}


@cache
def _reference_temperatures_c() -> dict[int, float]:
    """IEC 60034-2-1 reference temperature [degC] by class number, from the table."""
    rows = thermal_table()["reference_temperature_c"]
    return {int(key): float(value) for key, value in rows.items()
            if isinstance(value, int | float)}


def thermal_class_limit(thermal_class: object) -> float | None:
    """Temperature-rise limit of a thermal class (IEC 60034-1), or None for an unknown class.

    Indirectly air-cooled windings, resistance method, coolant 40 degC, altitude up to 1000 m:
    130 (B) 80 K, 155 (F) 105 K, 180 (H) 125 K [as quoted]; 120 (E) 75 K [from memory].

    Parameters
    ----------
    thermal_class : int
        IEC 60085 class number (130, 155, 180, 120).

    Returns
    -------
    float or None
        Limit. [K]
    """
    number = class_number(thermal_class)
    return None if number is None else _rise_limits().get(number)


def small_or_self_cooled_limit(thermal_class: object) -> float | None:
    """The higher temperature-rise limit IEC 60034-1 gives machines rated under 600 W and
    self-cooled machines without a fan (IC410) and/or with encapsulated windings: 130 (B)
    85 K, 155 (F) 110 K, 180 (H) 130 K [from memory], or None for another class. [K]"""
    number = class_number(thermal_class)
    row = thermal_table()["temperature_rise_limit_small_or_self_cooled_k"]
    value = row.get(str(number)) if number is not None else None
    return float(value) if isinstance(value, int | float) else None


def insulation_max_temperature(thermal_class: object) -> float | None:
    """Maximum temperature of an IEC 60085 thermal class [K], or None when unknown.

    A 105, E 120, B 130, F 155, H 180 degC [as quoted].
    """
    key = _class_key(thermal_class)
    row = thermal_table()["insulation_max_temperature_c"].get(key) if key else None
    return None if row is None else float(row["value"]) + ZERO_CELSIUS_K


def reference_temperature_c(thermal_class: object) -> float | None:
    """IEC 60034-2-1 reference winding temperature of a class [degC], None when not held.

    95 degC for 130 (B), 115 degC for 155 (F), 135 degC for 180 (H) [from memory].
    """
    number = class_number(thermal_class)
    return None if number is None else _reference_temperatures_c().get(number)


def temperature_constant(conductor: str = "copper", standard: str = "iec_60034") -> float | None:
    """Inferred zero-resistance temperature k of a conductor [degC]; None for an unknown one.

    IEC 60034-1 / 60034-2-1: 235 copper, 225 aluminium [from memory];
    IEC 60228: 234.5 copper, 228 aluminium [as quoted] (``standard="iec_60228"``).
    """
    return _temperature_constant(conductor if isinstance(conductor, str) else "", standard)


@cache
def _temperature_constant(conductor: str, standard: str) -> float | None:
    name = conductor.strip().lower()
    row = thermal_table()["resistance_temperature_constant_c"].get(standard, {})
    value = row.get("aluminium" if name == "aluminum" else name)
    return float(value) if isinstance(value, int | float) else None


def resistance_at(r1: float, t1_c: float, t2_c: float, conductor: str = "copper") -> float:
    """Winding resistance at another temperature.

    .. math:: R_2 = R_1 \\frac{k + \\theta_2}{k + \\theta_1}

    Parameters
    ----------
    r1 : float
        Resistance at ``t1_c``. [ohm]
    t1_c, t2_c : float
        Temperatures of ``r1`` and of the result. [degC]
    conductor : str
        ``"copper"`` (k = 235) or ``"aluminium"`` (k = 225).

    Returns
    -------
    float
        Resistance at ``t2_c``. [ohm] NaN for an unknown conductor or a temperature at or below
        -k.

    References
    ----------
    .. [1] IEC 60034-1 and IEC 60034-2-1 (constants 235 and 225, from memory).
    """
    k = temperature_constant(conductor)
    return math.nan if k is None else resistance_with_constant(r1, t1_c, t2_c, k)


def resistance_with_constant(r1: float, t1_c: float, t2_c: float, k: float) -> float:
    """:func:`resistance_at` with the conductor's constant ``k`` [degC] already looked up:
    R₂ = R₁·(k + θ₂)/(k + θ₁); NaN for a temperature at or below -k."""
    if k + t1_c <= 0.0 or k + t2_c <= 0.0:
        return math.nan
    return r1 * (k + t2_c) / (k + t1_c)


class RiseLimit(NamedTuple):
    """A temperature-rise limit after the site corrections of IEC 60034-1.

    ``base`` is the 40 degC / 1000 m limit, ``value`` the corrected one [K]; ``notes`` say
    which corrections were applied; ``beyond_rules`` is True when the site lies outside the
    range the correction rules cover (then no finding above a warning rests on it).
    """

    base: float
    value: float
    notes: tuple[str, ...]
    beyond_rules: bool = False


@cache
def _site_correction() -> dict[str, Any]:
    """The site-correction rules of the thermal table."""
    return thermal_table()["site_correction"]


@lru_cache(maxsize=16, typed=True)
def _uncorrected(base_limit_k: float) -> RiseLimit:
    """A limit no site correction applies to (one shared value per class limit)."""
    return RiseLimit(base_limit_k, base_limit_k, ())


def corrected_rise_limit(base_limit_k: float, coolant_c: float | None,
                         altitude_m: float | None) -> RiseLimit:
    """Correct a temperature-rise limit for coolant temperature and altitude [from memory].

    - coolant 40-60 degC: limit - (coolant - 40) K; above 60 degC the rule is extended and
      ``beyond_rules`` is set; below 40 degC no increase (an increase needs agreement);
    - altitude above 1000 m with a stated coolant temperature: limit - 1 % of the limit per
      100 m above 1000 m; with the coolant temperature unstated, 1000-4000 m need no
      adjustment (a lower ambient is assumed to compensate, as quoted); above 4000 m
      ``beyond_rules``.

    Parameters
    ----------
    base_limit_k : float
        Limit at 40 degC coolant and up to 1000 m. [K]
    coolant_c : float or None
        Coolant (ambient) temperature, None when the sheet does not state it. [degC]
    altitude_m : float or None
        Site altitude. [m]
    """
    rules = _site_correction()
    reference_c = rules["coolant_reference_c"]
    if (coolant_c is None or not coolant_c > reference_c) and (
            altitude_m is None or altitude_m <= rules["altitude_reference_m"]):
        return _uncorrected(base_limit_k)
    value = base_limit_k
    notes: list[str] = []
    beyond = False
    if coolant_c is not None and math.isfinite(coolant_c) and coolant_c > reference_c:
        value -= coolant_c - reference_c
        notes.append(f"reduced by {coolant_c - reference_c:.3g} K for {coolant_c:.3g} degC "
                     "coolant")
        if coolant_c > rules["coolant_max_c"]:
            beyond = True
            notes.append(f"coolant above {rules['coolant_max_c']:g} degC is outside the rule; "
                         "the limit needs agreement")
    if altitude_m is not None and math.isfinite(altitude_m):
        excess = altitude_m - rules["altitude_reference_m"]
        if altitude_m > rules["altitude_max_m"]:
            beyond = True
            notes.append(f"altitude above {rules['altitude_max_m']:g} m is outside the rule")
        if excess > 0.0:
            if coolant_c is None and not beyond:
                notes.append(f"no adjustment for {altitude_m:.0f} m with the coolant "
                             "temperature unstated (a lower ambient is assumed to compensate)")
            else:
                reduction = base_limit_k * rules["altitude_fraction_per_100m"] * excess / 100.0
                value -= reduction
                notes.append(f"reduced by {reduction:.3g} K for {altitude_m:.0f} m altitude")
    return RiseLimit(base_limit_k, value, tuple(notes), beyond)


def torque_per_rotor_volume(torque: float, rotor_diameter: float, stack_length: float) -> float:
    """Torque per rotor volume TRV = T / (pi D^2 L / 4) [N*m/m^3]; equals 2 sigma (shear stress).

    Parameters
    ----------
    torque : float
        Continuous (rated) torque. [N*m]
    rotor_diameter : float
        Rotor outer diameter. [m]
    stack_length : float
        Active length. [m]

    References
    ----------
    .. [1] T. J. E. Miller, Brushless Permanent-Magnet and Reluctance Motor Drives, Oxford
       University Press, 1989 (T = 2 sigma V_r).
    """
    volume = math.pi * rotor_diameter**2 * stack_length / 4.0
    return torque / volume if volume > 0.0 else math.nan


_IC_PATTERN = re.compile(r"^IC\s*([0-9A-Z]+)$")


def cooling_group(ic_code: object) -> str:
    """Group an IEC 60034-6 IC code by how heat leaves the machine [code reading from memory].

    ``"liquid"`` when a coolant letter W appears (IC71W, IC81W, IC3A1W7); ``"natural"`` for a
    frame cooled by free convection (IC410, IC4A0A0, IC40); ``"fan"`` for other air codes
    (IC411, IC416, IC418, IC01, IC06, IC611); ``"unknown"`` otherwise.
    """
    if not isinstance(ic_code, str):
        return "unknown"
    match = _IC_PATTERN.match(ic_code.strip().upper().replace(" ", ""))
    if not match:
        return "unknown"
    body = match.group(1)
    if "W" in body:
        return "liquid"
    digits = [c for c in body if c.isdigit()]
    if not digits:
        return "unknown"
    if digits[0] == "4" and digits[-1] == "0":
        return "natural"
    return "fan"
