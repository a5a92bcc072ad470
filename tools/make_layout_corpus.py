"""A corpus of invented catalogue documents in every layout the intake reads, with answers.

Each layout is drawn as a PDF (fpdf2), a CSV file and an XLSX workbook (openpyxl) from one
description: pages of items (a line of text, a table, two tables side by side). The machine
data come from :mod:`sheetlint.synth` (consistent designs: P = T·ω, f = p·n/60, the dq model
with losses), so a record read back correctly passes the engine's checks. The answer of each
document is the list of machines with every field as an SI value, written here from the
design, not from any reader of ours.

Variation, so that a score on the corpus says something about documents not seen: fonts
(DejaVu Sans, Serif, Mono, Condensed, Liberation Sans Narrow), column widths, label wording
and order, English and German, decimal comma and point, thousands separators, ruled and
unruled tables, footnote marks. Makers and model designations are invented.

    python tools/make_layout_corpus.py OUTPUT_DIR [--booklet-pages N] [--seed N]

``--seed`` draws another corpus with more variation (field order, unit brackets, thousands
separators, fonts, and half the PDFs drawn by fpdf2's own table layout); without it the
corpus is the fixed one the tests use.

writes ``<layout>.pdf``, ``<layout>.csv``, ``<layout>.xlsx`` and ``<layout>.answer.json``.
"""

from __future__ import annotations

import csv
import json
import math
import random
import sys
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from sheetlint.synth import MachineSpec, design  # noqa: E402

FONTS = ("/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf",
         "/usr/share/fonts/truetype/dejavu/DejaVuSerif.ttf",
         "/usr/share/fonts/truetype/dejavu/DejaVuSansCondensed.ttf",
         "/usr/share/fonts/truetype/dejavu/DejaVuSansMono.ttf",
         "/usr/share/fonts/truetype/liberation/LiberationSansNarrow-Regular.ttf")
MAKERS = ("Nordwind Antriebe (invented)", "Kessel & Sohn Elektromaschinen (invented)",
          "Brightwater Drives (invented)", "Talsperre Motorenwerk (erfunden)")


# --------------------------------------------------------------------------- machines


@dataclass
class Machine:
    """One invented machine: printed texts per field and the SI answer per field."""

    model: str
    values: dict[str, float]  # field path -> value in the printed unit of FIELD_UNITS
    answer: dict[str, Any] = field(default_factory=dict)


#: field -> (unit printed, factor to SI, significant digits)
FIELD_UNITS: dict[str, tuple[str, float, int]] = {
    "rated.power": ("kW", 1e3, 4),
    "rated.speed": ("rpm", 2 * math.pi / 60, 4),
    "rated.torque": ("N·m", 1.0, 4),
    "rated.current": ("A", 1.0, 4),
    "rated.voltage": ("V", 1.0, 3),
    "rated.frequency": ("Hz", 1.0, 4),
    "rated.power_factor": ("", 1.0, 2),
    "rated.efficiency": ("%", 0.01, 3),
    "emf.constant": ("V/krpm", 60 / (2 * math.pi) / 1000, 4),
    "circuit.resistance": ("Ω", 1.0, 3),
    "circuit.ld": ("mH", 1e-3, 3),
    "circuit.lq": ("mH", 1e-3, 3),
    "machine.poles": ("", 1.0, 0),
    "machine.inertia": ("kg·m²", 1.0, 3),
}


def round_sig(value: float, digits: int) -> float:
    if value == 0 or digits == 0:
        return float(round(value))
    exponent = math.floor(math.log10(abs(value)))
    return round(value, max(digits - 1 - exponent, 0))


def decimals_for(value: float, digits: int) -> int:
    if digits == 0 or value == 0:
        return 0
    return max(digits - 1 - math.floor(math.log10(abs(value))), 0)


