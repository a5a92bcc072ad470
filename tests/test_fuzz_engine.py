"""Fuzzing the model and the engine: every record gives findings or a clear error, never a crash.

Records start from a consistent demo machine (so that every relation runs) and have some fields
replaced by hostile values: extreme magnitudes, zero, negatives, text where a number belongs,
booleans, lists, units from a wide alphabet, and the object form with odd qualifiers.
"""

from __future__ import annotations

import copy
import json
from pathlib import Path
from typing import Any

import pytest
import yaml
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from sheetlint.batch import check_file
from sheetlint.engine.run import check_record
from sheetlint.fields import FIELDS
from sheetlint.intake.records import RawRecord

FIXTURES = Path(__file__).resolve().parent.parent / "fixtures"
BASE = yaml.safe_load((FIXTURES / "consistent-ipm-45k-blower.yaml").read_text(encoding="utf-8"))


FUZZ = settings(max_examples=150, deadline=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])

USUAL_UNITS = {
    "power": ["W", "kW", "hp", "MW"], "torque": ["N*m", "Nm", "kNm", "lbf*ft"],
    "speed": ["rpm", "r/min", "min-1", "rad/s"], "frequency": ["Hz", "kHz"],
    "voltage": ["V", "kV", "Vrms"], "current": ["A", "kA", "Arms"], "ratio": ["", "%"],
    "resistance": ["ohm", "mohm", "Ω"], "inductance": ["H", "mH", "uH"],
    "emf_constant": ["V/krpm", "V/rpm", "V*s/rad"], "torque_constant": ["N*m/A", "Nm/A"],
    "flux_linkage": ["Wb", "mWb", "V*s"], "temperature": ["°C", "K", "degF"],
    "temperature_difference": ["K"], "mass": ["kg", "t"], "inertia": ["kg*m**2", "kgcm²"],
    "length": ["m", "mm"], "time": ["s", "min"], "count": [""],
}
MAGNITUDES = st.one_of(
    st.sampled_from([0.0, -0.0, 1e-308, 5e-324, 1e-300, 1e300, 1.7e308, -1e308, 1.0, -1.0,
                     0.5, 2.0, 7.0, 101.0, 1e6]),
    st.floats(min_value=-1e308, max_value=1e308, allow_nan=False, allow_infinity=False),
    st.integers(min_value=-10**6, max_value=10**6),
)
WIDE_ALPHABET = st.characters(codec="utf-8", exclude_categories=("Cs",))
ODD_UNITS = st.one_of(
    st.text(alphabet=WIDE_ALPHABET, max_size=12),
    st.text(alphabet="kmMuµVAWNHzsrpmin/*^()-+ 0123456789.°ΩeE%", max_size=12),
    st.sampled_from(["1/0", "kW**99999", "W*nan", "__class__", "%", "degC", "V/Hz", "Wb",
                     "rad", "1/min", "kg*m**2/s**3", "dimensionless", "W**0.5", "inf"]),
)


def _number_text(x: float | int) -> str:
    return repr(x) if isinstance(x, float) else str(x)


@st.composite
def extreme_value(draw: st.DrawFn, kind: str) -> Any:
    """A readable value with a usual unit and any magnitude (the engine must cope)."""
    magnitude = draw(MAGNITUDES)
    unit = draw(st.sampled_from(USUAL_UNITS.get(kind, [""])))
    if kind in ("count", "ratio") and draw(st.booleans()):
        return magnitude
    if draw(st.booleans()):
        return f"{_number_text(magnitude)} {unit}".strip()
    return {"value": magnitude, "unit": unit} if unit else magnitude


