"""Each requirement against one checked offer: status, deciding figure, margin, what is missing.

Every requirement gets ``met``, ``not_met`` or ``unknown``. ``margin`` is the relative distance
of the deciding figure from its limit, positive inside the limit (1 - I/I_max for a current,
1 - m/m_max for a mass; on the losses scale for efficiency). Statuses are decided on the
unrounded SI figures; a margin within 1 % of the limit is flagged ``near_limit`` and said in the
detail, so that no reader takes a rounded figure for the decision.

The machine model is :mod:`sheetlint.physics.dq` (called, never re-written): magnets at the
hot temperature the site implies, winding resistance at the site's winding temperature,
voltage limit U_dc/sqrt(2) (space-vector modulation, linear range) with a diode front end's
DC link 3 sqrt(2)/pi x mains = 1.35 x mains under load (DESIGN.md Judgement section 3).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

from sheetlint.cautions import FINDING_CAUTION
from sheetlint.compare.requirement import Requirement
from sheetlint.engine.core import Sheet
from sheetlint.engine.run import RecordResult
from sheetlint.physics.dq import (
    DIODE_BRIDGE_DC_RATIO,
    RPM,
    SQRT2,
    DqMachine,
    flux_linkage_from_ke,
    max_torque_at_speed,
    operating_point,
    peak_line_back_emf,
    svpwm_line_voltage,
)
from sheetlint.physics.magnets import remanence_factor
from sheetlint.standards.efficiency import CONVERTER_FED_SOURCE, converter_fed_minimum
from sheetlint.standards.thermal import (
    TEMPERATURE_RISE_SOURCE,
    corrected_rise_limit,
    reference_temperature_c,
    resistance_at,
    thermal_class_limit,
)
from sheetlint.units import ROOM_TEMPERATURE, ZERO_CELSIUS

MET, NOT_MET, UNKNOWN = "met", "not_met", "unknown"
#: a margin closer to the limit than this is said to be within 1 % of it
NEAR_LIMIT = 0.01
#: IEC 60034-1 reference coolant temperature, used when a sheet does not state its own [degC]
REFERENCE_COOLANT_C = 40.0
#: a duty point within this relative speed of the top of the range sets the torque there
_SAME_SPEED = 0.005

DQ_SOURCE = ("steady-state dq model of the PM synchronous machine (R. Krishnan, Permanent Magnet "
             "Synchronous and Brushless DC Motor Drives, CRC Press 2010); six-pulse diode bridge "
             "U_dc = 3·√2/π·U_mains, space-vector modulation U_LL,rms ≤ U_dc/√2 "
             "(power-electronics texts)")


@dataclass(slots=True)
class RequirementResult:
    """The verdict on one requirement for one offer (display units in ``figure_text``)."""

    requirement: str
    status: str
    detail: str
    margin: float | None = None
    needs: list[str] = field(default_factory=list)
    figure: float | None = None  # the deciding figure, SI
    unit: str = ""  # SI unit of ``figure``
    limit: float | None = None  # the limit it was held against, SI
    figure_text: str = ""  # the deciding figure as shown, with its unit
    near_limit: bool = False
    fields: list[str] = field(default_factory=list)  # sheet fields the evaluation used
    source: str = ""
    caution: str | None = None
    contradicted: bool = False  # unknown because it rests on a field the sheet contradicts

    def to_dict(self) -> dict[str, Any]:
        out: dict[str, Any] = {
            "requirement": self.requirement, "status": self.status, "detail": self.detail,
            "margin": None if self.margin is None else round(self.margin, 6),
            "needs": list(self.needs), "figure": self.figure_text or None,
            "near_limit": self.near_limit, "fields": list(self.fields), "source": self.source}
        if self.caution:
            out["caution"] = self.caution
        return out


@dataclass(slots=True)
class DutyFigures:
    """What the machine model gives at one duty point (SI)."""

    speed: float
    torque: float
    current: float | None = None
    line_voltage: float | None = None
    region: str | None = None
    copper_loss: float | None = None
    losses: float | None = None


@dataclass(slots=True)
class SiteConditions:
    """The temperatures and voltages an offer is judged at (kelvin, volts), with notes."""

    magnet_hot: float | None
    magnet_cold: float
    winding: float | None
    voltage_limit: float | None  # line rms
    dc_link_loaded: float | None
    dc_link_no_load: float | None
    notes: list[str] = field(default_factory=list)
    assumed: list[str] = field(default_factory=list)  # unstated temperatures that mattered


@dataclass(slots=True)
class OfferEvaluation:
    """One offer against the requirement."""

    results: list[RequirementResult]
    duty: list[DutyFigures]
    site: SiteConditions
    machine_hot: DqMachine | None
    machine_cold_ke: float | None  # V line rms per rad/s at the lowest ambient
    used_fields: set[str]
    extra_figures: dict[str, tuple[float, str, str]]  # name -> (SI value, unit, provenance)


def _c(kelvin: float) -> str:
    return f"{kelvin - ZERO_CELSIUS:.0f} °C"


def _rpm(speed: float) -> str:
    return f"{speed / RPM:.0f} r/min"


def _pct(fraction: float) -> str:
    return f"{100.0 * fraction:.1f} %"


def _value(sheet: Sheet, name: str) -> float | None:
    known = sheet.values.get(name)
    return known.value if known is not None and math.isfinite(known.value) else None


def _given_roots(sheet: Sheet, name: str, depth: int = 0) -> set[str]:
    """The given fields a known value rests on (itself when given)."""
    known = sheet.values.get(name)
    if known is None:
        return set()
    if known.is_given or depth > 8 or not known.inputs:
        return {name}
    out: set[str] = set()
    for parent in known.inputs:
        out |= _given_roots(sheet, parent, depth + 1)
    return out or {name}


def _finish(result: RequirementResult) -> RequirementResult:
    if result.margin is not None and abs(result.margin) < NEAR_LIMIT and result.status != UNKNOWN:
        result.near_limit = True
        result.detail += (f"; within 1 % of the limit (margin {_pct(result.margin)}): the status "
                          "rests on the figures as written, confirm them with the vendor")
    return result


# --- site conditions and the machine model -----------------------------------------------------
def site_conditions(sheet: Sheet, req: Requirement) -> SiteConditions:
    """Magnet and winding temperatures at the site, and the converter's voltages.

    Hot magnets: the sheet's rated magnet temperature raised by the amount the site's coolant
    exceeds the sheet's (its stated ambient, else the IEC 60034-1 reference of 40 degC).
    Winding: site coolant + the stated temperature rise. Voltage limit: U_dc/sqrt(2) with U_dc
    stated, or 3 sqrt(2)/pi x mains (diode front end under load).
    """
    notes: list[str] = []
    assumed: list[str] = []
    design = _value(sheet, "machine.ambient")
    design_c = design - ZERO_CELSIUS if design is not None else REFERENCE_COOLANT_C
    site_c = req.ambient - ZERO_CELSIUS if req.ambient is not None else design_c
    if req.ambient is None:
        notes.append(f"no site ambient in the requirement: the sheet's {design_c:.0f} °C used")
    rise_site = max(0.0, site_c - design_c)
    rated_magnet = sheet.values.get("rated.magnet_temperature")
    magnet_hot: float | None = None
    if rated_magnet is not None:
        magnet_hot = rated_magnet.value + rise_site
        how = "stated" if rated_magnet.is_given else "not stated, taken from the rise class"
        notes.append(f"magnets at {_c(magnet_hot)} (rated magnet temperature "
                     f"{_c(rated_magnet.value)}, {how}, + {rise_site:.0f} K for the site "
                     f"coolant {site_c:.0f} °C over the sheet's {design_c:.0f} °C)")
        if not rated_magnet.is_given:
            assumed.append("rated.magnet_temperature")
    if design is None and rise_site > 0.0:
        assumed.append("machine.ambient")
    cold = req.ambient_min if req.ambient_min is not None else _value(sheet, "machine.ambient.min")
    if cold is None:
        cold = ROOM_TEMPERATURE
        notes.append("no lowest ambient given: cold magnets at 20 °C assumed")
    rise = _value(sheet, "rated.temperature_rise")
    winding: float | None = None
    if rise is not None:
        winding = site_c + ZERO_CELSIUS + rise
    else:
        thermal_class = sheet.attr("machine.thermal_class")
        ref = reference_temperature_c(req.rise_class or thermal_class)
        if ref is not None:
            winding = ref + ZERO_CELSIUS + rise_site
            notes.append(f"no temperature rise stated: winding at the class reference "
                         f"{ref:.0f} °C + {rise_site:.0f} K")
    dc_loaded = dc_no_load = None
    mains = req.mains_voltage if req.mains_voltage is not None else (
        None if req.dc_link_voltage is not None else _value(sheet, "supply.mains_voltage"))
    dc = req.dc_link_voltage if req.dc_link_voltage is not None else (
        None if req.mains_voltage is not None else _value(sheet, "supply.dc_link_voltage"))
    if dc is not None:
        dc_loaded = dc_no_load = dc
    elif mains is not None:
        dc_loaded = DIODE_BRIDGE_DC_RATIO * mains
        dc_no_load = SQRT2 * mains
    if req.mains_voltage is None and req.dc_link_voltage is None and (mains or dc):
        notes.append("no supply in the requirement: the offer's own supply used")
    limit = svpwm_line_voltage(dc_loaded) if dc_loaded is not None else None
    return SiteConditions(magnet_hot, cold, winding, limit, dc_loaded, dc_no_load, notes,
                          assumed)


def _pole_pairs(sheet: Sheet) -> float | None:
    pairs = _value(sheet, "machine.pole_pairs")
    if pairs is None:
        poles = _value(sheet, "machine.poles")
        pairs = poles / 2.0 if poles is not None else None
    return pairs if pairs is not None and pairs > 0.0 else None


def flux_linkage_at(sheet: Sheet, magnet_k: float) -> tuple[float, list[str]] | None:
    """psi [Wb peak] at a magnet temperature [K], from emf.constant or emf.flux_linkage.

    .. math:: \\psi(T) = \\frac{K_e}{\\sqrt{3/2}\\,p}\\,(1 + \\alpha (T - T_{Ke}))
    """
    pairs = _pole_pairs(sheet)
    if pairs is None:
        return None
    magnet = sheet.attr("machine.magnet")
    for name in ("emf.constant", "emf.flux_linkage"):
        known = sheet.values.get(name)
        if known is None or not known.value > 0.0:
            continue
        psi = flux_linkage_from_ke(known.value, pairs) if name == "emf.constant" else known.value
        from_k = known.temperature if known.temperature is not None else ROOM_TEMPERATURE
        fields = ["machine.poles", name]
        return psi * remanence_factor(magnet, from_k, magnet_k), fields
    return None


def site_machine(sheet: Sheet, site: SiteConditions) -> tuple[DqMachine | None, list[str],
                                                               list[str], list[str]]:
    """The dq machine with hot magnets and a hot winding: (machine, fields, needs, notes)."""
    needs: list[str] = []
    notes: list[str] = []
    pairs = _pole_pairs(sheet)
    if pairs is None:
        needs.append("machine.poles")
    if site.magnet_hot is None:
        needs.append("rated.magnet_temperature")
    flux = flux_linkage_at(sheet, site.magnet_hot) if site.magnet_hot is not None else None
    if flux is None and pairs is not None:
        needs.append("emf.constant")
    ld, lq = _value(sheet, "circuit.ld"), _value(sheet, "circuit.lq")
    if ld is None and lq is None:
        needs.extend(["circuit.ld", "circuit.lq"])
    if needs or pairs is None or flux is None:
        return None, [], needs, notes
    fields = list(flux[1])
    if ld is None or lq is None:
        notes.append("only one inductance given: L_d = L_q assumed")
    ld = ld if ld is not None else lq
    lq = lq if lq is not None else ld
    fields += [n for n in ("circuit.ld", "circuit.lq") if n in sheet.values]
    resistance = _value(sheet, "circuit.resistance")
    r_hot = 0.0
    if resistance is None:
        notes.append("no resistance given: copper drop and copper loss neglected")
    elif site.winding is None:
        r_hot = resistance
        notes.append("winding temperature unknown: resistance used as given")
        fields.append("circuit.resistance")
    else:
        known = sheet.values["circuit.resistance"]
        from_c = (known.temperature if known.temperature is not None
                  else ROOM_TEMPERATURE) - ZERO_CELSIUS
        conductor = sheet.attr("machine.conductor") or "copper"
        r_hot = resistance_at(resistance, from_c, site.winding - ZERO_CELSIUS, conductor)
        notes.append(f"winding at {_c(site.winding)}")
        fields.append("circuit.resistance")
    assert ld is not None and lq is not None
    machine = DqMachine(flux[0], ld, lq, r_hot if math.isfinite(r_hot) else 0.0, pairs)
    if not machine.valid():
        return None, fields, ["circuit.ld", "circuit.lq", "emf.constant"], notes
    return machine, fields, needs, notes


# --- requirements ------------------------------------------------------------------------------
def _other_losses(sheet: Sheet) -> float | None:
    """Iron, friction and stray losses at the rated point: total minus copper [W]."""
    total, copper = _value(sheet, "rated.losses"), _value(sheet, "rated.losses.copper")
    if total is None:
        power, eta = _value(sheet, "rated.power"), _value(sheet, "rated.efficiency")
        if power is not None and eta is not None and 0.0 < eta < 1.0:
            total = power / eta - power
    if total is None or copper is None:
        return None
    return max(total - copper, 0.0)


def evaluate_duty(index: int, sheet: Sheet, req: Requirement, site: SiteConditions,
                  machine: DqMachine | None, model_fields: list[str], model_needs: list[str],
                  model_notes: list[str]) -> tuple[RequirementResult, DutyFigures]:
    """Duty point ``index``: continuous rating, reach within the voltage limit, converter current.

    The least-current operating point (MTPA, field weakening above base speed) with the shaft
    torque taken as the electromagnetic torque (loss torque neglected).
    """
    duty = req.duty[index]
    name = f"duty[{index}]"
    figures = DutyFigures(duty.speed, duty.torque)
    where = f"{duty.torque:.0f} N·m at {_rpm(duty.speed)}"
    fields: list[str] = []
    needs = list(model_needs)
    if req.max_current is None:
        needs.append("converter.max_current (requirement)")
    if site.voltage_limit is None:
        needs.append("supply.mains_voltage")
    problems: list[str] = []
    max_speed = _value(sheet, "limits.max_speed")
    if max_speed is not None:
        fields.append("limits.max_speed")
        if duty.speed > max_speed * (1.0 + 1e-9):
            problems.append(f"{_rpm(duty.speed)} is above the maximum speed "
                            f"{_rpm(max_speed)} on the sheet")
    rated_torque, rated_speed = _value(sheet, "rated.torque"), _value(sheet, "rated.speed")
    rated_power = _value(sheet, "rated.power")
    if rated_torque is None or rated_speed is None:
        needs.append("rated.torque")
    else:
        fields += ["rated.torque", "rated.speed"]
        continuous = rated_torque if duty.speed <= rated_speed or rated_power is None else min(
            rated_torque, rated_power / duty.speed)
        if duty.torque > continuous * (1.0 + 1e-9):
            problems.append(f"{duty.torque:.0f} N·m exceeds the continuous (S1) rating "
                            f"{continuous:.0f} N·m at that speed")
    if machine is None or req.max_current is None or site.voltage_limit is None:
        status = NOT_MET if problems else UNKNOWN
        detail = "; ".join(problems) if problems else (
            f"{where}: the machine model lacks " + ", ".join(dict.fromkeys(needs)))
        return _finish(RequirementResult(name, status, detail, None,
                                         list(dict.fromkeys(needs)) if not problems else [],
                                         fields=fields + model_fields, source=DQ_SOURCE)), figures
    point = operating_point(machine, duty.torque, duty.speed, site.voltage_limit)
    figures.current = point.current_rms
    figures.line_voltage = point.line_voltage_rms
    figures.region = point.region
    figures.copper_loss = point.copper_loss if machine.resistance > 0.0 else None
    other = _other_losses(sheet)
    if figures.copper_loss is not None and other is not None:
        figures.losses = figures.copper_loss + other
    margin = 1.0 - point.current_rms / req.max_current
    context = "; ".join([*model_notes, *site.notes[:1]])
    if not point.feasible:
        problems.append(f"not reachable within the voltage limit {site.voltage_limit:.0f} V "
                        f"(U_dc/√2 with U_dc = {site.dc_link_loaded:.0f} V): the torque needs "
                        "more voltage than the converter gives at that speed")
        margin = None  # type: ignore[assignment]
    elif point.current_rms > req.max_current:
        problems.append(f"needs {point.current_rms:.1f} A, above the converter's continuous "
                        f"{req.max_current:.0f} A")
    region = {"mtpa": "below base speed (MTPA)",
              "field-weakening": "in field weakening"}.get(point.region, point.region)
    figure = (f"I = {point.current_rms:.1f} A, U = {point.line_voltage_rms:.0f} V "
              f"of {site.voltage_limit:.0f} V, {region}")
    detail = f"{where}: {figure}; converter {req.max_current:.0f} A"
    if problems:
        detail += " — " + "; ".join(problems)
    if context:
        detail += f" ({context})"
    result = RequirementResult(name, NOT_MET if problems else MET, detail, margin, [],
                               point.current_rms, "A", req.max_current,
                               f"{point.current_rms:.1f} A", fields=fields + model_fields,
                               source=DQ_SOURCE)
    return _finish(result), figures


def _torque_at_top(req: Requirement) -> float:
    """Torque asked at the top speed: a duty point there, else the fastest duty point's power
    held to the top speed (constant power), else none."""
    assert req.speed_max is not None
    top = req.speed_max
    below = [d for d in req.duty if d.speed <= top * (1.0 + _SAME_SPEED)]
    if not below:
        return 0.0
    fastest = max(below, key=lambda d: d.speed)
    if fastest.speed >= top * (1.0 - _SAME_SPEED):
        return fastest.torque
    return fastest.torque * fastest.speed / top


def reachable_speed(machine: DqMachine, current: float, voltage: float, torque: float,
                    upper: float) -> float:
    """Highest speed [rad/s] up to ``upper`` at which ``torque`` is available within the
    current and voltage limits (bisection on :func:`max_torque_at_speed`)."""

    def available(speed: float) -> bool:
        return max_torque_at_speed(machine, current, voltage, speed)[0] >= torque

    if available(upper):
        return upper
    if not available(1e-6 * upper):
        return 0.0
    lo, hi = 1e-6 * upper, upper
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        if available(mid):
            lo = mid
        else:
            hi = mid
    return lo


def evaluate_speed_range(sheet: Sheet, req: Requirement, site: SiteConditions,
                         machine: DqMachine | None, model_fields: list[str],
                         model_needs: list[str]) -> tuple[RequirementResult, float | None]:
    """Top of the speed range: the sheet's maximum speed, and the speed up to which the
    torque asked there is available within the converter's current and voltage."""
    assert req.speed_max is not None
    top = req.speed_max
    torque = _torque_at_top(req)
    max_speed = _value(sheet, "limits.max_speed")
    needs: list[str] = []
    if max_speed is None:
        needs.append("limits.max_speed")
    if machine is None:
        needs.extend(model_needs)
    if req.max_current is None:
        needs.append("converter.max_current (requirement)")
    if site.voltage_limit is None:
        needs.append("supply.mains_voltage")
    reach = None
    margins: list[float] = []
    parts: list[str] = []
    if max_speed is not None:
        margins.append(max_speed / top - 1.0)
        parts.append(f"maximum speed on the sheet {_rpm(max_speed)}")
    if machine is not None and req.max_current is not None and site.voltage_limit is not None:
        reach = reachable_speed(machine, req.max_current, site.voltage_limit, torque,
                                3.0 * top)
        margins.append(reach / top - 1.0)
        reach_text = "beyond 3× the top speed" if reach >= 3.0 * top else _rpm(reach)
        parts.append(f"{torque:.0f} N·m available up to {reach_text} within "
                     f"{req.max_current:.0f} A and {site.voltage_limit:.0f} V")
    fields = (["limits.max_speed"] if max_speed is not None else []) + model_fields
    if not margins or (needs and all(m >= 0.0 for m in margins)):
        return _finish(RequirementResult(
            "speed_range", UNKNOWN, f"top speed {_rpm(top)}: " + ("; ".join(parts) or
                                                                  "nothing to decide it on"),
            None, list(dict.fromkeys(needs)), fields=fields, source=DQ_SOURCE)), reach
    margin = min(margins)
    status = MET if margin >= 0.0 else NOT_MET
    return _finish(RequirementResult(
        "speed_range", status, f"top speed {_rpm(top)}: " + "; ".join(parts), margin, [],
        top * (1.0 + margin), "rad/s", top, _rpm(top * (1.0 + margin)), fields=fields,
        source=DQ_SOURCE)), reach


