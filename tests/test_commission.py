"""``sheetlint commission``: the parameter set against hand calculations, identification
results against the sheet, and the three output formats.

Each check against an outside source names it beside the arithmetic, written out by hand:
the 235 rule of IEC 60034-1 / IEC 60034-2-1 (from memory; REFERENCES.md §5), ψ = Ke/(√(3/2)·p)
of the amplitude-invariant dq model (R. Krishnan, *Permanent Magnet Synchronous and Brushless
DC Motor Drives*, CRC 2010; REFERENCES.md §4), the DC link of a six-pulse diode bridge at no
load, √2·U_mains (power-electronics texts; REFERENCES.md §8), the NdFeB remanence coefficient
−0.11 %/K (magnet makers' technical notes, as quoted; REFERENCES.md §6). Bands marked
"common practice" have no published source.
"""

from __future__ import annotations

import csv
import io
import json
import math
from pathlib import Path

import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from sheetlint.commission.command import CommissionProblem, commission
from sheetlint.commission.measured import measured_file_schema
from sheetlint.commission.report import render_csv, render_json, render_text

ROOT = Path(__file__).resolve().parents[1]
FIXTURES = ROOT / "fixtures"
MEASURED = FIXTURES / "commissioning"
PUMP_160K = str(FIXTURES / "consistent-spm-160k-raw-water-pump.yaml")  # NHE-PM 160-15
DOSING_5K5 = str(FIXTURES / "consistent-spm-5k5-dosing-pump.yaml")  # AQ-DP 5.5-30
BLOWER_45K = str(FIXTURES / "consistent-ipm-45k-blower.yaml")  # KB-450 IPM
RPM = 2 * math.pi / 60  # rad/s per r/min


def _params(path: str) -> dict[str, object]:
    return {p.name: p for p in commission(path).parameters}


# --- the parameter set against hand calculations ------------------------------------------------
def test_flux_linkage_of_the_160_kw_pump_is_ke_over_sqrt_three_halves_p_by_the_dq_model():
    # dq model (Krishnan 2010; REFERENCES §4): Ke[V·s/rad, line rms] = √(3/2)·p·ψ.
    # Sheet: Ke = 426.2 V/krpm line rms at 20 °C, 10 poles → p = 5.
    # Ke = 426.2 / (1000 · 2π/60) = 426.2 / 104.71976 = 4.069910 V·s/rad
    # ψ = 4.069910 / (1.2247449 · 5) = 4.069910 / 6.1237244 = 0.664614 Wb (peak per phase)
    p = _params(PUMP_160K)
    psi = p["flux_linkage_20c"]
    assert psi.value == pytest.approx(0.6646, abs=0.00005)
    assert (psi.unit, psi.provenance, psi.rule) == ("Wb", "derived", "emf-constant")
    assert p["pole_pairs"].value == 5


def test_flux_linkage_of_the_dosing_pump_by_the_dq_model():
    # Sheet: Ke = 123.5 V/krpm, 6 poles → p = 3.
    # Ke = 123.5 / 104.71976 = 1.179338 V·s/rad; ψ = 1.179338 / (1.2247449 · 3) = 0.320975 Wb
    assert _params(DOSING_5K5)["flux_linkage_20c"].value == pytest.approx(0.3210, abs=0.00005)


def test_hot_resistance_follows_the_235_rule_of_iec_60034_1():
    # IEC 60034-1 temperature correction (k = 235 for copper, from memory; REFERENCES §5):
    # R₂ = R₁·(235 + θ₂)/(235 + θ₁). Sheet: 0.01778 Ω per phase at 20 °C; winding at
    # 40 °C coolant + 80 K rise = 120 °C.
    # R_120 = 0.01778 · 355 / 255 = 0.01778 · 1.392157 = 0.024753 Ω
    p = _params(PUMP_160K)
    hot = p["resistance_hot"]
    assert hot.value == pytest.approx(0.02475, abs=0.000005)
    assert "120 °C" in hot.label and hot.unit == "ohm"
    assert p["resistance_20c"].value == pytest.approx(0.01778) and \
        p["resistance_20c"].provenance == "stated"


