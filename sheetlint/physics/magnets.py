"""Temperature dependence of permanent-magnet remanence, and so of back-EMF and torque constant.

Back-EMF and torque constant scale with the magnets' remanence B_r, which falls reversibly and
nearly linearly with temperature:

.. math:: B_r(T_2) = B_r(T_1)\\,(1 + \\alpha\\,(T_2 - T_1))

Default coefficients (per kelvin) are mid-range values of the bands magnet makers publish
(REFERENCES.md §6, [Q] magnet makers' technical notes): sintered NdFeB −0.09…−0.12 %/K,
SmCo −0.03…−0.05 %/K, hard ferrite about −0.2 %/K.
"""

from __future__ import annotations

#: reversible remanence temperature coefficient alpha, 1/K (REFERENCES.md §6)
REMANENCE_COEFFICIENT: dict[str, float] = {
    "ndfeb": -0.0011,
    "smco": -0.00035,
    "ferrite": -0.0020,
    "alnico": -0.0002,
}


def remanence_coefficient(magnet: str | None) -> float:
    """alpha [1/K] for a magnet material name (case-insensitive; default NdFeB)."""
    return REMANENCE_COEFFICIENT.get((magnet or "ndfeb").lower(), REMANENCE_COEFFICIENT["ndfeb"])


#: the temperature the coefficients refer to: B_r(T) = B_r(20 °C)·(1 + α·(T − 20 °C))
REFERENCE_KELVIN = 293.15


def remanence_factor(magnet: str | None, from_kelvin: float, to_kelvin: float,
                     alpha: float | None = None) -> float:
    """B_r(to)/B_r(from), the factor on back-EMF and Kt, with both temperatures referred to
    20 °C (the temperature the coefficients are published for):

    .. math::
        \\frac{B_r(T_2)}{B_r(T_1)} = \\frac{1 + \\alpha\\,(T_2 - 20)}{1 + \\alpha\\,(T_1 - 20)}

    so that a round trip 20 → 120 → 20 °C gives exactly 1 (linearising from T_1 instead
    gives 0.96 for ferrite).

    Example (REFERENCES.md §6, derived vector): NdFeB, 50.0 V/krpm at 20 °C gives
    50.0 × remanence_factor("NdFeB", 293.15, 393.15) = 44.5 V/krpm at 120 °C.
    """
    a = remanence_coefficient(magnet) if alpha is None else alpha
    return (1.0 + a * (to_kelvin - REFERENCE_KELVIN)) / (1.0 + a * (from_kelvin - REFERENCE_KELVIN))