@st.composite
def hostile_value(draw: st.DrawFn, kind: str) -> Any:
    """A readable extreme value (mostly), or a value in an odd form or unit."""
    if draw(st.integers(0, 2)) > 0:
        return draw(extreme_value(kind))
    magnitude = draw(MAGNITUDES)
    unit = draw(st.one_of(st.sampled_from(USUAL_UNITS.get(kind, [""])), ODD_UNITS))
    form = draw(st.integers(0, 9))
    if form == 0:
        return f"{_number_text(magnitude)} {unit}".strip()
    if form == 1:
        return {"value": magnitude, "unit": unit}
    if form == 2:
        return {"value": _number_text(magnitude), "unit": unit,
                "basis": draw(st.sampled_from(["line_rms", "phase_peak", "rms", "peak", "phase",
                                               "line", "delta_branch", "odd"])),
                "temperature": draw(st.one_of(MAGNITUDES, st.just("20 °C"), st.none()))}
    if form == 3:
        return magnitude
    if form == 4:
        return draw(st.booleans())
    if form == 5:
        return draw(st.text(alphabet=WIDE_ALPHABET, max_size=20))
    if form == 6:
        return [magnitude, unit]
    if form == 7:
        return {"unit": unit}
    if form == 8:
        return {"value": draw(st.booleans() | st.none() | st.lists(st.integers(), max_size=2)),
                "unit": unit}
    return draw(st.sampled_from(["nan kW", "inf", "-inf V", "1e400 W", "1e-400 N*m", "0x10 A",
                                 "1,5 kW", "15 kW 20 kW", "", " ", "15  kW", "½ kW"]))


def _set(data: dict[str, Any], path: str, value: Any) -> None:
    parts = path.split(".")
    node = data
    for part in parts[:-1]:
        child = node.get(part)
        if not isinstance(child, dict):
            child = {} if child is None else {"value": child}
            node[part] = child
        node = child
    node[parts[-1]] = value


@st.composite
def hostile_record(draw: st.DrawFn) -> dict[str, Any]:
    data = copy.deepcopy(BASE) if draw(st.booleans()) else {"id": "FZ-1"}
    paths = draw(st.lists(st.sampled_from(sorted(FIELDS)), min_size=1, max_size=8, unique=True))
    for path in paths:
        _set(data, path, draw(hostile_value(FIELDS[path].kind)))
    if draw(st.booleans()):
        data.setdefault("machine", {})
        if isinstance(data["machine"], dict):
            data["machine"]["topology"] = draw(st.sampled_from(["spm", "ipm", "pmasynrm", "IPM",
                                                                "x", 3, None]))
            data["machine"]["thermal_class"] = draw(st.sampled_from(["F", 155, "Z", 1e9, -1,
                                                                     "155.5", None, 7.0]))
    if draw(st.booleans()):
        data["points"] = draw(st.lists(st.fixed_dictionaries({
            "speed": hostile_value("speed"), "torque": hostile_value("torque")}), max_size=3))
    return data


def _outcome_problems(path: str, result: Any) -> list[str]:
    """What is wrong with a check_file result, beyond the known engine failures."""
    problems = []
    errors = [result.error] if result.error else [r.error for r in result.records if r.error]
    for error in errors:
        if path not in error:
            problems.append(f"message does not name the file: {error}")
        if "internal error" in error:
            problems.append(error)
    for record in result.records:
        for finding in record.findings:
            if finding.severity not in ("error", "warning", "info"):
                problems.append(f"bad severity {finding.severity}")
            json.dumps(finding.to_dict(), allow_nan=True)
    return problems


@FUZZ
@given(data=hostile_record(), as_yaml=st.booleans())
@example(data={"id": "FZ-0", "machine": {"poles": 10**400}}, as_yaml=True)
@example(data={"id": "FZ-0", "rated": {"power_factor": 1.2, "efficiency": "101 %"}},
         as_yaml=False)
def test_hostile_record_gives_findings_or_a_clear_error(tmp_path_factory, data, as_yaml):
    folder = tmp_path_factory.mktemp("fz")
    path = folder / ("r.yaml" if as_yaml else "r.json")
    text = (yaml.safe_dump(data, allow_unicode=True) if as_yaml
            else json.dumps(data, ensure_ascii=False))
    path.write_text(text, encoding="utf-8")
    result = check_file(str(path), time_limit=20)
    assert "time limit" not in (result.error or ""), "no record may take seconds"
    assert _outcome_problems(str(path), result) == []


@FUZZ
@given(data=hostile_record())
def test_check_record_raises_nothing(data):
    result = check_record(RawRecord(data, None, ""))
    assert result.error is None or isinstance(result.error, str)


@FUZZ
@given(scale=st.sampled_from([1e-300, 1e-200, 1e200, 1e300]),
       fields=st.lists(st.sampled_from(sorted(FIELDS)), min_size=1, max_size=40, unique=True))