def evaluate_efficiency(sheet: Sheet, req: Requirement) -> RequirementResult:
    """Declared efficiency against the required class (IEC TS 60034-30-2 approximated by the
    IEC 60034-30-1 4-pole limit at the same rated power); margin on the losses scale,
    1 - (1 - eta)/(1 - eta_min)."""
    assert req.efficiency_class is not None
    name = "efficiency_class"
    wanted = f"IE{req.efficiency_class}"
    eta, power = _value(sheet, "rated.efficiency"), _value(sheet, "rated.power")
    speed = _value(sheet, "rated.speed")
    needs = [n for n, v in (("rated.efficiency", eta), ("rated.power", power)) if v is None]
    if needs:
        return RequirementResult(name, UNKNOWN, f"{wanted} required; the sheet lacks "
                                 + ", ".join(needs), None, needs, source=CONVERTER_FED_SOURCE)
    assert eta is not None and power is not None
    speed_rpm = speed / RPM if speed is not None else None
    minimum = converter_fed_minimum(req.efficiency_class, power, speed_rpm)
    fields = sorted(_given_roots(sheet, "rated.efficiency") | _given_roots(sheet, "rated.power"))
    if minimum.efficiency is None:
        return RequirementResult(name, UNKNOWN, f"{wanted} required: {minimum.reason}", None,
                                 [], fields=fields, source=CONVERTER_FED_SOURCE)
    reached = None
    for ie_class in (2, 3, 4, 5):
        limit = converter_fed_minimum(ie_class, power, speed_rpm).efficiency
        if limit is not None and eta >= limit:
            reached = ie_class
    margin = 1.0 - (1.0 - eta) / (1.0 - minimum.efficiency)
    claim = sheet.attr("efficiency_class")
    detail = (f"declared η = {100 * eta:.2f} % at {power / 1e3:.4g} kW against the {wanted} "
              f"minimum {100 * minimum.efficiency:.1f} % (approximation: {minimum.method}); "
              f"reaches {'IE' + str(reached) if reached else 'no class from IE2'}; margin on "
              "the losses scale, 1 − (1 − η)/(1 − η_min)")
    if claim:
        detail += f"; the sheet claims {claim}"
    return _finish(RequirementResult(name, MET if eta >= minimum.efficiency else NOT_MET,
                                     detail, margin, [], eta, "", minimum.efficiency,
                                     f"{100 * eta:.2f} %", fields=fields,
                                     source=CONVERTER_FED_SOURCE))


