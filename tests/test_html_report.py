"""``sheetlint report``: one self-contained HTML file with findings, provenance and plots."""

from __future__ import annotations

import math
import re
from pathlib import Path

import pytest

from sheetlint.batch import check_file
from sheetlint.cli import main
from sheetlint.report import html as html_report
from tests.conftest import pmx15

RPM = 2.0 * math.pi / 60.0

#: spm with a DC link and a maximum speed (both plots have what they need)
SPM = pmx15() + """\
limits: {max_speed: "3000 rpm", peak_torque: "190 N*m"}
supply: {dc_link_voltage: "565 V"}
points:
  - {speed: "2500 rpm", torque: "50 N*m"}
"""
#: ipm with dq parameters: the envelope comes from the dq model
IPM = """\
id: "Invented IPX-30"
machine: {topology: ipm, poles: 8}
rated:
  power: "30 kW"
  torque: "143 N*m"
  speed: "2000 rpm"
  voltage: "380 V"
  current: "55 A"
emf: {constant: "150 V/krpm"}
circuit: {resistance: "0.08 ohm", ld: "2.0 mH", lq: "4.5 mH"}
limits: {max_speed: "5000 rpm", peak_current: "110 A"}
supply: {dc_link_voltage: "650 V"}
"""
HOSTILE_ID = '<script>alert("x")</script> & Co'


@pytest.fixture(autouse=True)
def _in_tmp(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)


def _report(tmp_path: Path, capsys: pytest.CaptureFixture[str], *names: str) -> tuple[int, str]:
    status = main(["report", "--no-settings", *names, "-o", "report.html"])
    capsys.readouterr()
    return status, (tmp_path / "report.html").read_text(encoding="utf-8")


def _sheet(tmp_path: Path, text: str):
    (tmp_path / "one.yaml").write_text(text, encoding="utf-8")
    record = check_file("one.yaml").records[0]
    assert record.error is None and record.sheet is not None
    return record.sheet


def test_report_is_self_contained_without_network_or_script(tmp_path: Path,
                                                            capsys: pytest.CaptureFixture[str]):
    (tmp_path / "spm.yaml").write_text(SPM, encoding="utf-8")
    (tmp_path / "ipm.yaml").write_text(IPM, encoding="utf-8")
    _, page = _report(tmp_path, capsys, "spm.yaml", "ipm.yaml")
    assert page.startswith("<!DOCTYPE html>")
    assert page.rstrip().endswith("</html>")
    lowered = page.lower()
    for forbidden in ("<script", "<link", "<img", "<iframe", "@import", "url(", " src="):
        assert forbidden not in lowered, forbidden
    # the only URL is the SVG namespace name, which is never fetched
    assert set(re.findall(r"https?://[^\s\"'<>]+", page)) <= {"http://www.w3.org/2000/svg"}
    assert page.count("<svg") == 4  # two plots per machine
    assert "<style>" in page


def test_cautions_of_the_design_appear_at_top_and_foot(tmp_path: Path,
                                                       capsys: pytest.CaptureFixture[str]):
    (tmp_path / "spm.yaml").write_text(SPM, encoding="utf-8")
    _, page = _report(tmp_path, capsys, "spm.yaml")
    for text in html_report.CAUTIONS:
        assert page.count(text) == 2
    assert "confirmed with the manufacturer" in page
    assert "local codes and licensed practice" in page
    assert "even with the converter off" in page


def test_strings_from_the_data_are_escaped(tmp_path: Path, capsys: pytest.CaptureFixture[str]):
    (tmp_path / "x.yaml").write_text(SPM.replace('"Invented PMX-15"', repr(HOSTILE_ID)),
                                     encoding="utf-8")
    _, page = _report(tmp_path, capsys, "x.yaml")
    assert HOSTILE_ID not in page
    assert "&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; Co" in page
    assert "<script" not in page.lower()


