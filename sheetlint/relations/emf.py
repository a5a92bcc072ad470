"""Back-EMF: Ke, Kt, magnet temperature, and the margin of rated voltage over back-EMF."""

from __future__ import annotations

import math
from collections.abc import Iterator
from typing import ClassVar

from sheetlint.engine.core import Derivation, Finding, Relation, RuleOption, Sheet
from sheetlint.engine.monomial import Evaluation, Monomial
from sheetlint.physics.magnets import remanence_factor
from sheetlint.relations.registry import register
from sheetlint.units import ROOM_TEMPERATURE as ROOM

SQRT3 = math.sqrt(3.0)
USUAL_MARGIN = 0.065  # common practice: rated voltage 6–7 % above the hot back-EMF
#: the usual margin of rated voltage over the hot back-EMF, spm (common practice)
USUAL_BAND = (0.06, 0.07)
#: margins outside this band are warnings, spm: below 0 the converter cannot push rated current;
#: 0–35 % occurs on consistent sheets (common practice)
WARN_BAND = (0.0, 0.35)
#: the hottest rated magnet temperature admitted when the sheet states neither it nor a
#: thermal class: the IEC 60034-2-1 reference temperature of class 180 (H), 135 °C
HOTTEST_UNSTATED_KELVIN = 273.15 + 135.0


def magnet_factor(sheet: Sheet, from_kelvin: float | None, to_kelvin: float) -> float:
    """B_r(to)/B_r(from) for the sheet's magnet material and configured coefficient."""
    return remanence_factor(sheet.attr("machine.magnet"), from_kelvin or ROOM, to_kelvin,
                            sheet.option("magnet-temperature", "alpha", None))


def to_room_factor(sheet: Sheet, from_kelvin: float | None) -> float:
    """The factor that takes a back-EMF or Kt at ``from_kelvin`` to 20 °C."""
    return magnet_factor(sheet, from_kelvin, ROOM)


def magnet_interval(sheet: Sheet) -> tuple[float, float, bool]:
    """(coolest, hottest) rated magnet temperature the sheet admits, kelvin, and whether it is
    stated. Unstated: from 20 °C to the reference temperature of the temperature-rise class
    (DESIGN.md, Judgement 3), to 135 °C when no class is given."""
    hot = sheet.get("rated.magnet_temperature")
    if hot is not None and not hot.is_estimate:
        return hot.value, hot.value, True
    top = hot.value if hot is not None else HOTTEST_UNSTATED_KELVIN
    return ROOM, max(ROOM, top), False


@register
class MagnetTemperature(Relation):
    """Back-EMF and torque constant scale with the magnets' remanence.

    .. math:: K_e(T_2) = K_e(T_1)\\,\\frac{1 + \\alpha\\,(T_2 - 20)}{1 + \\alpha\\,(T_1 - 20)}

    (temperatures in °C, the coefficient referred to 20 °C as magnet makers publish it),
    with α = −0.11 %/K for NdFeB, −0.035 %/K for SmCo, −0.2 %/K for ferrite (mid-range of the
    makers' published bands; configurable as option ``alpha``).

    Derives Ke at the rated magnet temperature (``emf.constant_hot``) and at the lowest ambient
    (``emf.constant_cold``; 20 °C when none is given). When the sheet states no rated magnet
    temperature, the hot Ke spans the interval from 20 °C to the reference temperature of the
    temperature-rise class (its uncertainty covers the interval) and is an estimate.

    Why it matters: a back-EMF at 20 °C next to a voltage at 120 °C makes the voltage margin
    look 10 % larger than it is.

    References: magnet makers' technical notes on reversible temperature coefficients, as
    quoted in REFERENCES.md §6.
    """

    rule = "magnet-temperature"
    title = "magnet temperature correction"
    equation = "Ke(T2) = Ke(T1)·(1 + α·(T2 − 20))/(1 + α·(T1 − 20))"
    fields = ("emf.constant", "rated.magnet_temperature", "machine.ambient.min")
    kind = "correction"
    severity_policy = "derives only"
    source = "magnet makers' technical notes (reversible temperature coefficient of Br), as quoted"
    order = 30
    derive_inputs = ("emf.constant", "rated.magnet_temperature", "machine.ambient.min",
                     "emf.constant_hot", "emf.constant_cold")
    derive_outputs = ("emf.constant_hot", "emf.constant_cold")
    options = {"alpha": RuleOption(
        "number", "by magnet material: NdFeB −0.0011, SmCo −0.00035, ferrite −0.0020",
        "reversible temperature coefficient of remanence, per K (also used by emf-constant "
        "and voltage-margin)")}

    def derive(self, sheet: Sheet) -> Iterator[Derivation]:
        v = sheet.values
        ke = v.get("emf.constant")
        if ke is None:
            return
        magnet = sheet.attr("machine.magnet")
        alpha = sheet.option(self.rule, "alpha", None)
        t_ke = ke.temperature or ROOM
        if "emf.constant_hot" not in v and "rated.magnet_temperature" in v:
            hot = v["rated.magnet_temperature"]
            coolest, hottest, stated = magnet_interval(sheet)
            if stated:
                factor = remanence_factor(magnet, t_ke, hot.value, alpha)
                spread = 0.0
                note = f"{magnet} at {hot.value - 273.15:.0f} °C"
            else:  # the interval 20 °C … class reference, centred, as its uncertainty
                warm = remanence_factor(magnet, t_ke, coolest, alpha)
                cool = remanence_factor(magnet, t_ke, hottest, alpha)
                factor = math.sqrt(warm * cool)
                spread = abs(math.log(warm / cool)) / 2
                note = (f"{magnet} between {coolest - 273.15:.0f} and {hottest - 273.15:.0f} °C "
                        "(the sheet states no rated magnet temperature)")
            yield Derivation("emf.constant_hot", ke.value * factor, ke.uncertainty + spread,
                             ("emf.constant", "rated.magnet_temperature"),
                             estimate=ke.is_estimate or hot.is_estimate, note=note,
                             sources=((ke, 1.0),), temperature=hot.value)
        if "emf.constant_cold" not in v:
            cold = v.get("machine.ambient.min")
            t_cold = cold.value if cold else ROOM
            factor = remanence_factor(magnet, t_ke, t_cold, alpha)
            note = (f"{magnet} at {t_cold - 273.15:.0f} °C"
                    + ("" if cold else "; no lowest ambient given, 20 °C assumed"))
            yield Derivation("emf.constant_cold", ke.value * factor, ke.uncertainty,
                             ("emf.constant",), estimate=ke.is_estimate, note=note,
                             sources=((ke, 1.0),), temperature=t_cold)


