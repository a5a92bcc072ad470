"""Standards relations: efficiency class, temperature rise, and thermal plausibility bands.

The tables behind them live in :mod:`sheetlint.standards` (data files with their sources).
The plausibility bands (``rotor-torque-density``, ``specific-losses``, ``overload-ratio``,
``short-time-rating``) are from memory and on trial: they raise at most a warning.
"""

from __future__ import annotations

import math
from collections.abc import Iterator

from sheetlint.engine.core import Derivation, Finding, Relation, RuleOption, Sheet
from sheetlint.relations.registry import register
from sheetlint.standards.efficiency import (
    CONVERTER_FED_SOURCE,
    LINE_OPERATED_SOURCE,
    ClassMinimum,
    converter_fed_minimum,
    highest_class_reached,
    line_operated_minimum,
    parse_ie_class,
)
from sheetlint.standards.thermal import (
    SIZING_SOURCE,
    TEMPERATURE_RISE_SOURCE,
    ZERO_CELSIUS_K,
    class_number,
    cooling_group,
    corrected_rise_limit,
    reference_temperature_c,
    resistance_with_constant,
    sizing_bands,
    small_or_self_cooled_limit,
    temperature_constant,
    thermal_class_limit,
    thermal_table,
    torque_per_rotor_volume,
)
from sheetlint.standards.tolerances import TOLERANCE_EDITION, efficiency_tolerance

DEFAULT_COOLANT_C = 40.0
RAD_PER_S_TO_RPM = 60.0 / (2.0 * math.pi)
_EPS = 1e-9
#: (peak field, rated field, the attribute that holds the peak's stated duration)
PEAK_RATINGS = (("limits.peak_torque", "rated.torque", "limits.peak_torque.duration"),
                ("limits.peak_current", "rated.current", "limits.peak_current.duration"))
RISE_CLASS = "temperature-rise class"  # the labels of the class whose rise limit applies
THERMAL_CLASS = "thermal class"


def _governing_class(sheet: Sheet) -> tuple[int | None, str]:
    """The class whose rise limit applies: the temperature-rise class, else the thermal class."""
    attributes = sheet.attributes
    rise_class = class_number(attributes.get("machine.temperature_rise_class"))
    thermal_class = (None if rise_class is not None
                     else class_number(attributes.get("machine.thermal_class")))
    return _governing(rise_class, thermal_class)


def _governing(rise_class: int | None, thermal_class: int | None) -> tuple[int | None, str]:
    """:func:`_governing_class` from the two class numbers already read."""
    if rise_class is not None:
        return rise_class, RISE_CLASS
    return thermal_class, THERMAL_CLASS


def _celsius(sheet: Sheet, name: str) -> float | None:
    known = sheet.get(name)
    return None if known is None else known.value - ZERO_CELSIUS_K


#: IEC 60034-1 gives machines rated under this output a higher rise limit (from memory)
SMALL_MACHINE_W = 600.0


