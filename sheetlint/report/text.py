"""Plain-text report: errors and warnings by default, one block per record that has any, a
summary line and one cautions line.

``notes=True`` (``--notes``) adds the info findings, every record (also those with nothing
to show), each record's coverage (which rules checked it, which fields would let the others
run) and the files skipped as not holding a machine record.

Units are spelt one way: speeds in r/min, torque in N·m, temperatures in °C.
"""

from __future__ import annotations

import re

from sheetlint.batch import FileResult, relative
from sheetlint.cautions import FINDING_CAUTION, SAFETY_RULES, SHORT_CAUTION, safety_pointer
from sheetlint.coverage import missing_sentence, rule_titles
from sheetlint.engine.core import Finding
from sheetlint.engine.run import RecordResult, derived_payload
from sheetlint.report.json_report import summary

LABEL = {"error": "error", "warning": "warning", "info": "note"}
INDENT = " " * 4
DETAIL = " " * 13
_RPM = re.compile(r"(?<=[\d)])(\s*)(?:rpm|1/min|min-1|min⁻¹)\b")


def units(text: str) -> str:
    """One spelling per unit: r/min for speeds, N·m for torque, °C for temperatures."""
    text = _RPM.sub(lambda m: (m.group(1) or " ") + "r/min", text)
    return text.replace("N*m", "N·m").replace("degC", "°C")


def _plural(count: int, word: str) -> str:
    return f"{count} {word}" if count == 1 else f"{count} {word}s"


def render(results: list[FileResult], notes: bool = False, show_derived: bool = False) -> str:
    lines: list[str] = []
    for f in results:
        lines.extend(file_lines(f, notes, show_derived))
    lines.extend(tail_lines(summary(results), notes))
    return "\n".join(lines)


def file_lines(f: FileResult, notes: bool = False, show_derived: bool = False) -> list[str]:
    """The lines of one file's results (none for a file with nothing to show).

    The streaming interface: a batch writes each file's lines as the file finishes, then
    :func:`tail_lines` with the counts of the whole run.
    """
    name = relative(f.path)
    if f.error:
        return [f"{name}: cannot read: {_without_path(f.error, f.path)}"]
    if f.skipped:
        return [f"{name}: skipped, {f.skipped}"] if notes else []
    lines: list[str] = []
    for r in f.records:
        if r.error:
            lines.append(f"{name}: cannot read record: {_without_path(r.error, f.path)}")
            continue
        lines.extend(_record(name, r, notes, show_derived))
    return lines


def tail_lines(counts: dict[str, int], notes: bool = False) -> list[str]:
    """The summary line and the one cautions line that end a run's report."""
    return [_summary_line(counts, notes), SHORT_CAUTION]


def _without_path(message: str, path: str) -> str:
    """A message without the file name it starts with (the line names the file already)."""
    return message.removeprefix(f"{path}: ")


def _record(name: str, r: RecordResult, notes: bool, show_derived: bool) -> list[str]:
    shown = [x for x in r.findings if notes or x.severity != "info"]
    if not shown and not show_derived and not notes:
        return []
    out = [f"Machine {r.id}  ({name})"]
    for x in shown:
        out.extend(_finding(x))
    if not shown:
        out.append(f"{INDENT}nothing to report")
    if notes and r.coverage is not None:
        out.append(_coverage_line(r.coverage))
    if show_derived and r.derived:
        out.append(f"{INDENT}derived:")
        for path, d in derived_payload(r.derived).items():
            tag = " (estimate)" if d["estimate"] else ""
            out.append(f"{INDENT}  {path} = {d['value']:g} {units(d['unit'])}{tag}  "
                       f"[{d['rule']} from {', '.join(d['from'])}]")
    return out


def _finding(x: Finding) -> list[str]:
    label = "accepted" if x.accepted is not None else LABEL[x.severity]
    where = ""
    if x.location:
        if "line" in x.location:
            where = f"line {x.location['line']}: "
        elif "page" in x.location:
            where = f"page {x.location['page']}: "
        elif "sheet" in x.location:
            where = f"{x.location['sheet']}!{x.location.get('cell', '')}: "
        elif "cell" in x.location:
            where = f"cell {x.location['cell']}: "
    message = units(x.message.replace(FINDING_CAUTION, "").strip())
    out = [f"{INDENT}{label:<8} {x.rule}  {where}{message}"]
    if x.expected and x.actual and x.severity != "info":
        expected = "; ".join(f"{k} {units(v)}" for k, v in x.expected.items())
        actual = "; ".join(units(v) if k in x.expected and len(x.expected) == 1
                           else f"{k} {units(v)}" for k, v in x.actual.items())
        out.append(f"{DETAIL}expected {expected}; the sheet gives {actual}")
    if x.cause:
        out.append(f"{DETAIL}likely cause: {units(x.cause)}")
    if x.accepted is not None:
        out.append(f"{DETAIL}accepted in the record ({x.severity}): {x.accepted}")
    if x.rule in SAFETY_RULES and x.severity != "info" and x.accepted is None:
        out.append(f"{DETAIL}{safety_pointer(x.rule)}")
    return out


def _coverage_line(coverage: dict[str, object]) -> str:
    checked = coverage.get("checked") or []
    not_checked = coverage.get("not_checked") or {}
    text = f"{INDENT}coverage: {_plural(len(checked), 'rule')} checked"  # type: ignore[arg-type]
    if not_checked:
        text += f"; {missing_sentence(not_checked, titles=rule_titles())}"  # type: ignore[arg-type]
    return text


def _summary_line(s: dict[str, int], notes: bool) -> str:
    text = (f"Checked {_plural(s['files'], 'file')}, {_plural(s['records'], 'record')}: "
            f"{_plural(s['error'], 'error')}, {_plural(s['warning'], 'warning')}, "
            f"{_plural(s['info'], 'note')}")
    if not notes and s["info"]:
        text += " (shown with --notes)"
    if s.get("accepted"):
        text += f"; {s['accepted']} accepted"
    if s.get("skipped"):
        text += f"; {_plural(s['skipped'], 'file')} skipped (no machine record)"
    return text + "."
