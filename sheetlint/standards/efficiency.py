"""Minimum efficiencies of the IE classes.

Line-operated motors: IEC 60034-30-1:2014, IE2-IE4 at 50 Hz, from the interpolation
coefficients published in Regulation (EU) 2019/1781 Annex I and SI 2021/745 Schedule 16
(Tables 27 and 28). Converter-fed machines belong to IEC TS 60034-30-2:2016, whose limits are
not held here; :func:`converter_fed_minimum` approximates them by the 4-pole limit at the same
rated power and says so. IE5 is approximated by (1 - eta_IE5) = 0.8 (1 - eta_IE4) [from memory].

The table is read once, on first use (``data/iec_60034_30_1_coefficients.json``).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Any

from sheetlint.standards import load_table

COEFFICIENT_FILE = "iec_60034_30_1_coefficients.json"

#: citations used in findings
LINE_OPERATED_SOURCE = (
    "IEC 60034-30-1:2014 efficiency classes of line-operated AC motors; minimum values and "
    "interpolation coefficients as published in Regulation (EU) 2019/1781 Annex I and "
    "SI 2021/745 Schedule 16 (Tables 27-28)"
)
CONVERTER_FED_SOURCE = (
    "IEC TS 60034-30-2:2016 efficiency classes of variable speed AC motors (limits not held; "
    "approximated by the IEC 60034-30-1:2014 4-pole limit, Regulation (EU) 2019/1781 Annex I)"
)

_CLASS_PATTERN = re.compile(r"^\s*IE\s*([1-5])\s*$", re.IGNORECASE)


def coefficient_table() -> dict[str, Any]:
    """The IEC 60034-30-1 coefficient table with its source and provenance."""
    return load_table(COEFFICIENT_FILE)


@dataclass(frozen=True, slots=True)
class ClassMinimum:
    """The minimum efficiency of one class at one rating, or why there is none.

    ``efficiency`` is a fraction rounded to 0.1 % as the published tables are; ``None`` when the
    rating is outside what is held here, with ``reason`` saying why. ``bracket`` holds the
    minimum efficiencies of the neighbouring tabulated ratings when only those are defined
    (0.55-0.75 kW). ``approximate`` is True for IE5 and for the converter-fed approximation.
    """

    ie_class: int
    efficiency: float | None
    method: str
    approximate: bool = False
    reason: str | None = None
    bracket: tuple[float, float] | None = None


def parse_ie_class(text: object) -> int | None:
    """``"IE3"`` -> 3; anything that is not IE1..IE5 -> None."""
    if not isinstance(text, str):
        return None
    match = _CLASS_PATTERN.match(text)
    return int(match.group(1)) if match else None


def round_like_published(percent: float) -> float:
    """Round an efficiency in % half up to 0.1 %, as the published tables print it."""
    return math.floor(percent * 10.0 + 0.5) / 10.0


def interpolated_percent(table: str, ie_class: int, poles: int, power_kw: float) -> float:
    """Unrounded minimum efficiency in % from a coefficient table.

    .. math:: \\eta = A x^3 + B x^2 + C x + D, \\qquad x = \\log_{10}(P / 1\\,\\mathrm{kW})

    Parameters
    ----------
    table : str
        ``"table_27"`` (0.12-0.55 kW) or ``"table_28"`` (0.75-200 kW).
    ie_class : int
        2, 3 or 4.
    poles : int
        2, 4, 6 or 8.
    power_kw : float
        Rated output power. [kW]

    Returns
    -------
    float
        Minimum efficiency. [%]

    References
    ----------
    .. [1] SI 2021/745 Schedule 16, Tables 27 and 28; Regulation (EU) 2019/1781 Annex I.
    """
    a, b, c, d = coefficient_table()["coefficients"][table][f"IE{ie_class}"][str(poles)]
    x = math.log10(power_kw)
    return ((a * x + b) * x + c) * x + d


def line_operated_minimum(ie_class: int, poles: int, power_w: float,
                          frequency_hz: float = 50.0) -> ClassMinimum:
    """Minimum efficiency of a line-operated motor per IEC 60034-30-1 (IE2-IE4, 50 Hz).

    0.12-0.55 kW from Table 27, 0.75-200 kW from Table 28, 200-1000 kW the 200 kW value;
    between 0.55 and 0.75 kW only the two tabulated ratings are defined (``bracket``). IE5 by
    :func:`ie5_from_ie4` (approximate). Results are rounded half up to 0.1 %.

    Parameters
    ----------
    ie_class : int
        1..5.
    poles : int
        Pole count.
    power_w : float
        Rated output power. [W]
    frequency_hz : float
        Rated (mains) frequency. [Hz]

    Returns
    -------
    ClassMinimum
        ``efficiency`` as a fraction, or ``None`` with the reason.
    """
    table = coefficient_table()
    ranges = table["ranges_kw"]
    if ie_class == 5:
        ie4 = line_operated_minimum(4, poles, power_w, frequency_hz)
        if ie4.efficiency is None:
            return ClassMinimum(5, None, ie4.method, True, ie4.reason)
        return ClassMinimum(5, ie5_from_ie4(ie4.efficiency), "IE5 from IE4 (approximate)",
                            True)
    if ie_class not in (2, 3, 4):
        return ClassMinimum(ie_class, None, "none", reason=f"IE{ie_class} limits are not held "
                            "here (no published coefficients available); not checked")
    if poles not in (2, 4, 6, 8):
        return ClassMinimum(ie_class, None, "none", reason=f"{poles} poles: IEC 60034-30-1 "
                            "covers 2, 4, 6 and 8 poles only")
    if not (math.isfinite(frequency_hz) and 45.0 <= frequency_hz <= 55.0):
        return ClassMinimum(ie_class, None, "none", reason=f"{frequency_hz:g} Hz: only the "
                            "50 Hz limits are held here; 60 Hz values are not available, so "
                            "the claim is not checked")
    power_kw = power_w / 1e3
    low27, high27 = ranges["table_27"]
    low28, high28 = ranges["table_28"]
    plateau_high = ranges["plateau"][1]
    if not (math.isfinite(power_kw) and low27 <= power_kw <= plateau_high):
        return ClassMinimum(ie_class, None, "none", reason=f"{power_kw:g} kW is outside the "
                            f"scope of IEC 60034-30-1 ({low27:g}-{plateau_high:g} kW)")
    if power_kw <= high27:
        percent = interpolated_percent("table_27", ie_class, poles, power_kw)
        return ClassMinimum(ie_class, round_like_published(percent) / 100.0,
                            "Table 27 interpolation, rounded to 0.1 %")
    if power_kw < low28:
        below = round_like_published(interpolated_percent("table_27", ie_class, poles, high27))
        above = round_like_published(interpolated_percent("table_28", ie_class, poles, low28))
        return ClassMinimum(ie_class, None, "tabulated ratings only", reason=(
            f"{power_kw:g} kW lies between the tabulated {high27:g} kW and {low28:g} kW "
            "ratings, for which no interpolation is defined"),
            bracket=(below / 100.0, above / 100.0))
    method = "Table 28 interpolation, rounded to 0.1 %"
    if power_kw > high28:
        power_kw = high28
        method = f"{high28:g} kW value (holds up to {plateau_high:g} kW)"
    percent = interpolated_percent("table_28", ie_class, poles, power_kw)
    return ClassMinimum(ie_class, round_like_published(percent) / 100.0, method)


def ie5_from_ie4(eta_ie4: float) -> float:
    """Approximate IE5 minimum from the IE4 minimum: 20 % lower losses [from memory].

    .. math:: 1 - \\eta_{IE5} = 0.8\\,(1 - \\eta_{IE4})

    Returns a fraction rounded half up to 0.1 %.
    """
    ratio = coefficient_table()["converter_fed"]["ie5_loss_ratio"]
    return round_like_published(100.0 * (1.0 - ratio * (1.0 - eta_ie4))) / 100.0


def converter_fed_minimum(ie_class: int, power_w: float,
                          speed_rpm: float | None = None) -> ClassMinimum:
    """Approximate IEC TS 60034-30-2 minimum: the IEC 60034-30-1 4-pole 50 Hz limit at the
    same rated power (IE5 from IE4). Always ``approximate``; ``None`` outside the power or
    speed scope of IEC TS 60034-30-2 [scope from memory].

    Parameters
    ----------
    ie_class : int
        1..5.
    power_w : float
        Rated output power. [W]
    speed_rpm : float or None
        Rated speed. [r/min]
    """
    scope = coefficient_table()["converter_fed"]
    low_kw, high_kw = scope["scope_kw"]
    power_kw = power_w / 1e3
    if not (math.isfinite(power_kw) and low_kw <= power_kw <= high_kw):
        return ClassMinimum(ie_class, None, "none", True, f"{power_kw:g} kW is outside the "
                            f"scope of IEC TS 60034-30-2 ({low_kw:g}-{high_kw:g} kW, from "
                            "memory)")
    if speed_rpm is not None:
        low_n, high_n = scope["scope_speed_rpm"]
        if not (math.isfinite(speed_rpm) and low_n <= speed_rpm <= high_n):
            return ClassMinimum(ie_class, None, "none", True, f"{speed_rpm:.0f} r/min is "
                                "outside the speed scope of IEC TS 60034-30-2 "
                                f"({low_n:g}-{high_n:g} r/min, approximate)")
    base = line_operated_minimum(ie_class, 4, power_w)
    return ClassMinimum(ie_class, base.efficiency, "IEC 60034-30-1 4-pole limit at the same "
                        "rated power (approximation of IEC TS 60034-30-2)", True, base.reason,
                        base.bracket)


def highest_class_reached(eta: float, poles: int, power_w: float,
                          frequency_hz: float = 50.0) -> int | None:
    """The highest of IE2..IE4 whose minimum ``eta`` reaches; None if none or not computable."""
    reached: int | None = None
    for ie_class in (2, 3, 4):
        limit = line_operated_minimum(ie_class, poles, power_w, frequency_hz).efficiency
        if limit is None:
            return reached
        if eta >= limit - 1e-9:
            reached = ie_class
    return reached
