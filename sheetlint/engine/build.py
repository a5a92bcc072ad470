"""From a validated record to the engine's sheet: canonical bases, SI floats, attributes.

Canonical bases inside the engine (DESIGN.md "Bases"): voltages and back-EMF line-to-line rms;
currents rms; Ke in V(line rms) per mechanical rad/s; Kt per rms ampere; resistance and
inductance per phase of the equivalent star (a terminal-to-terminal value is twice the phase
value for star and delta alike; a delta branch is three times the star-equivalent phase value).
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Mapping
from functools import cache
from typing import Any

from sheetlint.engine.core import GIVEN, Finding, Known, Settings, Sheet, own_sensitivity
from sheetlint.fields import BASES, FIELDS, POINT_FIELDS, spec_for
from sheetlint.model import SECTIONS, MachineRecord, Measured
from sheetlint.relations.registry import relation_for
from sheetlint.units import ROOM_TEMPERATURE as ROOM

SQRT2 = math.sqrt(2.0)
SQRT3 = math.sqrt(3.0)

#: value in the stated basis × factor = value in the canonical basis
BASIS_FACTOR: dict[str, dict[str, float]] = {
    "voltage": {"line_rms": 1.0, "line_peak": 1 / SQRT2, "phase_rms": SQRT3,
                "phase_peak": SQRT3 / SQRT2},
    "emf_constant": {"line_rms": 1.0, "line_peak": 1 / SQRT2, "phase_rms": SQRT3,
                     "phase_peak": SQRT3 / SQRT2},
    "current": {"rms": 1.0, "peak": 1 / SQRT2},
    "torque_constant": {"rms": 1.0, "peak": SQRT2},
    "resistance": {"phase": 1.0, "line": 0.5, "delta_branch": 1 / 3},
    "inductance": {"phase": 1.0, "line": 0.5},
}

_CLASS_LETTERS = {"A": 105, "E": 120, "B": 130, "F": 155, "H": 180, "N": 200, "R": 220}


def thermal_class_number(value: Any) -> int | str | None:
    """IEC 60085 class as a number (letters B/F/H accepted); the text itself when unknown."""
    if value is None:
        return None
    if isinstance(value, int):
        return value
    text = str(value).strip().upper().removeprefix("CLASS").strip()
    if text in _CLASS_LETTERS:
        return _CLASS_LETTERS[text]
    try:
        number = float(text.rstrip("°C").strip())
    except ValueError:
        return str(value)
    return int(number) if number.is_integer() else str(value)


def supply_kind(supply: Measured | None) -> str | None:
    """``dc`` or ``ac`` as a supply voltage's unit marks it (``560 V DC``, ``400 Vac``);
    None when the unit does not say."""
    if supply is None:
        return None
    unit = supply.reading.unit.replace(" ", "").replace("*", "").replace(".", "").lower()
    if unit.endswith("dc"):
        return "dc"
    if unit.endswith(("ac", "rms")):
        return "ac"
    return None


@cache
def _given_plan(path: str) -> tuple[dict[str, float] | None, str | None, Mapping[str, float]]:
    """(factor per stated basis, default basis, sensitivity) of a field path, worked out once;
    (None, None, ...) for a field without bases."""
    spec = spec_for(path)
    kind = spec.kind if spec else "ratio"
    if kind not in BASES:
        return None, None, own_sensitivity(path)
    return BASIS_FACTOR[kind], BASES[kind][0], own_sensitivity(path)


def _known(path: str, m: Measured, temperature: float | None = None) -> Known:
    """The sheet's value of a measured field: SI, in the canonical basis, given."""
    factors, default, sensitivity = _given_plan(path)
    basis = m.basis
    reading = m.reading
    return Known(
        reading.value if factors is None else reading.value * factors[basis or default],
        reading.uncertainty,
        GIVEN,
        None,
        (),
        basis or default,
        basis is not None,
        temperature if temperature is not None else m.temperature,
        None,
        None,
        sensitivity,
        None,
        reading,  # the written text, made when first asked for
    )


#: (attribute, field path) of the rated point and of the machine's measured fields
_RATED_FIELDS = tuple((name, f"rated.{name}") for name in POINT_FIELDS)
_MACHINE_FIELDS = tuple((name, f"machine.{name}")
                        for name in ("altitude", "mass", "inertia", "rotor_diameter",
                                     "stack_length"))
_LIMIT_FIELDS = tuple((name, f"limits.{name}")
                      for name in ("max_speed", "peak_torque", "peak_current"))
_DYNAMICS_FIELDS = tuple((name, f"dynamics.{name}")
                         for name in ("electrical_time_constant", "mechanical_time_constant",
                                      "motor_constant", "thermal_time_constant"))
