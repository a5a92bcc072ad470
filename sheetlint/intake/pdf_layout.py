"""Page geometry for the PDF extractor: words -> text lines -> cells -> table columns.

Tables with and without ruling lines are read the same way. Words (from pdfplumber, with
positions in PDF points) are grouped into lines by their vertical position; a line is cut
into cells where two words are further apart than a column gap or a vertical ruling line
runs between them. Catalogue columns are found from the data rows themselves: cell extents
that overlap from row to row belong to one column, which survives right-aligned numbers of
different widths and header text wider than the data below it.
"""

from __future__ import annotations

import itertools
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from typing import Any

#: a gap wider than this many font heights between two words starts a new cell
COLUMN_GAP_EM = 0.75
#: ... but never less than this many points
MIN_COLUMN_GAP_PT = 5.5


@dataclass(slots=True)
class Cell:
    """Words of one table cell: text and horizontal extent in points."""

    text: str
    x0: float
    x1: float
    words: list[tuple[str, float, float]] = field(default_factory=list)

    @property
    def center(self) -> float:
        return (self.x0 + self.x1) / 2


@dataclass(slots=True)
class Line:
    """One text line of a page: its vertical extent and its cells, left to right."""

    top: float
    bottom: float
    cells: list[Cell] = field(default_factory=list)

    @property
    def text(self) -> str:
        return " | ".join(cell.text for cell in self.cells)

    @property
    def height(self) -> float:
        return self.bottom - self.top


def group_lines(words: Iterable[dict[str, Any]], vertical_rules: Sequence[tuple[float, float,
                                                                                 float]] = ()
                ) -> list[Line]:
    """Cluster ``words`` into lines by vertical overlap, then cut each line into cells.

    ``vertical_rules`` are ruling lines as ``(x, top, bottom)``; a rule between two words of
    a line always separates cells.
    """
    ordered = sorted(words, key=lambda w: (round(w["top"], 1), w["x0"]))
    rows: list[list[dict[str, Any]]] = []
    row_top = row_bottom = 0.0
    for word in ordered:
        middle = (word["top"] + word["bottom"]) / 2
        if rows and row_top - 0.5 <= middle <= row_bottom + 0.5:
            rows[-1].append(word)
            row_top = min(row_top, word["top"])
            row_bottom = max(row_bottom, word["bottom"])
        else:
            rows.append([word])
            row_top, row_bottom = word["top"], word["bottom"]
    return [_cut_cells(row, vertical_rules) for row in rows]


def _cut_cells(row: list[dict[str, Any]], vertical_rules: Sequence[tuple[float, float, float]]
               ) -> Line:
    row.sort(key=lambda w: w["x0"])
    top = min(w["top"] for w in row)
    bottom = max(w["bottom"] for w in row)
    middle = (top + bottom) / 2
    rules = [x for x, r_top, r_bottom in vertical_rules if r_top <= middle <= r_bottom]
    line = Line(top, bottom)
    current: list[dict[str, Any]] = []
    for word in row:
        if current:
            previous = current[-1]
            gap = word["x0"] - previous["x1"]
            height = max(previous["bottom"] - previous["top"], 1.0)
            ruled = any(previous["x1"] - 0.5 <= x <= word["x0"] + 0.5 for x in rules)
            if ruled or gap > max(MIN_COLUMN_GAP_PT, COLUMN_GAP_EM * height):
                line.cells.append(_cell(current))
                current = []
        current.append(word)
    if current:
        line.cells.append(_cell(current))
    return line


def _cell(words: list[dict[str, Any]]) -> Cell:
    return Cell(" ".join(w["text"] for w in words), words[0]["x0"], words[-1]["x1"],
                [(w["text"], w["x0"], w["x1"]) for w in words])


def vertical_rules(page: Any) -> list[tuple[float, float, float]]:
    """Vertical ruling lines of a pdfplumber page as ``(x, top, bottom)`` (rect sides too)."""
    rules = []
    for edge in page.edges:
        if edge.get("orientation") == "v" and edge["bottom"] - edge["top"] > 4:
            rules.append((edge["x0"], edge["top"], edge["bottom"]))
    return rules


