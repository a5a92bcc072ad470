"""Electrical: input power balance, losses, and the resistive voltage drop."""

from __future__ import annotations

import math
from collections.abc import Iterator

from sheetlint.engine.core import GIVEN, Derivation, Finding, Relation, RuleOption, Sheet
from sheetlint.engine.monomial import Monomial
from sheetlint.relations.registry import register
from sheetlint.standards.tolerances import efficiency_tolerance, power_factor_tolerance

SQRT3 = math.sqrt(3.0)
INVERSE_SQRT3 = 1.0 / SQRT3
LOSS_PARTS = ("copper", "iron", "friction", "stray")
LOSS_PART_FIELDS = tuple(f"rated.losses.{part}" for part in LOSS_PARTS)


def _resistance_field(sheet: Sheet) -> str:
    """The hot phase resistance when known; else the stated one (lower: bounds stay valid)."""
    return "circuit.resistance_hot" if "circuit.resistance_hot" in sheet.values else (
        "circuit.resistance")


@register
class ElectricalPower(Monomial):
    """Output power is efficiency times the three-phase electrical input power.

    .. math:: P = \\eta\\,\\sqrt{3}\\,U\\,I\\cos\\varphi

    What it checks: rated (and every point's) power, efficiency, line voltage, line current and
    power factor agree. The machine may fall short of the declared η and cos φ by the
    IEC 60034-1 tolerance (η: −15 % of (1 − η) up to 150 kW, −10 % above; cos φ:
    −(1 − cos φ)/6, 0.02…0.07; for cos φ by analogy: the standard states it for induction
    machines), so the current may lie above the balance of the declared values by as much —
    never below it.

    Why it matters: a current or power factor copied from another rating, a phase voltage
    labelled line, or a power in hp all break this balance.

    Example that fails: 15 kW, 400 V, 28 A, cos φ 0.95, η 93 % (gives 17.1 kW).

    Fix: correct the field named in the cause, or state the basis of voltage and current.

    References: IEC 60034-1:2010, tolerances on declared values (as quoted); the three-phase
    power P = √3·U·I·cos φ (any power-systems text).
    """

    rule = "electrical-power"
    title = "electrical power balance"
    equation = "P = η·√3·U·I·cos φ"
    fields = ("rated.current", "rated.power", "rated.efficiency", "rated.voltage",
              "rated.power_factor")
    terms = {"rated.current": 1.0, "rated.power": -1.0, "rated.efficiency": 1.0,
             "rated.voltage": 1.0, "rated.power_factor": 1.0}
    reported = "rated.current"
    derive_fields = ("rated.current", "rated.power_factor", "rated.efficiency")
    kind = "balance"
    severity_policy = ("error beyond rounding plus the one-sided IEC 60034-1 tolerances on η "
                       "and cos φ (a current above the balance only)")
    source = "IEC 60034-1:2010, tolerances on declared values (η, cos φ), as quoted"
    per_point = True
    order = 12

    def constant(self, sheet: Sheet) -> float:
        return INVERSE_SQRT3

    def allowed(self, sheet: Sheet) -> tuple[float, float]:
        """One-sided, as IEC 60034-1's tolerances are: a machine may reach η and cos φ short
        of the declared values by the tolerance, so the current may lie *above* the balance of
        the declared values by as much, never below it."""
        values, at = sheet.values, self.at
        eta = values[at("rated.efficiency")].value
        cos_phi = values[at("rated.power_factor")].value
        power = values[at("rated.power")].value
        least_eta = eta - efficiency_tolerance(eta, power)
        least_cos_phi = cos_phi - power_factor_tolerance(cos_phi)
        if least_eta <= 0 or least_cos_phi <= 0:
            return 0.0, 0.0
        return 0.0, math.log(eta / least_eta) + math.log(cos_phi / least_cos_phi)