_COUNT_FIELDS = tuple((name, f"machine.{name}") for name in ("poles", "pole_pairs", "phases"))
_MAGNET_NAMES = {"ndfeb": "NdFeB", "smco": "SmCo", "ferrite": "ferrite"}


def build_sheet(record: MachineRecord, settings: Settings | None = None,
                locate: Any = None) -> tuple[Sheet, list[Finding]]:
    """The sheet of a validated record, and notes about unknown fields (info / warning)."""
    values: dict[str, Known] = {}
    notes: list[Finding] = []
    odd_qualifiers: list[tuple[str, Measured]] = []

    def put(path: str, m: Measured | None, temperature: float | None = None) -> None:
        if m is not None and not m.derived:  # a value `derive` wrote is worked out again
            values[path] = _known(path, m, temperature)
            if m.unknown_qualifiers:
                odd_qualifiers.append((path, m))

    # pydantic models define __getattr__, which makes every attribute read several times
    # dearer than a dict look-up: the fields are read from each model's __dict__ instead
    fields_of = vars(record)
    machine, rated, emf = fields_of["machine"], fields_of["rated"], fields_of["emf"]
    machine_fields, rated_fields, emf_fields = vars(machine), vars(rated), vars(emf)
    for name, path in _RATED_FIELDS:
        put(path, rated_fields[name])
    for i, point in enumerate(fields_of["points"]):
        point_fields = vars(point)
        for name in POINT_FIELDS:
            put(f"points[{i}].{name}", point_fields[name])
    put("rated.temperature_rise", rated_fields["temperature_rise"])
    put("rated.magnet_temperature", rated_fields["magnet_temperature"])
    losses = rated_fields["losses"]
    if losses is not None:
        put("rated.losses", losses)
        for part, m in losses.extras.items():
            put(f"rated.losses.{part}", m)
    for name, path in _COUNT_FIELDS:
        raw = machine_fields[name]
        if raw is not None:
            values[path] = Known(float(raw), 0.0, text=str(raw),
                                 sensitivity=own_sensitivity(path))
    ambient = machine_fields["ambient"]
    if ambient is not None:
        put("machine.ambient", ambient)
        if "min" in ambient.extras:
            put("machine.ambient.min", ambient.extras["min"])
    for name, path in _MACHINE_FIELDS:
        put(path, machine_fields[name])
    emf_magnet = emf_fields["magnet_temperature"]
    magnet_temperature = emf_magnet.value if emf_magnet else ROOM
    put("emf.magnet_temperature", emf_magnet)
    put("emf.constant", emf_fields["constant"], magnet_temperature)
    put("emf.voltage", emf_fields["voltage"], magnet_temperature)
    put("emf.speed", emf_fields["speed"])
    flux = emf_fields["flux_linkage"]
    if flux is not None:
        put("emf.flux_linkage", flux, flux.temperature or magnet_temperature)
    torque_constant = fields_of["torque_constant"]
    if torque_constant is not None:
        put("torque_constant", torque_constant, torque_constant.magnet_temperature)
    circuit_fields = vars(fields_of["circuit"])
    resistance = circuit_fields["resistance"]
    if resistance is not None:
        put("circuit.resistance", resistance, resistance.temperature or ROOM)
    put("circuit.ld", circuit_fields["ld"])
    put("circuit.lq", circuit_fields["lq"])
    limits_fields = vars(fields_of["limits"])
    for name, path in _LIMIT_FIELDS:
        put(path, limits_fields[name])
    no_load = limits_fields["no_load_speed"]
    if no_load is not None:
        put("limits.no_load_speed", no_load)
        if "supply" in no_load.extras:
            put("limits.no_load_speed.supply", no_load.extras["supply"])
    demagnetisation = limits_fields["demagnetisation_current"]
    if demagnetisation is not None:
        put("limits.demagnetisation_current", demagnetisation,
            demagnetisation.magnet_temperature)
    dynamics_fields = vars(fields_of["dynamics"])
    servo_sheet = False
    for name, path in _DYNAMICS_FIELDS:
        m = dynamics_fields[name]
        if m is not None:
            put(path, m)
            servo_sheet = True
    supply_fields = vars(fields_of["supply"])
    put("supply.mains_voltage", supply_fields["mains_voltage"])
    put("supply.dc_link_voltage", supply_fields["dc_link_voltage"])
    peak_torque, peak_current = limits_fields["peak_torque"], limits_fields["peak_current"]
    claim = fields_of["efficiency_class"]
    cooling, duty = machine_fields["cooling"], machine_fields["duty"]
    conductor, magnet = machine_fields["conductor"], machine_fields["magnet"]

    attributes: dict[str, Any] = {
        "id": fields_of["id"],
        "maker": fields_of["maker"],
        "machine.topology": machine_fields["topology"],
        "machine.connection": machine_fields["connection"],
        "machine.thermal_class": thermal_class_number(machine_fields["thermal_class"]),
        "machine.temperature_rise_class": thermal_class_number(
            machine_fields["temperature_rise_class"]),
        "machine.cooling": cooling.strip().upper() if cooling else None,
        "machine.duty": duty.strip().upper() if duty else None,
        "machine.magnet": _MAGNET_NAMES[magnet or "ndfeb"],
        "machine.conductor": "aluminium" if conductor in ("aluminium", "aluminum")
        else "copper",
        "efficiency_class": claim.value.strip().upper() if claim else None,
        "efficiency_class.standard": claim.standard if claim else None,
        "points.count": len(fields_of["points"]),
        "limits.peak_torque.duration": peak_torque.duration
        if peak_torque is not None else None,
        "limits.peak_current.duration": peak_current.duration
        if peak_current is not None else None,
        "accepted": [(a.rule, a.reason, tuple(a.fields)) for a in fields_of["accepted"]],
        "dynamics.stated": servo_sheet,
        "limits.no_load_speed.supply_kind": supply_kind(no_load.extras.get("supply"))
        if no_load is not None else None,
    }
    sheet = Sheet(record.id, values, attributes, settings, locate)
    notes.extend(_unknown_field_notes(record, fields_of, sheet, odd_qualifiers))
    return sheet, notes


