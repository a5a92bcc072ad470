"""The JSON output contract of DESIGN.md ("Output contract"). Formats only."""

from __future__ import annotations

import json
from typing import Any

from sheetlint import __version__
from sheetlint.batch import FileResult
from sheetlint.engine.run import derived_payload


def summary(results: list[FileResult]) -> dict[str, int]:
    counts = {"files": len(results), "records": 0, "error": 0, "warning": 0, "info": 0}
    for f in results:
        counts["records"] += len(f.records)
        for r in f.records:
            for finding in r.findings:
                if finding.suppressed is None:
                    counts[finding.severity] += 1
    suppressed = sum(1 for f in results for r in f.records for x in r.findings
                     if x.suppressed is not None)
    if suppressed:
        counts["suppressed"] = suppressed
    return counts


def payload(results: list[FileResult]) -> dict[str, Any]:
    return {
        "tool": "sheetlint",
        "version": __version__,
        "files": [
            {"path": f.path, "error": f.error,
             **({"skipped": f.skipped} if getattr(f, "skipped", None) else {}),
             "records": [{"id": r.id, "error": r.error,
                          "findings": [x.to_dict() for x in r.findings],
                          "derived": derived_payload(r.derived)} for r in f.records]}
            for f in results
        ],
        "summary": summary(results),
    }


def render(results: list[FileResult]) -> str:
    return json.dumps(payload(results), indent=2, ensure_ascii=False)