@register
class LossBalance(Relation):
    """Losses are input minus output; their parts add up; copper loss fits inside them.

    .. math:: P_{loss} = P/\\eta - P, \\qquad P_{Cu} = 3 I^2 R_{phase} \\le P_{loss}

    What it checks: stated total losses against power and efficiency; the stated breakdown
    (copper, iron, friction, stray) against the total; the copper loss 3·I²·R of the rated
    current in the phase resistance (hot when known, otherwise the stated one, which can only
    make the bound looser) within the total losses, and within the copper loss when stated.

    Why it matters: a resistance given line-to-line as if per phase doubles the apparent copper
    loss; an efficiency rounded up hides a quarter of the losses.

    Example that fails: 15 kW at η 95 % states 500 W of losses (P/η − P = 789 W).

    References: IEC 60034-2-1:2014, summation of losses (total loss = input − output) [M].
    Copper loss 3·I²·R_phase = 1.5·I²·R_line for star and delta (DESIGN.md, Bases).
    """

    rule = "loss-balance"
    title = "losses, efficiency and copper loss"
    equation = "P_loss = P/η − P; Σ parts = P_loss; 3·I²·R ≤ P_loss"
    fields = ("rated.losses", "rated.power", "rated.efficiency", "rated.current",
              "circuit.resistance")
    kind = "balance"
    severity_policy = "error beyond rounding; error when the copper loss exceeds the losses"
    source = "IEC 60034-2-1:2014, determination of losses (summation)"
    order = 14
    derive_inputs = ("rated.power", "rated.efficiency", "rated.losses", "rated.current",
                     "circuit.resistance_hot", "rated.losses.copper")
    derive_outputs = ("rated.losses", "rated.efficiency", "rated.power", "rated.losses.copper")

    def derive(self, sheet: Sheet) -> Iterator[Derivation]:
        v = sheet.values
        if "rated.losses" not in v and sheet.has("rated.power", "rated.efficiency"):
            p, eta = v["rated.power"], v["rated.efficiency"]
            losses = p.value * (1.0 / eta.value - 1.0)
            u = p.uncertainty + eta.uncertainty / (1.0 - eta.value)
            yield Derivation("rated.losses", losses, u, ("rated.power", "rated.efficiency"),
                             estimate=p.is_estimate or eta.is_estimate)
        elif "rated.efficiency" not in v and sheet.has("rated.power", "rated.losses"):
            p, loss = v["rated.power"], v["rated.losses"]
            eta = p.value / (p.value + loss.value)
            u = (1.0 - eta) * (p.uncertainty + loss.uncertainty)
            yield Derivation("rated.efficiency", eta, u, ("rated.power", "rated.losses"),
                             estimate=p.is_estimate or loss.is_estimate)
        elif "rated.power" not in v and sheet.has("rated.efficiency", "rated.losses"):
            eta, loss = v["rated.efficiency"], v["rated.losses"]
            power = loss.value * eta.value / (1.0 - eta.value)
            u = loss.uncertainty + eta.uncertainty / (eta.value * (1.0 - eta.value))
            yield Derivation("rated.power", power, u, ("rated.efficiency", "rated.losses"),
                             estimate=eta.is_estimate or loss.is_estimate)
        if ("rated.losses.copper" not in v and "rated.current" in v
                and "circuit.resistance_hot" in v):
            i, r = v["rated.current"], v["circuit.resistance_hot"]
            yield Derivation("rated.losses.copper", 3.0 * i.value ** 2 * r.value,
                             2 * i.uncertainty + r.uncertainty,
                             ("rated.current", "circuit.resistance_hot"),
                             estimate=i.is_estimate or r.is_estimate,
                             sources=((i, 2.0), (r, 1.0)))

    def check(self, sheet: Sheet) -> Iterator[Finding]:
        v = sheet.values
        rule = self.rule
        if sheet.usable(rule, "rated.losses", "rated.power", "rated.efficiency"):
            p, eta, loss = v["rated.power"], v["rated.efficiency"], v["rated.losses"]
            expected = p.value * (1.0 / eta.value - 1.0)
            tolerance = (loss.uncertainty + p.uncertainty
                         + eta.uncertainty / (1.0 - eta.value))
            deviation = loss.value / expected - 1.0
            if abs(deviation) > tolerance:
                # DESIGN.md, Judgement 4: beyond twice the allowance an error, within it a
                # warning (a rounding slip)
                severity = "error" if abs(deviation) > 2 * tolerance else "warning"
                yield sheet.finding(
                    self, severity, f"stated losses are {deviation:+.1%} off P/η − P; "  # type: ignore[arg-type]
                    f"allowed ±{tolerance:.1%} (the written digits)",
                    ("rated.losses", "rated.power", "rated.efficiency"),
                    expected={"rated.losses": expected}, actual={"rated.losses": loss.value},
                    deviation=deviation)
        if "rated.losses" in v:
            finding = self._parts_sum(sheet)
            if finding is not None:
                yield finding
        finding = self._copper_bound(sheet)
        if finding is not None:
            yield finding

    def _parts_sum(self, sheet: Sheet) -> Finding | None:
        v = sheet.values
        parts = [p for p in LOSS_PART_FIELDS if p in v and v[p].origin == GIVEN]
        if len(parts) < 2:
            return None
        total = sum(v[p].value for p in parts)
        slack = sum(v[p].value * v[p].uncertainty for p in parts)
        loss = v["rated.losses"]
        slack += loss.value * loss.uncertainty
        complete = len(parts) == len(LOSS_PARTS)
        if total > loss.value + slack or (complete and total < loss.value - slack):
            word = "exceed" if total > loss.value else "fall short of"
            return sheet.finding(
                self, "error", f"the stated loss parts ({', '.join(p[13:] for p in parts)}) "
                f"{word} the total losses", ("rated.losses", *parts),
                expected={"rated.losses": total}, actual={"rated.losses": loss.value},
                deviation=loss.value / total - 1.0)
        return None

    def _copper_bound(self, sheet: Sheet) -> Finding | None:
        v = sheet.values
        resistance = _resistance_field(sheet)
        if not sheet.usable(self.rule, "rated.current", resistance, "rated.losses",
                            allow_estimates=True):
            return None
        i, r, loss = v["rated.current"], v[resistance], v["rated.losses"]
        copper = 3.0 * i.value ** 2 * r.value
        tolerance = 2 * i.uncertainty + r.uncertainty + loss.uncertainty
        limit_name, limit = "rated.losses", loss.value
        if sheet.given("rated.losses.copper"):
            limit_name, limit = "rated.losses.copper", v["rated.losses.copper"].value
            tolerance += v["rated.losses.copper"].uncertainty
            if resistance == "circuit.resistance_hot":
                tolerance += 0.10  # the sheet's winding temperature may differ from ours
        if copper > limit * (1.0 + tolerance):
            cause = None
            if sheet.get("circuit.resistance") and copper / 2 <= limit * (1 + tolerance):
                cause = ("agrees if circuit.resistance is line-to-line (terminal-to-terminal) "
                         "rather than per phase (×2)")
            stated = sheet.get("circuit.resistance")
            estimated = i.is_estimate or r.is_estimate or loss.is_estimate
            severity = "warning" if estimated or (cause and stated and not stated.basis_stated) \
                else "error"
            return sheet.finding(
                self, severity,  # type: ignore[arg-type]
                f"copper loss 3·I²·R = {copper:.0f} W of the rated current exceeds "
                f"{limit_name} ({limit:.0f} W)", ("circuit.resistance", "rated.current",
                                                  limit_name),
                expected={limit_name: copper}, actual={limit_name: limit},
                deviation=limit / copper - 1.0, cause=cause)
        return None