def evaluate_insulation(sheet: Sheet, req: Requirement) -> RequirementResult:
    """The offer's IEC 60085 thermal class against the least class required."""
    assert req.insulation_class is not None
    offered = sheet.attr("machine.thermal_class")
    if not isinstance(offered, int):
        return RequirementResult("thermal.class", UNKNOWN, f"class {req.insulation_class} "
                                 "required; the sheet states no thermal class", None,
                                 ["machine.thermal_class"], source=TEMPERATURE_RISE_SOURCE)
    ok = offered >= req.insulation_class
    return RequirementResult("thermal.class", MET if ok else NOT_MET,
                             f"class {offered} offered, class {req.insulation_class} required",
                             None, [], float(offered), "", float(req.insulation_class),
                             str(offered), fields=["machine.thermal_class"],
                             source=TEMPERATURE_RISE_SOURCE)


def evaluate_rise(sheet: Sheet, req: Requirement) -> RequirementResult:
    """Stated temperature rise against the limit of the required rise class, corrected for
    the site's coolant temperature and altitude (IEC 60034-1)."""
    rise_class = req.rise_class or req.insulation_class
    assert rise_class is not None
    base = thermal_class_limit(rise_class)
    rise = _value(sheet, "rated.temperature_rise")
    name = "thermal.rise"
    if base is None:
        return RequirementResult(name, UNKNOWN, f"no rise limit held for class {rise_class}",
                                 None, [], source=TEMPERATURE_RISE_SOURCE)
    coolant_c = req.ambient - ZERO_CELSIUS if req.ambient is not None else None
    limit = corrected_rise_limit(base, coolant_c, req.altitude)
    how = "; ".join(limit.notes) if limit.notes else "no site correction"
    head = (f"limit of class {rise_class}: {base:.0f} K, at the site {limit.value:.1f} K "
            f"({how})")
    if rise is None:
        return RequirementResult(name, UNKNOWN, head + "; the sheet states no temperature rise",
                                 None, ["rated.temperature_rise"],
                                 source=TEMPERATURE_RISE_SOURCE)
    margin = 1.0 - rise / limit.value
    status = MET if rise <= limit.value else NOT_MET
    detail = f"stated rise {rise:.0f} K against the {head}"
    if limit.beyond_rules:
        detail += "; the site lies outside the correction rules: the limit needs agreement"
    return _finish(RequirementResult(name, status, detail, margin, [], rise, "K", limit.value,
                                     f"{rise:.0f} K", fields=["rated.temperature_rise"],
                                     source=TEMPERATURE_RISE_SOURCE))


