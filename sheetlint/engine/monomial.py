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
from dataclasses import field as dataclass_field
from typing import Any, ClassVar

from sheetlint.engine.core import (
    ESTIMATE,
    Derivation,
    Finding,
    Known,
    Relation,
    Sheet,
)

_PENDING: Any = object()  # coefficients not resolved yet

#: (term fields, exponents) -> (term items, fields, exponents) of an overridden ``field_names``
_TERM_PLANS: dict[tuple[tuple[str, ...], tuple[float, ...]],
                  tuple[tuple[tuple[str, float], ...], tuple[str, ...], tuple[float, ...]]] = {}


@dataclass(slots=True)
class Evaluation:
    """One monomial check as evaluated: log residual, tolerance and sensitivity to given fields."""

    relation: Monomial
    fields: tuple[str, ...]
    residual: float  # ln(actual/expected) of the reported field, scaled to exponent 1
    low: float  # the least residual allowed (written digits and the relation's allowance)
    high: float  # the largest residual allowed
    knowns: list[Known] = dataclass_field(default_factory=list)  # the value of each term
    exponents: tuple[float, ...] = ()  # the exponent of each term
    scale: float = 1.0  # exponent of the reported field
    finding: Finding | None = None
    _coefficients: Any = _PENDING

    def miss(self, residual: float | None = None) -> float:
        """How far ``residual`` (default: this evaluation's) lies outside the allowed interval,
        in log units; 0 inside it."""
        r = self.residual if residual is None else residual
        if r > self.high:
            return r - self.high
        if r < self.low:
            return self.low - r
        return 0.0

    @property
    def fails(self) -> bool:
        return self.residual > self.high or self.residual < self.low

    @property
    def half_width(self) -> float:
        """Half the allowed interval: a miss beyond it is an error (DESIGN.md, Judgement 4)."""
        return (self.high - self.low) / 2

    @property
    def coefficients(self) -> dict[str, float] | None:
        """d residual / d ln(given field); None where a term's dependence is not a monomial.

        Resolved when first asked for: only the cause diagnosis of a failing sheet needs it.
        """
        found = self._coefficients
        if found is _PENDING:
            found = {}
            for known, exponent in zip(self.knowns, self.exponents, strict=True):
                sensitivity = known.sensitivity
                if sensitivity is None:
                    found = None
                    break
                for g, s in sensitivity.items():
                    found[g] = found.get(g, 0.0) + exponent * s / self.scale
            self._coefficients = found
        return found


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
    #: (prefix, term items, fields it may derive, term fields, term exponents) of this
    #: variant, built on first use
    _plan: tuple[str, tuple[tuple[str, float], ...], frozenset[str] | None,
                 tuple[str, ...], tuple[float, ...]] | None = None

    def variants(self, sheet: Sheet) -> list[Monomial]:
        """This relation, and one copy per operating point when ``per_point``."""
        if not self.per_point:
            return [self]
        out = [self]
        for i in range(sheet.attributes.get("points.count", 0)):
            clone = copy.copy(self)
            clone.prefix = f"points[{i}]."
            out.append(clone)
        return out

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
        """Extra relative tolerance beyond the written digits (e.g. an IEC tolerance), the same
        both ways; override :meth:`allowed` for a one-sided or shifted interval."""
        return 0.0

    def allowed(self, sheet: Sheet) -> tuple[float, float]:
        """The interval of ln(actual/expected) the relation admits beyond the written digits:
        (least, largest). Identities admit nothing; balances a one-sided standard tolerance;
        models a named band; unstated conditions widen it to every admissible reading."""
        a = self.allowance(sheet)
        return -a, a

    def reading_note(self, sheet: Sheet) -> str:
        """The reading assumed for an unstated condition, named in a failure's message."""
        return ""

    def field_names(self, sheet: Sheet) -> dict[str, float]:
        if self.prefix == "rated.":
            return self.terms
        return {self.at(n): e for n, e in self.terms.items()}

    def _variant_plan(self) -> tuple[str, tuple[tuple[str, float], ...], frozenset[str] | None,
                                     tuple[str, ...], tuple[float, ...]]:
        plan = self._plan
        if plan is None or plan[0] != self.prefix:
            targets = (None if self.derive_fields is None
                       else frozenset(self.at(f) for f in self.derive_fields))
            items = tuple((self.at(n), e) for n, e in self.terms.items())
            plan = self._plan = (self.prefix, items, targets, tuple(n for n, _ in items),
                                 tuple(e for _, e in items))
        return plan

    def term_items(self, sheet: Sheet) -> tuple[tuple[tuple[str, float], ...], tuple[str, ...],
                                                tuple[float, ...]]:
        """((field, exponent) of each term, the fields, the exponents) at this variant's
        point; from the variant's plan unless ``field_names`` is overridden."""
        if type(self).field_names is Monomial.field_names:
            plan = self._variant_plan()
            return plan[1], plan[3], plan[4]
        terms = self.field_names(sheet)
        key = (tuple(terms), tuple(terms.values()))
        found = _TERM_PLANS.get(key)
        if found is None:
            found = _TERM_PLANS[key] = (tuple(zip(*key, strict=True)), *key)
        return found

    # --- derive -----------------------------------------------------------------------------
    def derive(self, sheet: Sheet) -> Iterator[Derivation]:
        if not self.per_point:
            return self.derive_one(sheet)
        return (d for variant in self.variants(sheet) for d in variant.derive_one(sheet))

    def derive_one(self, sheet: Sheet) -> Iterator[Derivation]:
        values = sheet.values
        items = self.term_items(sheet)[0]
        target = None
        for name, _ in items:
            if name not in values:
                if target is not None:
                    return
                target = name
        if target is None:
            return
        targets = self._variant_plan()[2]
        if targets is not None and self.at(target) not in targets:
            return
        if not self.applies(sheet):
            return
        constant = self.constant(sheet)
        if constant is None or constant <= 0:
            return
        log_sum = math.log(constant)
        uncertainty = 0.0
        estimate = False
        a = 1.0
        inputs = []
        sources = []
        for name, exponent in items:
            if name == target:
                a = exponent
                continue
            k = values[name]
            if k.value <= 0:
                return
            log_sum -= exponent * math.log(k.value)
            uncertainty += abs(exponent) * k.uncertainty
            estimate = estimate or k.origin == ESTIMATE
            inputs.append(name)
            sources.append((k, exponent))
        yield Derivation(target, math.exp(log_sum / a), uncertainty / abs(a), tuple(inputs),
                         estimate=estimate, sources=tuple([(k, -e / a) for k, e in sources]))

    # --- check ------------------------------------------------------------------------------
    def evaluate(self, sheet: Sheet) -> Evaluation | None:
        """The residual of this relation on the sheet, or None when it cannot be checked."""
        if not self.applies(sheet):
            return None
        items, names, exponents = self.term_items(sheet)
        get = sheet.values.get
        rule = self.rule
        allow_estimates = self.allow_estimates
        knowns = [get(name) for name in names]
        for k in knowns:
            if k is None or k.rule == rule or (k.origin == ESTIMATE and not allow_estimates):
                return None
        constant = self.constant(sheet)
        if constant is None or constant <= 0:
            return None
        reported = self.reported_field(sheet)
        log_residual = -math.log(constant)
        tolerance = 0.0
        a0 = 0.0
        for (name, exponent), k in zip(items, knowns):  # noqa: B905 (same length)
            value = k.value  # type: ignore[union-attr]
            if value <= 0:
                return None
            if name == reported:
                a0 = exponent
            log_residual += exponent * math.log(value)
            tolerance += abs(exponent) * k.uncertainty  # type: ignore[union-attr]
        precision = tolerance / abs(a0)
        low, high = self.allowed(sheet)
        return Evaluation(self, names, log_residual / a0, low - precision,  # type: ignore[arg-type]
                          high + precision, knowns, exponents, a0)

    def reported_field(self, sheet: Sheet) -> str:
        return self.at(self.reported)

    def describe(self, sheet: Sheet, evaluation: Evaluation) -> str:
        return self.title

    def evaluations(self, sheet: Sheet) -> list[Evaluation]:
        """The evaluation of every variant that can be checked; a failing one carries its
        finding (``Evaluation.finding``), which the cause diagnosis may still amend."""
        out = []
        for variant in self.variants(sheet):
            evaluation = variant.evaluate(sheet)
            if evaluation is None:
                continue
            if evaluation.fails:
                evaluation.finding = variant.failure(sheet, evaluation)
            out.append(evaluation)
        return out

    def check(self, sheet: Sheet) -> Iterator[Finding]:
        """The product-of-powers failures of every variant, then :meth:`extra_findings`.

        The engine does not call this: it keeps :meth:`evaluations` for the cause diagnosis,
        which needs every one, and asks for :meth:`extra_findings` itself.
        """
        for evaluation in self.evaluations(sheet):
            if evaluation.finding is not None:
                yield evaluation.finding
        yield from self.extra_findings(sheet)

    def extra_findings(self, sheet: Sheet) -> Iterator[Finding]:
        """Findings of this rule beyond the product of powers (e.g. no integral pole count),
        checked once per sheet, not per operating point. Override to add some."""
        return iter(())

    def severity(self, sheet: Sheet, evaluation: Evaluation) -> str:
        """DESIGN.md, Judgement 4: an error when the miss exceeds the allowance by more than the
        allowance itself, a warning within that; a warning at most when an estimate took part."""
        if any(sheet.values[f].is_estimate for f in evaluation.fields):
            return "warning"
        return "error" if evaluation.miss() > evaluation.half_width else "warning"

    def failure(self, sheet: Sheet, evaluation: Evaluation) -> Finding:
        reported = self.reported_field(sheet)
        actual = sheet.value(reported)
        expected = actual / math.exp(evaluation.residual)
        deviation = actual / expected - 1.0
        others = [f for f in evaluation.fields if f != reported]
        note = self.reading_note(sheet)
        message = (f"{self.describe(sheet, evaluation)}: {reported} is {deviation:+.1%} off the "
                   f"value the other fields give; {allowed_text(evaluation)}"
                   + (f" ({note})" if note else ""))
        finding = sheet.finding(self, self.severity(sheet, evaluation),  # type: ignore[arg-type]
                                message, (reported, *others),
                                expected={reported: expected}, actual={reported: actual},
                                deviation=deviation)
        evaluation.finding = finding
        return finding


def allowed_text(evaluation: Evaluation) -> str:
    """The allowed interval on the same (linear) scale as the deviation: "allowed −0.5 % …
    +0.5 %"."""
    low = math.expm1(evaluation.low)
    high = math.expm1(evaluation.high)
    if abs(low + high) < 0.0005:
        return f"allowed ±{high:.1%}"
    return f"allowed {low:+.1%} … {high:+.1%}"
