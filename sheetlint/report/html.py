"""One self-contained HTML report (``sheetlint report PATH... -o report.html``).

Everything is inline: CSS in a ``<style>`` element, plots as inline SVG drawn here, no script,
no font, no image and no link to the network, so the file opens the same offline and years later.
Per machine: the findings (accepted ones marked with their reason), two plots where a
picture beats a table, the given values and the derived values with their provenance. Every
string that comes from the data is escaped with :func:`html.escape`.

The plots draw the sheet's own values, and every limit in them is computed by the same
function the findings use (the converter's voltage limit of the machine-model checks, the DC
link of a stopped converter and the speed at which the cold back-EMF reaches it, as in the
overspeed check), so a crossing in a plot is the crossing a finding reports:

- back-EMF against speed: E_LL,rms = Ke·ω for each known magnet temperature, with the rated
  voltage, the converter's voltage limit, the DC link of a stopped converter (drawn at U_dc/√2,
  where the line rms back-EMF has a peak of U_dc), the speed at which the cold back-EMF reaches
  it, and the maximum speed;
- torque against speed: the machine-model envelope at the rated and the peak current when ψ
  (or Ke), Ld, Lq and p are known; otherwise an estimate (the torque up to rated speed, then
  constant power), with the rated and listed points, the current limit, the speed where the
  back-EMF reaches the voltage limit, and the maximum speed; for a servo sheet with a
  standstill (0 rpm) point, that point, the continuous line from it to the rated point and
  the peak torque line.

One meaning per colour and per line style in every plot (:data:`ROLES`): solid lines are
values from the sheet or worked out from it, dashed lines are estimates, dotted lines are
limits.
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass, field
from datetime import UTC, datetime
from html import escape
from typing import Any

from sheetlint import __version__
from sheetlint.batch import FileResult, relative
from sheetlint.cautions import CAUTIONS, FINDING_CAUTION, SAFETY_RULES
from sheetlint.engine.core import Finding, Known, Sheet
from sheetlint.engine.run import RecordResult, derived_payload
from sheetlint.report.json_report import summary
from sheetlint.report.text import units

RPM = 2.0 * math.pi / 60.0  # rad/s per r/min
SQRT2 = math.sqrt(2.0)
#: one colour per meaning, the same in every plot (Okabe-Ito colours, distinguishable with the
#: common colour-vision deficiencies)
ROLES: dict[str, str] = {
    "machine": "#0072B2",      # the machine at the rated current / Ke as given
    "hot": "#E69F00",          # magnets at the rated (hot) temperature
    "cold": "#56B4E9",         # magnets at the lowest ambient (cold)
    "peak": "#CC79A7",         # the machine at its peak current
    "rated": "#009E73",        # rated values of the sheet
    "converter": "#D55E00",    # the converter's voltage limit while running
    "dc-link": "#000000",      # the DC link of a stopped converter
    "speed-limit": "#666666",  # maximum speed
}
DASH_ESTIMATE = "6 4"
DOT_LIMIT = "2 3"


# --- plot description (plain data) and SVG drawing ------------------------------------------
@dataclass(slots=True)
class Series:
    label: str
    xs: list[float]
    ys: list[float]
    role: str = "machine"
    estimate: bool = False  # drawn dashed and labelled as an estimate


@dataclass(slots=True)
class Reference:
    """A horizontal (``axis="y"``) or vertical (``axis="x"``) limit line, drawn dotted."""

    label: str
    value: float
    axis: str = "y"
    role: str = "converter"


@dataclass(slots=True)
class Marker:
    label: str
    x: float
    y: float


@dataclass(slots=True)
class Plot:
    title: str
    x_label: str
    y_label: str
    series: list[Series] = field(default_factory=list)
    references: list[Reference] = field(default_factory=list)
    markers: list[Marker] = field(default_factory=list)
    note: str = ""


def nice_step(span: float, target_ticks: int = 5) -> float:
    """Tick step of 1, 2 or 5 times a power of ten giving about ``target_ticks`` ticks."""
    if not math.isfinite(span) or span <= 0.0:
        return 1.0
    raw = span / target_ticks
    power = 10.0 ** math.floor(math.log10(raw))
    for factor in (1.0, 2.0, 5.0, 10.0):
        if raw <= factor * power:
            return factor * power
    return 10.0 * power


def _tick_text(value: float, step: float) -> str:
    if step >= 1.0:
        return f"{value:.0f}"
    decimals = max(0, -math.floor(math.log10(step)))
    return f"{value:.{decimals}f}"


def _finite(values: Iterable[float]) -> list[float]:
    return [v for v in values if math.isfinite(v)]


def svg(plot: Plot, width: int = 600, height: int = 350) -> str:
    """The plot as an inline ``<svg>`` element (axes from zero, ticks, lines, legend)."""
    left, right, top, bottom = 64, 16, 30, 46
    xs = _finite([*(x for s in plot.series for x in s.xs), *(m.x for m in plot.markers),
                  *(r.value for r in plot.references if r.axis == "x")])
    ys = _finite([*(y for s in plot.series for y in s.ys), *(m.y for m in plot.markers),
                  *(r.value for r in plot.references if r.axis == "y")])
    x_max = max([v for v in xs if v > 0] or [1.0]) * 1.05
    y_max = max([v for v in ys if v > 0] or [1.0]) * 1.10
    x_step, y_step = nice_step(x_max), nice_step(y_max)
    x_max = math.ceil(x_max / x_step) * x_step
    y_max = math.ceil(y_max / y_step) * y_step
    plot_w, plot_h = width - left - right, height - top - bottom

    def px(x: float) -> float:
        return left + plot_w * min(max(x, 0.0), x_max) / x_max

    def py(y: float) -> float:
        return top + plot_h * (1.0 - min(max(y, 0.0), y_max) / y_max)

    legend_items = [(s.label, ROLES[s.role], "dash" if s.estimate else "line")
                    for s in plot.series]
    ref_colors = {id(r): ROLES[r.role] for r in plot.references}
    legend_items += [(r.label, ref_colors[id(r)], "ref") for r in plot.references]
    legend_items += [(m.label, "#000000", "marker") for m in plot.markers]
    legend_h = 18 * len(legend_items) + 8
    total_h = height + legend_h
    out = [f'<svg xmlns="http://www.w3.org/2000/svg" class="plot" role="img" '
           f'viewBox="0 0 {width} {total_h}" width="{width}" height="{total_h}">',
           f"<title>{escape(plot.title)}</title>",
           f'<text x="{left}" y="18" class="plot-title">{escape(plot.title)}</text>',
           f'<rect x="{left}" y="{top}" width="{plot_w}" height="{plot_h}" class="frame"/>']
    tick = 0.0
    while tick <= x_max + 1e-9 * x_max:
        x = px(tick)
        out.append(f'<line x1="{x:.1f}" y1="{top}" x2="{x:.1f}" y2="{top + plot_h}" '
                   'class="grid"/>')
        out.append(f'<text x="{x:.1f}" y="{top + plot_h + 16}" class="tick" '
                   f'text-anchor="middle">{_tick_text(tick, x_step)}</text>')
        tick += x_step
    tick = 0.0
    while tick <= y_max + 1e-9 * y_max:
        y = py(tick)
        out.append(f'<line x1="{left}" y1="{y:.1f}" x2="{left + plot_w}" y2="{y:.1f}" '
                   'class="grid"/>')
        out.append(f'<text x="{left - 6}" y="{y + 4:.1f}" class="tick" '
                   f'text-anchor="end">{_tick_text(tick, y_step)}</text>')
        tick += y_step
    out.append(f'<text x="{left + plot_w / 2:.1f}" y="{height - 8}" class="axis" '
               f'text-anchor="middle">{escape(plot.x_label)}</text>')
    out.append(f'<text x="14" y="{top + plot_h / 2:.1f}" class="axis" text-anchor="middle" '
               f'transform="rotate(-90 14 {top + plot_h / 2:.1f})">{escape(plot.y_label)}'
               "</text>")
    for r in plot.references:
        color = ref_colors[id(r)]
        if r.axis == "x":
            x = px(r.value)
            out.append(f'<line x1="{x:.1f}" y1="{top}" x2="{x:.1f}" y2="{top + plot_h}" '
                       f'stroke="{color}" class="ref" data-role="{r.role}" '
                       f'data-value="{r.value:.6g}"><title>{escape(r.label)}</title></line>')
        else:
            y = py(r.value)
            out.append(f'<line x1="{left}" y1="{y:.1f}" x2="{left + plot_w}" y2="{y:.1f}" '
                       f'stroke="{color}" class="ref" data-role="{r.role}" '
                       f'data-value="{r.value:.6g}"><title>{escape(r.label)}</title></line>')
    for s in plot.series:
        points = " ".join(f"{px(x):.1f},{py(y):.1f}" for x, y in zip(s.xs, s.ys, strict=False)
                          if math.isfinite(x) and math.isfinite(y))
        dash = f' stroke-dasharray="{DASH_ESTIMATE}"' if s.estimate else ""
        out.append(f'<polyline points="{points}" fill="none" data-role="{s.role}" '
                   f'stroke="{ROLES[s.role]}" stroke-width="2"{dash}>'
                   f"<title>{escape(s.label)}</title></polyline>")
    for m in plot.markers:
        if math.isfinite(m.x) and math.isfinite(m.y):
            out.append(f'<circle cx="{px(m.x):.1f}" cy="{py(m.y):.1f}" r="4.5" class="marker">'
                       f"<title>{escape(m.label)}</title></circle>")
    y = height + 6
    for label, color, style in legend_items:
        if style == "marker":
            out.append(f'<circle cx="{left + 12}" cy="{y + 6}" r="4.5" class="marker"/>')
        else:
            dash = {"dash": f' stroke-dasharray="{DASH_ESTIMATE}"',
                    "ref": ' class="ref"'}.get(style, "")
            out.append(f'<line x1="{left}" y1="{y + 6}" x2="{left + 24}" y2="{y + 6}" '
                       f'stroke="{color}" stroke-width="2"{dash}/>')
        out.append(f'<text x="{left + 32}" y="{y + 10}" class="legend">{escape(label)}</text>')
        y += 18
    out.append("</svg>")
    return "\n".join(out)


# --- plot contents from the sheet's values --------------------------------------------------
def _value(values: dict[str, Known], name: str) -> float | None:
    k = values.get(name)
    if k is None or not math.isfinite(k.value) or k.value <= 0.0:
        return None
    return k.value


def _ke_temperature(values: dict[str, Known], name: str, k: Known) -> str:
    """Magnet temperature a back-EMF constant refers to, as text (20 °C when none is known)."""
    kelvin = k.temperature
    if kelvin is None and name == "emf.constant_hot" and "rated.magnet_temperature" in values:
        kelvin = values["rated.magnet_temperature"].value
    if kelvin is None and name == "emf.constant_cold" and "machine.ambient.min" in values:
        kelvin = values["machine.ambient.min"].value
    return f"{(kelvin if kelvin is not None else 293.15) - 273.15:.0f} °C"


def emf_plot(sheet: Sheet) -> Plot | None:
    """Back-EMF (line rms) against speed for each known Ke, with the limits the findings use.

    E_LL,rms(n) = Ke·ω with ω = 2π·n/60. The DC link of a stopped converter is drawn at
    U_dc/√2: the line rms back-EMF whose peak equals U_dc. U_dc, the cold Ke and the crossing
    speed come from the functions of the overspeed check; the running voltage limit from the
    machine-model checks' converter limit.
    """
    from sheetlint.physics.dq import speed_at_back_emf
    from sheetlint.relations.machine import (
        OverspeedEmf,
        converter_voltage_limit,
        dc_link_voltage,
    )

    values = sheet.values
    constants = [(name, values[name]) for name in ("emf.constant", "emf.constant_hot",
                                                    "emf.constant_cold")
                 if _value(values, name) is not None]
    if not constants:
        return None
    top_speed = max(_finite([v for v in (_value(values, "limits.max_speed"),
                                         _value(values, "rated.speed")) if v is not None])
                    or [3000.0 * RPM]) * 1.1
    dc = dc_link_voltage(sheet)
    _field, cold_ke, _ = OverspeedEmf._cold_ke(sheet)
    crossing = (speed_at_back_emf(cold_ke, dc[0]) if dc is not None and cold_ke
                and cold_ke > 0.0 else None)
    if crossing is not None and math.isfinite(crossing):
        top_speed = max(top_speed, crossing * 1.1)
    plot = Plot("Back-EMF against speed", "speed [r/min]", "line-to-line voltage [V rms]")
    by_value: dict[float, Series] = {}
    for name, k in constants:
        kind, role = {"emf.constant_cold": ("magnets cold, lowest ambient", "cold"),
                      "emf.constant_hot": ("magnets hot, rated temperature", "hot")}.get(
                          name, ("as on the sheet", "machine"))
        same = by_value.get(round(k.value, 9))
        if same is not None:  # one line, both meanings (the cold role wins: it is the safety one)
            same.label = same.label[:-1] + f"; {kind})"
            same.role = "cold" if role == "cold" else same.role
            continue
        label = (f"back-EMF, Ke = {k.value * 1000.0 * RPM:.4g} V/krpm at "
                 f"{_ke_temperature(values, name, k)} ({kind})")
        series = Series(("estimate: " if k.is_estimate else "") + label,
                        [0.0, top_speed / RPM], [0.0, k.value * top_speed], role, k.is_estimate)
        by_value[round(k.value, 9)] = series
        plot.series.append(series)
    if cold_ke and cold_ke > 0.0 and not any(s.role == "cold" for s in plot.series):
        plot.series.append(Series(
            f"back-EMF, Ke = {cold_ke * 1000.0 * RPM:.4g} V/krpm (magnets cold, as the overspeed "
            "check takes it)", [0.0, top_speed / RPM], [0.0, cold_ke * top_speed], "cold"))
    rated_voltage = _value(values, "rated.voltage")
    if rated_voltage is not None:
        plot.references.append(Reference(f"rated voltage {rated_voltage:.0f} V", rated_voltage,
                                          role="rated"))
    limit = converter_voltage_limit(sheet)
    if limit is not None and limit.from_supply:
        plot.references.append(Reference(
            f"converter voltage limit while running {limit.line_rms:.0f} V", limit.line_rms,
            role="converter"))
    if dc is not None:
        plot.references.append(Reference(
            f"DC link of a stopped converter {dc[0]:.0f} V ({dc[1]}), drawn at U_dc/√2 = "
            f"{dc[0] / SQRT2:.0f} V", dc[0] / SQRT2, role="dc-link"))
        if crossing is not None and math.isfinite(crossing):
            plot.references.append(Reference(
                f"cold back-EMF reaches the DC link at {crossing / RPM:.0f} r/min",
                crossing / RPM, "x", role="dc-link"))
    max_speed = _value(values, "limits.max_speed")
    if max_speed is not None:
        plot.references.append(Reference(f"maximum speed {max_speed / RPM:.0f} r/min",
                                         max_speed / RPM, "x", role="speed-limit"))
    rated_speed = _value(values, "rated.speed")
    if rated_speed is not None and rated_voltage is not None:
        plot.markers.append(Marker(f"rated point {rated_speed / RPM:.0f} r/min, "
                                   f"{rated_voltage:.0f} V", rated_speed / RPM, rated_voltage))
    plot.note = ("Where the cold back-EMF line crosses the DC-link line, its peak reaches the DC "
                 "link of a stopped converter: above that speed a converter that stops "
                 "switching lets the machine charge the DC link through its diodes. See the "
                 "cautions.") if dc is not None else ""
    return plot


def _dq_machine(sheet: Sheet) -> Any | None:
    from sheetlint.physics.dq import DqMachine, flux_linkage_from_ke

    values = sheet.values
    p = _value(values, "machine.pole_pairs")
    poles = _value(values, "machine.poles")
    if p is None and poles is not None:
        p = poles / 2.0
    ld, lq = _value(values, "circuit.ld"), _value(values, "circuit.lq")
    if sheet.attr("machine.topology") == "spm":
        ld = ld or lq
        lq = lq or ld
    ke = _value(values, "emf.constant_hot") or _value(values, "emf.constant")
    psi = flux_linkage_from_ke(ke, p) if ke is not None and p is not None else None
    psi = psi or _value(values, "emf.flux_linkage")
    if p is None or ld is None or lq is None or psi is None:
        return None
    resistance = (_value(values, "circuit.resistance_hot") or _value(values, "circuit.resistance")
                  or 0.0)
    machine = DqMachine(psi, ld, lq, resistance, p)
    return machine if machine.valid() else None


def envelope_plot(sheet: Sheet) -> Plot | None:
    """Torque against speed: the envelope, the rated and listed points and the limits."""
    values = sheet.values
    rated_torque, rated_speed = _value(values, "rated.torque"), _value(values, "rated.speed")
    if rated_torque is None or rated_speed is None:
        return None
    max_speed = _value(values, "limits.max_speed")
    top_speed = max(max_speed or 0.0, rated_speed) * (1.0 if max_speed else 1.5)
    peak_torque = _value(values, "limits.peak_torque")
    rated_current = _value(values, "rated.current")
    peak_current = _value(values, "limits.peak_current")
    from sheetlint.relations.machine import converter_voltage_limit

    plot = Plot("Torque against speed", "speed [r/min]", "torque [N·m]")
    machine = _dq_machine(sheet)
    limit = converter_voltage_limit(sheet)
    u_limit = limit.line_rms if limit is not None else None
    if machine is not None and u_limit is not None and rated_current is not None:
        from sheetlint.physics.dq import torque_speed_envelope

        for current, name, role in ((rated_current, "rated", "machine"),
                                    (peak_current, "peak", "peak")):
            if current is None:
                continue
            env = torque_speed_envelope(machine, current, u_limit, top_speed, 60)
            plot.series.append(Series(
                f"machine-model envelope at the {name} current {current:.4g} A, "
                f"U ≤ {u_limit:.0f} V", list(env["speed_rpm"]), list(env["torque_Nm"]), role))
        plot.note = ("Envelope from the linear dq machine model: ψ from the hot Ke, Ld, Lq and "
                     "the hot resistance of the sheet; saturation is ignored.")
    else:
        for torque, name, role in ((rated_torque, "rated torque", "machine"),
                                   (peak_torque, "peak torque", "peak")):
            if torque is None:
                continue
            speeds = [top_speed * j / 40 for j in range(41)]
            if rated_speed < top_speed:
                speeds = sorted({*speeds, rated_speed})
            torques = [torque if n <= rated_speed else torque * rated_speed / n for n in speeds]
            plot.series.append(Series(f"estimate: {name} {torque:.4g} N·m to rated "
                                      "speed, then constant power",
                                      [n / RPM for n in speeds], torques, role, True))
        plot.note = ("Estimated envelope (no d/q inductances on the sheet): constant torque up "
                     "to the rated speed, constant power above it.")
    if peak_torque is not None:
        plot.references.append(Reference(f"peak torque on the sheet {peak_torque:.4g} N·m",
                                         peak_torque, role="peak"))
    kt = _value(values, "torque_constant")
    if kt is not None and peak_current is not None and sheet.attr("machine.topology") == "spm":
        plot.references.append(Reference(f"current limit Kt·I_peak = {kt * peak_current:.4g} N·m"
                                         f" ({peak_current:.4g} A)", kt * peak_current,
                                         role="peak"))
    ke = _value(values, "emf.constant_hot") or _value(values, "emf.constant")
    if ke is not None and u_limit is not None:
        n0 = u_limit / ke
        plot.references.append(Reference(f"back-EMF reaches {u_limit:.0f} V at "
                                         f"{n0 / RPM:.0f} r/min (converter voltage limit)",
                                         n0 / RPM, "x", role="converter"))
    if max_speed is not None:
        plot.references.append(Reference(f"maximum speed {max_speed / RPM:.0f} r/min",
                                         max_speed / RPM, "x", role="speed-limit"))
    plot.markers.append(Marker(f"rated point {rated_speed / RPM:.0f} r/min, "
                               f"{rated_torque:.4g} N·m",
                               rated_speed / RPM, rated_torque))
    count = sheet.attr("points.count") or 0
    for i in range(int(count) if isinstance(count, int) else 0):
        n, t = _value(values, f"points[{i}].speed"), _value(values, f"points[{i}].torque")
        if n is not None and t is not None:
            plot.markers.append(Marker(f"points[{i}]: {n / RPM:.0f} r/min, {t:.4g} N·m",
                                       n / RPM, t))
    _servo_lines(plot, values, count, rated_speed, rated_torque, peak_torque, ke, u_limit,
                 top_speed)
    return plot


def _servo_lines(plot: Plot, values: dict[str, Known], count: Any, rated_speed: float,
                 rated_torque: float, peak_torque: float | None, ke: float | None,
                 u_limit: float | None, top_speed: float) -> None:
    """Servo sheets: the standstill (0 rpm) point, the continuous line from it to the rated
    point, and the peak torque line up to the speed where the back-EMF reaches the voltage
    limit (or the top of the plot)."""
    for i in range(int(count) if isinstance(count, int) else 0):
        speed = values.get(f"points[{i}].speed")
        t0 = _value(values, f"points[{i}].torque")
        if speed is None or speed.value != 0.0 or t0 is None:
            continue
        i0 = _value(values, f"points[{i}].current")
        plot.markers.append(Marker(f"standstill point points[{i}]: 0 rpm, {t0:.4g} N·m"
                                   + (f" at {i0:.4g} A" if i0 is not None else ""), 0.0, t0))
        plot.series.append(Series("continuous line: standstill to rated point",
                                  [0.0, rated_speed / RPM], [t0, rated_torque], "rated"))
        if peak_torque is not None:
            end = u_limit / ke if ke is not None and u_limit is not None else top_speed
            end = min(end, top_speed)
            plot.series.append(Series(f"peak torque line {peak_torque:.4g} N·m"
                                      + (" to the voltage limit" if end < top_speed else ""),
                                      [0.0, end / RPM], [peak_torque, peak_torque], "peak"))
        return


def plots_for(sheet: Sheet | None) -> tuple[list[Plot], list[str]]:
    """The plots of one record and the reasons for plots that could not be drawn."""
    if sheet is None:
        return [], []
    plots: list[Plot] = []
    notes: list[str] = []
    for title, build in (("torque-speed plot", envelope_plot), ("back-EMF plot", emf_plot)):
        try:
            plot = build(sheet)
        except (ArithmeticError, ValueError, TypeError) as exc:
            notes.append(f"{title} not drawn: {exc}")
            continue
        if plot is None:
            notes.append(f"{title} not drawn: the sheet lacks the values it needs")
        else:
            plots.append(plot)
    return plots, notes


# --- HTML ------------------------------------------------------------------------------------
STYLE = """
body{font:15px/1.45 system-ui,-apple-system,"Segoe UI",sans-serif;margin:0;color:#1a1a1a;
background:#fafafa}
main{max-width:1280px;margin:0 auto;padding:1.2em 1.6em}
h1{font-size:1.5em;margin:.2em 0}h2{font-size:1.25em;margin:1.4em 0 .3em}
h3{font-size:1.05em;margin:1em 0 .3em}
.caution{border-left:5px solid #D55E00;background:#fff4ec;padding:.6em 1em;margin:1em 0}
.caution ul{margin:.2em 0;padding-left:1.2em}
.summary span{display:inline-block;margin-right:1.2em}
section.record{background:#fff;border:1px solid #ddd;border-radius:6px;padding:.4em 1.2em 1em;
margin:1.2em 0}
section.file-error{border-left:5px solid #b00020;background:#fff;padding:.5em 1em;margin:1em 0}
table{border-collapse:collapse;width:100%;margin:.4em 0;font-size:.93em}
th,td{border-bottom:1px solid #e4e4e4;padding:.3em .5em;text-align:left;vertical-align:top}
th{background:#f0f0f0}
td.num{white-space:nowrap}
.sev{font-weight:600;white-space:nowrap}
.sev-error{color:#b00020}.sev-warning{color:#9a5b00}.sev-info{color:#455a64}
tr.accepted td{color:#777}tr.safety td{background:#fff8e1}
tr.accepted .sev{text-decoration:line-through}
.tag{font-size:.8em;border:1px solid #999;border-radius:3px;padding:0 .3em;margin-left:.3em}
.cause,.supp{font-size:.9em;color:#333}
.plots{display:flex;flex-wrap:wrap;gap:1em}
figure{margin:.4em 0;max-width:600px;flex:1 1 520px}figcaption{font-size:.85em;color:#444}
svg.plot{background:#fff;max-width:100%;height:auto}
svg .frame{fill:none;stroke:#444}svg .grid{stroke:#e6e6e6}
svg .tick,svg .legend{font-size:11px;fill:#333}svg .axis{font-size:12px;fill:#111}
svg .plot-title{font-size:13px;font-weight:600;fill:#111}
svg .ref{stroke-width:1.6;stroke-dasharray:2 3}
svg .marker{fill:#fff;stroke:#000;stroke-width:2}
nav ul{columns:2;padding-left:1.2em}
footer{font-size:.85em;color:#555;margin-top:2em}
.meta{font-size:.9em;color:#444}
"""


def _caution_block() -> str:
    items = "".join(f"<li>{escape(text)}</li>" for text in CAUTIONS)
    return f'<div class="caution"><strong>Cautions</strong><ul>{items}</ul></div>'


def _location_text(name: str, location: dict[str, Any] | None) -> str:
    if not location:
        return ""
    if "line" in location:
        return f"{name}:{location['line']}"
    if "page" in location:
        text = f"{name} p.{location['page']}"
        if location.get("cell"):
            text += f" ({location['cell']})"
        return text
    if "sheet" in location:
        return f"{name} {location['sheet']}!{location.get('cell', '')}"
    return ""


def _finding_row(file_name: str, x: Finding) -> str:
    classes = "accepted" if x.accepted is not None else ""
    if x.rule in SAFETY_RULES and x.severity != "info":
        classes += " safety"
    severity = escape(x.severity)
    tag = '<span class="tag">accepted</span>' if x.accepted is not None else ""
    # the cautions stand at the top and foot of the report, not in every row
    details = [f"<div>{escape(units(x.message.replace(FINDING_CAUTION, '').strip()))}</div>"]
    if x.cause:
        details.append(f'<div class="cause">likely cause: {escape(units(x.cause))}</div>')
    if x.accepted is not None:
        details.append(f'<div class="supp">accepted in the record: {escape(x.accepted)}'
                       "</div>")
    expected = "<br>".join(f"{escape(k)} {escape(units(v))}" for k, v in x.expected.items())
    actual = "<br>".join(f"{escape(k)} {escape(units(v))}" for k, v in x.actual.items())
    return (f'<tr class="{classes}"><td class="sev sev-{severity}">{severity}{tag}</td>'
            f"<td><code>{escape(x.rule)}</code></td>"
            f"<td>{escape(_location_text(file_name, x.location))}</td>"
            f"<td>{''.join(details)}</td><td class=num>{expected}</td>"
            f"<td class=num>{actual}</td></tr>")


def _given_rows(sheet: Sheet | None) -> list[str]:
    if sheet is None:
        return []
    from sheetlint.fields import display

    rows = []
    for name, k in sheet.values.items():
        if not k.is_given:
            continue
        extras = []
        if k.basis:
            extras.append(f"basis {k.basis}" + ("" if k.basis_stated else " (default)"))
        if k.temperature is not None:
            extras.append(f"at {k.temperature - 273.15:.0f} °C")
        rows.append(f"<tr><td><code>{escape(name)}</code></td>"
                    f"<td class=num>{escape(units(k.text or display(name, k.value)))}</td>"
                    f"<td>{escape(', '.join(extras))}</td></tr>")
    return rows


def _derived_rows(record: RecordResult) -> list[str]:
    rows = []
    for name, d in derived_payload(record.derived).items():
        tag = '<span class="tag">estimate</span>' if d["estimate"] else ""
        note = f"<br><span class=cause>{escape(str(d['note']))}</span>" if d.get("note") else ""
        rows.append(f"<tr><td><code>{escape(name)}</code>{tag}</td>"
                    f"<td class=num>{d['value']:g} {escape(str(d['unit']))}</td>"
                    f"<td><code>{escape(str(d['rule']))}</code></td>"
                    f"<td>{escape(', '.join(str(x) for x in d['from']))}{note}</td></tr>")
    return rows


def _record_section(f: FileResult, record: RecordResult, anchor: str) -> str:
    name = relative(f.path)
    out = [f'<section class="record" id="{anchor}">']
    maker = record.sheet.attr("maker") if record.sheet is not None else None
    heading = escape(record.id) + (f" <small>({escape(str(maker))})</small>" if maker else "")
    out.append(f"<h2>{heading}</h2><div><code>{escape(name)}</code></div>")
    if record.error:
        out.append(f'<p class="sev sev-error">cannot read this record: {escape(record.error)}'
                   "</p></section>")
        return "".join(out)
    out.append("<h3>Findings</h3>")
    if record.findings:
        out.append("<table><thead><tr><th>severity</th><th>rule</th><th>where</th>"
                   "<th>finding</th><th>expected</th><th>sheet</th></tr></thead><tbody>")
        out.extend(_finding_row(name, x) for x in record.findings)
        out.append("</tbody></table>")
    else:
        out.append("<p>No findings.</p>")
    plots, notes = plots_for(record.sheet)
    if plots:
        out.append('<h3>Plots</h3><div class="plots">')
        for plot in plots:
            caption = f"<figcaption>{escape(plot.note)}</figcaption>" if plot.note else ""
            out.append(f"<figure>{svg(plot)}{caption}</figure>")
        out.append("</div>")
    for note in notes:
        out.append(f'<p class="cause">{escape(note)}</p>')
    given = _given_rows(record.sheet)
    if given:
        out.append("<h3>Values on the sheet</h3><table><thead><tr><th>field</th><th>value</th>"
                   "<th>basis, reference</th></tr></thead><tbody>")
        out.extend(given)
        out.append("</tbody></table>")
    derived = _derived_rows(record)
    out.append("<h3>Derived values</h3>")
    if derived:
        out.append("<table><thead><tr><th>field</th><th>value</th><th>rule</th>"
                   "<th>from</th></tr></thead><tbody>")
        out.extend(derived)
        out.append("</tbody></table>")
    else:
        out.append("<p>None.</p>")
    out.append("</section>")
    return "".join(out)


def _inputs_block(results: list[FileResult]) -> str:
    """The list of input files, each with what became of it."""
    items = []
    for f in results:
        name = escape(relative(f.path))
        if f.error:
            what = '<span class="sev sev-error">could not be read</span>'
        elif f.skipped:
            what = f"skipped: {escape(f.skipped)}"
        else:
            what = f"{len(f.records)} record{'' if len(f.records) == 1 else 's'}"
        items.append(f"<li><code>{name}</code>: {what}</li>")
    return f'<details class="inputs" open><summary>Inputs ({len(results)} file' \
           f"{'' if len(results) == 1 else 's'})</summary><ul>{''.join(items)}</ul></details>"


LINE_KEY = ("In the plots: solid lines are values from the sheet or worked out from it; dashed "
            "lines are estimates; dotted lines are limits. Colours: blue the machine as on the "
            "sheet, orange hot magnets, light blue cold magnets, purple peak current, green "
            "rated values, red the converter's voltage limit while running, black the DC link "
            "of a stopped converter, grey the maximum speed.")


def render(results: list[FileResult], title: str | None = None,
           generated: datetime | None = None) -> str:
    """The whole report as one HTML document (a string); ``generated`` is the time written in
    it (default: now, UTC)."""
    title = title or "sheetlint report"
    when = (generated or datetime.now(UTC)).strftime("%Y-%m-%d %H:%M UTC")
    counts = summary(results)
    nav: list[str] = []
    body: list[str] = []
    number = 0
    for f in results:
        name = relative(f.path)
        if f.error:
            number += 1
            anchor = f"r{number}"
            nav.append(f'<li><a href="#{anchor}">{escape(name)}</a>: '
                       '<span class="sev sev-error">unreadable</span></li>')
            body.append(f'<section class="file-error" id="{anchor}"><h2>{escape(name)}</h2>'
                        f'<p class="sev sev-error">cannot read: {escape(f.error)}</p></section>')
            continue
        for record in f.records:
            number += 1
            anchor = f"r{number}"
            active = [x for x in record.findings if x.accepted is None]
            worst = ("unreadable" if record.error else
                     next((s for s in ("error", "warning") if any(x.severity == s
                                                                  for x in active)), "ok"))
            css = {"unreadable": "error", "ok": "info"}.get(worst, worst)
            nav.append(f'<li><a href="#{anchor}">{escape(record.id)}</a> '
                       f"<small>{escape(name)}</small>: "
                       f'<span class="sev sev-{css}">{worst}</span></li>')
            body.append(_record_section(f, record, anchor))
    summary_items = [f"<span>{counts['files']} file(s)</span>",
                     f"<span>{counts['records']} record(s)</span>",
                     f'<span class="sev sev-error">{counts["error"]} error(s)</span>',
                     f'<span class="sev sev-warning">{counts["warning"]} warning(s)</span>',
                     f'<span class="sev sev-info">{counts["info"]} note(s)</span>']
    if counts.get("accepted"):
        summary_items.append(f"<span>{counts['accepted']} accepted</span>")
    return "\n".join([
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{escape(title)}</title>",
        f"<style>{STYLE}</style></head><body><main>",
        f"<h1>{escape(title)}</h1>",
        f'<p class="meta">Written {escape(when)} by sheetlint {escape(__version__)}.</p>',
        f'<div class="summary">{"".join(summary_items)}</div>',
        _caution_block(),
        _inputs_block(results),
        f'<p class="meta">{escape(LINE_KEY)}</p>',
        f"<nav><ul>{''.join(nav)}</ul></nav>" if nav else "",
        *body,
        _caution_block(),
        f"<footer>Written {escape(when)} by sheetlint {escape(__version__)}. Every value comes "
        "from the input files listed above; derived values name the rule and the fields they "
        "come from; estimates are marked as such.</footer>",
        "</main></body></html>",
    ])
