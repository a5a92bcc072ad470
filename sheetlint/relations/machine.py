"""Machine model: the steady-state dq model against the sheet, converter voltage, field
weakening, overspeed back-EMF and open-loop pull-out margin (the short-circuit current is in
:mod:`sheetlint.relations.servo`).

The physics lives in :mod:`sheetlint.physics.dq` (pure functions on SI floats); this module
gathers the model's inputs from a sheet, states which assumptions it made, and turns the
comparisons into findings.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from typing import Any, TypeVar

from sheetlint.cautions import FINDING_CAUTION as CAUTION
from sheetlint.engine.core import Finding, Known, Relation, RuleOption, Sheet
from sheetlint.physics.converter import drive_voltages
from sheetlint.physics.dq import (
    RPM,
    SQRT2,
    DqMachine,
    OperatingPoint,
    characteristic_current,
    flux_linkage_from_ke,
    max_speed_at_current,
    max_torque_at_speed,
    open_loop_operation,
    operating_point,
    peak_line_back_emf,
    speed_at_back_emf,
)
from sheetlint.physics.magnets import remanence_factor
from sheetlint.relations.emf import is_supply_class
from sheetlint.relations.registry import register
from sheetlint.standards.tolerances import power_factor_tolerance
from sheetlint.units import ROOM_TEMPERATURE as ROOM

DQ_SOURCE = ("steady-state dq model of the sinusoidal PM synchronous machine "
             "(amplitude-invariant): "
             "R. Krishnan, Permanent Magnet Synchronous and Brushless DC Motor Drives, CRC Press "
             "2010")
CONVERTER_SOURCE = ("six-pulse diode bridge U_dc = 3·√2/π·U_LL and space-vector modulation "
                    "U_LL,rms ≤ U_dc/√2 (power-electronics texts, e.g. Mohan, Undeland, "
                    "Robbins, Power Electronics, 3rd ed., Wiley 2003)")


CheckMethod = Callable[[Relation, Sheet], Iterator[Finding]]
_T = TypeVar("_T")
_UNSET: Any = object()  # not in a memo yet


def _guarded(check: CheckMethod) -> CheckMethod:
    """Bad input never produces a traceback: arithmetic on absurd values (zero, inf, nan --
    reported by ``value-range``) ends the check quietly; non-finite deviations are dropped."""

    @functools.wraps(check)
    def wrapper(self: Relation, sheet: Sheet) -> Iterator[Finding]:
        try:
            findings = list(check(self, sheet))
        except (ArithmeticError, ValueError):
            return iter(())
        for finding in findings:
            if finding.deviation is not None and not math.isfinite(finding.deviation):
                finding.deviation = None
        return iter(findings)

    return wrapper


def _celsius(kelvin: float) -> str:
    return f"{kelvin - 273.15:.0f} °C"


def _rpm(speed: float) -> str:
    return f"{speed / RPM:.0f} r/min"


# --- gathering the model's inputs --------------------------------------------------------------
@dataclass(slots=True)
class ModelInputs:
    """The dq machine built from a sheet, with the fields it used and the assumptions made."""

    machine: DqMachine
    fields: list[str]
    notes: list[str] = field(default_factory=list)
    estimate: bool = False
    uncertainty: float = 0.0
    flux_field: str = ""


def _pole_pairs(sheet: Sheet) -> tuple[float, str] | None:
    get = sheet.values.get
    for name, scale in (("machine.pole_pairs", 1.0), ("machine.poles", 0.5)):
        known = get(name)
        if known is not None and known.value > 0.0 and math.isfinite(known.value):
            return known.value * scale, name
    return None


def _flux_linkage(sheet: Sheet, pole_pairs: float,
                  temperature: str) -> tuple[float, str, str | None, bool, float] | None:
    """psi [Wb peak] at the rated magnet temperature ("hot") or the lowest ambient ("cold").

    Returns (psi, field, note, estimate, uncertainty).
    """
    get = sheet.values.get
    hot = temperature == "hot"
    for name in ("emf.constant_hot", "emf.flux_linkage_hot") if hot else ("emf.constant_cold",):
        known = get(name)
        if known is None or not known.value > 0.0:
            continue
        psi = (flux_linkage_from_ke(known.value, pole_pairs) if name.startswith("emf.constant")
               else known.value)
        note = f"{name}: {known.note}" if known.note else None
        return psi, name, note, known.is_estimate, known.uncertainty
    for name in ("emf.flux_linkage", "emf.constant"):
        known = get(name)
        if known is None or not known.value > 0.0:
            continue
        if hot:
            target = get("rated.magnet_temperature")
            target_k = target.value if target is not None else None
        else:
            lowest = get("machine.ambient.min")
            target_k = lowest.value if lowest is not None else ROOM
        psi = (known.value if name == "emf.flux_linkage"
               else flux_linkage_from_ke(known.value, pole_pairs))
        from_k = known.temperature if known.temperature is not None else ROOM
        if target_k is None:
            note = (f"{name} at {_celsius(from_k)} used as is: no rated magnet temperature, "
                    "so the hot value (lower) is not known")
        else:
            magnet = sheet.attr("machine.magnet")
            psi *= remanence_factor(magnet, from_k, target_k)
            note = (f"{name} scaled from {_celsius(from_k)} to {_celsius(target_k)} "
                    f"({magnet or 'NdFeB'} remanence coefficient)")
            if temperature == "cold" and get("machine.ambient.min") is None:
                note += "; no lowest ambient given, 20 °C assumed"
        return psi, name, note, known.is_estimate, known.uncertainty
    return None


def _resistance(sheet: Sheet) -> tuple[float, str | None, str | None, bool, float]:
    get = sheet.values.get
    hot = get("circuit.resistance_hot")
    if hot is not None and hot.value >= 0.0:
        return hot.value, "circuit.resistance_hot", None, hot.is_estimate, hot.uncertainty
    cold = get("circuit.resistance")
    if cold is not None and cold.value >= 0.0:
        t = cold.temperature if cold.temperature is not None else ROOM
        return (cold.value, "circuit.resistance",
                f"circuit.resistance at {_celsius(t)} used as given (no hot value)",
                cold.is_estimate, cold.uncertainty)
    return 0.0, None, "no resistance given: copper drop neglected", False, 0.0


class _SheetMemo:
    """What the machine relations of one sheet share, each worked out once: the model inputs,
    the solved operating points and results of the sheet alone (voltage limit, rated torque).

    It lives on the sheet (``Sheet.memo``), so it goes with the sheet, and it notes the number
    of the sheet's values (a value added in between starts a fresh memo). Operating points
    are memoised by all their arguments (the machine by identity, and each entry keeps its
    machine alive), so a memo can never hand a relation a point of other inputs.
    """

    __slots__ = ("inputs", "own_rules", "points", "shared", "size")

    def __init__(self, sheet: Sheet) -> None:
        # no reference back to the sheet: a cycle would leave every sheet to the cyclic
        # garbage collector instead of freeing it when the last reference goes
        self.size = len(sheet.values)
        # the rules that derived a value of the sheet (None stands for given values)
        self.own_rules = {k.rule for k in sheet.values.values()}
        self.inputs: dict[tuple[str, str, bool], ModelInputs | None] = {}
        self.points: dict[tuple[int, float, float, float | None],
                          tuple[DqMachine, OperatingPoint]] = {}
        self.shared: dict[Callable[[Sheet], Any], Any] = {}

    def once(self, compute: Callable[[Sheet], _T], sheet: Sheet) -> _T:
        """``compute(sheet)`` of this memo's sheet, worked out on the first call only."""
        shared = self.shared
        if compute in shared:
            return shared[compute]
        value = shared[compute] = compute(sheet)
        return value

    def model_inputs(self, sheet: Sheet, rule: str, temperature: str = "hot",
                     need_inductances: bool = True) -> ModelInputs | None:
        """:func:`model_inputs` of this memo's sheet."""
        # a rule that derived nothing sees the same inputs as every other such rule
        key = (rule if rule in self.own_rules else "*", temperature, need_inductances)
        entries = self.inputs
        inputs = entries.get(key, _UNSET)
        if inputs is not _UNSET:
            return inputs
        inputs = None
        if not need_inductances:
            # the two readings differ only where the one with inductances is rejected
            inputs = self.model_inputs(sheet, rule, temperature, True)
        if inputs is None:
            inputs = _model_inputs(sheet, rule, temperature, need_inductances)
        entries[key] = inputs
        return inputs

    def rated_torque(self, sheet: Sheet) -> tuple[float, list[str], float] | None:
        """Rated shaft torque [N*m] (given, or P/omega), its fields and uncertainty."""
        return self.once(_rated_point_torque, sheet)

    def voltage_limit(self, sheet: Sheet) -> VoltageLimit | None:
        """:func:`converter_voltage_limit` of this memo's sheet."""
        return self.once(converter_voltage_limit, sheet)

    def operating_point(self, machine: DqMachine, torque: float, speed: float,
                        line_voltage_limit: float | None = None) -> OperatingPoint:
        """:func:`operating_point`, memoised by its arguments.

        The MTPA point (no limit) is solved first and kept: ``dq-operating-point`` applies the
        rated voltage to it and ``voltage-limit`` compares it with the converter's voltage.
        """
        points = self.points
        key = (id(machine), torque, speed, line_voltage_limit)
        entry = points.get(key)
        if entry is not None:
            return entry[1]
        mtpa_key = (id(machine), torque, speed, None)
        entry = points.get(mtpa_key)
        if entry is None:
            entry = points[mtpa_key] = (machine, operating_point(machine, torque, speed))
        point = operating_point(machine, torque, speed, line_voltage_limit, mtpa=entry[1])
        points[key] = (machine, point)
        return point


