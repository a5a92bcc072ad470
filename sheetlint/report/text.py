"""Plain-text report: per file and record one line per finding, then a summary line."""

from __future__ import annotations

from sheetlint.batch import FileResult, relative
from sheetlint.cautions import REPORT_CAUTION as CAUTION
from sheetlint.cautions import SAFETY_RULES
from sheetlint.engine.run import derived_payload
from sheetlint.report.json_report import summary

MARK = {"error": "error  ", "warning": "warning", "info": "info   "}


def render(results: list[FileResult], show_info: bool = True, show_derived: bool = False,
           color: bool = False) -> str:
    lines: list[str] = []
    safety = False
    for f in results:
        name = relative(f.path)
        if f.error:
            lines.append(f"{name}: cannot read: {f.error}")
            continue
        if getattr(f, "skipped", None):
            lines.append(f"{name}: skipped: {f.skipped}")
            continue
        for r in f.records:
            if r.error:
                lines.append(f"{name}: cannot read record: {r.error}")
                continue
            shown = [x for x in r.findings if show_info or x.severity != "info"]
            head = f"{name} :: {r.id}"
            if not shown and not show_derived:
                lines.append(f"{head}: ok")
                continue
            lines.append(head)
            for x in shown:
                where = ""
                if x.location:
                    if "line" in x.location:
                        where = f"{name}:{x.location['line']}: "
                    elif "page" in x.location:
                        where = f"{name} p.{x.location['page']}: "
                    elif "sheet" in x.location:
                        where = f"{name} {x.location['sheet']}!{x.location.get('cell', '')}: "
                sev = MARK[x.severity] if x.suppressed is None else "suppr. "
                text = f"  {sev} {x.rule:<20} {where}{x.message}"
                if x.expected and x.actual and x.severity != "info":
                    exp = ", ".join(f"{k} {v}" for k, v in x.expected.items())
                    act = ", ".join(f"{k} {v}" for k, v in x.actual.items())
                    text += f" [expected {exp}; sheet {act}]"
                lines.append(text)
                if x.cause:
                    lines.append(f"           cause: {x.cause}")
                if x.suppressed is not None:
                    lines.append(f"           suppressed: {x.suppressed}")
                if x.rule in SAFETY_RULES and x.severity != "info":
                    safety = True
            if show_derived and r.derived:
                lines.append("  derived:")
                for path, d in derived_payload(r.derived).items():
                    tag = " (estimate)" if d["estimate"] else ""
                    lines.append(f"    {path} = {d['value']:g} {d['unit']}{tag}  "
                                 f"[{d['rule']} from {', '.join(d['from'])}]")
    s = summary(results)
    tail = (f"{s['files']} file(s), {s['records']} record(s): {s['error']} error(s), "
            f"{s['warning']} warning(s), {s['info']} info")
    if s.get("suppressed"):
        tail += f", {s['suppressed']} suppressed"
    lines.append(tail)
    if safety:
        lines.append(CAUTION)
    return "\n".join(lines)
