"""Slip readings: the usual ways a datasheet value is wrong, each as a factor on one field.

A *reading* says what a field's value probably is instead of what the sheet says it is: Ke per
phase where the sheet says (or the default reads) line-to-line, a power in hp labelled kW, a
pole count two off. It is a factor on the sheet's value (sheet value = true value × factor) and
a sentence, worded the same way in every finding it explains.

Readings are offered only where they agree with what the sheet states (DESIGN.md, Relations):
a basis reading starts from the basis the sheet states (or the default one), a unit reading from
the unit the sheet writes — never "kW labelled hp" for a value written in kW.

Which reading explains a record is decided in :mod:`sheetlint.engine.diagnosis` by re-checking
the record with the reading applied.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

from sheetlint.engine.build import BASIS_FACTOR
from sheetlint.engine.core import Known, Sheet
from sheetlint.fields import BASES, spec_for

SQRT2 = math.sqrt(2.0)
SQRT3 = math.sqrt(3.0)
HP_W = 745.69987158227022  # W per hp (550 ft·lbf/s), NIST SP 811 (2008), App. B

#: how each basis is said in a cause
BASIS_WORDS: dict[str, dict[str, str]] = {
    "voltage": {"line_rms": "line-to-line rms", "line_peak": "line-to-line peak",
                "phase_rms": "per phase (rms)", "phase_peak": "phase peak"},
    "emf_constant": {"line_rms": "line-to-line rms", "line_peak": "line-to-line peak",
                     "phase_rms": "per phase (rms)", "phase_peak": "phase peak"},
    "current": {"rms": "rms", "peak": "peak"},
    "torque_constant": {"rms": "per rms ampere", "peak": "per peak ampere"},
    "resistance": {"phase": "per phase", "line": "line-to-line (terminal to terminal)",
                   "delta_branch": "per delta branch"},
    "inductance": {"phase": "per phase", "line": "line-to-line (terminal to terminal)"},
}

#: factors a reading may carry, and how they are written (the same symbol in every finding)
_SYMBOLS: tuple[tuple[float, str], ...] = (
    (SQRT2, "√2"), (SQRT3, "√3"), (math.sqrt(1.5), "√(3/2)"), (SQRT2 * SQRT3, "√6"),
    (2.0, "2"), (3.0, "3"), (1.5, "3/2"), (1000.0, "1000"), (60.0, "60"),
    (2 * math.pi, "2π"), (60 / (2 * math.pi), "60/2π"), (1.2, "1.2, 50/60 Hz"),
    (1000 / HP_W, "1.341, hp/kW"), (2 / SQRT3, "2/√3"), (SQRT3 / 2, "√3/2"),
    (2 * SQRT2 / SQRT3, "2·√(2/3)"), (1.5 * SQRT2, "3/√2"), (2 / 3 * SQRT2, "2√2/3"),
    (SQRT2 / 3, "√2/3"), (SQRT3 / SQRT2 / 2, "√6/4"),
)


def symbol(factor: float) -> str:
    """"×√3", "÷1000", ... for a factor (sheet = true × factor); a decimal when unnamed."""
    for value, name in _SYMBOLS:
        if abs(factor / value - 1) < 1e-6:
            return f"×{name}"
        if abs(factor * value - 1) < 1e-6:
            return f"÷{name}"
    return f"×{factor:.4g}"


@dataclass(frozen=True, slots=True)
class Slip:
    """A slip on one field: the sheet's value is the true value × ``factor``."""

    field: str
    factor: float
    text: str  # what the value probably is: "per phase (rms), not line-to-line rms"
    basis: bool = False  # a basis reading: the sheet may simply not have stated the basis
    rank: int = 0  # lower is the more usual slip, preferred between equal explanations
    phrase: str = ""  # the whole cause after the field name, when "agrees if ..." does not fit

    @property
    def symbol(self) -> str:
        return symbol(self.factor)

    def cause(self) -> str:
        """The cause sentence: field to correct, the reading that fits, the factor."""
        if self.phrase:
            return f"{self.field}: {self.phrase}"
        return f"{self.field}: agrees if {self.text} ({self.symbol})"

    def corrected(self, value: float) -> float:
        return value / self.factor