#: quantities of the trade that are not (yet) fields of the schema: never a misspelling of a
#: field they merely resemble (DESIGN.md, Data contract)
TRADE_QUANTITIES = frozenset({
    "motor_constant", "kv", "velocity_constant", "speed_constant", "acceleration",
    "cogging_torque", "voltage_constant", "back_emf_constant", "torque_ripple",
    "thermal_resistance", "thermal_time_constant", "electrical_time_constant",
    "mechanical_time_constant", "winding_resistance", "winding_inductance", "stall_torque",
    "stall_current", "continuous_torque", "continuous_current", "no_load_speed",
    "no_load_current", "friction_torque", "damping", "brake", "encoder", "resolver",
    "protection", "ip_code", "weight", "frame", "shaft", "bearing", "noise", "vibration",
})


def _edit_distance(a: str, b: str) -> int:
    """Levenshtein distance of two short names."""
    previous = list(range(len(b) + 1))
    for i, ca in enumerate(a, 1):
        current = [i]
        for j, cb in enumerate(b, 1):
            current.append(min(previous[j] + 1, current[j - 1] + 1,
                               previous[j - 1] + (ca != cb)))
        previous = current
    return previous[-1]


def _misspelt(name: str, known: list[str]) -> list[str]:
    """The known field ``name`` probably misspells: close in spelling (a typo is one or two
    letters, a fifth of a long name at most), and not a trade quantity of its own."""
    leaf = name.rsplit(".", 1)[-1].lower()
    if leaf in TRADE_QUANTITIES or len(name) > 200:
        return []
    for candidate in difflib.get_close_matches(name, known, n=3, cutoff=0.8):
        if _edit_distance(name, candidate) <= max(1, min(2, len(candidate) // 5)):
            return [candidate]
    return []


@cache
def _field_names(model_type: type) -> tuple[str, ...]:
    return tuple(model_type.model_fields)


def _unknown_field_notes(record: MachineRecord, fields_of: dict[str, Any], sheet: Sheet,
                         odd_qualifiers: list[tuple[str, Measured]]) -> list[Finding]:
    rule = relation_for("unknown-field")
    out: list[Finding] = []
    sections: list[tuple[str, Any]] = [("", record)]
    sections += [(name, fields_of[name]) for name in SECTIONS]
    sections += [(f"points[{i}]", p) for i, p in enumerate(fields_of["points"])]
    for prefix, model in sections:
        extra = model.model_extra
        if not extra:
            continue
        known = list(_field_names(type(model)))
        for name in extra:
            path = f"{prefix}.{name}" if prefix else name
            if "." in name and not prefix:
                close = _misspelt(name, list(FIELDS))
            else:
                close = _misspelt(name, known)
            if close:
                meant = f"{prefix}.{close[0]}" if prefix else close[0]
                out.append(sheet.finding(rule, "warning",
                                         f"unknown field '{path}' looks like a misspelling of "
                                         f"'{meant}'; its value was not used", (path,)))
            else:
                out.append(sheet.finding(rule, "info", f"field '{path}' is not part of the "
                                         "schema; kept but not checked", (path,)))
    for path, m in odd_qualifiers:
        for q in m.unknown_qualifiers:
            out.append(sheet.finding(rule, "info", f"qualifier '{q}' of {path} is not part of "
                                     "the schema; kept but not used", (path,)))
    return out
