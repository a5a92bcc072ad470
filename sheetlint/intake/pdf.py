"""PDF intake: machine data from the tables of vendor datasheets.

``extract_pdf`` reads the text layer of a PDF (pdfplumber words with positions; no OCR).
Each page becomes a grid: words are grouped into lines and cells (:mod:`pdf_layout`), lines
into blocks set apart by vertical space, and the cells of a block into the columns its rows
share. The grid goes through the table reader that spreadsheets use
(:mod:`sheetlint.intake.spreadsheet_grid`): one machine per row or per column, several
tables per page, tables continued over pages with or without their header, one machine
per page, records side by side, unit columns, units before values, symbol headers, section
rows, footnote marks, ``Label: value`` lines, and values common to a table taken from its
title or notes. Every value keeps its page and cell; what cannot be mapped goes to
``unmapped``.

This module also holds what both readers share: the label vocabulary
(``data/pdf_labels.yaml``, English and German), number and unit reading, and the value of
one cell. Hostile files (encrypted, truncated, empty, not a PDF, too many or too large
pages, too slow) raise :class:`PdfError` with a message naming the file, and nothing else
escapes.
"""

from __future__ import annotations

import functools
import json
import os
import re
import time
from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path
from typing import Any

import yaml

from sheetlint.fields import ATTRIBUTE_FIELDS, FIELDS
from sheetlint.intake.pdf_layout import (
    Line,
    best_column,
    find_columns,
    group_lines,
    split_at_gutters,
    vertical_rules,
)

#: largest page side the PDF format allows (ISO 32000-1, Annex C: 14 400 units = 200 in)
MAX_PAGE_SIDE_PT = 14_400.0


class PdfError(Exception):
    """A PDF that cannot be read; the message names the file and what is wrong."""


class PdfNoText(PdfError):
    """A PDF without a text layer (scanned): nothing to read without OCR."""


@dataclass
class PdfRecord:
    """One machine read from a PDF: the raw record and where each field came from."""

    data: dict[str, Any]
    locations: dict[str, dict[str, Any]] = field(default_factory=dict)


@dataclass
class PdfExtraction:
    """Everything read from one PDF."""

    path: str
    records: list[PdfRecord]
    unmapped: list[dict[str, Any]]
    notes: list[str]
    pages: int


# --------------------------------------------------------------------------- vocabulary


@dataclass(frozen=True, slots=True)
class LabelMatch:
    """A label read against the vocabulary: the field, a unit and qualifiers it states."""

    path: str
    unit: str | None
    qualifiers: dict[str, str]