def _sheet_memo(sheet: Sheet) -> _SheetMemo:
    """The memo of ``sheet``: its current one, or a fresh one when the sheet grew."""
    memo = sheet.memo.get("machine")
    if memo is None or memo.size != len(sheet.values):
        memo = sheet.memo["machine"] = _SheetMemo(sheet)
    return memo


def model_inputs(sheet: Sheet, rule: str, temperature: str = "hot",
                 need_inductances: bool = True) -> ModelInputs | None:
    """The dq machine of a sheet, or None when psi, p (and L_d, L_q) are not known.

    Values derived by ``rule`` itself are not used (``Sheet.usable``); estimates are used but
    flagged, so that no error is raised on them. Worked out once per sheet.
    """
    return _sheet_memo(sheet).model_inputs(sheet, rule, temperature, need_inductances)


def _model_inputs(sheet: Sheet, rule: str, temperature: str,
                  need_inductances: bool) -> ModelInputs | None:
    pairs = _pole_pairs(sheet)
    if pairs is None or not sheet.usable(rule, pairs[1], allow_estimates=True):
        return None
    pole_pairs, pairs_field = pairs
    flux = _flux_linkage(sheet, pole_pairs, temperature)
    if flux is None or not sheet.usable(rule, flux[1], allow_estimates=True):
        return None
    psi, flux_field, flux_note, flux_estimate, flux_unc = flux
    get = sheet.values.get
    ld_given, lq_given = get("circuit.ld"), get("circuit.lq")
    if ld_given is None and lq_given is None:
        if need_inductances:
            return None
        ld = lq = 0.0
        l_fields: list[str] = []
        l_estimate, l_unc = False, 0.0
    else:
        ld_known = ld_given or lq_given
        lq_known = lq_given or ld_given
        assert ld_known is not None and lq_known is not None
        ld, lq = ld_known.value, lq_known.value
        if ld_given is None:
            l_fields = ["circuit.lq"]
        elif lq_given is None:
            l_fields = ["circuit.ld"]
        else:
            l_fields = ["circuit.ld", "circuit.lq"]
        if not sheet.usable(rule, *l_fields, allow_estimates=True):
            return None
        l_estimate = ld_known.is_estimate or lq_known.is_estimate
        l_unc = max(ld_known.uncertainty, lq_known.uncertainty)
    r, r_field, r_note, r_estimate, r_unc = _resistance(sheet)
    machine = DqMachine(psi, ld, lq, r, pole_pairs)
    if need_inductances and not machine.valid():
        return None
    if not (psi > 0.0 and math.isfinite(psi)):
        return None
    notes = []
    if flux_note:
        notes.append(flux_note)
    if r_note:
        notes.append(r_note)
    if ld_given is not None and lq_given is None:
        notes.append("only L_d given: L_q = L_d assumed")
    if lq_given is not None and ld_given is None:
        notes.append("only L_q given: L_d = L_q assumed")
    fields = [pairs_field, flux_field, *l_fields]
    if r_field:
        fields.append(r_field)
    return ModelInputs(machine, fields, notes, flux_estimate or l_estimate or r_estimate,
                       flux_unc + l_unc + 0.1 * r_unc, flux_field)


def _rated_point_torque(sheet: Sheet) -> tuple[float, list[str], float] | None:
    return _point_torque(sheet, "rated")


