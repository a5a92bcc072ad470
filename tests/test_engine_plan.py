"""The engine's shortcuts change no result.

The derive loop skips a relation whose declared ``derive_outputs`` are all known. These tests
run the loop with and without that shortcut on generated machines with fields left out (so
that every derivation path is taken) and demand the same values, and check that no relation
fills a field it did not declare.
"""

from __future__ import annotations

import copy
import dataclasses
import re

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sheetlint.engine import run as engine_run
from sheetlint.engine.build import build_sheet
from sheetlint.engine.core import Settings
from sheetlint.engine.monomial import Monomial
from sheetlint.model import MachineRecord
from sheetlint.relations.registry import all_relations
from sheetlint.synth import MachineSpec, record

machines = st.builds(
    MachineSpec,
    power_kw=st.sampled_from([1.5, 5.5, 45, 160]),
    speed_rpm=st.sampled_from([750, 1500, 3000]),
    poles=st.sampled_from([4, 8, 10]),
    topology=st.sampled_from(["spm", "ipm"]),
)
#: fields a sheet may leave out, so that relations have something to derive
OPTIONAL = [("rated", "torque"), ("rated", "power"), ("rated", "frequency"),
            ("rated", "efficiency"), ("rated", "losses"), ("rated", "magnet_temperature"),
            ("machine", "poles"), ("emf", "constant"), ("circuit", "resistance")]


def _sheet(data: dict) -> object:
    sheet, _ = build_sheet(MachineRecord.model_validate(copy.deepcopy(data)), Settings())
    return sheet


def _snapshot(sheet: object) -> dict[str, tuple]:
    return {name: (k.value, k.uncertainty, k.origin, k.rule, k.inputs)
            for name, k in sheet.values.items()}  # type: ignore[attr-defined]


@settings(max_examples=120, deadline=None)
@given(machines, st.lists(st.sampled_from(OPTIONAL), max_size=4, unique=True),
       st.booleans())
def test_skipping_relations_with_known_outputs_changes_no_value(spec, dropped, ke_from_kt):
    data = record(spec, "PLAN")
    for section, name in dropped:
        data.get(section, {}).pop(name, None)
    if ke_from_kt and "constant" in data.get("emf", {}):
        data["torque_constant"] = "2.5 N*m/A"
        del data["emf"]["constant"]
    relations = all_relations()
    planned = engine_run._derive_plan(tuple(relations))

    shortcut = _sheet(data)
    engine_run.derive(shortcut, relations)  # type: ignore[arg-type]

    produced: list[tuple[str, str, frozenset[str] | None]] = []
    without = dataclasses.replace(planned, steps=tuple(
        (relation, None, always, per_point)
        for relation, _outputs, always, per_point in planned.steps))
    original_derive = {id(step[0]): step[0].derive for step in planned.steps}
    try:
        for relation, outputs, _always, _per_point in planned.steps:
            def traced(sheet, relation=relation, outputs=outputs):
                out = list(original_derive[id(relation)](sheet))
                produced.extend((relation.rule, d.field, outputs) for d in out)
                return iter(out)
            relation.derive = traced  # type: ignore[method-assign]
        engine_run._derive_plan.cache_clear()
        full = _sheet(data)
        original_plan = engine_run._derive_plan
        engine_run._derive_plan = lambda _relations: without  # type: ignore[assignment]
        try:
            engine_run.derive(full, relations)  # type: ignore[arg-type]
        finally:
            engine_run._derive_plan = original_plan
    finally:
        for step in planned.steps:
            del step[0].derive
        engine_run._derive_plan.cache_clear()

    assert _snapshot(shortcut) == _snapshot(full)
    for rule, field, outputs in produced:
        if outputs is not None:
            general = re.sub(r"^points\[\d+\]\.", "rated.", field)
            assert general in outputs, f"{rule} filled {field}, not in its derive_outputs"