def test_findings_derived_values_and_provenance_are_listed(tmp_path: Path,
                                                           capsys: pytest.CaptureFixture[str]):
    planted = SPM.replace('"95.5 N*m"', '"110 N*m"')  # P = T*omega fails by 15 %
    (tmp_path / "p.yaml").write_text(planted, encoding="utf-8")
    status, page = _report(tmp_path, capsys, "p.yaml")
    assert status == 1  # same exit contract as check
    row = next(r for r in page.split("<tr") if "power-torque-speed" in r)
    assert "sev-error" in row and "p.yaml:5" in row
    assert "110 N·m" in row  # one spelling of the unit in the report
    # derived pole pairs from the pole count, with the rule and the input named
    derived = next(r for r in page.split("<tr") if "<code>machine.pole_pairs</code>" in r)
    assert "pole-count" in derived and "machine.poles" in derived
    assert "Values on the sheet" in page and "rated.power" in page


def test_unreadable_file_gets_its_own_section_and_exit_2(tmp_path: Path,
                                                         capsys: pytest.CaptureFixture[str]):
    (tmp_path / "spm.yaml").write_text(SPM, encoding="utf-8")
    (tmp_path / "bad.yaml").write_text("id: [oops\n", encoding="utf-8")
    status, page = _report(tmp_path, capsys, "spm.yaml", "bad.yaml")
    assert status == 2
    assert 'class="file-error"' in page and "bad.yaml" in page
    assert page.count('class="record"') == 1


def test_back_emf_plot_uses_ke_times_omega_and_dc_link_over_sqrt2(tmp_path: Path):
    # E_LL,rms = Ke*omega (definition of Ke, DESIGN.md); the largest line rms fundamental of
    # space-vector modulation is U_dc/sqrt(2) (power-electronics texts; common practice)
    plot = html_report.emf_plot(_sheet(tmp_path, SPM))
    assert plot is not None
    given = next(s for s in plot.series if "as on the sheet" in s.label)
    ke_si = 240.0 / (1000.0 * RPM)  # 240 V/krpm in V*s/rad
    assert given.ys[-1] / (given.xs[-1] * RPM) == pytest.approx(ke_si, rel=1e-9)
    assert "240 V/krpm" in given.label
    horizontal = {r.label: r.value for r in plot.references if r.axis == "y"}
    assert horizontal["rated voltage 400 V"] == pytest.approx(400.0)
    running = next(v for k, v in horizontal.items() if k.startswith("converter voltage limit"))
    assert running == pytest.approx(565.0 / math.sqrt(2.0), rel=1e-9)
    stopped = next(v for k, v in horizontal.items() if k.startswith("DC link of a stopped"))
    assert stopped == pytest.approx(565.0 / math.sqrt(2.0), rel=1e-9)
    vertical = {r.label: r.value for r in plot.references if r.axis == "x"}
    assert vertical["maximum speed 3000 r/min"] == pytest.approx(3000.0)
    assert [(m.x, m.y) for m in plot.markers] == [(pytest.approx(1500.0), pytest.approx(400.0))]


FIXTURES = Path(__file__).resolve().parent.parent / "fixtures"


@pytest.mark.parametrize("fixture", ["planted-emf-above-voltage.yaml",
                                     "consistent-spm-160k-raw-water-pump.yaml"])