@register
class ResistanceDrop(Relation):
    """The resistive drop of rated current is a small part of the phase voltage.

    .. math:: \\frac{I\\,R_{phase,hot}}{U/\\sqrt3} \\in [0.1\\,\\%, 15\\,\\%]

    What it checks: the ratio above lies in the plausible band (warning outside). It also
    reports the standstill line voltage √3·I·R_hot that rated current needs, which a
    commissioning engineer compares with the converter's low-speed voltage.

    Why it matters: at zero speed the stator impedance reduces to its resistance, so the
    voltage that rated current needs at standstill is only I·R — small next to the rated
    voltage (common practice, no published source). A ratio far outside the band points to
    a resistance in mΩ written as Ω, or line-to-line read as phase.

    Fix: check the resistance's unit, basis and temperature.

    References: the band is common practice (REFERENCES.md §9), not a published value.
    """

    rule = "resistance-drop"
    title = "resistive voltage drop"
    equation = "I·R_phase,hot / (U/√3) in 0.1–15 %; standstill U = √3·I·R_hot"
    fields = ("circuit.resistance", "rated.current", "rated.voltage")
    kind = "band"
    severity_policy = "warning outside the band; info with the standstill voltage"
    source = "common practice (no published source)"
    order = 60
    options = {
        "low": RuleOption("number", "0.001", "standstill voltage below this share of the "
                          "rated voltage is unusually small (common practice)"),
        "high": RuleOption("number", "0.15", "standstill voltage above this share of the "
                           "rated voltage is unusually large (common practice)"),
    }

    def check(self, sheet: Sheet) -> Iterator[Finding]:
        v = sheet.values
        resistance = _resistance_field(sheet)
        if not sheet.usable(self.rule, resistance, "rated.current", "rated.voltage",
                            allow_estimates=True):
            return
        r, i, u = v[resistance], v["rated.current"], v["rated.voltage"]
        standstill = SQRT3 * i.value * r.value
        ratio = standstill / u.value
        low = sheet.option(self.rule, "low", 0.001)
        high = sheet.option(self.rule, "high", 0.15)
        hot = "hot " if resistance.endswith("_hot") else ""
        yield sheet.finding(
            self, "info", f"rated current at standstill needs about {standstill:.1f} V line "
            f"(√3·I·R_{hot}phase), {ratio:.1%} of the rated voltage (common practice: small)",
            (resistance, "rated.current", "rated.voltage"))
        if not low <= ratio <= high:
            where = "above" if ratio > high else "below"
            cause = ("a resistance in Ω where mΩ was meant, or line-to-line read as phase"
                     if ratio > high else "a resistance in mΩ written as Ω-thousandths")
            yield sheet.finding(
                self, "warning", f"I·R is {ratio:.2%} of the phase voltage, {where} the "
                f"plausible {low:.1%}–{high:.0%} band (common practice)",
                (resistance, "rated.current", "rated.voltage"), cause=cause)