def make_machine(rng: random.Random, prefix: str, index: int, *, voltage: float = 400.0,
                 poles: int | None = None, topology: str = "spm") -> Machine:
    power = rng.choice((5.5, 7.5, 11, 15, 18.5, 22, 30, 37, 45, 55, 75, 90, 110, 132, 160))
    speed = rng.choice((1000, 1500, 1800, 2000, 3000))
    poles = poles or rng.choice((4, 6, 8))
    spec = MachineSpec(power_kw=power, speed_rpm=speed, poles=poles, topology=topology,
                       mains_voltage=voltage, voltage_ratio=1.0)
    d = design(spec)
    si = {
        "rated.power": power * 1e3, "rated.speed": speed * 2 * math.pi / 60,
        "rated.torque": d["torque"], "rated.current": d["current"],
        "rated.voltage": d["voltage"], "rated.frequency": d["frequency"],
        "rated.power_factor": d["power_factor"], "rated.efficiency": d["efficiency"],
        "emf.constant": d["ke_20"], "circuit.resistance": d["r_20"],
        "circuit.ld": d["ld"], "circuit.lq": d["lq"], "machine.poles": float(poles),
        "machine.inertia": round_sig(0.0004 * power ** 1.3 * 1500 / speed, 3),
    }
    values = {}
    for path, (_unit, factor, digits) in FIELD_UNITS.items():
        values[path] = round_sig(si[path] / factor, digits)
    values["rated.voltage"] = voltage
    model = f"{prefix} {index:02d}-{poles}"
    return Machine(model, values)


def number_text(value: float, digits: int, *, comma: bool = False, grouping: str = "") -> str:
    decimals = decimals_for(value, digits)
    text = f"{value:.{decimals}f}"
    whole, _, fraction = text.partition(".")
    if grouping and len(whole) > 3:
        whole = f"{int(whole):,}".replace(",", grouping)
    if fraction:
        return whole + ("," if comma else ".") + fraction
    return whole


# --------------------------------------------------------------------------- wording

LABELS_EN = {
    "id": ["Type", "Model", "Type designation"],
    "rated.power": ["Rated power", "Output power", "Rated output", "Nominal power",
                    "Shaft power"],
    "rated.speed": ["Rated speed", "Speed", "Base speed", "Nominal speed"],
    "rated.torque": ["Rated torque", "Torque", "Continuous torque"],
    "rated.current": ["Rated current", "Current", "Nominal current"],
    "rated.voltage": ["Rated voltage", "Voltage"],
    "rated.frequency": ["Frequency", "Rated frequency"],
    "rated.power_factor": ["Power factor", "cos φ"],
    "rated.efficiency": ["Efficiency", "Rated efficiency"],
    "emf.constant": ["Back-EMF constant", "Voltage constant"],
    "circuit.resistance": ["Winding resistance", "Stator resistance"],
    "circuit.ld": ["d-axis inductance", "Inductance Ld"],
    "circuit.lq": ["q-axis inductance", "Inductance Lq"],
    "machine.poles": ["Number of poles", "Poles"],
    "machine.inertia": ["Moment of inertia", "Rotor inertia"],
}
LABELS_DE = {
    "id": ["Typ", "Typbezeichnung"],
    "rated.power": ["Bemessungsleistung", "Nennleistung", "Leistung"],
    "rated.speed": ["Bemessungsdrehzahl", "Nenndrehzahl", "Drehzahl"],
    "rated.torque": ["Bemessungsmoment", "Nennmoment"],
    "rated.current": ["Bemessungsstrom", "Nennstrom", "Strom"],
    "rated.voltage": ["Bemessungsspannung", "Nennspannung"],
    "rated.frequency": ["Frequenz", "Bemessungsfrequenz"],
    "rated.power_factor": ["Leistungsfaktor", "cos φ"],
    "rated.efficiency": ["Wirkungsgrad"],
    "emf.constant": ["Spannungskonstante", "EMK-Konstante"],
    "circuit.resistance": ["Wicklungswiderstand", "Ständerwiderstand"],
    "circuit.ld": ["Längsinduktivität"],
    "circuit.lq": ["Querinduktivität"],
    "machine.poles": ["Polzahl"],
    "machine.inertia": ["Trägheitsmoment", "Massenträgheitsmoment"],
}
SYMBOLS = {
    "id": "Type", "rated.power": "P_N", "rated.speed": "n_N", "rated.torque": "M_N",
    "rated.current": "I_N", "rated.voltage": "U_N", "rated.frequency": "f_N",
    "rated.power_factor": "cos φ", "rated.efficiency": "η", "emf.constant": "K_E",
    "circuit.resistance": "R_s", "circuit.ld": "L_d", "circuit.lq": "L_q",
    "machine.poles": "2p", "machine.inertia": "J",
}
UNIT_SPELLINGS = {
    "rpm": ["rpm", "min-1", "1/min", "r/min"],
    "N·m": ["N·m", "Nm"],
    "Ω": ["Ω", "ohm"],
    "V/krpm": ["V/krpm", "V/1000 rpm"],
    "kg·m²": ["kg·m²", "kgm²"],
}
FOOTNOTES = ("¹", "²", " *", " 1)")