@register
class EmfVoltage(Monomial):
    """The back-EMF at a speed is the back-EMF constant times that speed.

    .. math:: E_{LL,rms} = K_e\\,\\omega

    Checks ``emf.voltage`` against ``emf.constant`` at ``emf.speed`` (the rated speed when no
    speed is given), both at the same magnet temperature.

    Example that fails: Ke 100 V/krpm, E = 173 V at 1000 rpm (E is line-to-line of a phase Ke).

    References: Hendershot & Miller, *Design of Brushless Permanent-Magnet Machines*, 2010
    (EMF constant) [from memory: chapter].
    """

    rule = "emf-constant"
    title = "back-EMF, Ke and speed"
    equation = "E_LL,rms = Ke·ω"
    fields = ("emf.voltage", "emf.constant", "emf.speed")
    terms = {"emf.voltage": 1.0, "emf.constant": -1.0, "emf.speed": -1.0}
    reported = "emf.voltage"
    kind = "identity"
    severity_policy = "error beyond rounding; basis slips named"
    source = "Hendershot & Miller, Design of Brushless Permanent-Magnet Machines (2010)"
    derive_fields = ("emf.constant", "emf.voltage")
    derive_inputs = ("emf.voltage", "emf.constant", "emf.speed", "rated.speed")
    order = 20

    #: the terms when the sheet gives no speed of its own for the back-EMF
    terms_at_rated_speed: ClassVar[dict[str, float]] = {
        "emf.voltage": 1.0, "emf.constant": -1.0, "rated.speed": -1.0}

    def field_names(self, sheet: Sheet) -> dict[str, float]:
        if "emf.speed" in sheet.values or "rated.speed" not in sheet.values:
            return self.terms
        return self.terms_at_rated_speed

    def describe(self, sheet: Sheet, evaluation: Evaluation) -> str:
        return "back-EMF and Ke disagree"