def test_a_resistance_stated_at_25_c_is_brought_to_20_c_by_the_235_rule(tmp_path):
    # REFERENCES §5 vector [D]: a value at 25 °C differs from the 20 °C one by 260/255.
    # 0.4431 Ω at 25 °C → 0.4431 · 255/260 = 0.4431 · 0.980769 = 0.434579 Ω at 20 °C.
    text = Path(DOSING_5K5).read_text(encoding="utf-8").replace(
        "value: 0.4346\n    unit: ohm\n    basis: phase\n    temperature: 20 °C",
        "value: 0.4431\n    unit: ohm\n    basis: phase\n    temperature: 25 °C")
    path = tmp_path / "at25.yaml"
    path.write_text(text, encoding="utf-8")
    r20 = _params(str(path))["resistance_20c"]
    assert r20.value == pytest.approx(0.4346, abs=0.00005)
    assert (r20.provenance, r20.rule) == ("derived", "temperature-rise")


def test_hot_back_emf_constant_by_the_ndfeb_remanence_coefficient():
    # Magnet makers' notes, as quoted (REFERENCES §6): NdFeB −0.11 %/K.
    # Ke(100 °C) = 426.2 · (1 − 0.0011 · 80) = 426.2 · 0.912 = 388.69 V/krpm
    # ψ(100 °C) = 0.664614 · 0.912 = 0.606128 Wb
    p = _params(PUMP_160K)
    assert p["ke_hot"].value == pytest.approx(388.7, abs=0.05)
    assert p["flux_linkage_hot"].value == pytest.approx(0.6061, abs=0.00005)


def test_speed_at_which_the_back_emf_reaches_the_dc_link():
    # Diode front end at no load (REFERENCES §8): U_dc = √2 · 690 V = 975.81 V.
    # Peak line back-EMF √2·Ke·ω reaches U_dc at ω = U_dc/(√2·Ke) = 690 / 4.069910
    # = 169.537 rad/s = 169.537 · 60/(2π) = 1618.96 r/min (cold magnets, 20 °C).
    p = _params(PUMP_160K)
    assert p["dc_link_voltage"].value == pytest.approx(975.8, abs=0.05)
    assert p["dc_link_speed"].value == pytest.approx(1619, abs=0.5)
    # dosing pump on 400 V: ω = 400 / 1.179338 = 339.173 rad/s = 3238.9 r/min
    assert _params(DOSING_5K5)["dc_link_speed"].value == pytest.approx(3239, abs=0.5)


def test_standstill_voltage_for_rated_current_is_sqrt3_i_r_hot():
    # At zero speed the impedance is R alone (common practice, REFERENCES §9):
    # U = √3 · 160.8 A · 0.0247525 Ω = 6.894 V line
    assert _params(PUMP_160K)["standstill_voltage"].value == pytest.approx(6.894, abs=0.0005)


def test_each_parameter_names_its_unit_basis_and_provenance():
    for p in commission(BLOWER_45K).parameters:
        assert p.provenance in ("stated", "derived", "estimate")
        assert p.provenance == "stated" or p.rule, p
        assert p.unit or p.name in ("power_factor", "pole_pairs"), p
    units = {p.name: p.unit for p in commission(BLOWER_45K).parameters}
    assert units["rated_voltage"] == "V" and units["rated_speed"] == "r/min"
    assert units["ld"] == "mH" and units["ke_20c"] == "V/krpm"


def test_a_rated_voltage_the_sheet_lacks_is_an_estimate_with_its_basis(tmp_path):
    text = Path(PUMP_160K).read_text(encoding="utf-8").replace("  voltage: 621.0 V\n", "")
    path = tmp_path / "no-voltage.yaml"
    path.write_text(text, encoding="utf-8")
    voltage = _params(str(path))["rated_voltage"]
    assert voltage.provenance == "estimate" and voltage.rule == "voltage-margin"
    # regression guard: the usual margin over the hot back-EMF (583 V) lands near 621 V
    assert 600 < voltage.value < 640