@dataclass
class Style:
    """Choices of one document: language, number format, font, wording."""

    rng: random.Random
    german: bool = False
    comma: bool = False
    grouping: str = ""
    footnotes: float = 0.0  # share of values with a footnote mark

    shuffle: bool = False
    unit_brackets: tuple[str, str] = ("[", "]")

    def order(self, fields: Sequence[str]) -> list[str]:
        """The fields in the order this document prints them."""
        fields = list(fields)
        if self.shuffle:
            self.rng.shuffle(fields)
        return fields

    def named(self, label: str, unit: str) -> str:
        """A label with its unit: "Rated power [kW]", "(kW)" or "/ kW"."""
        left, right = self.unit_brackets
        return f"{label} {left}{unit}{right}".rstrip() if left.strip() else \
            f"{label}{left}{unit}"

    def label(self, path: str) -> str:
        table = LABELS_DE if self.german else LABELS_EN
        return self.rng.choice(table[path])

    def unit(self, path: str) -> str:
        unit = FIELD_UNITS[path][0]
        return self.rng.choice(UNIT_SPELLINGS.get(unit, [unit]))

    def value(self, machine: Machine, path: str) -> str:
        if path == "id":
            return machine.model
        digits = FIELD_UNITS[path][2]
        text = number_text(machine.values[path], digits, comma=self.comma,
                           grouping=self.grouping)
        if self.footnotes and self.rng.random() < self.footnotes:
            text += self.rng.choice(FOOTNOTES)
        return text


def answer(machine: Machine, fields: Sequence[str], maker: str | None = None,
           common: dict[str, float] | None = None) -> dict[str, Any]:
    """The SI value of each field a document states for ``machine``."""
    out: dict[str, Any] = {"id": machine.model}
    for path in fields:
        if path == "id":
            continue
        out[path] = machine.values[path] * FIELD_UNITS[path][1]
    for path, value in (common or {}).items():
        out[path] = value
    if maker:
        out["maker"] = maker
    return out


# --------------------------------------------------------------------------- documents


@dataclass
class Table:
    rows: list[list[str]]
    widths: list[float]
    ruling: str = "none"  # none | grid | horizontal
    align: str = "R"
    fields: list[str] = field(default_factory=list)  # in the order printed


@dataclass
class Document:
    """Pages of items: ``str`` (a text line), :class:`Table`, or a pair of tables."""

    pages: list[list[Any]]
    answers: list[dict[str, Any]]
    font: str = FONTS[0]
    decimal_comma: bool = False


CATALOGUE_FIELDS = ["rated.power", "rated.speed", "rated.torque", "rated.current",
                    "rated.frequency", "rated.power_factor", "rated.efficiency", "emf.constant",
                    "circuit.resistance", "machine.inertia"]


def widths_for(rng: random.Random, count: int, first: float, total: float = 495) -> list[float]:
    rest = (total - first) / max(count - 1, 1)
    return [first] + [rest * rng.uniform(0.9, 1.1) for _ in range(count - 1)]


def catalogue_table(style: Style, machines: list[Machine], fields: list[str], *,
                    units: str = "row", symbols: bool = False, header: bool = True,
                    unit_columns: bool = False) -> Table:
    """One machine per row. ``units``: ``row`` (a units row), ``names`` ("[kW]") or
    ``cells`` ("75 kW")."""
    rows: list[list[str]] = []
    fields = style.order(fields)
    names = [SYMBOLS["id"] if symbols else style.label("id")]
    unit_row = [""]
    for path in fields:
        name = SYMBOLS[path] if symbols else style.label(path)
        unit = style.unit(path) if FIELD_UNITS[path][0] else ""
        if units == "names" and unit:
            name = style.named(name, unit)
        names.append(name)
        unit_row.append(unit)
        if unit_columns:
            names.append("")
            unit_row.append("")
    if header:
        rows.append(names)
        if units == "row" and not unit_columns:
            rows.append(unit_row)
    for machine in machines:
        row = [machine.model]
        for path in fields:
            text = style.value(machine, path)
            unit = style.unit(path) if FIELD_UNITS[path][0] else ""
            if unit_columns:
                row.extend([text, unit])
            elif units == "cells" and unit:
                row.append(f"{text} {unit}")
            else:
                row.append(text)
        rows.append(row)
    count = len(rows[0])
    total = min(max(count * 62, 400), 760)
    return Table(rows, widths_for(style.rng, count, 70, total), style.rng.choice(
        ("none", "grid", "horizontal")), fields=fields)


