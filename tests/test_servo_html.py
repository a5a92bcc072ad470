"""The HTML report's torque plot shows a servo sheet's standstill point and peak torque line.

Guards of what is drawn (the plot computes nothing beyond the sheet's own values): the
standstill point sits at 0 rpm at the sheet's standstill torque, the peak line at the sheet's
peak torque, ending where the back-EMF reaches the voltage limit (U_lim/Ke).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from sheetlint.batch import check_file
from sheetlint.cli import main
from sheetlint.report.html import RPM, envelope_plot

FAMILY = Path(__file__).resolve().parent.parent / "fixtures" / "servo" / \
    "consistent-servo-family.yaml"


def test_torque_plot_of_a_servo_sheet_has_standstill_point_and_peak_line():
    record = check_file(str(FAMILY)).records[1]  # KM-S 60-30: 2.6 N·m at 0 rpm, 7.5 N·m peak
    plot = envelope_plot(record.sheet)
    assert plot is not None
    standstill = [m for m in plot.markers if m.label.startswith("standstill point")]
    assert len(standstill) == 1 and standstill[0].x == 0.0
    assert standstill[0].y == pytest.approx(2.6)
    peak = [s for s in plot.series if s.label.startswith("peak torque line")]
    assert len(peak) == 1 and peak[0].ys == [pytest.approx(7.5)] * 2
    assert peak[0].xs[0] == 0.0 and 0.0 < peak[0].xs[1] <= 6000 * 1.0001
    values = record.sheet.values
    assert peak[0].xs[1] * RPM <= values["limits.max_speed"].value * 1.0001


def test_report_of_the_servo_family_draws_the_servo_lines(tmp_path, capsys, monkeypatch):
    monkeypatch.chdir(tmp_path)
    status = main(["report", "--no-settings", str(FAMILY), "-o", "report.html"])
    capsys.readouterr()
    text = (tmp_path / "report.html").read_text(encoding="utf-8")
    assert status == 0
    assert text.count("standstill point") >= 5 and "peak torque line" in text