@register
class TemperatureRise(Relation):
    """Stated winding temperature rise against the limit of its class (IEC 60034-1).

    What it checks
        - ``rated.temperature_rise`` against the limit of the temperature-rise class (or the
          thermal class when no rise class is given): 130 (B) 80 K, 155 (F) 105 K, 180 (H)
          125 K (IEC 60034-1, as quoted), 120 (E) 75 K (from memory); indirectly air-cooled
          windings, resistance method, 40 °C coolant, up to 1000 m. The limit is corrected for
          the site as the standard allows (from memory): coolant 40-60 °C lowers it by
          (coolant − 40) K; altitude above 1000 m lowers it by 1 % per 100 m, except that
          1000-4000 m with the coolant temperature unstated need no adjustment.
        - a temperature-rise class above the thermal class (insulation used hotter than its
          class).
    What it derives
        - ``circuit.resistance_hot``: the phase resistance at the rated winding temperature,
          R₂ = R₁·(k + θ₂)/(k + θ₁), k = 235 (copper) or 225 (aluminium). θ₂ = coolant
          (``machine.ambient``, else 40 °C) + ``rated.temperature_rise``; without a stated
          rise, the IEC 60034-2-1 reference temperature of the class (95/115/135 °C for
          130/155/180, from memory).
        - ``rated.magnet_temperature``, when absent, as an estimate: the reference temperature
          of the temperature-rise class (or thermal class), said so in its note.
    Why it matters
        A rise above the class limit ages the insulation faster than its class allows; a
        rise class above the thermal class is a contradiction on the sheet.
    Example that fails
        ``machine.thermal_class: 155``, ``rated.temperature_rise: 110 K`` (limit 105 K).
    Fix
        State the rise class actually reached, or the correct thermal class; state the coolant
        temperature and altitude the rise refers to.
    References
        IEC 60034-1:2010, Rotating electrical machines — Part 1: Rating and performance
        (temperature-rise limits, as quoted); IEC 60085:2007, thermal classes;
        IEC 60034-2-1:2014, reference temperatures (from memory).
    """

    rule = "temperature-rise"
    title = "Temperature rise within the class limit"
    equation = "Δθ ≤ Δθ_limit(class, coolant, altitude); R₂ = R₁·(k + θ₂)/(k + θ₁)"
    fields = ("rated.temperature_rise", "machine.ambient", "machine.altitude",
              "circuit.resistance", "circuit.resistance_hot", "rated.magnet_temperature")
    kind = "bound"
    severity_policy = ("error when the stated rise exceeds the corrected limit of a quoted "
                       "class, or the rise class exceeds the thermal class; warning where the "
                       "limit or its correction is approximate or beyond the rules; info when "
                       "no limit is known")
    source = TEMPERATURE_RISE_SOURCE
    status = "established"
    order = 20
    derive_inputs = ("circuit.resistance", "circuit.resistance_hot", "rated.temperature_rise",
                     "machine.ambient", "rated.magnet_temperature")
    derive_outputs = ("circuit.resistance_hot", "rated.magnet_temperature")
    options = {"reference_temperature_spread_k": RuleOption(
        "number", "10", "uncertainty, in K, of the winding temperature when the sheet states "
        "no rise and the class reference temperature is taken")}

    # --- derive ---------------------------------------------------------------------------
    def derive(self, sheet: Sheet) -> Iterator[Derivation]:
        governing, label = _governing_class(sheet)
        values = sheet.values
        if "circuit.resistance_hot" not in values:
            hot = self._hot_resistance(sheet, governing, label)
            if hot is not None:
                yield hot
        if "rated.magnet_temperature" not in values and governing is not None:
            reference = reference_temperature_c(governing)
            if reference is not None:
                yield Derivation(
                    "rated.magnet_temperature", reference + ZERO_CELSIUS_K, 0.05, (),
                    estimate=True,
                    note=(f"assumed: the sheet states no magnet temperature; taken as the "
                          f"IEC 60034-2-1 reference temperature {reference:g} degC of the "
                          f"{label} {governing} (approximate; check against the standard's text)"))

    def _hot_resistance(self, sheet: Sheet, governing: int | None,
                        label: str) -> Derivation | None:
        values = sheet.values
        resistance = values.get("circuit.resistance")
        if resistance is None or not resistance.value > 0.0:
            return None
        conductor = sheet.attributes.get("machine.conductor") or "copper"
        k = temperature_constant(conductor)
        if k is None:
            return None
        t1 = (resistance.temperature if resistance.temperature is not None else 293.15) \
            - ZERO_CELSIUS_K
        rise = values.get("rated.temperature_rise")
        ambient = values.get("machine.ambient")
        if rise is not None and math.isfinite(rise.value):
            coolant = DEFAULT_COOLANT_C if ambient is None else ambient.value - ZERO_CELSIUS_K
            t2 = coolant + rise.value
            spread = rise.value * rise.uncertainty
            inputs: tuple[str, ...] = ("circuit.resistance", "rated.temperature_rise")
            where = (f"winding at {t2:.4g} degC = coolant {coolant:.4g} degC"
                     f"{'' if ambient else ' (40 degC assumed)'} + rise {rise.value:.4g} K")
            if ambient is not None:
                spread += ambient.value * ambient.uncertainty
                inputs += ("machine.ambient",)
            estimate = resistance.is_estimate or rise.is_estimate
        else:
            reference = reference_temperature_c(governing)
            if reference is None:
                return None
            t2 = reference
            spread = float(sheet.option(self.rule, "reference_temperature_spread_k", 10.0))
            inputs = ("circuit.resistance",)
            where = (f"IEC 60034-2-1 reference temperature {reference:g} degC of the {label} "
                     f"{governing}; approximate, check against the standard's text; the "
                     "sheet states no temperature rise)")
            estimate = resistance.is_estimate
        value = resistance_with_constant(resistance.value, t1, t2, k)
        if not math.isfinite(value):
            return None
        uncertainty = resistance.uncertainty + spread / (k + t2)
        return Derivation(
            "circuit.resistance_hot", value, uncertainty, inputs, estimate=estimate,
            note=f"{conductor} (k = {k:g}), from {t1:.4g} degC to {where}",
            sources=((resistance, 1.0),))

    # --- check ----------------------------------------------------------------------------
    def check(self, sheet: Sheet) -> Iterator[Finding]:
        attributes = sheet.attributes
        rise_class = class_number(attributes.get("machine.temperature_rise_class"))
        thermal_class = class_number(attributes.get("machine.thermal_class"))
        if rise_class is not None and thermal_class is not None and rise_class > thermal_class:
            yield sheet.finding(
                self, "error",
                f"temperature-rise class {rise_class} is above the thermal class "
                f"{thermal_class}: the winding would run hotter than its insulation is rated for",
                ("machine.temperature_rise_class", "machine.thermal_class"),
                expected_text={"machine.temperature_rise_class": f"<= {thermal_class}"},
                actual_text={"machine.temperature_rise_class": str(rise_class)},
                cause="the thermal class and the temperature-rise class may be swapped")
        if not sheet.usable(self.rule, "rated.temperature_rise"):
            return
        governing, label = _governing(rise_class, thermal_class)
        if governing is None:
            return
        base = thermal_class_limit(governing)
        if base is None:
            yield sheet.finding(
                self, "info",
                f"no temperature-rise limit is held for {label} {governing}; the stated rise is "
                "not checked", ("rated.temperature_rise",))
            return
        higher = small_or_self_cooled_limit(governing)
        finding = self._check_rise(sheet, governing, label, base)
        if finding is not None and higher is not None:
            # IEC 60034-1's row for small and fan-less or encapsulated machines (from memory)
            power = sheet.get("rated.power")
            group = cooling_group(sheet.attr("machine.cooling"))
            small = power is not None and power.value < SMALL_MACHINE_W
            if self._check_rise(sheet, governing, label, higher) is None:
                if small or group == "natural":
                    return
                if group == "unknown":
                    rise = sheet.value("rated.temperature_rise")
                    yield sheet.finding(
                        self, "info", f"stated temperature rise {rise:.4g} K is above the "
                        f"{base:.4g} K of {label} {governing} but within the "
                        f"{higher:.4g} K that IEC 60034-1 allows a machine without a fan (IC410) "
                        "or with encapsulated windings (approximate; check against the "
                        "standard's text); state machine.cooling",
                        ("rated.temperature_rise", "machine.cooling"))
                    return
        if finding is not None:
            yield finding

    def _check_rise(self, sheet: Sheet, governing: int, label: str,
                    base: float) -> Finding | None:
        rise = sheet.values["rated.temperature_rise"]
        coolant = _celsius(sheet, "machine.ambient")
        altitude_known = sheet.get("machine.altitude")
        altitude = None if altitude_known is None else altitude_known.value
        limit = corrected_rise_limit(base, coolant, altitude)
        lowest = rise.value * (1.0 - rise.uncertainty)
        if lowest <= limit.value + _EPS:
            return None
        provenance = thermal_table()["temperature_rise_limit_k"][str(governing)]["provenance"]
        from_memory = provenance != "Q"
        below_40 = coolant is not None and coolant < DEFAULT_COOLANT_C
        within_low_ambient = below_40 and lowest <= limit.value + (DEFAULT_COOLANT_C - coolant)
        severity = "warning" if (from_memory or limit.beyond_rules or within_low_ambient) \
            else "error"
        notes = list(limit.notes)
        if from_memory:
            notes.append(f"the class {governing} limit is approximate; check against the "
                         "standard's text")
        if within_low_ambient:
            notes.append("IEC 60034-1 allows a higher rise for a coolant below 40 degC only by "
                         "agreement (approximate; check against the standard's text)")
        detail = f" ({'; '.join(notes)})" if notes else ""
        fields = ["rated.temperature_rise"]
        if coolant is not None:
            fields.append("machine.ambient")
        if altitude is not None:
            fields.append("machine.altitude")
        return sheet.finding(
            self, severity,
            f"stated temperature rise {rise.value:.4g} K exceeds the {limit.value:.4g} K limit "
            f"of {label} {governing}{detail}",
            fields, expected={"rated.temperature_rise": limit.value},
            actual={"rated.temperature_rise": rise.value},
            deviation=rise.value / limit.value - 1.0 if limit.value > 0 else None,
            cause="the rise may belong to a higher temperature-rise class than the one stated")