# --- the checklist --------------------------------------------------------------------------------
def test_checklist_flags_the_planted_overspeed_and_low_voltage():
    items = {rule: i for i in commission(
        str(FIXTURES / "planted-emf-above-voltage.yaml")).checklist for rule in i.rules}
    assert items["overspeed-emf"].status == "attention"
    assert items["voltage-margin"].status == "attention"
    consistent = {rule: i for i in commission(PUMP_160K).checklist for rule in i.rules}
    assert consistent["overspeed-emf"].status == "ok"
    assert consistent["voltage-margin"].status == "ok"
    assert consistent["pull-out-margin"].status == "ok"


# --- expected identification results ------------------------------------------------------------
def test_expected_line_resistance_at_24_c_is_twice_the_phase_value_by_the_235_rule():
    # R_phase(24 °C) = 0.01778 · (235 + 24)/(235 + 20) = 0.01778 · 259/255 = 0.0180590 Ω;
    # terminal to terminal in star: 2 · 0.0180590 = 0.0361180 Ω
    result = commission(PUMP_160K, test_temperature=24.0, test_speed=1000.0)
    expected = {p.name: p for p in result.identification.expected}
    assert expected["resistance_line"].value == pytest.approx(0.03612, abs=0.000005)
    assert expected["resistance_phase"].value == pytest.approx(0.01806, abs=0.000005)
    # back-EMF at 1000 r/min, magnets at 24 °C: 426.2 · (1 − 0.0011·4) = 424.325 V line rms
    assert expected["emf_voltage"].value == pytest.approx(424.3, abs=0.05)


# --- measured files -----------------------------------------------------------------------------
@pytest.mark.parametrize(("record", "measured"), [
    (PUMP_160K, "consistent-nhe-pm-160-15-at-24c.measured"),
    (BLOWER_45K, "consistent-kb-450-ipm-at-38c.measured"),
    (PUMP_160K, "consistent-nhe-pm-160-15-through-cable.measured"),
])
def test_consistent_identification_raises_nothing(record, measured):
    result = commission(record, str(MEASURED / measured))
    assert result.identification.findings == []
    assert {c.verdict for c in result.identification.comparisons} == {"agrees"}
    assert len(result.identification.comparisons) >= 3


def _measured_file(tmp_path: Path, body: str) -> str:
    path = tmp_path / "measured.measured"
    path.write_text(body, encoding="utf-8")
    return str(path)


@pytest.mark.parametrize("celsius", [20.0, 30.0, 40.0])
def test_consistent_identification_at_20_to_40_c_raises_nothing(tmp_path, celsius):
    # Values worked out by hand from the sheet (NHE-PM 160-15) with the 235 rule and the NdFeB
    # coefficient, rounded to 3 significant digits as a converter shows them:
    # R_line(θ) = 2 · 0.01778 · (235 + θ)/255; E(1000 r/min, θ) = 426.2 · (1 − 0.0011·(θ − 20))
    r_line = 2 * 0.01778 * (235 + celsius) / 255
    emf = 426.2 * (1 - 0.0011 * (celsius - 20))
    path = _measured_file(tmp_path, f"""machine: NHE-PM 160-15
identification:
  resistance: {{value: {r_line:.3g}, unit: ohm, basis: line, temperature: {celsius:g} °C}}
  ld: 0.900 mH
  lq: 0.900 mH
  emf: {{voltage: {emf:.3g} V, speed: 1000 rpm, magnet_temperature: {celsius:g} °C}}
""")
    assert commission(PUMP_160K, path).identification.findings == []


def test_unstated_temperatures_are_the_plant_room_interval(tmp_path):
    # 0.0365 Ω line is the sheet's value at 29 °C (2·0.01778·264/255 = 0.03682): inside 10–40 °C
    path = _measured_file(tmp_path, """machine: NHE-PM 160-15
identification:
  resistance: {value: 0.0365, unit: ohm, basis: line}
  emf: {voltage: 420 V, speed: 1000 rpm}
""")
    assert commission(PUMP_160K, path).identification.findings == []


