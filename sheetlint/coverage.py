"""Coverage of one record: which rules could check it, and which missing fields would let the
others run ("give circuit.ld to check the rated point with the machine model").

A rule checks a record when one of its *input sets* is complete: every field of the set is
given or derived (estimates never count: no check uses them). The input sets come from the
relation's own declaration ``needs`` (a tuple of alternative field tuples) when it has one,
else from the table :data:`NEEDS` below, else from a monomial's terms. A rule that produced a
finding has checked, whatever the table says. Names ending in a non-physical attribute
(``machine.thermal_class``, ``efficiency_class``, ``machine.topology``...) are looked up among
the sheet's attributes.

Computed after the engine has run, from the sheet alone; it changes no finding.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from typing import Any

from sheetlint.engine.core import ESTIMATE, GIVEN
from sheetlint.relations.registry import all_relations

#: alternative input sets per rule (any one complete set lets the rule check the rated point)
NEEDS: Mapping[str, tuple[tuple[str, ...], ...]] = {
    "value-range": ((),),
    "pole-count": (("machine.poles",),),
    "power-torque-speed": (("rated.power", "rated.torque", "rated.speed"),),
    "synchronous-speed": (("rated.speed", "rated.frequency", "machine.poles"),),
    "electrical-power": (("rated.power", "rated.efficiency", "rated.voltage", "rated.current",
                          "rated.power_factor"),),
    "loss-balance": (("rated.losses", "rated.power", "rated.efficiency"),
                     ("rated.losses", "rated.current", "circuit.resistance")),
    "emf-constant": (("emf.constant", "torque_constant"),
                     ("emf.constant", "emf.voltage"),
                     ("emf.constant", "rated.torque", "rated.current")),
    "magnet-temperature": (("emf.constant", "rated.magnet_temperature"),),
    "temperature-rise": (("rated.temperature_rise", "machine.thermal_class"),),
    "voltage-margin": (("rated.voltage", "emf.constant", "rated.speed", "machine.topology"),),
    "resistance-drop": (("circuit.resistance", "rated.current", "rated.voltage"),),
    "dq-operating-point": (("emf.constant", "machine.poles", "rated.torque", "rated.speed",
                            "circuit.ld", "circuit.lq"),),
    "voltage-limit": (("rated.voltage", "supply.mains_voltage"),
                      ("rated.voltage", "supply.dc_link_voltage")),
    "field-weakening-speed": (("emf.constant", "circuit.ld", "rated.current",
                               "supply.mains_voltage"),
                              ("emf.constant", "circuit.ld", "rated.current",
                               "supply.dc_link_voltage")),
    "overspeed-emf": (("emf.constant", "supply.mains_voltage"),
                      ("emf.constant", "supply.dc_link_voltage")),
    "pull-out-margin": (("rated.voltage", "rated.speed", "rated.torque", "emf.constant",
                         "circuit.ld", "circuit.lq"),),
    "short-circuit-current": (("emf.constant", "circuit.ld", "rated.current"),),
    "efficiency-class": (("rated.efficiency", "rated.power", "machine.poles",
                          "efficiency_class"),),
    "rotor-torque-density": (("rated.torque", "machine.rotor_diameter",
                              "machine.stack_length"),),
    "specific-losses": (("rated.losses", "machine.mass"),),
    "overload-ratio": (("limits.peak_torque", "rated.torque"),
                       ("limits.peak_current", "rated.current")),
    "short-time-rating": (("limits.peak_torque", "limits.peak_torque.duration"),
                          ("limits.peak_current", "limits.peak_current.duration")),
}

#: bookkeeping rules that are not checks of the machine: never listed
NOT_CHECKS = frozenset({"unknown-field", "stale-acceptance"})


def input_sets(relations: Iterable[Any]) -> dict[str, tuple[tuple[str, ...], ...]]:
    """Each rule's alternative input sets, from the relations' ``needs``, the table, or a
    monomial's terms (``machine.pole_pairs`` read as ``machine.poles``), in registry order."""
    out: dict[str, tuple[tuple[str, ...], ...]] = {}
    for relation in relations:
        rule = relation.rule
        if rule in NOT_CHECKS:
            continue
        own = getattr(relation, "needs", None)
        if own is not None:
            sets = tuple(tuple(s) for s in own)
        elif rule in NEEDS:
            sets = NEEDS[rule]
        else:
            terms = getattr(relation, "terms", None)
            names = tuple(terms) if terms else tuple(getattr(relation, "fields", ()))
            sets = (tuple(dict.fromkeys("machine.poles" if n == "machine.pole_pairs" else n
                                        for n in names)),)
        out[rule] = (*out.get(rule, ()), *(s for s in sets if s not in out.get(rule, ())))
    return out


