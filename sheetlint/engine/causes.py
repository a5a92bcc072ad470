"""Cause diagnosis: which usual slip on which given field reconciles the failing relations.

For every monomial relation the engine knows the log residual r and how it depends on each given
field (``Evaluation.coefficients``). If the sheet's value of field g is the true value times k,
every residual involving g moves by c_g·ln k. A slip (g, k) *reconciles* when every failing
relation that involves g passes after the correction and no passing one starts to fail. Slips
with the same factor on the same field are named together as one cause (×√3: per phase rather
than line-to-line, or star/delta).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from sheetlint.engine.core import Sheet
from sheetlint.engine.monomial import Evaluation
from sheetlint.fields import spec_for

SQRT2 = math.sqrt(2.0)
SQRT3 = math.sqrt(3.0)
HP_W = 745.69987158227022


@dataclass(frozen=True, slots=True)
class Slip:
    factor: float  # sheet value = true value × factor
    symbol: str
    reading: str  # what the sheet's value probably is
    kinds: frozenset[str]
    basis: bool = False  # a basis reading (the sheet may simply not state it)


def _kinds(*names: str) -> frozenset[str]:
    return frozenset(names)


_ELECTRIC = _kinds("voltage", "emf_constant")
_BOTH = ("power", "torque", "speed", "frequency", "voltage", "current", "resistance",
         "inductance", "emf_constant", "torque_constant", "flux_linkage", "mass", "inertia")

SLIPS: tuple[Slip, ...] = (
    Slip(1 / SQRT3, "÷√3", "per phase rather than line-to-line (or star/delta)", _ELECTRIC, True),
    Slip(SQRT3, "×√3", "line-to-line where per phase was meant (or star/delta)", _ELECTRIC, True),
    Slip(SQRT3, "×√3", "a delta-winding value where the line value was meant (star/delta)",
         _kinds("current"), True),
    Slip(1 / SQRT3, "÷√3", "a delta branch current rather than the line current (star/delta)",
         _kinds("current"), True),
    Slip(SQRT3, "×√3", "based on line-to-line rather than phase EMF (or star/delta)",
         _kinds("torque_constant"), True),
    Slip(1 / SQRT3, "÷√3", "based on phase rather than line-to-line EMF (or star/delta)",
         _kinds("torque_constant"), True),
    Slip(SQRT2, "×√2", "peak rather than rms",
         _kinds("voltage", "emf_constant", "current"), True),
    Slip(1 / SQRT2, "÷√2", "rms where peak was meant",
         _kinds("voltage", "emf_constant", "current", "flux_linkage"), True),
    Slip(1 / SQRT2, "÷√2", "per peak ampere rather than per rms ampere",
         _kinds("torque_constant"), True),
    Slip(SQRT2, "×√2", "per rms ampere where per peak ampere was meant",
         _kinds("torque_constant"), True),
    Slip(SQRT2 * SQRT3, "×√6", "line-to-line rms where phase peak was meant", _ELECTRIC, True),
    Slip(1 / (SQRT2 * SQRT3), "÷√6", "phase peak rather than line-to-line rms", _ELECTRIC, True),
    Slip(2.0, "×2", "line-to-line (terminal-to-terminal) rather than per phase",
         _kinds("resistance", "inductance"), True),
    Slip(0.5, "÷2", "per phase where the line-to-line value was meant",
         _kinds("resistance", "inductance"), True),
    Slip(3.0, "×3", "a delta branch value rather than the star-equivalent phase value",
         _kinds("resistance", "inductance"), True),
    Slip(2.0, "×2", "a pole count where pole pairs were meant", _kinds("count")),
    Slip(0.5, "÷2", "pole pairs where a pole count was meant", _kinds("count")),
    Slip(1.5, "×3/2", "scaled by 3/2 (amplitude- vs power-invariant dq, or a 3/2 in the torque "
         "equation)", _kinds("torque_constant", "flux_linkage", "torque")),
    Slip(2 / 3, "÷3/2", "missing a factor 3/2 (amplitude- vs power-invariant dq)",
         _kinds("torque_constant", "flux_linkage", "torque")),
    Slip(1000.0, "×1000", "in a unit 1000 times smaller than labelled (prefix slip)",
         frozenset(_BOTH)),
    Slip(1e-3, "÷1000", "in a unit 1000 times larger than labelled (prefix slip)",
         frozenset(_BOTH)),
    Slip(60 / (2 * math.pi), "×60/2π", "in rpm where rad/s was meant",
         _kinds("speed", "emf_constant")),
    Slip(2 * math.pi / 60, "×2π/60", "in rad/s where rpm was meant",
         _kinds("speed", "emf_constant")),
    Slip(60.0, "×60", "per minute where per second was meant (Hz vs rpm)",
         _kinds("speed", "frequency")),
    Slip(1 / 60.0, "÷60", "per second where per minute was meant (Hz vs rpm)",
         _kinds("speed", "frequency")),
    Slip(2 * math.pi, "×2π", "in rad/s where Hz was meant", _kinds("frequency", "speed")),
    Slip(1 / (2 * math.pi), "÷2π", "in Hz where rad/s was meant",
         _kinds("frequency", "speed", "emf_constant")),
    Slip(1000 / HP_W, "×1.341", "a power in hp labelled kW", _kinds("power")),
    Slip(HP_W / 1000, "×0.7457", "a power in kW labelled hp", _kinds("power")),
    Slip(1.2, "×1.2", "a 60 Hz value next to 50 Hz data",
         _kinds("frequency", "speed", "power", "voltage")),
    Slip(1 / 1.2, "÷1.2", "a 50 Hz value next to 60 Hz data",
         _kinds("frequency", "speed", "power", "voltage")),
)


def _pole_pair_slips(sheet: Sheet) -> tuple[Slip, ...]:
    pairs = sheet.get("machine.pole_pairs")
    if pairs is None or pairs.value < 2:
        return ()
    p = pairs.value
    return (
        Slip(p, f"×p={p:g}", "an electrical speed or angle where the mechanical one was meant",
             _kinds("speed", "emf_constant")),
        Slip(1 / p, f"÷p={p:g}", "a mechanical speed where the electrical one was meant",
             _kinds("speed", "emf_constant", "frequency")),
    )


@dataclass(slots=True)
class Cause:
    field: str
    slip: Slip
    fixed: list[Evaluation]
    readings: list[str]

    def text(self) -> str:
        readings = "; or ".join(self.readings)
        return f"agrees if {self.field} is {readings} ({self.slip.symbol})"


def diagnose(sheet: Sheet, evaluations: list[Evaluation]) -> dict[int, list[Cause]]:
    """For each failing evaluation (by index), the causes that reconcile it (best first)."""
    failing = [e for e in evaluations if abs(e.residual) > e.tolerance]
    if not failing:
        return {}
    candidates: set[str] = set()
    for e in failing:
        if e.coefficients:
            candidates.update(g for g, c in e.coefficients.items() if abs(c) > 1e-9)
    slips = SLIPS + _pole_pair_slips(sheet)
    found: list[Cause] = []
    for g in sorted(candidates):
        known = sheet.get(g)
        spec = spec_for(g)
        if known is None or spec is None or not known.is_given:
            continue
        by_factor: dict[float, Cause] = {}
        for slip in slips:
            if spec.kind not in slip.kinds:
                continue
            if g == "machine.pole_pairs" or (spec.kind == "count" and g != "machine.poles"):
                continue
            fixed = _reconciles(g, slip.factor, evaluations)
            if not fixed:
                continue
            key = round(slip.factor, 9)
            cause = by_factor.get(key)
            if cause is None:
                by_factor[key] = Cause(g, slip, fixed, [slip.reading])
            elif slip.reading not in cause.readings:
                cause.readings.append(slip.reading)
        found.extend(by_factor.values())
    out: dict[int, list[Cause]] = {}
    for i, e in enumerate(evaluations):
        if abs(e.residual) <= e.tolerance:
            continue
        causes = [c for c in found if any(f is e for f in c.fixed)]
        causes.sort(key=lambda c: -len(c.fixed))
        if causes:
            best = len(causes[0].fixed)
            out[i] = [c for c in causes if len(c.fixed) == best]
    return out


def _reconciles(field: str, factor: float, evaluations: list[Evaluation]) -> list[Evaluation]:
    """Failing evaluations fixed by dividing ``field`` by ``factor``; [] if any involved fails.

    A failing relation counts as fixed only when the slip explains most of it: the corrected
    residual is under a third of the residual it had. Otherwise a wide tolerance would let any
    factor near the deviation pass for a cause.
    """
    shift = math.log(factor)
    fixed: list[Evaluation] = []
    for e in evaluations:
        c = (e.coefficients or {}).get(field, 0.0)
        if abs(c) < 1e-9:
            continue
        corrected = abs(e.residual - c * shift)
        if corrected > e.tolerance:
            return []
        if abs(e.residual) > e.tolerance:
            if corrected > abs(e.residual) / 3:
                return []
            fixed.append(e)
    return fixed