@register
class VoltageMargin(Relation):
    """Rated voltage against the hot back-EMF at rated speed.

    .. math:: m = U_{rated} / E_{hot}(n_{rated}) - 1

    For ``spm`` the usual margin is 6–7 % (common practice, no published source): outside it
    an info; below 0 % or above 35 % a warning — below 0 the converter cannot push rated
    current without field weakening, far above suggests a basis slip in Ke (phase vs line) or
    a supply class listed as the rated voltage (an info when the rated voltage is a usual
    supply class, as servo sheets list it). When the sheet states no rated magnet temperature
    the back-EMF is taken over the interval from 20 °C to the class reference temperature, and
    a finding fires only when no temperature in it reconciles the sheet.
    For ``ipm``/``pmasynrm`` only U < E_hot is reported (the rated point is then in field
    weakening); the dq model decides the rest. With a rule of thumb this relation also
    *estimates* (never derives) a missing rated voltage or Ke of an spm machine by the usual
    margin, flagged as an estimate.

    Example that fails: spm, 400 V rated, hot back-EMF 410 V at rated speed.

    References: common practice (REFERENCES.md §9).
    """

    rule = "voltage-margin"
    title = "rated voltage over hot back-EMF"
    equation = "m = U/E_hot(n) − 1; usual 6–7 % (spm)"
    fields = ("rated.voltage", "emf.constant_hot", "rated.speed")
    kind = "band"
    severity_policy = "spm: info outside 6–7 %, warning below 0 % or above 35 %; " \
                      "ipm/pmasynrm: warning below 0 %"
    source = "common practice (no published source)"
    order = 40
    options = {
        "band": RuleOption("band", "[0.06, 0.07]", "usual margin of rated voltage over the "
                           "hot back-EMF, spm (common practice); outside it an info"),
        "warn": RuleOption("band", "[0.0, 0.35]", "margins outside this band are warnings "
                           "(spm)"),
        "usual": RuleOption("number", "0.065", "margin used to estimate a missing rated "
                            "voltage or Ke (spm)"),
    }

    def estimate(self, sheet: Sheet) -> Iterator[Derivation]:
        """After all checks: a missing rated voltage or Ke of an spm machine by the usual margin.

        Estimates fill what a commissioning engineer needs; they are never used by a check.
        """
        if sheet.attr("machine.topology") != "spm":
            return
        v = sheet.values
        margin = float(sheet.option(self.rule, "usual", USUAL_MARGIN))
        if "rated.voltage" not in v and sheet.has("emf.constant_hot", "rated.speed"):
            e = v["emf.constant_hot"].value * v["rated.speed"].value
            yield Derivation("rated.voltage", e * (1 + margin), 0.01,
                             ("emf.constant_hot", "rated.speed"), estimate=True,
                             note=f"hot back-EMF plus the usual {margin:.1%} (common practice)")
        if "emf.constant" not in v and sheet.has("rated.voltage", "rated.speed",
                                                 "rated.magnet_temperature"):
            hot = v["rated.magnet_temperature"].value
            ke_hot = v["rated.voltage"].value / (1 + margin) / v["rated.speed"].value
            factor = remanence_factor(sheet.attr("machine.magnet"), ROOM, hot,
                                      sheet.option("magnet-temperature", "alpha", None))
            if factor > 0:
                yield Derivation("emf.constant", ke_hot / factor, 0.01,
                                 ("rated.voltage", "rated.speed", "rated.magnet_temperature"),
                                 estimate=True, note=f"at 20 °C, from the rated voltage less "
                                 f"the usual {margin:.1%} (common practice)")

    def check(self, sheet: Sheet) -> Iterator[Finding]:
        v = sheet.values
        if not sheet.usable(self.rule, "rated.voltage", "emf.constant", "rated.speed",
                            allow_estimates=True):
            return
        u, ke, w = v["rated.voltage"], v["emf.constant"], v["rated.speed"]
        if u.is_estimate:
            return
        coolest, hottest, stated = magnet_interval(sheet)
        ke_20 = ke.value * to_room_factor(sheet, ke.temperature)
        # the back-EMF at rated speed over the magnet-temperature interval and Ke's precision
        emf_high = ke_20 * magnet_factor(sheet, ROOM, coolest) * w.value * (1 + ke.uncertainty)
        emf_low = ke_20 * magnet_factor(sheet, ROOM, hottest) * w.value * (1 - ke.uncertainty)
        margin_low = u.value / emf_high - 1.0
        margin_high = u.value / emf_low - 1.0
        if stated:
            where = f"the back-EMF at {hottest - 273.15:.0f} °C ({emf_low:.0f} V line rms)"
        else:
            where = (f"the back-EMF with the magnets at {coolest - 273.15:.0f}–"
                     f"{hottest - 273.15:.0f} °C (not stated: {emf_low:.0f}–{emf_high:.0f} V "
                     "line rms)")
        text = f"rated voltage is {_margin_words(margin_low, margin_high)} {where} at rated speed"
        topology = sheet.attr("machine.topology")
        fields = ("rated.voltage", "emf.constant", "rated.speed")
        if margin_high < 0:
            consequence = ("the converter cannot push rated current without field weakening"
                           if topology == "spm" else "the rated point is in field weakening; "
                           "the dq model decides whether it is reachable")
            yield sheet.finding(self, "warning", f"{text}: {consequence}", fields,
                                cause="the back-EMF at rated speed exceeds the rated voltage: "
                                      "rated current needs field weakening, or the voltage or "
                                      "Ke is on another basis")
            return
        if topology != "spm":
            yield sheet.finding(self, "info", text + ("" if topology else
                                                      " (topology not stated: band not applied)"),
                                fields)
            return
        low, high = sheet.option(self.rule, "band", USUAL_BAND)
        warn_low, warn_high = sheet.option(self.rule, "warn", WARN_BAND)
        if margin_low > warn_high:
            if is_supply_class(u.value):
                yield sheet.finding(self, "info", f"{text}: far above the usual "
                                    f"{low:.0%}–{high:.0%} (common practice); the rated voltage "
                                    "reads as the supply class the motor is wound for", fields)
            else:
                yield sheet.finding(self, "warning", f"{text}: far above the usual "
                                    f"{low:.0%}–{high:.0%} (common practice); a basis slip in Ke "
                                    "or the supply voltage listed as rated voltage", fields)
        elif margin_high < warn_low:
            yield sheet.finding(self, "warning", text, fields)
        elif margin_high < low or margin_low > high:
            yield sheet.finding(self, "info", text + f"; the usual margin is "
                                f"{low:.0%}–{high:.0%} (common practice)", fields)
        else:
            yield sheet.finding(self, "info", text + " (usual, common practice)", fields)