def evaluate_emf(sheet: Sheet, req: Requirement, site: SiteConditions
                 ) -> tuple[RequirementResult, float | None]:
    """Peak line back-EMF at the top speed with cold magnets against the DC link held by a
    stopped converter (stated, else sqrt(2) x mains), less the required margin.

    .. math:: \\hat E_{LL} = \\sqrt{2}\\,K_e(T_{cold})\\,\\omega_{top}
        \\le (1 - m)\\,U_{dc}
    """
    name = "emf_margin"
    required = req.emf_margin or 0.0
    top = req.speed_max if req.speed_max is not None else _value(sheet, "limits.max_speed")
    pairs = _pole_pairs(sheet)
    flux = flux_linkage_at(sheet, site.magnet_cold)
    needs = []
    if top is None:
        needs.append("limits.max_speed")
    if flux is None or pairs is None:
        needs.append("emf.constant")
    if site.dc_link_no_load is None:
        needs.append("supply.mains_voltage")
    if needs:
        return RequirementResult(name, UNKNOWN, "peak back-EMF at the top speed not known",
                                 None, needs, source=DQ_SOURCE, caution=FINDING_CAUTION), None
    assert top is not None and flux is not None and pairs is not None
    assert site.dc_link_no_load is not None
    ke_cold = flux[0] * math.sqrt(1.5) * pairs
    peak = peak_line_back_emf(ke_cold, top)
    threshold = (1.0 - required) * site.dc_link_no_load
    margin = 1.0 - peak / threshold
    head = (f"peak line back-EMF at {_rpm(top)} with magnets at {_c(site.magnet_cold)}: "
            f"{peak:.0f} V against the DC link {site.dc_link_no_load:.0f} V")
    detail = head + (f" less {_pct(required)} = {threshold:.0f} V" if required else "")
    detail += (f"; headroom {_pct(1.0 - peak / site.dc_link_no_load)}. Above the DC link, a "
               "converter that stops switching at speed lets the machine charge it through "
               "the diodes")
    return _finish(RequirementResult(name, MET if peak <= threshold else NOT_MET, detail,
                                     margin, [], peak, "V", threshold, f"{peak:.0f} V",
                                     fields=flux[1], source=DQ_SOURCE,
                                     caution=FINDING_CAUTION)), ke_cold


