"""Standards tables and helpers checked against the values they come from.

Sources are named in each test. Tags follow /work/shared/REFERENCES.md: [R] read in the
published text, [Q] as quoted in a secondary text, [M] from memory, [D] derived arithmetic.
"""

from __future__ import annotations

import pytest

from sheetlint.standards.efficiency import (
    coefficient_table,
    converter_fed_minimum,
    highest_class_reached,
    ie5_from_ie4,
    interpolated_percent,
    line_operated_minimum,
    parse_ie_class,
    round_like_published,
)
from sheetlint.standards.thermal import (
    cooling_group,
    corrected_rise_limit,
    insulation_max_temperature,
    reference_temperature_c,
    resistance_at,
    sizing_bands,
    temperature_constant,
    thermal_class_limit,
    thermal_table,
    torque_per_rotor_volume,
)
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


# --- IEC 60034-30-1 minimum efficiencies (50 Hz) ----------------------------------------------
# Published values: SI 2021/745 Schedule 16, Tables 21-23 (the same limits as Regulation (EU)
# 2019/1781 Annex I), as transcribed in REFERENCES.md section 2. Cells compared with the
# published tables there: 2/4/6 poles at 0.75-7.5 kW and the whole 4-pole column [R]. The other
# cells (2/6 poles from 11 kW up, all 8-pole cells) were computed from the published
# coefficients in REFERENCES.md and are [D]: they guard the evaluation and rounding but are not an
# outside check.

# kW: {IE class: (2p, 4p, 6p, 8p)} in %
SCHEDULE_16_MINIMUM_50HZ: dict[float, dict[int, tuple[float, float, float, float]]] = {
    0.75: {2: (77.4, 79.6, 75.9, 66.2), 3: (80.7, 82.5, 78.9, 75.0), 4: (83.5, 85.7, 82.7, 78.4)},
    1.5: {2: (81.3, 82.8, 79.8, 74.1), 3: (84.2, 85.3, 82.5, 79.7), 4: (86.5, 88.2, 85.9, 82.6)},
    4.0: {2: (85.8, 86.6, 84.6, 81.9), 3: (88.1, 88.6, 86.8, 84.8), 4: (90.0, 91.1, 89.5, 87.1)},
    11.0: {2: (89.4, 89.8, 88.7, 86.9), 3: (91.2, 91.4, 90.3, 88.6), 4: (92.6, 93.3, 92.3, 90.4)},
    22.0: {2: (91.3, 91.6, 90.9, 89.1), 3: (92.7, 93.0, 92.2, 90.6), 4: (94.0, 94.5, 93.7, 92.1)},
    55.0: {2: (93.2, 93.5, 93.1, 91.0), 3: (94.3, 94.6, 94.1, 92.5), 4: (95.3, 95.7, 95.1, 93.7)},
    110.0: {2: (94.3, 94.5, 94.3, 92.3), 3: (95.2, 95.4, 95.1, 93.7),
            4: (96.0, 96.3, 95.8, 94.7)},
    200.0: {2: (95.0, 95.1, 95.0, 93.5), 3: (95.8, 96.0, 95.8, 94.6),
            4: (96.5, 96.7, 96.3, 95.4)},
}
POLES = (2, 4, 6, 8)


def _cells(verified: bool) -> list[tuple[float, int, int, float]]:
    out = []
    for kw, row in SCHEDULE_16_MINIMUM_50HZ.items():
        for ie_class, cells in row.items():
            for poles, value in zip(POLES, cells, strict=True):
                compared = poles == 4 or (poles in (2, 6) and kw <= 7.5)
                if compared == verified:
                    out.append((kw, ie_class, poles, value))
    return out


@pytest.mark.parametrize(("kw", "ie_class", "poles", "published"), _cells(verified=True))
def test_minimum_matches_si_2021_745_schedule_16_published_table(
    kw: float, ie_class: int, poles: int, published: float
) -> None:
    # 0.75 kW and 200 kW are the ends of Table 28's range; the others lie in between.
    got = line_operated_minimum(ie_class, poles, kw * 1e3).efficiency
    assert got is not None
    assert got * 100 == pytest.approx(published, abs=1e-9)


@pytest.mark.parametrize(("kw", "ie_class", "poles", "computed"), _cells(verified=False))
def test_minimum_regression_guard_on_cells_computed_from_published_coefficients(
    kw: float, ie_class: int, poles: int, computed: float
) -> None:
    # [D] REFERENCES.md rows computed from SI 2021/745 Table 28 coefficients: regression guard.
    got = line_operated_minimum(ie_class, poles, kw * 1e3).efficiency
    assert got is not None
    assert got * 100 == pytest.approx(computed, abs=1e-9)