def _point_torque(sheet: Sheet, prefix: str) -> tuple[float, list[str], float] | None:
    get = sheet.values.get
    torque = get(f"{prefix}.torque")
    if torque is not None:
        return torque.value, [f"{prefix}.torque"], torque.uncertainty
    power, speed = get(f"{prefix}.power"), get(f"{prefix}.speed")
    if power is not None and speed is not None and speed.value > 0.0:
        return (power.value / speed.value, [f"{prefix}.power", f"{prefix}.speed"],
                power.uncertainty + speed.uncertainty)
    return None


@dataclass(slots=True)
class VoltageLimit:
    """The largest line rms voltage the converter gives, and how it was found."""

    line_rms: float  # linear modulation: the limit of every model calculation
    how: str
    fields: list[str]
    from_supply: bool
    overmodulation: float  # what a point may need at most, with overmodulation


def converter_voltage_limit(sheet: Sheet) -> VoltageLimit | None:
    """The voltage limit of the running drive [V line rms] (DESIGN.md, Judgement 3): linear
    modulation U_dc/√2, from a stated DC link or the diode front end's 1.35·U_mains under
    load; with no supply stated, the rated voltage (the rated point is where the limit is
    reached)."""
    get = sheet.values.get
    dc, mains = get("supply.dc_link_voltage"), get("supply.mains_voltage")
    drive = drive_voltages(dc.value if dc is not None else None,
                           mains.value if mains is not None else None)
    if drive is not None:
        fields = ["supply.dc_link_voltage"] if dc is not None and dc.value > 0.0 else [
            "supply.mains_voltage"]
        return VoltageLimit(drive.linear, drive.how, fields, True, drive.overmodulation)
    rated = get("rated.voltage")
    if rated is not None and rated.value > 0.0:
        return VoltageLimit(rated.value, "no supply stated: the rated voltage is taken as the "
                            "voltage limit (the rated point is where the limit is reached)",
                            ["rated.voltage"], False, rated.value)
    return None


def dc_link_voltage(sheet: Sheet) -> tuple[float, str, list[str]] | None:
    """DC-link voltage [V] a stopped converter's capacitors hold: stated, or √2·U_mains."""
    get = sheet.values.get
    dc, mains = get("supply.dc_link_voltage"), get("supply.mains_voltage")
    drive = drive_voltages(dc.value if dc is not None else None,
                           mains.value if mains is not None else None)
    if drive is None:
        return None
    if dc is not None and dc.value > 0.0:
        return drive.dc_link_no_load, "stated DC link", ["supply.dc_link_voltage"]
    return (drive.dc_link_no_load, f"√2·U_mains = {drive.dc_link_no_load:.0f} V, the DC link of "
            "a diode front end at no load", ["supply.mains_voltage"])


def _highest_speed(sheet: Sheet) -> tuple[str, Known] | None:
    """The highest speed the sheet names: the maximum speed, else the highest listed or rated
    speed (the unsafe end for the overspeed check)."""
    get = sheet.values.get
    top = get("limits.max_speed")
    if top is not None and top.value > 0.0:
        return "limits.max_speed", top
    best: tuple[str, Known] | None = None
    for name in ["rated.speed", *(f"{p}.speed" for p in _point_prefixes(sheet))]:
        known = get(name)
        if known is not None and known.value > 0.0 and (best is None
                                                        or known.value > best[1].value):
            best = (name, known)
    return best


def _point_prefixes(sheet: Sheet) -> list[str]:
    count = sheet.attr("points.count")
    if not isinstance(count, int) or count < 0:
        count = 0
        while sheet.has(f"points[{count}].speed") or sheet.has(f"points[{count}].torque"):
            count += 1
    return [f"points[{j}]" for j in range(min(count, 1000))] if count else []


def _unique(names: list[str]) -> list[str]:
    return list(dict.fromkeys(names))


def _join(notes: list[str]) -> str:
    return ("; ".join(notes) + ". ") if notes else ""


# --- dq-operating-point ------------------------------------------------------------------------
@dataclass(slots=True)
class _Band:
    """Ranges of the model's outputs over the saturation and loss corners."""

    nominal: OperatingPoint
    current: tuple[float, float]
    voltage: tuple[float, float]
    power_factor: tuple[float, float]


def _band(machine: DqMachine, torque: float, speed: float, limit: float | None,
          lq_saturation: float, torque_allowance: float,
          nominal: OperatingPoint | None = None) -> _Band:
    """Model outputs at the nominal parameters and the saturation/loss corners."""
    points = []
    for lq_factor in (1.0, 1.0 - lq_saturation):
        m = DqMachine(machine.flux_linkage, machine.ld, machine.lq * lq_factor,
                      machine.resistance, machine.pole_pairs)
        for torque_factor in (1.0, 1.0 + torque_allowance):
            if nominal is not None and lq_factor == 1.0 and torque_factor == 1.0:
                points.append(nominal)
            else:
                points.append(operating_point(m, torque * torque_factor, speed, limit))
    nominal = points[0]
    return _Band(nominal,
                 (min(p.current_rms for p in points), max(p.current_rms for p in points)),
                 (min(p.line_voltage_rms for p in points),
                  max(p.line_voltage_rms for p in points)),
                 (min(p.power_factor for p in points), max(p.power_factor for p in points)))


