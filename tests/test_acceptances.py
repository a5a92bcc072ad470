"""Per-record acceptances are visible in every output format and do not fail the run.

The planted error: a torque 15 % above P/omega (P = T*omega, SI definition of the watt) gives a
``power-torque-speed`` error; the record's ``accepted`` entry names that rule, the field and
a reason.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from sheetlint.cli import main
from tests.conftest import pmx15

REASON = "vendor confirmed: torque listed at the reduced-speed point"

RECORD = pmx15("Invented PMX-15B", torque="110 N*m")


def _write(tmp_path: Path, accepted: str = "", name: str = "motor.yaml") -> str:
    path = tmp_path / name
    path.write_text(RECORD + accepted, encoding="utf-8")
    return name


ACCEPT_TORQUE = f"""\
accepted:
  - rule: power-torque-speed
    fields: [rated.torque]
    reason: "{REASON}"
"""


@pytest.fixture(autouse=True)
def _in_tmp(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)


def _run(capsys: pytest.CaptureFixture[str], *argv: str) -> tuple[int, str, str]:
    status = main(["check", "--no-settings", *argv])
    out = capsys.readouterr()
    return status, out.out, out.err


def test_planted_torque_error_fails_without_acceptance(tmp_path: Path,
                                                        capsys: pytest.CaptureFixture[str]):
    # control for the tests below: P = T*omega (SI definition) fails by 15 %
    name = _write(tmp_path)
    status, out, _ = _run(capsys, name)
    assert status == 1
    assert "error    power-torque-speed" in out


def test_text_shows_accepted_finding_with_reason_and_exit_0(tmp_path: Path,
                                                              capsys: pytest.CaptureFixture[str]):
    name = _write(tmp_path, ACCEPT_TORQUE)
    status, out, _ = _run(capsys, name)
    assert status == 0
    line = next(x for x in out.splitlines() if "power-torque-speed" in x)
    assert line.lstrip().startswith("accepted power-torque-speed")
    assert f"accepted in the record (error): {REASON}" in out
    assert "0 errors" in out and "1 accepted" in out


def test_json_has_accepted_reason_and_summary_excludes_it(tmp_path: Path,
                                                            capsys: pytest.CaptureFixture[str]):
    name = _write(tmp_path, ACCEPT_TORQUE)
    status, out, _ = _run(capsys, name, "--format", "json")
    assert status == 0
    data = json.loads(out)
    findings = data["files"][0]["records"][0]["findings"]
    torque = [f for f in findings if f["rule"] == "power-torque-speed"]
    assert len(torque) == 1
    assert torque[0]["severity"] == "error"  # kept, not hidden
    assert torque[0]["accepted"] == REASON
    assert all("accepted" not in f for f in findings if f["rule"] != "power-torque-speed")
    assert data["summary"]["error"] == 0
    assert data["summary"]["accepted"] == 1


def test_sarif_marks_acceptance_in_source_with_justification(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]):
    name = _write(tmp_path, ACCEPT_TORQUE)
    status, out, _ = _run(capsys, name, "--format", "sarif")
    assert status == 0
    results = json.loads(out)["runs"][0]["results"]
    torque = [r for r in results if r["ruleId"] == "power-torque-speed"]
    assert len(torque) == 1
    assert torque[0]["level"] == "error"
    assert torque[0]["suppressions"] == [
        {"kind": "inSource", "status": "accepted", "justification": REASON}]
    assert all("suppressions" not in r for r in results if r["ruleId"] != "power-torque-speed")


def test_html_shows_accepted_row_with_reason(tmp_path: Path,
                                               capsys: pytest.CaptureFixture[str]):
    name = _write(tmp_path, ACCEPT_TORQUE)
    status = main(["report", "--no-settings", name, "-o", "report.html"])
    capsys.readouterr()
    assert status == 0
    html = (tmp_path / "report.html").read_text(encoding="utf-8")
    row = next(r for r in html.split("<tr") if "power-torque-speed" in r)
    assert 'class="accepted' in row
    assert REASON in row  # no character of the reason needs escaping


def test_accepted_finding_does_not_fail_even_at_fail_on_warning(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]):
    name = _write(tmp_path, ACCEPT_TORQUE)
    status, out, _ = _run(capsys, name, "--fail-on", "warning", "--format", "json")
    data = json.loads(out)
    active = [f for f in data["files"][0]["records"][0]["findings"]
              if "accepted" not in f and f["severity"] in ("error", "warning")]
    assert status == (1 if active else 0)
    assert not any(f["rule"] == "power-torque-speed" for f in active)


def test_acceptance_of_another_field_leaves_the_error_and_reports_the_stale_entry(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]):
    name = _write(tmp_path, f"""\
accepted:
  - rule: power-torque-speed
    fields: [supply.dc_link_voltage]
    reason: "{REASON}"
""")
    status, out, _ = _run(capsys, name, "--format", "json")
    assert status == 1
    findings = json.loads(out)["files"][0]["records"][0]["findings"]
    torque = next(f for f in findings if f["rule"] == "power-torque-speed")
    assert "accepted" not in torque
    stale = [f for f in findings if f["rule"] == "stale-acceptance"]
    assert len(stale) == 1 and "power-torque-speed" in stale[0]["message"]
    assert stale[0]["severity"] == "info"


def test_stale_acceptance_is_reported_as_a_note_with_notes(tmp_path: Path,
                                                       capsys: pytest.CaptureFixture[str]):
    (tmp_path / "ok.yaml").write_text(
        RECORD.replace('"110 N*m"', '"95.5 N*m"')
        + 'accepted:\n  - {rule: synchronous-speed, reason: "old note"}\n', encoding="utf-8")
    status, out, _ = _run(capsys, "ok.yaml")
    assert status == 0 and "stale-acceptance" not in out  # a note: quiet by default
    status, out, _ = _run(capsys, "ok.yaml", "--notes")
    assert status == 0
    assert "stale-acceptance" in out
    assert "acceptance of 'synchronous-speed' no longer matches" in out


def test_acceptance_without_reason_is_an_unreadable_record(tmp_path: Path,
                                                            capsys: pytest.CaptureFixture[str]):
    name = _write(tmp_path, "accepted:\n  - rule: power-torque-speed\n")
    status, _, err = _run(capsys, name)
    assert status == 2
    assert "reason" in err


def test_the_old_suppress_key_is_not_an_acceptance(tmp_path: Path,
                                                    capsys: pytest.CaptureFixture[str]):
    # no alias: `suppress` is an unknown field (an info), and the error still fails the run
    name = _write(tmp_path, f'suppress:\n  - {{rule: power-torque-speed, reason: "{REASON}"}}\n')
    status, out, _ = _run(capsys, name, "--format", "json")
    assert status == 1
    findings = json.loads(out)["files"][0]["records"][0]["findings"]
    assert not any("accepted" in f for f in findings)
