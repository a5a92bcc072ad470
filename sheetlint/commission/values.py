"""Plain values shared by the commissioning modules: a parameter with its provenance, and the
formatting of numbers that every output uses (so text, JSON and CSV carry the same digits)."""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

STATED = "stated"
DERIVED = "derived"
ESTIMATE = "estimate"

#: significant digits of a shown value: at least this many, whatever the written precision
MIN_DIGITS = 4
MAX_DIGITS = 6


def digits_for(uncertainty: float) -> int:
    """Significant digits whose last one's half unit covers a relative uncertainty (4…6)."""
    if not uncertainty > 0.0 or not math.isfinite(uncertainty):
        return MAX_DIGITS
    return max(MIN_DIGITS, min(MAX_DIGITS, math.floor(-math.log10(2.0 * uncertainty)) + 1))


def number_text(value: float, digits: int = MIN_DIGITS) -> str:
    """A value with ``digits`` significant digits and no exponent (``0.01778``, ``1619``)."""
    if value == 0.0 or not math.isfinite(value):
        return "0" if value == 0.0 else str(value)
    magnitude = math.floor(math.log10(abs(value)))
    decimals = max(digits - 1 - magnitude, 0)
    text = f"{round(value, decimals):.{decimals}f}"
    return text


@dataclass(frozen=True, slots=True)
class Parameter:
    """One entry of the parameter set, in the unit a motor-data entry usually asks for.

    ``text`` is the value as every output shows it; ``value`` is ``float(text)``.
    """

    name: str  # machine-readable key, e.g. "rated_voltage"
    label: str  # for people, e.g. "rated voltage"
    text: str
    unit: str
    basis: str
    provenance: str  # stated | derived | estimate
    rule: str | None = None
    inputs: tuple[str, ...] = ()
    note: str | None = None
    #: warnings and errors of the record check on the fields this value rests on
    doubts: tuple[str, ...] = ()

    @property
    def value(self) -> float:
        return float(self.text)

    def to_dict(self) -> dict[str, Any]:
        out: dict[str, Any] = {"name": self.name, "label": self.label, "value": self.value,
                               "unit": self.unit, "basis": self.basis,
                               "provenance": self.provenance, "rule": self.rule,
                               "from": list(self.inputs)}
        if self.note:
            out["note"] = self.note
        if self.doubts:
            out["doubts"] = list(self.doubts)
        return out


@dataclass(slots=True)
class ChecklistItem:
    """One line of the commissioning checklist: what to look at, and what the rules found."""

    item: str
    rules: tuple[str, ...]
    status: str  # ok | attention | not_checked
    messages: list[str] = field(default_factory=list)

    def to_dict(self) -> dict[str, Any]:
        return {"item": self.item, "rules": list(self.rules), "status": self.status,
                "messages": list(self.messages)}