def label_value_table(style: Style, machines: list[Machine], fields: list[str], *,
                      unit_place: str = "after", symbol: bool = False) -> Table:
    """One machine per column (labels down the first column); a single machine is the usual
    label / value / unit sheet. ``unit_place``: ``after`` (a unit column after the values),
    ``before`` (between labels and values), ``name`` ("Power [kW]"), ``value_first``
    ("kW 75")."""
    rows: list[list[str]] = []
    fields = style.order(fields)
    head = ["Parameter" if not style.german else "Größe"]
    if symbol:
        head.append("")
    if unit_place == "before":
        head.append("")
    head.extend(m.model for m in machines)
    if unit_place == "after":
        head.append("")
    if len(machines) > 1:
        rows.append(head)
    else:
        single = [style.label("id")] + ([""] if symbol else []) + (
            [""] if unit_place == "before" else []) + [machines[0].model] + (
            [""] if unit_place == "after" else [])
        rows.append(single)
    for path in fields:
        unit = style.unit(path) if FIELD_UNITS[path][0] else ""
        label = style.label(path)
        if unit_place == "name" and unit:
            label = style.named(label, unit)
        row = [label]
        if symbol:
            row.append(SYMBOLS[path])
        if unit_place == "before":
            row.append(unit)
        for machine in machines:
            text = style.value(machine, path)
            if unit_place == "value_first" and unit:
                text = f"{unit} {text}"
            row.append(text)
        if unit_place == "after":
            row.append(unit)
        rows.append(row)
    count = len(rows[0])
    return Table(rows, widths_for(style.rng, count, 150, 495 if count > 2 else 300),
                 style.rng.choice(("none", "grid", "horizontal")), align="L")


#: documents vary beyond their layout when the corpus is built with ``variation=True``
VARIATION = {"on": False}


def _style(seed: int, **kwargs: Any) -> Style:
    style = Style(random.Random(seed), **kwargs)
    if VARIATION["on"]:
        rng = style.rng
        style.shuffle = rng.random() < 0.7
        style.unit_brackets = rng.choice((("[", "]"), ("(", ")"), (" / ", "")))
        if "grouping" not in kwargs:
            style.grouping = rng.choice(("", " ", "\u2009", "." if style.comma else ","))
    return style


def _machines(rng: random.Random, prefix: str, count: int, **kwargs: Any) -> list[Machine]:
    return [make_machine(rng, prefix, i + 1, **kwargs) for i in range(count)]


def layout_catalogue_units_row(seed: int) -> Document:
    style = _style(seed)
    machines = _machines(style.rng, "NW-G", 12, poles=6)
    maker = MAKERS[0]
    table = catalogue_table(style, machines, CATALOGUE_FIELDS, units="row")
    page = [f"Series NW-G blower motors, {maker}", "400 V, 6 poles, 40 °C coolant", table]
    common = {"rated.voltage": 400.0, "machine.poles": 6.0, "machine.ambient": 313.15}
    return Document([page], [answer(m, CATALOGUE_FIELDS, None, common) for m in machines],
                    FONTS[0])


def layout_catalogue_units_in_names_de(seed: int) -> Document:
    style = _style(seed, german=True, comma=True, grouping="\u2009")
    machines = _machines(style.rng, "TS-K", 10, poles=4)
    table = catalogue_table(style, machines, CATALOGUE_FIELDS, units="names")
    page = ["Baureihe TS-K (erfunden), 400 V, 4-polig", table]
    common = {"rated.voltage": 400.0, "machine.poles": 4.0}
    return Document([page], [answer(m, CATALOGUE_FIELDS, None, common) for m in machines],
                    FONTS[1], decimal_comma=True)