@pytest.mark.parametrize("kw", [200.0, 250.0, 315.0, 500.0, 1000.0])
def test_200_to_1000_kw_take_the_200_kw_value_eu_2019_1781_annex_i(kw: float) -> None:
    # 4-pole column of the published table [R]; the plateau rule itself is from memory [M].
    assert line_operated_minimum(3, 4, kw * 1e3).efficiency == pytest.approx(0.960)
    assert line_operated_minimum(4, 4, kw * 1e3).efficiency == pytest.approx(0.967)


# Table 27 (0.12-0.55 kW) and Table 28 (0.75-200 kW) coefficients as published in SI 2021/745
# Schedule 16 (transcribed in REFERENCES.md section 2 [R]); the data file must hold them exactly.
SCHEDULE_16_TABLE_28 = {
    "IE2": {"2": (0.2972, -3.3454, 13.0651, 79.077), "4": (0.0278, -1.9247, 10.4395, 80.9761),
            "6": (0.0148, -2.4978, 13.247, 77.5603), "8": (2.1311, -12.029, 26.719, 69.735)},
    "IE3": {"2": (0.3569, -3.3076, 11.6108, 82.2503), "4": (0.0773, -1.8951, 9.2984, 83.7025),
            "6": (0.1252, -2.613, 11.9963, 80.4769), "8": (0.7189, -5.1678, 15.705, 77.074)},
    "IE4": {"2": (0.34, -3.0479, 10.293, 84.8208), "4": (0.2412, -2.3608, 8.446, 86.8321),
            "6": (0.3598, -3.2107, 10.7933, 84.107), "8": (0.6556, -4.7229, 13.977, 80.247)},
}
SCHEDULE_16_TABLE_27 = {
    "IE2": {"2": (22.4864, 27.7603, 37.8091, 82.458), "4": (17.2751, 23.978, 35.5822, 84.9935),
            "6": (-15.9218, -30.258, 16.6861, 79.1838), "8": (6.4855, 9.4748, 36.852, 70.762)},
    "IE3": {"2": (6.8532, 6.2006, 25.1317, 84.0392), "4": (7.6356, 4.8236, 21.0903, 86.0998),
            "6": (-17.361, -44.538, -3.0554, 79.1318), "8": (-0.5896, -25.526, 4.2884, 75.831)},
    "IE4": {"2": (-8.8538, -20.3352, 8.9002, 85.0641), "4": (8.432, 2.6888, 14.6236, 87.6153),
            "6": (-13.0355, -36.9497, -4.3621, 82.0009),
            "8": (-4.9735, -21.453, 2.6653, 79.055)},
}


def test_coefficients_match_si_2021_745_schedule_16_tables_27_and_28() -> None:
    held = coefficient_table()["coefficients"]
    for name, published in (("table_27", SCHEDULE_16_TABLE_27),
                            ("table_28", SCHEDULE_16_TABLE_28)):
        assert {c: {p: tuple(v) for p, v in row.items()} for c, row in held[name].items()} \
            == published


@pytest.mark.parametrize(("ie_class", "poles", "kw", "published"), [
    (3, 4, 0.12, 64.8), (3, 4, 0.55, 80.8), (2, 4, 0.12, 59.1), (2, 2, 0.12, 53.6),
])
def test_small_ratings_match_table_27_values_from_memory(
    ie_class: int, poles: int, kw: float, published: float
) -> None:
    # [M] published minimum values below 0.75 kW recalled from memory (Regulation (EU) 2019/1781
    # Annex I, Table 2); not verified against the text. 0.12 and 0.55 kW are Table 27's ends.
    got = line_operated_minimum(ie_class, poles, kw * 1e3).efficiency
    assert got is not None
    assert got * 100 == pytest.approx(published, abs=1e-9)


def test_table_27_interpolation_rises_between_its_ends_and_stays_below_0_75_kw() -> None:
    # Minimum efficiency grows with rating in every published table (SI 2021/745 Tables 21-23).
    for ie_class in (2, 3, 4):
        for poles in POLES:
            values = [interpolated_percent("table_27", ie_class, poles, kw)
                      for kw in (0.12, 0.18, 0.25, 0.37, 0.55)]
            assert values == sorted(values)
            top = SCHEDULE_16_MINIMUM_50HZ[0.75][ie_class][POLES.index(poles)]
            assert values[-1] < top