@register
class EfficiencyClass(Relation):
    """Declared efficiency against the minimum of the claimed IE class.

    What it checks
        The claimed class (``efficiency_class``) against the minimum efficiency at the rated
        power. The declared efficiency itself must reach the class minimum; the IEC 60034-1
        tolerance governs a test result against the declared value, not the claim (a claim
        that reaches the minimum only as declared is reported as an info).

        - ``efficiency_class.standard`` naming IEC 60034-30-1 (line-operated): IE2-IE4 by
          pole count at 50 Hz; 0.12-0.55 kW by the Table 27 coefficients, 0.75-200 kW by
          Table 28, 200-1000 kW the 200 kW value (η = A·x³ + B·x² + C·x + D,
          x = log10(P/1 kW), rounded half up to 0.1 % as the published tables are); between
          0.55 and 0.75 kW only the tabulated ratings are defined. An error when the declared
          efficiency is below the minimum beyond its own rounding.
        - otherwise the machine is taken as converter-fed (IEC TS 60034-30-2, whose limits are
          not held here): an approximation by the IEC 60034-30-1 4-pole limit at the same rated
          power, said so in the finding, at most a warning.
        - IE5: (1 − η_IE5) = 0.8·(1 − η_IE4), approximate (from memory), at most a warning.
        - 60 Hz ratings, IE1, pole counts other than 2-8, ratings outside 0.12-1000 kW or
          speeds outside the converter-fed scope: an info saying the claim is not checked.
    Why it matters
        Procurement decisions rest on the claimed class; a class one step too high is a
        common slip (a sibling rating's class copied, or the class of a larger frame).
    Example that fails
        Line-operated, 11 kW, 4 poles, 50 Hz, η = 91.5 %, claimed IE4 (minimum 93.3 %;
        91.5 % reaches IE3, 91.4 %).
    Fix
        Claim the class the declared efficiency reaches, or correct the declared efficiency.
    References
        IEC 60034-30-1:2014; minimum values and coefficients as published in Commission
        Regulation (EU) 2019/1781, Annex I, and SI 2021/745, Schedule 16 (Tables 21-28);
        IEC TS 60034-30-2:2016; IEC 60034-1:2010 tolerances (as quoted).
    """

    rule = "efficiency-class"
    title = "Claimed IE class against the declared efficiency"
    equation = "η_declared ≥ η_min(class, P, poles, f)"
    fields = ("rated.efficiency", "rated.power", "machine.poles", "rated.frequency",
              "rated.speed")
    kind = "table"
    severity_policy = ("error when a line-operated (IEC 60034-30-1) declared efficiency is "
                       "below the class minimum; warning for the converter-fed approximation "
                       "and IE5; info when out of scope or borderline")
    source = LINE_OPERATED_SOURCE
    status = "established"
    order = 80

    def check(self, sheet: Sheet) -> Iterator[Finding]:
        claim = sheet.attributes.get("efficiency_class")
        if claim is None:
            return
        ie_class = parse_ie_class(claim)
        if ie_class is None:
            yield sheet.finding(self, "info", f"efficiency class {claim!r} is not one of "
                                "IE1-IE5; not checked", ("rated.efficiency",))
            return
        if not sheet.usable(self.rule, "rated.efficiency", "rated.power"):
            if not sheet.has("rated.efficiency", "rated.power"):
                yield sheet.finding(self, "info", f"IE{ie_class} is claimed but the rated "
                                    "power or efficiency is missing; not checked",
                                    ("rated.efficiency", "rated.power"))
            return
        standard = str(sheet.attr("efficiency_class.standard") or "")
        if "60034-30-1" in standard.replace(" ", ""):
            yield from self._line_operated(sheet, ie_class)
        else:
            yield from self._converter_fed(sheet, ie_class)

    def _line_operated(self, sheet: Sheet, ie_class: int) -> Iterator[Finding]:
        power = sheet.value("rated.power")
        poles_known = sheet.get("machine.poles")
        if poles_known is None or not math.isfinite(poles_known.value):
            yield sheet.finding(self, "info", f"IE{ie_class} (IEC 60034-30-1) is claimed but "
                                "the pole count is unknown; not checked", ("machine.poles",))
            return
        poles = round(poles_known.value)
        frequency = sheet.get("rated.frequency")
        notes: list[str] = []
        cap = "error"
        if frequency is None:
            frequency_hz = 50.0
            notes.append("rated frequency not stated: 50 Hz assumed")
            cap = "warning"
        else:
            frequency_hz = frequency.value
        if poles != poles_known.value:
            result = ClassMinimum(ie_class, None, "none", reason=f"pole count "
                                  f"{poles_known.value:g} is not an integer")
        else:
            result = line_operated_minimum(ie_class, poles, power, frequency_hz)
        if result.approximate:
            cap = "warning"
            notes.append("IE5 taken as 20 % lower losses than IE4 (approximate)")
        yield from self._compare(sheet, ie_class, result, cap, notes, poles, frequency_hz,
                                 LINE_OPERATED_SOURCE, "IEC 60034-30-1")

    def _converter_fed(self, sheet: Sheet, ie_class: int) -> Iterator[Finding]:
        speed = sheet.get("rated.speed")
        speed_rpm = None if speed is None else speed.value * RAD_PER_S_TO_RPM
        result = converter_fed_minimum(ie_class, sheet.value("rated.power"), speed_rpm)
        notes = ["approximation: the IEC TS 60034-30-2 limits are not held, so the "
                 "IEC 60034-30-1 4-pole limit at the same rated power is used"]
        if ie_class == 5:
            notes.append("IE5 taken as 20 % lower losses than IE4 (approximate)")
        yield from self._compare(sheet, ie_class, result, "warning", notes, 4, 50.0,
                                 CONVERTER_FED_SOURCE, "IEC TS 60034-30-2")

    def _compare(self, sheet: Sheet, ie_class: int, result: ClassMinimum, cap: str,
                 notes: list[str], poles: int, frequency_hz: float, source: str,
                 standard: str) -> Iterator[Finding]:
        eta = sheet.values["rated.efficiency"]
        power = sheet.value("rated.power")
        rounding = abs(eta.value) * eta.uncertainty
        fields = ("rated.efficiency", "rated.power")
        detail = f" ({'; '.join(notes)})" if notes else ""
        if result.efficiency is None:
            low = min(result.bracket) if result.bracket else None
            if low is not None and eta.value + rounding < low - _EPS:
                yield sheet.finding(
                    self, "warning" if cap == "error" else cap,
                    f"declared efficiency {100 * eta.value:.4g} % is below the IE{ie_class} "
                    f"minimum of both neighbouring tabulated ratings ({result.reason}){detail}",
                    fields, expected={"rated.efficiency": low},
                    actual={"rated.efficiency": eta.value},
                    deviation=eta.value / low - 1.0, source=source)
            else:
                yield sheet.finding(self, "info", f"IE{ie_class} ({standard}) not checked: "
                                    f"{result.reason}", fields, source=source)
            return
        minimum = result.efficiency
        shortfall = minimum - eta.value
        if shortfall > rounding + _EPS:
            reached = highest_class_reached(eta.value, poles, power, frequency_hz)
            reached_text = (f"it reaches IE{reached}" if reached is not None
                            else "it reaches none of IE2-IE4")
            message = (f"declared efficiency {100 * eta.value:.4g} % is below the "
                       f"IE{ie_class} minimum {100 * minimum:.3g} % at {power / 1e3:.4g} kW "
                       f"({result.method}); {reached_text}{detail}")
            if reached is not None and reached < ie_class:
                # the declared efficiency stands; the claim is what to correct
                yield sheet.finding(
                    self, cap, message, ("efficiency_class", *fields),
                    expected_text={"efficiency_class": f"IE{reached}"},
                    actual_text={"efficiency_class": f"IE{ie_class}"},
                    deviation=eta.value / minimum - 1.0,
                    cause=f"efficiency_class: the declared efficiency reaches IE{reached}; the "
                          f"claim IE{ie_class} is {ie_class - reached} class(es) too high",
                    source=source)
            else:
                yield sheet.finding(
                    self, cap, message, fields, expected={"rated.efficiency": minimum},
                    actual={"rated.efficiency": eta.value},
                    deviation=eta.value / minimum - 1.0, source=source)
        elif shortfall > _EPS:
            yield sheet.finding(
                self, "info",
                f"declared efficiency {100 * eta.value:.4g} % reaches the IE{ie_class} minimum "
                f"{100 * minimum:.3g} % only within its own rounding; state it with one more "
                f"digit{detail}", fields, expected={"rated.efficiency": minimum},
                actual={"rated.efficiency": eta.value}, deviation=eta.value / minimum - 1.0,
                source=source)
        else:
            guaranteed = eta.value - efficiency_tolerance(eta.value, power)
            if guaranteed < minimum - _EPS:
                yield sheet.finding(
                    self, "info",
                    f"IE{ie_class} claim rests on the declared efficiency "
                    f"{100 * eta.value:.4g} % (minimum {100 * minimum:.3g} %); a test result "
                    f"within the {TOLERANCE_EDITION} tolerance may be as low as "
                    f"{100 * guaranteed:.4g} %, which would not reach the class{detail}",
                    fields, expected={"rated.efficiency": minimum},
                    actual={"rated.efficiency": eta.value}, source=source)


