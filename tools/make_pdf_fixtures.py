"""Generate the PDF fixtures of ``fixtures/pdf/`` and their expected records.

Every fixture is an invented scenario (a water utility's pump and blower motors, makers marked
"(invented)"). The data of each machine comes from one consistent design computed here, so a
record read back from the PDF passes the engine's checks:

* shaft power ``P = T * 2*pi*n/60``, electrical frequency ``f = p*n/60``;
* a surface-magnet machine in the dq model with ``i_d = 0`` (MTPA for ``L_d = L_q``):
  ``u_d = -w_e*L*i_q``, ``u_q = R*i_q + w_e*psi``, ``T_em = 1.5*p*psi*i_q``;
* the input power ``1.5*u_q*i_q`` equals shaft power plus losses, so
  ``P = eta*sqrt(3)*U*I*cos(phi)`` holds exactly before rounding;
* back-EMF ``U/(1 + margin)`` at the rated magnet temperature, NdFeB remanence
  coefficient -0.11 %/K to refer Ke to 20 degC, copper resistance ratio (235 + T)/(235 + 20).

Usage::

    python tools/make_pdf_fixtures.py [OUTPUT_DIR]      # default: fixtures/pdf

The generator draws each layout from the list of layouts real sheets use (label/value rows,
catalogue tables, ruled and unruled, continued pages, prose); it does not import the extractor.
fpdf2 is a development dependency only.
"""

from __future__ import annotations

import json
import math
import sys
from collections.abc import Sequence
from dataclasses import dataclass
from datetime import UTC, datetime
from pathlib import Path

from fpdf import FPDF

FIXED_DATE = datetime(2024, 3, 1, 12, 0, 0, tzinfo=UTC)
FONT_DIRS = (Path("/usr/share/fonts/truetype/dejavu"), Path("/usr/share/fonts/dejavu"),
             Path("/Library/Fonts"), Path("C:/Windows/Fonts"))
THIN_SPACE = "\u2009"
ROOT = Path(__file__).resolve().parent.parent


# --------------------------------------------------------------------------- physics


@dataclass(frozen=True)
class Design:
    """One invented surface-magnet machine at its rated point (SI floats unless named)."""

    power_w: float
    speed_rpm: float
    poles: int
    voltage_v: float  # line-to-line rms
    efficiency: float  # fraction
    torque_nm: float
    frequency_hz: float
    current_a: float  # rms
    power_factor: float
    ke_20_v_per_krpm: float  # line-to-line rms at 20 degC
    kt_20_nm_per_a: float  # rms current, 20 degC magnets
    resistance_20_ohm: float  # phase (star equivalent) at 20 degC
    inductance_h: float  # L_d = L_q, phase
    magnet_temperature_c: float
    emf_hot_v: float  # line-to-line rms at rated speed, rated magnet temperature


def design_spm(power_kw: float, speed_rpm: float, poles: int, voltage_v: float,
               efficiency: float, *, margin: float = 0.065, copper_share: float = 0.45,
               magnet_temperature_c: float = 100.0, winding_temperature_c: float = 115.0,
               remanence_coefficient: float = -0.0011) -> Design:
    """Rated point of a surface-magnet machine with i_d = 0, consistent by construction.

    ``margin`` is U/E_hot - 1; ``copper_share`` the copper part of the total losses
    ``P/eta - P``; the rest is taken as torque lost to iron, friction and stray losses.
    """
    power = power_kw * 1e3
    omega = 2 * math.pi * speed_rpm / 60
    pole_pairs = poles // 2
    omega_e = pole_pairs * omega
    torque = power / omega
    losses = power / efficiency - power
    copper = copper_share * losses
    torque_em = (power + losses - copper) / omega
    emf_hot = voltage_v / (1 + margin)  # line rms
    psi_hot = emf_hot * math.sqrt(2) / math.sqrt(3) / omega_e  # peak phase flux linkage
    i_q = torque_em / (1.5 * pole_pairs * psi_hot)  # peak
    resistance_hot = copper / (1.5 * i_q**2)
    u_q = resistance_hot * i_q + omega_e * psi_hot
    u_peak = voltage_v * math.sqrt(2) / math.sqrt(3)
    if u_peak <= u_q:
        raise ValueError("design has no room for the inductive drop; raise the margin")
    inductance = math.sqrt(u_peak**2 - u_q**2) / (omega_e * i_q)
    power_factor = u_q / u_peak
    current = i_q / math.sqrt(2)
    electrical = efficiency * math.sqrt(3) * voltage_v * current * power_factor
    assert abs(power - electrical) < 1e-6 * power
    remanence_ratio = 1 + remanence_coefficient * (magnet_temperature_c - 20)
    ke_hot = emf_hot / (speed_rpm / 1000)
    ke_20 = ke_hot / remanence_ratio
    kt_20 = math.sqrt(3) * ke_20 / (2 * math.pi * 1000 / 60)
    resistance_20 = resistance_hot * (235 + 20) / (235 + winding_temperature_c)
    return Design(power, speed_rpm, poles, voltage_v, efficiency, torque,
                  pole_pairs * speed_rpm / 60, current, power_factor, ke_20, kt_20,
                  resistance_20, inductance, magnet_temperature_c, emf_hot)