def test_between_0_55_and_0_75_kw_only_tabulated_ratings_are_defined() -> None:
    result = line_operated_minimum(3, 4, 650.0)
    assert result.efficiency is None and result.bracket is not None
    assert result.bracket[1] == pytest.approx(0.825)  # 0.75 kW, SI 2021/745 Table 22 [R]
    assert result.bracket[0] == pytest.approx(0.808)  # 0.55 kW, from memory [M]


def test_interpolation_between_tabulated_ratings_lies_between_published_neighbours() -> None:
    # 7.5 kW (formula) between the published 4 and 11 kW cells of SI 2021/745 Table 22 (IE3 4p)
    got = line_operated_minimum(3, 4, 7500.0).efficiency
    assert got is not None and 0.886 < got < 0.914


def test_rounding_is_half_up_to_a_tenth_of_a_percent() -> None:
    assert round_like_published(91.45) == pytest.approx(91.5)
    assert round_like_published(91.4178) == pytest.approx(91.4)


@pytest.mark.parametrize(("args", "reason_word"), [
    ((3, 4, 100.0), "scope"), ((3, 4, 1.2e6), "scope"), ((3, 10, 11e3), "poles"),
    ((1, 4, 11e3), "IE1"),
])
def test_out_of_scope_ratings_give_a_reason_not_a_value(args: tuple, reason_word: str) -> None:
    result = line_operated_minimum(*args)
    assert result.efficiency is None and reason_word in (result.reason or "")


def test_60hz_is_not_guessed() -> None:
    result = line_operated_minimum(3, 4, 11e3, frequency_hz=60.0)
    assert result.efficiency is None and "60 Hz" in (result.reason or "")


def test_ie5_is_20pct_lower_losses_than_ie4_from_memory() -> None:
    # [M] IEC TS 60034-30-2 IE5 about 20 % lower losses than IE4 (approximation, from memory);
    # 11 kW 4-pole IE4 = 93.3 % (SI 2021/745 Table 23 [R]) -> losses 6.7 % -> 5.36 % -> 94.6 %
    assert ie5_from_ie4(0.933) == pytest.approx(0.946)
    result = line_operated_minimum(5, 4, 11e3)
    assert result.approximate and result.efficiency == pytest.approx(0.946)


def test_converter_fed_uses_4_pole_limit_and_is_approximate() -> None:
    result = converter_fed_minimum(4, 11e3, speed_rpm=1500.0)
    assert result.approximate and result.efficiency == pytest.approx(0.933)
    assert converter_fed_minimum(4, 11e3, speed_rpm=12000.0).efficiency is None


def test_highest_class_reached_on_published_11kw_4pole_row() -> None:
    # SI 2021/745 Tables 21-23, 11 kW 4 poles: IE2 89.8, IE3 91.4, IE4 93.3 [R]
    assert highest_class_reached(0.914, 4, 11e3) == 3
    assert highest_class_reached(0.913, 4, 11e3) == 2
    assert highest_class_reached(0.94, 4, 11e3) == 4
    assert highest_class_reached(0.85, 4, 11e3) is None


@pytest.mark.parametrize(("text", "number"), [("IE3", 3), ("ie 4", 4), ("IE6", None),
                                               (None, None), (3, None)])
def test_parse_ie_class(text: object, number: int | None) -> None:
    assert parse_ie_class(text) == number


# --- IEC 60034-1 temperature rise, IEC 60085 classes, IEC 60034-2-1 reference temperatures ----
@pytest.mark.parametrize(("thermal_class", "limit"), [(130, 80.0), (155, 105.0), (180, 125.0)])
def test_rise_limits_iec_60034_1_as_quoted(thermal_class: int, limit: float) -> None:
    # IEC 60034-1 (as quoted [Q]): indirectly air-cooled, resistance method, 40 degC, <= 1000 m
    assert thermal_class_limit(thermal_class) == limit
    assert thermal_class_limit(str(thermal_class)) == limit


def test_rise_limit_class_120_from_memory_and_unknown_classes() -> None:
    assert thermal_class_limit(120) == 75.0  # [M] from memory
    for unknown in (200, 131, "F", None, 130.5, True, float("nan")):
        assert thermal_class_limit(unknown) is None


@pytest.mark.parametrize(("thermal_class", "celsius"),
                         [(105, 105.0), (120, 120.0), (130, 130.0), (155, 155.0), (180, 180.0)])
