"""Value types of the engine: known quantities with provenance, findings, relations.

Everything inside the engine is an SI float. A :class:`Known` carries the value, its relative
uncertainty (from how it was written, or propagated), where it came from, and its log-sensitivity
to the given fields (so that a slip on one given field can be traced through derived values).
"""

from __future__ import annotations

import re
from collections.abc import Callable, Iterator, Mapping
from dataclasses import dataclass, field
from functools import cache
from types import MappingProxyType
from typing import Any, ClassVar, Literal

from sheetlint.fields import display, display_quantity

Severity = Literal["error", "warning", "info"]
SEVERITY_RANK: dict[str, int] = {"info": 0, "warning": 1, "error": 2}

GIVEN = "given"
DERIVED = "derived"
ESTIMATE = "estimate"


#: a value's dependence on other known values: ((known, exponent), ...) for a monomial
Sources = tuple[tuple["Known", float], ...]

_PENDING: Any = object()  # sensitivity not resolved yet


class Known:
    """One known quantity of a sheet, in SI units.

    ``uncertainty`` is relative (0.005 = ±0.5 %). ``sensitivity`` maps given fields to the
    exponent with which this value depends on them (``{"rated.power": 1.0, "rated.speed": -1.0}``
    for a torque derived from P/ω); ``None`` where the dependence is not a monomial. A derived
    value states its ``sources`` instead and its sensitivity is resolved from them when first
    asked for: only the cause diagnosis of a failing relation needs it.
    """

    __slots__ = ("_sensitivity", "_text", "_written", "basis", "basis_stated", "inputs", "note",
                 "origin", "rule", "sources", "temperature", "uncertainty", "value")

    def __init__(
        self,
        value: float,
        uncertainty: float = 0.0,
        origin: str = GIVEN,
        rule: str | None = None,
        inputs: tuple[str, ...] = (),
        basis: str | None = None,
        basis_stated: bool = False,
        temperature: float | None = None,  # reference temperature of the value, kelvin
        text: str | None = None,
        note: str | None = None,
        sensitivity: Mapping[str, float] | None = None,
        sources: Sources | None = None,
        written: Any = None,  # what ``text`` is made of when first asked: ``.text`` and ``.unit``
    ) -> None:
        self.value = value
        self.uncertainty = uncertainty
        self.origin = origin
        self.rule = rule
        self.inputs = inputs
        self.basis = basis
        self.basis_stated = basis_stated
        self.temperature = temperature
        self._text = text
        self._written = written
        self.note = note
        self.sources = sources
        self._sensitivity = _PENDING if sources is not None else sensitivity

    @property
    def text(self) -> str | None:
        """The value as written on the sheet, with its unit (None for a derived value)."""
        text = self._text
        if text is None and self._written is not None:
            written = self._written
            text = self._text = (f"{written.text} {written.unit}" if written.unit
                                 else written.text)
        return text

    @property
    def sensitivity(self) -> Mapping[str, float] | None:
        found = self._sensitivity
        if found is _PENDING:
            found = self._sensitivity = resolve_sensitivity(self.sources or ())
        return found

    @sensitivity.setter
    def sensitivity(self, value: Mapping[str, float] | None) -> None:
        self._sensitivity = value

    @property
    def is_estimate(self) -> bool:
        return self.origin == ESTIMATE

    @property
    def is_given(self) -> bool:
        return self.origin == GIVEN

    def __repr__(self) -> str:
        return (f"Known({self.value!r}, {self.uncertainty!r}, {self.origin!r}, rule={self.rule!r}"
                f", basis={self.basis!r}, temperature={self.temperature!r})")


@cache
def own_sensitivity(path: str) -> Mapping[str, float]:
    """The sensitivity of a given value to itself, ``{path: 1.0}``: one mapping per field
    path, shared by every sheet, so nothing may change it (a plain dict, since results are
    pickled for worker processes)."""
    return {path: 1.0}


def resolve_sensitivity(sources: Sources) -> dict[str, float] | None:
    """Sensitivity of ``prod(known_i ** a_i)`` to the given fields; None if one is unknown."""
    out: dict[str, float] = {}
    for known, exponent in sources:
        inner = known.sensitivity
        if inner is None:
            return None
        for g, s in inner.items():
            out[g] = out.get(g, 0.0) + exponent * s
    return {g: s for g, s in out.items() if abs(s) > 1e-12}


@dataclass(slots=True)
class Derivation:
    """A value a relation can fill in: ``field = value`` from ``inputs``."""

    field: str
    value: float
    uncertainty: float
    inputs: tuple[str, ...]
    estimate: bool = False
    note: str | None = None
    sensitivity: dict[str, float] | None = None
    temperature: float | None = None  # kelvin, reference temperature of the derived value
    sources: Sources | None = None  # instead of ``sensitivity``: resolved when needed