def sig(value: float, digits: int = 4) -> str:
    """``value`` rounded to ``digits`` significant digits, without exponent."""
    if value == 0:
        return "0"
    decimals = max(digits - 1 - math.floor(math.log10(abs(value))), 0)
    return f"{value:.{decimals}f}"


def thousands(text: str, sep: str = THIN_SPACE) -> str:
    """Group the integer part of a number string by thousands with ``sep``."""
    whole, dot, frac = text.partition(".")
    groups = []
    while len(whole) > 3:
        groups.insert(0, whole[-3:])
        whole = whole[:-3]
    groups.insert(0, whole)
    return sep.join(groups) + dot + frac


def comma(text: str) -> str:
    return text.replace(".", ",")


# --------------------------------------------------------------------------- drawing


class Sheet(FPDF):
    """An A4 page writer with a Unicode font and a fixed creation date."""

    def __init__(self, font_path: Path | None) -> None:
        super().__init__(unit="pt", format="A4")
        self.set_creation_date(FIXED_DATE)
        self.set_auto_page_break(False)
        self.set_margins(50, 50, 50)
        if font_path is not None:
            self.add_font("Body", "", str(font_path))
            bold = font_path.with_name(font_path.name.replace(".ttf", "-Bold.ttf"))
            self.add_font("Body", "B", str(bold if bold.exists() else font_path))
            self.family = "Body"
        else:
            self.family = "Helvetica"
        self.set_font(self.family, "", 9)

    def heading(self, y: float, text: str, size: float = 14) -> None:
        self.set_font(self.family, "B", size)
        self.text(50, y, text)
        self.set_font(self.family, "", 9)

    def prose(self, y: float, text: str, width: float = 495) -> float:
        """Left-aligned paragraph starting at ``y``; returns the y below it."""
        self.set_xy(50, y)
        self.multi_cell(width, 12, text, align="L")
        return self.get_y() + 8

    def table(self, rows: Sequence[Sequence[str]], columns: Sequence[tuple[float, float, str]],
              y: float, *, row_height: float = 15, ruling: str = "none",
              bold_rows: int = 0) -> float:
        """Draw ``rows`` with ``columns`` = (x, width, align); ruling none|grid|horizontal."""
        for index, row in enumerate(rows):
            self.set_font(self.family, "B" if index < bold_rows else "", 9)
            for (x, width, align), text in zip(columns, row, strict=False):
                self.set_xy(x, y)
                self.cell(width, row_height, text, border=1 if ruling == "grid" else 0,
                          align=align)
            if ruling == "horizontal":
                x0 = columns[0][0]
                x1 = columns[-1][0] + columns[-1][1]
                self.line(x0, y + row_height, x1, y + row_height)
                if index == 0:
                    self.line(x0, y, x1, y)
            y += row_height
        self.set_font(self.family, "", 9)
        return y + 10


def find_font() -> Path | None:
    for folder in FONT_DIRS:
        candidate = folder / "DejaVuSans.ttf"
        if candidate.exists():
            return candidate
    return None


# --------------------------------------------------------------------------- fixtures

MAKER_NW = "Nordwind Antriebe (invented)"
MAKER_KS = "Kessel & Sohn Elektromaschinen (invented)"