def evaluate_plain(sheet: Sheet, name: str, field_name: str, limit: float, unit: str
                   ) -> RequirementResult:
    """A plain upper limit on one field (mass, inertia)."""
    value = _value(sheet, field_name)
    if value is None:
        return RequirementResult(name, UNKNOWN, f"at most {limit:.4g} {unit} required; the "
                                 "sheet does not state it", None, [field_name])
    margin = 1.0 - value / limit
    return _finish(RequirementResult(name, MET if value <= limit else NOT_MET,
                                     f"{value:.4g} {unit} against at most {limit:.4g} {unit}",
                                     margin, [], value, unit, limit, f"{value:.4g} {unit}",
                                     fields=[field_name]))


def evaluate_consistency(result: RecordResult) -> RequirementResult:
    """The sheet's own check: errors leave the offer's figures unreliable (``unknown``)."""
    errors = [f for f in result.findings if f.severity == "error" and f.accepted is None]
    warnings = [f for f in result.findings if f.severity == "warning" and f.accepted is None]
    if errors:
        fields = sorted({name for f in errors for name in f.fields})
        return RequirementResult("consistency", UNKNOWN, f"{len(errors)} error(s) on the sheet "
                                 f"({', '.join(sorted({f.rule for f in errors}))}): its figures "
                                 "contradict each other until the vendor corrects them", None,
                                 fields, fields=fields, source="sheetlint check")
    text = "no errors on the sheet" + (f"; {len(warnings)} warning(s) to clarify"
                                       if warnings else "")
    return RequirementResult("consistency", MET, text, None, [], source="sheetlint check")


