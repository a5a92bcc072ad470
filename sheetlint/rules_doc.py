"""Rule documentation, taken from the relations themselves (one source of truth)."""

from __future__ import annotations

import inspect

from sheetlint.relations.registry import all_relations


def _by_rule() -> dict[str, list[object]]:
    out: dict[str, list[object]] = {}
    for relation in all_relations():
        out.setdefault(relation.rule, []).append(relation)
    return out


def rules_table() -> str:
    """Every rule: id, status, kind, equation(s), severity policy and source."""
    lines = []
    for rule, relations in sorted(_by_rule().items()):
        first = relations[0]
        lines.append(f"{rule}  [{first.status}, {first.kind}]")
        for r in relations:
            lines.append(f"    {r.equation}")
        lines.append(f"    severity: {first.severity_policy}")
        lines.append(f"    source:   {first.source}")
    return "\n".join(lines)


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
    return "\n".join(parts).rstrip()