@register
class DqOperatingPoint(Relation):
    """The rated current, voltage and power factor follow from Ke, L_d, L_q, R and p.

    .. math::

        u_d = R i_d - \\omega_e L_q i_q, \\quad u_q = R i_q + \\omega_e (L_d i_d + \\psi),
        \\quad T = \\tfrac32 p (\\psi i_q + (L_d - L_q) i_d i_q)

    with ψ = Ke/(√(3/2)·p) at the rated magnet temperature. For the rated torque and speed the
    model finds the least current within the voltage limit (MTPA below base speed, closed form;
    field weakening above it) and compares its current, line voltage and power factor with the
    sheet. The voltage limit is the rated voltage (the sheet's rated point is taken at its
    rated voltage), else the converter's limit.

    Tolerances (options): saturation typically lowers L_q at rated load by 10–30 % (option
    ``lq_saturation``, default 0.30) and iron, friction and saturation cost a few % of torque
    per ampere (``torque_allowance``, default 0.05; the stated iron and friction losses are
    added to the torque when given). The model is solved at those corners and the sheet must
    fall within the resulting band, widened by ``tolerance`` (default 0.03) plus the written
    precision of the inputs; the power factor also gets the IEC 60034-1 tolerance.

    Severity: outside the band a ``warning``; an ``error`` only when the stated current cannot
    make the rated torque even at the most favourable corner with ``error_ratio`` (default
    1.25) to spare, and no input is an estimate. For an SPM machine below base speed the
    torque-per-ampere check is the ``emf-constant`` rule's and is not repeated here.
    When halving L_d and L_q reconciles the sheet the cause names line-to-line inductances
    (a warning when the basis was unstated, an error when the sheet stated "phase").

    Example that fails: an IPM sheet with Ke = 80 V/krpm, p = 4, L_d = 3 mH, L_q = 9 mH giving
    rated current 30 A for 95 N·m: the model needs about 40 A.

    Fix: check the inductance basis (phase of the equivalent star), the magnet temperature
    of Ke, and whether the rated current is rms.

    References: Krishnan, Permanent Magnet Synchronous and Brushless DC Motor Drives, CRC 2010
    (dq model, MTPA); IEC 60034-1 (power-factor tolerance, as quoted).
    """

    rule = "dq-operating-point"
    title = "dq model at the rated point"
    equation = "least |i| with T(i_d, i_q) = T_rated and |u| ≤ U_limit"
    fields = ("rated.current", "rated.voltage", "rated.power_factor", "emf.constant",
              "circuit.ld", "circuit.lq", "circuit.resistance", "machine.poles",
              "rated.torque", "rated.speed")
    kind = "model"
    severity_policy = ("warning outside the saturation band; error when the stated current "
                       "cannot make rated torque with 25 % to spare (given inputs only)")
    source = DQ_SOURCE
    status = "established"
    order = 72
    options = {
        "lq_saturation": RuleOption("number", "0.30", "fall of L_q at rated load by "
                                    "saturation, the far corner of the band"),
        "torque_allowance": RuleOption("number", "0.05", "torque per ampere lost to iron, "
                                       "friction and saturation (0.03 when the losses are "
                                       "stated)"),
        "tolerance": RuleOption("number", "0.03", "relative widening of the band"),
        "error_ratio": RuleOption("number", "1.25", "model current over stated current "
                                  "beyond which a mismatch is an error"),
    }

    @_guarded
    def check(self, sheet: Sheet) -> Iterator[Finding]:
        rule = self.rule
        get = sheet.values.get
        memo = _sheet_memo(sheet)
        inputs = memo.model_inputs(sheet, rule)
        speed_known = get("rated.speed")
        torque = memo.rated_torque(sheet)
        if inputs is None or speed_known is None or torque is None or speed_known.value <= 0.0:
            return
        if not sheet.usable(rule, "rated.speed", *torque[1], allow_estimates=True):
            return
        speed = speed_known.value
        shaft_torque, torque_fields, torque_unc = torque
        if shaft_torque <= 0.0:
            return
        lq_sat = float(sheet.option(rule, "lq_saturation", 0.30))
        allowance = float(sheet.option(rule, "torque_allowance", 0.05))
        base_tol = float(sheet.option(rule, "tolerance", 0.03))
        error_ratio = float(sheet.option(rule, "error_ratio", 1.25))
        notes = list(inputs.notes)
        torque_em = shaft_torque
        iron, friction = get("rated.losses.iron"), get("rated.losses.friction")
        if iron is not None and friction is not None:
            torque_em += (iron.value + friction.value) / speed
            allowance = min(allowance, 0.03)
            notes.append("iron and friction losses added to the shaft torque")
        rated_u = get("rated.voltage")
        limit_value: float | None
        if rated_u is not None and rated_u.value > 0.0:
            # the rated voltage as written, widened by its own and Ke's written precision
            limit_value = rated_u.value * (1.0 + rated_u.uncertainty + inputs.uncertainty)
        elif (limit := memo.voltage_limit(sheet)) is not None:
            limit_value = limit.line_rms
            notes.append(f"voltage limit: {limit.how}")
        else:
            limit_value = None
            notes.append("no voltage limit known: MTPA at any voltage")
        base_fields = [*inputs.fields, "rated.speed", *torque_fields]
        unc = inputs.uncertainty + torque_unc + speed_known.uncertainty + base_tol
        machine = inputs.machine
        nominal = memo.operating_point(machine, torque_em, speed, limit_value)

        if nominal.region == "unreachable" and limit_value is not None:
            t_max = max_torque_at_speed(machine, 1e9, limit_value, speed)[0]
            cause = self._cause(sheet, machine, torque_em, speed, limit_value, lq_sat,
                                allowance, unc)
            estimate = self._estimate(sheet, inputs, torque_fields)
            yield sheet.finding(
                self, self._basis_severity(sheet, cause, "warning", estimate),
                f"The model cannot make the rated torque {shaft_torque:.4g} N·m at "
                f"{_rpm(speed)} within {limit_value:.0f} V at any current (at most "
                f"{t_max:.4g} N·m). {_join(notes)}".rstrip(),
                _unique([*torque_fields, "rated.voltage", *base_fields]), cause=cause)
            return

        summary = (f"dq model at {shaft_torque:.4g} N·m, {_rpm(speed)}: {nominal.region}, "
                   f"I = {nominal.current_rms:.4g} A, U = {nominal.line_voltage_rms:.4g} V, "
                   f"cos φ = {nominal.power_factor:.3f}, load angle "
                   f"{math.degrees(nominal.load_angle):.1f}°, i_d = {nominal.id / SQRT2:.4g} A "
                   f"rms, copper loss {nominal.copper_loss:.4g} W.")
        # a sheet the nominal model fits has no mismatch (the band only widens the ranges);
        # the saturation corners are solved only when it does not
        if nominal.feasible and self._fits(
                sheet, (nominal.current_rms, nominal.current_rms),
                (nominal.line_voltage_rms, nominal.line_voltage_rms),
                (nominal.power_factor, nominal.power_factor), unc):
            yield sheet.finding(self, "info", f"{summary} {_join(notes)}".rstrip(), base_fields)
            return
        band = _band(machine, torque_em, speed, limit_value, lq_sat, allowance, nominal)
        estimate = self._estimate(sheet, inputs, torque_fields)

        mismatches: list[tuple[str, str, float, float, str]] = []
        spm_below_base = (abs(machine.ld - machine.lq) <= 0.05 * max(machine.ld, machine.lq)
                          and nominal.region == "mtpa")
        current_known = get("rated.current")
        if (current_known is not None and current_known.value > 0.0 and not spm_below_base
                and sheet.usable(rule, "rated.current", allow_estimates=True)):
            i_sheet = current_known.value
            tol = unc + current_known.uncertainty
            lo, hi = band.current
            if i_sheet < lo * (1.0 - tol) or i_sheet > hi * (1.0 + tol):
                severity = "warning"
                if (not estimate and lo > error_ratio * i_sheet * (1.0 + tol)):
                    severity = "error"
                mismatches.append(("rated.current", severity, nominal.current_rms, i_sheet,
                                   f"the model needs {lo:.4g}–{hi:.4g} A (saturation band) "
                                   f"for {shaft_torque:.4g} N·m at {_rpm(speed)}, the sheet "
                                   f"states {i_sheet:.4g} A"))
        if rated_u is not None and rated_u.value > 0.0 and sheet.usable(
                rule, "rated.voltage", allow_estimates=True):
            u_sheet = rated_u.value
            tol = unc + rated_u.uncertainty
            lo, hi = band.voltage
            if u_sheet > hi * (1.0 + tol):
                # far above the need is a warning, unless the sheet lists the supply class as
                # its rated voltage, as servo catalogues do (then an info)
                far = u_sheet > hi * (1.25 + tol) and not is_supply_class(u_sheet)
                mismatches.append(("rated.voltage", "warning" if far else "info",
                                   nominal.line_voltage_rms, u_sheet,
                                   f"the model needs only {lo:.4g}–{hi:.4g} V at the rated "
                                   f"point, the sheet states {u_sheet:.4g} V (a rated voltage "
                                   f"far above the need may be the supply class, or Ke or the "
                                   f"voltage on another basis)"))
        pf_known = get("rated.power_factor")
        if pf_known is not None and 0.0 < pf_known.value <= 1.0 and sheet.usable(
                rule, "rated.power_factor", allow_estimates=True):
            pf_sheet = pf_known.value
            slack = power_factor_tolerance(pf_sheet) + pf_sheet * (pf_known.uncertainty + unc)
            lo, hi = band.power_factor
            if pf_sheet < lo - slack or pf_sheet > hi + slack:
                mismatches.append(("rated.power_factor", "warning", nominal.power_factor,
                                   pf_sheet, f"the model gives cos φ {lo:.3f}–{hi:.3f}, the "
                                   f"sheet states {pf_sheet:.3f}"))

        if not mismatches:
            yield sheet.finding(self, "info", f"{summary} {_join(notes)}".rstrip(),
                                base_fields)
            return
        cause = None
        if any(sev != "info" for _, sev, _, _, _ in mismatches):
            cause = self._cause(sheet, machine, torque_em, speed, limit_value, lq_sat,
                                allowance, unc)
        for name, severity, expected, actual, text in mismatches:
            if severity != "info":
                severity = self._basis_severity(sheet, cause, severity, estimate)
            yield sheet.finding(
                self, severity, f"{text}. {summary} {_join(notes)}".rstrip(),
                _unique([name, *base_fields]), expected={name: expected}, actual={name: actual},
                deviation=actual / expected - 1.0 if expected else None, cause=cause)

    @staticmethod
    def _estimate(sheet: Sheet, inputs: ModelInputs, torque_fields: list[str]) -> bool:
        """True when a model input or a compared rated value is an estimate."""
        get = sheet.values.get
        return inputs.estimate or any(
            (k := get(n)) is not None and k.is_estimate
            for n in ("rated.speed", *torque_fields, "rated.current", "rated.voltage"))

    @staticmethod
    def _basis_severity(sheet: Sheet, cause: str | None, severity: str,
                        estimate: bool) -> str:
        """A basis slip: warning when the inductance basis was unstated, error when stated."""
        if cause is None or not cause.startswith("agrees if L_d/L_q"):
            return severity
        stated = any((k := sheet.get(n)) is not None and k.basis_stated
                     for n in ("circuit.ld", "circuit.lq"))
        return "error" if stated and not estimate else "warning"

    def _cause(self, sheet: Sheet, machine: DqMachine, torque: float, speed: float,
               limit: float | None, lq_sat: float, allowance: float, unc: float) -> str | None:
        """Name the reading that reconciles the sheet, if one of the usual ones does."""
        ld_known = sheet.get("circuit.ld") or sheet.get("circuit.lq")
        basis = ld_known.basis if ld_known is not None else None
        factor = 2.0 if basis == "line" else 0.5
        alt = DqMachine(machine.flux_linkage, machine.ld * factor, machine.lq * factor,
                        machine.resistance, machine.pole_pairs)
        # the corners matter only when the other basis can make the torque at all
        alt_nominal = operating_point(alt, torque, speed, limit)
        band = (_band(alt, torque, speed, limit, lq_sat, allowance, alt_nominal)
                if alt_nominal.feasible else None)
        if band is not None and self._fits(sheet, band.current, band.voltage,
                                           band.power_factor, unc):
            if factor == 0.5:
                return ("agrees if L_d/L_q are line-to-line values, i.e. twice the phase value; "
                        "state the basis")
            return ("agrees if L_d/L_q labelled line-to-line are phase values; state the basis")
        ke = sheet.get("emf.constant_hot") or sheet.get("emf.constant")
        rated_u = sheet.get("rated.voltage")
        if ke is not None and rated_u is not None:
            emf = ke.value * speed
            if emf > rated_u.value:
                return (f"the back-EMF at the rated magnet temperature, {emf:.0f} V at "
                        f"{_rpm(speed)}, exceeds the rated voltage {rated_u.value:.0f} V: the "
                        f"rated point needs field-weakening current")
        return None

    @staticmethod
    def _fits(sheet: Sheet, current: tuple[float, float], voltage: tuple[float, float],
              power_factor: tuple[float, float], unc: float) -> bool:
        """True when every stated rated current, voltage and power factor is in its range."""
        get = sheet.values.get
        checks = 0
        for name, (lo, hi) in (("rated.current", current), ("rated.voltage", voltage)):
            known = get(name)
            if known is None:
                continue
            checks += 1
            tol = unc + known.uncertainty
            if not lo * (1.0 - tol) <= known.value <= hi * (1.0 + tol):
                return False
        pf = get("rated.power_factor")
        if pf is not None:
            checks += 1
            slack = power_factor_tolerance(pf.value) + pf.value * (pf.uncertainty + unc)
            if not power_factor[0] - slack <= pf.value <= power_factor[1] + slack:
                return False
        return checks > 0


