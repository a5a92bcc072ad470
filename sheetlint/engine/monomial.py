"""Relations of the form ``prod(x_i ** a_i) = C``: one class solves and checks them all.

Most datasheet relations are products of powers (P = T·ω, f = p·n/60, E = Ke·ω, Kt = √3·Ke,
P = η·√3·U·I·cos φ). For these the engine solves any one field in closed form, propagates
relative uncertainties exactly (Σ|a_i|·u_i, worst case), and tracks how the residual depends
on each given field, which is what lets the cause diagnosis try a slip factor on one field
against every relation at once.
"""

from __future__ import annotations

import copy
import math
from collections.abc import Iterator
from dataclasses import dataclass
from typing import ClassVar

from sheetlint.engine.core import (
    Derivation,
    Finding,
    Relation,
    Sheet,
    combine_sensitivity,
)


@dataclass(slots=True)
class Evaluation:
    """One monomial check as evaluated: log residual, tolerance and sensitivity to given fields."""

    relation: Monomial
    fields: tuple[str, ...]
    residual: float  # ln(actual/expected) of the reported field, scaled to exponent 1
    tolerance: float  # allowed |residual|
    coefficients: dict[str, float] | None  # d residual / d ln(given field)
    finding: Finding | None = None


class Monomial(Relation):
    """Base for ``prod(x_i ** a_i) = C``; subclasses set ``terms`` and ``constant``."""

    terms: ClassVar[dict[str, float]]
    #: the field reported as "actual vs expected" when the relation fails
    reported: ClassVar[str]
    derive_fields: ClassVar[tuple[str, ...] | None] = None  # None: every field
    #: also applied to every entry of ``points`` (``rated.x`` read as ``points[i].x``)
    per_point: ClassVar[bool] = False
    #: may check with estimated inputs; the finding is then at most a warning
    allow_estimates: ClassVar[bool] = False
    prefix: str = "rated."

    def variants(self, sheet: Sheet) -> Iterator[Monomial]:
        """This relation, and one copy per operating point when ``per_point``."""
        yield self
        if self.per_point:
            for i in range(sheet.attributes.get("points.count", 0)):
                clone = copy.copy(self)
                clone.prefix = f"points[{i}]."
                yield clone

    def at(self, name: str) -> str:
        """A ``rated.`` field name read at this variant's operating point."""
        if self.prefix != "rated." and name.startswith("rated."):
            return self.prefix + name[6:]
        return name

    def constant(self, sheet: Sheet) -> float | None:
        """The right-hand side C (may depend on attributes); None when not applicable."""
        return 1.0

    def applies(self, sheet: Sheet) -> bool:
        return True

    def allowance(self, sheet: Sheet) -> float:
        """Extra relative tolerance beyond the written digits (e.g. an IEC tolerance)."""
        return 0.0

    def field_names(self, sheet: Sheet) -> dict[str, float]:
        if self.prefix == "rated.":
            return self.terms
        return {self.at(n): e for n, e in self.terms.items()}

    # --- derive -----------------------------------------------------------------------------
    def derive(self, sheet: Sheet) -> Iterator[Derivation]:
        for variant in self.variants(sheet):
            yield from variant.derive_one(sheet)

    def derive_one(self, sheet: Sheet) -> Iterator[Derivation]:
        if not self.applies(sheet):
            return
        terms = self.field_names(sheet)
        values = sheet.values
        missing = [f for f in terms if f not in values]
        if len(missing) != 1:
            return
        target = missing[0]
        if self.derive_fields is not None and self.at(target) not in [
                self.at(f) for f in self.derive_fields]:
            return
        constant = self.constant(sheet)
        if constant is None or constant <= 0:
            return
        log_sum = math.log(constant)
        uncertainty = 0.0
        estimate = False
        for name, exponent in terms.items():
            if name == target:
                continue
            k = values[name]
            if k.value <= 0:
                return
            log_sum -= exponent * math.log(k.value)
            uncertainty += abs(exponent) * k.uncertainty
            estimate = estimate or k.is_estimate
        a = terms[target]
        value = math.exp(log_sum / a)
        others = {n: -e / a for n, e in terms.items() if n != target}
        yield Derivation(target, value, uncertainty / abs(a),
                         tuple(n for n in terms if n != target), estimate=estimate,
                         sensitivity=combine_sensitivity(others, sheet))

    # --- check ------------------------------------------------------------------------------
    def evaluate(self, sheet: Sheet) -> Evaluation | None:
        """The residual of this relation on the sheet, or None when it cannot be checked."""
        if not self.applies(sheet):
            return None
        terms = self.field_names(sheet)
        if not sheet.usable(self.rule, *terms, allow_estimates=self.allow_estimates):
            return None
        constant = self.constant(sheet)
        if constant is None or constant <= 0:
            return None
        reported = self.reported_field(sheet)
        a0 = terms[reported]
        log_residual = -math.log(constant)
        tolerance = 0.0
        coefficients: dict[str, float] | None = {}
        for name, exponent in terms.items():
            k = sheet.values[name]
            if k.value <= 0:
                return None
            log_residual += exponent * math.log(k.value)
            tolerance += abs(exponent) * k.uncertainty
            if coefficients is not None:
                if k.sensitivity is None:
                    coefficients = None
                else:
                    for g, s in k.sensitivity.items():
                        coefficients[g] = coefficients.get(g, 0.0) + exponent * s / a0
        tolerance = tolerance / abs(a0) + self.allowance(sheet)
        return Evaluation(self, tuple(terms), log_residual / a0, tolerance, coefficients)

    def reported_field(self, sheet: Sheet) -> str:
        return self.at(self.reported)

    def describe(self, sheet: Sheet, evaluation: Evaluation) -> str:
        return self.title

    def check(self, sheet: Sheet) -> Iterator[Finding]:
        for variant in self.variants(sheet):
            evaluation = variant.evaluate(sheet)
            if evaluation is not None and abs(evaluation.residual) > evaluation.tolerance:
                yield variant.failure(sheet, evaluation)

    def severity(self, sheet: Sheet, evaluation: Evaluation) -> str:
        """error by default; warning when an estimate took part."""
        if any(sheet.values[f].is_estimate for f in evaluation.fields):
            return "warning"
        return "error"

    def failure(self, sheet: Sheet, evaluation: Evaluation) -> Finding:
        reported = self.reported_field(sheet)
        actual = sheet.value(reported)
        expected = actual / math.exp(evaluation.residual)
        deviation = actual / expected - 1.0
        others = [f for f in evaluation.fields if f != reported]
        message = (f"{self.describe(sheet, evaluation)}: {reported} is {deviation:+.1%} off the "
                   f"value the other fields give (tolerance ±{evaluation.tolerance:.1%})")
        finding = sheet.finding(self, self.severity(sheet, evaluation),  # type: ignore[arg-type]
                                message, (reported, *others),
                                expected={reported: expected}, actual={reported: actual},
                                deviation=deviation)
        evaluation.finding = finding
        return finding
