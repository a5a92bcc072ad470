"""Rule documentation, taken from the relations themselves (one source of truth)."""

from __future__ import annotations

import inspect
from collections.abc import Iterable
from typing import Any

from sheetlint.relations.registry import all_relations, rule_options

STATUSES = ("stable", "preview")


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
        for policy in _distinct(r.severity_policy for r in relations):
            lines.append(f"    severity: {policy}")
        for source in _distinct(r.source for r in relations):
            lines.append(f"    source:   {source}")
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
            "severity_policy": first.severity_policy,
            "source": first.source,
            "sources": _distinct(r.source for r in relations),
            "options": {name: {"kind": o.kind, "default": o.default, "meaning": o.meaning}
                        for name, o in sorted(rule_options().get(rule, {}).items())},
        })
    return out


def explain(rule: str) -> str | None:
    """The documentation of ``rule``: each relation's docstring, with its identity."""
    relations = _by_rule().get(rule)
    if not relations:
        return None
    parts = [f"{rule} ({relations[0].status})", ""]
    for r in relations:
        parts.append(f"== {r.title}: {r.equation}")
        parts.append(inspect.cleandoc(type(r).__doc__ or ""))
        parts.append(f"Severity: {r.severity_policy}")
        parts.append(f"Source: {r.source}")
        parts.append("")
    options = rule_options().get(rule)
    if options:
        parts.append(f"Options ([tool.sheetlint.rules.{rule}] or [rules.{rule}] in "
                     "sheetlint.toml):")
        for name, option in sorted(options.items()):
            shape = "number" if option.kind == "number" else "[low, high]"
            parts.append(f"  {name} = {shape}: {option.meaning} (default {option.default})")
    return "\n".join(parts).rstrip()
