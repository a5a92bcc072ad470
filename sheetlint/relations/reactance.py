"""Plausibility of the stated inductance: the per-unit synchronous reactance at the rated point."""

from __future__ import annotations

import math
from collections.abc import Iterator

from sheetlint.engine.core import Finding, Relation, RuleOption, Sheet
from sheetlint.relations.registry import register

SQRT3 = math.sqrt(3.0)
#: per-unit d-axis reactance ω_e·L_d·I/(U/√3) of PM synchronous machines at their rated point:
#: usually about 0.1 … 1.5 (surface magnets low, interior magnets and PM-assisted reluctance
#: machines higher); common practice, approximate
USUAL_REACTANCE = (0.1, 1.5)
#: far outside: a value 1000 times off (µH written as mH), or a phase and line mix-up of a
#: per-unit value near the edge is not reached by this band on purpose (common practice)
FAR_REACTANCE = (0.01, 10.0)


@register
class SynchronousReactance(Relation):
    """The stated inductance, seen as a per-unit reactance at the rated point.

    .. math:: x_d = \\frac{\\omega_e\\,L_d\\,I_{rated}}{U_{rated}/\\sqrt3},
              \\qquad \\omega_e = 2\\pi f = p\\,\\omega

    PM synchronous machines have x_d of about 0.1 … 1.5 per unit (common practice,
    approximate): outside that an info, below 0.01 or above 10 a warning — an inductance in µH
    labelled mH (or the reverse) lands there. A band of practice: never an error.

    Example that warns: 30 kW, 400 V, 52 A, 200 Hz, L_d = 0.0012 mH (1.2 µH written as mH):
    x_d = 2π·200·1.2e-6·52/231 = 0.0003.

    What to ask the vendor: the unit and basis of L_d and L_q.

    References: common practice (no published source); the per-unit system of IEC 60034-4
    (quantities of synchronous machines), from memory.
    """

    rule = "reactance-band"
    title = "per-unit reactance of the stated inductance"
    equation = "x_d = ω_e·L_d·I/(U/√3) in 0.1 … 1.5 (usual)"
    fields = ("circuit.ld", "rated.current", "rated.voltage", "rated.frequency")
    kind = "band"
    severity_policy = "info outside 0.1–1.5; warning below 0.01 or above 10; never an error"
    source = "common practice (approximate band)"
    status = "trial"
    order = 62
    options = {"usual": RuleOption("band", "[0.1, 1.5]", "usual per-unit d-axis reactance "
                                   "(common practice)")}

    def check(self, sheet: Sheet) -> Iterator[Finding]:
        v = sheet.values
        if not sheet.usable(self.rule, "circuit.ld", "rated.current", "rated.voltage"):
            return
        frequency = v.get("rated.frequency")
        if frequency is None:
            speed, pairs = v.get("rated.speed"), v.get("machine.pole_pairs")
            if speed is None or pairs is None:
                return
            omega_e = speed.value * pairs.value
        else:
            omega_e = 2 * math.pi * frequency.value
        ld, current, voltage = v["circuit.ld"], v["rated.current"], v["rated.voltage"]
        if not (omega_e > 0 and voltage.value > 0):
            return
        x_d = omega_e * ld.value * current.value / (voltage.value / SQRT3)
        low, high = sheet.option(self.rule, "usual", USUAL_REACTANCE)
        fields = ("circuit.ld", "rated.current", "rated.voltage")
        text = f"the stated L_d is x_d = {x_d:.3g} per unit at the rated point"
        if x_d < FAR_REACTANCE[0] or x_d > FAR_REACTANCE[1]:
            yield sheet.finding(self, "warning", f"{text}, far outside the usual "
                                f"{low:g}–{high:g} (common practice): check the unit and basis "
                                "of L_d and L_q", fields)
        elif not low <= x_d <= high:
            yield sheet.finding(self, "info", f"{text}; the usual is {low:g}–{high:g} "
                                "(common practice)", fields)
