"""The parameter set a converter's motor-data entry needs, each value with its provenance.

Units are those a drive's motor-data entry usually asks for: line-to-line rms volts, rms
amperes, Hz, r/min, kW, N·m, per-phase ohms and millihenries (of the equivalent star), V/krpm
(line rms) and Wb (peak per phase). The layout is our own and neutral: names in plain English,
no converter family's parameter numbers.

Nothing here is a second copy of the machine physics: values come from the engine's completed
sheet (each derived value with its rule and inputs), from :mod:`sheetlint.physics.dq`, from
:mod:`sheetlint.physics.magnets` and from :func:`sheetlint.standards.thermal.resistance_at`.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Callable

from sheetlint.engine.core import ESTIMATE as ENGINE_ESTIMATE
from sheetlint.engine.core import GIVEN, Finding, Known, Sheet
from sheetlint.physics.dq import (
    RPM,
    SQRT3,
    characteristic_current,
    flux_linkage_from_ke,
    max_speed_at_current,
    speed_at_back_emf,
)
from sheetlint.physics.magnets import remanence_factor
from sheetlint.relations.machine import converter_voltage_limit, dc_link_voltage, model_inputs
from sheetlint.standards.thermal import resistance_at, temperature_constant
from sheetlint.units import ROOM_TEMPERATURE, ZERO_CELSIUS

from .values import DERIVED, ESTIMATE, STATED, Parameter, digits_for, number_text

#: the rule id under which this package asks the engine's model helpers for inputs
COMMISSION_RULE = "commission"
#: the reference temperature of the cold values, degC (catalogues state R and Ke at 20 degC)
COLD_C = 20.0

LINE_RMS = "line-to-line rms"
PHASE = "per phase of the equivalent star"
PEAK_PHASE = "peak per phase"
RMS = "rms"
MECHANICAL = "mechanical"


def celsius(kelvin: float) -> float:
    return kelvin - ZERO_CELSIUS


def _provenance(known: Known) -> str:
    if known.origin == GIVEN:
        return STATED
    return ESTIMATE if known.origin == ENGINE_ESTIMATE else DERIVED


class ParameterSet:
    """Builds the list of :class:`Parameter` from a derived sheet."""

    def __init__(self, sheet: Sheet) -> None:
        self.sheet = sheet
        self.items: list[Parameter] = []

    # --- helpers ------------------------------------------------------------------------
    def add_known(self, name: str, label: str, field_name: str, unit: str, basis: str,
                  scale: Callable[[float], float] = lambda v: v, note: str | None = None,
                  integer: bool = False) -> Known | None:
        """Add a sheet value as it stands (stated, or derived/estimated by the engine)."""
        known = self.sheet.get(field_name)
        if known is None or not math.isfinite(known.value):
            return None
        value = scale(known.value)
        text = str(round(value)) if integer else number_text(value, digits_for(known.uncertainty))
        provenance = _provenance(known)
        inputs = (field_name,) if provenance == STATED else known.inputs
        rule = None if provenance == STATED else known.rule
        self.items.append(Parameter(name, label, text, unit, basis, provenance, rule, inputs,
                                    note or known.note))
        return known

    def add_value(self, name: str, label: str, value: float, uncertainty: float, unit: str,
                  basis: str, rule: str, inputs: tuple[str, ...], note: str | None = None,
                  estimate: bool = False) -> None:
        """Add a value worked out here from sheet values (``rule``: the relation it follows)."""
        if not math.isfinite(value):
            return
        self.items.append(Parameter(name, label, number_text(value, digits_for(uncertainty)),
                                    unit, basis, ESTIMATE if estimate else DERIVED, rule,
                                    inputs, note))


#: what a motor-data entry asks for, and the record field that would supply each when the
#: sheet neither states nor determines it (plain names of our own)
ENTRY_NEEDS: tuple[tuple[str, str, str], ...] = (
    ("rated_voltage", "rated voltage", "rated.voltage"),
    ("rated_current", "rated current", "rated.current"),
    ("rated_frequency", "rated frequency", "rated.frequency"),
    ("rated_speed", "rated speed", "rated.speed"),
    ("rated_power", "rated power", "rated.power"),
    ("rated_torque", "rated torque", "rated.torque"),
    ("power_factor", "power factor cos φ", "rated.power_factor"),
    ("pole_pairs", "pole pairs", "machine.poles"),
    ("resistance_20c", "stator resistance", "circuit.resistance"),
    ("ld", "d-axis inductance Ld", "circuit.ld"),
    ("lq", "q-axis inductance Lq", "circuit.lq"),
    ("ke_20c", "back-EMF constant Ke", "emf.constant"),
    ("kt", "torque constant Kt", "torque_constant"),
    ("inertia", "rotor inertia", "machine.inertia"),
    ("max_speed", "maximum speed", "limits.max_speed"),
    ("max_current", "maximum current", "limits.peak_current"),
)


def missing_parameters(parameters: list[Parameter]) -> list[tuple[str, str, str]]:
    """(name, label, field that would supply it) of each entry the parameter set lacks."""
    present = {p.name for p in parameters}
    return [need for need in ENTRY_NEEDS if need[0] not in present]


def parameter_set(sheet: Sheet) -> list[Parameter]:
    """The parameter set of a derived sheet, in the order a motor-data entry asks for it."""
    ps = ParameterSet(sheet)
    get = sheet.get
    ps.add_known("rated_voltage", "rated voltage", "rated.voltage", "V", LINE_RMS)
    ps.add_known("rated_current", "rated current", "rated.current", "A", RMS)
    ps.add_known("rated_frequency", "rated frequency", "rated.frequency", "Hz", "stator")
    ps.add_known("rated_speed", "rated speed", "rated.speed", "r/min", MECHANICAL,
                 scale=lambda v: v / RPM)
    ps.add_known("rated_power", "rated power", "rated.power", "kW", "shaft",
                 scale=lambda v: v / 1e3)
    ps.add_known("rated_torque", "rated torque", "rated.torque", "N*m", "shaft")
    ps.add_known("power_factor", "power factor cos φ", "rated.power_factor", "", "rated point")
    if get("machine.pole_pairs") is not None:
        ps.add_known("pole_pairs", "pole pairs", "machine.pole_pairs", "", "", integer=True)
    else:
        ps.add_known("pole_pairs", "pole pairs", "machine.poles", "", "",
                     scale=lambda v: v / 2.0, integer=True)
    _resistances(ps)
    ps.add_known("ld", "d-axis inductance Ld", "circuit.ld", "mH", PHASE,
                 scale=lambda v: v * 1e3)
    ps.add_known("lq", "q-axis inductance Lq", "circuit.lq", "mH", PHASE,
                 scale=lambda v: v * 1e3)
    _flux_and_emf(ps)
    ps.add_known("kt", "torque constant Kt", "torque_constant", "N*m/A", "per rms ampere")
    ps.add_known("inertia", "rotor inertia", "machine.inertia", "kg*m**2", "")
    ps.add_known("max_speed", "maximum speed", "limits.max_speed", "r/min", MECHANICAL,
                 scale=lambda v: v / RPM)
    ps.add_known("max_current", "maximum current", "limits.peak_current", "A", RMS)
    _converter_limits(ps)
    return ps.items


def rated_winding_temperature(sheet: Sheet) -> float | None:
    """The winding temperature [degC] of the engine's hot resistance, read back from
    R_hot/R₂₀ = (k + θ)/(k + 20) — the temperature the engine chose (stated rise plus coolant,
    else the IEC 60034-2-1 reference temperature of the class)."""
    cold, hot = sheet.get("circuit.resistance"), sheet.get("circuit.resistance_hot")
    k = temperature_constant(sheet.attr("machine.conductor") or "copper")
    if cold is None or hot is None or k is None or not cold.value > 0.0:
        return None
    t1 = celsius(cold.temperature if cold.temperature is not None else ROOM_TEMPERATURE)
    return (k + t1) * hot.value / cold.value - k


def _resistances(ps: ParameterSet) -> None:
    sheet = ps.sheet
    cold = sheet.get("circuit.resistance")
    if cold is None:
        return
    conductor = sheet.attr("machine.conductor") or "copper"
    t1 = celsius(cold.temperature if cold.temperature is not None else ROOM_TEMPERATURE)
    basis_note = (f"stated on basis '{cold.basis}', converted to the star-equivalent phase"
                  if cold.basis not in (None, "phase") else None)
    if abs(t1 - COLD_C) < 1e-9:
        ps.add_known("resistance_20c", "stator resistance at 20 °C", "circuit.resistance",
                     "ohm", PHASE, note=basis_note)
    else:
        k = temperature_constant(conductor)
        ps.add_value("resistance_20c", "stator resistance at 20 °C",
                     resistance_at(cold.value, t1, COLD_C, conductor), cold.uncertainty, "ohm",
                     PHASE, "temperature-rise", ("circuit.resistance",),
                     f"{conductor} (k = {k:g}) from {t1:g} °C: R₂ = R₁·(k + 20)/(k + θ₁), "
                     "IEC 60034-1", estimate=cold.is_estimate)
    hot_c = rated_winding_temperature(sheet)
    if hot_c is not None:
        ps.add_known("resistance_hot", f"stator resistance at {hot_c:.0f} °C",
                     "circuit.resistance_hot", "ohm", PHASE)


def _ke_at_20c(sheet: Sheet) -> tuple[float, float, bool, str] | None:
    """(Ke [V·s/rad, line rms] at 20 degC, uncertainty, estimate, note) from the sheet."""
    ke = sheet.get("emf.constant")
    if ke is None or not ke.value > 0.0:
        return None
    t = ke.temperature if ke.temperature is not None else ROOM_TEMPERATURE
    if abs(t - ROOM_TEMPERATURE) < 1e-9:
        return ke.value, ke.uncertainty, ke.is_estimate, ""
    factor = remanence_factor(sheet.attr("machine.magnet"), t, ROOM_TEMPERATURE,
                              sheet.option("magnet-temperature", "alpha", None))
    return (ke.value * factor, ke.uncertainty, ke.is_estimate,
            f"scaled from {celsius(t):g} °C by the magnet's remanence coefficient")


def _pole_pairs(sheet: Sheet) -> float | None:
    pairs = sheet.get("machine.pole_pairs")
    if pairs is not None:
        return pairs.value
    poles = sheet.get("machine.poles")
    return poles.value / 2.0 if poles is not None else None


def _flux_and_emf(ps: ParameterSet) -> None:
    sheet = ps.sheet
    p = _pole_pairs(sheet)
    cold = _ke_at_20c(sheet)
    per_krpm = 1000.0 * RPM
    if cold is not None:
        ke20, unc, estimate, note = cold
        ke_known = sheet.get("emf.constant")
        assert ke_known is not None
        if note or ke_known.origin != GIVEN:
            ps.add_value("ke_20c", "back-EMF constant Ke at 20 °C", ke20 * per_krpm, unc,
                         "V/krpm", LINE_RMS, ke_known.rule or "magnet-temperature",
                         ke_known.inputs or ("emf.constant",), note or ke_known.note,
                         estimate=estimate)
        else:
            ps.add_known("ke_20c", "back-EMF constant Ke at 20 °C", "emf.constant", "V/krpm",
                         LINE_RMS, scale=lambda v: v * per_krpm)
        if p:
            ps.add_value("flux_linkage_20c", "PM flux linkage ψ at 20 °C",
                         flux_linkage_from_ke(ke20, p), unc, "Wb", PEAK_PHASE, "emf-constant",
                         ("emf.constant", "machine.pole_pairs"),
                         "ψ = Ke/(√(3/2)·p), amplitude-invariant dq model", estimate=estimate)
    hot = sheet.get("emf.constant_hot")
    if hot is not None and hot.temperature is not None:
        t_hot = celsius(hot.temperature)
        ps.add_known("ke_hot", f"back-EMF constant Ke at {t_hot:.0f} °C", "emf.constant_hot",
                     "V/krpm", LINE_RMS, scale=lambda v: v * per_krpm,
                     note=f"magnets at {t_hot:.0f} °C ({hot.note})")
        if p:
            ps.add_value("flux_linkage_hot", f"PM flux linkage ψ at {t_hot:.0f} °C",
                         flux_linkage_from_ke(hot.value, p), hot.uncertainty, "Wb", PEAK_PHASE,
                         "emf-constant", ("emf.constant_hot", "machine.pole_pairs"),
                         "ψ = Ke/(√(3/2)·p), amplitude-invariant dq model",
                         estimate=hot.is_estimate)


def _converter_limits(ps: ParameterSet) -> None:
    sheet = ps.sheet
    dc = dc_link_voltage(sheet)
    cold = sheet.get("emf.constant_cold")
    if dc is not None:
        u_dc, how, dc_fields = dc
        ps.add_value("dc_link_voltage", "DC link held by a stopped converter", u_dc,
                     1e-4, "V", "DC", "overspeed-emf", tuple(dc_fields), how)
        if cold is not None and cold.value > 0.0:
            speed = speed_at_back_emf(cold.value, u_dc)
            ps.add_value("dc_link_speed", "back-EMF reaches the DC link at",
                         speed / RPM, cold.uncertainty, "r/min", MECHANICAL, "overspeed-emf",
                         ("emf.constant_cold", *dc_fields),
                         f"n = U_dc/(√2·Ke), cold magnets ({cold.note}); above it a converter "
                         "that stops switching lets the machine charge the DC link",
                         estimate=cold.is_estimate)
            ke = sheet.get("emf.constant")
            if ke is not None and ke.origin == GIVEN and not ke.basis_stated:
                # the unsafe end of an unstated basis (DESIGN.md "Judgement" 3 and 4): Ke read
                # per phase is √3 times the line value, and reaches the DC link √3 times sooner
                ps.add_value("dc_link_speed_if_per_phase",
                             "back-EMF reaches the DC link, Ke per phase, at",
                             speed / RPM / SQRT3, cold.uncertainty, "r/min", MECHANICAL,
                             "overspeed-emf", ("emf.constant_cold", *dc_fields),
                             "the sheet does not state the basis of emf.constant; this is the "
                             "unsafe end of its readings: confirm the basis with the "
                             "manufacturer before running near this speed",
                             estimate=True)
    inputs = model_inputs(sheet, COMMISSION_RULE)
    limit = converter_voltage_limit(sheet)
    current = sheet.get("rated.current")
    if inputs is not None:
        machine = inputs.machine
        ps.add_value("characteristic_current", "characteristic current ψ/Ld",
                     characteristic_current(machine) / math.sqrt(2.0), inputs.uncertainty, "A",
                     RMS, "field-weakening-speed", tuple(inputs.fields),
                     "magnets at the rated temperature", estimate=inputs.estimate)
        if limit is not None and current is not None and current.value > 0.0:
            reach = max_speed_at_current(machine, current.value, limit.line_rms)
            if math.isfinite(reach):
                ps.add_value("field_weakening_reach",
                             "field-weakening reach at rated current",
                             reach / RPM, inputs.uncertainty + current.uncertainty, "r/min",
                             MECHANICAL, "field-weakening-speed",
                             ("rated.current", *limit.fields, *inputs.fields),
                             f"{limit.how}; magnets at the rated temperature",
                             estimate=inputs.estimate)
            else:
                ps.items.append(Parameter(
                    "field_weakening_reach", "field-weakening reach at rated current", "0",
                    "r/min", MECHANICAL, DERIVED, "field-weakening-speed",
                    ("rated.current", *limit.fields, *inputs.fields),
                    "no limit in this model: rated current exceeds ψ/Ld"))
    hot_r = sheet.get("circuit.resistance_hot")
    if current is not None and hot_r is not None:
        ps.add_value("standstill_voltage", "line voltage for rated current at standstill",
                     SQRT3 * current.value * hot_r.value,
                     current.uncertainty + hot_r.uncertainty, "V", LINE_RMS, "resistance-drop",
                     ("rated.current", "circuit.resistance_hot"),
                     "U = √3·I·R_phase,hot: at zero speed the impedance is the resistance alone",
                     estimate=hot_r.is_estimate)


def _resting_on(sheet: Sheet, names: tuple[str, ...]) -> set[str]:
    """The fields ``names`` rest on: themselves and, through the engine's derivations, the
    inputs of each derived value, to the given fields."""
    out: set[str] = set()
    todo = list(names)
    while todo:
        name = todo.pop()
        if name in out:
            continue
        out.add(name)
        known = sheet.get(name)
        if known is not None and known.origin != GIVEN:
            todo.extend(known.inputs)
    return out


def with_doubts(parameters: list[Parameter], findings: list[Finding], sheet: Sheet
                ) -> list[Parameter]:
    """Each parameter with the warnings and errors of the record check on the fields it rests
    on: a value a converter is given should not carry a doubt unseen."""
    loud = [f for f in findings if f.severity in ("warning", "error") and f.accepted is None]
    if not loud:
        return parameters
    out = []
    for parameter in parameters:
        fields = _resting_on(sheet, parameter.inputs)
        doubts = dict.fromkeys(parameter.doubts)  # in order, once each
        for f in loud:
            named = f.fields[:1] if f.fields else ()
            if fields.intersection(named) or (f.cause and any(n in f.cause for n in fields)):
                text = f.cause or f.message.split(". ")[0]
                doubts[f"{f.severity} ({f.rule}): {text}"] = None
        out.append(dataclasses.replace(parameter, doubts=tuple(doubts)) if doubts
                   else parameter)
    return out
