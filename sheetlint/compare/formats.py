"""Output of a comparison: text, JSON, CSV and XLSX (the HTML page is :mod:`.html`).

Formatters compute nothing: every figure and status comes from the evaluation. CSV and XLSX
have one row per requirement and one column per offer, with units in the row labels.
"""

from __future__ import annotations

import csv
import io
import json
from typing import Any

from sheetlint import __version__
from sheetlint.cautions import CAUTIONS, REPORT_CAUTION
from sheetlint.compare.evaluate import RequirementResult
from sheetlint.compare.offers import Comparison
from sheetlint.compare.verdict import Offer, letter_body
from sheetlint.fields import FIELDS, KINDS, display_quantity, spec_for

COMPARE_CAUTION = ("The comparison is an engineering aid, not an approval: confirm every "
                   "rating with the manufacturer; installation follows local codes and "
                   "licensed practice.")

#: units of the deciding figure of each requirement, for row labels (display units)
_ROW_UNITS = {"duty": "A", "speed_range": "r/min", "efficiency_class": "%",
              "thermal.class": "class", "thermal.rise": "K", "emf_margin": "V", "mass": "kg",
              "inertia": "kg·m²", "consistency": "errors"}
_ROW_WORDS = {"duty": "converter current", "speed_range": "top speed reachable",
              "efficiency_class": "declared efficiency", "thermal.class": "thermal class",
              "thermal.rise": "temperature rise", "emf_margin": "peak back-EMF at top speed",
              "mass": "mass", "inertia": "inertia", "consistency": "errors on the sheet"}

#: sheet fields shown under the requirements, in this order
FIGURE_FIELDS = ("rated.power", "rated.torque", "rated.speed", "rated.voltage", "rated.current",
                 "rated.power_factor", "rated.efficiency", "rated.losses",
                 "rated.temperature_rise", "rated.magnet_temperature", "machine.poles",
                 "emf.constant", "circuit.resistance", "circuit.ld", "circuit.lq",
                 "limits.max_speed", "machine.mass")


def _family(requirement: str) -> str:
    return "duty" if requirement.startswith("duty[") else requirement


def row_label(comparison: Comparison, requirement: str) -> str:
    """Row label of a requirement with the unit of its figure, e.g.
    ``duty[0]: converter current at 1000 N·m, 1500 r/min [A]``."""
    family = _family(requirement)
    words = _ROW_WORDS.get(family, requirement)
    if family == "duty" and comparison.requirement is not None:
        index = int(requirement[5:-1])
        duty = comparison.requirement.duty[index]
        words += f" at {duty.torque:.0f} N·m, {duty.speed * 60 / 6.283185307179586:.0f} r/min"
    return f"{requirement}: {words} [{_ROW_UNITS.get(family, '')}]"


def display_figure(result: RequirementResult) -> float | None:
    """The deciding figure in the unit of its row label."""
    if result.figure is None:
        return None
    family = _family(result.requirement)
    if family == "speed_range":
        return result.figure * 60 / 6.283185307179586
    if family == "efficiency_class":
        return 100.0 * result.figure
    return result.figure


def requirement_names(comparison: Comparison) -> list[str]:
    names: list[str] = []
    for offer in comparison.offers:
        if offer.evaluation is not None:
            for r in offer.evaluation.results:
                if r.requirement not in names:
                    names.append(r.requirement)
    return names


def result_of(offer: Offer, requirement: str) -> RequirementResult | None:
    if offer.evaluation is None:
        return None
    return next((r for r in offer.evaluation.results if r.requirement == requirement), None)


def figures_payload(offer: Offer) -> dict[str, Any]:
    """Stated and derived figures of an offer in SI, with provenance, and computed ones."""
    out: dict[str, Any] = {}
    if offer.result is None or offer.result.sheet is None:
        return out
    for name, known in offer.result.sheet.values.items():
        spec = FIELDS.get(name)
        if spec is None or name.startswith("points["):
            continue
        provenance = ("stated" if known.is_given else "estimate" if known.is_estimate
                      else "derived")
        entry: dict[str, Any] = {"value": float(f"{known.value:.6g}"),
                                 "unit": KINDS[spec.kind].si_unit, "provenance": provenance}
        if known.rule and not known.is_given:
            entry["rule"] = known.rule
        out[name] = entry
    if offer.evaluation is not None:
        for name, (value, unit, how) in offer.evaluation.extra_figures.items():
            out[name] = {"value": float(f"{value:.6g}"), "unit": unit, "provenance": how}
    return out


def _findings_count(offer: Offer) -> dict[str, int]:
    counts = {"error": 0, "warning": 0, "info": 0}
    if offer.result is not None:
        for f in offer.result.findings:
            if f.accepted is None:
                counts[f.severity] += 1
    return counts