# --- voltage-limit -----------------------------------------------------------------------------
@register
class VoltageLimitRelation(Relation):
    """The rated point and every listed operating point must fit the converter's voltage.

    The largest line voltage the converter gives: U_dc/√2 with space-vector modulation from a
    stated DC link; from a stated mains voltage a diode front end gives U_dc ≈ 1.35·U_mains
    under load, and with overmodulation a fundamental up to the mains voltage is assumed
    deliverable (the finding says so); with no supply stated, the rated voltage.

    For each point the dq model's MTPA voltage (hot magnets) is compared with that limit; with
    no inductances given, the back-EMF alone. A point above it needs field weakening (more
    current) or a higher supply: a ``warning``, never an error — the sheet may simply assume
    field weakening.

    Example that fails: Ke = 150 V/krpm (hot) at 3000 r/min gives 450 V of back-EMF, on a
    400 V supply.

    Fix: check Ke's basis and temperature, the rated speed, or the supply voltage.

    References: REFERENCES.md §8 (six-pulse diode bridge, SVPWM limit, power-electronics
    texts); dq model as in ``dq-operating-point``.
    """

    rule = "voltage-limit"
    title = "operating points within the converter's voltage"
    equation = "|u(T, n)|_MTPA ≤ U_limit; U_limit = U_dc/√2 or U_mains (overmodulation)"
    fields = ("supply.dc_link_voltage", "supply.mains_voltage", "rated.voltage",
              "emf.constant", "rated.speed", "rated.torque")
    kind = "bound"
    severity_policy = "warning when a point needs field weakening or a higher supply; never error"
    source = CONVERTER_SOURCE + "; " + DQ_SOURCE
    order = 73

    @_guarded
    def check(self, sheet: Sheet) -> Iterator[Finding]:
        memo = _sheet_memo(sheet)
        limit = memo.voltage_limit(sheet)
        if limit is None:
            return
        rated_u = sheet.values.get("rated.voltage")
        if (limit.from_supply and rated_u is not None
                and rated_u.value > limit.line_rms * (1.0 + rated_u.uncertainty + 1e-9)):
            beyond = rated_u.value > limit.overmodulation * (1.0 + rated_u.uncertainty + 1e-9)
            reach = (f"beyond what overmodulation gives ({limit.overmodulation:.0f} V): the rated "
                     f"point needs field weakening or a higher supply. {CAUTION}" if beyond else
                     f"reachable only with overmodulation (up to {limit.overmodulation:.0f} V)")
            yield sheet.finding(
                self, "warning" if beyond else "info",
                f"The rated voltage {rated_u.value:.0f} V is above the converter's linear "
                f"range ({limit.line_rms:.0f} V; {limit.how}): {reach}".rstrip(".") + ".",
                ["rated.voltage", *limit.fields], expected={"rated.voltage": limit.line_rms},
                actual={"rated.voltage": rated_u.value},
                deviation=rated_u.value / limit.line_rms - 1.0)
        inputs = memo.model_inputs(sheet, self.rule, need_inductances=False)
        if inputs is None:
            return
        machine = inputs.machine
        has_l = machine.ld > 0.0 and machine.lq > 0.0
        get = sheet.values.get
        # with no supply stated the limit is the rated voltage itself; without a hot back-EMF
        # the rated point would be judged with magnets at 20 °C, which overstates the EMF at
        # rated load: leave that comparison to voltage-margin, which says which it used
        prefixes = ["rated"] if limit.from_supply or sheet.has("emf.constant_hot") else []
        for prefix in [*prefixes, *_point_prefixes(sheet)]:
            speed_known = get(f"{prefix}.speed")
            if speed_known is None or speed_known.value <= 0.0:
                continue
            speed = speed_known.value
            torque = (memo.rated_torque(sheet) if prefix == "rated"
                      else _point_torque(sheet, prefix))
            emf = machine.flux_linkage * machine.pole_pairs * speed * math.sqrt(1.5)
            modelled = has_l and torque is not None and torque[0] > 0.0
            need = (memo.operating_point(machine, torque[0], speed).line_voltage_rms
                    if modelled and torque is not None else emf)
            margin = inputs.uncertainty + speed_known.uncertainty
            if need <= limit.line_rms * (1.0 + margin):
                continue
            beyond = need > limit.overmodulation * (1.0 + margin)
            fw = ""
            if modelled and torque is not None:
                what = (f"the dq model needs {need:.0f} V (MTPA, {torque[0]:.4g} N·m at "
                        f"{_rpm(speed)})")
                fw_point = memo.operating_point(machine, torque[0], speed, limit.line_rms)
                if fw_point.feasible:
                    fw = (f" With field weakening the point needs {fw_point.current_rms:.4g} A "
                          f"(i_d = {fw_point.id / SQRT2:.4g} A rms).")
                else:
                    fw = " Even field weakening cannot make this torque at this speed."
            else:
                what = f"the back-EMF alone is {emf:.0f} V at {_rpm(speed)}"
            cause = None
            if emf > limit.line_rms:
                cause = (f"the back-EMF at the magnet temperature used ({emf:.0f} V at "
                         f"{_rpm(speed)}) exceeds the voltage limit ({limit.line_rms:.0f} V)")
            voltage_field = "rated.voltage" if prefix == "rated" else f"{prefix}.speed"
            verdict = (f"Beyond what overmodulation gives ({limit.overmodulation:.0f} V): field "
                       f"weakening or a higher supply is needed. {CAUTION}" if beyond else
                       f"Overmodulation gives up to {limit.overmodulation:.0f} V: reachable.")
            yield sheet.finding(
                self, "warning" if beyond else "info",
                f"{prefix}: {what}, above the converter's linear range {limit.line_rms:.0f} V "
                f"({limit.how}).{fw} {verdict} {_join(inputs.notes)}".rstrip(),
                _unique([voltage_field, f"{prefix}.speed", *limit.fields, *inputs.fields]),
                expected_text={voltage_field: f"≤ {limit.line_rms:.0f} V"},
                actual_text={voltage_field: f"{need:.0f} V needed"},
                deviation=need / limit.line_rms - 1.0, cause=cause)