class Vocabulary:
    """Labels, units and attribute values of ``pdf_labels.yaml``."""

    def __init__(self, table: dict[str, Any]) -> None:
        self.synonyms: dict[str, str] = {}
        for path, words in table["fields"].items():
            for word in words:
                self.synonyms.setdefault(_squash(str(word)), path)
        self.symbols = {_squash(str(s)) for s in table["symbols"]}
        self.headings = {_squash(str(s)) for s in table["headings"]}
        self.basis_patterns: list[tuple[re.Pattern[str], str]] = []
        phrases = [(str(p), key) for key, words in table["bases"].items() for p in words]
        for phrase, key in sorted(phrases, key=lambda item: -len(item[0])):
            pattern = re.compile(r"(?<![\w-])" + re.escape(phrase.lower()) + r"(?![\w-])")
            self.basis_patterns.append((pattern, key))
        self.values = {
            path: {str(s).lower(): canonical for canonical, spellings in mapping.items()
                   for s in spellings}
            for path, mapping in table["values"].items()
        }
        self.units = {str(u) for u in table["units"]}
        self.spellings = {str(k): str(v) for k, v in table["unit_spellings"].items()}
        self.spellings_folded = {k.lower(): v for k, v in self.spellings.items()}

    def unit(self, text: str) -> str | None:
        """The accepted spelling of unit ``text``, or None if it is not a unit we know."""
        text = " ".join(text.strip().split())
        if not text:
            return None
        if text in self.units:
            return text
        if text in self.spellings:
            return self.spellings[text]
        compact = text.replace(" ", "")
        if compact in self.units:
            return compact
        return self.spellings_folded.get(text.lower())

    def lookup(self, text: str) -> str | None:
        """Field path of a squashed label, allowing symbols before or after it."""
        if not text:
            return None
        if text in self.synonyms:
            return self.synonyms[text]
        tokens = text.split()
        for head in range(0, 3):
            for tail in range(0, 3):
                if head + tail == 0 or head + tail >= len(tokens):
                    continue
                prefix = " ".join(tokens[:head])
                suffix = " ".join(tokens[len(tokens) - tail:])
                if (head and prefix not in self.symbols) or (tail and suffix not in
                                                             self.symbols):
                    continue
                core = " ".join(tokens[head:len(tokens) - tail])
                if core in self.synonyms:
                    return self.synonyms[core]
        return None

    def match_label(self, raw: str) -> LabelMatch | None:
        """Read a table label: field, unit written in it, qualifiers (basis, temperature)."""
        text, unit = self._split_unit(raw.strip().rstrip(":").strip())
        lowered = _normalise_text(text.lower())
        path = self.lookup(_squash(lowered))
        if path is not None:
            return LabelMatch(path, unit, {})
        qualifiers: dict[str, str] = {}
        stripped = lowered
        temperature = TEMPERATURE_IN_LABEL.search(stripped)
        if temperature:
            qualifiers["temperature"] = f"{_number_text(temperature.group(1))} °C"
            stripped = stripped[:temperature.start()] + " " + stripped[temperature.end():]
        duration = DURATION_IN_LABEL.search(stripped)
        if duration:
            qualifiers["duration"] = f"{_number_text(duration.group(1))} {duration.group(2)}"
            stripped = stripped[:duration.start()] + " " + stripped[duration.end():]
        path = self.lookup(_squash(stripped)) if qualifiers else None
        if path is not None:  # "Peak torque (10 s)": "peak" is part of the name
            return LabelMatch(path, unit, qualifiers)
        for pattern, key in self.basis_patterns:
            if pattern.search(stripped):
                qualifiers.setdefault(key, key)
                stripped = pattern.sub(" ", stripped)
        path = self.lookup(_squash(stripped))
        if path is None:
            return None
        return LabelMatch(path, unit, qualifiers)

    def _split_unit(self, text: str) -> tuple[str, str | None]:
        for pattern in (r"\[([^\]]+)\]", r"\(([^()]+)\)"):
            for found in re.finditer(pattern, text):
                unit = self.unit(found.group(1))
                if unit is not None:
                    return (text[:found.start()] + text[found.end():]).strip(), unit
        found = re.search(r"\s/\s*(\S.*)$", text) or re.search(r"\s(?:in)\s+(\S+)$", text)
        if found:
            unit = self.unit(found.group(1))
            if unit is not None:
                return text[:found.start()].strip(), unit
        return text, None

    def attribute(self, path: str, text: str) -> str | int:
        """Canonical spelling of an attribute value (``'Stern'`` -> ``'star'``)."""
        text = " ".join(text.split())
        folded = text.lower()
        if path in self.values:
            return self.values[path].get(folded, text)
        if path in ("machine.thermal_class", "machine.temperature_rise_class"):
            found = re.search(r"\b(1[0-9]{2}|2[0-9]{2})\b", text)
            if found:
                return int(found.group(1))
            found = re.search(r"\b([A-HY])\b", text)
            return found.group(1) if found else text
        if path == "machine.cooling":
            found = re.search(r"\bIC\s*([0-9][0-9A-Z ]*)", text, re.IGNORECASE)
            return "IC" + found.group(1).replace(" ", "").upper() if found else text
        if path == "machine.duty":
            found = re.search(r"\bS\s*(10|[1-9])\b", text, re.IGNORECASE)
            return f"S{found.group(1)}" if found else text
        if path == "efficiency_class":
            found = re.search(r"\bIE\s*([1-5])\b", text, re.IGNORECASE)
            return f"IE{found.group(1)}" if found else text
        return text


