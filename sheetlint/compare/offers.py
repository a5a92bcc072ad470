"""Reading the offers: every record of every file, checked by the engine first, then
evaluated against the requirement, given a verdict, ranked and given its questions."""

from __future__ import annotations

from dataclasses import dataclass, field

from sheetlint.batch import raw_records
from sheetlint.compare.evaluate import evaluate_offer
from sheetlint.compare.requirement import Requirement
from sheetlint.compare.verdict import (
    DEFAULT_RANK_FIGURE,
    Offer,
    questions_for,
    rank_offers,
    verdict_of,
)
from sheetlint.engine.core import Settings
from sheetlint.engine.run import RecordResult, check_record
from sheetlint.intake.records import InputProblem


@dataclass(slots=True)
class Comparison:
    """The offers in ranking order, the requirement, and how they were ranked."""

    offers: list[Offer]
    requirement: Requirement | None
    rank_figure: str = DEFAULT_RANK_FIGURE
    descending: bool = False
    errors: list[str] = field(default_factory=list)


def load_offers(paths: list[str], settings: Settings | None = None) -> list[Offer]:
    """One :class:`Offer` per record of each file; an unreadable file or record is an offer
    with ``error`` set (never an exception)."""
    offers: list[Offer] = []
    for path in paths:
        try:
            raws = raw_records(path)
        except InputProblem as exc:
            offers.append(Offer(path, path, None, error=str(exc)))
            continue
        except OSError as exc:
            offers.append(Offer(path, path, None, error=f"{path}: cannot read file "
                                f"({exc.strerror or exc})"))
            continue
        if not raws:
            offers.append(Offer(path, path, None, error=f"{path}: no machine record found"))
        for raw in raws:
            try:
                result = check_record(raw, settings)
            except Exception as exc:  # a bug of ours: this offer fails, the others go on
                result = RecordResult(str(getattr(raw, "index", "")),
                                      f"internal error of sheetlint ({type(exc).__name__}); "
                                      "please report it with this input")
            if result.error:
                offers.append(Offer(path, result.id, None, raw.data,
                                    error=f"{path}: {result.id}: {result.error}"))
            else:
                offers.append(Offer(path, result.id, result, raw.data))
    return offers


def compare_offers(paths: list[str], requirement: Requirement | None, *,
                   rank_figure: str = DEFAULT_RANK_FIGURE, descending: bool = False,
                   settings: Settings | None = None) -> Comparison:
    """Check, evaluate, judge and rank every offer under ``paths``."""
    offers = load_offers(paths, settings)
    # without a requirement only the sheet's own check decides (the ``consistency`` row)
    asked = requirement if requirement is not None else Requirement()
    for offer in offers:
        if offer.result is not None:
            offer.evaluation = evaluate_offer(offer.result, asked)
        offer.verdict = verdict_of(offer.evaluation)
        offer.questions = questions_for(offer, requirement)
    ordered = rank_offers(offers, rank_figure, descending)
    errors = [o.error for o in offers if o.error]
    return Comparison(ordered, requirement, rank_figure, descending, errors)