# --- field-weakening-speed ---------------------------------------------------------------------
def _reach_text(reach: float) -> str:
    """A reachable speed [rad/s] as the finding words it."""
    if math.isinf(reach):
        return "not voltage-limited (current at or above ψ/L_d)"
    return "above 100000 r/min" if reach > 1e5 * RPM else _rpm(reach)


@register
class FieldWeakeningSpeed(Relation):
    """The claimed maximum speed must be reachable within the voltage limit.

    .. math:: \\omega_{e,max} = \\frac{\\sqrt{U^2 - (R I)^2}}{\\psi - L_d I}, \\qquad
        I_{ch} = \\psi / L_d

    (peak phase quantities). The highest speed reachable with current I is the no-load point
    of deepest field weakening (i_d = −I); at I ≥ I_ch the drive is not voltage-limited in
    this model. Reports I_ch and the speed reachable at rated and at peak current (info); a
    maximum speed beyond the one reachable at rated current is a ``warning`` (beyond peak
    current too: it cannot be reached at all; beyond rated only: holding it needs more than
    rated current continuously). Magnets at the rated temperature; cold magnets reach less.

    Example that fails: ψ = 0.1 Wb, L_d = 0.5 mH, rated 70 A rms, 400 V, p = 4 — reaches
    about 11 700 r/min — claiming 15 000 r/min.

    Fix: check the maximum speed, L_d (phase value?) and the supply voltage.

    References: Soong & Miller, IEE Proc. EPA 141(6), 1994 (characteristic current; from
    memory); dq model as in ``dq-operating-point``.
    """

    rule = "field-weakening-speed"
    title = "maximum speed reachable by field weakening"
    equation = "n_max(I) = √(U² − (R·I)²)/(p·(ψ − L_d·I)); I_ch = ψ/L_d"
    fields = ("limits.max_speed", "rated.current", "limits.peak_current", "circuit.ld",
              "emf.constant", "rated.voltage")
    kind = "bound"
    severity_policy = "warning when the maximum speed exceeds the reach at rated current"
    source = DQ_SOURCE + "; Soong & Miller, IEE Proc. EPA 141(6), 1994"
    order = 74

    @_guarded
    def check(self, sheet: Sheet) -> Iterator[Finding]:
        get = sheet.values.get
        memo = _sheet_memo(sheet)
        inputs = memo.model_inputs(sheet, self.rule)
        limit = memo.voltage_limit(sheet)
        rated_i = get("rated.current")
        if inputs is None or limit is None or rated_i is None or rated_i.value <= 0.0:
            return
        machine = inputs.machine
        i_ch = characteristic_current(machine) / SQRT2
        reach_rated = max_speed_at_current(machine, rated_i.value, limit.line_rms)
        peak_i = get("limits.peak_current")
        reach_peak = (max_speed_at_current(machine, peak_i.value, limit.line_rms)
                      if peak_i is not None and peak_i.value > 0.0 else None)
        text = _reach_text
        facts = (f"Characteristic current ψ/L_d = {i_ch:.4g} A rms; highest speed within "
                 f"{limit.line_rms:.0f} V at rated current {rated_i.value:.4g} A: "
                 f"{text(reach_rated)}")
        if reach_peak is not None and peak_i is not None:
            facts += f", at peak current {peak_i.value:.4g} A: {text(reach_peak)}"
        facts += f" (magnets at the rated temperature; {limit.how}). {_join(inputs.notes)}"
        facts = facts.rstrip()
        fields = ["limits.max_speed", "rated.current", *limit.fields, *inputs.fields]
        max_speed = get("limits.max_speed")
        if max_speed is None or max_speed.value <= 0.0:
            yield sheet.finding(self, "info", facts, fields[1:])
            return
        margin = inputs.uncertainty + rated_i.uncertainty + max_speed.uncertainty + 0.02
        if max_speed.value <= reach_rated * (1.0 + margin):
            yield sheet.finding(self, "info", facts, fields)
            return
        if reach_peak is not None and max_speed.value <= reach_peak * (1.0 + margin):
            lead = (f"The maximum speed {_rpm(max_speed.value)} is reachable only with more "
                    f"than rated current (up to the peak current), not continuously.")
        else:
            lead = (f"The maximum speed {_rpm(max_speed.value)} is beyond the reach of field "
                    f"weakening within the voltage limit.")
        yield sheet.finding(
            self, "warning", f"{lead} {facts} {CAUTION}",
            [*fields, *(["limits.peak_current"] if peak_i is not None else [])],
            expected_text={"limits.max_speed": f"≤ {text(reach_rated)}"},
            actual={"limits.max_speed": max_speed.value},
            deviation=(max_speed.value / reach_rated - 1.0) if reach_rated > 0 else None,
            cause=("field weakening needs a current above ψ/L_d·(1 − U/(ω_e·ψ)); a higher "
                   "supply voltage, a lower maximum speed or a larger L_d fits"))


