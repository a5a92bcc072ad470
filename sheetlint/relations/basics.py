"""Screening relations: physically possible values, and fields the schema does not know."""

from __future__ import annotations

import functools
import math
from collections.abc import Callable, Iterator

from sheetlint.engine.core import Finding, Relation, Sheet
from sheetlint.fields import display, spec_for
from sheetlint.relations.registry import register

#: fields whose relations assume three phases: left out for a machine of another phase count
ELECTRICAL_NAMES = ("voltage", "current", "power_factor", "efficiency")
ELECTRICAL_PREFIXES = ("emf.", "torque_constant", "circuit.", "rated.losses", "supply.",
                       "limits.peak_current")
KNOWN_THERMAL_CLASSES = (105, 120, 130, 155, 180, 200, 220)
#: SI magnitudes outside this envelope belong to no electrical machine (a 1e-15 H inductance,
#: a 1e15 W motor); they are refused so that no relation computes with them
MAGNITUDE_ENVELOPE = (1e-15, 1e15)
#: magnets lose their magnetisation long before this (NdFeB Curie point about 310-400 °C,
#: SmCo about 720-820 °C; magnet makers' data sheets, as quoted in REFERENCES.md §6 sources)
HIGHEST_MAGNET_TEMPERATURE = 273.15 + 850.0


@register
class ValueRange(Relation):
    """Values that cannot be physically true.

    What it checks: magnitudes are positive (power, torque, speed, frequency, voltage, current,
    except the speed, power and frequency of a listed point, which may be 0: a standstill point,
    resistance, inductance, Ke, Kt, flux, losses, mass, inertia, temperatures in kelvin);
    efficiency and power factor lie in (0, 1]; efficiency below 1; the pole count is an even
    integer of at least 2 (pole pairs and phases positive integers); a thermal class is one
    of IEC 60085's. A machine of another phase count than three is reported (warning) and its
    electrical values are left out: every electrical relation here assumes three phases.
    Derived values are checked too: an efficiency or power factor the other
    values make 1 or more is an error naming the values it came from.

    Why it matters: an impossible value poisons every relation it enters. The value is
    reported as an error and left out, and every other relation is still checked.

    Example that fails: ``machine.poles: 7`` (odd), ``rated.efficiency: 101 %``.

    Fix: correct the value, or remove it if unknown.

    References: IEC 60034-1 (rating quantities); IEC 60085 (thermal classes).
    """

    rule = "value-range"
    title = "physically possible values"
    equation = "x > 0 (and within 1e-15…1e15 SI); 0 < η < 1; 0 < cos φ ≤ 1; poles = 2k, k ≥ 1"
    kind = "bound"
    severity_policy = "error for an impossible value (left out of all other relations); " \
                      "warning for an unknown thermal class"
    source = "IEC 60034-1 (rating quantities); IEC 60085 (thermal classes)"
    order = 0

    def screen(self, sheet: Sheet) -> Iterator[Finding]:
        values = sheet.values
        bad = [(path, problem) for path, known in values.items()
               if (problem := _range_test(path)(known.value)) is not None]
        for path, problem in bad:
            known = values.pop(path)
            yield sheet.finding(self, "error",
                                f"{path} = {known.text or display(path, known.value)}: "
                                f"{problem}; the value is left out of all other checks", (path,))
        phases = values.get("machine.phases")
        if phases is not None and phases.value != 3:
            # every electrical relation here is written for three phases (√3, 3·I²·R, the dq
            # model): rather than check with the wrong factors, leave the electrical values out
            dropped = [p for p in list(values) if p.split(".")[-1] in ELECTRICAL_NAMES
                       or p.startswith(ELECTRICAL_PREFIXES)]
            for path in dropped:
                values.pop(path)
            yield sheet.finding(self, "warning", f"machine.phases = {phases.value:g}: sheetlint's "
                                "electrical relations hold for three-phase machines only; the "
                                "electrical values were not checked (power, torque, speed and "
                                "frequency were)", ("machine.phases",))
        for name in ("machine.thermal_class", "machine.temperature_rise_class"):
            cls = sheet.attr(name)
            if cls is not None and cls not in KNOWN_THERMAL_CLASSES:
                yield sheet.finding(self, "warning", f"{name} '{cls}' is not an IEC 60085 "
                                    "thermal class (130/B, 155/F, 180/H, ...)", (name,))

    def check(self, sheet: Sheet) -> Iterator[Finding]:
        """Derived efficiencies and power factors: one at or above 1 beyond the precision of
        its inputs is a hard contradiction of the values it came from."""
        for path, known in sheet.values.items():
            if known.is_given or not path.endswith(DERIVED_CHECKED):
                continue
            if known.value * (1.0 - known.uncertainty) >= 1.0:
                what = "efficiency" if path.endswith("efficiency") else "power factor"
                yield sheet.finding(
                    self, "error", f"{path} derived from {', '.join(known.inputs)} comes out "
                    f"at {known.value:.3f}: a {what} of 1 or more is impossible, so one of "
                    "those values is wrong", (*known.inputs, path),
                    expected={path: 1.0}, actual={path: known.value},
                    deviation=known.value - 1.0)


