"""Tables as grids of cells: one reader for spreadsheets and for the tables of PDF pages.

A grid is a list of rows of cell texts (a spreadsheet's cells as shown, or the cells of a PDF
page placed in columns). :class:`GridReader` finds in it, in any mix:

* one machine per row under a header of field names (units in the names, in a row of their
  own, or in the cells; symbol headers such as ``P_N``, ``n_N``, ``cos φ``), with section rows
  between the data rows and tables continued on the next page with or without a header;
* one machine per column: labels down a column, optional symbol and unit columns (before or
  after the values), model names in a row above or a ``Type`` row; a single value column is
  the usual label / value / unit sheet; two label columns side by side are two records when
  they repeat fields, one record when they do not;
* ``Label: value`` lines;
* values common to a table, written once in its title, caption, notes or a section row
  ("400 V, 6 poles, 40 °C coolant"), applied to each of its records unless a record states
  the field itself.

What cannot be mapped goes to ``unmapped`` with its location. Labels, units and attribute
values come from the same vocabulary as the PDF reader (``data/pdf_labels.yaml``).
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

from sheetlint.fields import FIELDS
from sheetlint.intake.pdf import (
    LabelMatch,
    Vocabulary,
    _squash,
    cell_value,
    parse_quantity,
    strip_footnote,
    vocabulary,
)

Locate = Callable[[int, int], dict[str, Any]]

_NUMBER = r"\d{1,3}(?:[.,]\d+)?"
#: a voltage or frequency without a word naming it counts only in a title this short
MAX_TITLE_CHARS = 80
BARE_UNIT_FIELDS = ("rated.voltage", "rated.frequency")
#: values a title or caption states for a whole table, and the field each one fills
CONTEXT_PATTERNS: list[tuple[re.Pattern[str], str]] = [
    (re.compile(r"\b(\d{1,2})\s*-?\s*(?:poles?|polig|pole)\b", re.IGNORECASE), "machine.poles"),
    (re.compile(r"(?<![\d.,/])(\d{2,5}(?:[.,]\d+)?\s*(?:kV|V))(?![\w/])"), "rated.voltage"),
    (re.compile(r"(?<![\d.,/])(\d{2,4}(?:[.,]\d+)?\s*Hz)\b"), "rated.frequency"),
    (re.compile(r"(-?" + _NUMBER + r"\s*°\s*C)\s+(?:coolant|ambient|cooling air|"
                r"kühlmittel\w*|umgebung\w*|kühlluft\w*)", re.IGNORECASE), "machine.ambient"),
    (re.compile(r"(?:coolant|ambient|kühlmittel\w*|umgebungstemperatur)\s*:?\s*(-?"
                + _NUMBER + r"\s*°\s*C)", re.IGNORECASE), "machine.ambient"),
    (re.compile(r"(\d{1,5}\s*m)\s+(?:above sea level|altitude|über nn|ü\. ?nn)",
                re.IGNORECASE), "machine.altitude"),
    (re.compile(r"(?<![\w-])(IC\s?\d{2,3}[A-Z0-9]*)\b"), "machine.cooling"),
    (re.compile(r"(?<![\w-])(S(?:10|[1-9]))\b(?![-.\d])"), "machine.duty"),
    (re.compile(r"(?<![\w-])(IE[1-5])\b(?!-)"), "efficiency_class"),
    (re.compile(r"(?:insulation class|thermal class|isolierstoffklasse|wärmeklasse)\s+"
                r"([BFH]|1[358][05])\b", re.IGNORECASE), "machine.thermal_class"),
]

#: largest header a catalogue table has above its first data row (lines)
MAX_HEADER_ROWS = 5


@dataclass
class GridRecord:
    """One machine read from a grid: raw record, location of each field, where it starts."""

    data: dict[str, Any] = field(default_factory=dict)
    locations: dict[str, dict[str, Any]] = field(default_factory=dict)
    origin: dict[str, Any] = field(default_factory=dict)
    from_columns: bool = False  # a label / value table (may be merged with the next one)
    context_paths: set[str] = field(default_factory=set)  # filled from a title or note

    def get(self, path: str) -> Any:
        node: Any = self.data
        for part in path.split("."):
            if not isinstance(node, dict) or part not in node:
                return None
            node = node[part]
        return node

    def set(self, path: str, value: Any, location: dict[str, Any]) -> bool:
        parts = path.split(".")
        node = self.data
        for part in parts[:-1]:
            child = node.setdefault(part, {})
            if not isinstance(child, dict):
                return False
            node = child
        if isinstance(node.get(parts[-1]), dict) and not isinstance(value, dict):
            return False
        node[parts[-1]] = value
        self.locations[path] = location
        if not self.origin:
            self.origin = location
        return True

    @property
    def has_physical(self) -> bool:
        return any(path in FIELDS for path in self.locations)


@dataclass
class HeaderSpec:
    """Columns of a catalogue header: per column its label, match and unit."""

    width: int
    labels: list[str]
    matches: list[LabelMatch | None]
    units: list[str | None]
    unit_columns: dict[int, int]  # a column of unit cells -> the value column it serves
    context: list[tuple[str, Any, dict[str, Any], str]]  # common values of the table


@dataclass
class _Row:
    index: int
    cells: list[tuple[int, str]]  # (column, text), non-empty, left to right

    @property
    def texts(self) -> list[str]:
        return [text for _, text in self.cells]


class GridReader:
    """Reads successive grids (pages, sheets) of one file into records."""

    def __init__(self, name: str) -> None:
        self.vocab: Vocabulary = vocabulary()
        self.name = name
        self.records: list[GridRecord] = []
        self.unmapped: list[dict[str, Any]] = []
        self.notes: list[str] = []
        self.decimal_comma: bool | None = None
        self.last_header: HeaderSpec | None = None
        self._label_cache: dict[str, LabelMatch | None] = {}
        self._number_cache: dict[str, bool] = {}

    # ---- cell tests

    def label(self, text: str) -> LabelMatch | None:
        if text not in self._label_cache:
            cleaned = strip_footnote(text)
            match = None
            if cleaned and not cleaned[0].isdigit() and len(cleaned) <= 80:
                match = self.vocab.match_label(cleaned)
            self._label_cache[text] = match
        return self._label_cache[text]

    def is_number(self, text: str) -> bool:
        key = text
        if key not in self._number_cache:
            quantity = parse_quantity(strip_footnote(text), self.decimal_comma)
            self._number_cache[key] = quantity is not None and not quantity.rest
        return self._number_cache[key]

    def is_unit(self, text: str) -> bool:
        return self.unit_of(text) is not None

    def unit_of(self, text: str) -> str | None:
        text = text.strip().removeprefix("/").strip()
        if text.startswith(("[", "(")) and text.endswith(("]", ")")):
            text = text[1:-1]
        return self.vocab.unit(text)

    def is_heading(self, text: str) -> bool:
        return _squash(text) in self.vocab.headings

    # ---- a grid

    def read_grid(self, rows: list[list[str]], locate: Locate, where: dict[str, Any],
                  decimal_comma: bool | None = None) -> None:
        """Read one grid (a page or a sheet). ``where`` is the location of the grid itself."""
        self.decimal_comma = decimal_comma
        self._number_cache.clear()
        parsed = []
        for index, row in enumerate(rows):
            cells = [(c, " ".join(str(t).split())) for c, t in enumerate(row)
                     if t is not None and str(t).strip()]
            parsed.append(_Row(index, cells))
        blocks: list[list[_Row]] = []
        for row in parsed:
            if not row.cells:
                if blocks and blocks[-1]:
                    blocks.append([])
                continue
            if not blocks:
                blocks.append([])
            blocks[-1].append(row)
        blocks = [b for b in blocks if b]
        pending: list[tuple[str, Any, dict[str, Any], str]] = []  # context for the next table
        produced: list[GridRecord] = []
        for block in blocks:
            made, leftover = self.read_block(block, locate, pending)
            if any(not record.from_columns for record in made):
                pending = []
            produced.extend(made)
            pending.extend(leftover)
        if pending:
            catalogue = [r for r in produced if not r.from_columns]
            if catalogue:  # notes below a catalogue apply to all its rows
                self.apply_context(pending, catalogue)
            else:
                for path, _value, location, text in pending:
                    self.unmapped.append({**location, "label": path, "value": text,
                                          "reason": "no table below it to apply it to"})

    def read_block(self, block: list[_Row], locate: Locate,
                   context: list[tuple[str, Any, dict[str, Any], str]]
                   ) -> tuple[list[GridRecord], list[tuple[str, Any, dict[str, Any], str]]]:
        """Records of a block of consecutive rows, and the common values it states."""
        left = min(row.cells[0][0] for row in block)
        self.join_wrapped_labels(block, left)
        kinds = [self.row_kind(row, left) for row in block]
        for i in range(len(block) - 1, 0, -1):
            # a unit wrapped onto a line of its own below a catalogue row belongs to that row
            if kinds[i] == "units" and kinds[i - 1] == "data":
                above = dict(block[i - 1].cells)
                for column, text in block[i].cells:
                    above[column] = f"{above.get(column, '')} {text}".strip()
                block[i - 1] = _Row(block[i - 1].index, sorted(above.items()))
                del block[i], kinds[i]
        for i, kind in enumerate(kinds):
            # "Type | Rated | Base | ..." over a catalogue is a header, not a label row
            if kind != "labels" or any(self.is_number(t) for t in block[i].texts):
                continue
            for j in range(i + 1, min(i + 2 + MAX_HEADER_ROWS, len(block))):
                if kinds[j] == "data":
                    kinds[i] = "text"
                    break
                if kinds[j] not in ("text", "units", "labels", "section") or any(
                        self.is_number(t) for t in block[j].texts):
                    break
        made: list[GridRecord] = []
        leftover: list[tuple[str, Any, dict[str, Any], str]] = []
        used: set[int] = set()
        index = 0
        while index < len(block):
            kind = kinds[index]
            if kind == "data":
                end = index
                while end < len(block) and kinds[end] in ("data", "section"):
                    end += 1
                while end > index and kinds[end - 1] == "section":
                    end -= 1
                while (index > 1 and kinds[index - 1] == "section"
                       and kinds[index - 2] in ("text", "units")):
                    index -= 1  # a section row between the header and the first data row
                header_rows = []
                start = index
                while (start > 0 and len(header_rows) < MAX_HEADER_ROWS
                       and ((kinds[start - 1] in ("text", "units")
                            and (len(block[start - 1].cells) >= 2
                                 or block[start - 1].cells[0][0] > left))
                            or self._header_fragment(block, start - 1))):
                    start -= 1
                    header_rows.insert(0, block[start])
                table_context = list(context)
                for position in range(start):
                    if kinds[position] in ("text", "section") and position not in used:
                        table_context.extend(self.context_values(block[position], locate))
                        used.add(position)
                used.update(range(start, end))
                made.extend(self.read_catalogue(header_rows, block[index:end], locate,
                                                table_context))
                context = []
                index = end
                continue
            if kind in ("labels", "colon"):
                end = index
                named = False
                while end < len(block) and kinds[end] in ("labels", "section", "colon"):
                    if self._names_a_model(block[end]):
                        if named:
                            break  # a second 'Type' row starts the next machine's table
                        named = True
                    end += 1
                while end > index + 1 and kinds[end - 1] == "section":
                    end -= 1
                above = None
                if (index > 0 and kinds[index - 1] in ("text",)
                        and len(block[index - 1].cells) >= 2
                        and not any(self.is_number(t) for t in block[index - 1].texts)):
                    above = block[index - 1]
                if above is not None:
                    used.add(index - 1)
                made.extend(self.read_columns(above, block[index:end], locate, context))
                used.update(range(index, end))
                index = end
                continue
            index += 1
        # rows no table used: common values (titles, notes), or unknown label / value rows
        for i, row in enumerate(block):
            if i in used:
                continue
            if kinds[i] in ("text", "section") and (len(row.cells) == 1 or not made):
                leftover.extend(self.context_values(row, locate))
            elif not all(self.is_heading(t) or self.is_unit(t) for t in row.texts):
                self.unmapped.append({**locate(row.index, row.cells[0][0]),
                                      "label": row.cells[0][1],
                                      "value": " | ".join(row.texts[1:])})
        return made, leftover

    def join_wrapped_labels(self, block: list[_Row], left: int) -> None:
        """A label wrapped over lines around its values ("Ständerwidersta" / values / "nd",
        a ruled table centring the values vertically) becomes one label in the value row."""
        i = 1
        while i < len(block):
            row, above = block[i], block[i - 1]
            fragment = len(above.cells) == 1 and above.cells[0][0] == left
            if (row.cells[0][0] > left and fragment and not self.is_number(above.cells[0][1])
                    and any(self.is_number(t) for t in row.texts)):
                label = above.cells[0][1]
                below = block[i + 1] if i + 1 < len(block) else None
                if (below is not None and len(below.cells) == 1 and below.cells[0][0] == left
                        and not self.is_number(below.cells[0][1])):
                    piece = below.cells[0][1]
                    spaced, tight = f"{label} {piece}", label + piece
                    if self.label(spaced) is not None:
                        label = spaced
                    elif self.label(tight) is not None or self.label(label) is None:
                        label = tight if piece[:1].islower() and label[-1:].isalpha() \
                            else spaced
                    else:
                        piece = ""
                    if piece:
                        del block[i + 1]
                block[i] = _Row(row.index, [(left, label), *row.cells])
                del block[i - 1]
                continue
            i += 1

    def _header_fragment(self, block: list[_Row], i: int) -> bool:
        """A short word alone on its line next to a header line ("Type" above the header
        names, "designation" below them): part of the header, not a title."""
        row = block[i]
        if len(row.cells) != 1 or len(row.cells[0][1]) > 20 or re.search(r"\d",
                                                                         row.cells[0][1]):
            return False
        neighbours = [block[j] for j in (i - 1, i + 1) if 0 <= j < len(block)]
        return any(len(n.cells) >= 2 and not any(self.is_number(t) for t in n.texts)
                   for n in neighbours)

    def _names_a_model(self, row: _Row) -> bool:
        first = row.cells[0][1]
        match = self.label(first)
        if match is None and len(row.cells) == 1:
            pair = self.split_label_value(first)
            match = pair[0] if pair else None
        return match is not None and match.path == "id"

    def row_kind(self, row: _Row, left: int = 0) -> str:
        """``data`` (a catalogue row), ``labels`` (label then values), ``colon``
        (``Label: value``), ``units``, ``section`` (one text cell) or ``text``."""
        texts = row.texts
        if len(texts) == 1 and row.cells[0][0] > left:
            return "units" if self.is_unit(texts[0]) else "text"
        if len(texts) == 1:
            return "colon" if self.split_label_value(texts[0]) else "section"
        if all(self.is_unit(t) or self.is_heading(t) for t in texts):
            return "units"
        first_label = self.label(texts[0])
        numbers = sum(1 for t in texts if self.is_number(t))
        if (first_label is not None and not self.is_number(texts[0])
                and (numbers or row.cells[0][0] == left)):
            rest = texts[1:]
            if any(self.is_number(t) or (self.label(t) is None and not self.is_unit(t))
                   for t in rest):
                # values follow the label; a row of labels is a header
                labels_after = sum(1 for t in rest if self.label(t) is not None
                                   and not self.is_number(t))
                if labels_after * 2 < len(rest) or numbers:
                    return "labels"
        if numbers >= 2 and numbers * 2 >= len(texts):
            if not any(self.label(t) is not None and self.label(t).path not in ("id",)
                       and not self.is_number(t) and self._label_is_header(t)
                       for t in texts):
                return "data"
        return "text"

    def split_label_value(self, text: str) -> tuple[LabelMatch, str, str] | None:
        """``'Maker: X'`` or ``'Back-EMF constant [V/krpm] 137.3'`` (a label and its value
        in one cell): the label's match, the label and the value text; else None."""
        found = re.match(r"^([^:]{2,60}):\s*(\S.*)$", text)
        if found is None and len(text) <= 60:
            words = text.split()
            for cut in range(1, min(len(words), 4)):
                head = " ".join(words[:cut])
                match = self.label(head)
                if match is not None and match.path in ("id", "maker"):
                    return match, head, " ".join(words[cut:])
        if found is None:
            found = re.match(r"^(.*?[^\d\s])\s+([-+−]?\d[\d\u2009 .,]*(?:\s*\S+)?)$", text)
            if found is None or (not self.is_number(found.group(2)) and parse_quantity(
                    found.group(2), self.decimal_comma) is None):
                return None
        match = self.label(found.group(1))
        if match is None:
            return None
        return match, found.group(1), found.group(2)

    def _label_is_header(self, text: str) -> bool:
        """A label in a data row that is really a label (not a value such as 'star')."""
        match = self.label(text)
        return match is not None and match.path not in ("machine.connection",
                                                         "machine.magnet",
                                                         "machine.conductor")

    # ---- one machine per row

    def header_spec(self, header_rows: list[_Row], data_rows: list[_Row],
                    context: list[tuple[str, Any, dict[str, Any], str]]) -> HeaderSpec | None:
        width = max(c for row in (*header_rows, *data_rows) for c, _ in row.cells) + 1
        texts: list[list[str]] = [[] for _ in range(width)]
        units: list[str | None] = [None] * width
        for row in header_rows:
            for column, text in row.cells:
                unit = self.unit_of(text)
                if unit is not None and units[column] is None:
                    units[column] = unit
                elif not self.is_heading(text) or len(header_rows) == 1:
                    texts[column].append(text)
        labels, matches = [], []
        for column in range(width):
            label = " ".join(texts[column])
            label = re.sub(r"\s*(?:/|\[\s*\]|\(\s*\))\s*$", "", label)  # "speed /" + unit row
            match = self.label(label) if label else None
            if match is None and len(texts[column]) > 1:
                # a word broken over two lines without a hyphen: "Bemessungsleist" + "ung"
                glued = texts[column][0]
                for piece in texts[column][1:]:
                    glued += piece if piece[:1].islower() and glued[-1:].isalpha() else (
                        " " + piece)
                glued = re.sub(r"\s*(?:/|\[\s*\]|\(\s*\))\s*$", "", glued)
                match = self.label(glued)
                if match is not None:
                    label = glued
            if match is None and len(texts[column]) > 1:
                for piece in texts[column]:  # a name row and a symbol row
                    match = self.label(piece)
                    if match is not None:
                        break
            labels.append(label)
            matches.append(match)
            if match is not None and units[column] is None:
                units[column] = match.unit
        # unit columns: no header of their own, cells that are units, right of a value column
        unit_columns: dict[int, int] = {}
        for column in range(1, width):
            if matches[column] is not None:
                continue
            cells = [t for row in data_rows for c, t in row.cells if c == column]
            if cells and all(self.is_unit(t) for t in cells):
                for left in range(column - 1, -1, -1):
                    if matches[left] is not None:
                        unit_columns[column] = left
                        break
        if sum(1 for m in matches if m is not None) < 2:
            return None
        return HeaderSpec(width, labels, matches, units, unit_columns, context)

    def read_catalogue(self, header_rows: list[_Row], data_rows: list[_Row], locate: Locate,
                       context: list[tuple[str, Any, dict[str, Any], str]]
                       ) -> list[GridRecord]:
        spec = None
        if header_rows:
            spec = self.header_spec(header_rows, data_rows, context)
        if (spec is not None and self.last_header is not None and not spec.context
                and [m.path if m else None for m in spec.matches]
                == [m.path if m else None for m in self.last_header.matches]):
            spec.context = list(self.last_header.context)  # the header repeated on a page
        if spec is None and self.last_header is not None and not header_rows:
            spec = self.last_header  # a table continued without its header
            if context:
                spec = HeaderSpec(spec.width, spec.labels, spec.matches, spec.units,
                                  spec.unit_columns, spec.context + context)
        if spec is None:
            for row in data_rows:
                self.unmapped.append({**locate(row.index, row.cells[0][0]),
                                      "label": "(no header)",
                                      "value": " | ".join(row.texts)})
            self.notes.append(f"a table of {len(data_rows)} rows has no header and follows "
                              "none; its rows are listed as unmapped")
            return []
        self.last_header = spec
        id_column = next((i for i, m in enumerate(spec.matches) if m and m.path == "id"), None)
        made: list[GridRecord] = []
        section: list[tuple[str, Any, dict[str, Any], str]] = []
        for row in data_rows:
            if len(row.cells) == 1:
                section = self.context_values(row, locate)
                continue
            record = GridRecord()
            cells = dict(row.cells)
            first_column = row.cells[0][0]
            row_name = cells.get(id_column, "") if id_column is not None else ""
            if id_column is None and not self.is_number(row.cells[0][1]) and (
                    first_column >= len(spec.matches) or spec.matches[first_column] is None):
                row_name = row.cells[0][1]
                record.set("id", strip_footnote(row_name), locate(row.index, first_column))
            for column, text in row.cells:
                if column in spec.unit_columns:
                    continue
                match = spec.matches[column] if column < spec.width else None
                label = spec.labels[column] if column < spec.width else ""
                where = locate(row.index, column)
                if match is None:
                    if record.get("id") == strip_footnote(text) and column == first_column:
                        continue
                    self.unmapped.append({**where, "label": label or "(no header)",
                                          "value": text, "row": row_name})
                    continue
                unit_text = None
                for unit_column, value_column in spec.unit_columns.items():
                    if value_column == column and unit_column in cells:
                        unit_text = self.unit_of(cells[unit_column])
                result = cell_value(self.vocab, match, text, unit_text,
                                    spec.units[column], self.decimal_comma)
                if result is None:
                    self.unmapped.append({**where, "label": label, "value": text,
                                          "row": row_name,
                                          "reason": f"not a value for {match.path}"})
                    continue
                value, extra = result
                self.put(record, match.path, value, where, label)
                for path, extra_value in extra.items():
                    self.put(record, path, extra_value, where, label)
            self.apply_context(section, [record])
            self.apply_context(spec.context, [record])
            if record.locations:
                made.append(record)
                self.records.append(record)
        return made

    # ---- one machine per column

    def read_columns(self, above: _Row | None, rows: list[_Row], locate: Locate,
                     context: list[tuple[str, Any, dict[str, Any], str]]) -> list[GridRecord]:
        """Label rows: each value column is a machine; label columns side by side split the
        rows into groups (separate records when they repeat fields)."""
        label_columns = sorted({c for row in rows for c, t in row.cells
                                if self.label(t) is not None and not self.is_number(t)
                                and self._is_label_position(row, c)}
                               | {row.cells[0][0] for row in rows if len(row.cells) == 1})
        # a symbol column right of a label column is no second table
        label_columns = [c for k, c in enumerate(label_columns) if k == 0 or not all(
            self.is_symbol_or_unit(t) for row in rows for col, t in row.cells if col == c)]
        groups: list[list[tuple[_Row, list[tuple[int, str]]]]] = []
        bounds = [*label_columns, 10**9]
        for k in range(len(label_columns)):
            low, high = bounds[k], bounds[k + 1]
            part = []
            for row in rows:
                cells = [(c, t) for c, t in row.cells if low <= c < high]
                if cells:
                    part.append((row, cells))
            if part:
                groups.append(part)
        # groups that do not repeat each other's fields belong to one record
        merged: list[list[tuple[_Row, list[tuple[int, str]]]]] = []
        seen: list[set[str]] = []
        for part in groups:
            fields = {self.label(cells[0][1]).path for _row, cells in part
                      if self.label(cells[0][1]) is not None}
            if merged and not (fields & seen[-1]) and "id" not in fields:
                merged[-1].extend(part)
                seen[-1] |= fields
            else:
                merged.append(list(part))
                seen.append(fields)
        made: list[GridRecord] = []
        for part in merged:
            made.extend(self.read_label_group(above, part, locate, context))
        return made

    def _is_label_position(self, row: _Row, column: int) -> bool:
        """A label cell starts a label/value group: something after it that is a value."""
        position = next(i for i, (c, _t) in enumerate(row.cells) if c == column)
        if position == len(row.cells) - 1:
            return len(row.cells) == 1
        following = row.cells[position + 1][1]
        if position > 0 and self.label(row.cells[position - 1][1]) is not None and not \
                self.is_number(row.cells[position - 1][1]) and self.is_symbol_or_unit(
                    row.cells[position][1]):
            return False
        return not (self.label(following) is not None and not self.is_number(following)
                    and not self.is_symbol_or_unit(following)
                    and self.label(following).path not in ("machine.connection",
                                                           "machine.magnet"))

    def is_symbol_or_unit(self, text: str) -> bool:
        return self.is_unit(text) or _squash(text) in self.vocab.symbols

    def read_label_group(self, above: _Row | None,
                         part: list[tuple[_Row, list[tuple[int, str]]]], locate: Locate,
                         context: list[tuple[str, Any, dict[str, Any], str]]
                         ) -> list[GridRecord]:
        # value columns: columns right of the label holding values in any row
        value_columns: list[int] = []
        for _row, cells in part:
            _label_column, label_text = cells[0]
            if len(cells) == 1:
                continue
            for column, text in cells[1:]:
                if self.is_unit(text) or _squash(text) in self.vocab.symbols:
                    continue
                if column not in value_columns:
                    value_columns.append(column)
        value_columns.sort()
        names: dict[int, tuple[str, dict[str, Any]]] = {}
        if above is not None and value_columns:
            for column, text in above.cells:
                if column in value_columns and not self.is_heading(text) and (
                        len(value_columns) > 1  # one value column: a model name has digits
                        or (re.search(r"\d", text) and self.label(text) is None)):
                    names[column] = (text, locate(above.index, column))
        records = {column: GridRecord(from_columns=True) for column in value_columns}
        single = GridRecord(from_columns=True)
        for column, (text, where) in names.items():
            records[column].set("id", strip_footnote(text), where)
        for row, cells in part:
            label_column, label_text = cells[0]
            if len(cells) == 1:
                pair = self.split_label_value(label_text)
                if pair is None:
                    continue
                target = records[value_columns[0]] if len(value_columns) == 1 else single
                self.store(target, pair[0], pair[2], None, None,
                           locate(row.index, label_column), pair[1])
                continue
            match = self.label(label_text)
            if match is None:
                if not self.is_heading(label_text):
                    self.unmapped.append({**locate(row.index, label_column),
                                          "label": label_text,
                                          "value": " | ".join(t for _c, t in cells[1:])})
                continue
            unit_text = None
            for column, text in cells[1:]:
                if column not in value_columns and self.is_unit(text):
                    unit_text = self.unit_of(text)
            for column, text in cells[1:]:
                if column not in records:
                    continue
                self.store(records[column], match, text, unit_text, None,
                           locate(row.index, column), label_text)
        made = [records[c] for c in value_columns if records[c].locations]
        if single.locations:
            if made:
                for path, where in single.locations.items():
                    for record in made:
                        if record.get(path) is None:
                            record.set(path, single.get(path), where)
            else:
                made = [single]
        for record in made:
            self.apply_context(context, [record])
        self.records.extend(made)
        return made

    def store(self, record: GridRecord, match: LabelMatch, text: str, unit_text: str | None,
              column_unit: str | None, where: dict[str, Any], label: str) -> None:
        result = cell_value(self.vocab, match, text, unit_text, column_unit, self.decimal_comma)
        if result is None:
            self.unmapped.append({**where, "label": label, "value": text,
                                  "reason": f"not a value for {match.path}"})
            return
        value, extra = result
        self.put(record, match.path, value, where, label)
        for path, extra_value in extra.items():
            self.put(record, path, extra_value, where, label)

    def put(self, record: GridRecord, path: str, value: Any, where: dict[str, Any],
            label: str) -> None:
        """Set ``path`` unless it already holds another value (that one goes to unmapped)."""
        existing = record.get(path)
        if existing is not None:
            if existing != value:
                self.unmapped.append({**where, "label": label, "value": str(value),
                                      "reason": f"second value for {path}"})
            return
        if not record.set(path, value, where):
            self.unmapped.append({**where, "label": label, "value": str(value),
                                  "reason": f"conflicts with the structure of {path}"})

    # ---- common values

    def context_values(self, row: _Row, locate: Locate
                       ) -> list[tuple[str, Any, dict[str, Any], str]]:
        """Values stated once for a table: "Series NW-G, 400 V, 6 poles, 40 °C coolant".

        Read: pole count, voltage, frequency, coolant temperature (with a word saying so),
        altitude (likewise), IC code, duty type, IE class, insulation class. Other numbers
        in the text are listed as unmapped.
        """
        found: list[tuple[str, Any, dict[str, Any], str]] = []
        for column, text in row.cells:
            where = locate(row.index, column)
            spans: list[tuple[int, int]] = []
            for pattern, path in CONTEXT_PATTERNS:
                if path in BARE_UNIT_FIELDS and len(text) > MAX_TITLE_CHARS:
                    continue  # "fed by a 400 V converter" in prose is no rating
                for hit in pattern.finditer(text):
                    if any(a < hit.end() and hit.start() < b for a, b in spans):
                        continue
                    value = self.context_value(path, hit)
                    if value is None:
                        continue
                    spans.append((hit.start(), hit.end()))
                    found.append((path, value, where, hit.group(0)))
            rest = text
            for a, b in sorted(spans, reverse=True):
                rest = rest[:a] + " " + rest[b:]
            for fragment in re.split(r"[,;:]\s+|\s[–—|]\s", rest):
                fragment = fragment.strip(" .()")
                if re.search(r"\d", fragment) and len(fragment) <= 80:
                    self.unmapped.append({**where, "label": "(common to the table)",
                                          "value": fragment,
                                          "reason": "not read as a value of a field"})
        return found

    def context_value(self, path: str, hit: re.Match[str]) -> Any:
        if path in ("machine.poles",):
            return int(hit.group(1))
        if path in ("machine.cooling", "machine.duty", "efficiency_class",
                    "machine.thermal_class"):
            return self.vocab.attribute(path, hit.group(1))
        quantity = parse_quantity(hit.group(1), self.decimal_comma)
        if quantity is None or quantity.unit is None:
            return None
        return f"{quantity.number} {quantity.unit}"

    def apply_context(self, context: list[tuple[str, Any, dict[str, Any], str]],
                      records: list[GridRecord]) -> None:
        for path, value, where, _text in context:
            for record in records:
                if record.get(path) is None:
                    record.set(path, value, where)
                    record.context_paths.add(path)

    # ---- the end

    def finish(self, stem: str) -> list[GridRecord]:
        """Records of the whole file: label / value tables without a model name merged into
        the one before them, attribute-only tables (a maker above a catalogue) applied to
        every record, ids given to records that name no model."""
        merged: list[GridRecord] = []
        shared: list[GridRecord] = []
        for record in self.records:
            if record.from_columns and record.get("id") is None and not record.has_physical:
                shared.append(record)
                continue
            previous = merged[-1] if merged else None
            own = set(record.locations) - record.context_paths
            if (record.from_columns and previous is not None and previous.from_columns
                    and record.get("id") is None
                    and not own & (set(previous.locations) - previous.context_paths)):
                for path, where in record.locations.items():
                    if path in own or previous.get(path) is None:
                        if path in previous.context_paths and path in own:
                            previous.context_paths.discard(path)
                            _drop(previous.data, path)
                        previous.set(path, record.get(path), where)
                        if path not in own:
                            previous.context_paths.add(path)
                continue
            merged.append(record)
        for source in shared:
            if not merged:
                for path, where in source.locations.items():
                    self.unmapped.append({**where, "label": path, "value": str(source.get(path)),
                                          "reason": "no machine in the file to apply it to"})
            for record in merged:
                for path, where in source.locations.items():
                    if record.get(path) is None:
                        record.set(path, source.get(path), where)
        for number, record in enumerate(merged, start=1):
            if record.get("id") is None:
                record.data = {"id": f"{stem}#{number}", **record.data}
                self.notes.append(f"record {number} ({_where_text(record.origin)}) names no "
                                  f"model; its id is set to '{stem}#{number}'")
        return merged


def _drop(data: dict[str, Any], path: str) -> None:
    """Remove ``path`` from a nested record (a common value that a table states itself)."""
    parts = path.split(".")
    node: Any = data
    for part in parts[:-1]:
        node = node.get(part) if isinstance(node, dict) else None
    if isinstance(node, dict):
        node.pop(parts[-1], None)


def _where_text(location: dict[str, Any]) -> str:
    if "page" in location:
        return f"page {location['page']}"
    if "sheet" in location:
        return f"sheet {location['sheet']} cell {location.get('cell', '')}"
    return f"cell {location.get('cell', '')}"
