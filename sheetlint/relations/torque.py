"""Torque constant: Kt against Ke, and rated, standstill and peak torque per ampere against Kt.

Every check here is a *model* relation (DESIGN.md, Judgement 2): the written digits plus a
model band — the spread that consistent catalogue data show — each band a named constant below
with its source. What a sheet leaves unstated (Kt's magnet temperature and definition, the rated
magnet temperature) widens the admitted interval to every usual reading (Judgement 3), and the
failure names the reading assumed.

Symbols: Kt20 = √3·Ke at 20 °C (N·m per rms ampere, Ke in V line rms per mechanical rad/s), from
the power balance T·ω = √3·E_LL·I of a sinusoidal machine with i_d = 0.
"""

from __future__ import annotations

import math
from collections.abc import Iterator

from sheetlint.engine.core import Derivation, Finding, Sheet
from sheetlint.engine.monomial import Evaluation, Monomial
from sheetlint.relations.emf import magnet_factor, magnet_interval, to_room_factor
from sheetlint.relations.registry import register
from sheetlint.units import ROOM_TEMPERATURE as ROOM

SQRT3 = math.sqrt(3.0)

#: Kt against √3·Ke when both are printed at the same magnet temperature: ±3 %, the catalogue
#: tolerance of each constant (common practice; DESIGN.md model bands)
KT_KE_BAND = 0.03
#: rated T/I over Kt20 on consistent sheets, surface magnets: hot magnets take 8–11 %, loss
#: torque 1–5 %, saturation a little more (common practice; DESIGN.md model bands)
RATED_TORQUE_PER_AMPERE_SPM = (0.84, 1.05)
#: the same for interior magnets: reluctance torque adds. DESIGN.md's band gives up to 1.10;
#: widened to 1.30 because the dq model's torque T = 1.5·p·(ψ·i_q + (L_d − L_q)·i_d·i_q) at
#: MTPA gives a saliency-3 machine 15–30 % reluctance torque (amplitude-invariant dq model,
#: Krishnan 2010; the share by our own arithmetic)
RATED_TORQUE_PER_AMPERE_IPM = (0.84, 1.30)
#: PM-assisted reluctance machines: most of the torque is reluctance torque, so T/I may be
#: several times √3·Ke (same model; bound by our own arithmetic for saliency up to 6)
RATED_TORQUE_PER_AMPERE_PMASYNRM = (0.84, 3.0)
#: standstill (0 rpm) torque per ampere against Kt: ±5 % (common practice; DESIGN.md model bands)
STANDSTILL_TORQUE_PER_AMPERE = (0.95, 1.05)
#: peak torque per peak current against Kt: saturation takes up to a quarter (common practice;
#: DESIGN.md model bands)
PEAK_TORQUE_PER_AMPERE = (0.75, 1.0)

KT_SOURCE = ("power balance T·ω = √3·E_LL·I of the sinusoidal PM machine with i_d = 0 "
             "(R. Krishnan, Permanent Magnet Synchronous and Brushless DC Motor Drives, "
             "CRC Press 2010); bands: common practice")


def rated_band(sheet: Sheet) -> tuple[float, float]:
    """Rated T/I over Kt20 on consistent sheets, by topology (the wider band when unstated).

    A small machine's loss torque may take more than the band's 1–5 %: its low end also admits
    the hot magnets less every loss the sheet's efficiency leaves room for, (1 − η)/η of the
    output (all losses taken as loss torque: the bound a power balance allows)."""
    topology = sheet.attr("machine.topology")
    if topology == "spm":
        low, high = RATED_TORQUE_PER_AMPERE_SPM
    elif topology == "pmasynrm":
        low, high = RATED_TORQUE_PER_AMPERE_PMASYNRM
    else:  # ipm, and a sheet that does not state its topology
        low, high = RATED_TORQUE_PER_AMPERE_IPM
    efficiency = sheet.get("rated.efficiency")
    if efficiency is not None and 0.5 < efficiency.value < 1.0:
        _, hottest, _ = magnet_interval(sheet)
        losses = (1.0 - efficiency.value) / efficiency.value
        low = min(low, magnet_factor(sheet, ROOM, hottest) * (1.0 - losses))
    return low, high


def kt_stated_temperature(sheet: Sheet) -> float | None:
    """Kt's magnet temperature as the sheet states it, kelvin; None when unstated."""
    kt = sheet.get("torque_constant")
    return None if kt is None else kt.temperature


