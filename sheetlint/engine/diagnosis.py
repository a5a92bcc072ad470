"""Diagnosis: which usual slip on which given field explains a record's findings.

For a record with warnings or errors, every usual slip reading (:mod:`sheetlint.engine.causes`)
of every given field that a finding involves is tried by checking the record again with that
field corrected. A reading *explains* findings when they disappear and no new one appears; the
reading that explains the most (then the more usual slip) is the cause. Its findings become one:
the primary finding names the field to correct first, with its value under the reading as
``expected``, and the others are listed under it as consequences (DESIGN.md, Judgement 3: one
fault gives one primary finding with its consequences, not five findings with no cause).
A basis reading of a field whose basis the sheet does not state turns the finding into a warning
that asks for the basis to be stated.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from sheetlint.engine.causes import Slip, readings
from sheetlint.engine.core import (
    GIVEN,
    Finding,
    Known,
    Sheet,
    number_entries,
    own_sensitivity,
)
from sheetlint.fields import display
from sheetlint.relations.registry import relation_for

#: rules whose findings no slip of a value explains (they are about the file or the schema)
NOT_DIAGNOSED = frozenset({"value-range", "unknown-field", "duplicate-key", "stale-acceptance",
                           "unused-suppression"})
#: rules whose findings a reading must reconcile to count as an explanation: relations that
#: compare values (a table or band that a corrected value merely leaves, e.g. a power moved
#: under an efficiency table's range, is no evidence; such findings are grouped only as the
#: consequences of an explanation)
EVIDENCE = frozenset({"power-torque-speed", "synchronous-speed", "pole-count", "electrical-power",
                      "loss-balance", "emf-constant", "voltage-margin", "dq-operating-point",
                      "resistance-drop", "servo-constants", "reactance-band"})
#: bounds that a corrected value passes trivially count as evidence only for readings of the
#: fields they are sensitive to beyond scale: the voltage a point needs and the pull-out
#: margin tell an inductance on the wrong basis (L_d, L_q line-to-line read as phase)
EVIDENCE_FOR_FIELDS = {"voltage-limit": ("circuit.ld", "circuit.lq"),
                       "pull-out-margin": ("circuit.ld", "circuit.lq")}
#: safety findings stay on their own even when a slip would explain them: if the reading is
#: wrong, the hazard is real (DESIGN.md, Judgement 4: safety checks on the unsafe end)
SAFETY = frozenset({"overspeed-emf", "short-circuit-current"})
#: at most this many re-checks per record (a record with many faults gets the first ones)
MOST_RECHECKS = 80

Recheck = Callable[[dict[str, Known]], list[Finding]]
Key = tuple[str, tuple[str, ...]]


def _key(finding: Finding) -> Key:
    return finding.rule, finding.fields


def _loud(findings: list[Finding]) -> list[Finding]:
    return [f for f in findings if f.severity != "info"]


@dataclass(slots=True)
class _Explanation:
    slip: Slip
    removed: frozenset[Key]
    fields: tuple[str, ...] = ()  # every field the reading corrects (the slip's first)


#: fields a sheet writes together, in one unit and on one basis: a slip in one is usually a
#: slip in all (L_d and L_q both in µH labelled mH, both terminal to terminal)
FIELD_GROUPS: tuple[tuple[str, ...], ...] = (("circuit.ld", "circuit.lq"),)


def _candidates(sheet: Sheet, given: dict[str, Known],
                fields: dict[str, None]) -> list[tuple[tuple[str, ...], Slip]]:
    """(fields to correct, reading) pairs to try: each field alone, and each group of fields
    written together with the same reading for all of them."""
    out: list[tuple[tuple[str, ...], Slip]] = []
    for group in FIELD_GROUPS:
        if any(name in fields for name in group) and all(name in given for name in group):
            others = [{(round(s.factor, 9), s.text) for s in readings(sheet, name)}
                      for name in group[1:]]
            for slip in readings(sheet, group[0]):
                if all((round(slip.factor, 9), slip.text) in o for o in others):
                    out.append((group, slip))
    for name in fields:
        if name in given:
            out.extend(((name,), slip) for slip in readings(sheet, name))
    return out


def _given_fields(sheet: Sheet, name: str, out: dict[str, None], depth: int = 0) -> None:
    """The given fields a value rests on (itself when given)."""
    known = sheet.values.get(name)
    if known is None or depth > 6:
        return
    if known.origin == GIVEN:
        out.setdefault(name, None)
        return
    sensitivity = known.sensitivity
    if sensitivity is not None:
        for g in sensitivity:
            out.setdefault(g, None)
        return
    for source in known.inputs:
        _given_fields(sheet, source, out, depth + 1)


def _may_reconcile(evaluations: Any, names: tuple[str, ...], slip: Slip) -> bool:
    """A quick screen before a re-check: the products of powers that involve the corrected
    fields must all pass after the correction (their residuals move by c·ln(factor) exactly).
    A reading that leaves one failing, or breaks one that passed, cannot be the cause."""
    shift = math.log(slip.factor)
    for evaluation in evaluations:
        coefficients = evaluation.coefficients or {}
        c = sum(coefficients.get(name, 0.0) for name in names)
        if abs(c) < 1e-9:
            continue
        if evaluation.miss(evaluation.residual - c * shift) > 0:
            return False
    return True


def _givens_of(sheet: Sheet, finding: Finding) -> dict[str, None]:
    out: dict[str, None] = {}
    for name in finding.fields:
        _given_fields(sheet, name, out)
    return out


def _corrected(known: Known, slip: Slip, path: str) -> Known:
    return Known(slip.corrected(known.value), known.uncertainty, GIVEN, None, (), known.basis,
                 known.basis_stated, known.temperature, None, None, own_sensitivity(path))


def explain(sheet: Sheet, given: dict[str, Known], findings: list[Finding],
            recheck: Recheck, shown: Callable[[str], bool] = lambda rule: True) -> list[Finding]:
    """The findings with causes named and each slip's consequences grouped under it.

    Every rule's findings take part in finding the cause; ``shown`` says which rules' findings
    will be reported, and only those are grouped (a primary finding is always a shown one)."""
    loud = [f for f in _loud(findings) if f.rule not in NOT_DIAGNOSED]
    if not loud:
        return findings
    original = {_key(f) for f in _loud(findings)}
    fields: dict[str, None] = {}
    for finding in loud:
        for name in finding.fields:
            _given_fields(sheet, name, fields)
    explanations: list[_Explanation] = []
    budget = MOST_RECHECKS
    diagnosable = frozenset(k for k in original if k[0] not in NOT_DIAGNOSED)
    # the more usual slips first; once a reading explains every finding, a less usual one
    # could only be named beside it, so the search ends with that rank
    enough_at: int | None = None
    for names, slip in sorted(_candidates(sheet, given, fields), key=lambda c: c[1].rank):
        if budget <= 0 or (enough_at is not None and slip.rank > enough_at):
            break
        if not _may_reconcile(sheet.memo.get("evaluations", ()), names, slip):
            continue
        budget -= 1
        values = dict(given)
        for name in names:
            values[name] = _corrected(given[name], slip, name)
        if not all(math.isfinite(values[name].value) for name in names):
            continue
        try:
            remaining = _loud(recheck(values))
        except (ArithmeticError, ValueError):
            continue
        after = {_key(f) for f in remaining}
        if after - original:
            continue  # the reading breaks something that held
        if any(name in _givens_of(sheet, f) for f in remaining for name in names):
            continue  # a finding on the same field stays: the reading explains it only in part
        removed = frozenset(k for k in original - after if k[0] not in NOT_DIAGNOSED)
        if any(k[0] in EVIDENCE or any(n in EVIDENCE_FOR_FIELDS.get(k[0], ()) for n in names)
               for k in removed):
            explanations.append(_Explanation(slip, removed, names))
            if removed == diagnosable:
                enough_at = slip.rank
    if not explanations:
        return findings
    return _group(sheet, findings, explanations, shown)


def _group(sheet: Sheet, findings: list[Finding], explanations: list[_Explanation],
           shown: Callable[[str], bool]) -> list[Finding]:
    by_key = {_key(f): f for f in findings if f.severity != "info" and shown(f.rule)}
    grouped: set[Key] = set()
    out_primary: dict[Key, Finding] = {}
    # the widest explanations first, then the more usual slip
    explanations.sort(key=lambda e: (-len(e.removed), e.slip.rank))
    while explanations:
        best = explanations[0]
        removed = best.removed - grouped
        if not removed:
            explanations.pop(0)
            continue
        # every reading that explains exactly the same findings is named with it
        same = [e for e in explanations if e.removed == best.removed]
        explanations = [e for e in explanations if e.removed != best.removed]
        # in the findings' order, not the set's: the report must not depend on string hashing
        # (PYTHONHASHSEED), so that runs, serial or in workers, write the same bytes
        covered = [f for k, f in by_key.items() if k in removed]
        primary = _primary(best.slip.field, covered)
        if primary is None:
            continue
        _name_cause(sheet, primary, [e.slip for e in same], best.fields)
        consequences = [f for f in covered if f is not primary and f.rule not in SAFETY]
        primary.consequences = [f"{f.rule}: {f.message}" for f in consequences]
        for f in covered:
            if f.rule in SAFETY and f is not primary:
                f.cause = (f"{primary.cause} (if so, this warning goes too; until the "
                           "sheet is corrected it stands)")
        grouped.update(k for k in removed if k[0] not in SAFETY or by_key.get(k) is primary)
        out_primary[_key(primary)] = primary
    kept = []
    for f in findings:
        key = _key(f)
        if f.severity != "info" and key in grouped and key not in out_primary:
            continue
        kept.append(f)
    return kept


def _primary(field: str, candidates: list[Finding]) -> Finding | None:
    """The finding that speaks for the slip: one naming the field, the loudest first."""
    if not candidates:
        return None
    rank = {"error": 0, "warning": 1, "info": 2}

    def order(finding: Finding) -> int:
        relation = relation_for(finding.rule)
        return relation.order if relation is not None else 100

    # a finding naming the field, the loudest, of the most basic relation (identities first);
    # a safety finding speaks for a slip only when nothing else does
    candidates.sort(key=lambda f: (f.rule in SAFETY, field not in f.fields, rank[f.severity],
                                   order(f), f.rule))
    return candidates[0]


def _name_cause(sheet: Sheet, primary: Finding, slips: list[Slip],
                corrected: tuple[str, ...] = ()) -> None:
    first = slips[0]
    causes = [s.cause() for s in slips]
    if len(corrected) > 1:  # one reading of fields written together
        causes = [c.replace(f"{first.field}:", " and ".join(corrected) + ":", 1)
                  if c.startswith(first.field) else c for c in causes]
    primary.cause = "; or ".join(dict.fromkeys(causes))
    known = sheet.get(first.field)
    fields = [first.field, *(f for f in primary.fields if f != first.field)]
    primary.fields = tuple(fields)
    if known is not None:
        primary.expected = {first.field: display(first.field, first.corrected(known.value))}
        primary.actual = {first.field: known.text or display(first.field, known.value)}
        primary.deviation = first.factor - 1.0
        primary.expected_values = number_entries({first.field: first.corrected(known.value)},
                                                 None)
        primary.actual_values = number_entries({first.field: known.value}, None)
        if all(s.basis for s in slips) and not known.basis_stated:
            primary.severity = "warning"
            primary.message += (f"; the sheet does not state the basis of {first.field}: "
                                "please state it")
    if sheet.locate is not None:
        location = sheet.locate(first.field)
        if location:
            primary.location = location