def layout_catalogue_two_pages(seed: int, count: int = 30, repeat_header: bool = True
                               ) -> Document:
    style = _style(seed, grouping=" ")
    machines = _machines(style.rng, "BW-C", count, poles=8)
    fields = CATALOGUE_FIELDS[:8]
    half = (count + 1) // 2
    first = catalogue_table(style, machines[:half], fields, units="row")
    shuffle, style.shuffle = style.shuffle, False  # page 2 continues the same columns
    second = catalogue_table(style, machines[half:], first.fields, units="row",
                             header=repeat_header)
    if repeat_header:
        second.rows[0] = list(first.rows[0])
        second.rows[1] = list(first.rows[1])
    style.shuffle = shuffle
    second.widths, second.ruling = first.widths, first.ruling
    pages = [["Brightwater Drives (invented): catalogue 2026, 400 V, 8 poles", first],
             ["Catalogue 2026 (continued)" if repeat_header else "", second]]
    common = {"rated.voltage": 400.0, "machine.poles": 8.0}
    answers = [answer(m, fields, None, common) for m in machines]
    for number, item in enumerate(answers):
        item["page"] = 1 if number < half else 2
    return Document(pages, answers, FONTS[2])


def layout_transposed_de(seed: int) -> Document:
    style = _style(seed, german=True, comma=True)
    machines = _machines(style.rng, "KS-V", 4, poles=6)
    fields = ["rated.power", "rated.speed", "rated.torque", "rated.current", "rated.voltage",
              "rated.frequency", "rated.power_factor", "rated.efficiency", "emf.constant",
              "circuit.resistance", "circuit.ld", "circuit.lq", "machine.poles"]
    table = label_value_table(style, machines, fields, unit_place="after")
    page = ["Technische Daten, Varianten KS-V (erfunden)", table]
    return Document([page], [answer(m, fields) for m in machines], FONTS[0], True)


def layout_several_tables(seed: int) -> Document:
    style = _style(seed)
    low = _machines(style.rng, "NW-L", 4, voltage=400.0, poles=4)
    high = _machines(style.rng, "NW-H", 4, voltage=690.0, poles=4)
    fields = CATALOGUE_FIELDS[:7]
    t1 = catalogue_table(style, low, fields, units="names")
    t2 = catalogue_table(style, high, fields, units="names")
    page = ["Table 1: 400 V supply, 4 poles", t1, "Table 2: 690 V supply, 4 poles", t2]
    answers = [answer(m, fields, None, {"rated.voltage": 400.0, "machine.poles": 4.0})
               for m in low]
    answers += [answer(m, fields, None, {"rated.voltage": 690.0, "machine.poles": 4.0})
                for m in high]
    return Document([page], answers, FONTS[3])


def layout_booklet(seed: int, pages: int = 12) -> Document:
    style = _style(seed)
    fields = ["rated.power", "rated.speed", "rated.torque", "rated.current", "rated.voltage",
              "rated.frequency", "rated.power_factor", "rated.efficiency", "emf.constant",
              "circuit.resistance", "circuit.ld", "circuit.lq", "machine.poles",
              "machine.inertia"]
    machines = _machines(style.rng, "KS-B", pages)
    out_pages = []
    answers = []
    for number, machine in enumerate(machines, start=1):
        table = label_value_table(style, [machine], fields,
                                  unit_place=style.rng.choice(("after", "name")))
        out_pages.append([f"Data sheet {number} of {pages}", table])
        item = answer(machine, fields)
        item["page"] = number
        answers.append(item)
    return Document(out_pages, answers, FONTS[4])


def layout_side_by_side(seed: int) -> Document:
    style = _style(seed)
    machines = _machines(style.rng, "BW-S", 4)
    fields = ["rated.power", "rated.speed", "rated.torque", "rated.current", "rated.voltage",
              "rated.efficiency", "rated.power_factor", "machine.poles"]
    pages = []
    for k in range(0, 4, 2):
        left = label_value_table(style, [machines[k]], fields, unit_place="after")
        right = label_value_table(style, [machines[k + 1]], fields, unit_place="after")
        left.widths = [110, 55, 40]
        right.widths = [110, 55, 40]
        pages.append(["Two motors of series BW-S (invented)", (left, right)])
    return Document(pages, [answer(m, fields) for m in machines], FONTS[0])


def layout_unit_columns(seed: int) -> Document:
    style = _style(seed)
    machines = _machines(style.rng, "NW-U", 8, poles=4)
    fields = CATALOGUE_FIELDS[:6]
    table = catalogue_table(style, machines, fields, unit_columns=True)
    table.widths = [70] + [48, 34] * len(fields)
    page = ["Series NW-U (invented), 4 poles", table]
    return Document([page], [answer(m, fields, None, {"machine.poles": 4.0})
                             for m in machines], FONTS[1])