TEMPERATURE_IN_LABEL = re.compile(
    r"(?:\b(?:at|bei|for|für)\s+|@\s*)?([-+]?\d+(?:[.,]\d+)?)\s*°\s*c\b")
DURATION_IN_LABEL = re.compile(r"(?:\(\s*|\b(?:for|für|during|während)\s+)"
                               r"(\d+(?:[.,]\d+)?)\s*(s|ms|min)\b\s*\)?")


def _normalise_text(text: str) -> str:
    return (text.replace("–", "-").replace("—", "-").replace("‑", "-").replace("ϕ", "φ")
            .replace("\u00a0", " ").replace("\u2009", " ").replace("\u202f", " "))


def _squash(text: str) -> str:
    """Lower case, punctuation (except - / _ . and symbols) reduced to single spaces."""
    text = _normalise_text(text.lower())
    text = re.sub(r"[,;:()\[\]{}\"'’]", " ", text)
    text = re.sub(r"(?<=\w)\.(?=\s|$)", "", text)  # "max. speed" -> "max speed"
    return " ".join(text.split())


@functools.cache
def vocabulary() -> Vocabulary:
    """The label vocabulary, read once from ``sheetlint/intake/data/pdf_labels.yaml``."""
    source = resources.files("sheetlint.intake").joinpath("data/pdf_labels.yaml")
    return Vocabulary(yaml.safe_load(source.read_text(encoding="utf-8")))


# --------------------------------------------------------------------------- numbers

NUMBER_START = re.compile(r"^(?:approx\.?|ca\.?|≈|~)?\s*([-+−]?\d[\d\u2009\u202f\u00a0 '’.,]*)")
GROUPED = re.compile(r"\d{1,3}(?:[ \u2009\u202f\u00a0'’]\d{3})+(?:[.,]\d+)?")


@dataclass(frozen=True, slots=True)
class Quantity:
    """A number as written (normalised to a decimal point) and what follows it."""

    number: str
    unit: str | None
    rest: str


def _number_text(text: str) -> str:
    return text.replace(",", ".")


def normalise_number(text: str, decimal_comma: bool | None) -> str | None:
    """``'1 500'`` -> ``'1500'``, ``'0,95'`` -> ``'0.95'``; None if ``text`` is not one number.

    Space-like and apostrophe separators group thousands. With both ``.`` and ``,`` the last
    is the decimal mark. A lone ``,`` is decimal unless the page writes decimal points and
    the comma is followed by exactly three digits (``1,500``); likewise for a lone ``.``.
    """
    text = text.strip().replace("−", "-")
    sign = ""
    if text[:1] in "+-":
        sign, text = ("-" if text[0] == "-" else ""), text[1:].strip()
    if re.search(r"[ \u2009\u202f\u00a0'’]", text):
        if not GROUPED.fullmatch(text):
            return None
        text = re.sub(r"[ \u2009\u202f\u00a0'’]", "", text)
    if not re.fullmatch(r"\d[\d.,]*", text) or text[-1] in ".,":
        return None
    commas, points = text.count(","), text.count(".")
    if commas and points:
        decimal = "," if text.rfind(",") > text.rfind(".") else "."
        thousands = "." if decimal == "," else ","
        whole, _, fraction = text.rpartition(decimal)
        if not re.fullmatch(r"\d{1,3}(?:" + re.escape(thousands) + r"\d{3})+", whole):
            return None
        return sign + whole.replace(thousands, "") + "." + fraction
    mark = "," if commas else "." if points else ""
    if not mark:
        return sign + text
    count = commas or points
    three_digit_group = re.fullmatch(r"\d{1,3}(?:" + re.escape(mark) + r"\d{3})+", text)
    page_uses_other = (decimal_comma is False) if mark == "," else (decimal_comma is True)
    if count > 1:
        return sign + text.replace(mark, "") if three_digit_group else None
    if three_digit_group and page_uses_other:
        return sign + text.replace(mark, "")
    return sign + text.replace(mark, ".")


FOOTNOTE_MARK = re.compile(r"(?:(?<=[\d%)\s])[\u00b9\u00b2\u00b3\u2070-\u2079]+|\s*[*†‡]+|"
                           r"\s+\(\d\)|\s+\[\d\]|\s+[a-d1-9]\))$")