@dataclass(slots=True)
class Finding:
    """A plain result value; reporters format it, nothing else computes from it."""

    rule: str
    severity: Severity
    message: str
    fields: tuple[str, ...] = ()
    expected: dict[str, str] = field(default_factory=dict)
    actual: dict[str, str] = field(default_factory=dict)
    deviation: float | None = None
    cause: str | None = None
    source: str = ""
    location: dict[str, Any] | None = None
    accepted: str | None = None  # the reason, when an acceptance in the record covers it
    #: the numbers behind ``expected``/``actual``: field -> {"value": float, "unit": str}
    expected_values: dict[str, dict[str, Any]] = field(default_factory=dict)
    actual_values: dict[str, dict[str, Any]] = field(default_factory=dict)
    #: the findings one slip also explains, listed under the finding that names it
    consequences: list[str] = field(default_factory=list)

    def to_dict(self) -> dict[str, Any]:
        out: dict[str, Any] = {
            "rule": self.rule,
            "severity": self.severity,
            "message": self.message,
            "fields": list(self.fields),
            "expected": dict(self.expected),
            "actual": dict(self.actual),
            "deviation": None if self.deviation is None else round(self.deviation, 6),
            "cause": self.cause,
            "source": self.source,
            "location": self.location,
            "expected_values": {k: dict(v) for k, v in self.expected_values.items()},
            "actual_values": {k: dict(v) for k, v in self.actual_values.items()},
        }
        if self.accepted is not None:
            out["accepted"] = self.accepted
        if self.consequences:
            out["consequences"] = list(self.consequences)
        return out


_NO_OPTIONS: Mapping[str, Any] = MappingProxyType({})


@dataclass(slots=True)
class Settings:
    """Engine settings merged from defaults, configuration files and the command line."""

    only: frozenset[str] | None = None
    skip: frozenset[str] = frozenset()
    options: dict[str, dict[str, Any]] = field(default_factory=dict)
    #: rule -> severity that replaces the rule's own (``severity`` in the configuration)
    severity: dict[str, str] = field(default_factory=dict)
    #: work out each record's coverage (JSON output, ``--notes``); about 5 % of engine time
    coverage: bool = False
    #: False when no report of the run shows info findings: their lines are not looked up
    locate_info: bool = True

    def option(self, rule: str, name: str, default: Any) -> Any:
        return self.options.get(rule, _NO_OPTIONS).get(name, default)

    def enabled(self, rule: str) -> bool:
        if rule in self.skip:
            return False
        return self.only is None or rule in self.only

    def every_rule(self) -> Settings:
        """The same options with every rule enabled: the diagnosis reads the whole record."""
        return Settings(options=self.options)

    @property
    def narrowed(self) -> bool:
        """True when ``only`` or ``skip`` may leave a rule out."""
        return self.only is not None or bool(self.skip)


class Sheet:
    """The engine's view of one record: known SI values plus non-physical attributes."""

    __slots__ = ("attributes", "findings", "locate", "located", "memo", "record_id", "settings",
                 "values")

    def __init__(
        self,
        record_id: str,
        values: dict[str, Known],
        attributes: Mapping[str, Any],
        settings: Settings | None = None,
        locate: Callable[[str], dict[str, Any] | None] | None = None,
    ) -> None:
        self.record_id = record_id
        self.values = values
        self.attributes = dict(attributes)
        self.settings = settings or Settings()
        self.locate = locate
        self.located: dict[str, dict[str, Any] | None] = {}
        self.findings: list[Finding] = []
        #: work that relations of one family share on this sheet, keyed by the family
        self.memo: dict[str, Any] = {}

    # --- access -------------------------------------------------------------------------
    def get(self, name: str) -> Known | None:
        return self.values.get(name)

    def has(self, *names: str) -> bool:
        values = self.values
        for n in names:
            if n not in values:
                return False
        return True

    def value(self, name: str) -> float:
        return self.values[name].value

    def attr(self, name: str, default: Any = None) -> Any:
        return self.attributes.get(name, default)

    def usable(self, rule: str, *names: str, allow_estimates: bool = False) -> bool:
        """All ``names`` known, none derived by ``rule`` itself, none an estimate unless allowed."""
        values = self.values
        for n in names:
            k = values.get(n)
            if k is None or k.rule == rule:
                return False
            if k.origin == ESTIMATE and not allow_estimates:
                return False
        return True

    def given(self, name: str) -> bool:
        k = self.values.get(name)
        return k is not None and k.origin == GIVEN

    def option(self, rule: str, name: str, default: Any) -> Any:
        return self.settings.option(rule, name, default)

    def finding(
        self,
        relation: Relation,
        severity: Severity,
        message: str,
        fields: tuple[str, ...] | list[str],
        expected: Mapping[str, float] | None = None,
        actual: Mapping[str, float] | None = None,
        deviation: float | None = None,
        cause: str | None = None,
        source: str | None = None,
        expected_text: Mapping[str, str] | None = None,
        actual_text: Mapping[str, str] | None = None,
    ) -> Finding:
        """Build a finding; SI values in ``expected``/``actual`` are shown in display units."""
        exp = {k: display(k, v) for k, v in expected.items()} if expected else {}
        act = {k: display(k, v) for k, v in actual.items()} if actual else {}
        if expected_text:
            exp.update(expected_text)
        if actual_text:
            act.update(actual_text)
        exp_values = number_entries(expected, expected_text)
        act_values = number_entries(actual, actual_text)
        fields = tuple(fields)
        location = None
        if self.locate is not None and (severity != "info" or self.settings.locate_info
                                        or relation.rule in self.settings.severity):
            located = self.located
            for f in fields:
                if f in located:
                    location = located[f]
                else:
                    location = located[f] = self.locate(f)
                if location:
                    break
        return Finding(relation.rule, severity, message, fields, exp, act, deviation, cause,
                       source if source is not None else relation.source, location,
                       expected_values=exp_values, actual_values=act_values)