def layout_units_before_values(seed: int) -> Document:
    style = _style(seed)
    machines = _machines(style.rng, "KS-W", 3)
    fields = ["rated.power", "rated.speed", "rated.torque", "rated.current", "rated.voltage",
              "rated.efficiency", "emf.constant", "circuit.resistance", "machine.poles"]
    t1 = label_value_table(style, machines, fields, unit_place="before")
    single = label_value_table(style, [machines[0]], fields, unit_place="value_first")
    del single  # the same machine twice would be a duplicate record
    return Document([["Variants KS-W (invented)", t1]], [answer(m, fields) for m in machines],
                    FONTS[2])


def layout_symbol_headers(seed: int) -> Document:
    style = _style(seed)
    machines = _machines(style.rng, "BW-Y", 10, poles=6)
    fields = ["rated.power", "rated.speed", "rated.torque", "rated.current",
              "rated.power_factor", "rated.efficiency", "circuit.ld", "circuit.lq",
              "circuit.resistance", "emf.constant", "machine.inertia"]
    table = catalogue_table(style, machines, fields, units="row", symbols=True)
    page = ["BW-Y servo-pump motors (invented), 400 V, 6 poles", table]
    common = {"rated.voltage": 400.0, "machine.poles": 6.0}
    return Document([page], [answer(m, fields, None, common) for m in machines], FONTS[0])


def layout_section_rows(seed: int) -> Document:
    style = _style(seed)
    low = _machines(style.rng, "NW-R", 4, voltage=400.0, poles=6)
    high = _machines(style.rng, "NW-S", 4, voltage=690.0, poles=6)
    fields = CATALOGUE_FIELDS[:7]
    table = catalogue_table(style, low + high, fields, units="row")
    head = 2
    table.rows.insert(head, ["400 V supply"])
    table.rows.insert(head + 5, ["690 V supply"])
    page = ["Series NW-R/S (invented), 6 poles", table]
    answers = [answer(m, fields, None, {"rated.voltage": 400.0, "machine.poles": 6.0})
               for m in low]
    answers += [answer(m, fields, None, {"rated.voltage": 690.0, "machine.poles": 6.0})
                for m in high]
    return Document([page], answers, FONTS[1])


def layout_footnotes(seed: int) -> Document:
    style = _style(seed, footnotes=0.3)
    machines = _machines(style.rng, "KS-F", 10, poles=8)
    fields = CATALOGUE_FIELDS[:8]
    table = catalogue_table(style, machines, fields, units="names")
    page = ["Series KS-F (invented), 400 V, 8 poles", table,
            "¹ at 20 °C winding temperature.  * tolerance per IEC 60034-1."]
    common = {"rated.voltage": 400.0, "machine.poles": 8.0}
    return Document([page], [answer(m, fields, None, common) for m in machines], FONTS[2])


def layout_catalogue_units_in_cells(seed: int) -> Document:
    style = _style(seed)
    machines = _machines(style.rng, "BW-E", 9, poles=4)
    fields = CATALOGUE_FIELDS[:7]
    table = catalogue_table(style, machines, fields, units="cells")
    page = ["Brightwater Drives (invented) - E series, 4 poles, 40 °C ambient", table]
    common = {"machine.poles": 4.0, "machine.ambient": 313.15}
    return Document([page], [answer(m, fields, None, common) for m in machines], FONTS[4])


def layout_booklet_de_symbols(seed: int, pages: int = 6) -> Document:
    style = _style(seed, german=True, comma=True)
    fields = ["rated.power", "rated.speed", "rated.torque", "rated.current", "rated.voltage",
              "rated.frequency", "rated.power_factor", "rated.efficiency", "emf.constant",
              "circuit.resistance", "circuit.ld", "circuit.lq", "machine.inertia"]
    machines = _machines(style.rng, "TS-D", pages)
    out_pages, answers = [], []
    for number, machine in enumerate(machines, start=1):
        table = label_value_table(style, [machine], fields, unit_place="after", symbol=True)
        out_pages.append([f"Datenblatt {number}/{pages} (erfunden)", table])
        item = answer(machine, fields)
        item["page"] = number
        answers.append(item)
    return Document(out_pages, answers, FONTS[1], decimal_comma=True)


def layout_colon_lines(seed: int) -> Document:
    style = _style(seed)
    machines = _machines(style.rng, "KS-L", 2)
    fields = ["rated.power", "rated.speed", "rated.torque", "rated.current", "rated.voltage",
              "rated.efficiency"]
    pages = []
    for machine in machines:
        lines = [f"{style.label('id')}: {machine.model}"]
        for path in style.order(fields):
            unit = style.unit(path)
            lines.append(f"{style.label(path)}: {style.value(machine, path)} {unit}".strip())
        pages.append(lines)
    return Document(pages, [answer(m, fields) for m in machines], FONTS[0])