def obj(value: str, unit: str, **qualifiers: str) -> dict:
    number = float(value)
    return {"value": int(number) if number.is_integer() and "." not in value else number,
            "unit": unit, **qualifiers}


def pump_motor_en(pdf: Sheet) -> dict:
    """Single machine, English, label | value | unit, full grid, prose above and below."""
    d = design_spm(75, 1500, 8, 400, 0.958)
    pdf.add_page()
    pdf.heading(70, "Technical data sheet - permanent-magnet motor NW-PM 280-8")
    y = pdf.prose(85, "Customer: Riverside Water Utility (invented), raw water pumping "
                      "station 3, pump P-301. This data sheet belongs to offer 2024-117 and "
                      "replaces revision A of 12 January 2024.")
    v = {
        "power": "75", "speed": "1500", "torque": sig(d.torque_nm), "freq": sig(d.frequency_hz, 3),
        "volt": "400", "curr": sig(d.current_a), "pf": f"{d.power_factor:.3f}",
        "eta": f"{d.efficiency * 100:.1f}", "ke": sig(d.ke_20_v_per_krpm),
        "kt": sig(d.kt_20_nm_per_a), "r": sig(d.resistance_20_ohm * 2 * 1000, 3),
        "l": sig(d.inductance_h * 1000, 3), "mt": sig(d.magnet_temperature_c, 3),
    }
    rows = [
        ("Manufacturer", MAKER_NW, ""),
        ("Type", "NW-PM 280-8", ""),
        ("Rotor type", "SPM", ""),
        ("Rated output power", v["power"], "kW"),
        ("Rated speed", v["speed"], "rpm"),
        ("Rated torque", v["torque"], "Nm"),
        ("Rated frequency", v["freq"], "Hz"),
        ("Number of poles", "8", ""),
        ("Rated voltage", v["volt"], "V"),
        ("Rated current", v["curr"], "A"),
        ("Power factor", v["pf"], ""),
        ("Efficiency", v["eta"], "%"),
        ("Back-EMF constant L-L rms at 20 °C", v["ke"], "V/krpm"),
        ("Torque constant (rms)", v["kt"], "Nm/A"),
        ("Resistance ph-ph at 20 °C", v["r"], "mΩ"),
        ("Inductance Ld (phase)", v["l"], "mH"),
        ("Inductance Lq (phase)", v["l"], "mH"),
        ("Magnet temperature at rated load", v["mt"], "°C"),
        ("Maximum speed", "2200", "rpm"),
        ("Insulation class", "F", ""),
        ("Cooling", "IC411", ""),
        ("Duty type", "S1", ""),
        ("Efficiency class", "IE3", ""),
        ("Bearing, drive end", "6316 C3", ""),
        ("Paint", "RAL 5010", ""),
    ]
    y = pdf.table([("Quantity", "Value", "Unit"), *rows], [(50, 240, "L"), (290, 120, "R"),
                                                           (410, 80, "L")],
                  y + 4, ruling="grid", bold_rows=1)
    pdf.prose(y, "All values at 40 °C coolant temperature and 1000 m altitude unless stated. "
                 "Confirm ratings with the manufacturer before commissioning.")
    data = {
        "id": "NW-PM 280-8", "maker": MAKER_NW,
        "machine": {"topology": "spm", "poles": 8, "thermal_class": "F", "cooling": "IC411",
                    "duty": "S1"},
        "rated": {"power": "75 kW", "speed": "1500 rpm", "torque": f"{v['torque']} Nm",
                  "frequency": f"{v['freq']} Hz", "voltage": "400 V",
                  "current": f"{v['curr']} A", "power_factor": v["pf"],
                  "efficiency": f"{v['eta']} %", "magnet_temperature": f"{v['mt']} °C"},
        "emf": {"constant": obj(v["ke"], "V/krpm", basis="line_rms"),
                "magnet_temperature": "20 °C"},
        "torque_constant": obj(v["kt"], "Nm/A", basis="rms"),
        "circuit": {"resistance": obj(v["r"], "mΩ", basis="line", temperature="20 °C"),
                    "ld": obj(v["l"], "mH", basis="phase"),
                    "lq": obj(v["l"], "mH", basis="phase")},
        "limits": {"max_speed": "2200 rpm"},
        "efficiency_class": "IE3",
    }
    return {"records": [{"data": data, "page": 1}],
            "unmapped_labels": ["Bearing, drive end", "Paint"], "notes_contain": []}