UNIT_FIRST = re.compile(r"^(\S+(?:\s\S+)?)\s+([-+−]?\d.*)$")


@functools.lru_cache(maxsize=16384)
def strip_footnote(text: str) -> str:
    """``'95.1¹'``, ``'95.1 *'``, ``'95.1 1)'`` -> ``'95.1'`` (a footnote mark on a value)."""
    text = text.strip()
    for _ in range(2):
        stripped = FOOTNOTE_MARK.sub("", text).rstrip()
        if stripped == text or not stripped:
            break
        text = stripped
    return text


@functools.lru_cache(maxsize=16384)
def parse_quantity(text: str, decimal_comma: bool | None) -> Quantity | None:
    """Split a cell like ``'1 500 min-1'`` into number and unit; None if it starts with none.

    A unit written before the number (``'kW 75'``) is read as well.
    """
    found = NUMBER_START.match(text.strip())
    if not found:
        first = UNIT_FIRST.match(text.strip())
        if first is None or vocabulary().unit(first.group(1)) is None:
            return None
        inner = parse_quantity(first.group(2), decimal_comma)
        if inner is None or inner.unit or inner.rest:
            return None
        return Quantity(inner.number, vocabulary().unit(first.group(1)), "")
    raw = found.group(1).rstrip(" \u2009\u202f\u00a0'’.,")
    number = normalise_number(raw, decimal_comma)
    backed_off = number is None
    while number is None and re.search(r"[ \u2009\u202f\u00a0]", raw):
        # the last group may start the unit: "1 500 1/min" is 1500 in 1/min
        raw = re.split(r"[ \u2009\u202f\u00a0](?=[^ \u2009\u202f\u00a0]*$)", raw)[0]
        number = normalise_number(raw.rstrip(" '’.,"), decimal_comma)
        if number is not None:
            raw = raw.rstrip(" '’.,")
    if number is None:
        return None
    rest = text.strip()[found.start(1) + len(raw):].strip()
    unit = vocabulary().unit(rest) if rest else None
    if backed_off and unit is None:
        return None  # "12 3" is no number; only a unit may follow the groups
    return Quantity(number, unit, "" if unit else rest)


def page_decimal_comma(lines: list[Line]) -> bool | None:
    """Whether a page writes decimal commas (True), decimal points (False) or cannot tell."""
    commas = points = 0
    for line in lines:
        for cell in line.cells:
            commas += len(re.findall(r"(?<![\d.,])0,\d|\d,\d{1,2}(?![\d.,])|\d,\d{4,}",
                                     cell.text))
            points += len(re.findall(r"(?<![\d.,])0\.\d|\d\.\d{1,2}(?![\d.,])|\d\.\d{4,}",
                                     cell.text))
    if commas == points:
        return None
    return commas > points


def _number_value(number: str) -> int | float:
    return float(number) if "." in number else int(number)


def qualifiers_for(path: str, kind: str, stated: dict[str, str]
                   ) -> tuple[dict[str, str], dict[str, str]]:
    """Qualifiers of the object form and extra fields from what the label states."""
    qualifiers: dict[str, str] = {}
    extra: dict[str, str] = {}
    line = "line" in stated
    phase = "phase" in stated
    peak = "peak" in stated
    if kind in ("voltage", "emf_constant") and line != phase:
        qualifiers["basis"] = ("line" if line else "phase") + ("_peak" if peak else "_rms")
    elif kind in ("current", "torque_constant") and (peak or "rms" in stated):
        qualifiers["basis"] = "peak" if peak else "rms"
    elif kind == "resistance":
        bases = [b for b in ("line", "phase", "delta_branch") if b in stated]
        if len(bases) == 1:
            qualifiers["basis"] = bases[0]
    elif kind == "inductance" and line != phase:
        qualifiers["basis"] = "line" if line else "phase"
    temperature = stated.get("temperature")
    if temperature and kind not in ("temperature", "temperature_difference"):
        if kind == "resistance":
            qualifiers["temperature"] = temperature
        elif kind == "torque_constant":
            qualifiers["magnet_temperature"] = temperature
        elif path.startswith("emf."):
            extra["emf.magnet_temperature"] = temperature
    if "duration" in stated and path in ("limits.peak_torque", "limits.peak_current"):
        qualifiers["duration"] = stated["duration"]
    return qualifiers, extra