# --- overspeed-emf -----------------------------------------------------------------------------
@register
class OverspeedEmf(Relation):
    """Back-EMF at maximum speed, magnets cold, against the DC link.

    .. math:: \\hat u_{LL} = \\sqrt2\\,K_{e,cold}\\,\\omega_{max} \\le U_{dc}

    K_e at the lowest ambient (``machine.ambient.min``; 20 °C when none is given, said so);
    U_dc stated, or √2·U_mains (what a diode front end's capacitors charge to at no load).
    Above it, a converter that trips or stops switching at speed no longer controls the
    current: the machine feeds the DC link through the free-wheeling diodes (uncontrolled
    regeneration), which can overcharge the capacitors and drive a braking current. That is a
    ``warning``. The speed at which the back-EMF reaches the DC link is reported (``info``).

    Example that fails: Ke = 100 V/krpm cold, 6000 r/min maximum, 565 V DC link: 849 V peak.

    Fix: limit the speed mechanically or by the process, add overvoltage protection (braking
    chopper, short-circuit of the terminals by a protective device) as the converter
    manufacturer specifies; follow the manufacturer and local codes.

    References: REFERENCES.md §8 and §9 (DC link of a diode bridge; common practice).
    """

    rule = "overspeed-emf"
    title = "back-EMF at maximum speed vs DC link"
    equation = "√2·Ke_cold·ω_max ≤ U_dc"
    fields = ("emf.constant_cold", "limits.max_speed", "supply.dc_link_voltage",
              "supply.mains_voltage", "machine.ambient.min")
    kind = "safety"
    severity_policy = "warning when the peak back-EMF at maximum speed exceeds the DC link"
    source = CONVERTER_SOURCE + "; common practice"
    order = 75

    @_guarded
    def check(self, sheet: Sheet) -> Iterator[Finding]:
        dc = dc_link_voltage(sheet)
        if dc is None:
            return
        ke_field, ke, note = self._cold_ke(sheet)
        if ke is None or ke <= 0.0:
            return
        u_dc, dc_how, dc_fields = dc
        known = sheet.values.get(ke_field)
        # the unsafe end of Ke: its written precision (or the spread of the readings it was
        # derived from) raises it, never lowers it (DESIGN.md, Judgement 4)
        ke_high = ke * (1.0 + (known.uncertainty if known is not None else 0.0))
        crossing = speed_at_back_emf(ke_high, u_dc)
        temperature_note = f": {note}" if note else ""
        top = _highest_speed(sheet)
        fields = [ke_field, *dc_fields]
        if top is None:
            yield sheet.finding(
                self, "info",
                f"The peak line back-EMF (cold magnets{temperature_note}) reaches the DC link "
                f"{u_dc:.0f} V ({dc_how}) at {_rpm(crossing)}; the sheet names no speed.",
                fields)
            return
        speed_field, speed_known = top
        speed = speed_known.value * (1.0 + speed_known.uncertainty)
        peak = peak_line_back_emf(ke_high, speed)
        nominal = peak_line_back_emf(ke, speed_known.value)
        fields.insert(0, speed_field)
        which = ("the maximum speed" if speed_field == "limits.max_speed" else
                 f"the highest speed the sheet names ({speed_field}; no maximum speed given)")
        if peak <= u_dc:
            yield sheet.finding(
                self, "info",
                f"Peak line back-EMF at {which} {_rpm(speed_known.value)} is {nominal:.0f} V "
                f"(cold magnets{temperature_note}), within the DC link {u_dc:.0f} V "
                f"({dc_how}); it would reach the DC link at {_rpm(crossing)}.",
                fields)
            return
        within_digits = nominal <= u_dc
        yield sheet.finding(
            self, "warning",
            f"At {which} {_rpm(speed_known.value)} the peak line back-EMF "
            f"{'may reach' if within_digits else 'is'} {peak if within_digits else nominal:.0f} "
            f"V (cold magnets{temperature_note}"
            f"{'; at the top of the written digits of Ke' if within_digits else ''}), above "
            f"the DC link {u_dc:.0f} V ({dc_how}); it reaches the DC link at {_rpm(crossing)}. "
            f"If the converter trips or stops switching above that speed, the machine charges "
            f"the DC link through the diodes: uncontrolled regeneration that can overvolt the "
            f"converter. Add overvoltage protection as the converter manufacturer specifies, or "
            f"limit the speed; follow the manufacturer and local codes. {CAUTION}",
            fields, expected_text={speed_field: f"≤ {_rpm(crossing)}"},
            actual={speed_field: speed_known.value},
            deviation=speed_known.value / crossing - 1.0,
            cause="back-EMF constant too high for this DC link at this speed")

    @staticmethod
    def _cold_ke(sheet: Sheet) -> tuple[str, float | None, str | None]:
        cold = sheet.values.get("emf.constant_cold")
        if cold is not None:
            return "emf.constant_cold", cold.value, cold.note
        pairs = _pole_pairs(sheet)
        flux = _flux_linkage(sheet, pairs[0], "cold") if pairs else None
        if flux is None or pairs is None:
            return "emf.constant", None, None
        psi, name, note, _, _ = flux
        return name, psi * math.sqrt(1.5) * pairs[0], note


