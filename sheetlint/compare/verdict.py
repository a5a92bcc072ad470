"""Verdicts, ranking and the questions to send back to each vendor.

Verdict per offer: ``not_compliant`` when any requirement is ``not_met``; else ``incomplete``
when any is ``unknown``; else ``compliant``. Ranking: by verdict (compliant, incomplete,
not compliant), then by one figure the user names, lower first unless asked otherwise
(default: losses at the first duty point) -- never by a weighted score.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

from sheetlint.compare.evaluate import MET, NOT_MET, UNKNOWN, OfferEvaluation
from sheetlint.compare.requirement import Requirement
from sheetlint.engine.core import Finding, Sheet
from sheetlint.engine.run import RecordResult
from sheetlint.fields import BASES, KINDS, spec_for

COMPLIANT, NOT_COMPLIANT, INCOMPLETE = "compliant", "not_compliant", "incomplete"
VERDICT_ORDER = {COMPLIANT: 0, INCOMPLETE: 1, NOT_COMPLIANT: 2}
DEFAULT_RANK_FIGURE = "duty[0].losses"

#: what each basis question asks, per kind
_BASIS_WORDS = {
    "voltage": "line or phase, rms or peak",
    "emf_constant": "line or phase, rms or peak",
    "current": "rms or peak",
    "torque_constant": "per rms or per peak ampere",
    "resistance": "per phase, terminal to terminal, or per delta branch",
    "inductance": "per phase or terminal to terminal",
}


@dataclass(slots=True)
class Offer:
    """One offer: where it came from, its check, and its evaluation (None when unreadable)."""

    path: str
    id: str
    result: RecordResult | None
    raw: Any = None
    evaluation: OfferEvaluation | None = None
    error: str | None = None
    verdict: str = INCOMPLETE
    questions: list[str] = field(default_factory=list)
    rank: int | None = None
    rank_value: float | None = None


def verdict_of(evaluation: OfferEvaluation | None) -> str:
    """``not_compliant`` if any requirement is not met, else ``incomplete`` if any is unknown,
    else ``compliant``; an offer that could not be read is ``incomplete``."""
    if evaluation is None:
        return INCOMPLETE
    statuses = {r.status for r in evaluation.results}
    if NOT_MET in statuses:
        return NOT_COMPLIANT
    if UNKNOWN in statuses:
        return INCOMPLETE
    return COMPLIANT


def figure_value(offer: Offer, name: str) -> float | None:
    """An SI figure of an offer by name: a sheet field or a computed figure (duty[0].losses)."""
    if offer.evaluation is not None and name in offer.evaluation.extra_figures:
        return offer.evaluation.extra_figures[name][0]
    if offer.result is not None and offer.result.sheet is not None:
        known = offer.result.sheet.values.get(name)
        if known is not None and math.isfinite(known.value):
            return known.value
    return None


def rank_offers(offers: list[Offer], figure: str = DEFAULT_RANK_FIGURE,
                descending: bool = False) -> list[Offer]:
    """Offers in ranking order (each gets ``rank`` 1.. and ``rank_value``): by verdict, then by
    ``figure`` (lower first, or higher first with ``descending``); offers without the figure
    come last within their verdict, then by path and id, so the order is reproducible."""
    for offer in offers:
        offer.rank_value = figure_value(offer, figure)

    def key(offer: Offer) -> tuple[Any, ...]:
        value = offer.rank_value
        missing = value is None
        number = 0.0 if value is None else (-value if descending else value)
        return (VERDICT_ORDER[offer.verdict], missing, number, offer.path, offer.id)

    ordered = sorted(offers, key=key)
    for position, offer in enumerate(ordered, start=1):
        offer.rank = position
    return ordered


def _finding_question(finding: Finding) -> str:
    text = f"Please clarify ({finding.rule}, {', '.join(finding.fields)}): {finding.message}"
    if finding.cause:
        text += f" Possible cause: {finding.cause}."
    return text


def _raw_has(raw: Any, dotted: str, qualifier: str) -> bool:
    node = raw
    for part in dotted.split("."):
        if not isinstance(node, dict):
            return False
        node = node.get(part)
    return isinstance(node, dict) and qualifier in node


def questions_for(offer: Offer, req: Requirement | None) -> list[str]:
    """The clarifications to send to the vendor, each once, in a fixed order: contradictions
    and warnings of the check, fields a requirement needed, unstated bases and temperatures
    that mattered, figures within 1 % of a limit."""
    out: list[str] = []
    result, evaluation = offer.result, offer.evaluation
    if result is None or result.sheet is None:
        return [f"The offer could not be read ({offer.error}); please send it as a datasheet "
                "or a table of values"] if offer.error else []
    sheet: Sheet = result.sheet
    for finding in result.findings:
        if finding.severity in ("error", "warning") and finding.accepted is None:
            out.append(_finding_question(finding))
    if evaluation is None:
        return list(dict.fromkeys(out))
    wanted_by: dict[tuple[tuple[str, ...], bool], list[str]] = {}
    for r in evaluation.results:
        if r.status == UNKNOWN and r.needs and r.requirement != "consistency":
            wanted = tuple(n for n in r.needs if "(requirement)" not in n)
            if wanted:
                wanted_by.setdefault((wanted, r.contradicted), []).append(r.requirement)
    for (wanted, contradicted), requirements in wanted_by.items():
        if contradicted:
            out.append(f"Please correct or confirm {', '.join(wanted)}: the sheet contradicts "
                       f"it, and {', '.join(requirements)} cannot be decided until it is "
                       "settled")
        else:
            out.append(f"Please state {', '.join(wanted)} (needed to decide "
                       f"{', '.join(requirements)})")
    used = evaluation.used_fields
    for name in sorted(used):
        known = sheet.values.get(name)
        spec = spec_for(name)
        if known is None or not known.is_given or spec is None:
            continue
        if spec.kind in BASES and not known.basis_stated and name not in (
                "rated.voltage", "rated.current"):
            out.append(f"Please state the basis of {name} ({_BASIS_WORDS[spec.kind]}); "
                       f"{KINDS[spec.kind].display_unit} read as {BASES[spec.kind][0]}")
    raw = offer.raw
    if "emf.constant" in used and sheet.values.get("emf.constant") is not None and \
            sheet.values["emf.constant"].is_given and not _raw_has(raw, "emf",
                                                                   "magnet_temperature"):
        out.append("Please state the magnet temperature emf.constant refers to "
                   "(20 °C was assumed)")
    if "circuit.resistance" in used and sheet.values["circuit.resistance"].is_given and \
            not _raw_has(raw, "circuit.resistance", "temperature"):
        out.append("Please state the winding temperature circuit.resistance refers to "
                   "(20 °C was assumed)")
    for name in evaluation.site.assumed:
        if name == "rated.magnet_temperature":
            out.append("Please state rated.magnet_temperature (the magnet temperature at the "
                       "rated point); the reference temperature of the rise class was assumed")
        elif name == "machine.ambient":
            out.append("Please state machine.ambient (the coolant temperature the rating "
                       "refers to); 40 °C was assumed")
    for r in evaluation.results:
        if r.near_limit:
            out.append(f"Please confirm {r.figure_text or 'the figure'} for {r.requirement}: it "
                       f"lies within 1 % of the limit")
    if req is not None and req.efficiency_class is not None:
        claim = sheet.attr("efficiency_class")
        eff = next((r for r in evaluation.results if r.requirement == "efficiency_class"), None)
        if claim and eff is not None and eff.status == NOT_MET:
            out.append(f"The sheet claims {claim}, but the declared efficiency does not reach "
                       f"IE{req.efficiency_class}: please state the efficiency the class "
                       "claim rests on and the standard applied")
    return list(dict.fromkeys(out))


def letter_body(offer: Offer, title: str | None) -> str:
    """The questions as a plain-text letter body to the vendor."""
    subject = f" for {title}" if title else ""
    lines = [f"Subject: clarifications on offer {offer.id}{subject}", "",
             "Dear Sir or Madam,", "",
             f"in reviewing your offer {offer.id} ({offer.path}) we need the following "
             "clarifications:", ""]
    if offer.questions:
        lines += [f"{i}. {q}" for i, q in enumerate(offer.questions, start=1)]
    else:
        lines.append("(none: the offer states everything the requirement needs)")
    lines += ["", "Please confirm the ratings in writing; our review is an engineering aid "
              "and not an approval.", "", "Kind regards"]
    return "\n".join(lines)


def status_counts(evaluation: OfferEvaluation | None) -> dict[str, int]:
    counts = {MET: 0, NOT_MET: 0, UNKNOWN: 0}
    if evaluation is not None:
        for r in evaluation.results:
            counts[r.status] += 1
    return counts