def payload(comparison: Comparison) -> dict[str, Any]:
    """The JSON document (DESIGN.md "Offers against a requirement")."""
    req = comparison.requirement
    offers = []
    for offer in comparison.offers:
        entry: dict[str, Any] = {
            "path": offer.path, "id": offer.id, "rank": offer.rank, "verdict": offer.verdict,
            "error": offer.error, "findings": _findings_count(offer),
            "rank_value": offer.rank_value,
            "figures": figures_payload(offer),
            "requirements": ([r.to_dict() for r in offer.evaluation.results]
                             if offer.evaluation is not None else []),
            "questions": list(offer.questions),
            "letter": letter_body(offer, req.title if req else None),
        }
        if offer.result is not None:
            entry["maker"] = offer.result.sheet.attr("maker") if offer.result.sheet else None
        offers.append(entry)
    return {"tool": "sheetlint", "version": __version__,
            "requirement": req.title if req is not None else None,
            "rank_by": {"figure": comparison.rank_figure,
                        "order": "descending" if comparison.descending else "ascending",
                        "after": "verdict (compliant, incomplete, not_compliant)"},
            "offers": offers, "cautions": [*CAUTIONS, COMPARE_CAUTION]}


def render_json(comparison: Comparison) -> str:
    return json.dumps(payload(comparison), indent=2, ensure_ascii=False)


def _figure_cell(offer: Offer, name: str) -> tuple[float | None, str]:
    if offer.result is None or offer.result.sheet is None:
        return None, ""
    known = offer.result.sheet.values.get(name)
    if known is None:
        return None, ""
    value, unit = display_quantity(name, known.value, celsius="°C")
    if name.endswith(("efficiency",)):
        value, unit = 100.0 * value, "%"
    return value, unit


def _figure_label(name: str) -> str:
    spec = spec_for(name)
    kind = KINDS[spec.kind] if spec else KINDS["ratio"]
    unit = "°C" if kind.name == "temperature" else kind.display_unit
    if name.endswith("efficiency"):
        unit = "%"
    return f"{name} [{unit}]" if unit else name


def rank_unit(comparison: Comparison) -> str:
    """SI unit of the ranking figure (a computed figure's own, else the field's)."""
    for offer in comparison.offers:
        if offer.evaluation is not None and comparison.rank_figure in \
                offer.evaluation.extra_figures:
            return offer.evaluation.extra_figures[comparison.rank_figure][1]
    spec = spec_for(comparison.rank_figure)
    return KINDS[spec.kind].si_unit if spec else ""


def table_rows(comparison: Comparison) -> list[list[Any]]:
    """Rows of the CSV/XLSX table: header, verdict and rank, one row per requirement, then
    the offers' main figures; one column per offer."""
    offers = comparison.offers
    rows: list[list[Any]] = [["offer", *[o.id for o in offers]],
                             ["file", *[o.path for o in offers]],
                             ["verdict", *[o.verdict for o in offers]],
                             ["rank", *[o.rank for o in offers]]]
    rank_label = f"rank figure: {comparison.rank_figure} [{rank_unit(comparison)}]"
    rows.append([rank_label, *[None if o.rank_value is None else float(f"{o.rank_value:.6g}")
                               for o in offers]])
    for name in requirement_names(comparison):
        row: list[Any] = [row_label(comparison, name)]
        for offer in offers:
            result = result_of(offer, name)
            if result is None:
                row.append("")
                continue
            figure = display_figure(result)
            shown = f"{result.status}" if figure is None else f"{result.status} ({figure:.4g})"
            row.append(shown + (" near limit" if result.near_limit else ""))
        rows.append(row)
    for name in FIGURE_FIELDS:
        cells = [_figure_cell(o, name)[0] for o in offers]
        if any(c is not None for c in cells):
            rows.append([_figure_label(name), *[None if c is None else float(f"{c:.6g}")
                                               for c in cells]])
    return rows


def render_csv(comparison: Comparison) -> str:
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    for row in table_rows(comparison):
        writer.writerow(["" if c is None else c for c in row])
    writer.writerow([COMPARE_CAUTION])
    return buffer.getvalue().rstrip("\n")


#: fills of the status cells: light, middle and dark grey-blue tones that stay apart in grey
#: print, each with a word in the cell, so colour is never the only cue
STATUS_FILLS = {"met": "DCE9F2", "not_met": "5B6F82", "unknown": "F5E6B8"}
STATUS_FONTS = {"met": "1B2A36", "not_met": "FFFFFF", "unknown": "3A2E05"}


