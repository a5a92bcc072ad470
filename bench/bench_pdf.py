"""Throughput of PDF extraction in text pages per second (budget: at least 5 pages/s).

Builds a catalogue of PAGES pages (two-line header and ten machines per page) with the
fixture generator into a temporary directory and times ``extract_pdf`` on it. Prints
figures; asserts nothing.

    python bench/bench_pdf.py [PAGES]
"""

from __future__ import annotations

import importlib.util
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from sheetlint.intake.pdf import extract_pdf  # noqa: E402


def load_generator():  # type: ignore[no-untyped-def]
    spec = importlib.util.spec_from_file_location("make_pdf_fixtures",
                                                  ROOT / "tools" / "make_pdf_fixtures.py")
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module
    spec.loader.exec_module(module)
    return module


def main(pages: int) -> None:
    generator = load_generator()
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "catalogue.pdf"
        generator.build_catalogue_pages(path, pages)
        runs = []
        for _ in range(3):
            started = time.perf_counter()
            extraction = extract_pdf(path)
            runs.append(time.perf_counter() - started)
    best = min(runs)
    print(f"pages: {extraction.pages}, records: {len(extraction.records)}, "
          f"unmapped: {len(extraction.unmapped)}")
    print(f"extraction: best {best:.2f} s of 3 runs -> {extraction.pages / best:.1f} pages/s "
          f"(median {sorted(runs)[1]:.2f} s; budget >= 5 pages/s)")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 50)