def _band_finding(relation: Relation, sheet: Sheet, quantity: str, value: float,
                  band: tuple[float, float | None], unit: str, fields: tuple[str, ...],
                  cause: str | None, what: str, severity: str = "warning") -> Finding | None:
    """A finding (warning by default) when ``value`` lies outside ``band``; None inside it."""
    low, high = band
    if low is not None and value < low:
        edge, side = low, "below"
    elif high is not None and value > high:
        edge, side = high, "above"
    else:
        return None
    if high is None:
        band_text = f">= {low:g} {unit}"
    else:
        band_text = f"{low:g}-{high:g} {unit}" if low else f"<= {high:g} {unit}"
    return sheet.finding(
        relation, severity,  # type: ignore[arg-type]
        f"{what} {value:.3g} {unit} is {side} the usual band {band_text} (an approximate band of "
        "common practice, not a limit)", fields, deviation=value / edge - 1.0 if edge else None,
        expected_text={quantity: band_text}, actual_text={quantity: f"{value:.3g} {unit}"},
        cause=cause)


def _option_band(sheet: Sheet, rule: str, name: str,
                 default: tuple[float, float | None]) -> tuple[float, float | None]:
    """A (low, high) band from the rule's options, or the default when it is not usable."""
    option = sheet.option(rule, name, None)
    if (isinstance(option, list | tuple) and len(option) == 2
            and all(isinstance(v, int | float) or v is None for v in option)):
        return (option[0], option[1])
    return default


