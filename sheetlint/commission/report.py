"""The commissioning result of one record, and its three formats: text, JSON and CSV.

The formats only arrange values that :mod:`.parameters`, :mod:`.checklist` and
:mod:`.identification` worked out; every number is printed from the same text, so the three
carry the same values digit for digit.
"""

from __future__ import annotations

import csv
import io
import json
from dataclasses import dataclass
from typing import Any

from sheetlint import __version__
from sheetlint.cautions import CAUTIONS
from sheetlint.engine.core import Finding

from .identification import Identification
from .parameters import missing_parameters
from .values import ChecklistItem, Parameter

#: the cautions of commissioning: the usual ones, and the turning machine's live terminals
COMMISSION_CAUTIONS: tuple[str, ...] = (
    *CAUTIONS,
    "Follow the converter and motor manufacturers' commissioning instructions and local codes; "
    "an identification run energises the motor and a spin test turns it.",
)


@dataclass(slots=True)
class CommissionResult:
    path: str
    id: str
    parameters: list[Parameter]
    checklist: list[ChecklistItem]
    identification: Identification
    record_findings: list[Finding]

    def to_dict(self) -> dict[str, Any]:
        ident = self.identification
        identification: dict[str, Any] = {
            "expected": {"conditions": ident.conditions.to_dict(),
                         "values": [p.to_dict() for p in ident.expected]},
            "findings": [f.to_dict() for f in ident.findings],
        }
        if ident.measured_path is not None:
            identification["measured"] = ident.measured_path
            identification["comparisons"] = [c.to_dict() for c in ident.comparisons]
            identification["not_compared"] = list(ident.not_compared)
        return {"tool": "sheetlint", "version": __version__, "path": self.path, "id": self.id,
                "parameters": [p.to_dict() for p in self.parameters],
                "missing": [{"name": name, "label": label, "field": field}
                            for name, label, field in missing_parameters(self.parameters)],
                "checklist": [c.to_dict() for c in self.checklist],
                "identification": identification,
                "record_findings": {s: sum(1 for f in self.record_findings if f.severity == s
                                           and f.accepted is None)
                                    for s in ("error", "warning", "info")},
                "cautions": list(COMMISSION_CAUTIONS)}


def render_json(result: CommissionResult) -> str:
    return json.dumps(result.to_dict(), indent=2, ensure_ascii=False)


def _unit(unit: str) -> str:
    return {"ohm": "Ω", "N*m": "N·m", "N*m/A": "N·m/A", "kg*m**2": "kg·m²"}.get(unit, unit)


def _provenance(p: Parameter) -> str:
    if p.provenance == "stated":
        return "stated"
    how = f"{p.provenance} by {p.rule}" if p.rule else p.provenance
    return f"{how} from {', '.join(p.inputs)}" if p.inputs else how


