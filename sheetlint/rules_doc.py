"""Rule documentation, taken from the relations themselves (one source of truth).

``sheetlint rules NAME`` prints it as plain text under headings of our own: what the rule
checks, the equation, what it tells you, a sheet that fails, what to do, severity, sources,
tuning, and for safety rules the full cautions. The relations' docstrings are written with a
little reStructuredText (``.. math::``, double back-quotes, labelled paragraphs); it is turned
into plain text here, never printed raw.
"""

from __future__ import annotations

import inspect
import re
import textwrap
from collections.abc import Iterable
from typing import Any

from sheetlint.cautions import CAUTIONS, SAFETY_RULES
from sheetlint.relations.registry import all_relations, rule_options

STATUSES = ("established", "trial")

#: labelled paragraphs of the docstrings -> our headings
HEADINGS = {
    "what it checks": "What it checks",
    "why it matters": "What it tells you",
    "example that fails": "A sheet that fails",
    "fix": "What to do",
    "what to do": "What to do",
    "what it tells you": "What it tells you",
    "severity": "Severity",
    "references": "Sources",
}
ORDER = ("What it checks", "Equation", "What it tells you", "A sheet that fails",
         "What to do", "Severity", "Sources")
WIDTH = 92
#: the team's notes file is not shipped: citations of it are dropped from the printed text
_NOTES_IN_PARENS = re.compile(r"\s*\((?:see |derived in )?REFERENCES\.md[^)]*\)")
_NOTES_CITATION = re.compile(r"\s*[,;]?\s*(?:derived in |see |in )?REFERENCES\.md"
                             r"(?:\s*§\s*\d+(?:\s*(?:,|and)\s*§\s*\d+)*)?")
_LABEL = re.compile(r"^([A-Z][A-Za-z ]{2,30}):\s*(.*)$")


def _by_rule() -> dict[str, list[object]]:
    out: dict[str, list[object]] = {}
    for relation in all_relations():
        out.setdefault(relation.rule, []).append(relation)
    return out


def _distinct(texts: Iterable[str]) -> list[str]:
    """Non-empty texts in first-seen order, each once (relations of one rule share most)."""
    return list(dict.fromkeys(t for t in texts if t))


def rules_table(status: str | None = None) -> str:
    """Every rule (or those of ``status``): id, status, kind, equation(s), severity policy, source.
    """
    lines = []
    for rule, relations in sorted(_by_rule().items()):
        first = relations[0]
        if status is not None and first.status != status:
            continue
        lines.append(f"{rule}  [{first.status}, {first.kind}]")
        for r in relations:
            lines.append(f"    {r.equation}")
        for policy in _distinct(plain(r.severity_policy) for r in relations):
            lines.append(f"    severity: {policy}")
        for source in _distinct(plain(r.source) for r in relations):
            lines.append(f"    source:   {source}")
    lines.append("")
    lines.append("`sheetlint rules NAME` prints one rule's documentation.")
    return "\n".join(lines)


def rules_payload(status: str | None = None) -> list[dict[str, Any]]:
    """``sheetlint rules --format json``: one object per rule, sorted by id."""
    out = []
    for rule, relations in sorted(_by_rule().items()):
        first = relations[0]
        if status is not None and first.status != status:
            continue
        out.append({
            "rule": rule,
            "title": first.title,
            "status": first.status,
            "kind": first.kind,
            "equations": [r.equation for r in relations],
            "fields": sorted({f for r in relations for f in r.fields}),
            "severity_policy": plain(first.severity_policy),
            "source": plain(first.source),
            "sources": _distinct(plain(r.source) for r in relations),
            "options": {name: {"kind": o.kind, "default": o.default, "meaning": o.meaning}
                        for name, o in sorted(rule_options().get(rule, {}).items())},
        })
    return out


def plain(text: str) -> str:
    """Docstring markup as plain text: no double back-quotes or emphasis stars, no citation
    of files that are not shipped, "approximate; check against the standard's text" where a
    value is marked as from memory."""
    text = text.replace("``", "")
    text = re.sub(r"(?<![\w*])\*([^*\n]+)\*(?![\w*])", r"\1", text)
    text = _NOTES_IN_PARENS.sub("", text)
    text = _NOTES_CITATION.sub("", text)
    text = re.sub(r"\(\s*;\s*", "(", text)
    text = re.sub(r"\(\s*\)", "", text)
    text = re.sub(r"from\s+memory", "not verified against the text", text)
    text = re.sub(r"References:\s*\.", "References: common practice.", text)
    return re.sub(r"[ \t]+([.,;])", r"\1", text)


def _sections(relation: Any) -> tuple[str, dict[str, list[str]]]:
    """The docstring of one relation cut into (summary, {heading: paragraphs}): a line that
    starts with a known label ("Fix:", "References:"...) opens that heading."""
    doc = plain(inspect.cleandoc(type(relation).__doc__ or ""))
    doc = re.sub(r"(?ms)^\.\. math::.*?(?:\n\s*\n|\Z)", "\n", doc)  # equation printed apart
    blocks = [p.strip() for p in re.split(r"\n\s*\n", doc) if p.strip()]
    summary = " ".join(blocks.pop(0).split()) if blocks else relation.title
    sections: dict[str, list[str]] = {}
    current = "What it checks"
    for block in blocks:
        paragraph: list[str] = []
        for line in block.splitlines():
            match = _LABEL.match(line.strip())
            if match and match.group(1).lower() in HEADINGS:
                _add(sections, current, paragraph)
                current, paragraph = HEADINGS[match.group(1).lower()], [match.group(2)]
            else:
                paragraph.append(line.strip())
        _add(sections, current, paragraph)
    return summary, sections


def _add(sections: dict[str, list[str]], heading: str, lines: list[str]) -> None:
    text = " ".join(" ".join(lines).split())
    if text:
        sections.setdefault(heading, []).append(text)


def _indent(text: str) -> list[str]:
    return textwrap.wrap(text, WIDTH, initial_indent="  ", subsequent_indent="  ") or ["  "]


def rule_text(rule: str) -> str | None:
    """The documentation of ``rule`` as plain text (``sheetlint rules NAME``); None if the
    rule does not exist."""
    relations = _by_rule().get(rule)
    if not relations:
        return None
    first = relations[0]
    lines = [f"{rule} — {first.title}", f"status: {first.status}; kind: {first.kind}", ""]
    for relation in relations:
        summary, sections = _sections(relation)
        sections["Equation"] = [relation.equation]
        sections.setdefault("Severity", []).append(plain(relation.severity_policy))
        if relation.source:
            sections.setdefault("Sources", []).append(plain(relation.source))
        if len(relations) > 1:
            lines += [f"[{relation.title}]", ""]
        lines += [*_indent(summary), ""]
        for heading in ORDER:
            texts = _distinct(sections.get(heading, []))
            if not texts:
                continue
            lines.append(heading)
            for text in texts:
                lines += _indent(text)
            lines.append("")
    options = rule_options().get(rule)
    if options:
        lines.append(f"Tuning ([tool.sheetlint.tuning.{rule}] in pyproject.toml, or "
                     f"[tuning.{rule}] in sheetlint.toml)")
        for name, option in sorted(options.items()):
            shape = "number" if option.kind == "number" else "[low, high]"
            lines += _indent(f"{name} = {shape}: {option.meaning} (default {option.default})")
        lines.append("")
    if rule in SAFETY_RULES:
        lines.append("Cautions")
        for caution in CAUTIONS:
            lines += _indent(caution)
        lines.append("")
    return "\n".join(lines).rstrip()
