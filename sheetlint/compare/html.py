"""The comparison as one self-contained HTML page: offers in columns, requirement rows shaded
by status, and three inline SVG plots (no script, no font, no link to the network).

Plots, each drawn from the evaluation (nothing is computed here that the evaluation does not
already hold, except the curves of the dq model's envelope, called from
:func:`sheetlint.physics.dq.torque_speed_envelope`):

- torque against speed: each offer's envelope within the converter's current and the voltage
  limit U_dc/√2, magnets hot as the site implies, with the duty points;
- peak line back-EMF against speed with cold magnets, :math:`\\sqrt{2} K_e \\omega`, with the
  DC link and the DC link less the required margin;
- losses at each duty point (copper loss from the model plus the rated point's other losses).

Palette: our own, chosen by lightness so that it survives grey print — ``met`` a pale cell,
``unknown`` a middle tone with a dotted border, ``not met`` a dark cell with white text — and
the status word is always written in the cell. Offers are told apart in the plots by dash
pattern and marker shape as well as by colour.
"""

from __future__ import annotations

import math
from html import escape

from sheetlint import __version__
from sheetlint.cautions import CAUTIONS
from sheetlint.compare.formats import (
    COMPARE_CAUTION,
    display_figure,
    requirement_names,
    result_of,
    row_label,
)
from sheetlint.compare.offers import Comparison
from sheetlint.compare.verdict import letter_body
from sheetlint.physics.dq import RPM, SQRT2, torque_speed_envelope

#: offer line styles: (colour, dash pattern, marker); lightness steps apart in grey print
LINE_STYLES = (("#1f3b57", "", "circle"), ("#8a4b08", "8 4", "square"),
               ("#3d6b35", "2 3", "triangle"), ("#6b2f5b", "10 3 2 3", "diamond"),
               ("#555555", "4 4", "circle"))
STATUS_CLASS = {"met": "met", "not_met": "notmet", "unknown": "unknown"}
#: (background, text) of each status cell: our own palette, set apart by lightness
STATUS_COLOURS = {"met": ("#e6eff5", "#10202c"), "unknown": ("#c9c9b4", "#111111"),
                  "not_met": ("#3b4d5e", "#ffffff")}
STATUS_WORD = {"met": "met", "not_met": "NOT MET", "unknown": "unknown"}

_CSS = """
body{font-family:sans-serif;margin:1.5em;color:#111;max-width:1400px}
table{border-collapse:collapse;margin:1em 0}
th,td{border:1px solid #777;padding:.35em .5em;vertical-align:top;font-size:.92em}
th{background:#eee;text-align:left}
td.met{background:%(met_bg)s;color:%(met_fg)s}
td.unknown{background:%(unknown_bg)s;color:%(unknown_fg)s;border:2px dotted #333;font-style:italic}
td.notmet{background:%(not_met_bg)s;color:%(not_met_fg)s;font-weight:bold}
td .detail{display:block;font-weight:normal;font-size:.85em;margin-top:.2em}
.verdict-compliant{font-weight:bold}
.verdict-not_compliant{font-weight:bold;text-decoration:underline}
.caution{border:2px solid #333;padding:.6em;background:#f4f4f4}
figure{display:inline-block;margin:.5em 1em .5em 0}
pre{white-space:pre-wrap;background:#f7f7f7;padding:.6em;border:1px solid #ccc}
@media print{td.notmet,td.met,td.unknown{-webkit-print-color-adjust:exact;
print-color-adjust:exact}}
""" % {f"{status}_{part}": colours[index] for status, colours in STATUS_COLOURS.items()
       for index, part in enumerate(("bg", "fg"))}


def _nice_step(span: float) -> float:
    raw = span / 5.0 if span > 0 else 1.0
    power = 10.0 ** math.floor(math.log10(raw))
    for factor in (1.0, 2.0, 5.0, 10.0):
        if raw <= factor * power:
            return factor * power
    return 10.0 * power


def _marker(shape: str, x: float, y: float, colour: str) -> str:
    if shape == "square":
        return f'<rect x="{x - 4:.1f}" y="{y - 4:.1f}" width="8" height="8" fill="{colour}"/>'
    if shape == "triangle":
        return (f'<polygon points="{x:.1f},{y - 5:.1f} {x - 5:.1f},{y + 4:.1f} '
                f'{x + 5:.1f},{y + 4:.1f}" fill="{colour}"/>')
    if shape == "diamond":
        return (f'<polygon points="{x:.1f},{y - 5:.1f} {x - 5:.1f},{y:.1f} {x:.1f},{y + 5:.1f} '
                f'{x + 5:.1f},{y:.1f}" fill="{colour}"/>')
    return f'<circle cx="{x:.1f}" cy="{y:.1f}" r="4" fill="{colour}"/>'


