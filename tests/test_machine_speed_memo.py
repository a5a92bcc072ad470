"""The machine relations share solved results per sheet: a later sheet must never see them.

The expected values come from the dq model (sheetlint.physics.dq) solved directly for each
sheet's own machine, not from the relations, so a memo that leaked from one sheet to the next
(or survived a change of the sheet) shows up as the other machine's current in the message.
"""

from __future__ import annotations

from sheetlint.engine.core import Finding, Known, Sheet
from sheetlint.physics.dq import RPM, SQRT2, DqMachine, ke_from_flux_linkage, operating_point
from sheetlint.relations.machine import (
    DqOperatingPoint,
    FieldWeakeningSpeed,
    OverspeedEmf,
    PullOutMargin,
    VoltageLimitRelation,
)
from sheetlint.relations.servo import ShortCircuitCurrent

IN_REGISTRY_ORDER = (DqOperatingPoint, VoltageLimitRelation, FieldWeakeningSpeed, OverspeedEmf,
                     PullOutMargin, ShortCircuitCurrent)
SPEED = 3000 * RPM
TORQUE = 91.47


def sheet_of(machine: DqMachine, with_resistance: bool = True) -> Sheet:
    values = {
        "machine.poles": Known(2.0 * machine.pole_pairs),
        "emf.constant_hot": Known(ke_from_flux_linkage(machine.flux_linkage,
                                                       machine.pole_pairs), 1e-4),
        "circuit.ld": Known(machine.ld, 1e-4),
        "circuit.lq": Known(machine.lq, 1e-4),
        "rated.torque": Known(TORQUE, 1e-4),
        "rated.speed": Known(SPEED, 1e-4),
        "rated.voltage": Known(400.0, 1e-3),
        "rated.current": Known(60.0, 1e-3),
        "supply.dc_link_voltage": Known(650.0, 1e-3),
    }
    if with_resistance:
        values["circuit.resistance_hot"] = Known(machine.resistance, 1e-4)
    return Sheet("memo", values, {"machine.topology": "ipm"})


def check_all(sheet: Sheet) -> dict[str, list[Finding]]:
    return {relation.rule: list(relation().check(sheet)) for relation in IN_REGISTRY_ORDER}


def model_current(machine: DqMachine) -> str:
    """The rated-point current the dq-operating-point summary must print for ``machine``."""
    return f"I = {operating_point(machine, TORQUE, SPEED, 400.0).current_rms:.4g} A"


def characteristic(machine: DqMachine) -> str:
    """The characteristic current field-weakening-speed must print for ``machine``."""
    return f"ψ/L_d = {machine.flux_linkage / machine.ld / SQRT2:.4g} A rms"


def says(findings: list[Finding], text: str) -> bool:
    return bool(findings) and all(text in f.message for f in findings)


def test_a_second_sheet_gets_its_own_model_not_the_first_ones() -> None:
    first = DqMachine(0.100, 1.0e-3, 2.5e-3, 0.050, 4)
    second = DqMachine(0.090, 1.4e-3, 2.0e-3, 0.080, 4)
    assert model_current(first) != model_current(second)
    check_all(sheet_of(first))
    findings = check_all(sheet_of(second))
    assert says(findings["dq-operating-point"], model_current(second))
    assert says(findings["field-weakening-speed"], characteristic(second))
    # and back: the first machine again, on a new sheet, after the second one
    findings = check_all(sheet_of(first))
    assert says(findings["dq-operating-point"], model_current(first))
    assert says(findings["field-weakening-speed"], characteristic(first))


def test_a_value_added_to_the_same_sheet_is_seen_by_the_next_check() -> None:
    machine = DqMachine(0.100, 1.0e-3, 2.5e-3, 0.050, 4)
    sheet = sheet_of(machine, with_resistance=False)
    assert says(check_all(sheet)["dq-operating-point"], "no resistance given")
    sheet.values["circuit.resistance_hot"] = Known(machine.resistance, 1e-4)
    after = check_all(sheet)["dq-operating-point"]
    assert says(after, model_current(machine))
    assert not any("no resistance given" in f.message for f in after)
