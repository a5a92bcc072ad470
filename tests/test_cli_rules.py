"""``sheetlint rules`` and ``sheetlint explain``: documentation taken from the relations."""

from __future__ import annotations

import inspect
import json

import pytest

from sheetlint.cli import main
from sheetlint.relations.registry import all_relations, rule_ids


def _run(capsys: pytest.CaptureFixture[str], *argv: str) -> tuple[int, str, str]:
    status = main(list(argv))
    out = capsys.readouterr()
    return status, out.out, out.err


def test_rules_lists_every_rule_with_status_equation_and_source(
        capsys: pytest.CaptureFixture[str]):
    status, out, _ = _run(capsys, "rules")
    assert status == 0
    for relation in all_relations():
        assert f"{relation.rule}  [{relation.status}, " in out
        assert relation.kind in out
        assert relation.equation in out
        assert relation.source in out
    assert {r.status for r in all_relations()} <= {"stable", "preview"}


def test_rules_json_has_one_entry_per_rule(capsys: pytest.CaptureFixture[str]):
    status, out, _ = _run(capsys, "rules", "--format", "json")
    assert status == 0
    entries = json.loads(out)
    assert [e["rule"] for e in entries] == sorted(rule_ids())
    by_rule = {e["rule"]: e for e in entries}
    for relation in all_relations():
        entry = by_rule[relation.rule]
        assert relation.equation in entry["equations"]
        assert entry["status"] in ("stable", "preview")
        assert relation.source in entry["sources"] or not relation.source
        assert entry["severity_policy"] is not None


@pytest.mark.parametrize("status_filter", ["stable", "preview"])
def test_rules_status_filter(capsys: pytest.CaptureFixture[str], status_filter: str):
    _, out, _ = _run(capsys, "rules", "--format", "json", "--status", status_filter)
    listed = {e["rule"] for e in json.loads(out)}
    expected = {r.rule for r in all_relations() if r.status == status_filter}
    assert listed == expected
    _, text, _ = _run(capsys, "rules", "--status", status_filter)
    other = "preview" if status_filter == "stable" else "stable"
    assert f"[{other}," not in text


def test_explain_prints_the_docstring_status_and_source(capsys: pytest.CaptureFixture[str]):
    status, out, _ = _run(capsys, "explain", "power-torque-speed")
    assert status == 0
    relations = [r for r in all_relations() if r.rule == "power-torque-speed"]
    assert out.startswith(f"power-torque-speed ({relations[0].status})")
    for relation in relations:
        assert inspect.cleandoc(type(relation).__doc__ or "") in out
        assert relation.source in out


def test_explain_every_rule_prints_its_documentation(capsys: pytest.CaptureFixture[str]):
    for rule in rule_ids():
        status, out, _ = _run(capsys, "explain", rule)
        assert status == 0
        assert out.startswith(rule)


def test_explain_unknown_rule_is_exit_2_with_the_known_ids(capsys: pytest.CaptureFixture[str]):
    status, out, err = _run(capsys, "explain", "no-such-rule")
    assert status == 2
    assert out == ""
    assert "unknown rule 'no-such-rule'" in err and "power-torque-speed" in err
