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


@register
class MagnetTemperature(Relation):
    """Back-EMF and torque constant scale with the magnets' remanence.

    .. math:: K_e(T_2) = K_e(T_1)\\,(1 + \\alpha\\,(T_2 - T_1))

    with α = −0.11 %/K for NdFeB, −0.035 %/K for SmCo, −0.2 %/K for ferrite (mid-range of the
    makers' published bands; configurable as option ``alpha``).

    Derives Ke at the rated magnet temperature (``emf.constant_hot``) and at the lowest ambient
    (``emf.constant_cold``; 20 °C when none is given). When the rated magnet temperature is
    itself an estimate, so is the hot Ke.

    Why it matters: a back-EMF at 20 °C next to a voltage at 120 °C makes the voltage margin
    look 10 % larger than it is.

    References: magnet makers' technical notes on reversible temperature coefficients, as
    quoted in REFERENCES.md §6.
    """

    rule = "magnet-temperature"
    title = "magnet temperature correction"
    equation = "Ke(T2) = Ke(T1)·(1 + α·(T2 − T1))"
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
            factor = remanence_factor(magnet, t_ke, hot.value, alpha)
            yield Derivation("emf.constant_hot", ke.value * factor, ke.uncertainty,
                             ("emf.constant", "rated.magnet_temperature"),
                             estimate=ke.is_estimate or hot.is_estimate,
                             note=f"{magnet} at {hot.value - 273.15:.0f} °C",
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
    kind = "exact"
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


def _kt_temperature_factor(sheet: Sheet) -> tuple[float, str] | None:
    """Remanence factor from Ke's temperature to Kt's, and a note; None if Kt's is unstated."""
    ke, kt = sheet.get("emf.constant"), sheet.get("torque_constant")
    if ke is None or kt is None or kt.temperature is None:
        return None
    factor = remanence_factor(sheet.attr("machine.magnet"), ke.temperature or ROOM,
                              kt.temperature, sheet.option("magnet-temperature", "alpha", None))
    return factor, f"Kt stated at {kt.temperature - 273.15:.0f} °C"


@register
class TorqueConstant(Monomial):
    """Torque constant and back-EMF constant are one constant seen from two sides.

    .. math:: K_t[\\mathrm{N\\,m/A_{rms}}] = \\sqrt3\\,K_e[\\mathrm{V_{LL,rms}\\,s/rad}]
              = 0.016540\\,K_e[\\mathrm{V/krpm}]

    from the power balance T·ω = √3·E_LL·I of a sinusoidal machine with i_d = 0, compared at
    the same magnet temperature. When the sheet does not say at which magnet temperature Kt
    holds, both usual readings are accepted — the 20 °C constant of servo catalogues and
    T/I at the hot rated point of industrial sheets — and an info says which fits.

    Example that fails: Ke 100 V/krpm (line, rms) with Kt 1.0 N·m/A (√3·Ke gives 1.65).

    References: R. Krishnan, *Permanent Magnet Synchronous and Brushless DC Motor Drives*,
    CRC Press 2010 (torque and EMF constants) [from memory: chapter]; power balance derived
    in REFERENCES.md §4.
    """

    rule = "emf-constant"
    title = "Kt and Ke"
    equation = "Kt = √3·Ke (same magnet temperature)"
    fields = ("torque_constant", "emf.constant")
    terms = {"torque_constant": 1.0, "emf.constant": -1.0}
    reported = "torque_constant"
    kind = "exact"
    severity_policy = "error beyond rounding; basis slips named; unstated Kt temperature: " \
                      "either 20 °C or hot accepted"
    source = "Krishnan, Permanent Magnet Synchronous and Brushless DC Motor Drives (CRC 2010)"
    order = 21
    derive_inputs = ("torque_constant", "emf.constant")
    derive_outputs = ("torque_constant", "emf.constant")

    def constant(self, sheet: Sheet) -> float | None:
        stated = _kt_temperature_factor(sheet)
        if stated is not None:
            return SQRT3 * stated[0]
        # unstated: centre between the cold and the hot reading, either accepted (allowance)
        return SQRT3 * math.sqrt(self._hot_factor(sheet))

    def allowance(self, sheet: Sheet) -> float:
        if _kt_temperature_factor(sheet) is not None:
            return 0.0
        return abs(math.log(self._hot_factor(sheet))) / 2

    def _hot_factor(self, sheet: Sheet) -> float:
        ke, hot = sheet.get("emf.constant"), sheet.get("rated.magnet_temperature")
        if ke is None or hot is None:
            return 1.0
        return remanence_factor(sheet.attr("machine.magnet"), ke.temperature or ROOM, hot.value,
                                sheet.option("magnet-temperature", "alpha", None))

    def _best_reading(self, sheet: Sheet) -> tuple[float, str] | None:
        """For an unstated Kt temperature: the factor (cold or hot) that fits better."""
        v = sheet.values
        kt, ke = v.get("torque_constant"), v.get("emf.constant")
        if kt is None or ke is None:
            return None
        readings = [(1.0, f"at the Ke temperature ({(ke.temperature or ROOM) - 273.15:.0f} °C)")]
        hot = v.get("rated.magnet_temperature")
        if hot is not None:
            factor = remanence_factor(sheet.attr("machine.magnet"), ke.temperature or ROOM,
                                      hot.value, sheet.option("magnet-temperature", "alpha",
                                                              None))
            readings.append((factor, f"at the rated magnet temperature "
                                     f"({hot.value - 273.15:.0f} °C)"))
        ratio = kt.value / (SQRT3 * ke.value)
        return min(readings, key=lambda r: abs(math.log(ratio / r[0])))

    def derive(self, sheet: Sheet) -> Iterator[Derivation]:
        v = sheet.values
        if "torque_constant" not in v and "emf.constant" in v:
            ke = v["emf.constant"]
            yield Derivation("torque_constant", SQRT3 * ke.value, ke.uncertainty,
                             ("emf.constant",), estimate=ke.is_estimate,
                             note=f"at {(ke.temperature or ROOM) - 273.15:.0f} °C",
                             sources=((ke, 1.0),))
        elif "emf.constant" not in v and "torque_constant" in v:
            kt = v["torque_constant"]
            factor = 1.0
            if kt.temperature is not None:
                factor = remanence_factor(sheet.attr("machine.magnet"), kt.temperature, ROOM)
            yield Derivation("emf.constant", kt.value * factor / SQRT3, kt.uncertainty,
                             ("torque_constant",), estimate=kt.is_estimate,
                             note="at 20 °C" if kt.temperature is not None
                             else "Kt's magnet temperature unstated: taken as 20 °C",
                             sources=((kt, 1.0),))

    def extra_findings(self, sheet: Sheet) -> Iterator[Finding]:
        """Kt's magnet temperature unstated and Kt = √3·Ke holding: which reading it fits
        (info). When the relation fails, its failure (and cause) is the finding, not this."""
        if sheet.given("torque_constant") and sheet.given("emf.constant") and \
                _kt_temperature_factor(sheet) is None:
            evaluation = self.evaluate(sheet)
            if evaluation is None or abs(evaluation.residual) > evaluation.tolerance:
                return
            reading = self._best_reading(sheet)
            if reading is not None:
                yield sheet.finding(self, "info", f"the sheet does not state the magnet "
                                    f"temperature of Kt; Kt = √3·Ke fits best {reading[1]}",
                                    ("torque_constant", "emf.constant"))


@register
class TorquePerAmpere(Monomial):
    """At the rated point of a surface-magnet machine, torque per ampere is about Kt (hot).

    .. math:: T_{rated}/I_{rated} \\approx \\sqrt3\\,K_{e,hot}

    For ``spm`` (L_d ≈ L_q, i_d = 0 below base speed) the shaft torque per rms ampere equals
    the hot torque constant less what iron and friction losses and saturation take: an 8 %
    allowance covers those (stated here, configurable as option ``allowance``). For ``ipm``
    and ``pmasynrm`` reluctance torque adds to the magnet torque, so T/I is only bounded
    below (a warning when under, since the rated point would then be in field weakening).

    Example that fails: spm, Ke 200 V/krpm (Kt 3.3 N·m/A), 100 N·m at 20 A (5 N·m/A).

    References: T = 1.5·p·ψ·i_q for i_d = 0 (REFERENCES.md §4, [R]); Krishnan (2010).
    """

    rule = "emf-constant"
    title = "rated torque per ampere and Kt"
    equation = "T/I ≈ √3·Ke_hot (spm); T/I ≥ √3·Ke_hot (ipm, pmasynrm, below base speed)"
    fields = ("rated.torque", "rated.current", "emf.constant_hot")
    terms = {"rated.torque": 1.0, "rated.current": -1.0, "emf.constant_hot": -1.0}
    reported = "rated.torque"
    kind = "exact"
    severity_policy = "spm: error beyond rounding + allowance (warning on estimated " \
                      "temperatures); ipm/pmasynrm: warning below the bound"
    source = "Krishnan, Permanent Magnet Synchronous and Brushless DC Motor Drives (CRC 2010)"
    derive_fields = ()
    allow_estimates = True
    order = 22
    options = {"allowance": RuleOption(
        "number", "0.08", "relative allowance of rated torque per ampere against √3·Ke_hot "
        "(spm)")}

    def constant(self, sheet: Sheet) -> float:
        return SQRT3

    def applies(self, sheet: Sheet) -> bool:
        return sheet.attr("machine.topology") in ("spm", "ipm", "pmasynrm")

    def allowance(self, sheet: Sheet) -> float:
        return float(sheet.option(self.rule, "allowance", 0.08))

    def describe(self, sheet: Sheet, evaluation: Evaluation) -> str:
        return "rated torque per ampere and the hot torque constant √3·Ke disagree"

    def evaluate(self, sheet: Sheet) -> Evaluation | None:
        evaluation = super().evaluate(sheet)
        if evaluation is None or sheet.attr("machine.topology") == "spm":
            return evaluation
        if evaluation.residual > -evaluation.tolerance:
            evaluation.residual = 0.0  # reluctance torque may add: only a lower bound
        return evaluation

    def severity(self, sheet: Sheet, evaluation: Evaluation) -> str:
        if sheet.attr("machine.topology") != "spm":
            return "warning"
        return super().severity(sheet, evaluation)


@register
class VoltageMargin(Relation):
    """Rated voltage against the hot back-EMF at rated speed.

    .. math:: m = U_{rated} / E_{hot}(n_{rated}) - 1

    For ``spm`` the usual margin is 6–7 % (common practice, no published source): outside it
    an info; below 0 % or above 25 % a warning — below 0 the converter cannot push rated
    current without field weakening, above 25 % suggests a basis slip in Ke (phase vs line).
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
    severity_policy = "spm: info outside 6–7 %, warning below 0 % or above 25 %; " \
                      "ipm/pmasynrm: warning below 0 %"
    source = "common practice (no published source): REFERENCES.md §9"
    order = 40
    options = {
        "band": RuleOption("band", "[0.06, 0.07]", "usual margin of rated voltage over the "
                           "hot back-EMF, spm (common practice); outside it an info"),
        "warn": RuleOption("band", "[0.0, 0.25]", "margins outside this band are warnings "
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
        ke_name = "emf.constant_hot" if "emf.constant_hot" in v else "emf.constant"
        if not sheet.usable(self.rule, "rated.voltage", ke_name, "rated.speed",
                            allow_estimates=True):
            return
        u, ke, w = v["rated.voltage"], v[ke_name], v["rated.speed"]
        if u.is_estimate and u.rule == self.rule:
            return
        emf = ke.value * w.value
        margin = u.value / emf - 1.0
        temperature = ("hot back-EMF" if ke_name.endswith("_hot") else
                       f"back-EMF at {(ke.temperature or ROOM) - 273.15:.0f} °C (no rated "
                       "magnet temperature known)")
        topology = sheet.attr("machine.topology")
        fields = ("rated.voltage", "emf.constant", "rated.speed")
        text = (f"rated voltage is {margin:+.1%} over the {temperature} "
                f"({emf:.0f} V line rms at rated speed)")
        if topology == "spm":
            low, high = sheet.option(self.rule, "band", (0.06, 0.07))
            warn_low, warn_high = sheet.option(self.rule, "warn", (0.0, 0.25))
            if margin < warn_low:
                yield sheet.finding(self, "warning", text + ": the converter cannot push rated "
                                    "current without field weakening", fields,
                                    cause=_margin_cause(margin))
            elif margin > warn_high:
                yield sheet.finding(self, "warning", text + f": far above the usual "
                                    f"{low:.0%}–{high:.0%} (common practice)", fields,
                                    cause=_margin_cause(margin))
            elif not low <= margin <= high:
                yield sheet.finding(self, "info", text + f"; the usual margin is "
                                    f"{low:.0%}–{high:.0%} (common practice)", fields)
            else:
                yield sheet.finding(self, "info", text + " (usual, common practice)", fields)
        elif topology in ("ipm", "pmasynrm"):
            if margin < 0:
                yield sheet.finding(self, "warning", text + ": the rated point is in field "
                                    "weakening; the dq model decides whether it is reachable",
                                    fields)
            else:
                yield sheet.finding(self, "info", text, fields)
        else:
            yield sheet.finding(self, "info", text + " (topology not stated: band not applied)",
                                fields)


def _margin_cause(margin: float) -> str | None:
    ratio = 1.0 + margin
    for factor, text in ((SQRT3, "agrees with the usual margin if Ke is per phase rather than "
                                 "line-to-line (×√3)"),
                         (1 / SQRT3, "agrees with the usual margin if Ke is line-to-line where "
                                     "per phase was meant (÷√3)"),
                         (math.sqrt(2), "agrees with the usual margin if Ke is peak rather "
                                        "than rms (×√2)"),
                         (1 / math.sqrt(2), "agrees with the usual margin if Ke is rms "
                                            "where peak was meant (÷√2)")):
        if abs(ratio / factor - (1 + USUAL_MARGIN)) < 0.04:
            return text
    return None
