"""One self-contained HTML report (``sheetlint report PATH... -o report.html``).

Everything is inline: CSS in a ``<style>`` element, plots as inline SVG drawn here, no script,
no font, no image and no link to the network, so the file opens the same offline and years later.
Per machine: the findings (suppressed ones marked with their reason), two plots where a
picture beats a table, the given values and the derived values with their provenance. Every
string that comes from the data is escaped with :func:`html.escape`.

The plots draw the sheet's own values; the curves are the simple ones a reader checks by hand:

- back-EMF against speed: :math:`E_{LL,rms} = K_e\\,\\omega` for each known magnet temperature,
  with the rated voltage and the DC-link limit :math:`U_{dc}/\\sqrt{2}` (largest line rms
  fundamental with space-vector modulation; REFERENCES.md section 8);
- torque against speed: the dq-model envelope of :func:`sheetlint.physics.dq.torque_speed_envelope`
  at the rated and the peak current when ψ (or Ke), Ld, Lq and p are known; otherwise the
  simple envelope (the torque limit up to rated speed, then constant power
  :math:`T = T_{lim}\\,n_{rated}/n`), with the rated and listed points, the current limit
  (:math:`K_t I_{peak}`), the speed where the back-EMF reaches the voltage limit, and the
  maximum speed.
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass, field
from html import escape
from typing import Any

from sheetlint import __version__
from sheetlint.batch import FileResult, relative
from sheetlint.cautions import CAUTIONS, SAFETY_RULES
from sheetlint.engine.core import Finding, Known, Sheet
from sheetlint.engine.run import RecordResult, derived_payload
from sheetlint.report.json_report import summary

RPM = 2.0 * math.pi / 60.0  # rad/s per r/min
SQRT2 = math.sqrt(2.0)
#: Okabe-Ito colours (distinguishable with the common colour-vision deficiencies)
PALETTE = ("#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000")


# --- plot description (plain data) and SVG drawing ------------------------------------------
@dataclass(slots=True)
class Series:
    label: str
    xs: list[float]
    ys: list[float]
    dashed: bool = False


@dataclass(slots=True)
class Reference:
    """A horizontal (``axis="y"``) or vertical (``axis="x"``) limit line."""

    label: str
    value: float
    axis: str = "y"


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

    legend_items = [(s.label, PALETTE[i % len(PALETTE)], "dash" if s.dashed else "line")
                    for i, s in enumerate(plot.series)]
    ref_colors = {id(r): PALETTE[(len(plot.series) + i) % len(PALETTE)]
                  for i, r in enumerate(plot.references)}
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
                       f'stroke="{color}" class="ref"><title>{escape(r.label)}</title></line>')
        else:
            y = py(r.value)
            out.append(f'<line x1="{left}" y1="{y:.1f}" x2="{left + plot_w}" y2="{y:.1f}" '
                       f'stroke="{color}" class="ref"><title>{escape(r.label)}</title></line>')
    for i, s in enumerate(plot.series):
        points = " ".join(f"{px(x):.1f},{py(y):.1f}" for x, y in zip(s.xs, s.ys, strict=False)
                          if math.isfinite(x) and math.isfinite(y))
        dash = ' stroke-dasharray="6 4"' if s.dashed else ""
        out.append(f'<polyline points="{points}" fill="none" '
                   f'stroke="{PALETTE[i % len(PALETTE)]}" stroke-width="2"{dash}>'
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
            dash = {"dash": ' stroke-dasharray="6 4"', "ref": ' class="ref"'}.get(style, "")
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


def voltage_limit(values: dict[str, Known]) -> tuple[float, str] | None:
    """Largest line rms voltage the converter gives [V] and how it was found."""
    dc = _value(values, "supply.dc_link_voltage")
    if dc is not None:
        return dc / SQRT2, f"DC-link limit U_dc/√2 = {dc / SQRT2:.0f} V"
    mains = _value(values, "supply.mains_voltage")
    if mains is not None:
        u = 3.0 * SQRT2 / math.pi * mains / SQRT2
        return u, f"voltage limit from the mains (diode bridge, U_dc/√2) = {u:.0f} V"
    return None


def emf_plot(sheet: Sheet) -> Plot | None:
    """Back-EMF (line rms) against speed for each known Ke, with the voltage limits.

    .. math:: E_{LL,rms}(n) = K_e\\,\\omega,\\quad \\omega = 2\\pi n/60
    """
    values = sheet.values
    constants = [(name, values[name]) for name in ("emf.constant", "emf.constant_hot",
                                                    "emf.constant_cold")
                 if _value(values, name) is not None]
    if not constants:
        return None
    top_speed = max(_finite([v for v in (_value(values, "limits.max_speed"),
                                         _value(values, "rated.speed")) if v is not None])
                    or [3000.0 * RPM]) * 1.1
    plot = Plot("Back-EMF against speed", "speed [rpm]", "line-to-line voltage [V rms]")
    seen: set[float] = set()
    for name, k in constants:
        key = round(k.value, 9)
        if key in seen:
            continue
        seen.add(key)
        kind = {"emf.constant_cold": "lowest ambient", "emf.constant_hot": "rated magnet "
                "temperature"}.get(name, "as given")
        plot.series.append(Series(
            f"back-EMF, Ke = {k.value * 1000.0 * RPM:.4g} V/krpm at "
            f"{_ke_temperature(values, name, k)} ({kind}{', estimate' if k.is_estimate else ''})",
            [0.0, top_speed / RPM], [0.0, k.value * top_speed],
            dashed=name != "emf.constant"))
    rated_voltage = _value(values, "rated.voltage")
    if rated_voltage is not None:
        plot.references.append(Reference(f"rated voltage {rated_voltage:.0f} V", rated_voltage))
    limit = voltage_limit(values)
    if limit is not None:
        plot.references.append(Reference(limit[1], limit[0]))
    max_speed = _value(values, "limits.max_speed")
    if max_speed is not None:
        plot.references.append(Reference(f"maximum speed {max_speed / RPM:.0f} rpm",
                                         max_speed / RPM, "x"))
    rated_speed = _value(values, "rated.speed")
    if rated_speed is not None and rated_voltage is not None:
        plot.markers.append(Marker(f"rated point {rated_speed / RPM:.0f} rpm, "
                                   f"{rated_voltage:.0f} V", rated_speed / RPM, rated_voltage))
    plot.note = ("Above the DC-link line the peak back-EMF exceeds the DC link: a converter that "
                 "stops switching at such a speed lets the machine charge the DC link through "
                 "its diodes.") if limit is not None else ""
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
    plot = Plot("Torque against speed", "speed [rpm]", "torque [N·m]")
    machine = _dq_machine(sheet)
    limit = voltage_limit(values)
    u_limit = limit[0] if limit else _value(values, "rated.voltage")
    if machine is not None and u_limit is not None and rated_current is not None:
        from sheetlint.physics.dq import torque_speed_envelope

        for current, name, dashed in ((rated_current, "rated", False),
                                      (peak_current, "peak", True)):
            if current is None:
                continue
            env = torque_speed_envelope(machine, current, u_limit, top_speed, 60)
            plot.series.append(Series(
                f"dq-model envelope at the {name} current {current:.4g} A, U ≤ {u_limit:.0f} V",
                list(env["speed_rpm"]), list(env["torque_Nm"]), dashed))
        plot.note = ("Envelope from the linear dq model (sheetlint.physics.dq): ψ from the hot "
                     "Ke, Ld, Lq and the hot resistance of the sheet; saturation is ignored.")
    else:
        for torque, name, dashed in ((rated_torque, "rated torque", False),
                                     (peak_torque, "peak torque", True)):
            if torque is None:
                continue
            speeds = [top_speed * j / 40 for j in range(41)]
            if rated_speed < top_speed:
                speeds = sorted({*speeds, rated_speed})
            torques = [torque if n <= rated_speed else torque * rated_speed / n for n in speeds]
            plot.series.append(Series(f"simple envelope: {name} {torque:.4g} N·m to rated "
                                      "speed, then constant power",
                                      [n / RPM for n in speeds], torques, dashed))
        plot.note = ("Simple envelope (no dq parameters on the sheet): constant torque up to the "
                     "rated speed, constant power above it.")
    if peak_torque is not None:
        plot.references.append(Reference(f"peak torque on the sheet {peak_torque:.4g} N·m",
                                         peak_torque))
    kt = _value(values, "torque_constant")
    if kt is not None and peak_current is not None and sheet.attr("machine.topology") == "spm":
        plot.references.append(Reference(f"current limit Kt·I_peak = {kt * peak_current:.4g} N·m"
                                         f" ({peak_current:.4g} A)", kt * peak_current))
    ke = _value(values, "emf.constant_hot") or _value(values, "emf.constant")
    if ke is not None and u_limit is not None:
        n0 = u_limit / ke
        plot.references.append(Reference(f"back-EMF reaches {u_limit:.0f} V at {n0 / RPM:.0f} rpm"
                                         " (voltage limit)", n0 / RPM, "x"))
    if max_speed is not None:
        plot.references.append(Reference(f"maximum speed {max_speed / RPM:.0f} rpm",
                                         max_speed / RPM, "x"))
    plot.markers.append(Marker(f"rated point {rated_speed / RPM:.0f} rpm, {rated_torque:.4g} N·m",
                               rated_speed / RPM, rated_torque))
    count = sheet.attr("points.count") or 0
    for i in range(int(count) if isinstance(count, int) else 0):
        n, t = _value(values, f"points[{i}].speed"), _value(values, f"points[{i}].torque")
        if n is not None and t is not None:
            plot.markers.append(Marker(f"points[{i}]: {n / RPM:.0f} rpm, {t:.4g} N·m",
                                       n / RPM, t))
    return plot


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
tr.suppressed td{color:#777}tr.safety td{background:#fff8e1}
tr.suppressed .sev{text-decoration:line-through}
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
    classes = "suppressed" if x.suppressed is not None else ""
    if x.rule in SAFETY_RULES and x.severity != "info":
        classes += " safety"
    severity = escape(x.severity)
    tag = '<span class="tag">suppressed</span>' if x.suppressed is not None else ""
    details = [f"<div>{escape(x.message)}</div>"]
    if x.cause:
        details.append(f'<div class="cause">likely cause: {escape(x.cause)}</div>')
    if x.suppressed is not None:
        details.append(f'<div class="supp">suppressed in the record: {escape(x.suppressed)}'
                       "</div>")
    expected = "<br>".join(f"{escape(k)} {escape(v)}" for k, v in x.expected.items())
    actual = "<br>".join(f"{escape(k)} {escape(v)}" for k, v in x.actual.items())
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
                    f"<td class=num>{escape(k.text or display(name, k.value))}</td>"
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


def render(results: list[FileResult], title: str | None = None) -> str:
    """The whole report as one HTML document (a string)."""
    title = title or "sheetlint report"
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
            active = [x for x in record.findings if x.suppressed is None]
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
                     f'<span class="sev sev-info">{counts["info"]} info</span>']
    if counts.get("suppressed"):
        summary_items.append(f"<span>{counts['suppressed']} suppressed</span>")
    return "\n".join([
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{escape(title)}</title>",
        f"<style>{STYLE}</style></head><body><main>",
        f"<h1>{escape(title)}</h1>",
        f'<div class="summary">{"".join(summary_items)}</div>',
        _caution_block(),
        f"<nav><ul>{''.join(nav)}</ul></nav>" if nav else "",
        *body,
        _caution_block(),
        f"<footer>Written by sheetlint {escape(__version__)}. Every value comes from the data "
        "files named above; derived values name the rule and the fields they come from.</footer>",
        "</main></body></html>",
    ])
