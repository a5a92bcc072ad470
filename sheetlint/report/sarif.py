"""SARIF 2.1.0 output (``--format sarif``), for code-scanning views. Formats only.

One run, written as a stream (:class:`SarifReport`); ``tool.driver.rules`` describes every
registered rule (documentation from the relation's docstring) and ``unreadable``, plus any
other rule id that appears in the results. Each finding is a
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
from sheetlint.report import FilePart, Tally, count_part, render_all

SARIF_VERSION = "2.1.0"
SARIF_SCHEMA = ("https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/"
                "sarif-schema-2.1.0.json")
LEVELS = {"error": "error", "warning": "warning", "info": "note"}
UNREADABLE = "unreadable"
_encode = json.JSONEncoder(ensure_ascii=False).encode


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


def rule_order() -> dict[str, int]:
    """``ruleIndex`` of each registered rule (sorted ids, as :func:`rule_descriptors` lists
    them), then ``unreadable``: the same in every process of a run."""
    from sheetlint.relations.registry import rule_ids

    order = {rule: i for i, rule in enumerate(sorted(set(rule_ids())))}
    order[UNREADABLE] = len(order)
    return order


class SarifReport:
    """The streaming SARIF log: one run whose ``results`` are written as files finish.

    SARIF's objects are unordered, so the run lists ``results`` first and, in the tail,
    ``artifacts``, ``invocations`` (with a notification per unreadable file or record),
    ``tool.driver.rules`` and the rest. A rule id outside the registry gets its descriptor at
    the end of ``rules`` and no ``ruleIndex`` (which SARIF makes optional).
    """

    separator = ",\n"

    def __init__(self) -> None:
        self._order: dict[str, int] | None = None

    def head(self) -> str:
        return (f'{{"$schema": {_encode(SARIF_SCHEMA)}, "version": {_encode(SARIF_VERSION)}, '
                '"runs": [{"results": [\n')

    def part(self, result: FileResult) -> FilePart:
        if self._order is None:
            self._order = rule_order()
        order = self._order
        f = result
        uri = artifact_uri(f.path)
        texts: list[str] = []
        notifications: list[str] = []
        unlisted: list[str] = []
        problems: list[tuple[str | None, str]] = []
        if f.error:
            problems.append((None, f.error))
        for r in f.records:
            if r.error:
                problems.append((r.id, r.error))
                continue
            for x in r.findings:
                entry: dict[str, Any] = {"ruleId": x.rule}
                if x.rule in order:
                    entry["ruleIndex"] = order[x.rule]
                elif x.rule not in unlisted:
                    unlisted.append(x.rule)
                entry.update({
                    "level": LEVELS.get(x.severity, "warning"),
                    "message": {"text": _message(x)},
                    "locations": [_location(f, r.id, x.location, x.fields)],
                    "partialFingerprints": {
                        "sheetlintFinding/v1": _fingerprint(uri, r.id, x.rule,
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
                })
                if x.accepted is not None:
                    entry["suppressions"] = [{"kind": "inSource", "status": "accepted",
                                              "justification": x.accepted}]
                texts.append(_encode(entry))
        for record_id, message in problems:
            texts.append(_encode({
                "ruleId": UNREADABLE,
                "ruleIndex": order[UNREADABLE],
                "level": "error",
                "message": {"text": message},
                "locations": [_location(f, record_id, None)],
                "partialFingerprints": {
                    "sheetlintFinding/v1": _fingerprint(uri, record_id or "", UNREADABLE)},
            }))
            notifications.append(_encode({
                "level": "error",
                "message": {"text": message},
                "locations": [_location(f, record_id, None)],
                "descriptor": {"id": UNREADABLE},
            }))
        return count_part(result, ",\n".join(texts),
                          extra=(uri, tuple(notifications), tuple(unlisted)))

    def tail(self, tally: Tally, parts_extra: list[Any]) -> str:
        rules = rule_descriptors()
        rules.append(_extra_descriptor(UNREADABLE))
        listed = {d["id"] for d in rules}
        artifacts: list[str] = []
        notifications: list[str] = []
        for uri, file_notifications, unlisted in parts_extra:
            artifacts.append(_encode({"location": {"uri": uri}}))
            notifications.extend(file_notifications)
            for rule in unlisted:
                if rule not in listed:
                    listed.add(rule)
                    rules.append(_extra_descriptor(rule))
        driver = {"name": "sheetlint", "version": __version__,
                  "semanticVersion": __version__, "rules": rules}
        return ("\n],\n"
                f'"artifacts": [{", ".join(artifacts)}],\n'
                f'"invocations": [{{"executionSuccessful": {_encode(not notifications)}, '
                f'"toolExecutionNotifications": [{", ".join(notifications)}]}}],\n'
                f'"tool": {{"driver": {_encode(driver)}}},\n'
                f'"columnKind": "unicodeCodePoints", '
                f'"properties": {{"caution": {_encode(CAUTION)}}}}}]}}\n')


def payload(results: list[FileResult]) -> dict[str, Any]:
    """The SARIF log as a JSON-ready dict."""
    return json.loads(render(results))


def render(results: list[FileResult]) -> str:
    """The whole log (without its final newline), as the stream writes it."""
    return render_all(SarifReport(), results)[:-1]
