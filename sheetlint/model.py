"""The machine record model (pydantic v2): structure, types, and SI conversion at the boundary.

Every physical value is read here, once, into a :class:`Measured` (SI float, uncertainty from
the written digits, basis and temperature qualifiers). Physical limits (positive values,
η < 1, even poles) are *not* checked here: they belong to the ``value-range`` relation, so a
readable but impossible value becomes a finding, not a file error.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Annotated, Any, Literal

from pydantic import BaseModel, BeforeValidator, ConfigDict, Field, WithJsonSchema

from sheetlint.fields import BASES, FIELDS, POINT_FIELDS
from sheetlint.units import Reading, UnitProblem, read_value


@dataclass(slots=True)
class Measured:
    """A physical value as read from the input, in SI, with its qualifiers."""

    reading: Reading
    basis: str | None = None  # as stated; None when the sheet does not say
    temperature: float | None = None  # kelvin, the `temperature` qualifier
    magnet_temperature: float | None = None  # kelvin, on torque_constant
    duration: float | None = None  # seconds, on limits
    extras: dict[str, Measured] = field(default_factory=dict)  # e.g. losses breakdown, min
    unknown_qualifiers: tuple[str, ...] = ()
    #: written by ``sheetlint derive`` (``derived: true``): the engine works it out again
    derived: bool = False

    @property
    def value(self) -> float:
        return self.reading.value


_QUALIFIERS_COMMON = {"value", "unit", "basis", "note", "source", "derived", "rule", "from"}
#: further qualifiers ``sheetlint derive`` writes on a derived value, for the reader
_QUALIFIERS_OF_DERIVED = {"temperature", "magnet_temperature", "speed"}


def _number_schema() -> dict[str, Any]:
    return {"anyOf": [{"type": "number"}, {"type": "string"}]}


def _physical_schema(kind: str, qualifiers: dict[str, str]) -> dict[str, Any]:
    props: dict[str, Any] = {"value": _number_schema(), "unit": {"type": "string"},
                             "note": {"type": "string"}, "source": {"type": "string"},
                             "derived": {"type": "boolean",
                                         "description": "written by sheetlint derive; "
                                                        "worked out again when checked"},
                             "rule": {"type": "string"},
                             "from": {"type": "array", "items": {"type": "string"}}}
    if kind in BASES:
        props["basis"] = {"enum": list(BASES[kind])}
    for name, _kind in qualifiers.items():
        props[name] = {"anyOf": [{"type": "number"}, {"type": "string"},
                                 {"type": "object", "properties": {
                                     "value": _number_schema(), "unit": {"type": "string"}},
                                  "required": ["value"]}]}
    text = {"type": "string", "description": f"number and unit, e.g. '{_example(kind)}'"}
    obj = {"type": "object", "properties": props, "required": ["value"]}
    if kind in ("ratio", "count"):
        return {"anyOf": [{"type": "number"}, text, obj]}
    return {"anyOf": [text, obj]}


def _example(kind: str) -> str:
    return {"power": "15 kW", "torque": "95.5 N*m", "speed": "1500 rpm", "frequency": "100 Hz",
            "voltage": "400 V", "current": "28.5 A", "ratio": "0.95", "resistance": "0.12 ohm",
            "inductance": "2.4 mH", "emf_constant": "180 V/krpm",
            "torque_constant": "1.85 N*m/A", "flux_linkage": "0.25 Wb",
            "temperature": "20 °C", "temperature_difference": "80 K", "mass": "120 kg",
            "inertia": "0.05 kg*m**2", "length": "1000 m", "time": "60 s",
            "motor_constant": "0.25 N*m/√W",
            "count": "8"}.get(kind, "")


def _reader(kind: str, declared: bool, qualifiers: dict[str, str]):
    def read(raw: Any) -> Measured | None:
        if raw is None:
            return None
        if isinstance(raw, dict):
            return _read_object(raw, kind, declared, qualifiers)
        if isinstance(raw, bool) or isinstance(raw, (list, tuple)):
            raise ValueError(f"expected a value like '{_example(kind)}', found {raw!r}")
        if isinstance(raw, (int, float)) and kind not in ("ratio", "count", "temperature"):
            raise ValueError(
                f"{raw!r} has no unit; write it like '{_example(kind)}' or "
                f"{{\"value\": {raw!r}, \"unit\": \"...\"}}")
        if isinstance(raw, (int, float)) and kind == "temperature":
            return Measured(read_value(f"{raw} °C" if not isinstance(raw, bool) else raw, None,
                                       kind, declared))
        try:
            return Measured(read_value(raw, None, kind, declared))
        except UnitProblem as exc:
            raise ValueError(str(exc)) from None

    return read


def _read_object(raw: dict[str, Any], kind: str, declared: bool,
                 qualifiers: dict[str, str]) -> Measured:
    if "value" not in raw:
        raise ValueError("object form needs 'value' (and 'unit')")
    unit = raw.get("unit")
    if unit is not None and not isinstance(unit, str):
        raise ValueError(f"'unit' must be text, found {unit!r}")
    value = raw["value"]
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise ValueError(f"'value' must be a number, found {value!r}")
    try:
        if kind == "temperature" and unit is None and not isinstance(value, str):
            unit = "°C"
        reading = read_value(value, unit, kind, declared)
    except UnitProblem as exc:
        raise ValueError(str(exc)) from None
    measured = Measured(reading)
    derived = raw.get("derived", False)
    if not isinstance(derived, bool):
        raise ValueError(f"'derived' must be true or false, found {derived!r}")
    measured.derived = derived
    basis = raw.get("basis")
    if basis is not None:
        allowed = BASES.get(kind, ())
        if basis not in allowed:
            raise ValueError(f"basis '{basis}' is not one of: {', '.join(allowed) or '(none)'}")
        measured.basis = basis
    unknown: list[str] = []
    for name, sub in raw.items():
        if name in _QUALIFIERS_COMMON:
            continue
        sub_kind = qualifiers.get(name)
        if isinstance(sub, dict) and sub.get("derived") is True:
            continue  # a derived part (a loss breakdown): worked out again
        if sub_kind is None:
            if not (derived and name in _QUALIFIERS_OF_DERIVED):
                unknown.append(name)
            continue
        try:
            sub_reading = _read_qualifier(sub, sub_kind)
        except UnitProblem as exc:
            raise ValueError(f"{name}: {exc}") from None
        if name == "temperature":
            measured.temperature = sub_reading.value
        elif name == "magnet_temperature":
            measured.magnet_temperature = sub_reading.value
        elif name == "duration":
            measured.duration = sub_reading.value
        else:
            measured.extras[name] = Measured(sub_reading)
    measured.unknown_qualifiers = tuple(unknown)
    return measured


def _read_qualifier(raw: Any, kind: str) -> Reading:
    if isinstance(raw, dict):
        if "value" not in raw:
            raise UnitProblem("object form needs 'value'")
        unit = raw.get("unit")
        if kind == "temperature" and unit is None and not isinstance(raw["value"], str):
            unit = "°C"
        return read_value(raw["value"], unit, kind, False)
    if isinstance(raw, bool):
        raise UnitProblem(f"expected a value, found {raw!r}")
    if isinstance(raw, (int, float)):
        if kind == "temperature":
            return read_value(raw, "°C", kind, False)
        if kind == "time":
            return read_value(raw, "s", kind, False)
    if isinstance(raw, (int, float, str)):
        return read_value(raw, None, kind, False)
    raise UnitProblem(f"expected a value, found {raw!r}")


def Physical(path: str, **qualifiers: str) -> Any:
    """Annotated type of a physical field: parses and converts at validation time."""
    spec = FIELDS.get(path) or POINT_FIELDS[path.rsplit(".", 1)[-1]]
    kind = spec.kind
    if kind in ("resistance",):
        qualifiers.setdefault("temperature", "temperature")
    return Annotated[
        Any,
        BeforeValidator(_reader(kind, spec.declared, qualifiers)),
        WithJsonSchema(_physical_schema(kind, qualifiers)),
        Field(default=None, description=spec.description or None),
    ]


def _lower(value: Any) -> Any:
    return value.strip().lower() if isinstance(value, str) else value


def _class_text(value: Any) -> Any:
    if isinstance(value, bool):
        raise ValueError(f"expected a class like 155 or 'F', found {value!r}")
    if isinstance(value, float) and value.is_integer():
        return int(value)
    if isinstance(value, (int, str)):
        return value
    raise ValueError(f"expected a class like 155 or 'F', found {value!r}")


Topology = Annotated[Literal["spm", "ipm", "pmasynrm"] | None, BeforeValidator(_lower)]
Connection = Annotated[Literal["star", "delta"] | None, BeforeValidator(_lower)]
ClassValue = Annotated[int | str | None, BeforeValidator(_class_text)]


def _count(value: Any) -> Any:
    if isinstance(value, bool):
        raise ValueError(f"expected a number, found {value!r}")
    if isinstance(value, str):
        try:
            value = float(value.strip())
        except ValueError:
            raise ValueError(f"expected a number, found '{value}'") from None
    if isinstance(value, int) and not -1e308 < value < 1e308:
        raise ValueError("the number is out of range")  # float(value) would overflow
    if isinstance(value, (int, float)):
        if not math.isfinite(value):
            raise ValueError(f"'{value}' is not a finite number")
        return value
    raise ValueError(f"expected a number, found {value!r}")


Count = Annotated[int | float | None, BeforeValidator(_count),
                  WithJsonSchema({"anyOf": [{"type": "number"}, {"type": "string"}]})]


class Section(BaseModel):
    model_config = ConfigDict(extra="allow", frozen=False)


class Machine(Section):
    topology: Topology = None
    poles: Count = None
    pole_pairs: Count = None
    phases: Count = None
    connection: Connection = None
    thermal_class: ClassValue = None
    temperature_rise_class: ClassValue = None
    cooling: str | None = None
    duty: str | None = None
    ambient: Physical("machine.ambient", min="temperature")  # type: ignore[valid-type]
    altitude: Physical("machine.altitude")  # type: ignore[valid-type]
    mass: Physical("machine.mass")  # type: ignore[valid-type]
    inertia: Physical("machine.inertia")  # type: ignore[valid-type]
    rotor_diameter: Physical("machine.rotor_diameter")  # type: ignore[valid-type]
    stack_length: Physical("machine.stack_length")  # type: ignore[valid-type]
    magnet: Annotated[Literal["ndfeb", "smco", "ferrite"] | None,
                      BeforeValidator(_lower)] = None
    conductor: Annotated[Literal["copper", "aluminium", "aluminum"] | None,
                         BeforeValidator(_lower)] = None


_LOSS_PARTS = {"copper": "power", "iron": "power", "friction": "power", "stray": "power"}


class Point(Section):
    speed: Physical("rated.speed")  # type: ignore[valid-type]
    torque: Physical("rated.torque")  # type: ignore[valid-type]
    power: Physical("rated.power")  # type: ignore[valid-type]
    frequency: Physical("rated.frequency")  # type: ignore[valid-type]
    voltage: Physical("rated.voltage")  # type: ignore[valid-type]
    current: Physical("rated.current")  # type: ignore[valid-type]
    power_factor: Physical("rated.power_factor")  # type: ignore[valid-type]
    efficiency: Physical("rated.efficiency")  # type: ignore[valid-type]


class Rated(Point):
    losses: Physical("rated.losses", **_LOSS_PARTS)  # type: ignore[valid-type]
    temperature_rise: Physical("rated.temperature_rise")  # type: ignore[valid-type]
    magnet_temperature: Physical("rated.magnet_temperature")  # type: ignore[valid-type]


class Emf(Section):
    constant: Physical("emf.constant")  # type: ignore[valid-type]
    voltage: Physical("emf.voltage")  # type: ignore[valid-type]
    speed: Physical("emf.speed")  # type: ignore[valid-type]
    flux_linkage: Physical("emf.flux_linkage", temperature="temperature")  # type: ignore[valid-type]
    magnet_temperature: Physical("emf.magnet_temperature")  # type: ignore[valid-type]


class Circuit(Section):
    resistance: Physical("circuit.resistance")  # type: ignore[valid-type]
    ld: Physical("circuit.ld")  # type: ignore[valid-type]
    lq: Physical("circuit.lq")  # type: ignore[valid-type]


class Limits(Section):
    max_speed: Physical("limits.max_speed")  # type: ignore[valid-type]
    peak_torque: Physical("limits.peak_torque", duration="time")  # type: ignore[valid-type]
    peak_current: Physical("limits.peak_current", duration="time")  # type: ignore[valid-type]
    no_load_speed: Physical("limits.no_load_speed", supply="voltage")  # type: ignore[valid-type]
    demagnetisation_current: Physical(  # type: ignore[valid-type]
        "limits.demagnetisation_current", magnet_temperature="temperature")


class Dynamics(Section):
    """Servo catalogue constants: time constants and the motor constant."""

    electrical_time_constant: Physical(  # type: ignore[valid-type]
        "dynamics.electrical_time_constant")
    mechanical_time_constant: Physical(  # type: ignore[valid-type]
        "dynamics.mechanical_time_constant")
    motor_constant: Physical("dynamics.motor_constant")  # type: ignore[valid-type]
    thermal_time_constant: Physical("dynamics.thermal_time_constant")  # type: ignore[valid-type]


class Supply(Section):
    mains_voltage: Physical("supply.mains_voltage")  # type: ignore[valid-type]
    dc_link_voltage: Physical("supply.dc_link_voltage")  # type: ignore[valid-type]


class EfficiencyClaim(BaseModel):
    model_config = ConfigDict(extra="allow")
    value: str
    standard: str | None = None


def _claim(value: Any) -> Any:
    if isinstance(value, str):
        return {"value": value}
    return value


class Acceptance(BaseModel):
    """A deviation the record's author has reviewed and accepts: the rule id, the fields it
    concerns (all of them must be among the finding's fields; none: any finding of the rule)
    and a mandatory reason."""

    model_config = ConfigDict(extra="forbid")
    rule: Annotated[str, Field(min_length=1)]
    fields: list[Annotated[str, Field(min_length=1)]] = Field(default_factory=list)
    reason: Annotated[str, Field(min_length=1)]


class MachineRecord(BaseModel):
    """One machine: the data contract of DESIGN.md."""

    model_config = ConfigDict(extra="allow", title="sheetlint PM machine record")
    id: Annotated[str, Field(min_length=1, description="model designation")]
    maker: str | None = None
    machine: Machine = Field(default_factory=Machine)
    rated: Rated = Field(default_factory=Rated)
    emf: Emf = Field(default_factory=Emf)
    torque_constant: Physical("torque_constant", magnet_temperature="temperature")  # type: ignore[valid-type]
    circuit: Circuit = Field(default_factory=Circuit)
    limits: Limits = Field(default_factory=Limits)
    supply: Supply = Field(default_factory=Supply)
    dynamics: Dynamics = Field(default_factory=Dynamics)
    efficiency_class: Annotated[
        EfficiencyClaim | None, BeforeValidator(_claim),
        WithJsonSchema({"anyOf": [
            {"type": "string", "description": "claimed class, e.g. 'IE4'"},
            {"type": "object", "properties": {"value": {"type": "string"},
                                              "standard": {"type": "string"}},
             "required": ["value"]},
            {"type": "null"}]})] = None
    points: list[Point] = Field(default_factory=list)
    accepted: list[Acceptance] = Field(
        default_factory=list,
        description="known deviations the record's author accepts: rule, fields and a reason")


SECTIONS = ("machine", "rated", "emf", "circuit", "limits", "supply", "dynamics")


def record_json_schema() -> dict[str, Any]:
    """JSON Schema of one record (structure and types only)."""
    return MachineRecord.model_json_schema()


def file_json_schema() -> dict[str, Any]:
    """JSON Schema of a data file: one record, or ``{"records": [...]}``."""
    record = record_json_schema()
    defs = record.pop("$defs", {})
    defs["MachineRecord"] = record
    return {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "$id": "https://sheetlint.invalid/schema/pm-machine.schema.json",
        "title": "sheetlint machine data file",
        "description": "One PM machine record, or {\"records\": [...]}. Physical limits are "
                       "checked by sheetlint's value-range rule, not by this schema.",
        "anyOf": [
            {"$ref": "#/$defs/MachineRecord"},
            {"type": "object", "properties": {"records": {
                "type": "array", "items": {"$ref": "#/$defs/MachineRecord"}}},
             "required": ["records"]},
        ],
        "$defs": defs,
    }
