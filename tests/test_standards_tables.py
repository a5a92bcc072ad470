"""Standards tables and helpers checked against the values they come from.

Sources are named in each test. Tags follow /work/shared/REFERENCES.md: [R] read in the
published text, [Q] as quoted in a secondary text, [M] from memory, [D] derived arithmetic.
"""

from __future__ import annotations

import pytest

from sheetlint.standards.tolerances import efficiency_tolerance, power_factor_tolerance


# --- IEC 60034-1 tolerances: vectors [D], derived by arithmetic from the quoted rule ---------
def test_efficiency_tolerance_95pct_75kw_iec_60034_1_quoted_rule_derived_vector() -> None:
    # IEC 60034-1 (as quoted): -15 % of (1 - eta) up to 150 kW -> 95.0 % guarantees 94.25 %
    assert 0.95 - efficiency_tolerance(0.95, 75e3) == pytest.approx(0.9425, abs=1e-12)


def test_efficiency_tolerance_uses_10pct_above_150kw_iec_60034_1_2010_quoted() -> None:
    assert efficiency_tolerance(0.96, 150e3) == pytest.approx(0.15 * 0.04)
    assert efficiency_tolerance(0.96, 150.001e3) == pytest.approx(0.10 * 0.04)


@pytest.mark.parametrize(("cos_phi", "minimum"), [(0.85, 0.825), (0.95, 0.93), (0.40, 0.33)])
def test_power_factor_tolerance_iec_60034_1_quoted_rule_derived_vectors(
    cos_phi: float, minimum: float
) -> None:
    # IEC 60034-1 (as quoted): -(1 - cos)/6, at least 0.02, at most 0.07 (REFERENCES §1 [D])
    assert cos_phi - power_factor_tolerance(cos_phi) == pytest.approx(minimum, abs=1e-12)


def test_tolerances_survive_nonsense_input() -> None:
    assert efficiency_tolerance(float("nan"), 1e3) == 0.0
    assert efficiency_tolerance(1.2, 1e3) == 0.0
    assert power_factor_tolerance(float("nan")) == 0.02
