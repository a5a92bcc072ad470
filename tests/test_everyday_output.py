"""Everyday use of ``check``: the quiet default, --notes, coverage, numbers in the JSON output,
files that hold no machine record, and help text on every option."""

from __future__ import annotations

import argparse
import json
import math
import re
import tomllib
from pathlib import Path

import pytest

from sheetlint.cautions import FINDING_CAUTION, SHORT_CAUTION
from sheetlint.cli import _parser, main
from tests.conftest import pmx15

ROOT = Path(__file__).resolve().parent.parent
FIXTURES = ROOT / "fixtures"


def _check(capsys: pytest.CaptureFixture[str], *argv: str) -> tuple[int, str, str]:
    status = main(["check", "--no-settings", "--no-progress", *argv])
    out = capsys.readouterr()
    return status, out.out, out.err


# --- the quiet default --------------------------------------------------------------------------
def test_demo_run_prints_only_the_real_findings_summary_and_one_cautions_line(
        capsys: pytest.CaptureFixture[str]):
    status, out, _ = _check(capsys, str(FIXTURES), "--format", "json")
    data = json.loads(out)
    serious = [(f["rule"], f["severity"]) for file in data["files"] for r in file["records"]
               for f in r["findings"] if f["severity"] != "info"]
    status_text, text, _ = _check(capsys, str(FIXTURES))
    assert status == status_text == 1  # the demo set holds planted errors
    lines = text.splitlines()
    finding_lines = [x for x in lines if re.match(r"^ {4}(error|warning|note|accepted) ", x)]
    assert len(finding_lines) == len(serious)
    assert not any(x.startswith("    note ") for x in lines)
    assert sum(1 for x in lines if x.startswith("Caution:")) == 1
    assert lines[-1] == SHORT_CAUTION
    assert lines[-2].startswith("Checked ") and "(shown with --notes)" in lines[-2]
    # the long caution is not repeated per finding; a safety finding points to it instead
    assert FINDING_CAUTION not in text
    assert "safety: read the cautions" in text and "sheetlint rules overspeed-emf" in text
    # consistent demo records print nothing at all
    assert "consistent-spm-160k" not in text


def test_record_header_is_our_own_and_units_have_one_spelling(
        capsys: pytest.CaptureFixture[str]):
    _, text, _ = _check(capsys, str(FIXTURES / "planted-emf-above-voltage.yaml"), "--notes")
    assert " :: " not in text
    assert "Machine NHE-PM 160-15 HV  (" in text
    assert not re.search(r"\d\s*rpm\b", text)  # speeds are r/min throughout
    assert "r/min" in text and "N*m" not in text


def test_notes_add_infos_every_record_and_a_coverage_line(capsys: pytest.CaptureFixture[str]):
    _, quiet, _ = _check(capsys, str(FIXTURES / "consistent-spm-5k5-dosing-pump.yaml"))
    assert "AQ-DP 5.5-30" not in quiet
    _, text, _ = _check(capsys, str(FIXTURES / "consistent-spm-5k5-dosing-pump.yaml"),
                        "--notes")
    assert "Machine AQ-DP 5.5-30  (" in text
    assert "    note     voltage-margin" in text
    assert re.search(r"    coverage: \d+ rules checked", text)


# --- coverage -------------------------------------------------------------------------------
TWO_VALUES = """\
id: "Invented PDF row (invented)"
rated: {power: "15 kW", speed: "1500 rpm"}
"""


def test_a_record_with_two_values_says_what_would_let_more_rules_run(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]):
    path = tmp_path / "row.yaml"
    path.write_text(TWO_VALUES, encoding="utf-8")
    status, out, _ = _check(capsys, str(path), "--format", "json")
    assert status == 0
    coverage = json.loads(out)["files"][0]["records"][0]["coverage"]
    assert "value-range" in coverage["checked"]
    # P = T·ω needs the torque as well (two of three values say nothing)
    assert coverage["not_checked"]["power-torque-speed"] == ["rated.torque"]
    assert {"circuit.ld", "circuit.lq"} <= set(coverage["not_checked"]["dq-operating-point"])
    _, text, _ = _check(capsys, str(path), "--notes")
    assert "give rated.torque to check power, torque and speed (power-torque-speed)" in text
    assert ": ok" not in text


def test_coverage_counts_a_complete_relation_as_checked(tmp_path: Path,
                                                        capsys: pytest.CaptureFixture[str]):
    path = tmp_path / "m.yaml"
    path.write_text(pmx15(), encoding="utf-8")
    _, out, _ = _check(capsys, str(path), "--format", "json")
    coverage = json.loads(out)["files"][0]["records"][0]["coverage"]
    for rule in ("power-torque-speed", "synchronous-speed", "electrical-power"):
        assert rule in coverage["checked"]
        assert rule not in coverage["not_checked"]


def test_coverage_leaves_out_rules_not_chosen(tmp_path: Path, capsys: pytest.CaptureFixture[str]):
    path = tmp_path / "m.yaml"
    path.write_text(pmx15(), encoding="utf-8")
    _, out, _ = _check(capsys, str(path), "--format", "json", "--only", "power-torque-speed")
    coverage = json.loads(out)["files"][0]["records"][0]["coverage"]
    assert coverage["checked"] == ["power-torque-speed"]
    assert coverage["not_checked"] == {}


