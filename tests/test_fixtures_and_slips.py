"""The demo data and the usual slips: each planted fault found, field and cause named.

Consistent machines come from the generator in sheetlint.synth (a dq model with MTPA and a loss
model); a slip is applied to one field and the engine must name that field and the slip.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from sheetlint.cli import main
from tests.conftest import run, serious

FIXTURES = Path(__file__).resolve().parent.parent / "fixtures"


def _findings(capsys, *paths):
    status = main(["check", "--format", "json", *map(str, paths)])
    return status, json.loads(capsys.readouterr().out)


@pytest.mark.parametrize("path", sorted(FIXTURES.glob("consistent-*.yaml")), ids=lambda p: p.name)
def test_consistent_demo_machines_have_no_error_or_warning(path, capsys):
    status, out = _findings(capsys, path)
    findings = out["files"][0]["records"][0]["findings"]
    assert [f for f in findings if f["severity"] != "info"] == []
    assert status == 0


PLANTED = {
    "planted-ke-per-phase.yaml": ("emf-constant", "warning", "emf.constant", "per phase"),
    "planted-wrong-pole-count.yaml": ("synchronous-speed", "error", "rated.speed", None),
    "planted-hp-as-kw.yaml": ("power-torque-speed", "error", "rated.power", "hp"),
    "planted-emf-above-voltage.yaml": ("voltage-margin", "warning", "emf.constant", None),
    "planted-impossible-values.yaml": ("value-range", "error", "machine.poles", None),
    "planted-class-too-high.yaml": ("efficiency-class", "warning", "rated.efficiency", "IE4"),
}


@pytest.mark.parametrize("name", sorted(PLANTED))
def test_each_planted_fault_is_reported_with_rule_field_and_cause(name, capsys):
    rule, severity, field, cause = PLANTED[name]
    status, out = _findings(capsys, FIXTURES / name)
    findings = out["files"][0]["records"][0]["findings"]
    hits = [f for f in findings if f["rule"] == rule and f["severity"] == severity
            and field in f["fields"]]
    assert hits, findings
    if cause:
        assert any(cause in (f["cause"] or "") for f in hits)
    assert status == (1 if any(f["severity"] == "error" for f in findings) else 0)


def test_impossible_values_leave_the_other_relations_checked(capsys):
    _, out = _findings(capsys, FIXTURES / "planted-impossible-values.yaml")
    record = out["files"][0]["records"][0]
    assert record["error"] is None
    assert "rated.losses" not in record["derived"]  # η was left out, so no losses from it
    assert any(f["rule"] == "voltage-margin" for f in record["findings"])


# --- the usual slips, one field at a time, on a consistent generated machine -------------------
SQRT2, SQRT3 = math.sqrt(2), math.sqrt(3)


def _scale(data, section, name, factor, digits=4):
    node = data[section] if section else data
    value = node[name]
    if isinstance(value, dict):
        value["value"] = float(f"{value['value'] * factor:.{digits}g}")
        return
    number, _, unit = value.partition(" ")
    node[name] = f"{float(number) * factor:.{digits}g} {unit}".strip()


SLIPS = [
    # (section, field, factor, the field named, words in the cause)
    ("emf", "constant", 1 / SQRT3, "emf.constant", "per phase"),
    ("emf", "constant", SQRT2, "emf.constant", "peak"),
    (None, "torque_constant", 1.5, "torque_constant", "3/2"),
    ("rated", "torque", 1000, "rated.torque", "1000"),
    ("rated", "speed", 2 * math.pi / 60, "rated.speed", "rad/s"),
    ("rated", "frequency", 60, "rated.frequency", "per minute"),
    ("rated", "speed", 4, "rated.speed", "electrical"),
    ("rated", "power", 1 / 0.7456998715822702, "rated.power", "hp"),
    ("rated", "frequency", 1.2, "rated.frequency", "60 Hz"),
    ("rated", "current", SQRT3, "rated.current", "star/delta"),
    ("rated", "voltage", 1 / SQRT3, "rated.voltage", "per phase"),
]


@pytest.mark.parametrize("section,name,factor,field,words", SLIPS,
                         ids=[f"{s[1]}x{s[2]:.4g}" for s in SLIPS])
def test_usual_slip_is_detected_and_named(spm_15kw, section, name, factor, field, words):
    data = spm_15kw
    data["torque_constant"] = f"{data['emf']['constant']['value'] * 0.016540:.4g} N*m/A"
    assert not serious(run(data)), "the unmodified machine must be clean"
    _scale(data, section, name, factor)
    result = run(data)
    hits = [f for f in serious(result) if field in f.fields]
    assert hits, [(f.rule, f.fields, f.cause) for f in result.findings]
    assert any(words in (f.cause or "") and field in (f.cause or "") for f in hits), \
        [(f.rule, f.cause) for f in hits]


def test_unstated_basis_gives_a_warning_and_a_stated_one_an_error(spm_15kw):
    data = spm_15kw
    data["torque_constant"] = f"{data['emf']['constant']['value'] * 0.016540:.4g} N*m/A"
    data["emf"]["constant"]["value"] = round(data["emf"]["constant"]["value"] / SQRT3, 1)
    stated = run(data)
    data["emf"]["constant"].pop("basis")
    unstated = run(data)
    kt = [f for f in stated.findings if "torque_constant" in f.fields and f.rule == "emf-constant"]
    assert kt and kt[0].severity == "error"
    kt = [f for f in unstated.findings if "torque_constant" in f.fields
          and f.rule == "emf-constant"]
    assert kt and kt[0].severity == "warning" and "state" in kt[0].message


def test_resistance_given_line_to_line_is_named_by_the_copper_loss_bound(spm_15kw):
    data = spm_15kw
    data["circuit"]["resistance"]["value"] *= 30  # far beyond the losses
    result = run(data)
    assert any(f.rule == "loss-balance" and "circuit.resistance" in f.fields
               for f in serious(result))


def test_resistance_given_line_to_line_as_phase_is_named_with_the_factor_two():
    # copper loss 3·I²·R (DESIGN.md Bases): a terminal-to-terminal R read as phase doubles it.
    # Generated machine: copper 3 % of P, iron and friction 1.5 %: doubled copper > total losses
    from sheetlint.synth import MachineSpec, record

    data = record(MachineSpec(15, 1500, 8, copper_fraction=0.03), "SYN-R")
    resistance = data["circuit"]["resistance"]
    resistance.pop("basis")
    assert not [f for f in serious(run(data)) if f.rule == "loss-balance"]
    resistance["value"] = round(resistance["value"] * 2, 5)
    hits = [f for f in serious(run(data)) if f.rule == "loss-balance"]
    assert hits and "circuit.resistance" in hits[0].fields
    assert "line-to-line" in (hits[0].cause or "")
    assert hits[0].severity == "warning"  # the basis was not stated: a reading, not an error