@dataclass(slots=True)
class Column:
    """A catalogue column: its extent and the header text above it."""

    x0: float
    x1: float
    header: list[str] = field(default_factory=list)


def find_columns(rows: Sequence[Line]) -> list[Column]:
    """Columns of a block of data rows: cell extents merged where they overlap."""
    spans = sorted((cell.x0, cell.x1) for row in rows for cell in row.cells)
    columns: list[Column] = []
    for x0, x1 in spans:
        if columns and x0 <= columns[-1].x1 + 0.5:
            columns[-1].x1 = max(columns[-1].x1, x1)
        else:
            columns.append(Column(x0, x1))
    return columns


def best_column(cell: Cell, columns: Sequence[Column]) -> int:
    """Index of the column that overlaps ``cell`` most; the nearest one if none overlaps."""
    best, best_overlap = -1, 0.0
    for index, column in enumerate(columns):
        overlap = min(cell.x1, column.x1) - max(cell.x0, column.x0)
        if overlap > best_overlap:
            best, best_overlap = index, overlap
    if best >= 0:
        return best
    return min(range(len(columns)),
               key=lambda i: max(columns[i].x0 - cell.center, cell.center - columns[i].x1))


def split_at_gutters(cell: Cell, columns: Sequence[Column]) -> list[Cell]:
    """Cut a header cell that spans several data columns at the widest word gap in each
    gutter between them ("Efficiency Ke L-L rms" over two columns -> two cells)."""
    covered = [i for i, c in enumerate(columns) if min(cell.x1, c.x1) > max(cell.x0, c.x0)]
    if len(covered) < 2 or len(cell.words) < 2:
        return [cell]
    if len(covered) <= len(cell.words) <= 12 and len(covered) <= 6:
        return _pieces(cell, _cuts_by_alignment(cell, [columns[i] for i in covered]))
    cuts: list[int] = []
    for left, right in itertools.pairwise(covered):
        gutter0, gutter1 = columns[left].x1, columns[right].x0
        best, best_gap = -1, 0.0
        for k in range(len(cell.words) - 1):
            gap0, gap1 = cell.words[k][2], cell.words[k + 1][1]
            if gap1 >= gutter0 and gap0 <= gutter1 and gap1 - gap0 > best_gap:
                best, best_gap = k + 1, gap1 - gap0
        if best > 0 and best not in cuts:
            cuts.append(best)
    return _pieces(cell, sorted(cuts))


def _cuts_by_alignment(cell: Cell, columns: Sequence[Column]) -> list[int]:
    """Cut positions that give each column a piece lined up with it: the least sum over
    pieces of the distance from the piece to its column (left edges, right edges or
    centres, whichever fits, since headers are aligned like their columns or not)."""
    words = cell.words
    best: tuple[float, tuple[int, ...]] | None = None
    for cuts in itertools.combinations(range(1, len(words)), len(columns) - 1):
        bounds = (0, *cuts, len(words))
        cost = 0.0
        for k, column in enumerate(columns):
            x0, x1 = words[bounds[k]][1], words[bounds[k + 1] - 1][2]
            cost += min(abs(x0 - column.x0), abs(x1 - column.x1),
                        abs((x0 + x1) / 2 - (column.x0 + column.x1) / 2))
            if x0 >= column.x1 + 2 or x1 <= column.x0 - 2:  # a piece wholly beside it
                cost += 1000.0
        if best is None or cost < best[0]:
            best = (cost, cuts)
    return list(best[1]) if best else []


def _pieces(cell: Cell, cuts: list[int]) -> list[Cell]:
    pieces: list[Cell] = []
    start = 0
    for cut in [*cuts, len(cell.words)]:
        chunk = cell.words[start:cut]
        if chunk:
            pieces.append(Cell(" ".join(w[0] for w in chunk), chunk[0][1], chunk[-1][2],
                               list(chunk)))
        start = cut
    return pieces
