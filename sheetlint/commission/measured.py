"""The measured file: what a converter's identification run found, in our own neutral layout.

.. code-block:: yaml

    machine: NHE-PM 160-15                  # the record's id
    identification:
      resistance: {value: 0.0361, unit: ohm, basis: line, temperature: 24 °C}
      ld: 0.91 mH                           # basis phase unless stated (phase | line)
      lq: {value: 0.93, unit: mH, basis: phase}
      emf: {voltage: 424 V, speed: 1000 rpm, basis: line_rms, magnet_temperature: 24 °C}
      # or a back-EMF constant: emf: {constant: 424 V/krpm, basis: line_rms, ...}

Name such files ``*.measured`` (YAML or JSON text): a folder walk of ``sheetlint check`` reads
every ``.yaml``/``.json`` as a machine record, and a measured file is not one.

The structure is checked with the JSON Schema of :func:`measured_file_schema`; the values are
read with the unit rules of :mod:`sheetlint.units` (the same accepted spellings as a record).
Every problem is a :class:`MeasuredFileProblem` whose message names the file and the field.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from functools import cache
from typing import Any

from sheetlint.intake.records import InputProblem, load_records
from sheetlint.units import ROOM_TEMPERATURE, ZERO_CELSIUS, Reading, UnitProblem, read_value

RESISTANCE_BASES = ("phase", "line", "delta_branch")
INDUCTANCE_BASES = ("phase", "line")
EMF_BASES = ("line_rms", "line_peak", "phase_rms", "phase_peak")
CABLE_CONDUCTORS = ("copper", "aluminium")
_AREA = re.compile(r"^\s*([0-9]+(?:\.[0-9]*)?|\.[0-9]+)\s*(mm2|mm²|mm\^2|mm\*\*2)\s*$")


class MeasuredFileProblem(Exception):
    """A measured file that cannot be read or does not fit the record; message for the user."""


@dataclass(frozen=True, slots=True)
class MeasuredValue:
    """One identification result in SI, with its stated basis and temperature (kelvin)."""

    reading: Reading
    basis: str
    basis_stated: bool
    temperature: float | None = None  # winding or magnet temperature, K; None when unstated

    @property
    def value(self) -> float:
        return self.reading.value


@dataclass(frozen=True, slots=True)
class MeasuredEmf:
    """A back-EMF result: a voltage at a speed, or a constant (V·s/rad), in its basis."""

    voltage: Reading | None
    speed: Reading | None
    constant: Reading | None
    basis: str
    basis_stated: bool
    magnet_temperature: float | None


@dataclass(frozen=True, slots=True)
class MeasuredCable:
    """The motor cable between converter and terminals that the identification measured
    through: length [m], conductor cross-section [m²], conductor material."""

    length: float
    cross_section: float
    conductor: str


@dataclass(frozen=True, slots=True)
class MeasuredFile:
    path: str
    machine: str
    resistance: MeasuredValue | None
    ld: MeasuredValue | None
    lq: MeasuredValue | None
    emf: MeasuredEmf | None
    cable: MeasuredCable | None = None


def _quantity(description: str) -> dict[str, Any]:
    return {"anyOf": [
        {"type": "string", "description": f"number and unit, e.g. '{description}'"},
        {"type": "object", "properties": {"value": {"type": ["number", "string"]},
                                          "unit": {"type": "string"}},
         "required": ["value"], "additionalProperties": False}]}


def _text(description: str) -> dict[str, Any]:
    return {"type": "string", "description": f"number and unit, e.g. '{description}'"}


@cache
def measured_file_schema() -> dict[str, Any]:
    """The JSON Schema (draft 2020-12) of a measured file: structure and types only."""
    temperature = _quantity("24 °C")
    return {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "title": "sheetlint identification results (measured file)",
        "type": "object",
        "required": ["machine", "identification"],
        "properties": {
            "machine": {"type": "string", "description": "the record's id"},
            "identification": {
                "type": "object",
                "additionalProperties": False,
                "minProperties": 1,
                "properties": {
                    "resistance": {"anyOf": [_text("0.0361 ohm"), {
                        "type": "object", "required": ["value"], "additionalProperties": False,
                        "properties": {"value": {"type": ["number", "string"]},
                                       "unit": {"type": "string"},
                                       "basis": {"enum": list(RESISTANCE_BASES)},
                                       "temperature": temperature}}]},
                    **{name: {"anyOf": [_text("0.91 mH"), {
                        "type": "object", "required": ["value"], "additionalProperties": False,
                        "properties": {"value": {"type": ["number", "string"]},
                                       "unit": {"type": "string"},
                                       "basis": {"enum": list(INDUCTANCE_BASES)}}}]}
                       for name in ("ld", "lq")},
                    "cable": {"type": "object", "additionalProperties": False,
                              "required": ["length", "cross_section"],
                              "properties": {"length": _quantity("30 m"),
                                             "cross_section": _quantity("50 mm2"),
                                             "conductor": {"enum": list(CABLE_CONDUCTORS)}}},
                    "emf": {"type": "object", "additionalProperties": False,
                            "properties": {"voltage": _quantity("424 V"),
                                           "speed": _quantity("1000 rpm"),
                                           "constant": _quantity("424 V/krpm"),
                                           "basis": {"enum": list(EMF_BASES)},
                                           "magnet_temperature": temperature},
                            "oneOf": [{"required": ["voltage", "speed"]},
                                      {"required": ["constant"]}]},
                },
            },
        },
    }


def _schema_problems(data: Any) -> list[str]:
    import jsonschema

    validator = jsonschema.Draft202012Validator(measured_file_schema())
    out = []
    for err in sorted(validator.iter_errors(data), key=lambda e: list(e.absolute_path))[:5]:
        if err.validator == "anyOf" and err.context:  # the alternative that came closest:
            # the deepest complaint that is not merely "not of this type"
            err = max(err.context, key=lambda e: (e.validator != "type", len(e.absolute_path)))
        path = ".".join(str(p) for p in err.absolute_path) or "(file)"
        if err.validator == "oneOf" and path.endswith("emf"):
            message = "give either 'voltage' and 'speed', or 'constant'"
        elif err.validator == "additionalProperties":
            message = err.message.replace("Additional properties are not allowed",
                                          "unknown field").split(" were unexpected")[0]
        else:
            message = err.message[:120]
        out.append(f"{path}: {message}")
    return out


def _read(path: str, field: str, raw: Any, kind: str, declared: bool = False) -> Reading:
    """One value in SI; ``declared`` when every written digit counts (a set test speed)."""
    unit = None
    if isinstance(raw, dict):
        unit = raw.get("unit")
        raw = raw.get("value")
    try:
        return read_value(raw, unit, kind, declared)
    except UnitProblem as exc:
        raise MeasuredFileProblem(f"{path}: identification.{field}: {exc}") from None


#: temperatures a winding or a magnet can have during an identification run, degC (wider
#: than any insulation class allows, so that only a slip of unit or sign is refused)
PLAUSIBLE_TEMPERATURE_C = (-50.0, 250.0)


def _temperature(path: str, field: str, raw: Any) -> float | None:
    if raw is None:
        return None
    kelvin = _read(path, field, raw, "temperature").value
    low, high = PLAUSIBLE_TEMPERATURE_C
    if not low <= kelvin - ZERO_CELSIUS <= high:
        raise MeasuredFileProblem(
            f"{path}: identification.{field}: {kelvin - ZERO_CELSIUS:.4g} °C is outside "
            f"{low:g}…{high:g} °C, the range a winding or magnet can have during an "
            "identification run")
    return kelvin


def _measured(path: str, name: str, raw: Any, kind: str, default_basis: str,
              with_temperature: bool) -> MeasuredValue | None:
    if raw is None:
        return None
    reading = _read(path, name, raw, kind)
    if not reading.value > 0.0:
        raise MeasuredFileProblem(f"{path}: identification.{name}: must be positive "
                                  f"(found {reading.text} {reading.unit})")
    basis = raw.get("basis") if isinstance(raw, dict) else None
    temperature = (_temperature(path, f"{name}.temperature", raw.get("temperature"))
                   if with_temperature and isinstance(raw, dict) else None)
    return MeasuredValue(reading, basis or default_basis, basis is not None, temperature)


def read_measured_file(path: str) -> MeasuredFile:
    """Read and check a measured file. Raises :class:`MeasuredFileProblem`."""
    try:
        loaded = load_records(path)
    except InputProblem as exc:
        message = str(exc)
        if "expected a record" in message:  # the loader's words for a record file
            message = (f"{path}: (file): expected a mapping with 'machine' and "
                       f"'identification'{message.partition('}')[2]}")
        raise MeasuredFileProblem(message) from None
    if len(loaded.records) != 1 or loaded.records[0].index is not None:
        raise MeasuredFileProblem(f"{path}: a measured file holds one machine, not a list of "
                                  "records")
    data = loaded.records[0].data
    problems = _schema_problems(data)
    if problems:
        raise MeasuredFileProblem(f"{path}: " + "; ".join(problems))
    ident = data["identification"]
    resistance = _measured(path, "resistance", ident.get("resistance"), "resistance", "phase",
                           True)
    ld = _measured(path, "ld", ident.get("ld"), "inductance", "phase", False)
    lq = _measured(path, "lq", ident.get("lq"), "inductance", "phase", False)
    emf = None
    raw_emf = ident.get("emf")
    if raw_emf is not None:
        voltage = (_read(path, "emf.voltage", raw_emf["voltage"], "voltage")
                   if "voltage" in raw_emf else None)
        speed = (_read(path, "emf.speed", raw_emf["speed"], "speed", declared=True)
                 if "speed" in raw_emf else None)
        constant = (_read(path, "emf.constant", raw_emf["constant"], "emf_constant")
                    if "constant" in raw_emf else None)
        for name, reading in (("voltage", voltage), ("speed", speed), ("constant", constant)):
            if reading is not None and not reading.value > 0.0:
                raise MeasuredFileProblem(f"{path}: identification.emf.{name}: must be positive"
                                          f" (found {reading.text} {reading.unit})")
        emf = MeasuredEmf(voltage, speed, constant, raw_emf.get("basis") or "line_rms",
                          "basis" in raw_emf,
                          _temperature(path, "emf.magnet_temperature",
                                       raw_emf.get("magnet_temperature")))
    return MeasuredFile(path, str(data["machine"]), resistance, ld, lq, emf,
                        _cable(path, ident.get("cable")))


def _cable(path: str, raw: Any) -> MeasuredCable | None:
    if raw is None:
        return None
    length = _read(path, "cable.length", raw["length"], "length")
    area_raw = raw["cross_section"]
    if isinstance(area_raw, dict):
        area_raw = f"{area_raw.get('value')} {area_raw.get('unit') or ''}"
    match = _AREA.match(str(area_raw))
    if match is None:
        raise MeasuredFileProblem(f"{path}: identification.cable.cross_section: '{area_raw}' is "
                                  "not a cross-section; write it like '50 mm2'")
    area = float(match.group(1)) * 1e-6
    if not (length.value > 0.0 and area > 0.0):
        raise MeasuredFileProblem(f"{path}: identification.cable: length and cross-section "
                                  "must be positive")
    return MeasuredCable(length.value, area, raw.get("conductor") or "copper")


#: the winding or magnet temperature assumed for a result whose temperature is unstated: the
#: interval a standstill identification in a plant room usually sees (common practice)
UNSTATED_TEMPERATURE_K = (ROOM_TEMPERATURE - 10.0, ROOM_TEMPERATURE + 20.0)


def main() -> int:
    """Print the measured file's JSON Schema: ``python -m sheetlint.commission.measured``."""
    import json

    print(json.dumps(measured_file_schema(), indent=2, ensure_ascii=False))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
