"""The compare HTML page: one self-contained page, offers in columns, statuses shaded and
worded, three inline SVG plots; rendered in a real headless browser when one is installed.

The browser test needs Debian's ``chromium`` (``apt-get install -y chromium``) and is skipped
cleanly without it. These are structural checks; the statuses themselves are checked by hand
in test_compare_tender.py.
"""

from __future__ import annotations

import shutil
import struct
import subprocess
import zlib
from html.parser import HTMLParser
from pathlib import Path

import pytest

from sheetlint.compare.html import render_html
from sheetlint.compare.offers import compare_offers
from sheetlint.compare.requirement import read_requirement

TENDER = Path(__file__).resolve().parent.parent / "fixtures" / "tender"
OFFERS = sorted(str(p) for p in TENDER.glob("offer-*.yaml"))


@pytest.fixture(scope="module")
def page() -> str:
    requirement = read_requirement(str(TENDER / "raw-water-pump.requirement"))
    return render_html(compare_offers(OFFERS, requirement))


class _Tags(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.tags: list[tuple[str, dict[str, str | None]]] = []

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        self.tags.append((tag, dict(attrs)))


def test_page_is_self_contained_with_three_plots_and_cautions(page):
    parser = _Tags()
    parser.feed(page)
    names = [t for t, _ in parser.tags]
    assert names.count("svg") == 3
    assert "script" not in names and "img" not in names and "link" not in names
    # no address outside the page except the SVG namespace name
    assert page.replace('xmlns="http://www.w3.org/2000/svg"', "").count("http") == 0
    assert "not an approval" in page and "local codes and licensed practice" in page


def test_every_status_is_worded_as_well_as_shaded(page):
    parser = _Tags()
    parser.feed(page)
    classes = [a.get("class") for t, a in parser.tags if t == "td"]
    assert {"met", "notmet", "unknown"} <= set(classes)
    assert page.count("NOT MET") >= classes.count("notmet")
    # offers in columns: a header cell per offer
    assert page.count("<th>1. ") == 1 and page.count("<th>4. ") == 1


def _png_size_and_variety(path: Path) -> tuple[int, int, int]:
    """Width, height and number of distinct byte values of a PNG's image data."""
    data = path.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    width, height = struct.unpack(">II", data[16:24])
    offset, idat = 8, b""
    while offset < len(data):
        length = struct.unpack(">I", data[offset:offset + 4])[0]
        kind = data[offset + 4:offset + 8]
        if kind == b"IDAT":
            idat += data[offset + 8:offset + 8 + length]
        offset += 12 + length
    return width, height, len(set(zlib.decompress(idat)))


@pytest.mark.skipif(shutil.which("chromium") is None,
                    reason="needs Debian chromium: apt-get install -y chromium")
def test_page_renders_in_headless_chromium(tmp_path, page):
    html_file = tmp_path / "tender.html"
    html_file.write_text(page, encoding="utf-8")
    shot = tmp_path / "tender.png"
    completed = subprocess.run(
        ["chromium", "--headless", "--no-sandbox", "--disable-gpu",
         f"--screenshot={shot}", "--window-size=1200,2200", html_file.as_uri()],
        capture_output=True, timeout=120, check=False)
    assert completed.returncode == 0, completed.stderr[-500:]
    width, height, variety = _png_size_and_variety(shot)
    assert (width, height) == (1200, 2200)
    assert variety > 50  # text, shaded cells and plots, not a blank page


def _relative_luminance(colour: str) -> float:
    """WCAG 2.1 relative luminance of an sRGB colour '#rrggbb' (W3C, Web Content
    Accessibility Guidelines 2.1, definition of relative luminance)."""
    channels = []
    for i in (1, 3, 5):
        c = int(colour[i:i + 2], 16) / 255
        channels.append(c / 12.92 if c <= 0.03928 else ((c + 0.055) / 1.055) ** 2.4)
    r, g, b = channels
    return 0.2126 * r + 0.7152 * g + 0.0722 * b


def _contrast(a: str, b: str) -> float:
    """WCAG 2.1 contrast ratio (L1 + 0.05)/(L2 + 0.05)."""
    la, lb = sorted((_relative_luminance(a), _relative_luminance(b)), reverse=True)
    return (la + 0.05) / (lb + 0.05)


def test_status_palette_reads_in_grey_print_wcag_contrast(page):
    from sheetlint.compare.html import STATUS_COLOURS

    for status, (background, text) in STATUS_COLOURS.items():
        # WCAG 2.1 success criterion 1.4.3: at least 4.5:1 for normal text
        assert _contrast(background, text) >= 4.5, status
        assert background in page and text in page
    # in grey the three backgrounds stay apart: luminance steps of at least 1.3:1 between
    # neighbours (our own threshold; the status word is in every cell as well)
    met, unknown, not_met = (STATUS_COLOURS[s][0] for s in ("met", "unknown", "not_met"))
    assert _contrast(met, unknown) >= 1.3 and _contrast(unknown, not_met) >= 3.0