def render_xlsx(comparison: Comparison) -> bytes:
    """The table as an XLSX workbook (openpyxl): figures as numbers, the status of each
    requirement as the cell's word and fill."""
    from openpyxl import Workbook
    from openpyxl.styles import Alignment, Font, PatternFill

    book = Workbook()
    sheet = book.active
    sheet.title = "Comparison"
    for row in table_rows(comparison):
        sheet.append(row)
    first_requirement = 6  # rows 1-5: offer, file, verdict, rank, rank figure
    names = requirement_names(comparison)
    for i, _name in enumerate(names):
        for j, offer in enumerate(comparison.offers):
            result = result_of(offer, names[i])
            if result is None:
                continue
            cell = sheet.cell(row=first_requirement + i, column=2 + j)
            cell.fill = PatternFill("solid", fgColor=STATUS_FILLS[result.status])
            cell.font = Font(color=STATUS_FONTS[result.status],
                             bold=result.status != "met")
    for cell in sheet[1]:
        cell.font = Font(bold=True)
    sheet.column_dimensions["A"].width = 62
    for j in range(len(comparison.offers)):
        sheet.column_dimensions[chr(ord("B") + j) if j < 25 else "Z"].width = 24
    sheet.freeze_panes = "B2"
    sheet.append([])
    sheet.append([COMPARE_CAUTION])
    details = book.create_sheet("Details")
    details.append(["offer", "requirement", "status", "margin", "detail", "needs"])
    for offer in comparison.offers:
        if offer.evaluation is None:
            details.append([offer.id, "", "unknown", None, offer.error or "", ""])
            continue
        for r in offer.evaluation.results:
            details.append([offer.id, r.requirement, r.status, r.margin, r.detail,
                            ", ".join(r.needs)])
    for cell in details["E"]:
        cell.alignment = Alignment(wrap_text=True, vertical="top")
    details.column_dimensions["E"].width = 100
    questions = book.create_sheet("Questions")
    questions.append(["offer", "question"])
    for offer in comparison.offers:
        for q in offer.questions:
            questions.append([offer.id, q])
    buffer = io.BytesIO()
    book.save(buffer)
    return buffer.getvalue()


def figures_table(comparison: Comparison) -> list[str]:
    """The offers' main figures side by side (text), derived ones marked ``d``, estimates
    ``e``."""
    offers = comparison.offers
    width = max([14, *(min(len(o.id), 22) + 2 for o in offers)])
    rows = ["Figures side by side (d = derived, e = estimate):",
            " " * 30 + "".join(f"{o.id[:22]:>{width}}" for o in offers)]
    for name in FIGURE_FIELDS:
        cells = []
        for offer in offers:
            value, _unit = _figure_cell(offer, name)
            known = (offer.result.sheet.values.get(name) if offer.result is not None
                     and offer.result.sheet is not None else None)
            mark = "" if known is None or known.is_given else (" e" if known.is_estimate
                                                                else " d")
            cells.append("-" if value is None else f"{value:.5g}{mark}")
        if any(c != "-" for c in cells):
            rows.append(f"{_figure_label(name)[:30]:<30}"
                        + "".join(f"{c:>{width}}" for c in cells))
    return rows


_STATUS_WORD = {"met": "met", "not_met": "NOT MET", "unknown": "unknown"}


def render_text(comparison: Comparison, letters: bool = True) -> str:
    """Plain text: the ranking, each offer's requirements, and its questions letter."""
    req = comparison.requirement
    lines = [f"Offers compared against: {req.title or req.path}" if req else
             "Offers compared without a requirement: the verdict rests on each sheet's own "
             "check only", ""]
    lines.append(f"Ranking (by verdict, then {comparison.rank_figure}, "
                 f"{'higher' if comparison.descending else 'lower'} first):")
    for offer in comparison.offers:
        value = "" if offer.rank_value is None else f"  {comparison.rank_figure} = " \
            f"{offer.rank_value:.4g}"
        lines.append(f"  {offer.rank}. {offer.id} ({offer.path}): {offer.verdict}{value}")
    lines += ["", *figures_table(comparison)]
    for offer in comparison.offers:
        lines += ["", f"== {offer.id} ({offer.path}): {offer.verdict}"]
        if offer.error:
            lines.append(f"  could not be read: {offer.error}")
        counts = _findings_count(offer)
        if offer.result is not None:
            lines.append(f"  sheet check: {counts['error']} error(s), {counts['warning']} "
                         f"warning(s)")
        if offer.evaluation is not None:
            for r in offer.evaluation.results:
                margin = "" if r.margin is None else f" [margin {100 * r.margin:+.1f} %]"
                lines.append(f"  {_STATUS_WORD[r.status]:>8}  {r.requirement}: {r.detail}"
                             f"{margin}")
                if r.needs and r.status == "unknown":
                    lines.append(f"            needs: {', '.join(r.needs)}")
        if letters:
            lines += ["", "  --- questions to the vendor ---"]
            lines += ["  " + line if line else "" for line in
                      letter_body(offer, req.title if req else None).splitlines()]
    lines += ["", COMPARE_CAUTION, REPORT_CAUTION]
    return "\n".join(lines)