def _downgrade_contradicted(results: list[RequirementResult], contradicted: set[str],
                            sheet: Sheet) -> None:
    """A status that rests on a field the sheet contradicts becomes ``unknown``."""
    for result in results:
        if result.requirement == "consistency" or result.status == UNKNOWN:
            continue
        roots: set[str] = set()
        for name in result.fields:
            roots |= _given_roots(sheet, name)
        hit = sorted((roots | set(result.fields)) & contradicted)
        if hit:
            result.detail += (f"; would be {result.status.replace('_', ' ')}, but rests on "
                              f"{', '.join(hit)}, which the sheet contradicts")
            result.status = UNKNOWN
            result.needs = hit
            result.contradicted = True
            result.near_limit = False


def evaluate_offer(result: RecordResult, req: Requirement) -> OfferEvaluation:
    """Every requirement against one checked record (``result.sheet`` must be set)."""
    sheet = result.sheet
    assert sheet is not None
    site = site_conditions(sheet, req)
    machine, model_fields, model_needs, model_notes = site_machine(sheet, site)
    results: list[RequirementResult] = [evaluate_consistency(result)]
    duties: list[DutyFigures] = []
    for index in range(len(req.duty)):
        duty_result, figures = evaluate_duty(index, sheet, req, site, machine, model_fields,
                                             model_needs, model_notes)
        results.append(duty_result)
        duties.append(figures)
    extra: dict[str, tuple[float, str, str]] = {}
    if req.speed_max is not None:
        speed_result, reach = evaluate_speed_range(sheet, req, site, machine, model_fields,
                                                   model_needs)
        results.append(speed_result)
        if reach is not None:
            extra["speed_range.reach"] = (reach, "rad/s", "dq model")
    if req.efficiency_class is not None:
        results.append(evaluate_efficiency(sheet, req))
    if req.insulation_class is not None:
        results.append(evaluate_insulation(sheet, req))
    if req.rise_class is not None or req.insulation_class is not None:
        results.append(evaluate_rise(sheet, req))
    ke_cold = None
    if req.emf_margin is not None or req.speed_max is not None:
        emf_result, ke_cold = evaluate_emf(sheet, req, site)
        results.append(emf_result)
    if req.mass is not None:
        results.append(evaluate_plain(sheet, "mass", "machine.mass", req.mass, "kg"))
    if req.inertia is not None:
        results.append(evaluate_plain(sheet, "inertia", "machine.inertia", req.inertia,
                                      "kg·m²"))
    contradicted = {name for f in result.findings if f.severity == "error"
                    and f.accepted is None for name in f.fields}
    _downgrade_contradicted(results, contradicted, sheet)
    for index, figures in enumerate(duties):
        for key, value, unit in (("current", figures.current, "A"),
                                 ("line_voltage", figures.line_voltage, "V"),
                                 ("losses", figures.losses, "W")):
            if value is not None:
                extra[f"duty[{index}].{key}"] = (value, unit, "dq model")
    used = set(model_fields)
    for r in results:
        used.update(r.fields)
    return OfferEvaluation(results, duties, site, machine, ke_cold, used, extra)