#: derived values that a sheet's other values can make impossible (DESIGN.md, Judgement 4:
#: derived values are range-checked like given ones)
DERIVED_CHECKED = ("efficiency", "power_factor")


def _efficiency(value: float) -> str | None:
    if not 0.0 < value < 1.0:
        return "efficiency must lie between 0 and 100 % (exclusive)"
    return None


def _power_factor(value: float) -> str | None:
    if not 0.0 < value <= 1.0:
        return "power factor must lie in (0, 1]"
    return None


def _pole_count(value: float) -> str | None:
    if not math.isfinite(value) or value > MAGNITUDE_ENVELOPE[1]:
        return "far outside the range of any electrical machine"
    if value < 2 or value != int(value) or int(value) % 2:
        return "a pole count must be an even integer of at least 2"
    return None


def _positive_integer(value: float) -> str | None:
    if not math.isfinite(value) or value > MAGNITUDE_ENVELOPE[1]:
        return "far outside the range of any electrical machine"
    if value < 1 or value != int(value):
        return "must be a positive integer"
    return None


def _temperature(value: float) -> str | None:
    return "below absolute zero" if value <= 0.0 else None


def _magnet_temperature(value: float) -> str | None:
    if value <= 0.0:
        return "below absolute zero"
    if value > HIGHEST_MAGNET_TEMPERATURE:
        return "above the Curie temperature of every magnet material"
    return None


def _not_negative(value: float) -> str | None:
    return "must not be negative" if value < 0.0 else None


def _magnitude(value: float) -> str | None:
    if value <= 0.0:
        return "must be positive"
    low, high = MAGNITUDE_ENVELOPE
    if not low <= value <= high:
        return "far outside the range of any electrical machine"
    return None


def _standstill_or_positive(value: float) -> str | None:
    return None if value == 0.0 else _magnitude(value)


@functools.cache
def _range_test(path: str) -> Callable[[float], str | None]:
    """The test of physically possible values for a field path (chosen once per path)."""
    spec = spec_for(path)
    kind = spec.kind if spec else "ratio"
    if path.endswith("efficiency"):
        return _efficiency
    if path.endswith("power_factor"):
        return _power_factor
    if path == "machine.poles":
        return _pole_count
    if path in ("machine.pole_pairs", "machine.phases"):
        return _positive_integer
    if kind == "temperature":
        return _magnet_temperature if "magnet_temperature" in path else _temperature
    if path == "machine.altitude" or path.startswith("rated.losses."):
        return _not_negative
    if path.startswith("points[") and path.endswith(("].speed", "].power", "].frequency")):
        return _standstill_or_positive  # a point at 0 rpm is a standstill (stall) point
    if kind == "temperature_difference":
        return _not_negative
    return _magnitude


@register
class UnknownFields(Relation):
    """Fields and qualifiers the schema does not know.

    What it checks: every field of the record is one of the data contract's. Unknown fields are
    kept (vendors and users add their own) and reported as info; one that looks like a
    misspelling of a known field (``rated.powr``) is a warning naming the field it probably
    meant, since its value was not used.

    Fix: rename the field, or leave it (info only).
    """

    rule = "unknown-field"
    title = "fields outside the schema"
    equation = "field ∈ schema"
    kind = "bound"
    severity_policy = "info for an unknown field; warning for a probable misspelling"
    source = "sheetlint data contract (schema/pm-machine.schema.json)"
    order = 0


@register
class StaleAcceptance(Relation):
    """An acceptance in the record that no longer matches any finding.

    What it checks
        Every entry of the record's ``accepted`` list (rule id, the fields it concerns, a
        mandatory reason) still covers a finding.

    What it tells you
        An entry that covers nothing has outlived the deviation it documented (the data were
        corrected, or the rule changed). Left in place it would hide a later regression.

    What to do
        Delete the entry.
    """

    rule = "stale-acceptance"
    title = "acceptances that match nothing"
    equation = "each acceptance covers ≥ 1 finding"
    kind = "bound"
    severity_policy = "info"
    source = "sheetlint data contract (accepted)"
    order = 0