def test_consistent_machine_scaled_to_extremes(tmp_path_factory, scale, fields):
    """Every field of a real-looking record multiplied by an extreme factor, as numbers+units."""
    data = copy.deepcopy(BASE)
    for path in fields:
        kind = FIELDS[path].kind
        unit = USUAL_UNITS.get(kind, [""])[0]
        _set(data, path, f"{scale!r} {unit}".strip() if kind not in ("count",) else scale)
    path = tmp_path_factory.mktemp("fz") / "scaled.json"
    path.write_text(json.dumps(data, ensure_ascii=False), encoding="utf-8")
    assert _outcome_problems(str(path), check_file(str(path))) == []


# --- reproducers of engine failures reported to the engine's owners ----------------------------
def _base_with(path: str, value: Any) -> dict[str, Any]:
    data = copy.deepcopy(BASE)
    _set(data, path, value)
    return data


ENGINE_REPRODUCERS: dict[str, dict[str, Any]] = {
    # engine/monomial.py failure(): expected = actual / exp(residual) underflows to 0
    "tiny-torque-zero-division": {"id": "R1", "rated": {"power": "1e308 W",
                                                        "torque": "1e-308 N*m",
                                                        "speed": "1500 rpm"}},
    "denormal-kt-zero-division": _base_with("torque_constant",
                                            {"value": 5e-324, "unit": "N*m/A"}),
    # relations/emf.py voltage-margin check: u / emf with emf underflowed to 0.0
    "tiny-everything-zero-division": {
        "id": "R2", "machine": {"poles": 2},
        "rated": {"power": "1e-300 W", "torque": "1e-300 N*m", "speed": "1e-300 rpm",
                  "frequency": "1e-300 Hz", "voltage": "1e-300 V", "current": "1e-300 A",
                  "power_factor": 1e-300, "efficiency": 1e-300},
        "emf": {"constant": "1e-300 V/krpm"}, "torque_constant": "1e-300 N*m/A",
        "circuit": {"resistance": "1e-300 ohm", "ld": "1e-300 H", "lq": "1e-300 H"},
        "limits": {"max_speed": "1e-300 rpm"}, "supply": {"dc_link_voltage": "1e-300 V"}},
    # engine/monomial.py derive_one(): math.exp(log_sum / a) overflows
    "huge-everything-overflow": {
        "id": "R3", "machine": {"poles": 2, "topology": "ipm"},
        "rated": {"power": "1e300 W", "torque": "1e300 N*m", "speed": "1e300 rpm",
                  "frequency": "1e300 Hz", "voltage": "1e300 V", "current": "1e300 A",
                  "power_factor": 1, "efficiency": 0.99, "losses": "1e300 W"},
        "emf": {"constant": "1e300 V/krpm"}, "torque_constant": "1e300 N*m/A",
        "circuit": {"resistance": "1e300 ohm", "ld": "1e300 H", "lq": "1e300 H"},
        "limits": {"max_speed": "1e300 rpm", "peak_torque": "1e300 N*m"},
        "supply": {"dc_link_voltage": "1e300 V", "mains_voltage": "1e300 V"}},
    # relations/emf.py emf-constant: sqrt of a negative remanence factor (magnets at 1500 °C
    # with a linear NdFeB coefficient) -> ValueError: math domain error
    "hot-magnets-math-domain": _base_with("rated.magnet_temperature", "1500 °C")
    | {"torque_constant": "1.5 N*m/A"},
}


@pytest.mark.parametrize("name", sorted(ENGINE_REPRODUCERS))
def test_engine_survives_extreme_values(name):
    # these inputs once raised out of the engine (division by an underflowed value, overflow of
    # exp, sqrt of a negative remanence factor); now they are value-range findings or a
    # "could not be evaluated" warning
    result = check_record(RawRecord(copy.deepcopy(ENGINE_REPRODUCERS[name]), None, ""))
    assert result.error is None
    assert any(f.rule == "value-range" or "could not be evaluated" in f.message
               for f in result.findings)


@pytest.mark.parametrize("name", sorted(ENGINE_REPRODUCERS))
def test_engine_failure_becomes_a_record_error_through_the_batch(tmp_path, name):
    path = tmp_path / f"{name}.json"
    path.write_text(json.dumps(ENGINE_REPRODUCERS[name], ensure_ascii=False), encoding="utf-8")
    result = check_file(str(path))
    assert result.error is None
    errors = [r.error for r in result.records if r.error]
    if errors:  # until the engine is fixed: a record error naming the file, never a crash
        assert str(path) in errors[0] and "internal error of sheetlint" in errors[0]
