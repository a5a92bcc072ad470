"""A short commissioning checklist from the findings of the existing rules.

Each item names what to look at before the first start and the rules whose findings decide it:
``attention`` when one of them raised a warning or an error, ``ok`` when they ran and found
nothing to warn about, ``not_checked`` when the sheet lacks what they need. The standstill item
also sets the standstill voltage for rated current against what a converter resolves at low
speed.
"""

from __future__ import annotations

from sheetlint.engine.core import Finding

from .values import ChecklistItem, Parameter

#: the voltage error of a converter's output at low speed, line volts: dead time and the
#: forward drops of the semiconductors amount to "a few volts" (common practice, no published
#: source); the standstill voltage for rated current should stand well above it
LOW_SPEED_VOLTAGE_ERROR_V = 3.0
#: the standstill voltage should be at least this many times the low-speed voltage error
#: (common practice: a voltage error of half the voltage distorts resistance identification and
#: open-loop starting torque noticeably)
STANDSTILL_VOLTAGE_RATIO = 2.0

ITEMS: tuple[tuple[str, tuple[str, ...]], ...] = (
    ("back-EMF at maximum speed against the DC link", ("overspeed-emf",)),
    ("rated voltage against the hot back-EMF", ("voltage-margin",)),
    ("pull-out margin in open-loop U/f operation", ("pull-out-margin",)),
    ("maximum speed within reach of field weakening", ("field-weakening-speed",)),
    ("standstill voltage for rated current against the converter's low-speed voltage",
     ("resistance-drop",)),
)


def checklist(findings: list[Finding], parameters: list[Parameter]) -> list[ChecklistItem]:
    """The checklist of one record, from its engine findings and its parameter set."""
    out = []
    for title, rules in ITEMS:
        mine = [f for f in findings if f.rule in rules and f.accepted is None]
        loud = [f for f in mine if f.severity in ("warning", "error")]
        status = "attention" if loud else ("ok" if mine else "not_checked")
        messages = [f"{f.severity}: {f.message}" for f in loud] or [f.message for f in mine]
        item = ChecklistItem(title, rules, status, messages)
        if rules == ("resistance-drop",):
            _standstill(item, parameters)
        if rules == ("overspeed-emf",):
            _unsafe_end(item, parameters)
        out.append(item)
    doubted = [p for p in parameters if p.doubts]
    rules_seen = tuple(sorted({d.split("(", 1)[1].split(")", 1)[0] for p in doubted
                               for d in p.doubts}))
    out.insert(0, ChecklistItem(
        "motor data the record check doubts (confirm with the manufacturer before entering)",
        rules_seen, "attention" if doubted else "ok",
        [f"{p.label}: {d}" for p in doubted for d in p.doubts] or
        ["no warning or error of the record check touches a value of the parameter set"]))
    return out


def _standstill(item: ChecklistItem, parameters: list[Parameter]) -> None:
    found = [p for p in parameters if p.name == "standstill_voltage"]
    if not found:
        return
    volts = found[0].value
    least = LOW_SPEED_VOLTAGE_ERROR_V * STANDSTILL_VOLTAGE_RATIO
    if volts < least:
        item.status = "attention"
        item.messages.append(
            f"rated current needs only {volts:.3g} V line at standstill, less than "
            f"{STANDSTILL_VOLTAGE_RATIO:g}× the few volts ({LOW_SPEED_VOLTAGE_ERROR_V:g} V, "
            "common practice) a converter's output is uncertain by at low speed: expect the "
            "identified resistance and the open-loop starting torque to be imprecise; use the "
            "converter's dead-time compensation or a closed-loop start")
    else:
        item.messages.append(
            f"rated current needs {volts:.3g} V line at standstill, well above the few volts "
            f"({LOW_SPEED_VOLTAGE_ERROR_V:g} V, common practice) a converter resolves at low "
            "speed")
        if item.status == "not_checked":
            item.status = "ok"


def _unsafe_end(item: ChecklistItem, parameters: list[Parameter]) -> None:
    """An unstated Ke basis: the maximum speed against the DC-link speed of the per-phase
    reading (the unsafe end)."""
    by_name = {p.name: p for p in parameters}
    unsafe = by_name.get("dc_link_speed_if_per_phase")
    if unsafe is None:
        return
    top = by_name.get("max_speed") or by_name.get("rated_speed")
    if top is not None and top.value >= unsafe.value:
        item.status = "attention"
        item.messages.append(
            f"the sheet does not state the basis of Ke: read per phase, the back-EMF reaches "
            f"the DC link at {unsafe.text} r/min, at or below the {top.label} {top.text} r/min; "
            "confirm the basis with the manufacturer before running there")
    else:
        item.messages.append(
            f"the sheet does not state the basis of Ke: even read per phase (the unsafe end) "
            f"the back-EMF reaches the DC link only at {unsafe.text} r/min")