def test_dc_link_and_crossing_speed_in_the_plot_are_those_of_the_overspeed_finding(
        fixture: str):
    # mains supply: the overspeed check takes the no-load DC link √2·U_mains (what a stopped
    # converter's capacitors hold); the plot must draw that limit and that crossing speed,
    # not a limit of its own (earlier it drew 1.35·U_mains/√2 and crossed elsewhere)
    record = check_file(str(FIXTURES / fixture)).records[0]
    assert record.sheet is not None
    finding = next(f for f in record.findings if f.rule == "overspeed-emf")
    reported = re.search(r"(?:reaches|reach) the DC link at (\d+) r/min", finding.message)
    dc_link = re.search(r"DC link (\d+) V", finding.message)
    assert reported and dc_link
    plot = html_report.emf_plot(record.sheet)
    assert plot is not None
    crossing = next(r for r in plot.references if r.axis == "x" and r.role == "dc-link")
    assert crossing.value == pytest.approx(float(reported.group(1)), abs=1.0)
    stopped = next(r for r in plot.references if r.axis == "y" and r.role == "dc-link")
    assert stopped.value * math.sqrt(2.0) == pytest.approx(float(dc_link.group(1)), abs=1.0)
    cold = next(s for s in plot.series if s.role == "cold")
    # the cold line meets the DC-link line at the crossing speed: E = Ke·ω = U_dc/√2
    ke = cold.ys[-1] / (cold.xs[-1] * RPM)
    assert ke * crossing.value * RPM == pytest.approx(stopped.value, rel=1e-9)


def test_simple_envelope_is_constant_power_above_rated_speed(tmp_path: Path):
    # P = T*omega (SI definition): above rated speed T*n stays T_rated*n_rated
    plot = html_report.envelope_plot(_sheet(tmp_path, SPM))
    assert plot is not None
    rated = next(s for s in plot.series if "rated torque" in s.label)
    for n, t in zip(rated.xs, rated.ys, strict=True):
        if n <= 1500.0:
            assert t == pytest.approx(95.5)
        else:
            assert t * n == pytest.approx(95.5 * 1500.0, rel=1e-9)
    assert any("peak torque" in s.label for s in plot.series)
    labels = [m.label for m in plot.markers]
    assert labels[0].startswith("rated point 1500 r/min")
    assert any(label.startswith("points[0]: 2500 r/min") for label in labels)
    # the speed where the back-EMF reaches U_dc/sqrt(2): n0 = U/Ke
    n0 = (565.0 / math.sqrt(2.0)) / (240.0 / 1000.0)
    voltage = next(r for r in plot.references if "voltage limit" in r.label)
    assert voltage.axis == "x" and voltage.value == pytest.approx(n0, rel=1e-9)


def test_ipm_envelope_comes_from_the_dq_model(tmp_path: Path):
    plot = html_report.envelope_plot(_sheet(tmp_path, IPM))
    assert plot is not None
    labels = [s.label for s in plot.series]
    assert any("machine-model envelope at the rated current 55 A" in x for x in labels)
    assert any("machine-model envelope at the peak current 110 A" in x for x in labels)
    rated, peak = plot.series
    # more current never gives less torque at the same speed (the envelope is a maximum)
    assert all(p >= r - 1e-9 for r, p in zip(rated.ys, peak.ys, strict=False))
    assert max(rated.xs) == pytest.approx(5000.0, rel=1e-6)


def test_sheet_without_plot_values_says_why(tmp_path: Path, capsys: pytest.CaptureFixture[str]):
    (tmp_path / "bare.yaml").write_text('id: "Invented Bare"\nrated: {power: "5 kW"}\n',
                                        encoding="utf-8")
    _, page = _report(tmp_path, capsys, "bare.yaml")
    assert "<svg" not in page
    assert "torque-speed plot not drawn" in page and "back-EMF plot not drawn" in page


@pytest.mark.parametrize(("span", "step"), [(1000.0, 200.0), (7.3, 2.0), (0.042, 0.01),
                                            (150.0, 50.0)])
def test_axis_ticks_are_1_2_5_steps(span: float, step: float):
    assert html_report.nice_step(span) == pytest.approx(step)