def test_insulation_max_temperature_iec_60085_as_quoted(thermal_class: int, celsius: float) -> None:
    assert insulation_max_temperature(thermal_class) == pytest.approx(celsius + 273.15)


def test_reference_temperatures_iec_60034_2_1_from_memory() -> None:
    # [M] IEC 60034-2-1 reference temperatures 95/115/135 degC for classes 130/155/180
    assert [reference_temperature_c(c) for c in (130, 155, 180, 120)] == [95.0, 115.0, 135.0,
                                                                          None]


def test_site_corrections_from_memory() -> None:
    # [M] IEC 60034-1 site corrections: (coolant - 40) K for 40-60 degC; 1 %/100 m above 1000 m
    assert corrected_rise_limit(105.0, 50.0, None).value == pytest.approx(95.0)
    assert corrected_rise_limit(105.0, 40.0, 2000.0).value == pytest.approx(105.0 * 0.9)
    assert corrected_rise_limit(105.0, 25.0, None).value == pytest.approx(105.0)
    assert corrected_rise_limit(80.0, 70.0, None).beyond_rules
    # [Q] 1000-4000 m with an unspecified ambient: no adjustment
    unstated = corrected_rise_limit(105.0, None, 3000.0)
    assert unstated.value == pytest.approx(105.0) and unstated.notes
    assert corrected_rise_limit(105.0, None, 4500.0).beyond_rules


# --- winding resistance versus temperature (REFERENCES.md section 5) ---------------------------
@pytest.mark.parametrize(("t2", "expected"), [(75.0, 1.21569), (115.0, 1.37255),
                                              (155.0, 1.52941)])
def test_resistance_at_copper_vectors_derived_from_iec_60034_rule(t2: float,
                                                                  expected: float) -> None:
    # [D] arithmetic from R2/R1 = (235 + t2)/(235 + t1), k = 235 for copper (IEC 60034-1 [M])
    assert resistance_at(1.0, 20.0, t2) == pytest.approx(expected, abs=5e-6)


def test_resistance_stated_at_25_instead_of_20_degc_differs_by_260_over_255() -> None:
    # [D] REFERENCES.md section 5
    assert resistance_at(1.0, 20.0, 25.0) == pytest.approx(260 / 255)


def test_aluminium_constant_and_iec_60228_constants() -> None:
    assert resistance_at(1.0, 20.0, 115.0, "aluminium") == pytest.approx(340 / 245)  # k=225 [M]
    assert temperature_constant("aluminum") == 225.0
    assert temperature_constant("copper", "iec_60228") == 234.5  # IEC 60228 as quoted [Q]
    assert temperature_constant("aluminium", "iec_60228") == 228.0  # [Q]
    assert resistance_at(1.0, 20.0, 100.0, "silver") != resistance_at(1.0, 20.0, 100.0)
    assert resistance_at(1.0, -300.0, 20.0) != resistance_at(1.0, -300.0, 20.0)  # NaN


# --- sizing bands -------------------------------------------------------------------------------
def test_torque_per_rotor_volume_is_torque_over_rotor_volume() -> None:
    # T = 2 sigma V_r (Miller 1989 [M]); 100 N*m on a 0.1 m x 0.2 m rotor -> 63.66 kN*m/m^3 [D]
    assert torque_per_rotor_volume(100.0, 0.1, 0.2) == pytest.approx(63662.0, rel=1e-5)
    assert torque_per_rotor_volume(100.0, 0.0, 0.2) != torque_per_rotor_volume(100.0, 0.0, 0.2)


@pytest.mark.parametrize(("code", "group"), [
    ("IC411", "fan"), ("IC 416", "fan"), ("ic410", "natural"), ("IC4A0A0", "natural"),
    ("IC71W", "liquid"), ("IC3A1W7", "liquid"), ("IC01", "fan"), ("air", "unknown"),
    (None, "unknown"), ("IC", "unknown"),
])
def test_cooling_group_reads_iec_60034_6_codes_from_memory(code: object, group: str) -> None:
    assert cooling_group(code) == group


def test_every_data_file_names_source_edition_and_provenance() -> None:
    for table in (coefficient_table(), thermal_table(), sizing_bands()):
        for key in ("source", "edition", "provenance"):
            assert isinstance(table[key], str) and table[key]
    assert "from memory" in sizing_bands()["provenance"]
    assert sizing_bands() is sizing_bands()  # read once