def blower_motor_de(pdf: Sheet) -> dict:
    """Single machine, German, units in the labels, decimal commas, thin-space thousands."""
    d = design_spm(55, 3000, 4, 400, 0.954, margin=0.07)
    pdf.add_page()
    pdf.heading(70, "Datenblatt Synchronmotor mit Permanentmagneten")
    y = pdf.prose(85, "Projekt: Kläranlage Talsperre Süd (erfunden), Belebungsbecken 2, "
                      "Gebläse G-2. Angebot 24/0815, Stand März 2024.")
    v = {
        "torque": comma(sig(d.torque_nm)), "curr": comma(sig(d.current_a)),
        "pf": comma(f"{d.power_factor:.3f}"), "eta": comma(f"{d.efficiency * 100:.1f}"),
        "ke_phase": sig(d.ke_20_v_per_krpm / math.sqrt(3)),
        "r_line": sig(d.resistance_20_ohm * 2 * 1000, 3),
    }
    rows = [
        ("Hersteller", MAKER_NW),
        ("Typ", "NW-SG 225-4"),
        ("Bemessungsleistung [kW]", "55"),
        ("Bemessungsdrehzahl [min-1]", thousands("3000")),
        ("Bemessungsmoment (Nm)", v["torque"]),
        ("Bemessungsfrequenz [Hz]", "100"),
        ("Polpaarzahl", "2"),
        ("Bemessungsspannung [V]", "400"),
        ("Bemessungsstrom [A]", v["curr"]),
        ("Leistungsfaktor cos φ", v["pf"]),
        ("Wirkungsgrad [%]", v["eta"]),
        ("EMK-Konstante (Strang) bei 20 °C [V/1000 min-1]", comma(v["ke_phase"])),
        ("Wicklungswiderstand Klemme-Klemme bei 20 °C [mΩ]", comma(v["r_line"])),
        ("Höchstdrehzahl [min-1]", thousands("4500")),
        ("Umgebungstemperatur", "40 °C"),
        ("Aufstellungshöhe", thousands("1000") + " m"),
        ("Massenträgheitsmoment [kgm²]", "0,31"),
        ("Masse [kg]", "295"),
        ("Schaltung", "Stern"),
        ("Isolierstoffklasse", "F"),
        ("Kühlart", "IC 411"),
        ("Betriebsart", "S1"),
        ("Schutzart", "IP55"),
        ("Bauform", "IM B3"),
    ]
    y = pdf.table(rows, [(50, 300, "L"), (350, 120, "R")], y + 4, ruling="horizontal")
    pdf.prose(y, "Alle Angaben ohne Gewähr; maßgeblich ist die Bestätigung des Herstellers.")
    data = {
        "id": "NW-SG 225-4", "maker": MAKER_NW,
        "machine": {"pole_pairs": 2, "ambient": "40 °C", "altitude": "1000 m",
                    "inertia": "0.31 kgm²", "mass": "295 kg", "connection": "star",
                    "thermal_class": "F", "cooling": "IC411", "duty": "S1"},
        "rated": {"power": "55 kW", "speed": "3000 min-1",
                  "torque": f"{v['torque'].replace(',', '.')} Nm", "frequency": "100 Hz",
                  "voltage": "400 V", "current": f"{v['curr'].replace(',', '.')} A",
                  "power_factor": v["pf"].replace(",", "."),
                  "efficiency": f"{v['eta'].replace(',', '.')} %"},
        "emf": {"constant": obj(v["ke_phase"], "V/1000 rpm", basis="phase_rms"),
                "magnet_temperature": "20 °C"},
        "circuit": {"resistance": obj(v["r_line"], "mΩ", basis="line", temperature="20 °C")},
        "limits": {"max_speed": "4500 min-1"},
    }
    return {"records": [{"data": data, "page": 1}],
            "unmapped_labels": ["Schutzart", "Bauform"], "notes_contain": []}


CATALOGUE_RATINGS = (  # kW, efficiency
    (11, 0.935), (15, 0.940), (18.5, 0.943), (22, 0.946), (30, 0.950),
    (37, 0.952), (45, 0.954), (55, 0.956), (75, 0.958), (90, 0.960),
)