# --- what a reader of the report needs: when, by what, from which files; one key for plots ------
def test_report_names_its_date_tool_version_and_inputs(tmp_path: Path,
                                                       capsys: pytest.CaptureFixture[str]):
    from datetime import UTC, datetime

    from sheetlint import __version__

    (tmp_path / "spm.yaml").write_text(SPM, encoding="utf-8")
    (tmp_path / "package.json").write_text('{"name": "site"}', encoding="utf-8")
    results = [check_file("spm.yaml"), check_file("package.json")]
    page = html_report.render(results, generated=datetime(2026, 3, 1, 9, 30, tzinfo=UTC))
    assert "Written 2026-03-01 09:30 UTC by sheetlint " + __version__ in page
    inputs = page[page.index('<details class="inputs"'):page.index("</details>")]
    assert "<code>spm.yaml</code>: 1 record" in inputs
    assert "<code>package.json</code>: skipped: holds no machine record" in inputs
    _, written = _report(tmp_path, capsys, "spm.yaml")
    assert re.search(r"Written \d{4}-\d\d-\d\d \d\d:\d\d UTC by sheetlint", written)


def test_estimates_are_dashed_and_labelled_and_captions_name_no_module(tmp_path: Path,
                                                                       capsys):
    # the SPM sheet has no d/q inductances: its torque envelope is an estimate
    (tmp_path / "spm.yaml").write_text(SPM, encoding="utf-8")
    (tmp_path / "ipm.yaml").write_text(IPM, encoding="utf-8")
    _, page = _report(tmp_path, capsys, "spm.yaml", "ipm.yaml")
    estimate = re.findall(r'<polyline [^>]*stroke-dasharray="6 4"[^>]*><title>([^<]*)</title>',
                          page)
    assert estimate and all(title.startswith("estimate: ") for title in estimate)
    solid = re.findall(r'<polyline (?![^>]*stroke-dasharray)[^>]*><title>([^<]*)</title>', page)
    assert solid and not any(title.startswith("estimate") for title in solid)
    for caption in re.findall(r"<figcaption>(.*?)</figcaption>", page, re.S):
        assert "sheetlint." not in caption and "physics" not in caption


def test_a_colour_means_one_thing_in_every_plot(tmp_path: Path, capsys):
    for name, text in (("spm.yaml", SPM), ("ipm.yaml", IPM)):
        (tmp_path / name).write_text(text, encoding="utf-8")
    names = ["spm.yaml", "ipm.yaml", str(FIXTURES / "planted-emf-above-voltage.yaml")]
    _, page = _report(tmp_path, capsys, *names)
    drawn = re.findall(r'data-role="([\w-]+)"[^>]*?stroke="(#[0-9A-Fa-f]{6})"|'
                       r'stroke="(#[0-9A-Fa-f]{6})"[^>]*?data-role="([\w-]+)"', page)
    pairs = {(a or d, b or c) for a, b, c, d in drawn}
    assert len(pairs) >= 5
    for role, colour in pairs:
        assert html_report.ROLES[role] == colour, role
    # and no colour stands for two roles
    assert len(set(html_report.ROLES.values())) == len(html_report.ROLES)


CHROMIUM = next((p for p in ("chromium", "chromium-browser") if __import__("shutil").which(p)),
                None)


@pytest.mark.skipif(CHROMIUM is None, reason="chromium is not installed "
                    "(apt-get install -y chromium)")
def test_report_renders_in_a_headless_browser(tmp_path: Path, capsys):
    import struct
    import subprocess

    for name, text in (("spm.yaml", SPM), ("ipm.yaml", IPM)):
        (tmp_path / name).write_text(text, encoding="utf-8")
    _report(tmp_path, capsys, "spm.yaml", "ipm.yaml")
    shot = tmp_path / "report.png"
    result = subprocess.run(
        [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--hide-scrollbars",
         f"--screenshot={shot}", "--window-size=1280,2400",
         (tmp_path / "report.html").as_uri()],
        capture_output=True, text=True, timeout=90, check=False)
    assert result.returncode == 0, result.stderr[-2000:]
    data = shot.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    width, height = struct.unpack(">II", data[16:24])
    assert (width, height) == (1280, 2400)
    # a blank page of that size compresses to a few kB; text, tables and plots do not
    assert len(data) > 60_000
