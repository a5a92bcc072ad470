"""What an identification run should find, and identification results judged against the sheet.

The rules of judgement are those of the engine (DESIGN.md "Judgement"): each comparison has an
admissible range — the sheet's value at the measurement's temperature and basis, widened by the
written precision of both values and by a model band named below — and a miss is a ``warning``
when it lies within the allowance beyond that range and an ``error`` further out. A miss that a
usual slip reconciles carries that slip as its cause; a basis the measured file leaves unstated
turns that into a warning that asks for the basis.

Physics used, none of it copied: the resistance temperature correction of IEC 60034-1
(:func:`sheetlint.standards.thermal.resistance_at`, k = 235 copper, 225 aluminium), the
magnets' remanence coefficient (:func:`sheetlint.physics.magnets.remanence_factor`), and the
basis factors of the engine (:data:`sheetlint.engine.build.BASIS_FACTOR`: a terminal-to-
terminal resistance or inductance is twice the star-equivalent phase value for star and delta
alike; a delta branch is three times it).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

from sheetlint.engine.build import BASIS_FACTOR
from sheetlint.engine.core import Finding, Sheet
from sheetlint.physics.dq import RPM, SQRT2, SQRT3
from sheetlint.physics.magnets import remanence_coefficient, remanence_factor
from sheetlint.standards.thermal import resistance_at, temperature_constant
from sheetlint.units import ROOM_TEMPERATURE, ZERO_CELSIUS

from .measured import UNSTATED_TEMPERATURE_K, MeasuredCable, MeasuredFile, MeasuredValue
from .values import DERIVED, Parameter, digits_for, number_text

#: winding resistance: catalogue tolerance about ±5 % plus a converter's standstill
#: identification within a few per cent (common practice, no published source)
RESISTANCE_BAND = 0.08
#: identified over sheet inductance: a low test current finds the unsaturated value (higher
#: than a sheet value at rated current, by up to a third on the q axis of an interior-magnet
#: machine), a high-frequency test the incremental one (lower) (common practice)
INDUCTANCE_BAND = (0.80, 1.30)
#: back-EMF: the catalogue tolerance of the back-EMF constant, ±3 % (common practice, the
#: same band DESIGN.md "Model bands" gives for Kt against √3·Ke)
EMF_BAND = 0.03
#: a hot back-EMF reading is named as the cause when the magnet temperature that reconciles
#: it lies at least this far above the stated one, and at most at HOT_MAGNET_MAX_C
HOT_MAGNET_MIN_RISE_K = 15.0
HOT_MAGNET_MAX_C = 180.0

SOURCE_RESISTANCE = ("IEC 60034-1 and IEC 60034-2-1, resistance temperature correction "
                     "R₂ = R₁·(k + θ₂)/(k + θ₁), k = 235 copper, 225 aluminium (from memory); "
                     "band: common practice")
SOURCE_INDUCTANCE = "band for saturation and test current: common practice"
SOURCE_EMF = ("magnet makers' technical notes, reversible remanence coefficient (as quoted); "
              "band: common practice")

#: resistivity of cable conductors at 20 degC [ohm·m]: annealed copper 1/58 ohm·mm²/m
#: (IEC 60028, the International Annealed Copper Standard, from memory); hard-drawn aluminium
#: 0.028264 ohm·mm²/m (IEC 60889, from memory)
CABLE_RESISTIVITY = {"copper": 1.0 / 58.0 * 1e-6, "aluminium": 0.028264e-6}

RULE_RESISTANCE = "identified-resistance"
RULE_INDUCTANCE = "identified-inductance"
RULE_EMF = "identified-emf"


def _c(kelvin: float) -> float:
    return kelvin - ZERO_CELSIUS


@dataclass(frozen=True, slots=True)
class Conditions:
    """The test conditions the expected values refer to (degC, r/min)."""

    winding_temperature_c: float
    magnet_temperature_c: float
    test_speed_rpm: float | None

    def to_dict(self) -> dict[str, Any]:
        return {"winding_temperature": {"value": self.winding_temperature_c, "unit": "°C"},
                "magnet_temperature": {"value": self.magnet_temperature_c, "unit": "°C"},
                "test_speed": None if self.test_speed_rpm is None else
                {"value": self.test_speed_rpm, "unit": "r/min"}}


@dataclass(slots=True)
class Comparison:
    """One identification result against the sheet (values in the units shown)."""

    quantity: str  # resistance | ld | lq | emf
    measured: str
    expected_low: str
    expected_high: str
    unit: str
    basis: str
    deviation: float  # measured over the nearest end of the admissible range, minus 1
    allowance: float
    verdict: str  # agrees | warning | error
    note: str = ""  # what was done to the measured value before comparing

    def to_dict(self) -> dict[str, Any]:
        return {"quantity": self.quantity, "measured": float(self.measured),
                "expected_low": float(self.expected_low),
                "expected_high": float(self.expected_high), "unit": self.unit,
                "basis": self.basis, "deviation": round(self.deviation, 6),
                "allowance": round(self.allowance, 6), "verdict": self.verdict,
                **({"note": self.note} if self.note else {})}


@dataclass(slots=True)
class Identification:
    conditions: Conditions
    expected: list[Parameter]
    comparisons: list[Comparison] = field(default_factory=list)
    findings: list[Finding] = field(default_factory=list)
    measured_path: str | None = None
    #: measured quantities the sheet gives nothing to compare with, each with the reason
    not_compared: list[str] = field(default_factory=list)


# --- expected values ---------------------------------------------------------------------------
def _resistance_at(sheet: Sheet, celsius: float) -> float | None:
    """Phase resistance [ohm] of the sheet at a winding temperature (235/225 rule)."""
    r = sheet.get("circuit.resistance")
    if r is None or not r.value > 0.0:
        return None
    t1 = _c(r.temperature if r.temperature is not None else ROOM_TEMPERATURE)
    value = resistance_at(r.value, t1, celsius, sheet.attr("machine.conductor") or "copper")
    return value if math.isfinite(value) else None


def _ke_at(sheet: Sheet, kelvin: float) -> float | None:
    """Ke [V·s/rad line rms] of the sheet at a magnet temperature (remanence coefficient)."""
    ke = sheet.get("emf.constant")
    if ke is None or not ke.value > 0.0:
        return None
    t = ke.temperature if ke.temperature is not None else ROOM_TEMPERATURE
    return ke.value * remanence_factor(sheet.attr("machine.magnet"), t, kelvin,
                                       sheet.option("magnet-temperature", "alpha", None))


def conditions_for(sheet: Sheet, measured: MeasuredFile | None = None,
                   winding_c: float | None = None, speed_rpm: float | None = None
                   ) -> Conditions:
    """Test conditions: the measured file's, else the ones asked for, else 20 °C and the
    rated speed."""
    if measured is not None and measured.resistance is not None \
            and measured.resistance.temperature is not None:
        winding_c = _c(measured.resistance.temperature)
    magnet_c = winding_c
    if measured is not None and measured.emf is not None:
        emf = measured.emf
        if emf.magnet_temperature is not None:
            magnet_c = _c(emf.magnet_temperature)
        if emf.speed is not None:
            speed_rpm = emf.speed.value / RPM
    if speed_rpm is None:
        rated = sheet.get("rated.speed")
        speed_rpm = rated.value / RPM if rated is not None else None
    room = _c(ROOM_TEMPERATURE)
    return Conditions(room if winding_c is None else winding_c,
                      room if magnet_c is None else magnet_c, speed_rpm)


def expected_values(sheet: Sheet, conditions: Conditions) -> list[Parameter]:
    """What an identification run should find at the given conditions."""
    out: list[Parameter] = []
    tw, tm = conditions.winding_temperature_c, conditions.magnet_temperature_c
    r = sheet.get("circuit.resistance")
    r_phase = _resistance_at(sheet, tw)
    if r is not None and r_phase is not None:
        conductor = sheet.attr("machine.conductor") or "copper"
        k = temperature_constant(conductor)
        note = (f"{conductor} (k = {k:g}): R(θ) = R₁·(k + θ)/(k + θ₁), IEC 60034-1; "
                f"winding at {tw:g} °C")
        digits = digits_for(r.uncertainty)
        out.append(Parameter("resistance_line", f"resistance terminal to terminal at {tw:g} °C",
                             number_text(2.0 * r_phase, digits), "ohm", "line (terminal to "
                             "terminal) = 2 × phase, star and delta alike", DERIVED,
                             "temperature-rise", ("circuit.resistance",), note))
        out.append(Parameter("resistance_phase", f"resistance per phase at {tw:g} °C",
                             number_text(r_phase, digits), "ohm", "per phase of the "
                             "equivalent star", DERIVED, "temperature-rise",
                             ("circuit.resistance",), note))
        if sheet.attr("machine.connection") == "delta":
            out.append(Parameter("resistance_delta_branch",
                                 f"resistance of one delta branch at {tw:g} °C",
                                 number_text(3.0 * r_phase, digits), "ohm",
                                 "delta branch = 3 × star-equivalent phase", DERIVED,
                                 "temperature-rise", ("circuit.resistance",), note))
    for axis in ("ld", "lq"):
        known = sheet.get(f"circuit.{axis}")
        if known is not None:
            low, high = INDUCTANCE_BAND
            out.append(Parameter(axis, f"{axis[0].upper()}{axis[1]} per phase",
                                 number_text(known.value * 1e3, digits_for(known.uncertainty)),
                                 "mH", "per phase of the equivalent star", DERIVED, None,
                                 (f"circuit.{axis}",),
                                 f"the sheet's value; an identification may find {low:g}–"
                                 f"{high:g} × it (saturation and test current, common "
                                 "practice); terminal to terminal it reads twice the phase "
                                 "value"))
    ke = _ke_at(sheet, tm + ZERO_CELSIUS)
    ke_known = sheet.get("emf.constant")
    if ke is not None and ke_known is not None:
        digits = digits_for(ke_known.uncertainty)
        note = f"magnets at {tm:g} °C ({sheet.attr('machine.magnet') or 'NdFeB'} remanence " \
               "coefficient)"
        out.append(Parameter("ke", f"back-EMF constant at {tm:g} °C",
                             number_text(ke * 1000.0 * RPM, digits), "V/krpm", "line-to-line "
                             "rms", DERIVED, "magnet-temperature", ("emf.constant",), note))
        if conditions.test_speed_rpm:
            out.append(Parameter(
                "emf_voltage", f"back-EMF at {conditions.test_speed_rpm:g} r/min, {tm:g} °C",
                number_text(ke * conditions.test_speed_rpm * RPM, digits), "V",
                "line-to-line rms", DERIVED, "emf-constant", ("emf.constant",),
                f"E = Ke·ω; {note}; peak line-to-line "
                f"{SQRT2 * ke * conditions.test_speed_rpm * RPM:.0f} V at the terminals of the "
                "turning machine, converter on or off"))
    return out


# --- judging -------------------------------------------------------------------------------------
@dataclass(frozen=True, slots=True)
class Slip:
    factor: float  # measured / true
    cause: str
    basis: bool = False  # a basis slip (turns into a question when the basis is unstated)


def _miss(value: float, low: float, high: float) -> float:
    """Relative distance of ``value`` from the range [low, high]; 0 inside."""
    if value < low:
        return value / low - 1.0
    if value > high:
        return value / high - 1.0
    return 0.0


def _allowance(low: float, high: float) -> float:
    """Half the relative width of an admissible range (at least 2 %)."""
    return max(0.02, 0.5 * (high / low - 1.0))


def _verdict(miss: float, allowance: float) -> str:
    if miss == 0.0:
        return "agrees"
    return "warning" if abs(miss) <= allowance else "error"


def _reconciling(value: float, low: float, high: float, slips: list[Slip]) -> list[Slip]:
    return [s for s in slips if _miss(value / s.factor, low, high) == 0.0]


def _finding(rule: str, severity: str, message: str, fields: tuple[str, ...],
             expected: str, actual: str, deviation: float, cause: str | None,
             source: str) -> Finding:
    level: Any = severity  # one of the three severities, by construction
    return Finding(rule, level, message, fields, {fields[0]: expected}, {fields[0]: actual},
                   deviation, cause, source)


def _severity_with_slips(verdict: str, slips: list[Slip], basis_stated: bool) -> str:
    if slips and not basis_stated and all(s.basis for s in slips):
        return "warning"
    return verdict


def _temperature_range(stated: float | None) -> tuple[float, float, str]:
    """(low, high) kelvin and a note: the stated temperature, or the unstated interval."""
    if stated is not None:
        return stated, stated, f"{_c(stated):g} °C"
    low, high = UNSTATED_TEMPERATURE_K
    return low, high, (f"{_c(low):g}–{_c(high):g} °C (the file states no temperature; a "
                       "plant-room interval is assumed)")


def cable_loop_resistance(cable: MeasuredCable) -> float:
    """Resistance [ohm] of a cable between two motor terminals at 20 degC: two conductors,
    R = 2·ρ·L/A (a terminal-to-terminal measurement runs out on one and back on another)."""
    return 2.0 * CABLE_RESISTIVITY[cable.conductor] * cable.length / cable.cross_section


def judge_resistance(sheet: Sheet, measured: MeasuredValue, cable: MeasuredCable | None = None
                     ) -> tuple[Comparison, Finding | None] | None:
    """Identified resistance against the sheet's at the measurement's winding temperature.

    .. math:: R_{phase}(\\theta) = R_1\\,\\frac{k + \\theta}{k + \\theta_1}, \\qquad
        R_{line} = 2\\,R_{phase}, \\quad R_{\\Delta\\,branch} = 3\\,R_{phase}

    admitted within ±``RESISTANCE_BAND`` plus the written precision of both values (k = 235
    copper, 225 aluminium: IEC 60034-1, from memory). None when the sheet gives no
    resistance (or its conductor has no known constant). A stated cable's resistance is taken
    off first (on the measurement's basis)."""
    t_low, t_high, t_note = _temperature_range(measured.temperature)
    r_low = _resistance_at(sheet, _c(t_low))
    r_high = _resistance_at(sheet, _c(t_high))
    sheet_r = sheet.get("circuit.resistance")
    if r_low is None or r_high is None or sheet_r is None:
        return None
    precision = sheet_r.uncertainty + measured.reading.uncertainty
    band = RESISTANCE_BAND + precision
    low, high = r_low * (1.0 - band), r_high * (1.0 + band)
    to_phase = BASIS_FACTOR["resistance"][measured.basis]
    value = measured.value * to_phase
    cable_note = ""
    if cable is not None:
        loop = cable_loop_resistance(cable)  # line (terminal to terminal)
        value -= loop * BASIS_FACTOR["resistance"]["line"]
        cable_note = (f" after the stated cable ({cable.length:g} m of "
                      f"{cable.cross_section * 1e6:g} mm² {cable.conductor}, "
                      f"{loop * 1e3:.3g} mΩ line-to-line) is taken off")
        if not value > 0.0:
            comparison = Comparison("resistance", number_text(measured.value, 4), "0", "0",
                                    "ohm", measured.basis, -1.0, 0.0, "error")
            return comparison, _finding(
                RULE_RESISTANCE, "error",
                f"the stated cable's resistance ({loop * 1e3:.3g} mΩ line-to-line) is as "
                f"large as the identified resistance {measured.value:.4g} Ω itself",
                ("identification.cable", "identification.resistance"), "", "", -1.0,
                "check the cable's length, cross-section and the resistance's unit",
                SOURCE_RESISTANCE)
    miss = _miss(value, low, high)
    allowance = _allowance(low, high)
    verdict = _verdict(miss, allowance)
    shown = 1.0 / to_phase  # phase value × shown = value on the measured basis
    digits = digits_for(sheet_r.uncertainty)
    comparison = Comparison("resistance", number_text(value * shown, digits),
                            number_text(low * shown, digits), number_text(high * shown, digits),
                            "ohm", measured.basis, miss, allowance, verdict,
                            cable_note.strip())
    if verdict == "agrees":
        return comparison, None
    slips = [Slip(1000.0, "mΩ written as Ω: the value agrees divided by 1000"),
             Slip(1e-3, "Ω written as mΩ: the value agrees multiplied by 1000")]
    if measured.basis == "phase":
        slips.append(Slip(2.0, "measured line-to-line (terminal to terminal) but entered per "
                          "phase: the value agrees as a line-to-line value", basis=True))
    if measured.basis == "line":
        slips.append(Slip(0.5, "measured per phase but entered as line-to-line: the value "
                          "agrees as a phase value", basis=True))
    if sheet.attr("machine.connection") == "delta":
        if measured.basis == "phase":
            slips.append(Slip(3.0, "one delta branch entered as the star-equivalent phase "
                              "value: it agrees with basis delta_branch", basis=True))
        if measured.basis == "line":
            slips.append(Slip(1.5, "one delta branch entered as line-to-line: it agrees with "
                              "basis delta_branch", basis=True))
    found = _reconciling(value, low, high, slips)
    severity = _severity_with_slips(verdict, found, measured.basis_stated)
    if found:
        cause = "; or ".join(s.cause for s in found)
    elif miss > 0.0 and cable is None:
        excess = (value - r_high) * shown
        k = temperature_constant(sheet.attr("machine.conductor") or "copper") or 235.0
        t1 = _c(sheet_r.temperature if sheet_r.temperature is not None else ROOM_TEMPERATURE)
        warm = (k + t1) * value / sheet_r.value - k
        cause = (f"cable resistance included: the excess of {excess * 1e3:.3g} mΩ "
                 f"({measured.basis}) fits the resistance of a motor cable between converter "
                 "and terminals, which an identification at the converter measures too "
                 "(state identification.cable to have it taken off); "
                 f"or the winding warmer than {t_note} (the value fits a winding at "
                 f"{warm:.0f} °C)")
    elif miss > 0.0:
        cause = ("above the sheet even without the stated cable: check the cable data, and "
                 "whether the winding was warmer than stated")
    else:
        cause = ("below the sheet: a sheet resistance stated hot but labelled 20 °C, or a "
                 "line-to-line sheet value printed as per phase")
    if found and severity == "warning" and not measured.basis_stated:
        cause += "; the measured file does not state the basis: please state it"
    comparison.verdict = severity
    message = (f"identified resistance {comparison.measured} Ω ({measured.basis}, {t_note})"
               f"{cable_note} "
               f"is {miss:+.1%} outside the {comparison.expected_low}–"
               f"{comparison.expected_high} Ω the sheet gives at that temperature and basis "
               f"(235/225 rule, band ±{RESISTANCE_BAND:.0%} common practice)")
    return comparison, _finding(
        RULE_RESISTANCE, severity, message, ("identification.resistance", "circuit.resistance"),
        f"{comparison.expected_low}–{comparison.expected_high} ohm ({measured.basis})",
        f"{comparison.measured} ohm ({measured.basis})", miss, cause, SOURCE_RESISTANCE)


def _inductance_range(sheet: Sheet, axis: str, measured: MeasuredValue
                      ) -> tuple[float, float] | None:
    known = sheet.get(f"circuit.{axis}")
    if known is None:
        return None
    precision = known.uncertainty + measured.reading.uncertainty
    low, high = INDUCTANCE_BAND
    return known.value * low * (1.0 - precision), known.value * high * (1.0 + precision)


def judge_inductances(sheet: Sheet, ld: MeasuredValue | None, lq: MeasuredValue | None
                      ) -> tuple[list[Comparison], list[Finding]]:
    """Identified Ld and Lq against the sheet within the saturation and test-current band:
    ``INDUCTANCE_BAND[0]·L ≤ L_identified ≤ INDUCTANCE_BAND[1]·L`` per phase (a line value
    halved first), widened by the written precision (band: common practice)."""
    comparisons: list[Comparison] = []
    findings: list[Finding] = []
    ranges: dict[str, tuple[float, float]] = {}
    phase_values: dict[str, float] = {}
    for axis, measured in (("ld", ld), ("lq", lq)):
        if measured is None:
            continue
        found = _inductance_range(sheet, axis, measured)
        if found is None:
            continue
        ranges[axis] = found
        to_phase = BASIS_FACTOR["inductance"][measured.basis]
        phase_values[axis] = measured.value * to_phase
        shown = 1e3 / to_phase
        miss = _miss(phase_values[axis], *found)
        allowance = _allowance(*found)
        comparisons.append(Comparison(axis, number_text(measured.value * 1e3, 4),
                                      number_text(found[0] * shown, 4),
                                      number_text(found[1] * shown, 4), "mH", measured.basis,
                                      miss, allowance, _verdict(miss, allowance)))
    failing = [c for c in comparisons if c.verdict != "agrees"]
    if not failing:
        return comparisons, findings
    if len(ranges) == 2 and len(failing) == 2 and ld is not None and lq is not None:
        swapped_d = _miss(phase_values["ld"], *ranges["lq"]) == 0.0
        swapped_q = _miss(phase_values["lq"], *ranges["ld"]) == 0.0
        if swapped_d and swapped_q:
            worst = max(failing, key=lambda c: abs(c.deviation))
            for c in failing:
                c.verdict = worst.verdict
            findings.append(_finding(
                RULE_INDUCTANCE, worst.verdict,
                f"identified Ld {failing[0].measured} mH and Lq {failing[1].measured} mH lie "
                f"outside the sheet's bands ({failing[0].expected_low}–"
                f"{failing[0].expected_high} mH and {failing[1].expected_low}–"
                f"{failing[1].expected_high} mH) but each fits the other axis",
                ("identification.ld", "identification.lq", "circuit.ld", "circuit.lq"),
                f"Ld {failing[0].expected_low}–{failing[0].expected_high} mH",
                f"Ld {failing[0].measured} mH", worst.deviation,
                "Ld and Lq swapped: the identified d-axis value is the sheet's q-axis value and "
                "the other way round (Ld is the smaller of the two on an interior-magnet "
                "machine)", SOURCE_INDUCTANCE))
            return comparisons, findings
    for comparison in failing:
        axis = comparison.quantity
        measured = ld if axis == "ld" else lq
        assert measured is not None
        slips = [Slip(1000.0, "unit prefix: the value agrees divided by 1000 (µH written as "
                      "mH, or mH as H)"),
                 Slip(1e-3, "unit prefix: the value agrees multiplied by 1000")]
        if measured.basis == "phase":
            slips.append(Slip(2.0, "measured line-to-line (terminal to terminal) but entered "
                              "per phase: the value agrees as a line-to-line value", basis=True))
        if measured.basis == "line":
            slips.append(Slip(0.5, "measured per phase but entered as line-to-line",
                              basis=True))
        found = _reconciling(phase_values[axis], *ranges[axis], slips)
        severity = _severity_with_slips(comparison.verdict, found, measured.basis_stated)
        cause = "; or ".join(s.cause for s in found) if found else None
        if found and severity == "warning" and not measured.basis_stated:
            cause = f"{cause}; the measured file does not state the basis: please state it"
        comparison.verdict = severity
        label = "Ld" if axis == "ld" else "Lq"
        findings.append(_finding(
            RULE_INDUCTANCE, severity,
            f"identified {label} {comparison.measured} mH ({measured.basis}) is "
            f"{comparison.deviation:+.1%} outside the {comparison.expected_low}–"
            f"{comparison.expected_high} mH that saturation and test current explain "
            f"({INDUCTANCE_BAND[0]:g}–{INDUCTANCE_BAND[1]:g} × the sheet, common practice)",
            (f"identification.{axis}", f"circuit.{axis}"),
            f"{comparison.expected_low}–{comparison.expected_high} mH",
            f"{comparison.measured} mH", comparison.deviation, cause, SOURCE_INDUCTANCE))
    return comparisons, findings


def judge_emf(sheet: Sheet, measured: MeasuredFile) -> tuple[Comparison, Finding | None] | None:
    """Identified back-EMF against the sheet's Ke at the measurement's magnet temperature.

    .. math:: K_e(T) = K_e(T_1)\\,(1 + \\alpha\\,(T - T_1)), \\qquad E_{LL,rms} = K_e\\,\\omega

    admitted within ±``EMF_BAND`` plus the written precision (α by magnet material, magnet
    makers' notes as quoted; band: common practice)."""
    emf = measured.emf
    ke_known = sheet.get("emf.constant")
    if emf is None or ke_known is None:
        return None
    to_line_rms = BASIS_FACTOR["emf_constant"][emf.basis]
    if emf.constant is not None:
        ke_measured = emf.constant.value * to_line_rms
        precision = emf.constant.uncertainty
    else:
        assert emf.voltage is not None and emf.speed is not None
        ke_measured = emf.voltage.value * to_line_rms / emf.speed.value
        precision = emf.voltage.uncertainty + emf.speed.uncertainty
    t_low, t_high, t_note = _temperature_range(emf.magnet_temperature)
    ke_cold, ke_hot = _ke_at(sheet, t_low), _ke_at(sheet, t_high)
    if ke_cold is None or ke_hot is None:
        return None
    band = EMF_BAND + precision + ke_known.uncertainty
    low, high = min(ke_cold, ke_hot) * (1.0 - band), max(ke_cold, ke_hot) * (1.0 + band)
    miss = _miss(ke_measured, low, high)
    allowance = _allowance(low, high)
    verdict = _verdict(miss, allowance)
    # shown on the measured file's own terms: volts at its speed, or V/krpm
    if emf.constant is not None:
        per, unit, shown_value = 1000.0 * RPM / to_line_rms, "V/krpm", emf.constant.value
        what = "back-EMF constant"
        shown_value *= 1000.0 * RPM
    else:
        assert emf.speed is not None and emf.voltage is not None
        per, unit, shown_value = emf.speed.value / to_line_rms, "V", emf.voltage.value
        what = f"back-EMF at {emf.speed.value / RPM:g} r/min"
    digits = digits_for(ke_known.uncertainty)
    comparison = Comparison("emf", number_text(shown_value, digits), number_text(low * per, digits),
                            number_text(high * per, digits), unit, emf.basis, miss, allowance,
                            verdict)
    if verdict == "agrees":
        return comparison, None
    slips = [Slip(1.0 / SQRT3, "Ke per phase: the measured value agrees as a phase value, not "
                  "line-to-line", basis=True),
             Slip(SQRT3, "the sheet's emf.constant agrees if it is per phase, not "
                  "line-to-line", basis=False),
             Slip(SQRT2, "peak written as rms: the measured value agrees as a peak value",
                  basis=True),
             Slip(1.0 / SQRT2, "rms written as peak: the measured value agrees as an rms value",
                  basis=True)]
    found = _reconciling(ke_measured, low, high, slips)
    severity = _severity_with_slips(verdict, found, emf.basis_stated)
    cause: str | None = "; or ".join(s.cause for s in found) if found else None
    if found and severity == "warning" and not emf.basis_stated:
        cause = f"{cause}; the measured file does not state the basis: please state it"
    if not found and miss < 0.0:
        alpha = float(sheet.option("magnet-temperature", "alpha", None)
                      or remanence_coefficient(sheet.attr("machine.magnet")))
        t_ke = _c(ke_known.temperature if ke_known.temperature is not None
                  else ROOM_TEMPERATURE)
        hot_c = t_ke + (ke_measured / ke_known.value - 1.0) / alpha
        if _c(t_high) + HOT_MAGNET_MIN_RISE_K <= hot_c <= HOT_MAGNET_MAX_C:
            cause = (f"back-EMF measured hot: the value agrees with magnets at about "
                     f"{hot_c:.0f} °C, not {t_note}; repeat the spin test with the machine at "
                     "ambient temperature, or state the magnet temperature")
            severity = "warning"
    comparison.verdict = severity
    field_name = "identification.emf"
    message = (f"identified {what} {comparison.measured} {unit} ({emf.basis}, magnets at "
               f"{t_note}) is {miss:+.1%} outside the {comparison.expected_low}–"
               f"{comparison.expected_high} {unit} the sheet's Ke gives there (±{EMF_BAND:.0%} "
               "common practice, magnet temperature corrected)")
    return comparison, _finding(
        RULE_EMF, severity, message, (field_name, "emf.constant"),
        f"{comparison.expected_low}–{comparison.expected_high} {unit}",
        f"{comparison.measured} {unit}", miss, cause, SOURCE_EMF)


def identification(sheet: Sheet, measured: MeasuredFile | None = None,
                   winding_c: float | None = None, speed_rpm: float | None = None
                   ) -> Identification:
    """Expected identification results, and with a measured file the comparisons."""
    conditions = conditions_for(sheet, measured, winding_c, speed_rpm)
    result = Identification(conditions, expected_values(sheet, conditions))
    if measured is None:
        return result
    result.measured_path = measured.path
    judged_r = (judge_resistance(sheet, measured.resistance, measured.cable)
                if measured.resistance is not None else None)
    if judged_r is not None:
        result.comparisons.append(judged_r[0])
        if judged_r[1]:
            result.findings.append(judged_r[1])
    elif measured.resistance is not None:
        result.not_compared.append("resistance: the sheet gives no circuit.resistance (or no "
                                   "temperature constant for its conductor)")
    comparisons, findings = judge_inductances(sheet, measured.ld, measured.lq)
    result.comparisons.extend(comparisons)
    result.findings.extend(findings)
    for axis, value in (("ld", measured.ld), ("lq", measured.lq)):
        if value is not None and sheet.get(f"circuit.{axis}") is None:
            result.not_compared.append(f"{axis}: the sheet gives no circuit.{axis}")
    judged = judge_emf(sheet, measured)
    if judged is not None:
        result.comparisons.append(judged[0])
        if judged[1]:
            result.findings.append(judged[1])
    elif measured.emf is not None:
        result.not_compared.append("emf: the sheet gives no back-EMF constant, nor what "
                                   "determines one")
    return result