def _finding_keys(result: object) -> list[tuple]:
    return [(f.rule, f.severity, f.message, f.fields, f.cause, f.expected, f.actual)
            for f in result.findings]  # type: ignore[attr-defined]


RULES = sorted({r.rule for r in all_relations()})
#: slips that break a sheet, so that failures and the cause diagnosis are selected too
SLIPS = [None, ("rated", "torque", 10.0), ("emf", "constant", 3 ** 0.5),
         ("circuit", "ld", 2.0), ("rated", "voltage", 3 ** 0.5)]


def _slipped(topology: str, slip: tuple[str, str, float] | None) -> dict:
    data = record(MachineSpec(power_kw=45, speed_rpm=1500, poles=8, topology=topology),
                  "SELECT")
    if slip is not None:
        section, name, factor = slip
        written = data[section][name]
        if isinstance(written, dict):
            written["value"] = float(f"{written['value'] * factor:.4g}")
        else:
            number, _, unit = written.partition(" ")
            data[section][name] = f"{float(number) * factor:.4g} {unit}"
    return data


@pytest.mark.parametrize("topology", ["spm", "ipm"])
@pytest.mark.parametrize("slip", SLIPS)
def test_a_rule_selection_leaves_the_selected_rules_findings_unchanged(topology, slip):
    """Rules left out are not shown; every rule is still checked and diagnosed, so the rules
    kept report the same findings (top-level or listed under the finding that names their
    cause) and the same causes as a run with every rule, the others dropped."""
    data = _slipped(topology, slip)
    full = engine_run.run_engine(MachineRecord.model_validate(copy.deepcopy(data)))
    if slip is not None:
        assert any(f.severity != "info" for f in full.findings)
    for rule in RULES:
        for narrowed in (Settings(only=frozenset({rule})), Settings(skip=frozenset({rule}))):
            part = engine_run.run_engine(MachineRecord.model_validate(copy.deepcopy(data)),
                                         narrowed)
            assert all(narrowed.enabled(f.rule) or f.rule == "unreadable"
                       for f in part.findings), (rule, narrowed)
            assert _reported_rules(part, narrowed) == _reported_rules(full, narrowed), \
                (rule, narrowed)
            causes = {_key(f): f.cause for f in full.findings}
            for f in part.findings:
                if _key(f) in causes and causes[_key(f)] is not None:
                    assert f.cause == causes[_key(f)], (rule, narrowed)


def _key(finding: object) -> tuple:
    return finding.rule, finding.fields  # type: ignore[attr-defined]


def _reported_rules(result: object, settings: Settings) -> list[str]:
    """The rules of every finding, top-level or grouped as a consequence, that are shown."""
    out = []
    for f in result.findings:  # type: ignore[attr-defined]
        out.append(f.rule)
        out.extend(c.split(":", 1)[0] for c in f.consequences)
    return sorted(r for r in out if settings.enabled(r))


@pytest.mark.parametrize("topology", ["spm", "ipm"])
@pytest.mark.parametrize("slip", SLIPS)
def test_a_monomials_own_check_reports_what_the_engine_reports(topology, slip):
    """``Monomial.check``, the library call, fails on the same fields by the same deviations
    as the engine's run (which adds the cause diagnosis to those findings afterwards)."""
    data = _slipped(topology, slip)
    full = engine_run.run_engine(MachineRecord.model_validate(copy.deepcopy(data)))
    monomials = [r for r in all_relations() if isinstance(r, Monomial)]
    monomial_rules = {r.rule for r in monomials}
    sheet = _sheet(data)
    engine_run.derive(sheet, all_relations())
    own = sorted((f.rule, f.fields[0], round(f.deviation or 0.0, 9))
                 for r in monomials for f in r.check(sheet))
    engine = sorted((f.rule, f.fields[0], round(f.deviation or 0.0, 9))
                    for f in full.findings if f.rule in monomial_rules)
    assert own == engine
    if slip is not None and slip[:2] == ("rated", "torque"):
        assert own  # the slip breaks P = T·ω at least
