"""Hostile files: each is refused with a PdfError naming the file and the fault, quickly."""

from __future__ import annotations

import time
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from sheetlint.intake.pdf import PdfError, PdfExtraction, extract_pdf

FIXTURES = Path(__file__).resolve().parent.parent / "fixtures" / "pdf"
QUICK_S = 15.0  # a hang detector, not a timing budget: a refusal takes well under a second
# on an idle machine; the bound is generous so a busy machine does not fail it


def hand_made_pdf(pages: int, media_box: tuple[float, float, float, float] = (0, 0, 595, 842),
                  text: str = "Rated power 75 kW") -> bytes:
    """A minimal valid PDF written byte by byte: ``pages`` pages sharing one content stream."""
    stream = f"BT /F1 12 Tf 72 720 Td ({text}) Tj ET".encode()
    first_page = 5
    kids = " ".join(f"{first_page + i} 0 R" for i in range(pages))
    box = " ".join(f"{v:.0f}" for v in media_box)
    objects = [
        b"<< /Type /Catalog /Pages 2 0 R >>",
        f"<< /Type /Pages /Kids [{kids}] /Count {pages} >>".encode(),
        b"<< /Type /Font /Subtype /Type1 /BaseFont /Helvetica >>",
        b"<< /Length " + str(len(stream)).encode() + b" >>\nstream\n" + stream
        + b"\nendstream",
    ]
    page = (f"<< /Type /Page /Parent 2 0 R /MediaBox [{box}] /Resources << /Font << /F1 3 0 R"
            " >> >> /Contents 4 0 R >>").encode()
    objects += [page] * pages
    out = bytearray(b"%PDF-1.4\n")
    offsets = []
    for number, body in enumerate(objects, start=1):
        offsets.append(len(out))
        out += f"{number} 0 obj\n".encode() + body + b"\nendobj\n"
    xref = len(out)
    out += f"xref\n0 {len(objects) + 1}\n0000000000 65535 f \n".encode()
    out += b"".join(f"{o:010d} 00000 n \n".encode() for o in offsets)
    out += (f"trailer\n<< /Size {len(objects) + 1} /Root 1 0 R >>\nstartxref\n{xref}\n%%EOF\n"
            .encode())
    return bytes(out)


def refused(path: Path, **limits: float) -> str:
    """Run extraction expecting a PdfError; return its message; assert it came quickly."""
    started = time.perf_counter()
    with pytest.raises(PdfError) as caught:
        extract_pdf(path, **limits)
    assert time.perf_counter() - started < QUICK_S
    message = str(caught.value)
    assert str(path) in message
    return message


def test_hand_made_pdf_is_readable(tmp_path: Path) -> None:
    """Guard for the helper: the unmodified hand-made file is accepted."""
    path = tmp_path / "ok.pdf"
    path.write_bytes(hand_made_pdf(2))
    extraction = extract_pdf(path)
    assert extraction.pages == 2


def test_zero_bytes(tmp_path: Path) -> None:
    path = tmp_path / "empty.pdf"
    path.write_bytes(b"")
    assert "is empty (0 bytes)" in refused(path)


def test_not_a_pdf(tmp_path: Path) -> None:
    path = tmp_path / "sheet.pdf"
    path.write_text("Rated power;75 kW\nRated speed;1500 rpm\n", encoding="utf-8")
    assert "is not a PDF (no %PDF- header" in refused(path)


def test_missing_file_and_directory(tmp_path: Path) -> None:
    assert "no such file" in refused(tmp_path / "absent.pdf")
    assert "is a directory" in refused(tmp_path)