def kt_reading_interval(sheet: Sheet) -> tuple[float, float, str]:
    """(least, largest) of Kt as printed over Kt20 that the sheet admits, and the reading.

    Stated temperature: the remanence factor to it, ±3 %. Unstated: the 20 °C constant of
    servo catalogues, the hot constant, or rated T/I of industrial sheets (DESIGN.md,
    Judgement 3) — the hull of the three.
    """
    stated = kt_stated_temperature(sheet)
    if stated is not None:
        factor = magnet_factor(sheet, ROOM, stated)
        return (factor * math.exp(-KT_KE_BAND), factor * math.exp(KT_KE_BAND),
                f"Kt at {stated - 273.15:.0f} °C")
    _, hottest, _ = magnet_interval(sheet)
    hot = magnet_factor(sheet, ROOM, hottest)
    low, high = rated_band(sheet)
    return (min(hot * math.exp(-KT_KE_BAND), low), max(math.exp(KT_KE_BAND), high),
            "Kt's magnet temperature and definition not stated: read as the 20 °C constant, "
            "the hot constant or rated T/I")


def _log_interval(low: float, high: float) -> tuple[float, float]:
    return math.log(low), math.log(high)


@register
class TorqueConstant(Monomial):
    """Torque constant and back-EMF constant are one constant seen from two sides.

    .. math:: K_t[\\mathrm{N\\,m/A_{rms}}] = \\sqrt3\\,K_e[\\mathrm{V_{LL,rms}\\,s/rad}]
              = 0.016540\\,K_e[\\mathrm{V/krpm}]

    from the power balance T·ω = √3·E_LL·I of a sinusoidal machine with i_d = 0, compared at
    the same magnet temperature, within ±3 % (the catalogue tolerance of each constant, common
    practice). When the sheet does not say at which magnet temperature Kt holds, every usual
    reading is admitted: the 20 °C constant of servo catalogues, the hot constant, and rated
    T/I at the hot rated point of industrial sheets (0.84…1.05 of √3·Ke at 20 °C for surface
    magnets, more with reluctance torque).

    Example that fails: Ke 100 V/krpm (line, rms) with Kt 1.0 N·m/A (√3·Ke gives 1.65).

    References: R. Krishnan, *Permanent Magnet Synchronous and Brushless DC Motor Drives*,
    CRC Press 2010 (torque and EMF constants; from memory: chapter).
    """

    rule = "emf-constant"
    title = "Kt and Ke"
    equation = "Kt = √3·Ke (same magnet temperature)"
    fields = ("torque_constant", "emf.constant")
    terms = {"torque_constant": 1.0, "emf.constant": -1.0}
    reported = "torque_constant"
    kind = "model"
    severity_policy = ("model band ±3 % at a stated temperature; unstated Kt: the 20 °C "
                       "constant, the hot constant or rated T/I admitted")
    source = KT_SOURCE
    order = 21
    derive_inputs = ("torque_constant", "emf.constant")
    derive_outputs = ("torque_constant", "emf.constant")

    def constant(self, sheet: Sheet) -> float | None:
        ke = sheet.get("emf.constant")
        if ke is None:
            return None
        return SQRT3 * to_room_factor(sheet, ke.temperature)

    def allowed(self, sheet: Sheet) -> tuple[float, float]:
        low, high, _ = kt_reading_interval(sheet)
        return _log_interval(low, high)

    def reading_note(self, sheet: Sheet) -> str:
        return kt_reading_interval(sheet)[2]

    def describe(self, sheet: Sheet, evaluation: Evaluation) -> str:
        return "Kt and √3·Ke disagree"

    def derive(self, sheet: Sheet) -> Iterator[Derivation]:
        v = sheet.values
        if "torque_constant" not in v and "emf.constant" in v:
            ke = v["emf.constant"]
            yield Derivation("torque_constant", SQRT3 * ke.value * to_room_factor(
                sheet, ke.temperature), ke.uncertainty, ("emf.constant",),
                estimate=ke.is_estimate, note="the 20 °C constant √3·Ke",
                temperature=ROOM, sources=((ke, 1.0),))
        elif "emf.constant" not in v and "torque_constant" in v:
            kt = v["torque_constant"]
            low, high, reading = kt_reading_interval(sheet)
            # Ke at 20 °C over the admitted readings: centred, the interval as its uncertainty,
            # so that a safety check can take its top end (the highest Ke the sheet admits)
            centre = math.sqrt(low * high)
            spread = math.log(high / low) / 2
            ke = kt.value / (SQRT3 * centre)
            yield Derivation("emf.constant", ke, kt.uncertainty + spread, ("torque_constant",),
                             estimate=kt.is_estimate, temperature=ROOM,
                             note=f"at 20 °C, Kt/√3 ({reading})", sources=((kt, 1.0),))

    def extra_findings(self, sheet: Sheet) -> Iterator[Finding]:
        """Kt's magnet temperature unstated and the relation holding: which reading fits
        (info). When the relation fails, its failure is the finding, not this."""
        if not (sheet.given("torque_constant") and sheet.given("emf.constant")) or \
                kt_stated_temperature(sheet) is not None:
            return
        evaluation = self.evaluate(sheet)
        if evaluation is None or evaluation.fails:
            return
        ratio = math.exp(evaluation.residual)
        _, hottest, _ = magnet_interval(sheet)
        hot = magnet_factor(sheet, ROOM, hottest)
        if abs(math.log(ratio)) <= KT_KE_BAND:
            reading = "the 20 °C constant"
        elif abs(math.log(ratio / hot)) <= KT_KE_BAND:
            reading = f"the constant at about {hottest - 273.15:.0f} °C"
        else:
            reading = "rated torque per ampere (industrial practice)"
        yield sheet.finding(self, "info", f"the sheet does not state Kt's magnet temperature; "
                            f"Kt = {ratio:.3f}·√3·Ke(20 °C) reads as {reading}",
                            ("torque_constant", "emf.constant"))