def catalogue_row(power_kw: float, efficiency: float, name: str | None = None
                  ) -> tuple[list[str], dict]:
    d = design_spm(power_kw, 3000, 6, 400, efficiency, margin=0.07)
    name = name or f"NW-G {power_kw:g}-6".replace(".", ",")
    cells = [name, f"{power_kw:g}", thousands("3000", " "), sig(d.torque_nm),
             sig(d.current_a), f"{d.power_factor:.3f}", f"{efficiency * 100:.1f}",
             sig(d.ke_20_v_per_krpm), sig(d.resistance_20_ohm * 1000, 3)]
    data = {
        "id": name,
        "maker": MAKER_NW,
        "rated": {"power": f"{power_kw:g} kW", "speed": "3000 rpm", "torque": f"{cells[3]} Nm",
                  "current": f"{cells[4]} A", "power_factor": cells[5],
                  "efficiency": f"{cells[6]} %"},
        "emf": {"constant": obj(cells[7], "V/krpm", basis="line_rms")},
        "circuit": {"resistance": obj(cells[8], "mΩ", basis="phase", temperature="20 °C")},
    }
    return cells, data


CATALOGUE_COLUMNS = [(50, 60, "L"), (115, 40, "R"), (160, 45, "R"), (210, 45, "R"),
                     (260, 45, "R"), (310, 35, "R"), (355, 50, "R"), (415, 50, "R"),
                     (475, 70, "R")]
CATALOGUE_HEADER = [
    ["Type", "Power", "Speed", "Torque", "Current", "cos φ", "Efficiency", "Ke L-L rms",
     "R phase 20 °C"],
    ["", "kW", "rpm", "Nm", "A", "", "%", "V/krpm", "mΩ"],
]


def blower_catalogue(pdf: Sheet) -> dict:
    """Catalogue, one machine per row, two-line header, no rulings, three pages:
    page 2 repeats the header, page 3 continues without one."""
    rows = [catalogue_row(p, e) for p, e in CATALOGUE_RATINGS]
    records = []
    pages = [(rows[:5], True), (rows[5:8], True), (rows[8:], False)]
    for page_no, (chunk, with_header) in enumerate(pages, start=1):
        pdf.add_page()
        y = 70.0
        if page_no == 1:
            pdf.heading(y, "Series NW-G blower motors, 6 poles, 400 V")
            y = pdf.prose(y + 15, "Manufacturer: " + MAKER_NW)
            y = pdf.prose(y, "Permanent-magnet synchronous motors for aeration blowers in "
                             "waste water treatment plants. Converter supply only; rated "
                             "values for 40 °C coolant, S1 duty.")
        elif with_header:
            pdf.heading(y, "Series NW-G (continued)", 11)
            y += 20
        else:
            y += 10
        table_rows = [*CATALOGUE_HEADER, *[cells for cells, _ in chunk]] if with_header \
            else [cells for cells, _ in chunk]
        y = pdf.table(table_rows, CATALOGUE_COLUMNS, y, row_height=14, ruling="none",
                      bold_rows=2 if with_header else 0)
        if page_no == len(pages):
            pdf.prose(y, "Resistance per phase of the equivalent star circuit. Other ratings "
                         "on request.")
        for _, data in chunk:
            # the maker, pole count and voltage are printed once, above the table on page 1,
            # and so are the coolant temperature and the duty type (in the prose)
            data = {**data, "rated": {**data["rated"], "voltage": "400 V"},
                    "machine": {**data.get("machine", {}), "poles": 6, "ambient": "40 °C",
                                "duty": "S1"}}
            once = ("maker", "rated.voltage", "machine.poles", "machine.ambient",
                    "machine.duty")
            records.append({"data": data, "page": page_no,
                            "field_pages": {path: 1 for path in once}})
    return {"records": records, "unmapped_labels": [], "notes_contain": []}