@pytest.mark.parametrize(("record", "measured", "field", "cause"), [
    (PUMP_160K, "planted-line-entered-as-phase.measured", "identification.resistance",
     "measured line-to-line (terminal to terminal) but entered per phase"),
    (PUMP_160K, "planted-cable-included.measured", "identification.resistance",
     "cable resistance included"),
    (PUMP_160K, "planted-milliohm-as-ohm.measured", "identification.resistance",
     "mΩ written as Ω"),
    (PUMP_160K, "planted-emf-measured-hot.measured", "identification.emf",
     "back-EMF measured hot"),
    (PUMP_160K, "planted-ke-per-phase.measured", "identification.emf", "Ke per phase"),
    (BLOWER_45K, "planted-ld-lq-swapped.measured", "identification.ld", "Ld and Lq swapped"),
])
def test_each_planted_cause_is_named_on_its_field(record, measured, field, cause):
    findings = commission(record, str(MEASURED / measured)).identification.findings
    assert len(findings) == 1, findings
    finding = findings[0]
    assert finding.severity in ("warning", "error")
    assert finding.fields[0] == field
    assert finding.cause is not None and cause in finding.cause


def test_the_hot_emf_cause_finds_the_magnet_temperature():
    # 393 V at 1000 r/min against 426.2 V at 20 °C: 393/426.2 = 0.92210 = 1 − 0.0011·Δθ
    # → Δθ = 70.8 K → magnets at about 91 °C
    finding = commission(PUMP_160K, str(MEASURED / "planted-emf-measured-hot.measured")
                         ).identification.findings[0]
    assert "about 91 °C" in (finding.cause or "")


def test_an_unstated_basis_that_a_reading_reconciles_asks_for_the_basis(tmp_path):
    path = _measured_file(tmp_path, """machine: NHE-PM 160-15
identification:
  resistance: {value: 0.0361, unit: ohm, temperature: 24 °C}
""")
    finding = commission(PUMP_160K, path).identification.findings[0]
    assert finding.severity == "warning"
    assert "please state it" in (finding.cause or "")


def test_a_delta_branch_entered_as_phase_is_named(tmp_path):
    # Delta machine: the star-equivalent phase is a third of a branch (DESIGN.md "Bases").
    text = Path(DOSING_5K5).read_text(encoding="utf-8").replace("connection: star",
                                                                 "connection: delta")
    record = tmp_path / "delta.yaml"
    record.write_text(text, encoding="utf-8")
    # branch at 20 °C: 3 · 0.4346 = 1.3038 Ω
    path = _measured_file(tmp_path, """machine: AQ-DP 5.5-30
identification:
  resistance: {value: 1.30, unit: ohm, basis: phase, temperature: 20 °C}
""")
    finding = commission(str(record), path).identification.findings[0]
    assert "delta branch" in (finding.cause or "")
    ok = _measured_file(tmp_path, """machine: AQ-DP 5.5-30
identification:
  resistance: {value: 1.30, unit: ohm, basis: delta_branch, temperature: 20 °C}
""")
    assert commission(str(record), ok).identification.findings == []


# --- bad input -----------------------------------------------------------------------------------
def test_a_measured_file_for_another_machine_is_an_error():
    with pytest.raises(CommissionProblem, match="machine: 'NHE-PM 160-10' does not match"):
        commission(PUMP_160K, str(MEASURED / "planted-other-machine.measured"))