# --- numbers beside the strings in JSON -------------------------------------------------------
def test_expected_and_actual_values_are_numbers_with_units(capsys: pytest.CaptureFixture[str]):
    _, out, _ = _check(capsys, str(FIXTURES / "planted-hp-as-kw.yaml"), "--format", "json")
    findings = json.loads(out)["files"][0]["records"][0]["findings"]
    torque = next(f for f in findings if f["rule"] == "power-torque-speed")
    # the finding names the field to correct first, with its value under the reading that fits:
    # 20 "kW" read as 20 hp = 20 × 745.6999 W (NIST SP 811 (2008), App. B) = 14.914 kW
    assert torque["fields"][0] == "rated.power"
    assert torque["expected"]["rated.power"].endswith("kW")  # the strings stay
    expected = torque["expected_values"]["rated.power"]
    assert expected["unit"] == "kW"
    assert math.isclose(expected["value"], 20 * 745.6999 / 1000, rel_tol=1e-4)
    assert torque["actual_values"]["rated.power"] == {"value": 20.0, "unit": "kW"}


def test_a_bound_given_as_text_keeps_its_comparison(capsys: pytest.CaptureFixture[str]):
    _, out, _ = _check(capsys, str(FIXTURES / "planted-emf-above-voltage.yaml"),
                       "--format", "json")
    findings = json.loads(out)["files"][0]["records"][0]["findings"]
    overspeed = next(f for f in findings if f["rule"] == "overspeed-emf"
                     and f["severity"] == "warning")
    value = overspeed["expected_values"]["limits.max_speed"]
    assert value["bound"] == "≤" and value["value"] > 0
    for finding in findings:  # every finding carries both maps, possibly empty
        assert isinstance(finding["expected_values"], dict)
        assert isinstance(finding["actual_values"], dict)


# --- files that hold no machine record ---------------------------------------------------------
WORKFLOW = """\
name: data checks
on: [push]
jobs:
  check:
    runs-on: ubuntu-latest
    steps:
      - uses: actions/checkout@v4
"""
PACKAGE_JSON = '{"name": "motor-data-site", "version": "1.0.0", "scripts": {"build": "x"}}'


def test_a_repository_with_a_workflow_and_package_json_is_not_exit_2(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]):
    (tmp_path / "motors").mkdir()
    (tmp_path / "motors" / "good.yaml").write_text(pmx15(), encoding="utf-8")
    (tmp_path / "ci").mkdir()
    (tmp_path / "ci" / "data-checks.yml").write_text(WORKFLOW, encoding="utf-8")
    (tmp_path / "package.json").write_text(PACKAGE_JSON, encoding="utf-8")
    status, out, _ = _check(capsys, str(tmp_path), "--format", "json")
    assert status == 0, out
    data = json.loads(out)
    skipped = {Path(f["path"]).name: f["skipped"] for f in data["files"] if "skipped" in f}
    assert set(skipped) == {"data-checks.yml", "package.json"}
    assert "holds no machine record" in skipped["package.json"]
    assert data["summary"]["skipped"] == 2 and data["summary"]["records"] == 1
    # named one by one, as pre-commit does, the same
    status, text, _ = _check(capsys, str(tmp_path / "package.json"),
                             str(tmp_path / "motors" / "good.yaml"), "--notes")
    assert status == 0
    assert "package.json: skipped, holds no machine record" in text


def test_a_broken_record_is_still_an_error_not_skipped(tmp_path: Path,
                                                       capsys: pytest.CaptureFixture[str]):
    # it has a record's section, so it is meant as a record: the missing id is exit 2
    path = tmp_path / "m.yaml"
    path.write_text('rated: {power: "15 kW"}\n', encoding="utf-8")
    status, _, err = _check(capsys, str(path))
    assert status == 2 and "id" in err


# --- help and the test command ------------------------------------------------------------------
def _subparsers(parser: argparse.ArgumentParser) -> dict[str, argparse.ArgumentParser]:
    for action in parser._actions:
        if isinstance(action, argparse._SubParsersAction):
            return dict(action.choices)
    return {}


def test_every_option_of_every_subcommand_has_help_text():
    parser = _parser()
    commands = _subparsers(parser)
    assert {"check", "report", "derive", "extract", "rules", "schema"} <= set(commands)
    assert "explain" not in commands
    for name, command in commands.items():
        for action in command._actions:
            if isinstance(action, argparse._HelpAction):
                continue
            assert action.help, (name, action.dest)
    for removed in ("--select", "--ignore", "--quiet", "--config", "--no-config"):
        assert removed not in commands["check"]._option_string_actions


def test_the_test_command_prints_the_passed_line():
    # pytest prints "N passed" unless -q is given twice; `python -m pytest` adds addopts
    options = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    addopts = options["tool"]["pytest"]["ini_options"].get("addopts", "")
    quiet = sum(part.count("q") for part in addopts.split() if re.fullmatch(r"-q+", part))
    quiet += addopts.split().count("--quiet")
    assert quiet <= 1