def render_text(result: CommissionResult) -> str:
    lines = [f"{result.path} :: {result.id}", "", "Motor data for the converter "
             "(units as a motor-data entry asks for them)"]
    labels = [p.label for p in (*result.parameters, *result.identification.expected)]
    labels += [label for _, label, _ in missing_parameters(result.parameters)]
    width = max(map(len, labels), default=10)
    for p in result.parameters:
        basis = f"  [{p.basis}]" if p.basis else ""
        lines.append(f"  {p.label:<{width}}  {p.text:>10} {_unit(p.unit):<7}{basis}")
        lines.append(f"  {'':<{width}}  {_provenance(p)}"
                     + (f"; {p.note}" if p.note and p.provenance != "stated" else ""))
        for doubt in p.doubts:
            lines.append(f"  {'':<{width}}  DOUBT: {doubt}")
    missing = missing_parameters(result.parameters)
    if missing:
        lines += ["", "Not on the sheet, nor determined by it (ask the vendor, or let the "
                  "identification find it)"]
        lines += [f"  {label:<{width}}  field {field}" for _, label, field in missing]
    lines += ["", "Commissioning checklist"]
    for item in result.checklist:
        mark = {"ok": "ok       ", "attention": "ATTENTION", "not_checked": "not checked"}
        lines.append(f"  [{mark[item.status]}] {item.item}")
        for message in item.messages:
            lines.append(f"      {message}")
    ident = result.identification
    c = ident.conditions
    speed = f", test speed {c.test_speed_rpm:g} r/min" if c.test_speed_rpm else ""
    lines += ["", f"What an identification run should find (winding at "
              f"{c.winding_temperature_c:g} °C, magnets at {c.magnet_temperature_c:g} °C"
              f"{speed})"]
    for p in ident.expected:
        lines.append(f"  {p.label:<{width}}  {p.text:>10} {_unit(p.unit):<7}  [{p.basis}]")
    if ident.measured_path is not None:
        lines += ["", f"Identification results of {ident.measured_path} against the sheet"]
        for comp in ident.comparisons:
            lines.append(f"  {comp.quantity:<10} measured {comp.measured} {_unit(comp.unit)} "
                         f"({comp.basis}); sheet admits {comp.expected_low}–"
                         f"{comp.expected_high}: {comp.verdict}"
                         + (f" ({comp.deviation:+.1%})" if comp.deviation else "")
                         + (f"; {comp.note}" if comp.note else ""))
        for f in ident.findings:
            lines.append(f"  {f.severity:<7} {f.rule}: {f.message}")
            if f.cause:
                lines.append(f"          cause: {f.cause}")
        for note in ident.not_compared:
            lines.append(f"  not compared: {note}")
        if not ident.comparisons:
            lines.append("  nothing compared: the sheet lacks every value measured")
        elif not ident.findings:
            lines.append("  no findings: the identification agrees with the sheet")
    counts = result.to_dict()["record_findings"]
    lines += ["", f"Record check: {counts['error']} error(s), {counts['warning']} warning(s) "
              "(run `sheetlint check` for the details)", ""]
    lines += [f"Caution: {text}" for text in COMMISSION_CAUTIONS]
    return "\n".join(lines)


CSV_HEADER = ("section", "name", "label", "value", "unit", "basis", "provenance", "rule",
              "from", "note", "doubts")


def render_csv(result: CommissionResult) -> str:
    """One row per value; opens in a spreadsheet program (RFC 4180 quoting, CRLF rows)."""
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\r\n")
    writer.writerow(CSV_HEADER)

    def write(*cells: str) -> None:  # every row as wide as the header
        writer.writerow((*cells, *[""] * (len(CSV_HEADER) - len(cells))))

    for p in result.parameters:
        write("parameter", p.name, p.label, p.text, p.unit, p.basis, p.provenance, p.rule or "",
              " ".join(p.inputs), p.note or "", " | ".join(p.doubts))
    for name, label, field in missing_parameters(result.parameters):
        write("missing", name, label, "", "", "", "", "", field)
    for item in result.checklist:
        write("checklist", " ".join(item.rules), item.item, "", "", "", item.status, "", "",
              " | ".join(item.messages))
    ident = result.identification
    for p in ident.expected:
        write("expected", p.name, p.label, p.text, p.unit, p.basis, p.provenance, p.rule or "",
              " ".join(p.inputs), p.note or "")
    for comp in ident.comparisons:
        write("measured", comp.quantity, f"admitted {comp.expected_low}–{comp.expected_high}",
              comp.measured, comp.unit, comp.basis, comp.verdict, "", "",
              f"deviation {comp.deviation:+.4f}" + (f"; {comp.note}" if comp.note else ""))
    for note in ident.not_compared:
        write("not_compared", note.partition(":")[0], "", "", "", "", "", "", "", note)
    for f in ident.findings:
        write("finding", f.rule, f.severity, "", "", "", "", f.rule, " ".join(f.fields),
              f.message + (f" Cause: {f.cause}" if f.cause else ""))
    for text in COMMISSION_CAUTIONS:
        write("caution", "", "", "", "", "", "", "", "", text)
    return out.getvalue()