@pytest.mark.parametrize(("body", "names"), [
    ("machine: NHE-PM 160-15\nidentification:\n  resistance: 0.0361 ohm/m\n",
     "identification.resistance"),
    ("machine: NHE-PM 160-15\nidentification:\n  ld: 0.9 V\n", "identification.ld"),
    ("machine: NHE-PM 160-15\nidentification:\n  emf: {voltage: 424 V}\n", "identification.emf"),
    ("machine: NHE-PM 160-15\nidentification:\n  resistence: 0.0361 ohm\n", "resistence"),
    ("machine: NHE-PM 160-15\n", "identification"),
    ("machine: NHE-PM 160-15\nidentification:\n  resistance: {value: -1, unit: ohm}\n",
     "identification.resistance"),
    ("machine: NHE-PM 160-15\nidentification:\n  emf: {voltage: 4 V, speed: 100 Hz}\n",
     "identification.emf.speed"),
    ("- a list\n", "(file)"),
])
def test_bad_measured_input_names_the_field(tmp_path, body, names):
    path = _measured_file(tmp_path, body)
    with pytest.raises(CommissionProblem) as info:
        commission(PUMP_160K, path)
    assert names in str(info.value) and path in str(info.value)


def test_every_measured_fixture_fits_the_schema():
    import jsonschema
    import yaml

    validator = jsonschema.Draft202012Validator(measured_file_schema())
    validator.check_schema(measured_file_schema())
    for path in MEASURED.glob("*.measured"):
        validator.validate(yaml.safe_load(path.read_text(encoding="utf-8")))


# --- output formats -----------------------------------------------------------------------------
def test_json_text_and_csv_carry_the_same_values():
    result = commission(PUMP_160K, str(MEASURED / "planted-cable-included.measured"))
    data = json.loads(render_json(result))
    rows = list(csv.DictReader(io.StringIO(render_csv(result), newline="")))
    text = render_text(result)
    by_name = {r["name"]: r for r in rows if r["section"] == "parameter"}
    assert [p["name"] for p in data["parameters"]] == list(by_name)
    for entry in data["parameters"]:
        row = by_name[entry["name"]]
        assert float(row["value"]) == entry["value"]
        assert row["unit"] == entry["unit"] and row["provenance"] == entry["provenance"]
        assert row["value"] in text
    expected_rows = {r["name"]: r for r in rows if r["section"] == "expected"}
    for entry in data["identification"]["expected"]["values"]:
        assert float(expected_rows[entry["name"]]["value"]) == entry["value"]
    measured_rows = [r for r in rows if r["section"] == "measured"]
    for entry, row in zip(data["identification"]["comparisons"], measured_rows, strict=True):
        assert float(row["value"]) == entry["measured"] and row["provenance"] == entry["verdict"]
    findings = [r for r in rows if r["section"] == "finding"]
    assert len(findings) == len(data["identification"]["findings"]) == 1
    assert data["id"] == "NHE-PM 160-15" and data["tool"] == "sheetlint"
    assert any("voltage at its terminals" in c for c in data["cautions"])
    assert "voltage at its terminals" in text


def test_csv_is_a_plain_rectangular_table_a_spreadsheet_opens():
    # RFC 4180: one header row, the same number of fields in every row, CRLF line ends;
    # read back with the csv module and the spreadsheet dialect "excel"
    out = render_csv(commission(BLOWER_45K, str(MEASURED / "planted-ld-lq-swapped.measured")))
    assert out.endswith("\r\n") and "\r\n" in out
    rows = list(csv.reader(io.StringIO(out, newline=""), dialect="excel"))
    assert rows[0][:4] == ["section", "name", "label", "value"]
    assert {len(r) for r in rows} == {len(rows[0])}
    for row in rows[1:]:
        if row[3]:
            float(row[3])  # every value cell is a plain number


# --- what the sheet leaves out ------------------------------------------------------------------
def test_without_a_stated_rise_the_hot_resistance_is_at_the_class_reference_temperature(
        tmp_path):
    # IEC 60034-2-1 reference temperature for thermal class 155 (F): 115 °C (from memory,
    # REFERENCES §5); 235 rule: R_115 = 0.4346 · (235 + 115)/(235 + 20) = 0.4346 · 350/255
    # = 0.596510 Ω
    text = Path(DOSING_5K5).read_text(encoding="utf-8").replace("  temperature_rise: 80 K\n",
                                                                 "")
    path = tmp_path / "no-rise.yaml"
    path.write_text(text, encoding="utf-8")
    hot = _params(str(path))["resistance_hot"]
    assert hot.value == pytest.approx(0.5965, abs=0.00005)
    assert "115 °C" in hot.label


