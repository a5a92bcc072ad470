"""Tolerances on declared values per IEC 60034-1 (efficiency and power factor).

The tolerances govern a *test result* against the value the sheet declares: a machine whose
measured efficiency falls short of the declared one by no more than the tolerance still meets
its rating. They do not lower the minimum efficiency of an efficiency class (see
:mod:`sheetlint.standards.efficiency`).

Edition applied: IEC 60034-1:2010 (Rotating electrical machines -- Part 1: Rating and
performance), as quoted in secondary texts; its efficiency tolerance changes step at 150 kW.
Older editions (e.g. 1996) put that step at 50 kW.
"""

from __future__ import annotations

import math

#: the edition whose tolerance table is applied, for citations in findings
TOLERANCE_EDITION = "IEC 60034-1:2010, tolerances on declared values (as quoted)"

#: rated power above which the smaller efficiency tolerance applies [W]
EFFICIENCY_TOLERANCE_STEP_W = 150e3


def efficiency_tolerance(eta: float, power_w: float) -> float:
    """Allowed shortfall of a measured efficiency below the declared one (absolute fraction).

    .. math::

        \\Delta\\eta = 0.15\\,(1 - \\eta) \\quad (P \\le 150\\ \\mathrm{kW}), \\qquad
        \\Delta\\eta = 0.10\\,(1 - \\eta) \\quad (P > 150\\ \\mathrm{kW})

    Parameters
    ----------
    eta : float
        Declared efficiency. [fraction, 0..1]
    power_w : float
        Rated output power. [W]

    Returns
    -------
    float
        Allowed shortfall. [fraction] The guaranteed minimum is ``eta - efficiency_tolerance``.
        0.0 for an efficiency that is not a number or not below 1.

    References
    ----------
    .. [1] IEC 60034-1:2010, Rotating electrical machines -- Part 1: Rating and performance,
       table of tolerances (as quoted).
    """
    if not (math.isfinite(eta) and math.isfinite(power_w) and eta < 1.0):
        return 0.0
    share = 0.15 if power_w <= EFFICIENCY_TOLERANCE_STEP_W else 0.10
    return share * (1.0 - eta)


def power_factor_tolerance(cos_phi: float) -> float:
    """Allowed shortfall of a measured power factor below the declared one (absolute).

    .. math::

        \\Delta\\cos\\varphi =
        \\min\\bigl(0.07,\\ \\max\\bigl(0.02,\\ (1 - \\cos\\varphi)/6\\bigr)\\bigr)

    IEC 60034-1 states it for induction machines; applied to PM machines by analogy.

    Parameters
    ----------
    cos_phi : float
        Declared power factor. [-]

    Returns
    -------
    float
        Allowed shortfall. [-] (0.02 for a power factor that is not a number)

    References
    ----------
    .. [1] IEC 60034-1:2010, Rotating electrical machines -- Part 1: Rating and performance,
       table of tolerances (as quoted).
    """
    if not math.isfinite(cos_phi):
        return 0.02
    shortfall = (1.0 - cos_phi) / 6.0  # clipped to 0.02..0.07 by comparisons (cheaper)
    if shortfall < 0.02:
        return 0.02
    return 0.07 if shortfall > 0.07 else shortfall
