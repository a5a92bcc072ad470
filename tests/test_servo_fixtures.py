"""The servo catalogue demo data (fixtures/servo/, invented): the consistent family raises
nothing, each planted slip is flagged on its field with its cause.

The figures were worked out by tools/make_servo_fixtures.py from each motor's design values with
the textbook definitions (see tests/test_servo_relations.py for the sources); these tests are
end-to-end guards of the command line on that data.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from sheetlint.cli import main

SERVO = Path(__file__).resolve().parent.parent / "fixtures" / "servo"


def findings_of(capsys, path: Path) -> tuple[int, list[list[dict]]]:
    status = main(["check", "--format", "json", str(path)])
    out = json.loads(capsys.readouterr().out)
    return status, [r["findings"] for r in out["files"][0]["records"]]


def test_consistent_servo_family_raises_nothing(capsys):
    status, records = findings_of(capsys, SERVO / "consistent-servo-family.yaml")
    assert len(records) == 5
    for findings in records:
        assert [f for f in findings if f["severity"] != "info"] == []
        assert not [f for f in findings if f["rule"] == "unknown-field"]
    assert status == 0


#: planted file -> (field flagged, words of the cause naming that field)
PLANTED = {
    "planted-mechanical-time-constant-line-r.yaml": (
        "dynamics.mechanical_time_constant", "terminal (line) resistance as if it were per phase"),
    "planted-motor-constant-line-r.yaml": ("dynamics.motor_constant", "√(line resistance)"),
    "planted-standstill-current-peak.yaml": ("points[0].current", "peak, not rms"),
    "planted-no-load-speed-dc-as-rms.yaml": ("limits.no_load_speed",
                                             "DC supply taken as a line rms voltage"),
    "planted-time-constant-in-s.yaml": ("dynamics.electrical_time_constant", "in ms, labelled s"),
}


def _hits(capsys, name: str) -> list[dict]:
    field, _ = PLANTED[name]
    _, records = findings_of(capsys, SERVO / name)
    # standstill T/I against Kt is a rule of emf-constant (the torque constant's family)
    return [f for f in records[0] if f["rule"] in ("servo-constants", "emf-constant")
            and f["severity"] in ("error", "warning") and field in f["fields"]]


@pytest.mark.parametrize("name", sorted(PLANTED))
def test_each_planted_servo_slip_is_flagged_on_its_field(capsys, name):
    assert _hits(capsys, name)


@pytest.mark.parametrize("name", sorted(PLANTED))
def test_each_planted_servo_slip_names_its_cause(capsys, name):
    field, words = PLANTED[name]
    hits = _hits(capsys, name)
    assert any(field in (f["cause"] or "") and words in (f["cause"] or "") for f in hits), hits