def pump_two_tables(pdf: Sheet) -> dict:
    """One page, one machine, two tables of different layout separated by prose."""
    d = design_spm(30, 1000, 6, 400, 0.951, margin=0.065)
    pdf.add_page()
    pdf.heading(70, "Raw water pump motor KS-P 200-6")
    y = pdf.prose(85, "Manufacturer: " + MAKER_KS)
    y = pdf.prose(y, "Type: KS-P 200-6")
    y = pdf.prose(y, "The motor drives the booster pump of the Hillside reservoir (invented). "
                     "It is fed by a 400 V converter and runs between 300 and 1000 rpm; the "
                     "values below hold at the rated point with 40 °C cooling air.")
    v = {"torque": sig(d.torque_nm), "curr": sig(d.current_a), "pf": f"{d.power_factor:.2f}",
         "eta": f"{d.efficiency * 100:.1f}", "ke": sig(d.ke_20_v_per_krpm),
         "kt": sig(d.kt_20_nm_per_a), "r": sig(d.resistance_20_ohm, 3),
         "l": sig(d.inductance_h * 1e6, 3), "mt": sig(d.magnet_temperature_c, 3)}
    pdf.heading(y + 8, "Rated data", 11)
    y = pdf.table([
        ("Rated power", "30 kW", "Rated speed", "1000 rpm"),
        ("Rated torque", f"{v['torque']} N·m", "Rated frequency", "50 Hz"),
        ("Rated voltage", "400 V", "Rated current", f"{v['curr']} A"),
        ("Power factor", v["pf"], "Efficiency", f"{v['eta']} %"),
        ("Pole number", "6", "Connection", "star"),
    ], [(50, 110, "L"), (160, 80, "R"), (290, 110, "L"), (400, 80, "R")], y + 16,
        ruling="none")
    y = pdf.prose(y, "Winding data are measured on the finished machine; the back-EMF "
                     "constant is the line-to-line rms value with magnets at 20 °C. Tolerances "
                     "according to IEC 60034-1.")
    pdf.heading(y + 8, "Winding and magnet data", 11)
    y = pdf.table([
        ("Back-EMF constant (line-to-line, rms) at 20 °C", v["ke"], "V/krpm"),
        ("Torque constant Kt", v["kt"], "Nm/A"),
        ("Phase resistance at 20 °C", v["r"], "Ω"),
        ("d-axis inductance", v["l"], "µH"),
        ("q-axis inductance", v["l"], "µH"),
        ("Magnet temperature, rated load", v["mt"], "°C"),
        ("Noise level", "72", "dB(A)"),
    ], [(50, 260, "L"), (310, 80, "R"), (390, 70, "L")], y + 16, ruling="grid")
    pdf.prose(y, "Page 1 of 1")
    data = {
        "id": "KS-P 200-6", "maker": MAKER_KS,
        "machine": {"poles": 6, "connection": "star", "ambient": "40 °C"},  # from the prose
        "rated": {"power": "30 kW", "speed": "1000 rpm", "torque": f"{v['torque']} N·m",
                  "frequency": "50 Hz", "voltage": "400 V", "current": f"{v['curr']} A",
                  "power_factor": v["pf"], "efficiency": f"{v['eta']} %",
                  "magnet_temperature": f"{v['mt']} °C"},
        "emf": {"constant": obj(v["ke"], "V/krpm", basis="line_rms"),
                "magnet_temperature": "20 °C"},
        "torque_constant": f"{v['kt']} Nm/A",
        "circuit": {"resistance": obj(v["r"], "Ω", basis="phase", temperature="20 °C"),
                    "ld": f"{v['l']} µH", "lq": f"{v['l']} µH"},
    }
    return {"records": [{"data": data, "page": 1}], "unmapped_labels": ["Noise level"],
            "notes_contain": []}


def draw_scan(pdf: Sheet) -> None:
    """An image-only page: a grey raster image and drawn rectangles, no text."""
    from PIL import Image, ImageDraw

    image = Image.new("L", (300, 200), 235)
    draw = ImageDraw.Draw(image)
    for row in range(12):
        draw.rectangle((20, 20 + row * 14, 280, 28 + row * 14), fill=90)
    pdf.image(image, x=50, y=80, w=450)
    pdf.rect(40, 70, 470, 320)