# --- readings per kind of field ------------------------------------------------------------
#: bases no sheet uses for that kind: a rated voltage is never printed as a phase peak (a
#: reading that would fit by coincidence more often than by slip)
_UNUSUAL_BASES = frozenset({("voltage", "phase_peak")})


def _basis_readings(path: str, kind: str, known: Known) -> list[Slip]:
    factors = BASIS_FACTOR.get(kind)
    if factors is None:
        return []
    words = BASIS_WORDS[kind]
    stated = known.basis or BASES[kind][0]
    said = "as stated" if known.basis_stated else "as read by default"
    out = []
    for alternative, alt_factor in factors.items():
        if alternative == stated or (kind, alternative) in _UNUSUAL_BASES:
            continue
        factor = factors[stated] / alt_factor
        out.append(Slip(path, factor, f"the value is {words[alternative]}, not "
                           f"{words[stated]} {said}", basis=True, rank=1))
    return out


#: unit prefixes a prefix slip moves between (×1000 steps)
_PREFIX_STEPS = ("n", "µ", "m", "", "k", "M", "G")
#: units whose prefix slips are usual on datasheets (W/kW, µH/mH, mΩ/Ω, ms/s, mN·m/N·m)
_PREFIX_KINDS = {"power": "W", "inductance": "H", "resistance": "Ω", "time": "s",
                 "torque": "N·m", "current": "A", "voltage": "V"}


def _split_prefix(unit: str, base: str) -> tuple[str, str] | None:
    text = unit.strip().replace("u", "µ", 1) if unit.strip().startswith("u") else unit.strip()
    text = text.replace("ohm", "Ω").replace("Ohm", "Ω").replace("*", "·").replace("Nm", "N·m")
    if not text.endswith(base):
        return None
    prefix = text[: -len(base)]
    return (prefix, base) if prefix in _PREFIX_STEPS else None


def _prefix_readings(path: str, kind: str, known: Known) -> list[Slip]:
    base = _PREFIX_KINDS.get(kind)
    written = known._written
    unit = getattr(written, "unit", None)
    if base is None or not unit:
        return []
    split = _split_prefix(unit, base)
    if split is None:
        return []
    prefix, base = split
    step = _PREFIX_STEPS.index(prefix)
    out = []
    if step > 0:  # the number was in a unit 1000 times smaller: the sheet reads 1000× high
        smaller = _PREFIX_STEPS[step - 1] + base
        out.append(Slip(path, 1000.0, f"the value is in {smaller}, labelled {prefix}{base}",
                           rank=2))
    if step + 1 < len(_PREFIX_STEPS):
        larger = _PREFIX_STEPS[step + 1] + base
        out.append(Slip(path, 1e-3, f"the value is in {larger}, labelled {prefix}{base}",
                           rank=2))
    return out


def _power_unit_readings(path: str, known: Known) -> list[Slip]:
    unit = (getattr(known._written, "unit", "") or "").strip()
    if unit in ("kW", "kw", "KW"):
        return [Slip(path, 1000 / HP_W, "the value is in hp, labelled kW", rank=1)]
    if unit in ("hp", "HP"):
        return [Slip(path, HP_W / 1000, "the value is in kW, labelled hp", rank=1)]
    return []


def _frequency_readings(path: str) -> list[Slip]:
    return [Slip(path, 1.2, "the value is a 60 Hz rating next to 50 Hz data", rank=3),
            Slip(path, 1 / 1.2, "the value is a 50 Hz rating next to 60 Hz data", rank=3)]


_RPM_SPELLINGS = frozenset({"rpm", "r/min", "min-1", "1/min", "/min", "u/min", "rev/min",
                            "min^-1"})


def _speed_unit_readings(path: str, known: Known) -> list[Slip]:
    unit = (getattr(known._written, "unit", "") or "").strip().lower()
    if unit in _RPM_SPELLINGS:
        return [Slip(path, 2 * math.pi / 60, f"the value is in rad/s, labelled {unit}", rank=4)]
    if unit in ("rad/s", "rad/sec"):
        return [Slip(path, 60 / (2 * math.pi), f"the value is in rpm, labelled {unit}", rank=4)]
    return []