@register
class RotorTorqueDensity(Relation):
    """Continuous torque per rotor volume against handbook ranges for the cooling method.

    What it checks
        TRV = T_rated / (π·D²·L/4) = 2σ (σ the mean air-gap shear stress), from
        ``rated.torque``, ``machine.rotor_diameter`` and ``machine.stack_length``, against a
        band chosen by the IC code (``machine.cooling``): free convection and fan-cooled
        2.5-50 kN·m/m³, liquid-cooled 7-250 kN·m/m³, unknown 2.5-250 kN·m/m³ (grouped from
        Miller's and Hendershot & Miller's ranges: small enclosed ferrite 2.5-7, enclosed
        NdFeB 7-14, integral-hp industrial 7-30, servo 15-50, aerospace 30-75, large
        liquid-cooled 100-250; all from memory). Option ``band_knm_per_m3`` overrides it.
    Why it matters
        A continuous torque the rotor volume cannot carry for the cooling method points to a
        peak torque given as rated, or to frame dimensions given for the rotor's.
    Example that fails
        IC411, 200 N·m rated on a 0.1 m × 0.1 m rotor: 255 kN·m/m³.
    Fix
        Give the rotor (air-gap) diameter and active length, and the continuous torque.
    References
        T. J. E. Miller, Brushless Permanent-Magnet and Reluctance Motor Drives, Oxford
        University Press, 1989; J. R. Hendershot and T. J. E. Miller, Design of Brushless
        Permanent-Magnet Machines, Motor Design Books, 2010 (ranges from memory).
    """

    rule = "rotor-torque-density"
    title = "Torque per rotor volume within the usual band for the cooling"
    equation = "TRV = T / (π·D²·L/4)"
    fields = ("rated.torque", "machine.rotor_diameter", "machine.stack_length")
    kind = "band"
    severity_policy = "warning outside the band (approximate bands); never an error"
    source = SIZING_SOURCE
    status = "trial"
    order = 80
    options = {"band_knm_per_m3": RuleOption(
        "band", "by cooling group (see above)", "usual torque per rotor volume, kN·m/m³")}

    def check(self, sheet: Sheet) -> Iterator[Finding]:
        if not sheet.usable(self.rule, *self.fields):
            return
        trv = torque_per_rotor_volume(sheet.value("rated.torque"),
                                      sheet.value("machine.rotor_diameter"),
                                      sheet.value("machine.stack_length"))
        if not math.isfinite(trv) or trv <= 0.0:
            return
        group = cooling_group(sheet.attr("machine.cooling"))
        table = sizing_bands()["torque_per_rotor_volume_knm_per_m3"]["by_cooling"]
        band = _option_band(sheet, self.rule, "band_knm_per_m3", tuple(table[group]))
        cooling = sheet.attr("machine.cooling") or "cooling not stated"
        finding = _band_finding(
            self, sheet, "torque_per_rotor_volume", trv / 1e3, band, "kN*m/m^3", self.fields,
            "the diameter and length may be the frame's rather than the rotor's, or the rated "
            "torque a peak value", f"torque per rotor volume ({cooling}, {group})")
        if finding is not None:
            yield finding