def coverage(known: Mapping[str, str | None], attributes: Mapping[str, Any],
             found_rules: Iterable[str], sets: Mapping[str, tuple[tuple[str, ...], ...]],
             enabled: Any = None) -> dict[str, Any]:
    """``{"checked": [rules], "not_checked": {rule: [missing fields]}}``.

    ``known``: each field given (None) or derived (the rule that derived it: a value a rule
    derived itself does not let that rule check anything); ``attributes``: the sheet's
    non-physical values;
    ``found_rules``: rules that produced a finding; ``enabled(rule)``: False for a rule left
    out by ``--only``/``--skip`` (such a rule is listed in neither part).
    """
    have: dict[str, str | None] = {name: None for name, value in attributes.items()
                                   if value is not None}
    have.update(known)
    fired = set(found_rules)
    checked: list[str] = []
    not_checked: dict[str, list[str]] = {}
    for rule, alternatives in sets.items():
        if enabled is not None and not enabled(rule):
            continue
        if rule in fired:
            checked.append(rule)
            continue
        missing_sets = [[n for n in s if n not in have or have[n] == rule]
                        for s in alternatives]
        fewest = min(missing_sets, key=len) if missing_sets else []
        if not fewest:
            checked.append(rule)
        else:
            not_checked[rule] = fewest
    return {"checked": checked, "not_checked": not_checked}


def coverage_of(record: Any) -> dict[str, Any] | None:
    """The coverage a :class:`~sheetlint.engine.run.RecordResult` carries (None when the
    record could not be read)."""
    return getattr(record, "coverage", None)


def sheet_coverage(sheet: Any, findings: Iterable[Any]) -> dict[str, Any]:
    """Coverage of an engine sheet after the checks (estimates do not count as known).

    Looks each field of the input sets up directly (no copy of the sheet's values): this runs
    for every record, so it stays a small fraction of the engine's time."""
    sets = _rule_sets()
    values = sheet.values
    attributes = sheet.attributes
    settings = sheet.settings
    narrowed = settings.narrowed
    fired = {f.rule for f in findings}
    checked: list[str] = []
    not_checked: dict[str, list[str]] = {}
    for rule, alternatives in sets:
        if narrowed and not settings.enabled(rule):
            continue
        if rule in fired:
            checked.append(rule)
            continue
        fewest: list[str] | None = None
        for names in alternatives:
            missing = []
            for name in names:
                known = values.get(name)
                if known is not None:
                    origin = known.origin
                    if origin == GIVEN or (origin != ESTIMATE and known.rule != rule):
                        continue
                elif attributes.get(name) is not None:
                    continue
                missing.append(name)
            if not missing:
                fewest = missing
                break
            if fewest is None or len(missing) < len(fewest):
                fewest = missing
        if not fewest:
            checked.append(rule)
        else:
            not_checked[rule] = fewest
    return {"checked": checked, "not_checked": not_checked}


_sets_cache: dict[int, tuple[tuple[str, tuple[tuple[str, ...], ...]], ...]] = {}


def _rule_sets() -> tuple[tuple[str, tuple[tuple[str, ...], ...]], ...]:
    """The registry's input sets, built once per registry size."""
    relations = all_relations()
    found = _sets_cache.get(len(relations))
    if found is None:
        found = _sets_cache[len(relations)] = tuple(input_sets(relations).items())
    return found


def rule_titles() -> dict[str, str]:
    """Each rule's title (its first relation's), for plain sentences."""
    titles: dict[str, str] = {}
    for relation in all_relations():
        titles.setdefault(relation.rule, relation.title)
    return titles


def missing_sentence(not_checked: Mapping[str, list[str]], limit: int = 3,
                     titles: Mapping[str, str] | None = None) -> str:
    """Plain words for the text report: "give circuit.ld and circuit.lq to check the dq model
    at the rated point (dq-operating-point); ..." (the most useful first: the fewest fields
    that unlock the most rules)."""
    by_fields: dict[tuple[str, ...], list[str]] = {}
    for rule, fields in not_checked.items():
        by_fields.setdefault(tuple(fields), []).append(rule)
    ordered = sorted(by_fields.items(), key=lambda item: (len(item[0]), -len(item[1])))
    def named(rule: str) -> str:
        title = (titles or {}).get(rule)
        return f"{title[:1].lower()}{title[1:]} ({rule})" if title else rule

    parts = [f"give {' and '.join(fields)} to check {', '.join(named(r) for r in rules)}"
             for fields, rules in ordered[:limit]]
    if len(ordered) > limit:
        parts.append(f"{len(ordered) - limit} more (see --format json)")
    return "; ".join(parts)