def _pole_readings(sheet: Sheet, path: str, known: Known) -> list[Slip]:
    poles = known.value
    out = []
    for other in (poles - 2, poles + 2):
        if other >= 2:
            out.append(Slip(path, poles / other, f"the machine has {other:g} poles", rank=1,
                            phrase=f"agrees with {other:g} poles, not {poles:g}"))
    out.append(Slip(path, 2.0, "the value is the pole-pair count, not the pole count",
                       rank=2))
    out.append(Slip(path, 0.5, "the value is the pole count doubled", rank=3))
    return out


def _swapped_digit_readings(path: str, known: Known) -> list[Slip]:
    text = getattr(known._written, "text", None)
    if not text:
        return []
    out = []
    seen = set()
    positions = [i for i, c in enumerate(text) if c.isdigit()]
    # neighbouring digits, also across the decimal point (96.3 typed as 93.6)
    for i, j in itertools.pairwise(positions):
        a, b = text[i], text[j]
        if a == b or j - i > 2:
            continue
        chars = list(text)
        chars[i], chars[j] = b, a
        swapped = "".join(chars)
        try:
            ratio = float(text) / float(swapped)
        except (ValueError, ZeroDivisionError):
            continue
        if ratio > 0 and swapped not in seen:
            seen.add(swapped)
            out.append(Slip(path, ratio, f"two digits are swapped: {swapped}, not {text}",
                            rank=2))
    return out


def readings(sheet: Sheet, path: str) -> list[Slip]:
    """Every usual slip reading of a given field that agrees with what the sheet states."""
    known = sheet.get(path)
    spec = spec_for(path)
    if known is None or spec is None or not known.is_given or not known.value > 0:
        return []
    kind = spec.kind
    out = _basis_readings(path, kind, known)
    if kind == "power":
        out += _power_unit_readings(path, known)
    if path.startswith("supply."):
        return []  # supply voltages are line-to-line by every convention
    if kind in ("frequency", "speed") and not path.startswith("limits."):
        out += _frequency_readings(path)
    if kind == "speed":
        out += _speed_unit_readings(path, known)
        pairs = sheet.get("machine.pole_pairs") or sheet.get("machine.poles")
        if pairs is not None and not path.startswith("limits."):
            p = pairs.value if sheet.get("machine.pole_pairs") else pairs.value / 2
            if p >= 2 and math.isfinite(p):
                out.append(Slip(path, p, f"the value is an electrical speed (×p = {p:g}), "
                                "not the mechanical one", rank=4))
    if kind == "frequency":
        unit = (getattr(known._written, "unit", "") or "").strip()
        if unit.lower() == "hz":
            out.append(Slip(path, 60.0, "the value is per minute, labelled per second (Hz)",
                            rank=4))
    if kind == "current":
        out.append(Slip(path, SQRT3, "the value is √3 too large: a line current where the "
                        "delta branch current was meant (star/delta)", basis=True, rank=2))
        out.append(Slip(path, 1 / SQRT3, "the value is a delta branch current, not the line "
                        "current (star/delta)", basis=True, rank=2))
    if path == "machine.poles" and known.value < 1000:
        out += _pole_readings(sheet, path, known)
    if path.endswith(("efficiency", "power_factor")):
        out += _swapped_digit_readings(path, known)
    if kind in ("flux_linkage", "torque_constant"):
        out.append(Slip(path, 1.5, "the value is scaled by 3/2 (power- vs "
                           "amplitude-invariant dq)", rank=4))
        out.append(Slip(path, 2 / 3, "the value lacks the 3/2 of the amplitude-invariant "
                           "dq model", rank=4))
    out += _prefix_readings(path, kind, known)
    out += _declared_readings(path)
    return out


def _declared_readings(path: str) -> list[Slip]:
    """Readings a relation declares for its own fields (``slip_readings``: field ->
    ((factor, reading), ...)), e.g. a mechanical time constant worked out with the terminal
    resistance as if per phase."""
    from sheetlint.relations.registry import relations_with

    out = []
    for relation in relations_with("slip_readings"):
        for factor, reading in relation.slip_readings.get(path, ()):  # type: ignore[attr-defined]
            out.append(Slip(path, factor, f"it is {reading}", rank=2))
    return out