LAYOUTS: dict[str, Callable[[int], Document]] = {
    "catalogue_units_row": layout_catalogue_units_row,
    "catalogue_units_in_names_de": layout_catalogue_units_in_names_de,
    "catalogue_30_two_pages": layout_catalogue_two_pages,
    "continued_without_header": lambda seed: layout_catalogue_two_pages(seed, 24, False),
    "one_machine_per_column_de": layout_transposed_de,
    "several_tables_per_page": layout_several_tables,
    "booklet": layout_booklet,
    "side_by_side": layout_side_by_side,
    "unit_columns": layout_unit_columns,
    "units_before_values": layout_units_before_values,
    "symbol_headers": layout_symbol_headers,
    "section_rows": layout_section_rows,
    "footnote_marks": layout_footnotes,
    "catalogue_units_in_cells": layout_catalogue_units_in_cells,
    "booklet_de_symbols": layout_booklet_de_symbols,
    "colon_lines": layout_colon_lines,
}


# --------------------------------------------------------------------------- writers


def write_pdf(document: Document, path: Path) -> None:
    from fpdf import FPDF

    pdf = FPDF(unit="pt", format="A4")
    pdf.set_auto_page_break(False)
    pdf.add_font("Body", "", document.font)
    pdf.set_font("Body", "", 8)
    for items in document.pages:
        wide = any(isinstance(item, Table) and sum(item.widths) > 500 for item in items)
        pdf.add_page(orientation="L" if wide else "P")
        y = 50.0
        for item in items:
            if isinstance(item, str):
                if item:
                    pdf.set_xy(40, y)
                    pdf.cell(500, 14, item)
                y += 26
            elif isinstance(item, Table):
                y = _draw_table(pdf, item, 40, y)
            else:
                left, right = item
                bottom = _draw_table(pdf, left, 40, y)
                y = max(bottom, _draw_table(pdf, right, 300, y))
    pdf.output(str(path))


def write_pdf_with_fpdf_tables(document: Document, path: Path) -> None:
    """The same document through fpdf2's own table layout (``FPDF.table``): other cell
    padding, vertical centring, header words cut at the cell edge, landscape pages, and
    side-by-side tables stacked instead."""
    from fpdf import FPDF

    pdf = FPDF(unit="pt", format="A4")
    pdf.add_font("Body", "", document.font)
    pdf.set_font("Body", "", 7.5)
    for items in document.pages:
        pdf.add_page(orientation="L")
        for item in items:
            if isinstance(item, str):
                if item:
                    pdf.multi_cell(0, 12, item)
                pdf.ln(6)
                continue
            tables = [item] if isinstance(item, Table) else list(item)
            for table in tables:
                width = max(len(row) for row in table.rows)
                layout = "MINIMAL" if table.ruling == "none" else "ALL"
                with pdf.table(text_align="LEFT", line_height=10, borders_layout=layout,
                               first_row_as_headings=False,
                               width=min(60 * width + 60, 760)) as drawn:
                    for cells in table.rows:
                        row = drawn.row()
                        if len(cells) == 1:
                            row.cell(cells[0], colspan=width)
                            continue
                        for text in cells + [""] * (width - len(cells)):
                            row.cell(text)
                pdf.ln(8)
    pdf.output(str(path))


def _wrap(pdf: Any, text: str, width: float) -> list[str]:
    """Words of ``text`` in lines no wider than ``width`` (a header cell over two lines)."""
    lines: list[str] = []
    for word in text.split():
        if lines and pdf.get_string_width(f"{lines[-1]} {word}") <= width:
            lines[-1] = f"{lines[-1]} {word}"
        else:
            lines.append(word)
    return lines or [""]


