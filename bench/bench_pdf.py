"""PDF extraction speed against pdfplumber itself, in one run (DESIGN.md budget: >= 0.7x).

The reference is what pdfplumber does on its own for the same pages: ``extract_tables()``
and ``extract_words()`` on every page. sheetlint's extraction (``extract_pdf``: words,
ruling lines, grids, records) runs on the same files; the ratio is sheetlint's pages per
second over pdfplumber's. Documents: a catalogue of PAGES pages (ten machines a page, with
a header of names and units) and the layout corpus (``tools/make_layout_corpus.py``, a
booklet of 40 pages among them). Runs alternate and the best of REPEATS is kept, since the
machine is shared. Prints figures; asserts nothing.

    python bench/bench_pdf.py [PAGES] [REPEATS]
"""

from __future__ import annotations

import importlib.util
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from sheetlint.intake.pdf import (  # noqa: E402
    _plain_number,
    extract_pdf,
    parse_quantity,
    strip_footnote,
)


def load_tool(name: str) -> Any:
    spec = importlib.util.spec_from_file_location(name, ROOT / "tools" / f"{name}.py")
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module
    spec.loader.exec_module(module)
    return module


def pdfplumber_alone(path: Path) -> int:
    """Tables and words of every page, as pdfplumber gives them; returns the page count."""
    import pdfplumber

    with pdfplumber.open(path) as pdf:
        for page in pdf.pages:
            page.extract_tables()
            page.extract_words()
            page.close()
        return len(pdf.pages)


def sheetlint_extract(path: Path) -> int:
    for cached in (parse_quantity, strip_footnote, _plain_number):
        cached.cache_clear()  # every document starts cold: no help from the run before
    return extract_pdf(path).pages


def best_time(function: Callable[[Path], int], files: list[Path]) -> tuple[float, int]:
    started = time.perf_counter()
    pages = sum(function(path) for path in files)
    return time.perf_counter() - started, pages


def main(pages: int, repeats: int) -> None:
    fixtures = load_tool("make_pdf_fixtures")
    corpus = load_tool("make_layout_corpus")
    with tempfile.TemporaryDirectory() as folder:
        catalogue = Path(folder) / "catalogue.pdf"
        fixtures.build_catalogue_pages(catalogue, pages)
        corpus.build(Path(folder) / "corpus", booklet_pages=40)
        sets = {"catalogue": [catalogue],
                "layout corpus": sorted((Path(folder) / "corpus").glob("*.pdf"))}
        for name, files in sets.items():
            ours, theirs = [], []
            count = 0
            for _ in range(repeats):  # alternate, so that load on the machine hits both
                elapsed, count = best_time(pdfplumber_alone, files)
                theirs.append(elapsed)
                elapsed, count = best_time(sheetlint_extract, files)
                ours.append(elapsed)
            ours_rate, theirs_rate = count / min(ours), count / min(theirs)
            print(f"{name}: {len(files)} file(s), {count} pages")
            print(f"  pdfplumber tables+words: {theirs_rate:6.1f} pages/s (best of {repeats}, "
                  f"median {count / sorted(theirs)[len(theirs) // 2]:.1f})")
            print(f"  sheetlint extract_pdf:   {ours_rate:6.1f} pages/s (best of {repeats}, "
                  f"median {count / sorted(ours)[len(ours) // 2]:.1f})")
            print(f"  ratio sheetlint / pdfplumber: {ours_rate / theirs_rate:.2f} "
                  "(budget >= 0.70; timings on a shared machine drift)")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 30,
         int(sys.argv[2]) if len(sys.argv) > 2 else 3)
