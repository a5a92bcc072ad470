"""The ``compare`` subcommand through the command line: output, exit status, errors named.

Structural tests; the statuses are checked by hand in test_compare_tender.py.
"""

from __future__ import annotations

import json
from pathlib import Path

from sheetlint.cli import main

TENDER = Path(__file__).resolve().parent.parent / "fixtures" / "tender"
OFFERS = sorted(str(p) for p in TENDER.glob("offer-*.yaml"))
REQUIREMENT = str(TENDER / "raw-water-pump.requirement")


def test_cli_compare_text_and_exit_status(tmp_path, capsys):
    assert main(["compare", "--requirement", REQUIREMENT, *OFFERS]) == 0
    out = capsys.readouterr().out
    assert "1. OVM-PS 170-10" in out and "questions to the vendor" in out
    assert "not an approval" in out
    bad = tmp_path / "bad.yaml"
    bad.write_text("converter: {max_current: 190 parsecs}\n", encoding="utf-8")
    assert main(["compare", "--requirement", str(bad), OFFERS[0]]) == 2
    assert "converter.max_current" in capsys.readouterr().err
    missing = tmp_path / "missing.yaml"
    assert main(["compare", "--requirement", REQUIREMENT, str(missing), OFFERS[0]]) == 2
    captured = capsys.readouterr()
    assert "missing.yaml" in captured.err and "OVM-PS 170-10" in captured.out
    assert main(["compare", "--requirement-schema"]) == 0
    assert json.loads(capsys.readouterr().out)["title"] == "sheetlint purchase requirement"


def test_rank_by_a_named_figure(capsys):
    assert main(["compare", "--requirement", REQUIREMENT, "--format", "json",
                 "--rank-by", "machine.mass", *OFFERS]) == 0
    doc = json.loads(capsys.readouterr().out)
    not_compliant = [o for o in doc["offers"] if o["verdict"] == "not_compliant"]
    # B 940 kg, C 870 kg: the lighter first among equal verdicts
    assert [o["id"] for o in not_compliant] == ["PE-SM 165/10", "CBD 160-8 HS"]


def test_without_a_requirement_offers_stand_side_by_side(capsys):
    assert main(["compare", "--no-letters", *OFFERS]) == 0
    out = capsys.readouterr().out
    assert "Figures side by side" in out and "rated.power [kW]" in out
    # only the sheet's own check decides: offer D's planted slip leaves it incomplete
    assert "TM-PMS 170.10 (" in out and "incomplete" in out
