"""Issue 16: no cause contradicts what the sheet states (its unit, its basis).

Every cause sheetlint names on the demo data and on the independent realistic-catalogue sample
(tools/realistic_catalogue.py, consistent and with one planted slip each) is read back against
the record: a unit reading ("the value is in hp, labelled kW") must quote the unit the sheet
writes; a basis reading ("…, not line-to-line rms as stated") must quote the basis the sheet
states, or the default one when it states none ("as read by default"). The reference is the
record as written, not the engine's reading of it.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
import yaml

from sheetlint.engine.causes import BASIS_WORDS
from sheetlint.fields import BASES, spec_for
from tests.conftest import run
from tools.realistic_catalogue import SLIPS, consistent, planted

FIXTURES = Path(__file__).resolve().parent.parent / "fixtures"
CAUSE = re.compile(r"(?P<fields>[\w.\[\]]+(?: and [\w.\[\]]+)*): agrees if (?P<reading>.*) \(")


def _written(data: dict, path: str) -> object:
    node: object = data
    for part in re.split(r"\.(?![^\[]*\])", path):
        match = re.fullmatch(r"(\w+)\[(\d+)\]", part)
        if match:
            node = node.get(match[1], [])[int(match[2])] if isinstance(node, dict) else None
        else:
            node = node.get(part) if isinstance(node, dict) else None
        if node is None:
            return None
    return node


def _unit_and_basis(data: dict, path: str) -> tuple[str | None, str | None]:
    raw = _written(data, path)
    if isinstance(raw, dict):
        unit = raw.get("unit")
        if unit is None and isinstance(raw.get("value"), str):
            unit = raw["value"].partition(" ")[2] or None
        return unit, raw.get("basis")
    if isinstance(raw, str):
        return raw.partition(" ")[2] or None, None
    return None, None


def _problems(data: dict) -> list[str]:
    out = []
    for finding in run(data).findings:
        for cause in (finding.cause or "").split("; or "):
            match = CAUSE.match(cause)
            if not match:
                continue
            for path in match["fields"].split(" and "):
                reading = match["reading"]
                unit, basis = _unit_and_basis(data, path)
                labelled = re.search(r"labelled (\S+)$", reading)
                if labelled and unit is not None and labelled[1] != unit.strip():
                    out.append(f"{path}: '{cause}' but the sheet writes {unit!r}")
                spec = spec_for(path)
                kind = spec.kind if spec else None
                if kind in BASIS_WORDS and (" as stated" in reading or "by default" in reading):
                    default = BASES[kind][0]
                    words = BASIS_WORDS[kind][basis or default]
                    said = "as stated" if basis else "as read by default"
                    if f"not {words} {said}" not in reading:
                        out.append(f"{path}: '{cause}' but the sheet has basis {basis!r}")
    return out


@pytest.mark.parametrize("path", sorted(FIXTURES.glob("**/*.yaml")), ids=lambda p: p.name)
def test_causes_on_the_demo_data_agree_with_the_sheet(path: Path):
    document = yaml.safe_load(path.read_text(encoding="utf-8"))
    if not isinstance(document, dict) or ("id" not in document and "records" not in document):
        pytest.skip("not a machine record")
    for data in document.get("records", [document]):
        assert _problems(data) == []


@pytest.mark.parametrize("slip", [s.name for s in SLIPS])
def test_causes_on_planted_catalogue_sheets_agree_with_the_sheet(slip: str):
    for seed in range(3):
        assert _problems(planted(slip, seed).record) == []


def test_causes_on_consistent_catalogue_sheets_are_none():
    for seed in range(5):
        for convention in ("industrial_magnet_stated", "servo", "unstated_bases"):
            record = consistent(convention, seed).record
            assert [f.cause for f in run(record).findings
                    if f.severity != "info" and f.cause] == []