def test_the_entries_a_sheet_lacks_are_listed_with_the_field_that_supplies_them():
    data = json.loads(render_json(commission(PUMP_160K)))
    assert {m["field"] for m in data["missing"]} == {"machine.inertia", "limits.peak_current"}


def test_a_measured_value_the_sheet_cannot_be_compared_with_is_said_so(tmp_path):
    record = tmp_path / "bare.yaml"
    record.write_text("id: Invented PMX-15 (invented)\nmachine: {topology: spm, poles: 8}\n"
                      "rated: {power: 15 kW, speed: 1500 rpm}\n", encoding="utf-8")
    path = _measured_file(tmp_path, "machine: Invented PMX-15 (invented)\nidentification:\n"
                                    "  resistance: 0.3 ohm\n  ld: 2 mH\n")
    result = commission(str(record), path)
    assert result.identification.comparisons == [] and result.identification.findings == []
    assert [n.split(":")[0] for n in result.identification.not_compared] == ["resistance", "ld"]
    assert "nothing compared" in render_text(result)


def test_an_implausible_measurement_temperature_is_a_file_error(tmp_path):
    path = _measured_file(tmp_path, "machine: NHE-PM 160-15\nidentification:\n"
                                    "  resistance: {value: 0.0361, unit: ohm, temperature: "
                                    "297 °C}\n")
    with pytest.raises(CommissionProblem, match=r"identification\.resistance\.temperature"):
        commission(PUMP_160K, path)


# --- no input makes a traceback -----------------------------------------------------------------
_NUMBERS = st.one_of(st.floats(allow_nan=True, allow_infinity=True), st.integers(-10**6, 10**6))
_UNITS = st.sampled_from(["ohm", "mohm", "mH", "uH", "V", "rpm", "V/krpm", "°C", "K", "Hz", "",
                          "kg", "V*s/rad", "ohm/m"])
_TEXTS = st.builds(lambda n, u: f"{n} {u}", _NUMBERS, _UNITS)
_SCALARS = st.one_of(st.none(), st.booleans(), _NUMBERS, _TEXTS, st.text(max_size=8))
_QUALIFIED = st.fixed_dictionaries(
    {"value": st.one_of(_NUMBERS, st.text(max_size=6), st.none())},
    optional={"unit": _UNITS, "basis": st.sampled_from(["phase", "line", "delta_branch",
                                                        "line_rms", "phase_peak", "x"]),
              "temperature": st.one_of(_TEXTS, _NUMBERS), "magnet_temperature": _TEXTS,
              "voltage": _TEXTS, "speed": _TEXTS, "constant": _TEXTS})
_ENTRY = st.one_of(_SCALARS, _QUALIFIED, st.lists(_SCALARS, max_size=2))