@register
class SpecificLosses(Relation):
    """Rated losses per unit of machine mass against a rough bound for the cooling method.

    What it checks
        ``rated.losses`` (or P·(1/η − 1)) divided by ``machine.mass`` against an upper bound
        chosen by the IC code: free convection 100 W/kg, fan-cooled 150 W/kg, liquid-cooled
        1000 W/kg (rough bounds from memory, wide on purpose: common practice, no published
        source). Option ``upper_w_per_kg`` overrides it.
    Why it matters
        Far more loss per kilogram than the cooling can remove points to a mass or power
        slip (a sibling rating's mass, a power in the wrong unit) or an efficiency too low.
    Example that fails
        IC410, 2 kW losses in a 10 kg machine: 200 W/kg.
    Fix
        Check the mass, the rated power and the efficiency.
    References
        Common practice (bounds from memory, not from a published table).
    """

    rule = "specific-losses"
    title = "Losses per unit mass within a rough bound for the cooling"
    equation = "P_loss / m ≤ bound(cooling)"
    fields = ("rated.losses", "machine.mass")
    kind = "band"
    severity_policy = "warning above the bound (approximate bound); never an error"
    source = "common practice (approximate bounds)"
    status = "trial"
    order = 80
    options = {"upper_w_per_kg": RuleOption(
        "number", "by cooling group (see above)", "highest usual rated losses per kg of "
        "machine mass, W/kg")}

    def check(self, sheet: Sheet) -> Iterator[Finding]:
        if not sheet.usable(self.rule, "machine.mass"):
            return
        if sheet.usable(self.rule, "rated.losses"):
            losses, fields = sheet.value("rated.losses"), ("rated.losses", "machine.mass")
        elif sheet.usable(self.rule, "rated.power", "rated.efficiency"):
            eta = sheet.value("rated.efficiency")
            if not 0.0 < eta < 1.0:
                return
            losses = sheet.value("rated.power") * (1.0 / eta - 1.0)
            fields = ("rated.power", "rated.efficiency", "machine.mass")
        else:
            return
        mass = sheet.value("machine.mass")
        if not (mass > 0.0 and losses > 0.0 and math.isfinite(losses / mass)):
            return
        group = cooling_group(sheet.attr("machine.cooling"))
        default = sizing_bands()["losses_per_mass_w_per_kg"]["upper_by_cooling"][group]
        upper = sheet.option(self.rule, "upper_w_per_kg", default)
        if not isinstance(upper, int | float):
            upper = default
        finding = _band_finding(
            self, sheet, "losses_per_mass", losses / mass, (0.0, float(upper)), "W/kg", fields,
            "the mass may belong to another rating, or the efficiency or power is off",
            f"losses per unit mass ({sheet.attr('machine.cooling') or 'cooling not stated'})")
        if finding is not None:
            yield finding


