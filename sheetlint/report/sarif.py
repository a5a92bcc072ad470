"""SARIF 2.1.0 output (``--format sarif``), for code-scanning views. Formats only.

One run; ``tool.driver.rules`` describes every registered rule (documentation from the
relation's docstring) plus any other rule id that appears in the results. Each finding is a
result with ``ruleId``, ``level`` (error/warning/note), a message, its location (file URI
relative to the current directory, ``region.startLine`` when the finding has a line; for a
PDF a location message and a logical location naming page and cell) and ``properties``
with fields, expected/actual values, deviation and cause. An acceptance written in the
record becomes ``suppressions: [{"kind": "inSource", "justification": reason}]``. A file or
record that cannot be read is a result of rule ``unreadable`` and a tool notification.

Reference: OASIS, *Static Analysis Results Interchange Format (SARIF) Version 2.1.0*, OASIS
Standard incorporating Errata 01, 2023.
"""

from __future__ import annotations

import hashlib
import json
from pathlib import PurePath
from typing import Any
from urllib.parse import quote

from sheetlint import __version__
from sheetlint.batch import FileResult, relative
from sheetlint.cautions import REPORT_CAUTION as CAUTION
from sheetlint.engine.core import Finding

SARIF_VERSION = "2.1.0"
SARIF_SCHEMA = ("https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/"
                "sarif-schema-2.1.0.json")
LEVELS = {"error": "error", "warning": "warning", "info": "note"}
UNREADABLE = "unreadable"


def artifact_uri(path: str) -> str:
    """A relative, percent-encoded URI with forward slashes (absolute outside the cwd)."""
    shown = relative(path)
    pure = PurePath(shown)
    if pure.is_absolute():
        return pure.as_uri()
    return quote(pure.as_posix())


def rule_descriptors() -> list[dict[str, Any]]:
    """``reportingDescriptor`` objects for every registered rule, sorted by id."""
    from sheetlint.relations.registry import all_relations
    from sheetlint.rules_doc import rule_text

    grouped: dict[str, list[Any]] = {}
    for relation in all_relations():
        grouped.setdefault(relation.rule, []).append(relation)
    out = []
    for rule, relations in sorted(grouped.items()):
        first = relations[0]
        equations = "; ".join(r.equation for r in relations if r.equation)
        help_text = rule_text(rule) or first.title  # what `sheetlint rules RULE` prints
        out.append({
            "id": rule,
            "name": _pascal(rule),
            "shortDescription": {"text": first.title or rule},
            "fullDescription": {"text": f"{equations}. Severity: {first.severity_policy}"
                                if first.severity_policy else equations or first.title},
            "help": {"text": help_text},
            "properties": {
                "kind": first.kind,
                "status": first.status,
                "equation": equations,
                "severityPolicy": first.severity_policy,
                "source": "; ".join(dict.fromkeys(r.source for r in relations if r.source)),
                "tags": ["pm-machine", first.kind, first.status],
            },
        })
    return out


def _pascal(rule: str) -> str:
    return "".join(part.capitalize() for part in rule.replace("_", "-").split("-"))


def _extra_descriptor(rule: str) -> dict[str, Any]:
    if rule == UNREADABLE:
        return {"id": UNREADABLE, "name": "Unreadable",
                "shortDescription": {"text": "File or record that cannot be read"},
                "fullDescription": {"text": "The file or record could not be read or does not "
                                            "follow the data contract; nothing in it was "
                                            "checked."},
                "help": {"text": "Fix the file so that it parses and follows the schema "
                                 "(`sheetlint schema`); the message names the field."},
                "properties": {"kind": "input", "status": "established"}}
    return {"id": rule, "name": _pascal(rule), "shortDescription": {"text": rule}}