@settings(max_examples=60, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@example({"resistance": {"value": 1, "unit": "ohm", "basis": "line_rms"}}, "NHE-PM 160-15")
@given(st.dictionaries(st.sampled_from(["resistance", "ld", "lq", "emf", "cable"]), _ENTRY,
                       max_size=4),
       st.sampled_from(["NHE-PM 160-15", "other", 7]))
def test_any_measured_file_gives_a_result_or_a_message_never_a_traceback(tmp_path, body,
                                                                         machine):
    path = tmp_path / "fuzz.json"
    path.write_text(json.dumps({"machine": machine, "identification": body}), encoding="utf-8")
    try:
        result = commission(PUMP_160K, str(path))
    except CommissionProblem as exc:
        assert str(path) in str(exc)
        return
    render_json(result), render_csv(result), render_text(result)


def test_a_stated_cable_is_taken_off_before_comparing(tmp_path):
    # Loop of two copper conductors (IEC 60028 annealed copper, 1/58 Ω·mm²/m at 20 °C, from
    # memory): R = 2 · 0.017241 · 30 m / 50 mm² = 0.020690 Ω line-to-line.
    # 0.0568 − 0.02069 = 0.03611 Ω, the sheet's 0.036118 Ω at 24 °C (235 rule, IEC 60034-1).
    path = _measured_file(tmp_path, """machine: NHE-PM 160-15
identification:
  resistance: {value: 0.0568, unit: ohm, basis: line, temperature: 24 °C}
  cable: {length: 30 m, cross_section: 50 mm2}
""")
    result = commission(PUMP_160K, path)
    assert result.identification.findings == []
    comparison = result.identification.comparisons[0]
    assert comparison.measured == "0.03611" and "20.7 mΩ" in comparison.note


def test_a_cable_larger_than_the_measurement_is_an_error_naming_the_cable(tmp_path):
    path = _measured_file(tmp_path, """machine: NHE-PM 160-15
identification:
  resistance: {value: 0.0100, unit: ohm, basis: line, temperature: 24 °C}
  cable: {length: 300 m, cross_section: 10 mm2, conductor: aluminium}
""")
    finding = commission(PUMP_160K, path).identification.findings[0]
    assert finding.severity == "error" and finding.fields[0] == "identification.cable"


def test_a_cross_section_that_is_not_an_area_names_the_field(tmp_path):
    path = _measured_file(tmp_path, """machine: NHE-PM 160-15
identification:
  resistance: 0.0361 ohm
  cable: {length: 30 m, cross_section: 50 mm}
""")
    with pytest.raises(CommissionProblem, match=r"identification\.cable\.cross_section"):
        commission(PUMP_160K, path)


# --- doubts of the record check travel with the values ------------------------------------------
PLANTED_KE = str(FIXTURES / "planted-ke-per-phase.yaml")  # Ke per phase, basis unstated


def test_values_resting_on_a_doubted_field_carry_the_doubt():
    p = _params(PLANTED_KE)
    assert any("per phase" in d for d in p["ke_20c"].doubts)
    assert any("per phase" in d for d in p["flux_linkage_20c"].doubts)
    assert not p["resistance_20c"].doubts
    items = {i.item.split(" (")[0]: i for i in commission(PLANTED_KE).checklist}
    assert items["motor data the record check doubts"].status == "attention"
    assert {i.status for i in commission(PUMP_160K).checklist if i.item.startswith(
        "motor data the record check doubts")} == {"ok"}


def test_an_unstated_ke_basis_gives_the_dc_link_speed_at_the_unsafe_end():
    # DESIGN.md "Judgement": safety on the unsafe end; Ke's basis unstated admits a per-phase
    # reading, √3 times higher. Ke = 71.3 V/krpm = 71.3/104.71976 = 0.680867 V·s/rad;
    # DC link √2·400 V (REFERENCES §8): line reading ω = 400/0.680867 = 587.49 rad/s
    # = 5610.1 r/min; per-phase reading 5610.1/√3 = 3239.0 r/min.
    p = _params(PLANTED_KE)
    assert p["dc_link_speed"].value == pytest.approx(5610, abs=0.5)
    unsafe = p["dc_link_speed_if_per_phase"]
    assert unsafe.value == pytest.approx(3239, abs=0.5) and unsafe.provenance == "estimate"
    assert "dc_link_speed_if_per_phase" not in _params(PUMP_160K)  # basis stated there


def test_measurements_on_other_bases_are_converted_before_comparing(tmp_path):
    # DESIGN.md "Bases": phase of the equivalent star; terminal to terminal = 2 × phase.
    # R_phase(24 °C) = 0.01778 · 259/255 = 0.018059 Ω → written 0.0181 Ω (phase);
    # Ld line = 2 · 0.91 mH = 1.82 mH; back-EMF at 1000 r/min, 24 °C: 424.3 V line rms
    # = 424.3 · √2/√3 = 424.3 · 0.816497 = 346.4 V peak per phase.
    path = _measured_file(tmp_path, """machine: NHE-PM 160-15
identification:
  resistance: {value: 0.0181, unit: ohm, basis: phase, temperature: 24 °C}
  ld: {value: 1.82, unit: mH, basis: line}
  emf: {voltage: 346 V, speed: 1000 rpm, basis: phase_peak, magnet_temperature: 24 °C}
""")
    result = commission(PUMP_160K, path)
    assert result.identification.findings == []
    assert [c.basis for c in result.identification.comparisons] == ["phase", "line",
                                                                    "phase_peak"]
    # the same file with the inductance labelled phase is the line-as-phase slip
    slipped = _measured_file(tmp_path, Path(path).read_text(encoding="utf-8")
                             .replace("basis: line}", "basis: phase}"))
    finding = commission(PUMP_160K, slipped).identification.findings[0]
    assert finding.fields[0] == "identification.ld" and "line-to-line" in (finding.cause or "")


def test_the_committed_measured_file_schema_is_the_one_the_code_uses():
    committed = json.loads((ROOT / "sheetlint" / "commission" / "measured-file.schema.json")
                           .read_text(encoding="utf-8"))
    assert committed == json.loads(json.dumps(measured_file_schema())), (
        "regenerate it: python -m sheetlint.commission.measured > "
        "sheetlint/commission/measured-file.schema.json")


def test_the_measured_file_picks_its_record_from_a_file_of_several(tmp_path):
    import yaml

    records = [yaml.safe_load(Path(p).read_text(encoding="utf-8"))
               for p in (DOSING_5K5, PUMP_160K)]
    catalogue = tmp_path / "catalogue.yaml"
    catalogue.write_text(yaml.safe_dump({"records": records}, allow_unicode=True),
                         encoding="utf-8")
    measured = str(MEASURED / "consistent-nhe-pm-160-15-at-24c.measured")
    result = commission(str(catalogue), measured)
    assert result.id == "NHE-PM 160-15" and result.identification.findings == []
    assert commission(str(catalogue), record_id="AQ-DP 5.5-30").id == "AQ-DP 5.5-30"
    with pytest.raises(CommissionProblem, match="holds 2 records; choose one with --id"):
        commission(str(catalogue))


def _variant(tmp_path: Path, source: str, old: str, new: str, name: str) -> str:
    text = Path(source).read_text(encoding="utf-8")
    assert old in text
    path = tmp_path / name
    path.write_text(text.replace(old, new), encoding="utf-8")
    return str(path)


def test_an_aluminium_winding_follows_the_225_rule(tmp_path):
    # IEC 60034-1 temperature correction, k = 225 for aluminium (from memory; REFERENCES §5):
    # R_phase(30 °C) = 0.01778 · (225 + 30)/(225 + 20) = 0.01778 · 255/245 = 0.018506 Ω;
    # terminal to terminal 0.037011 Ω (with k = 235 it would be 0.036815 Ω).
    record = _variant(tmp_path, PUMP_160K, "  connection: star\n",
                      "  connection: star\n  conductor: aluminium\n", "alu.yaml")
    expected = {p.name: p for p in commission(record, test_temperature=30.0)
                .identification.expected}
    assert expected["resistance_line"].value == pytest.approx(0.03701, abs=0.000005)


def test_a_samarium_cobalt_back_emf_follows_its_own_coefficient(tmp_path):
    # SmCo −0.035 %/K (magnet makers' notes as quoted, REFERENCES §6): at 40 °C
    # E(1000 r/min) = 426.2 · (1 − 0.00035 · 20) = 426.2 · 0.993 = 423.22 V line rms;
    # NdFeB would give 426.2 · (1 − 0.0011 · 20) = 416.82 V.
    record = _variant(tmp_path, PUMP_160K, "  connection: star\n",
                      "  connection: star\n  magnet: SmCo\n", "smco.yaml")
    expected = {p.name: p for p in commission(record, test_temperature=40.0,
                                              test_speed=1000.0).identification.expected}
    assert expected["emf_voltage"].value == pytest.approx(423.2, abs=0.05)