@register
class OverloadRatio(Relation):
    """Peak-to-rated torque and current ratios against the usual band.

    What it checks
        ``limits.peak_torque``/``rated.torque`` and ``limits.peak_current``/``rated.current``
        within the usual band (common practice, from memory: industrial PM drives about
        1.5-3, servo motors 3-5 and more, since their ratings are referred to standstill);
        options ``torque_band`` and ``current_band``. Outside the band is an info (a band of
        practice), more than twice beyond it a warning; a peak *below* the rated value is an
        error (the peak belongs to another rating or basis). Peak and rated torque per
        ampere against Kt are checked by ``emf-constant``.
    Why it matters
        A peak below the rated value means one of the values belongs to another rating or
        another basis (peak current given as amplitude, rated torque as a peak).
    Example that fails
        rated 10 N·m at 5 A, peak 8 N·m at 10 A (peak torque below rated).
    Fix
        Check which values are peak and which are rms, and which rating they belong to.
    References
        Common practice (bands from memory); T = Kt·I for a surface-magnet machine.
    """

    rule = "overload-ratio"
    title = "Peak-to-rated ratios within the usual band"
    equation = "X_peak ≥ X_rated; X_peak/X_rated in the usual band"
    fields = ("limits.peak_torque", "rated.torque", "limits.peak_current", "rated.current")
    kind = "band"
    severity_policy = ("error when a peak is below its rated value; info outside the usual band "
                       "(approximate), warning more than twice beyond it")
    source = "common practice (approximate bands)"
    status = "trial"
    order = 80
    options = {
        "torque_band": RuleOption("band", "from the sizing table (see above)",
                                  "usual peak-to-rated torque ratio"),
        "current_band": RuleOption("band", "from the sizing table (see above)",
                                   "usual peak-to-rated current ratio"),
    }

    def check(self, sheet: Sheet) -> Iterator[Finding]:
        values = sheet.values
        if "limits.peak_torque" not in values and "limits.peak_current" not in values:
            return  # no peak value: no ratio to check
        table = sizing_bands()["peak_to_rated_ratio"]
        ratios: dict[str, float] = {}
        for name, peak, rated in (("torque", "limits.peak_torque", "rated.torque"),
                                  ("current", "limits.peak_current", "rated.current")):
            if not sheet.usable(self.rule, peak, rated):
                continue
            rated_value = sheet.value(rated)
            if not rated_value > 0.0:
                continue
            ratio = sheet.value(peak) / rated_value
            if not math.isfinite(ratio):
                continue
            ratios[name] = ratio
            slack = sheet.get(peak).uncertainty + sheet.get(rated).uncertainty
            if ratio < 1.0 - slack:
                yield sheet.finding(
                    self, "error", f"{peak} is below {rated} (ratio {ratio:.3g}): a short-time "
                    "peak cannot be less than the continuous rating", (peak, rated),
                    expected={peak: sheet.value(rated)}, actual={peak: sheet.value(peak)},
                    deviation=ratio - 1.0, cause="the peak and rated values may be on "
                    "different bases (peak vs rms) or belong to different ratings")
                continue
            low, high = _option_band(sheet, self.rule, f"{name}_band", tuple(table[name]))
            band = (low * (1.0 - slack), None if high is None else high * (1.0 + slack))
            if band[0] <= ratio and (band[1] is None or ratio <= band[1]):
                continue
            far = (ratio < low / 2) or (high is not None and ratio > 2 * high)
            finding = _band_finding(
                self, sheet, f"peak_to_rated_{name}", ratio, (low, high), "", (peak, rated),
                "the peak and rated values may be on different bases (peak vs rms) or belong "
                "to different ratings", f"peak-to-rated {name} ratio",
                "warning" if far else "info")
            if finding is not None:
                yield finding