class _TorquePerAmpere(Monomial):
    """Shared by the rated, standstill and peak torque-per-ampere checks: T/I against Kt when
    the sheet gives Kt, else against √3·Ke at 20 °C."""

    rule = "emf-constant"
    kind = "model"
    source = KT_SOURCE
    derive_fields = ()
    allow_estimates = True
    reported = "rated.torque"
    torque_field = "rated.torque"
    current_field = "rated.current"

    def reference(self, sheet: Sheet) -> str:
        return "torque_constant" if sheet.given("torque_constant") else "emf.constant"

    def field_names(self, sheet: Sheet) -> dict[str, float]:
        return {self.at(self.torque_field): 1.0, self.at(self.current_field): -1.0,
                self.reference(sheet): -1.0}

    def reported_field(self, sheet: Sheet) -> str:
        return self.at(self.torque_field)

    def constant(self, sheet: Sheet) -> float | None:
        reference = sheet.get(self.reference(sheet))
        if reference is None:
            return None
        if self.reference(sheet) == "emf.constant":
            return SQRT3 * to_room_factor(sheet, reference.temperature)
        return 1.0

    def band(self, sheet: Sheet) -> tuple[float, float]:
        """T/I over Kt20 on consistent sheets."""
        raise NotImplementedError

    def allowed(self, sheet: Sheet) -> tuple[float, float]:
        low, high = self.band(sheet)
        if self.reference(sheet) == "torque_constant":
            k_low, k_high, _ = kt_reading_interval(sheet)
            return _log_interval(low / k_high, high / k_low)
        return _log_interval(low, high)

    def reading_note(self, sheet: Sheet) -> str:
        if self.reference(sheet) == "torque_constant":
            return kt_reading_interval(sheet)[2]
        return "against √3·Ke at 20 °C"


@register
class TorquePerAmpere(_TorquePerAmpere):
    """Rated torque per ampere against the torque constant.

    .. math:: 0.84 \\le \\frac{T_{rated}/I_{rated}}{K_{t,20}} \\le 1.05 \\;(1.30, 3.0)

    At the rated point the magnets are hot (−8…−11 % for NdFeB), iron and friction losses take
    1–5 % of the torque, and saturation a little more; interior-magnet and PM-assisted
    reluctance machines gain reluctance torque (up to 1.30 for ``ipm`` and for a sheet that
    does not state its topology, 3.0 for ``pmasynrm``). The bands are the spread of
    consistent catalogue data (common practice). With a stated Kt the comparison is against it,
    read at every admissible definition.

    Example that fails: spm, Ke 200 V/krpm (Kt 3.31 N·m/A at 20 °C), 100 N·m at 20 A
    (5 N·m/A).

    References: T = 1.5·p·ψ·i_q for i_d = 0 (dq model of the PM synchronous machine,
    Krishnan 2010); bands: common practice.
    """

    title = "rated torque per ampere and Kt"
    equation = "T/I = (0.84…1.05)·Kt20 (spm); up to 1.30 (ipm), 3.0 (pmasynrm)"
    fields = ("rated.torque", "rated.current", "torque_constant", "emf.constant")
    terms = {"rated.torque": 1.0, "rated.current": -1.0, "emf.constant": -1.0}
    severity_policy = "model band 0.84–1.05 (spm), 0.84–1.30 (ipm), 0.84–3.0 (pmasynrm) of Kt20"
    order = 22

    def band(self, sheet: Sheet) -> tuple[float, float]:
        low, high = rated_band(sheet)
        _, hottest, _ = magnet_interval(sheet)
        # a ferrite or a very hot magnet may take more than NdFeB at 120 °C does
        return min(low, magnet_factor(sheet, ROOM, hottest) * 0.95), high

    def describe(self, sheet: Sheet, evaluation: Evaluation) -> str:
        return "rated torque per ampere and the torque constant disagree"