def cell_value(vocab: Vocabulary, match: LabelMatch, value_text: str, unit_text: str | None,
               column_unit: str | None, decimal_comma: bool | None
               ) -> tuple[Any, dict[str, str]] | None:
    """The raw record value for ``match`` from a value cell, or None if it is not one.

    ``unit_text`` is a unit cell beside the value, ``column_unit`` the unit of the column or
    row header. Returns the value and extra fields implied by the label
    (``emf.magnet_temperature`` from "Ke at 20 °C").
    """
    path = match.path
    value_text = strip_footnote(value_text)
    if path in ATTRIBUTE_FIELDS:
        text = " ".join([value_text, unit_text or ""]).strip()
        return (vocab.attribute(path, text) if path not in ("id", "maker") else text), {}
    spec = FIELDS.get(path)
    quantity = parse_quantity(value_text, decimal_comma)
    if quantity is None or spec is None:
        return None
    if spec.kind == "count":
        if quantity.rest:
            return None
        return _number_value(quantity.number), {}
    if quantity.rest and re.search(r"\d", quantity.rest):
        return None  # "249.6 A 1 800 rpm": two cells run together, not one value
    unit = quantity.unit or (quantity.rest or None)
    if unit is None and unit_text:
        unit = vocab.unit(unit_text) or unit_text.strip()
    unit = unit or match.unit or column_unit
    qualifiers, extra = qualifiers_for(path, spec.kind, match.qualifiers)
    if qualifiers:
        value: Any = {"value": _number_value(quantity.number)}
        if unit:
            value["unit"] = unit
        value.update(qualifiers)
        return value, extra
    return (f"{quantity.number} {unit}" if unit else quantity.number), extra


# --------------------------------------------------------------------------- the file


def _fail(path: str, message: str) -> PdfError:
    return PdfError(f"{path}: {message}")


def _check_file(path: str, max_bytes: int) -> None:
    """Size and signature checks that need no parsing."""
    try:
        size = os.path.getsize(path)
    except FileNotFoundError:
        raise _fail(path, "no such file") from None
    except OSError as exc:
        raise _fail(path, f"cannot be read ({exc.strerror or exc})") from None
    if os.path.isdir(path):
        raise _fail(path, "is a directory, not a PDF")
    if size == 0:
        raise _fail(path, "is empty (0 bytes), not a PDF")
    if size > max_bytes:
        raise _fail(path, f"is {size:,} bytes, more than the limit of {max_bytes:,} bytes")
    try:
        with open(path, "rb") as handle:
            head = handle.read(1024)
            handle.seek(max(size - 2048, 0))
            tail = handle.read()
    except OSError as exc:
        raise _fail(path, f"cannot be read ({exc.strerror or exc})") from None
    if b"%PDF-" not in head:
        raise _fail(path, "is not a PDF (no %PDF- header in its first 1024 bytes)")
    if b"%%EOF" not in tail:
        raise _fail(path, "is truncated or damaged (no %%EOF end-of-file marker)")


def _page_count(pdf: Any) -> int | None:
    """Page count from the document catalogue, without walking the page tree."""
    from pdfminer.pdftypes import resolve1

    try:
        pages = resolve1(pdf.doc.catalog.get("Pages"))
        count = resolve1(pages.get("Count")) if isinstance(pages, dict) else None
        return int(count) if isinstance(count, int) else None
    except Exception:
        return None


