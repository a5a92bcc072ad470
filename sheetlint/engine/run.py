"""The pipeline for one record and one file: validate, build the sheet, screen, derive, check.

intake → model → engine → report, in one direction. Nothing here formats output.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cache
from typing import Any

from pydantic import ValidationError

from sheetlint.coverage import sheet_coverage
from sheetlint.engine.build import build_sheet
from sheetlint.engine.core import (
    DERIVED,
    ESTIMATE,
    GIVEN,
    SEVERITY_RANK,
    Finding,
    Known,
    Relation,
    Settings,
    Sheet,
)
from sheetlint.engine.diagnosis import explain
from sheetlint.engine.monomial import Evaluation, Monomial
from sheetlint.fields import display_quantity
from sheetlint.intake.records import RawRecord
from sheetlint.model import MachineRecord
from sheetlint.relations.registry import (
    all_relations,
    relation_for,
    relations_where,
    relations_with,
)

MAX_DERIVE_ROUNDS = 12


@dataclass(slots=True)
class RecordResult:
    id: str
    error: str | None = None
    findings: list[Finding] = field(default_factory=list)
    derived: dict[str, Known] = field(default_factory=dict)
    sheet: Sheet | None = None
    index: int | None = None
    #: which rules checked the record and which fields the others miss (sheetlint.coverage)
    coverage: dict[str, Any] | None = None


def validation_message(exc: ValidationError, data: Any) -> str:
    """One line per problem: field path, what is wrong, the offending text."""
    parts = []
    for err in exc.errors()[:5]:
        path = _loc_text(err.get("loc", ()))
        msg = err.get("msg", "invalid").removeprefix("Value error, ")
        found = err.get("input")
        shown = ""
        if err.get("type") == "missing":
            msg = "required field is missing"
        elif isinstance(found, (str, int, float)) and not isinstance(found, bool):
            text = str(found)
            if text not in msg:
                shown = f" (found '{text[:60]}')"
        parts.append(f"{path or '(record)'}: {msg}{shown}")
    more = len(exc.errors()) - 5
    if more > 0:
        parts.append(f"... and {more} more")
    return "; ".join(parts)


@cache
def _record_validator() -> Any:
    import jsonschema

    from sheetlint.model import file_json_schema

    schema = file_json_schema()
    record_schema = {"$schema": schema["$schema"], "$ref": "#/$defs/MachineRecord",
                     "$defs": schema["$defs"]}
    return jsonschema.Draft202012Validator(record_schema)


def schema_message(data: Any) -> str | None:
    """Structural problems found by the committed JSON Schema, each with its field path."""
    try:
        errors = sorted(_record_validator().iter_errors(data), key=lambda e: list(e.path))
    except Exception:  # a schema engine failure must not hide the record's own problem
        return None
    if not errors:
        return None
    parts = []
    for err in errors[:5]:
        path = _loc_text(tuple(err.absolute_path))
        found = err.instance
        shown = repr(found) if isinstance(found, (str, int, float, bool)) else type(found).__name__
        if err.validator == "required":
            parts.append(f"{path or '(record)'}: {err.message}")
        else:
            parts.append(f"{path or '(record)'}: {err.message[:120]} (found {shown[:60]})")
    return "; ".join(parts)


def _loc_text(loc: tuple[Any, ...]) -> str:
    out = ""
    for part in loc:
        if isinstance(part, int):
            out += f"[{part}]"
        elif str(part).startswith(("function-", "tagged-union")):
            continue
        else:
            out += ("." if out else "") + str(part)
    return out


def check_record(raw: RawRecord, settings: Settings | None = None) -> RecordResult:
    """Validate and check one raw record; never raises for bad input."""
    data = raw.data
    record_id = str(data.get("id")) if isinstance(data, dict) and data.get("id") else None
    label = record_id or (f"records[{raw.index}]" if raw.index is not None else "(record)")
    if not isinstance(data, dict):
        return RecordResult(label, f"expected a mapping, found {type(data).__name__}",
                            index=raw.index)
    try:
        record = MachineRecord.model_validate(data)
    except ValidationError as exc:
        content_only = all(e.get("type") == "value_error" for e in exc.errors())
        message = (validation_message(exc, data) if content_only else
                   schema_message(data) or validation_message(exc, data))
        return RecordResult(label, message, index=raw.index)
    return run_engine(record, settings, raw.locate if raw.has_locations else None, raw.index,
                      raw.duplicates)


def run_engine(record: MachineRecord, settings: Settings | None = None, locate: Any = None,
               index: int | None = None, duplicates: tuple[Any, ...] = ()) -> RecordResult:
    settings = settings or Settings()
    sheet, notes = build_sheet(record, settings, locate)
    if duplicates:  # keys written twice in the file (relations/document.py reports them)
        sheet.attributes["document.duplicate_keys"] = duplicates
    given = dict(sheet.values)
    attributes = dict(sheet.attributes)
    # every rule is checked and diagnosed, so that a cause reconciles the whole record; rules
    # left out by the selection are dropped afterwards
    everything = settings.every_rule()

    def recheck(values: dict[str, Known]) -> list[Finding]:
        return check_sheet(Sheet(record.id, values, dict(attributes), everything), everything)

    findings = explain(sheet, given, check_sheet(sheet, everything), recheck,
                       settings.enabled)
    findings = [*notes, *findings]
    _estimate(sheet, relations_with("estimate"))
    if settings.narrowed:
        findings = [f for f in findings if settings.enabled(f.rule) or f.rule == "unreadable"]
    _apply_acceptances(sheet, findings)
    if settings.severity:
        _apply_severities(settings.severity, findings)
    findings.sort(key=lambda f: (-SEVERITY_RANK[f.severity], f.rule, f.fields))
    derived = {name: k for name, k in sheet.values.items() if k.origin != GIVEN}
    return RecordResult(record.id, None, findings, derived, sheet, index,
                        sheet_coverage(sheet, findings) if settings.coverage else None)


def check_sheet(sheet: Sheet, settings: Settings) -> list[Finding]:
    """Screen, derive to a fixed point and check one sheet: its findings, causes not yet named."""
    relations = all_relations()
    findings: list[Finding] = []
    for relation in relations_with("screen"):
        findings.extend(relation.screen(sheet))  # type: ignore[attr-defined]
    derive(sheet, relations)
    evaluations: list[Evaluation] = []
    checked = relations_where(
        ("checked", settings.only, settings.skip),
        lambda r: _checks(r) and settings.enabled(r.rule))
    for relation in checked:
        check_relation(relation, sheet, findings, evaluations)
    findings.extend(e.finding for e in evaluations if e.finding is not None)
    findings.extend(sheet.findings)
    if any(f.severity != "info" for f in findings):
        sheet.memo["evaluations"] = evaluations  # for the diagnosis's quick screen
    return findings


def _checks(relation: Relation) -> bool:
    """True for a relation that checks anything (a monomial, or its own ``check``)."""
    return isinstance(relation, Monomial) or type(relation).check is not Relation.check


#: arithmetic that values far outside any machine's range can still provoke
NUMERIC_FAILURES = (ArithmeticError, ValueError)


def check_relation(relation: Any, sheet: Sheet, findings: list[Finding],
                   evaluations: list[Evaluation]) -> None:
    """Check one relation on a derived sheet: its findings go to ``findings``; a monomial's
    evaluations go to ``evaluations`` (their findings are added after the cause diagnosis)."""
    try:
        if isinstance(relation, Monomial):
            evaluations.extend(relation.evaluations(sheet))
            if type(relation).extra_findings is not Monomial.extra_findings:
                findings.extend(relation.extra_findings(sheet))
            return
        findings.extend(relation.check(sheet))
    except NUMERIC_FAILURES as exc:
        findings.append(_not_evaluated(sheet, relation, exc))


def _not_evaluated(sheet: Sheet, relation: Any, exc: BaseException) -> Finding:
    return sheet.finding(relation, "warning", f"{relation.title}: could not be evaluated on "
                         f"these values ({type(exc).__name__}); check their magnitudes",
                         relation.fields)


def derive(sheet: Sheet, relations: list[Any]) -> None:
    """Run the relations' ``derive`` until no new value appears (a fixed point).

    Rounds go through the relations in order. A relation is called again only when a field it
    reads (``derive_inputs``) appeared since its last call; relations that declare no inputs
    are called every round. A relation whose ``derive_outputs`` are all known already is not
    called (with operating points listed, a per-point relation always is).
    """
    values = sheet.values
    keys = values.keys()
    plan = _derive_plan(tuple(relations))
    has_points = bool(sheet.attributes.get("points.count"))
    due = [True] * len(plan.steps)  # a field the relation reads appeared since its last call
    for _ in range(MAX_DERIVE_ROUNDS):
        grew = False
        for index, (relation, outputs, always, per_point) in enumerate(plan.steps):
            if not due[index]:
                continue
            due[index] = always
            if outputs is not None and keys >= outputs and not (per_point and has_points):
                continue
            try:
                derivations = list(relation.derive(sheet))
            except NUMERIC_FAILURES:
                continue  # the check of the same relation reports it
            for d in derivations:
                name = d.field
                if name in values or not math.isfinite(d.value):
                    continue
                values[name] = Known(
                    d.value, d.uncertainty, ESTIMATE if d.estimate else DERIVED, relation.rule,
                    d.inputs, None, False, d.temperature, None, d.note, d.sensitivity,
                    d.sources)
                grew = True
                for reader in plan.readers.get(name, ()):
                    due[reader] = True
                if name.startswith("points["):
                    for reader in plan.point_readers:
                        due[reader] = True
        if not grew:
            return


def _estimate(sheet: Sheet, relations: list[Any]) -> None:
    """Rules of thumb fill what the sheet lacks, after every check: estimates check nothing."""
    values = sheet.values
    for relation in relations:
        estimate = getattr(relation, "estimate", None)
        if estimate is None:
            continue
        try:
            estimates = list(estimate(sheet))
        except NUMERIC_FAILURES:
            continue
        for d in estimates:
            if d.field not in values and math.isfinite(d.value):
                values[d.field] = Known(d.value, d.uncertainty, ESTIMATE, relation.rule,
                                        d.inputs, note=d.note)


@dataclass(frozen=True, slots=True)
class DerivePlan:
    """The relations that derive anything, in order, and which of them read each field."""

    #: (relation, the fields it fills or None if unknown, called every round, per point)
    steps: tuple[tuple[Any, frozenset[str] | None, bool, bool], ...]
    readers: dict[str, tuple[int, ...]]  # field -> steps whose ``derive`` reads it
    point_readers: tuple[int, ...]  # per-point steps: they read every ``points[i].`` field


@cache
def _derive_plan(relations: tuple[Any, ...]) -> DerivePlan:
    """The derive plan of a list of relations (built once per list)."""
    steps = []
    readers: dict[str, list[int]] = {}
    for relation in relations:
        if type(relation).derive is Relation.derive:
            continue
        inputs = getattr(relation, "derive_inputs", None)
        outputs = getattr(relation, "derive_outputs", None)
        if isinstance(relation, Monomial) and type(relation).derive is Monomial.derive:
            if inputs is None:
                inputs = tuple(relation.terms)
            if outputs is None:
                outputs = (relation.derive_fields if relation.derive_fields is not None
                           else tuple(relation.terms))
        if outputs is not None and not outputs:
            continue  # fills nothing
        for name in inputs or ():
            readers.setdefault(name, []).append(len(steps))
        steps.append((relation, frozenset(outputs) if outputs is not None else None,
                      inputs is None, bool(getattr(relation, "per_point", False))))
    return DerivePlan(tuple(steps), {k: tuple(v) for k, v in readers.items()},
                      tuple(i for i, step in enumerate(steps) if step[3]))


def _apply_acceptances(sheet: Sheet, findings: list[Finding]) -> None:
    """Mark the findings the record's ``accepted`` list covers (rule, and every listed field
    among the finding's fields) with the reason; an entry that covers none is stale."""
    entries = sheet.attr("accepted") or []
    if not entries:
        return
    used: set[int] = set()
    for f in findings:
        for i, (rule, reason, fields) in enumerate(entries):
            if rule == f.rule and all(name in f.fields for name in fields):
                f.accepted = reason
                used.add(i)
                break
    marker = relation_for("stale-acceptance")
    for i, (rule, _reason, fields) in enumerate(entries):
        if i not in used:
            what = f"'{rule}'" + (f" on {', '.join(fields)}" if fields else "")
            findings.append(sheet.finding(marker, "info", f"the acceptance of {what} no longer "
                                          "matches any finding; remove it", ("accepted",)))


def _apply_severities(levels: dict[str, str], findings: list[Finding]) -> None:
    """The configuration's ``severity`` table: each listed rule's findings take its level."""
    for f in findings:
        level = levels.get(f.rule)
        if level is not None:
            f.severity = level  # type: ignore[assignment]


def derived_payload(derived: dict[str, Known]) -> dict[str, Any]:
    """The ``derived`` object of the JSON output contract."""
    out: dict[str, Any] = {}
    for name, k in derived.items():
        value, unit = display_quantity(name, k.value)
        entry: dict[str, Any] = {"value": float(f"{value:.6g}"), "unit": unit,
                                 "estimate": k.origin == ESTIMATE, "rule": k.rule,
                                 "from": list(k.inputs)}
        if k.note:
            entry["note"] = k.note
        out[name] = entry
    return out
