"""``sheetlint rules`` and ``sheetlint rules NAME``: documentation taken from the relations,
printed as plain text under our own headings."""

from __future__ import annotations

import json

import pytest

from sheetlint.cautions import CAUTIONS
from sheetlint.cli import main
from sheetlint.relations.registry import all_relations, rule_ids
from sheetlint.rules_doc import plain


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
        assert plain(relation.source) in out
    assert {r.status for r in all_relations()} <= {"established", "trial"}


def test_rules_json_has_one_entry_per_rule(capsys: pytest.CaptureFixture[str]):
    status, out, _ = _run(capsys, "rules", "--format", "json")
    assert status == 0
    entries = json.loads(out)
    assert [e["rule"] for e in entries] == sorted(rule_ids())
    by_rule = {e["rule"]: e for e in entries}
    for relation in all_relations():
        entry = by_rule[relation.rule]
        assert relation.equation in entry["equations"]
        assert entry["status"] in ("established", "trial")
        assert plain(relation.source) in entry["sources"] or not relation.source
        assert entry["severity_policy"] is not None


@pytest.mark.parametrize("status_filter", ["established", "trial"])
def test_rules_status_filter(capsys: pytest.CaptureFixture[str], status_filter: str):
    _, out, _ = _run(capsys, "rules", "--format", "json", "--status", status_filter)
    listed = {e["rule"] for e in json.loads(out)}
    expected = {r.rule for r in all_relations() if r.status == status_filter}
    assert listed == expected
    _, text, _ = _run(capsys, "rules", "--status", status_filter)
    other = "trial" if status_filter == "established" else "established"
    assert f"[{other}," not in text


def test_rules_name_prints_plain_text_under_our_headings(capsys: pytest.CaptureFixture[str]):
    status, out, _ = _run(capsys, "rules", "power-torque-speed")
    assert status == 0
    relation = next(r for r in all_relations() if r.rule == "power-torque-speed")
    assert out.startswith(f"power-torque-speed — {relation.title}")
    assert f"status: {relation.status}" in out
    for heading in ("What it checks", "Equation", "A sheet that fails", "What to do",
                    "Severity", "Sources"):
        assert f"\n{heading}\n" in out, heading
    assert relation.equation in out
    # the example that fails in the docstring, as plain text
    assert "15 kW, 1500 rpm, 110 N·m" in out


def test_every_rule_prints_without_markup_or_unshipped_citations(
        capsys: pytest.CaptureFixture[str]):
    for rule in rule_ids():
        status, out, _ = _run(capsys, "rules", rule)
        assert status == 0
        assert out.startswith(rule)
        for markup in (".. math::", "``", "REFERENCES.md", "from memory", ":math:"):
            assert markup not in out, (rule, markup)


def test_a_safety_rule_prints_the_full_cautions(capsys: pytest.CaptureFixture[str]):
    _, out, _ = _run(capsys, "rules", "overspeed-emf")
    flat = " ".join(out.split())
    assert "\nCautions\n" in out
    for caution in CAUTIONS:
        assert caution in flat


def test_unknown_rule_name_is_exit_2_with_the_known_ids(capsys: pytest.CaptureFixture[str]):
    status, out, err = _run(capsys, "rules", "no-such-rule")
    assert status == 2
    assert out == ""
    assert "unknown rule 'no-such-rule'" in err and "power-torque-speed" in err


def test_the_old_command_name_is_gone(capsys: pytest.CaptureFixture[str]):
    with pytest.raises(SystemExit) as caught:
        main(["explain", "power-torque-speed"])
    assert caught.value.code == 2