def extract_pdf(path: str | os.PathLike[str], *, max_pages: int = 500, time_limit: float = 60.0,
                max_bytes: int = 100_000_000) -> PdfExtraction:
    """Read the machine tables of a PDF into raw records with page and cell locations.

    Raises :class:`PdfError` (and no other exception) when the file is not a readable PDF:
    missing, empty, not a PDF, truncated, encrypted with a password, more than ``max_pages``
    pages or ``max_bytes`` bytes, a page beyond the format's size limit, no text layer on any
    page, or reading taking longer than ``time_limit`` seconds (checked between pages).
    """
    name = os.fspath(path)
    started = time.perf_counter()
    _check_file(name, max_bytes)
    try:
        return _extract(name, max_pages, time_limit, started)
    except PdfError:
        raise
    except Exception as exc:
        raise _describe(name, exc) from None


def _describe(path: str, exc: BaseException) -> PdfError:
    kind = type(exc).__name__
    if "Password" in kind or "Encrypt" in kind:
        return _fail(path, "is encrypted; a password is needed to read it")
    if kind == "PdfminerException" and exc.args and isinstance(exc.args[0], BaseException):
        return _describe(path, exc.args[0])
    if kind in ("PDFSyntaxError", "PSEOF", "PSSyntaxError", "PdfminerException",
                "PDFNoValidXRef"):
        return _fail(path, f"is damaged or not a PDF ({kind}: {exc})")
    return _fail(path, f"cannot be read as a PDF ({kind}: {exc})")


@functools.lru_cache(maxsize=16384)
def _plain_number(text: str) -> bool:
    quantity = parse_quantity(strip_footnote(text), None)
    return quantity is not None and not quantity.rest


#: a vertical gap between two lines wider than this many line heights separates blocks
BLOCK_GAP_LINES = 1.2


def page_grid(lines: list[Line]) -> tuple[list[list[str]], list[str]]:
    """The lines of a page as grid rows: blocks of lines set apart by an empty row, each
    block's cells placed in the columns its rows share. Returns rows and the row names
    (first cell of each row) for locations."""

    rows: list[list[str]] = []
    blocks: list[list[Line]] = []
    for line in lines:
        if blocks and line.top - blocks[-1][-1].bottom <= BLOCK_GAP_LINES * max(
                blocks[-1][-1].height, line.height, 1.0):
            blocks[-1].append(line)
        else:
            blocks.append([line])
    for block in blocks:
        if rows:
            rows.append([])
        multi = [line for line in block if len(line.cells) >= 2]
        numeric = [line for line in multi
                   if sum(1 for cell in line.cells if _plain_number(cell.text)) >= 2]
        basis = numeric if len(numeric) >= 2 else multi
        columns = find_columns(basis) if basis else []
        span = (columns[-1].x1 - columns[0].x0) if columns else 0.0
        for line in block:
            if not columns or (len(line.cells) == 1 and (
                    line.cells[0].x1 - line.cells[0].x0 > span / 3
                    or line.cells[0].x0 <= columns[0].x1)):
                rows.append([line.cells[0].text] if len(line.cells) == 1 else
                            [cell.text for cell in line.cells])
                continue
            row: list[str] = [""] * len(columns)
            for cell in line.cells:
                for piece in split_at_gutters(cell, columns):
                    index = best_column(piece, columns)
                    row[index] = f"{row[index]} {piece.text}".strip()
            rows.append(row)
    return rows, [next((t for t in row if t), "") for row in rows]