class _BandAgainstKt(_TorquePerAmpere):
    """A torque per ampere within ``kt_band`` of a stated Kt; against √3·Ke at 20 °C the low
    end also admits hot magnets; against a Kt of unstated definition (it may be a hot T/I) the
    high end rises by as much as that reading lowers Kt."""

    kt_band: tuple[float, float] = (1.0, 1.0)

    def band(self, sheet: Sheet) -> tuple[float, float]:
        low, high = self.kt_band
        if self.reference(sheet) == "torque_constant":
            return low, high
        _, hottest, _ = magnet_interval(sheet)
        return low * min(1.0, magnet_factor(sheet, ROOM, hottest)), high

    def allowed(self, sheet: Sheet) -> tuple[float, float]:
        low, high = self.band(sheet)
        if self.reference(sheet) == "torque_constant" and kt_stated_temperature(sheet) is None:
            k_low, _, _ = kt_reading_interval(sheet)
            return _log_interval(low, high / min(1.0, k_low))
        return _log_interval(low, high)


@register
class StandstillTorquePerAmpere(_BandAgainstKt):
    """Standstill (0 rpm) torque per ampere is the torque constant.

    .. math:: T_0/I_0 = K_t \\pm 5\\,\\%

    A point at 0 rpm in ``points`` is the stall point every servo catalogue prints
    (continuous standstill torque and current). Against a stated Kt the band is ±5 %
    (common practice); against √3·Ke at 20 °C its low end also admits hot magnets.

    Example that fails: Kt 1.2 N·m/A, standstill 6.0 N·m at 7.1 A (a peak current: ×√2).

    References: definition of the torque constant (Krishnan 2010); band: common practice.
    """

    title = "standstill torque per ampere and Kt"
    equation = "T0/I0 = Kt ± 5 %"
    fields = ("points[].torque", "points[].current", "torque_constant", "emf.constant")
    terms = {"rated.torque": 1.0, "rated.current": -1.0, "emf.constant": -1.0}
    severity_policy = "model band ±5 % of Kt"
    order = 23
    per_point = True
    kt_band = STANDSTILL_TORQUE_PER_AMPERE

    def variants(self, sheet: Sheet) -> list[Monomial]:
        out: list[Monomial] = []
        values = sheet.values
        for variant in super().variants(sheet):
            if variant.prefix == "rated.":
                continue
            speed = values.get(variant.prefix + "speed")
            if speed is not None and speed.is_given and speed.value == 0.0:
                out.append(variant)
        return out

    def describe(self, sheet: Sheet, evaluation: Evaluation) -> str:
        return "standstill torque per ampere and the torque constant disagree"


@register
class PeakTorquePerAmpere(_BandAgainstKt):
    """Peak torque per peak current lies a little under the torque constant.

    .. math:: 0.75 \\le \\frac{T_{peak}/I_{peak}}{K_t} \\le 1.0

    At peak current the iron saturates and the torque per ampere falls (common practice).

    Example that fails: Kt 2.0 N·m/A, peak 60 N·m at 20 A (3 N·m/A: the peak current is
    probably an rms value of a different rating).

    References: definition of the torque constant (Krishnan 2010); band: common practice.
    """

    title = "peak torque per peak current and Kt"
    equation = "T_peak/I_peak = (0.75…1.0)·Kt"
    fields = ("limits.peak_torque", "limits.peak_current", "torque_constant", "emf.constant")
    terms = {"limits.peak_torque": 1.0, "limits.peak_current": -1.0, "emf.constant": -1.0}
    reported = "limits.peak_torque"
    torque_field = "limits.peak_torque"
    current_field = "limits.peak_current"
    severity_policy = "model band 0.75–1.0 of Kt (saturation)"
    order = 23
    kt_band = PEAK_TORQUE_PER_AMPERE

    def describe(self, sheet: Sheet, evaluation: Evaluation) -> str:
        return "peak torque per peak current and the torque constant disagree"