def scanned_appendix(pdf: Sheet) -> dict:
    """Page 1: label / value rows with the unit after a slash in the label; page 2: a scan."""
    d = design_spm(22, 1800, 4, 460, 0.948, margin=0.065)
    pdf.add_page()
    pdf.heading(70, "Booster pump motor KS-B 160-4, data at 60 Hz")
    v = {"torque": sig(d.torque_nm), "curr": sig(d.current_a), "pf": f"{d.power_factor:.2f}",
         "eta": f"{d.efficiency * 100:.1f}", "ke": sig(d.ke_20_v_per_krpm)}
    y = pdf.table([
        ("Manufacturer", MAKER_KS),
        ("Model", "KS-B 160-4"),
        ("Rated power / kW", "22"),
        ("Rated speed / rpm", thousands("1800", " ")),
        ("Rated torque / Nm", v["torque"]),
        ("Rated frequency / Hz", "60"),
        ("Poles", "4"),
        ("Rated voltage / V", "460"),
        ("Rated current / A", v["curr"]),
        ("cos phi", v["pf"]),
        ("Efficiency / %", v["eta"]),
        ("Ke / V/krpm", v["ke"]),
    ], [(50, 200, "L"), (250, 90, "R")], 95, ruling="none")
    pdf.prose(y, "The outline drawing on page 2 is a scanned copy.")
    pdf.add_page()
    draw_scan(pdf)
    data = {
        "id": "KS-B 160-4", "maker": MAKER_KS, "machine": {"poles": 4},
        "rated": {"power": "22 kW", "speed": "1800 rpm", "torque": f"{v['torque']} Nm",
                  "frequency": "60 Hz", "voltage": "460 V", "current": f"{v['curr']} A",
                  "power_factor": v["pf"], "efficiency": f"{v['eta']} %"},
        "emf": {"constant": f"{v['ke']} V/krpm"},
    }
    return {"records": [{"data": data, "page": 1}], "unmapped_labels": [],
            "notes_contain": ["page 2 has no text layer"]}


def image_only(pdf: Sheet) -> dict:
    """A scanned sheet without any text layer: extraction must refuse it."""
    pdf.add_page()
    draw_scan(pdf)
    return {"records": [], "error_contains": "no text layer"}


FIXTURES = {
    "pump_motor_en": pump_motor_en,
    "blower_motor_de": blower_motor_de,
    "blower_catalogue": blower_catalogue,
    "pump_two_tables": pump_two_tables,
    "scanned_appendix": scanned_appendix,
    "image_only": image_only,
}


def build(name: str, out_dir: Path, font: Path | None = None) -> dict:
    """Write ``<name>.pdf`` and ``<name>.expected`` into ``out_dir``; return expected."""
    pdf = Sheet(font if font is not None else find_font())
    expected = FIXTURES[name](pdf)
    expected = {"pdf": f"{name}.pdf", "pages": pdf.pages_count, **expected}
    out_dir.mkdir(parents=True, exist_ok=True)
    pdf.output(str(out_dir / f"{name}.pdf"))
    (out_dir / f"{name}.expected").write_text(
        json.dumps(expected, indent=2, ensure_ascii=False) + "\n", encoding="utf-8")
    return expected


def build_catalogue_pages(path: Path, pages: int) -> None:
    """A long catalogue of ``pages`` pages, each a repeated two-line header and ten rows
    (for the throughput benchmark)."""
    font = find_font()
    pdf = Sheet(font)
    header = CATALOGUE_HEADER if font else [[c.replace("φ", "phi").replace("Ω", "Ohm")
                                             .replace("°", "deg ") for c in line]
                                            for line in CATALOGUE_HEADER]
    for page in range(pages):
        pdf.add_page()
        pdf.heading(70, f"Series NW-G, sheet {page + 1}", 11)
        rows = [catalogue_row(float(sig(p * (1 + 0.01 * (page % 7)), 3)), e,
                              f"G{page + 1}-{index + 1}")[0]
                for index, (p, e) in enumerate(CATALOGUE_RATINGS)]
        pdf.table([*header, *rows], CATALOGUE_COLUMNS, 95, row_height=14, bold_rows=2)
    pdf.output(str(path))


def main(argv: list[str]) -> int:
    out_dir = Path(argv[1]) if len(argv) > 1 else ROOT / "fixtures" / "pdf"
    font = find_font()
    if font is None:
        print("DejaVuSans.ttf not found; the fixtures need a Unicode font", file=sys.stderr)
        return 1
    for name in FIXTURES:
        build(name, out_dir, font)
        print(f"wrote {out_dir / name}.pdf")
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv))