@register
class ShortTimeRating(Relation):
    """Short-time (peak) ratings against their stated duration.

    What it checks
        A peak torque or current held for ``limits.peak_torque.duration`` /
        ``limits.peak_current.duration`` of an hour or more (option ``continuous_after_s``,
        default 3600 s) is no short-time rating: by then a machine is near thermal
        equilibrium (IEC 60034-1 defines duty S1 as operation long enough to reach it;
        thermal time constants are minutes to tens of minutes; from memory). Such a peak above
        the rated value contradicts the continuous rating.
    Why it matters
        Converter overload settings are taken from these values; an overload time that is
        really a continuous rating overheats the machine or hides a derated continuous value.
    Example that fails
        ``machine.duty: S1``, rated 100 N·m, peak 150 N·m for 7200 s.
    Fix
        State the overload duration in seconds as the maker specifies it, or correct the
        continuous rating.
    References
        IEC 60034-1:2010, duty types S1-S10 (definitions, from memory); common practice.
    """

    rule = "short-time-rating"
    title = "Short-time ratings shorter than thermal equilibrium"
    equation = "t_peak < t_continuous when X_peak > X_rated"
    fields = ("limits.peak_torque", "rated.torque", "limits.peak_current", "rated.current")
    kind = "band"
    severity_policy = "warning (approximate); never an error"
    source = "IEC 60034-1:2010 duty types; common practice"
    status = "trial"
    order = 80
    options = {"continuous_after_s": RuleOption(
        "number", "from the sizing table (see above)", "a peak lasting this long, in s, is "
        "a continuous rating")}

    def check(self, sheet: Sheet) -> Iterator[Finding]:
        attributes = sheet.attributes
        if (attributes.get("limits.peak_torque.duration") is None
                and attributes.get("limits.peak_current.duration") is None):
            return  # no duration stated
        default = sizing_bands()["short_time_rating"]["continuous_after_s"]
        threshold = sheet.option(self.rule, "continuous_after_s", default)
        if not isinstance(threshold, int | float):
            threshold = default
        duty = sheet.attr("machine.duty") or "duty not stated"
        for peak, rated, duration_name in PEAK_RATINGS:
            duration = attributes.get(duration_name)
            if (not isinstance(duration, int | float) or isinstance(duration, bool)
                    or not math.isfinite(duration) or duration < threshold):
                continue
            if not sheet.usable(self.rule, peak, rated):
                continue
            peak_value, rated_value = sheet.value(peak), sheet.value(rated)
            slack = sheet.get(peak).uncertainty + sheet.get(rated).uncertainty
            if not peak_value > rated_value * (1.0 + slack):
                continue
            yield sheet.finding(
                self, "warning",
                f"{peak} is held for {duration:g} s ({duty}): that long a machine reaches "
                "thermal equilibrium, so the peak is in effect a continuous rating above "
                "the rated value", (peak, rated),
                expected_text={f"{peak}.duration": f"< {threshold:g} s"},
                actual_text={f"{peak}.duration": f"{duration:g} s"},
                cause="the duration may be in another unit (minutes for seconds), or the peak "
                      "a continuous rating of another duty type")
