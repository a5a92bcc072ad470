"""The purchase requirement: file format, model, JSON Schema and reading into SI.

A requirement file is YAML or JSON (DESIGN.md "Offers against a requirement")::

    title: Raw-water pump, line 2 (invented)
    duty: [{speed: 1500 rpm, torque: 1000 N*m}]
    speed_range: {min: 150 rpm, max: 1800 rpm}
    supply: {mains_voltage: 690 V}          # or dc_link_voltage
    converter: {max_current: 190 A}
    site: {ambient: 45 °C, ambient_min: -10 °C, altitude: 1500 m}
    efficiency_class: IE4
    thermal: {class: 155, rise_class: 130}
    limits: {mass: 900 kg, emf_margin: 10 %}

Physical values are written like a record's: ``"190 A"`` or ``{value: 190, unit: A}``. Every
problem is a :class:`RequirementProblem` whose message names the file and the field.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from pydantic import BaseModel, ConfigDict, Field, ValidationError

from sheetlint.engine.build import thermal_class_number
from sheetlint.standards.efficiency import parse_ie_class
from sheetlint.units import UnitProblem, read_value

#: largest requirement file read, bytes
MAX_REQUIREMENT_BYTES = 1_000_000

_QUANTITY_SCHEMA: dict[str, Any] = {
    "anyOf": [
        {"type": "string", "description": "number and unit, e.g. '1500 rpm'"},
        {"type": "number"},
        {"type": "object", "properties": {"value": {"anyOf": [{"type": "number"},
                                                              {"type": "string"}]},
                                          "unit": {"type": "string"}},
         "required": ["value"]},
    ]
}

Quantity = Any  # validated by :func:`_quantity`; the schema above is published


def _q(description: str, required: bool = False) -> Any:
    extra = {"json_schema_extra": _QUANTITY_SCHEMA}
    if required:
        return Field(..., description=description, **extra)
    return Field(None, description=description, **extra)


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", populate_by_name=True)


class DutyModel(_Strict):
    speed: Quantity = _q("mechanical speed of the duty point", True)
    torque: Quantity = _q("shaft torque the machine must deliver continuously (S1)", True)


class SpeedRangeModel(_Strict):
    min: Quantity = _q("lowest operating speed")
    max: Quantity = _q("highest operating speed (top of the range)", True)


class SupplyModel(_Strict):
    mains_voltage: Quantity = _q("mains line voltage feeding a diode front end")
    dc_link_voltage: Quantity = _q("DC-link voltage, when stated instead of the mains")


class ConverterModel(_Strict):
    max_current: Quantity = _q("converter's continuous output current (rms)")


class SiteModel(_Strict):
    ambient: Quantity = _q("highest coolant (ambient) temperature at the site")
    ambient_min: Quantity = _q("lowest ambient temperature at the site")
    altitude: Quantity = _q("site altitude above sea level")


class ThermalModel(_Strict):
    insulation_class: int | str | None = Field(
        None, alias="class", description="least IEC 60085 thermal class (130/155/180 or B/F/H)")
    rise_class: int | str | None = Field(
        None, description="class whose temperature-rise limit the machine must keep")


class LimitsModel(_Strict):
    mass: Quantity = _q("largest acceptable mass")
    inertia: Quantity = _q("largest acceptable rotor moment of inertia")
    emf_margin: Quantity = _q("least margin of the peak line back-EMF at the top speed under "
                              "the DC link, e.g. '10 %'")


class RequirementModel(_Strict):
    """A purchase requirement for one drive (sheetlint's own format)."""

    model_config = ConfigDict(extra="forbid", populate_by_name=True,
                              title="sheetlint purchase requirement")
    title: str | None = None
    duty: list[DutyModel] = Field(default_factory=list,
                                  description="points the machine must deliver continuously")
    speed_range: SpeedRangeModel | None = None
    supply: SupplyModel | None = None
    converter: ConverterModel | None = None
    site: SiteModel | None = None
    efficiency_class: str | None = Field(None, description="least acceptable class, IE1..IE5")
    thermal: ThermalModel | None = None
    limits: LimitsModel | None = None


def requirement_json_schema() -> dict[str, Any]:
    """The JSON Schema of a requirement file (draft 2020-12), generated from the model."""
    schema = RequirementModel.model_json_schema(by_alias=True)
    schema["$schema"] = "https://json-schema.org/draft/2020-12/schema"
    return schema


class RequirementProblem(Exception):
    """A requirement file that cannot be used; the message names the file and the field."""


@dataclass(slots=True)
class Duty:
    """One duty point, SI: speed [rad/s], torque [N*m]."""

    speed: float
    torque: float


@dataclass(slots=True)
class Requirement:
    """A purchase requirement read into SI floats (temperatures in kelvin)."""

    title: str | None = None
    duty: list[Duty] = field(default_factory=list)
    speed_min: float | None = None
    speed_max: float | None = None
    mains_voltage: float | None = None
    dc_link_voltage: float | None = None
    max_current: float | None = None
    ambient: float | None = None
    ambient_min: float | None = None
    altitude: float | None = None
    efficiency_class: int | None = None
    insulation_class: int | None = None
    rise_class: int | None = None
    mass: float | None = None
    inertia: float | None = None
    emf_margin: float | None = None
    path: str | None = None


#: (path in the file, attribute, kind) of every physical value outside ``duty``
_PLAIN_VALUES: tuple[tuple[str, str, str], ...] = (
    ("speed_range.min", "speed_min", "speed"),
    ("speed_range.max", "speed_max", "speed"),
    ("supply.mains_voltage", "mains_voltage", "voltage"),
    ("supply.dc_link_voltage", "dc_link_voltage", "voltage"),
    ("converter.max_current", "max_current", "current"),
    ("site.ambient", "ambient", "temperature"),
    ("site.ambient_min", "ambient_min", "temperature"),
    ("site.altitude", "altitude", "length"),
    ("limits.mass", "mass", "mass"),
    ("limits.inertia", "inertia", "inertia"),
    ("limits.emf_margin", "emf_margin", "ratio"),
)


def _quantity(raw: Any, kind: str, where: str) -> float | None:
    """SI value of one written quantity, or a :class:`RequirementProblem` naming the field."""
    if raw is None:
        return None
    unit = None
    if isinstance(raw, dict):
        unknown = set(raw) - {"value", "unit", "note", "source"}
        if unknown:
            raise RequirementProblem(f"{where}: unknown key(s) {', '.join(sorted(unknown))}")
        if "value" not in raw:
            raise RequirementProblem(f"{where}: an object value needs 'value'")
        unit = raw.get("unit")
        if unit is not None and not isinstance(unit, str):
            raise RequirementProblem(f"{where}: 'unit' must be text")
        raw = raw["value"]
    if isinstance(raw, bool) or not isinstance(raw, (str, int, float)):
        raise RequirementProblem(f"{where}: expected a number with a unit, found "
                                 f"{type(raw).__name__}")
    if kind == "ratio" and isinstance(raw, (int, float)) and unit is None and 0.0 <= raw < 1.0:
        unit = ""  # a bare fraction such as 0.1
    try:
        reading = read_value(raw, unit, kind, True)
    except UnitProblem as exc:
        raise RequirementProblem(f"{where}: {exc}") from None
    return reading.value


def _class_number(raw: Any, where: str) -> int | None:
    if raw is None:
        return None
    number = thermal_class_number(raw)
    if not isinstance(number, int) or number not in (105, 120, 130, 155, 180, 200, 220):
        raise RequirementProblem(f"{where}: '{raw}' is not an IEC 60085 thermal class "
                                 "(130/155/180 or B/F/H)")
    return number


def _lookup(data: dict[str, Any], dotted: str) -> Any:
    node: Any = data
    for part in dotted.split("."):
        if not isinstance(node, dict):
            return None
        node = node.get(part)
    return node


def requirement_from_data(data: Any, name: str = "requirement") -> Requirement:
    """Validate a parsed requirement document and read it into SI."""
    if not isinstance(data, dict):
        raise RequirementProblem(f"{name}: expected a mapping at the top, found "
                                 f"{type(data).__name__}")
    try:
        RequirementModel.model_validate(data)
    except ValidationError as exc:
        parts = []
        for err in exc.errors()[:5]:
            loc = ""
            for part in err.get("loc", ()):
                loc += f"[{part}]" if isinstance(part, int) else ("." if loc else "") + str(part)
            msg = "required field is missing" if err.get("type") == "missing" else (
                "unknown field" if err.get("type") == "extra_forbidden" else err.get("msg", ""))
            parts.append(f"{loc or '(top)'}: {msg}")
        raise RequirementProblem(f"{name}: " + "; ".join(parts)) from None
    out = Requirement(title=data.get("title"), path=name)
    for index, point in enumerate(data.get("duty") or []):
        speed = _quantity(point.get("speed"), "speed", f"{name}: duty[{index}].speed")
        torque = _quantity(point.get("torque"), "torque", f"{name}: duty[{index}].torque")
        assert speed is not None and torque is not None  # required by the model
        if not (speed >= 0.0 and torque > 0.0):
            raise RequirementProblem(f"{name}: duty[{index}]: speed must be >= 0 and torque > 0")
        out.duty.append(Duty(speed, torque))
    for dotted, attribute, kind in _PLAIN_VALUES:
        value = _quantity(_lookup(data, dotted), kind, f"{name}: {dotted}")
        if value is not None and kind != "temperature" and not value >= 0.0:
            raise RequirementProblem(f"{name}: {dotted}: must not be negative")
        setattr(out, attribute, value)
    if out.speed_min is not None and out.speed_max is not None and out.speed_min > out.speed_max:
        raise RequirementProblem(f"{name}: speed_range: min is above max")
    if out.emf_margin is not None and not out.emf_margin < 1.0:
        raise RequirementProblem(f"{name}: limits.emf_margin: must be below 100 %")
    if data.get("efficiency_class") is not None:
        number = parse_ie_class(data["efficiency_class"])
        if number is None:
            raise RequirementProblem(f"{name}: efficiency_class: '{data['efficiency_class']}' "
                                     "is not IE1..IE5")
        out.efficiency_class = number
    thermal = data.get("thermal") or {}
    out.insulation_class = _class_number(thermal.get("class"), f"{name}: thermal.class")
    out.rise_class = _class_number(thermal.get("rise_class"), f"{name}: thermal.rise_class")
    for value in (out.ambient, out.ambient_min):
        if value is not None and not math.isfinite(value):
            raise RequirementProblem(f"{name}: site: temperature out of range")
    return out


#: deepest nesting of brackets, or of indentation in steps of two spaces, read at all: a
#: requirement needs four levels; a parser walking thousands of levels takes tens of seconds
MAX_NESTING = 32


def _nested_too_deeply(text: str) -> bool:
    """True when brackets nest, or lines are indented, deeper than :data:`MAX_NESTING`
    (brackets inside quoted text count too: a requirement never needs that many)."""
    depth = deepest = 0
    for char in text:
        if char in "[{":
            depth += 1
            deepest = max(deepest, depth)
        elif char in "]}":
            depth -= 1
    if deepest > MAX_NESTING:
        return True
    return any(len(line) - len(line.lstrip(" ")) > 2 * MAX_NESTING
               for line in text.splitlines())


def read_requirement(path: str) -> Requirement:
    """Read a requirement file (YAML or JSON); :class:`RequirementProblem` on any problem."""
    try:
        size = Path(path).stat().st_size
        if size > MAX_REQUIREMENT_BYTES:
            raise RequirementProblem(f"{path}: file is {size} bytes, over the limit of "
                                     f"{MAX_REQUIREMENT_BYTES}")
        text = Path(path).read_text(encoding="utf-8")
    except RequirementProblem:
        raise
    except (OSError, UnicodeDecodeError) as exc:
        reason = getattr(exc, "strerror", None) or str(exc)
        raise RequirementProblem(f"{path}: cannot read file ({reason})") from None
    if _nested_too_deeply(text):
        raise RequirementProblem(f"{path}: nested too deeply for a requirement file (more than "
                                 f"{MAX_NESTING} levels)")
    try:
        if path.lower().endswith(".json"):
            data = json.loads(text)
        else:
            import yaml

            # a requirement needs no anchors or aliases; refusing them keeps a small file from
            # expanding into a huge document
            if any(isinstance(event, yaml.AliasEvent) for event in yaml.parse(text)):
                raise RequirementProblem(f"{path}: YAML aliases (*name) are not accepted in a "
                                         "requirement file; write the values out")
            data = yaml.safe_load(text)
    except RequirementProblem:
        raise
    except Exception as exc:  # any parser error becomes a message naming the file
        first = str(exc).splitlines()[0] if str(exc) else type(exc).__name__
        raise RequirementProblem(f"{path}: not valid YAML or JSON ({first[:160]})") from None
    return requirement_from_data(data, path)