def _extract(path: str, max_pages: int, time_limit: float, started: float) -> PdfExtraction:
    import pdfplumber

    from sheetlint.intake.spreadsheet_grid import GridReader

    reader = GridReader(Path(path).stem)
    with pdfplumber.open(path) as pdf:
        count = _page_count(pdf)
        if count is not None and count > max_pages:
            raise _fail(path, f"has {count} pages, more than the limit of {max_pages}")
        pages = pdf.pages
        if len(pages) > max_pages:
            raise _fail(path, f"has {len(pages)} pages, more than the limit of {max_pages}")
        if not pages:
            raise _fail(path, "has no pages")
        text_pages = 0
        for number, page in enumerate(pages, start=1):
            elapsed = time.perf_counter() - started
            if elapsed > time_limit:
                raise _fail(path, f"reading stopped at the time limit of {time_limit:g} s "
                                  f"after {number - 1} of {len(pages)} pages")
            width, height = float(page.width), float(page.height)
            if width > MAX_PAGE_SIDE_PT or height > MAX_PAGE_SIDE_PT:
                raise _fail(path, f"page {number} is {width:,.0f} x {height:,.0f} pt, larger "
                                  f"than the PDF limit of {MAX_PAGE_SIDE_PT:,.0f} pt (200 in)")
            words = page.extract_words(x_tolerance=1.5, y_tolerance=2.0)
            if not words:
                reader.notes.append(f"page {number} has no text layer (image only): skipped")
                page.close()
                continue
            text_pages += 1
            lines = group_lines(words, vertical_rules(page))
            rows, names = page_grid(lines)

            def locate(row: int, column: int, rows: list[list[str]] = rows,
                       names: list[str] = names, number: int = number) -> dict[str, Any]:
                texts = [t for t in rows[row] if t]
                if len(texts) <= 4:
                    return {"page": number, "cell": " | ".join(texts)}
                text = rows[row][column] if column < len(rows[row]) else ""
                first = names[row]
                return {"page": number,
                        "cell": text if not first or first == text else f"{first} | {text}"}

            reader.read_grid(rows, locate, {"page": number}, page_decimal_comma(lines))
            page.close()
        if text_pages == 0:
            raise PdfNoText(f"{path}: has no text layer on any of its {len(pages)} pages "
                            "(image only; OCR is not supported)")
        found = [PdfRecord(r.data, r.locations) for r in reader.finish(Path(path).stem)]
        notes, unmapped = reader.notes, reader.unmapped
        if not found:
            notes.append("no machine data found")
        return PdfExtraction(path, found, unmapped, notes, len(pages))


def location_text(location: dict[str, Any] | None) -> str:
    """Where a value was read, for people: ``p.2: Rated power | 75 | kW``, ``Catalogue!D7``,
    ``line 7, cell D7``."""
    if not location:
        return ""
    if "page" in location:
        cell = location.get("cell")
        return f"p.{location['page']}" + (f": {cell}" if cell else "")
    if "sheet" in location:
        return f"{location['sheet']}!{location.get('cell', '')}"
    if "line" in location:
        cell = location.get("cell")
        return f"line {location['line']}" + (f", cell {cell}" if cell else "")
    return ""


def dump_records(extraction: Any, fmt: str) -> str:
    """The records as ``{"records": [...]}`` in ``fmt`` ``'json'`` or ``'yaml'``, with where
    each value was read: YAML as a comment beside the value, JSON as ``"locations"`` (one
    mapping of field path to location per record) beside ``"records"``, which the intake
    of JSON files ignores."""
    records = [record.data for record in extraction.records]
    if fmt == "json":
        document = {"records": records,
                    "locations": [record.locations for record in extraction.records]}
        return json.dumps(document, indent=2, ensure_ascii=False) + "\n"
    if fmt == "yaml":
        lines = [f"# records read from {extraction.path}; beside each value: where it was "
                 "read", "records:"]
        for record in extraction.records:
            body = _yaml_mapping(record.data, record.locations, "", 1)
            body[0] = "- " + body[0][2:]
            lines.extend(body)
        return "\n".join(lines) + "\n"
    raise ValueError(f"unknown format {fmt!r}: use 'json' or 'yaml'")


def _yaml_mapping(data: dict[str, Any], locations: dict[str, dict[str, Any]], prefix: str,
                  depth: int) -> list[str]:
    pad = "  " * depth
    lines = []
    for key, value in data.items():
        path = f"{prefix}{key}"
        name = _yaml_flow(key)
        if isinstance(value, dict) and "value" not in value:
            lines.append(f"{pad}{name}:")
            lines.extend(_yaml_mapping(value, locations, path + ".", depth + 1))
            continue
        where = location_text(locations.get(path)).replace("\n", " ")
        lines.append(f"{pad}{name}: {_yaml_flow(value)}" + (f"  # {where}" if where else ""))
    return lines


def _yaml_flow(value: Any) -> str:
    """One value in YAML flow style, quoted where YAML needs it."""
    text = yaml.safe_dump([value], allow_unicode=True, default_flow_style=True, sort_keys=False,
                          width=1_000_000).strip()
    return text[1:-1]