def svg_plot(title: str, x_label: str, y_label: str,
             series: list[tuple[str, list[float], list[float], int]],
             references: list[tuple[str, float, str]] | None = None,
             points: list[tuple[str, float, float]] | None = None,
             width: int = 620, height: int = 360) -> str:
    """A line plot as inline SVG: ``series`` (label, xs, ys, style index), horizontal
    ``references`` (label, y, dash) and black ``points`` (label, x, y)."""
    references = references or []
    points = points or []
    xs = [x for _, sx, _, _ in series for x in sx] + [x for _, x, _ in points]
    ys = [y for _, _, sy, _ in series for y in sy] + [y for _, y, _ in references] + [
        y for _, _, y in points]
    xs = [x for x in xs if math.isfinite(x)] or [0.0, 1.0]
    ys = [y for y in ys if math.isfinite(y)] or [0.0, 1.0]
    x_step, y_step = _nice_step(max(xs) - min(0.0, min(xs))), _nice_step(max(ys) - min(0.0,
                                                                                      min(ys)))
    x_max = math.ceil(max(xs) / x_step) * x_step or 1.0
    y_max = math.ceil(max(ys) * 1.05 / y_step) * y_step or 1.0
    left, right, top, bottom = 62, 170, 30, 46
    plot_w, plot_h = width - left - right, height - top - bottom

    def px(x: float) -> float:
        return left + plot_w * x / x_max

    def py(y: float) -> float:
        return top + plot_h * (1.0 - y / y_max)

    out = [f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
           f'viewBox="0 0 {width} {height}" role="img" aria-label="{escape(title)}">',
           f'<rect width="{width}" height="{height}" fill="#fff"/>',
           f'<text x="{left}" y="18" font-size="14" font-weight="bold">{escape(title)}</text>']
    tick = 0.0
    while tick <= x_max + 1e-9:
        out.append(f'<line x1="{px(tick):.1f}" y1="{top}" x2="{px(tick):.1f}" '
                   f'y2="{top + plot_h}" stroke="#ddd"/>'
                   f'<text x="{px(tick):.1f}" y="{top + plot_h + 16}" font-size="11" '
                   f'text-anchor="middle">{tick:g}</text>')
        tick += x_step
    tick = 0.0
    while tick <= y_max + 1e-9:
        out.append(f'<line x1="{left}" y1="{py(tick):.1f}" x2="{left + plot_w}" '
                   f'y2="{py(tick):.1f}" stroke="#ddd"/>'
                   f'<text x="{left - 6}" y="{py(tick) + 4:.1f}" font-size="11" '
                   f'text-anchor="end">{tick:g}</text>')
        tick += y_step
    out.append(f'<rect x="{left}" y="{top}" width="{plot_w}" height="{plot_h}" fill="none" '
               'stroke="#333"/>')
    out.append(f'<text x="{left + plot_w / 2:.1f}" y="{height - 8}" font-size="12" '
               f'text-anchor="middle">{escape(x_label)}</text>')
    out.append(f'<text x="14" y="{top + plot_h / 2:.1f}" font-size="12" text-anchor="middle" '
               f'transform="rotate(-90 14 {top + plot_h / 2:.1f})">{escape(y_label)}</text>')
    legend_y = top + 6
    for label, value, dash in references:
        out.append(f'<line x1="{left}" y1="{py(value):.1f}" x2="{left + plot_w}" '
                   f'y2="{py(value):.1f}" stroke="#000" stroke-width="1.5" '
                   f'stroke-dasharray="{dash}"/>')
        out.append(f'<text x="{left + 6}" y="{py(value) - 4:.1f}" font-size="11" '
                   f'fill="#000">{escape(label)}</text>')
    for label, sx, sy, style in series:
        colour, dash, shape = LINE_STYLES[style % len(LINE_STYLES)]
        coords = " ".join(f"{px(x):.1f},{py(y):.1f}" for x, y in zip(sx, sy, strict=False)
                          if math.isfinite(x) and math.isfinite(y))
        out.append(f'<polyline points="{coords}" fill="none" stroke="{colour}" '
                   f'stroke-width="2" stroke-dasharray="{dash}"/>')
        if sx:
            step = max(1, len(sx) // 6)
            for x, y in list(zip(sx, sy, strict=False))[::step]:
                if math.isfinite(x) and math.isfinite(y):
                    out.append(_marker(shape, px(x), py(y), colour))
        out.append(f'<line x1="{left + plot_w + 8}" y1="{legend_y + 40}" '
                   f'x2="{left + plot_w + 36}" y2="{legend_y + 40}" stroke="{colour}" '
                   f'stroke-width="2" stroke-dasharray="{dash}"/>'
                   + _marker(shape, left + plot_w + 22, legend_y + 40, colour)
                   + f'<text x="{left + plot_w + 40}" y="{legend_y + 44}" font-size="11">'
                   f'{escape(label[:18])}</text>')
        legend_y += 16
    for label, x, y in points:
        out.append(f'<circle cx="{px(x):.1f}" cy="{py(y):.1f}" r="6" fill="none" stroke="#000" '
                   f'stroke-width="2"/><text x="{px(x) + 8:.1f}" y="{py(y) - 8:.1f}" '
                   f'font-size="11">{escape(label)}</text>')
    out.append("</svg>")
    return "".join(out)


def _envelope_plot(comparison: Comparison) -> str | None:
    req = comparison.requirement
    if req is None or req.max_current is None:
        return None
    top = req.speed_max or max((d.speed for d in req.duty), default=0.0)
    if not top:
        return None
    series = []
    for index, offer in enumerate(comparison.offers):
        ev = offer.evaluation
        if ev is None or ev.machine_hot is None or ev.site.voltage_limit is None:
            continue
        env = torque_speed_envelope(ev.machine_hot, req.max_current, ev.site.voltage_limit,
                                    1.2 * top, 40)
        series.append((offer.id, env["speed_rpm"], env["torque_Nm"], index))
    if not series:
        return None
    points = [(f"duty[{i}]", d.speed / RPM, d.torque) for i, d in enumerate(req.duty)]
    return svg_plot("Torque within the converter's current and voltage (hot magnets)",
                    "speed [r/min]", "torque [N·m]", series, [], points)


def _emf_plot(comparison: Comparison) -> str | None:
    req = comparison.requirement
    if req is None:
        return None
    series = []
    dc_link = None
    top = req.speed_max or max((d.speed for d in req.duty), default=0.0)
    for index, offer in enumerate(comparison.offers):
        ev = offer.evaluation
        if ev is None or ev.machine_cold_ke is None or not top:
            continue
        dc_link = ev.site.dc_link_no_load
        speeds = [1.2 * top * j / 20 for j in range(21)]
        series.append((offer.id, [s / RPM for s in speeds],
                       [SQRT2 * ev.machine_cold_ke * s for s in speeds], index))
    if not series or dc_link is None:
        return None
    refs = [(f"DC link {dc_link:.0f} V", dc_link, "")]
    if req.emf_margin:
        refs.append((f"less {100 * req.emf_margin:.0f} % margin", (1 - req.emf_margin) * dc_link,
                     "6 3"))
    return svg_plot("Peak line back-EMF, cold magnets, against the DC link", "speed [r/min]",
                    "voltage [V]", series, refs,
                    [("top speed", top / RPM, 0.0)] if top else [])


def _loss_plot(comparison: Comparison) -> str | None:
    """Losses at each duty point as grouped bars (one group per duty point)."""
    req = comparison.requirement
    if req is None or not req.duty:
        return None
    values = []
    for index, offer in enumerate(comparison.offers):
        ev = offer.evaluation
        if ev is None:
            continue
        values.append((offer.id, index, [d.losses for d in ev.duty]))
    known = [v for _, _, row in values for v in row if v is not None]
    if not known:
        return None
    width, height, left, top, bottom = 620, 320, 62, 30, 46
    plot_w, plot_h = width - left - 170, height - top - bottom
    step = _nice_step(max(known))
    y_max = math.ceil(max(known) * 1.05 / step) * step
    groups = len(req.duty)
    group_w = plot_w / groups
    bar_w = group_w * 0.8 / max(len(values), 1)
    out = [f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
           f'viewBox="0 0 {width} {height}" role="img" aria-label="losses at the duty points">',
           f'<rect width="{width}" height="{height}" fill="#fff"/>',
           f'<text x="{left}" y="18" font-size="14" font-weight="bold">Losses at the duty '
           'points (model copper loss + rated other losses)</text>']
    tick = 0.0
    while tick <= y_max + 1e-9:
        y = top + plot_h * (1 - tick / y_max)
        out.append(f'<line x1="{left}" y1="{y:.1f}" x2="{left + plot_w}" y2="{y:.1f}" '
                   f'stroke="#ddd"/><text x="{left - 6}" y="{y + 4:.1f}" font-size="11" '
                   f'text-anchor="end">{tick / 1e3:g}</text>')
        tick += step
    for g, duty in enumerate(req.duty):
        out.append(f'<text x="{left + group_w * (g + 0.5):.1f}" y="{top + plot_h + 16}" '
                   f'font-size="11" text-anchor="middle">duty[{g}] {duty.torque:.0f} N·m, '
                   f'{duty.speed / RPM:.0f} r/min</text>')
        for k, (_, style, row) in enumerate(values):
            loss = row[g] if g < len(row) else None
            x = left + group_w * g + group_w * 0.1 + k * bar_w
            colour, dash, _shape = LINE_STYLES[style % len(LINE_STYLES)]
            if loss is None:
                out.append(f'<text x="{x + bar_w / 2:.1f}" y="{top + plot_h - 4}" '
                           'font-size="10" text-anchor="middle">n/a</text>')
                continue
            h = plot_h * loss / y_max
            out.append(f'<rect x="{x:.1f}" y="{top + plot_h - h:.1f}" width="{bar_w * 0.9:.1f}" '
                       f'height="{h:.1f}" fill="{colour}" stroke="#000" '
                       f'stroke-dasharray="{dash}"/>')
    legend_y = top + 40
    for name, style, _row in values:
        colour = LINE_STYLES[style % len(LINE_STYLES)][0]
        out.append(f'<rect x="{left + plot_w + 8}" y="{legend_y - 9}" width="12" height="12" '
                   f'fill="{colour}"/><text x="{left + plot_w + 26}" y="{legend_y + 1}" '
                   f'font-size="11">{escape(name[:18])}</text>')
        legend_y += 16
    out.append(f'<rect x="{left}" y="{top}" width="{plot_w}" height="{plot_h}" fill="none" '
               'stroke="#333"/>')
    out.append(f'<text x="14" y="{top + plot_h / 2:.1f}" font-size="12" text-anchor="middle" '
               f'transform="rotate(-90 14 {top + plot_h / 2:.1f})">losses [kW]</text>')
    out.append("</svg>")
    return "".join(out)


def _table(comparison: Comparison) -> str:
    offers = comparison.offers
    head = "".join(f"<th>{o.rank}. {escape(o.id)}<br><small>{escape(o.path)}</small></th>"
                   for o in offers)
    rows = [f"<tr><th>offer</th>{head}</tr>",
            "<tr><th>verdict</th>" + "".join(
                f'<td class="verdict-{o.verdict}">{escape(o.verdict.replace("_", " "))}</td>'
                for o in offers) + "</tr>"]
    for name in requirement_names(comparison):
        cells = []
        for offer in offers:
            result = result_of(offer, name)
            if result is None:
                cells.append("<td></td>")
                continue
            figure = display_figure(result)
            shown = "" if figure is None else f" {figure:.4g}"
            margin = "" if result.margin is None else f" (margin {100 * result.margin:+.1f} %)"
            near = " — within 1 % of the limit" if result.near_limit else ""
            cells.append(f'<td class="{STATUS_CLASS[result.status]}">'
                         f"{STATUS_WORD[result.status]}{escape(shown)}{escape(margin)}"
                         f"{escape(near)}<span class=\"detail\">{escape(result.detail)}</span>"
                         "</td>")
        rows.append(f"<tr><th>{escape(row_label(comparison, name))}</th>{''.join(cells)}</tr>")
    return "<table>" + "".join(rows) + "</table>"


def render_html(comparison: Comparison) -> str:
    """The whole page as one string."""
    req = comparison.requirement
    title = f"Offers against {req.title}" if req and req.title else "Offers compared"
    parts = ["<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
             f"<title>{escape(title)}</title><style>{_CSS}</style></head><body>",
             f"<h1>{escape(title)}</h1>",
             '<div class="caution"><strong>Cautions.</strong> '
             + " ".join(escape(c) for c in (*CAUTIONS, COMPARE_CAUTION)) + "</div>",
             f"<p>Ranked by verdict, then by {escape(comparison.rank_figure)} "
             f"({'higher' if comparison.descending else 'lower'} first). Cells: "
             "<em>met</em> pale, <em>unknown</em> middle tone with a dotted border, "
             "<strong>NOT MET</strong> dark.</p>", _table(comparison), "<h2>Plots</h2>"]
    for plot in (_envelope_plot(comparison), _emf_plot(comparison), _loss_plot(comparison)):
        if plot:
            parts.append(f"<figure>{plot}</figure>")
    parts.append("<h2>Questions to the vendors</h2>")
    for offer in comparison.offers:
        parts.append(f"<h3>{escape(offer.id)}</h3><pre>"
                     f"{escape(letter_body(offer, req.title if req else None))}</pre>")
    parts.append(f"<p><small>sheetlint {escape(__version__)}</small></p></body></html>")
    return "\n".join(parts)