def _margin_words(low: float, high: float) -> str:
    """"6.5 % over", "4.9 % under", "2.0 % under … 12.0 % over" the back-EMF."""
    def one(m: float) -> str:
        return f"{abs(m):.1%} {'over' if m >= 0 else 'under'}"
    if abs(high - low) < 0.002:
        return one(low)
    return f"{one(low)} … {one(high)}"


#: supply classes that servo and industrial sheets list as a motor's rated voltage (IEC 60038
#: nominal voltages and the usual North-American ones; from memory)
SUPPLY_CLASSES = (200.0, 208.0, 220.0, 230.0, 240.0, 380.0, 400.0, 415.0, 440.0, 460.0, 480.0,
                  500.0, 575.0, 600.0, 660.0, 690.0)


def is_supply_class(volts: float) -> bool:
    """True for a voltage that is one of the usual supply classes (400 V, 480 V, ...)."""
    return any(abs(volts - c) < 0.5 for c in SUPPLY_CLASSES)


@register
class FluxLinkage(Monomial):
    """The back-EMF constant is the flux linkage seen from the terminals.

    .. math:: K_e = \\sqrt{3/2}\\,p\\,\\psi

    with Ke in V line rms per mechanical rad/s and ψ the peak flux linkage of one phase (Wb):
    the phase EMF amplitude is ω_e·ψ = p·ω·ψ, its rms value p·ω·ψ/√2, the line value √3 times
    that. An identity: only the written digits are allowed for.

    Example that fails: 8 poles, ψ = 0.100 Wb, Ke 51.3 V/krpm (√(3/2)·4·0.1 V·s/rad gives
    51.30 V/krpm ✓); the same with Ke 88.9 V/krpm (÷√3: Ke is line-to-line of a phase value).

    References: steady-state dq model of the PM synchronous machine, amplitude-invariant
    (R. Krishnan, Permanent Magnet Synchronous and Brushless DC Motor Drives, CRC Press 2010;
    from memory: chapter).
    """

    rule = "emf-constant"
    title = "Ke and flux linkage"
    equation = "Ke = √(3/2)·p·ψ"
    fields = ("emf.constant", "machine.pole_pairs", "emf.flux_linkage")
    terms = {"emf.constant": 1.0, "machine.pole_pairs": -1.0, "emf.flux_linkage": -1.0}
    reported = "emf.flux_linkage"
    kind = "identity"
    severity_policy = "identity: the written digits only"
    source = ("amplitude-invariant dq model of the PM synchronous machine (Krishnan, Permanent "
              "Magnet Synchronous and Brushless DC Motor Drives, CRC 2010)")
    derive_fields = ("emf.flux_linkage",)
    order = 20

    def constant(self, sheet: Sheet) -> float | None:
        ke, psi = sheet.get("emf.constant"), sheet.get("emf.flux_linkage")
        if ke is None or psi is None:
            return math.sqrt(1.5)
        return math.sqrt(1.5) * magnet_factor(sheet, psi.temperature, ke.temperature or ROOM)

    def describe(self, sheet: Sheet, evaluation: Evaluation) -> str:
        return "Ke and the flux linkage disagree"