def _draw_table(pdf: Any, table: Table, x0: float, y: float) -> float:
    line_height = 10
    for row in table.rows:
        if len(row) == 1:
            pdf.set_xy(x0, y)
            pdf.cell(sum(table.widths), line_height + 3, row[0])
            y += line_height + 3
            continue
        wrapped = [_wrap(pdf, row[i] if i < len(row) else "", width - 4)
                   for i, width in enumerate(table.widths)]
        height = max(len(lines) for lines in wrapped) * line_height + 3
        x = x0
        for index, width in enumerate(table.widths):
            align = "L" if index == 0 or table.align == "L" else "R"
            for k, text in enumerate(wrapped[index]):
                size = 8.0
                while size > 4 and pdf.get_string_width(text) > width - 4:
                    size -= 0.5  # a long German word: a smaller font, as catalogues do
                    pdf.set_font_size(size)
                pdf.set_xy(x, y + 1.5 + k * line_height)
                pdf.cell(width, line_height, text, align=align)
                pdf.set_font_size(8)
            if table.ruling == "grid":
                pdf.rect(x, y, width, height)
            x += width
        if table.ruling == "horizontal":
            pdf.line(x0, y + height, x0 + sum(table.widths), y + height)
        y += height
    return y + 16


def grid_rows(items: list[Any]) -> list[list[str]]:
    rows: list[list[str]] = []
    for item in items:
        if isinstance(item, str):
            if item:
                rows.append([item])
            rows.append([])
        elif isinstance(item, Table):
            rows.extend(list(r) for r in item.rows)
            rows.append([])
        else:
            left, right = item
            width = max(len(r) for r in left.rows)
            for a, b in zip(left.rows, right.rows, strict=False):
                rows.append(list(a) + [""] * (width - len(a)) + [""] + list(b))
            rows.append([])
    return rows


def write_csv(document: Document, path: Path) -> None:
    delimiter = ";" if document.decimal_comma else ","
    with open(path, "w", encoding="utf-8-sig", newline="") as handle:
        writer = csv.writer(handle, delimiter=delimiter)
        for items in document.pages:
            for row in grid_rows(items):
                writer.writerow(row)


def write_xlsx(document: Document, path: Path) -> None:
    """One sheet per page; plain numbers as numbers with a format showing the same digits,
    efficiencies in % as fractions with a percent format (read back as shown)."""
    import openpyxl

    workbook = openpyxl.Workbook()
    workbook.remove(workbook.active)
    for number, items in enumerate(document.pages, start=1):
        sheet = workbook.create_sheet(f"Page {number}")
        for r, row in enumerate(grid_rows(items), start=1):
            for c, text in enumerate(row, start=1):
                if not text:
                    continue
                cell = sheet.cell(r, c)
                plain = (text.replace(".", "").replace(",", ".") if document.decimal_comma
                         else text.replace(",", ""))  # grouping marks are the format's job
                if _plain_number(plain):
                    decimals = len(plain.partition(".")[2])
                    cell.value = float(plain) if decimals else int(plain)
                    cell.number_format = f"0.{'0' * decimals}" if decimals else "0"
                else:
                    cell.value = text
    workbook.save(path)


def _plain_number(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return text.strip() == text and not text.startswith(("+", "-"))


def build(out_dir: Path, booklet_pages: int = 12, seed: int = 18,
          variation: bool = False) -> list[str]:
    """Write every layout; ``variation`` also shuffles field order, unit brackets, thousands
    separators and fonts by ``seed`` (the fixed corpus of the tests has it off)."""
    out_dir.mkdir(parents=True, exist_ok=True)
    VARIATION["on"] = variation
    names = []
    for offset, (name, make) in enumerate(LAYOUTS.items()):
        document = (layout_booklet(seed + offset, booklet_pages) if name == "booklet"
                    else make(seed + offset))
        draw = write_pdf
        if variation:
            choice = random.Random(seed * 100 + offset)
            document.font = choice.choice(FONTS)
            if choice.random() < 0.5:
                draw = write_pdf_with_fpdf_tables
        draw(document, out_dir / f"{name}.pdf")
        write_csv(document, out_dir / f"{name}.csv")
        write_xlsx(document, out_dir / f"{name}.xlsx")
        (out_dir / f"{name}.answer.json").write_text(
            json.dumps({"layout": name, "records": document.answers}, indent=1,
                       ensure_ascii=False), encoding="utf-8")
        names.append(name)
    return names


def main(argv: list[str]) -> int:
    if not argv:
        print(__doc__)
        return 2
    pages = 12
    seed, variation = 18, False
    if "--seed" in argv:
        at = argv.index("--seed")
        seed, variation = int(argv[at + 1]), True
        del argv[at:at + 2]
    if "--booklet-pages" in argv:
        at = argv.index("--booklet-pages")
        pages = int(argv[at + 1])
        del argv[at:at + 2]
    names = build(Path(argv[0]), pages, seed, variation)
    print(f"{len(names)} layouts written to {argv[0]}")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