def _location(f: FileResult, record_id: str | None, where: dict[str, Any] | None,
              fields: tuple[str, ...] = ()) -> dict[str, Any]:
    physical: dict[str, Any] = {"artifactLocation": {"uri": artifact_uri(f.path)}}
    location: dict[str, Any] = {"physicalLocation": physical}
    logical: list[dict[str, Any]] = []
    if record_id is not None:
        logical.append({"name": record_id, "kind": "object"})
    if where:
        line = where.get("line")
        if isinstance(line, int) and line >= 1:
            physical["region"] = {"startLine": line}
        if "page" in where or "sheet" in where or "cell" in where:
            text = (f"page {where['page']}" if "page" in where else
                    f"sheet '{where['sheet']}'" if "sheet" in where else f"line {line}")
            if where.get("cell"):
                text += f", cell '{where['cell']}'"
            location["message"] = {"text": text}
            logical.append({"name": text, "kind": "element",
                            "fullyQualifiedName": f"{record_id or ''}/{text}".lstrip("/")})
            location["properties"] = {k: where[k] for k in ("page", "sheet", "cell")
                                      if k in where}
    for name in fields[:1]:
        logical.append({"name": name, "kind": "property",
                        "fullyQualifiedName": f"{record_id}.{name}" if record_id else name})
    if logical:
        location["logicalLocations"] = logical
    return location


def _message(x: Finding) -> str:
    text = x.message
    if x.expected and x.actual and x.severity != "info":
        exp = ", ".join(f"{k} {v}" for k, v in x.expected.items())
        act = ", ".join(f"{k} {v}" for k, v in x.actual.items())
        text += f" [expected {exp}; sheet {act}]"
    if x.cause:
        text += f" Likely cause: {x.cause}."
    return text


def _fingerprint(*parts: str) -> str:
    return hashlib.sha256("\x1f".join(parts).encode("utf-8")).hexdigest()[:32]


def payload(results: list[FileResult]) -> dict[str, Any]:
    """The SARIF log as a JSON-ready dict."""
    rules = rule_descriptors()
    index = {d["id"]: i for i, d in enumerate(rules)}

    def rule_index(rule: str) -> int:
        if rule not in index:
            index[rule] = len(rules)
            rules.append(_extra_descriptor(rule))
        return index[rule]

    sarif_results: list[dict[str, Any]] = []
    notifications: list[dict[str, Any]] = []
    artifacts: list[dict[str, Any]] = []
    for f in results:
        artifacts.append({"location": {"uri": artifact_uri(f.path)}})
        problems: list[tuple[str | None, str]] = []
        if f.error:
            problems.append((None, f.error))
        for r in f.records:
            if r.error:
                problems.append((r.id, r.error))
                continue
            for x in r.findings:
                result: dict[str, Any] = {
                    "ruleId": x.rule,
                    "ruleIndex": rule_index(x.rule),
                    "level": LEVELS.get(x.severity, "warning"),
                    "message": {"text": _message(x)},
                    "locations": [_location(f, r.id, x.location, x.fields)],
                    "partialFingerprints": {
                        "sheetlintFinding/v1": _fingerprint(artifact_uri(f.path), r.id, x.rule,
                                                            ",".join(x.fields))},
                    "properties": {
                        "record": r.id,
                        "severity": x.severity,
                        "fields": list(x.fields),
                        "expected": dict(x.expected),
                        "actual": dict(x.actual),
                        "deviation": None if x.deviation is None else round(x.deviation, 6),
                        "cause": x.cause,
                        "source": x.source,
                    },
                }
                if x.accepted is not None:
                    result["suppressions"] = [{"kind": "inSource", "status": "accepted",
                                               "justification": x.accepted}]
                sarif_results.append(result)
        for record_id, message in problems:
            sarif_results.append({
                "ruleId": UNREADABLE,
                "ruleIndex": rule_index(UNREADABLE),
                "level": "error",
                "message": {"text": message},
                "locations": [_location(f, record_id, None)],
                "partialFingerprints": {
                    "sheetlintFinding/v1": _fingerprint(artifact_uri(f.path), record_id or "",
                                                        UNREADABLE)},
            })
            notifications.append({
                "level": "error",
                "message": {"text": message},
                "locations": [_location(f, record_id, None)],
                "descriptor": {"id": UNREADABLE},
            })
    run: dict[str, Any] = {
        "tool": {"driver": {
            "name": "sheetlint",
            "version": __version__,
            "semanticVersion": __version__,
            "rules": rules,
        }},
        "artifacts": artifacts,
        "invocations": [{"executionSuccessful": not notifications,
                         "toolExecutionNotifications": notifications}],
        "results": sarif_results,
        "columnKind": "unicodeCodePoints",
        "properties": {"caution": CAUTION},
    }
    return {"$schema": SARIF_SCHEMA, "version": SARIF_VERSION, "runs": [run]}


def render(results: list[FileResult]) -> str:
    return json.dumps(payload(results), indent=2, ensure_ascii=False)