# --- pull-out-margin ---------------------------------------------------------------------------
@register
class PullOutMargin(Relation):
    """Pull-out torque at rated voltage and frequency under open-loop U/f operation.

    With the voltage and frequency imposed, the torque is a function of the load angle δ
    between voltage and back-EMF:

    .. math:: T(\\delta) \\approx \\tfrac32 p\\Bigl[\\frac{\\psi U}{\\omega_e L_d}\\sin\\delta
        + \\frac{U^2}{2\\omega_e^2}\\Bigl(\\frac1{L_q} - \\frac1{L_d}\\Bigr)\\sin 2\\delta\\Bigr]

    (R included in the solution). Reports δ at the rated torque and the pull-out torque; a
    ratio T_pull-out/T_rated below ``min_ratio`` (default 1.35, the pull-out torque IEC
    60034-1 asks of synchronous motors, value from memory, not verified) is a ``warning``.
    Closed-loop (field-oriented) control holds the angle itself; the margin matters for
    open-loop U/f starts and sensorless fallback.

    Example that fails: L_d = L_q so large that the rated load angle is 60°.

    Fix: run closed-loop, or check L_d/L_q and the rated voltage.

    References: IEC 60034-1 (pull-out torque of synchronous motors; from memory);
    synchronous-machine torque-angle relation (Krishnan 2010).
    """

    rule = "pull-out-margin"
    title = "open-loop pull-out margin"
    equation = "T_po = max_δ T(δ) at U_rated, f_rated; T_po/T_rated ≥ 1.35"
    fields = ("rated.voltage", "rated.speed", "rated.torque", "circuit.ld", "circuit.lq")
    kind = "band"
    severity_policy = "warning when T_po/T_rated < min_ratio"
    source = DQ_SOURCE + "; IEC 60034-1 (pull-out torque of synchronous motors)"
    status = "trial"
    order = 76
    options = {"min_ratio": RuleOption(
        "number", "1.35", "least pull-out torque over rated torque at rated voltage (U/f)")}

    @_guarded
    def check(self, sheet: Sheet) -> Iterator[Finding]:
        get = sheet.values.get
        memo = _sheet_memo(sheet)
        inputs = memo.model_inputs(sheet, self.rule)
        rated_u, speed = get("rated.voltage"), get("rated.speed")
        torque = memo.rated_torque(sheet)
        if (inputs is None or rated_u is None or speed is None or torque is None
                or rated_u.value <= 0.0 or speed.value <= 0.0 or torque[0] <= 0.0):
            return
        min_ratio = float(sheet.option(self.rule, "min_ratio", 1.35))
        t_po, _, angle = open_loop_operation(inputs.machine, rated_u.value, speed.value,
                                             torque[0])
        fields = ["rated.voltage", "rated.speed", *torque[1], *inputs.fields]
        closed = ("Closed-loop (field-oriented) control holds the angle itself; this margin "
                  "concerns open-loop U/f operation.")
        ratio = t_po / torque[0]
        if not (math.isfinite(ratio) and ratio > 0.0):
            return
        facts = (f"At rated voltage {rated_u.value:.0f} V and {_rpm(speed.value)} the machine "
                 f"pulls out at {t_po:.4g} N·m ({ratio:.2f}× rated torque)"
                 + (f"; load angle at rated torque {math.degrees(angle):.1f}°" if angle is not
                    None else "; rated torque is beyond pull-out")
                 + f". {closed} {_join(inputs.notes)}".rstrip())
        if ratio >= min_ratio:
            yield sheet.finding(self, "info", facts, fields)
            return
        yield sheet.finding(
            self, "warning", f"Rated point too close to pull-out under U/f. {facts}",
            fields, expected_text={torque[1][0]: f"≤ {t_po / min_ratio:.4g} N·m"},
            actual_text={torque[1][0]: f"{torque[0]:.4g} N·m"}, deviation=min_ratio / ratio - 1)