def test_truncated(tmp_path: Path) -> None:
    whole = (FIXTURES / "pump_motor_en.pdf").read_bytes()
    path = tmp_path / "cut.pdf"
    path.write_bytes(whole[: len(whole) // 2])
    assert "truncated or damaged (no %%EOF" in refused(path)


def test_damaged_body_with_valid_ends(tmp_path: Path) -> None:
    path = tmp_path / "garbage.pdf"
    path.write_bytes(b"%PDF-1.7\n" + bytes(range(256)) * 40 + b"\n%%EOF\n")
    message = refused(path)
    assert "damaged or not a PDF" in message or "cannot be read as a PDF" in message


def test_encrypted_with_user_password(tmp_path: Path) -> None:
    fpdf = pytest.importorskip("fpdf")
    pdf = fpdf.FPDF()
    pdf.add_page()
    pdf.set_font("Helvetica", size=10)
    pdf.cell(text="Rated power 75 kW")
    pdf.set_encryption(owner_password="owner-secret", user_password="user-secret")
    path = tmp_path / "locked.pdf"
    pdf.output(str(path))
    assert "is encrypted; a password is needed" in refused(path)


def test_encrypted_with_owner_password_only_is_read(tmp_path: Path) -> None:
    """Restrictions without a user password do not stop reading (common practice for
    vendor sheets that forbid editing)."""
    fpdf = pytest.importorskip("fpdf")
    pdf = fpdf.FPDF()
    pdf.add_page()
    pdf.set_font("Helvetica", size=10)
    pdf.cell(w=60, text="Rated power")
    pdf.cell(w=30, text="75 kW")
    pdf.set_encryption(owner_password="owner-secret")
    path = tmp_path / "restricted.pdf"
    pdf.output(str(path))
    extraction = extract_pdf(path)
    assert extraction.records[0].data["rated"]["power"] == "75 kW"


def test_thousands_of_pages(tmp_path: Path) -> None:
    path = tmp_path / "long.pdf"
    path.write_bytes(hand_made_pdf(5000))
    assert "has 5000 pages, more than the limit of 500" in refused(path)


def test_page_count_limit_is_configurable(tmp_path: Path) -> None:
    path = tmp_path / "three.pdf"
    path.write_bytes(hand_made_pdf(3))
    assert "has 3 pages, more than the limit of 2" in refused(path, max_pages=2)


def test_huge_page(tmp_path: Path) -> None:
    path = tmp_path / "huge.pdf"
    path.write_bytes(hand_made_pdf(1, media_box=(0, 0, 1_000_000, 1_000_000)))
    assert "page 1 is 1,000,000 x 1,000,000 pt, larger than the PDF limit" in refused(path)


def test_file_larger_than_the_byte_limit(tmp_path: Path) -> None:
    path = tmp_path / "big.pdf"
    path.write_bytes(hand_made_pdf(20))
    assert "more than the limit of 1,000 bytes" in refused(path, max_bytes=1000)


def test_time_limit_is_enforced_between_pages(tmp_path: Path) -> None:
    path = tmp_path / "slow.pdf"
    path.write_bytes(hand_made_pdf(3))
    assert "time limit of 0 s after 0 of 3 pages" in refused(path, time_limit=0.0)


def test_image_only(tmp_path: Path) -> None:
    assert "no text layer on any of its 1 pages" in refused(FIXTURES / "image_only.pdf")


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(st.tuples(st.integers(0, 10**6), st.integers(0, 255)), min_size=1,
                max_size=12))
def test_corrupted_bytes_never_raise_anything_but_pdf_error(tmp_path_factory: pytest.
                                                            TempPathFactory,
                                                            edits: list[tuple[int, int]]
                                                            ) -> None:
    data = bytearray((FIXTURES / "pump_two_tables.pdf").read_bytes())
    for position, byte in edits:
        data[position % len(data)] = byte
    path = tmp_path_factory.mktemp("fuzz") / "mutated.pdf"
    path.write_bytes(bytes(data))
    started = time.perf_counter()
    try:
        result = extract_pdf(path, time_limit=5.0)
    except PdfError as error:
        assert str(path) in str(error)
    else:
        assert isinstance(result, PdfExtraction)
    assert time.perf_counter() - started < 10.0