#: a number with an optional comparison in front and a unit after it: "≤ 1446 r/min"
_NUMBER_TEXT = re.compile(r"^\s*(?P<bound>[≤≥<>]=?)?\s*(?P<value>[-+−]?\d+(?:\.\d*)?"
                          r"(?:[eE][-+]?\d+)?)\s*(?P<unit>.*?)\s*$")


def number_entries(si_values: Mapping[str, float] | None,
             texts: Mapping[str, str] | None) -> dict[str, dict[str, Any]]:
    """``{"value", "unit"}`` per field for the JSON output: SI values in their display unit;
    a text given instead is read when it is one number with a unit (``"≤ 1446 r/min"`` adds
    ``"bound": "≤"``) and left out otherwise."""
    out: dict[str, dict[str, Any]] = {}
    for name, si_value in (si_values or {}).items():
        value, unit = display_quantity(name, si_value)
        if name.endswith("efficiency"):
            value, unit = value * 100.0, "%"
        out[name] = {"value": float(f"{value:.6g}"), "unit": unit}
    for name, text in (texts or {}).items():
        match = _NUMBER_TEXT.match(text)
        if match is None:
            out.pop(name, None)
            continue
        entry: dict[str, Any] = {"value": float(match["value"].replace("−", "-")),
                                 "unit": match["unit"]}
        if match["bound"]:
            entry["bound"] = match["bound"]
        out[name] = entry
    return out


@dataclass(frozen=True, slots=True)
class RuleOption:
    """A tunable of a rule, set as ``tuning.<rule>.<name>`` in a configuration file.

    ``kind`` is ``number`` (a finite number) or ``band`` (two numbers, low ≤ high); the
    configuration is checked against it when it is read, so a relation can trust the value.
    ``default`` is shown in the rule's documentation (the relation passes the same default to
    ``sheet.option``, or one of its tables when the text says so).
    """

    kind: Literal["number", "band"]
    default: str
    meaning: str


class Relation:
    """A physical relation between fields of a sheet.

    Subclasses declare their identity as class attributes and implement ``derive`` (values the
    relation can fill in) and ``check`` (findings when the sheet contradicts it). The class
    docstring is the rule's documentation (``sheetlint rules RULE``): what it checks, why it
    matters, an example that fails, the fix, references.
    """

    rule: ClassVar[str]
    title: ClassVar[str]
    equation: ClassVar[str]
    fields: ClassVar[tuple[str, ...]] = ()
    kind: ClassVar[str] = "exact"  # exact | bound | band | model | table | correction | safety
    severity_policy: ClassVar[str] = ""
    source: ClassVar[str] = ""
    status: ClassVar[str] = "established"  # established | trial
    #: relations are run in ascending order of ``order`` within each derive round and check
    order: ClassVar[int] = 50
    #: the fields ``derive`` reads; the engine calls it again only when one of them appears.
    #: None (the default) means unknown: called in every round.
    derive_inputs: ClassVar[tuple[str, ...] | None] = None
    #: the fields ``derive`` can fill in (``rated.`` names stand for every point's too); the
    #: engine skips the call when all are known. None (the default) means unknown: always called.
    #: A monomial with the standard ``derive`` gets its ``derive_fields`` (or terms) here.
    derive_outputs: ClassVar[tuple[str, ...] | None] = None
    #: the options the configuration may set for this rule (read with ``sheet.option``)
    options: ClassVar[Mapping[str, RuleOption]] = MappingProxyType({})

    def derive(self, sheet: Sheet) -> Iterator[Derivation]:
        return iter(())

    def check(self, sheet: Sheet) -> Iterator[Finding]:
        return iter(())


def sources_of(parts: Mapping[str, float], sheet: Sheet) -> Sources | None:
    """The known values of ``parts`` with their exponents, for a derived value's ``sources``."""
    values = sheet.values
    out = []
    for name, exponent in parts.items():
        known = values.get(name)
        if known is None:
            return None
        out.append((known, exponent))
    return tuple(out)
