"""Mechanics: power, torque and speed; pole count, speed and frequency."""

from __future__ import annotations

import math
from collections.abc import Iterator

from sheetlint.engine.core import Derivation, Finding, Sheet
from sheetlint.engine.monomial import Evaluation, Monomial
from sheetlint.relations.registry import register

TWO_PI = 2.0 * math.pi


@register
class PowerTorqueSpeed(Monomial):
    """Shaft power equals torque times angular speed.

    .. math:: P = T\\,\\omega, \\qquad \\omega = 2\\pi n/60

    What it checks: rated (and every listed point's) power, torque and speed agree within the
    rounding of the written digits. P[kW] = T[N·m]·n[r/min]/9549.3.

    Why it matters: a torque copied from a sibling rating, or a power in hp labelled kW, makes
    the converter's torque limit and the motor's thermal model wrong.

    Example that fails: 15 kW, 1500 rpm, 110 N·m (P/ω gives 95.5 N·m).

    Fix: correct the torque (or the power or speed it was computed from).

    References: SI Brochure, 9th ed. (2019), derived units (W = N·m·s⁻¹ with rad = 1);
    NIST SP 811 (2008), App. B for hp and lbf·ft.
    """

    rule = "power-torque-speed"
    title = "power, torque and speed"
    equation = "P = T·ω, ω = 2π·n/60"
    fields = ("rated.torque", "rated.power", "rated.speed")
    terms = {"rated.torque": 1.0, "rated.power": -1.0, "rated.speed": 1.0}
    reported = "rated.torque"
    kind = "identity"
    severity_policy = "error beyond the rounding of the written digits; the usual slips are tried"
    source = "SI Brochure, 9th edition (BIPM 2019): definition of the watt; NIST SP 811 (2008)"
    per_point = True
    order = 10


@register
class PoleCount(Monomial):
    """The pole count is twice the number of pole pairs.

    .. math:: 2p = \\text{poles}

    Example that fails: ``poles: 8`` with ``pole_pairs: 8``.
    """

    rule = "pole-count"
    title = "poles and pole pairs"
    equation = "poles = 2·p"
    fields = ("machine.poles", "machine.pole_pairs")
    terms = {"machine.poles": 1.0, "machine.pole_pairs": -1.0}
    reported = "machine.poles"
    kind = "identity"
    severity_policy = "error when they disagree"
    source = "definition"
    order = 1

    def constant(self, sheet: Sheet) -> float:
        return 2.0


@register
class SynchronousSpeed(Monomial):
    """A synchronous machine turns at exactly the speed its frequency and pole pairs set.

    .. math:: f = p\\,n/60

    What it checks: rated (and every listed point's) frequency, speed and pole count agree;
    the pole count derived from frequency and speed is an integer. A speed a few per cent
    under 120·f/poles reads as an induction motor's slip: the sheet mixes in data of an
    asynchronous machine, or the speed is not the synchronous one.

    Why it matters: the converter's speed controller and encoder scaling use the pole count;
    a wrong one makes the motor run at the wrong speed or not at all.

    Example that fails: 8 poles, 1500 rpm, 50 Hz (8 poles at 50 Hz give 750 rpm).

    Fix: correct the pole count, frequency or speed.

    References: A. E. Fitzgerald, C. Kingsley, S. D. Umans, *Electric Machinery*, 6th ed.,
    McGraw-Hill 2003, ch. 4 (synchronous speed n = 120 f/poles) [from memory: chapter].
    """

    rule = "synchronous-speed"
    title = "frequency, speed and pole pairs"
    equation = "f = p·n/60"
    fields = ("rated.speed", "rated.frequency", "machine.pole_pairs")
    terms = {"rated.speed": 1.0, "rated.frequency": -1.0, "machine.pole_pairs": 1.0}
    reported = "rated.speed"
    kind = "identity"
    severity_policy = ("error when f ≠ p·n/60 beyond rounding; error when no integral pole "
                       "count fits")
    source = "Fitzgerald, Kingsley, Umans, Electric Machinery, 6th ed. (2003), ch. 4"
    per_point = True
    derive_fields = ("rated.speed", "rated.frequency")
    derive_inputs = ("rated.speed", "rated.frequency", "machine.pole_pairs", "machine.poles")
    derive_outputs = ("rated.speed", "rated.frequency", "machine.pole_pairs")
    order = 10

    def constant(self, sheet: Sheet) -> float:
        return TWO_PI  # ω·p / f = 2π

    def derive(self, sheet: Sheet) -> Iterator[Derivation]:
        yield from super().derive(sheet)
        values = sheet.values
        if "machine.pole_pairs" in values or "machine.poles" in values:
            return
        if not sheet.usable(self.rule, "rated.speed", "rated.frequency"):
            return
        f, w = values["rated.frequency"], values["rated.speed"]
        pairs = TWO_PI * f.value / w.value
        nearest = round(pairs)
        if nearest >= 1 and abs(pairs / nearest - 1.0) <= f.uncertainty + w.uncertainty:
            yield Derivation("machine.pole_pairs", float(nearest), 0.0,
                             ("rated.frequency", "rated.speed"),
                             note="nearest integer to 2π·f/ω")

    def extra_findings(self, sheet: Sheet) -> Iterator[Finding]:
        """No pole count stated, and frequency and speed give no integral one."""
        values = sheet.values
        if "machine.pole_pairs" in values or not sheet.usable(self.rule, "rated.speed",
                                                              "rated.frequency"):
            return
        f, w = values["rated.frequency"], values["rated.speed"]
        pairs = TWO_PI * f.value / w.value
        message = (f"no integral pole count makes {w.text or 'the rated speed'} at "
                   f"{f.text or 'the rated frequency'}: 2·f/n·60 gives {2 * pairs:.3f} poles")
        cause = _slip_cause(pairs)
        yield sheet.finding(self, "error", message, ("rated.speed", "rated.frequency"),
                            cause=cause)

    def describe(self, sheet: Sheet, evaluation: Evaluation) -> str:
        return "frequency, speed and pole count disagree"

    def failure(self, sheet: Sheet, evaluation: Evaluation) -> Finding:
        finding = super().failure(sheet, evaluation)
        if finding.deviation is not None and -0.08 <= finding.deviation <= -0.005:
            finding.cause = (f"the speed is {-finding.deviation:.1%} under synchronous speed: "
                             "this reads as an induction motor's slip (asynchronous data), "
                             "not a synchronous machine's speed")
        return finding


def _slip_cause(pairs: float) -> str | None:
    """When the pole pairs come out a little above an integer, the speed shows slip."""
    nearest = math.floor(pairs)
    if nearest >= 1:
        slip = 1.0 - nearest / pairs
        if 0.005 <= slip <= 0.08:
            return (f"the speed is {slip:.1%} under the synchronous speed of {2 * nearest} "
                    "poles: this reads as an induction motor's slip (asynchronous data)")
    return None
