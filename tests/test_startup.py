"""Start-up: a one-file check imports only what it needs.

DESIGN.md "Performance budgets": one file through the CLI in under 0.3 s, cold start included.
Tests never assert timings (a busy machine would fail them): bench/bench_startup.py prints the
figures; what is tested here is the structure that keeps start-up short — no heavy module is
imported for a JSON/YAML check.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

FIXTURES = Path(__file__).resolve().parent.parent / "fixtures"
FIXTURE = FIXTURES / "consistent-spm-5k5-dosing-pump.yaml"
#: modules a JSON/YAML check never needs: PDF, plotting, numerics, the pint registry, workers
HEAVY = ("numpy", "scipy", "pint", "pdfplumber", "pdfminer", "fpdf", "matplotlib",
         "multiprocessing", "concurrent.futures", "sheetlint.intake.pdf")

PROBE = """
import sys
from sheetlint.cli import main
status = main(["check", "--format", "json", "-o", sys.argv[2], sys.argv[1]])
import json
print(json.dumps({"status": status, "modules": sorted(sys.modules)}))
"""


def _probe(path: Path, tmp_path: Path) -> dict:
    done = subprocess.run([sys.executable, "-c", PROBE, str(path), str(tmp_path / "out.json")],
                          capture_output=True, text=True, timeout=60)
    assert "Traceback" not in done.stderr, done.stderr
    return json.loads(done.stdout.strip().splitlines()[-1])


def test_one_file_check_imports_no_heavy_module(tmp_path):
    probe = _probe(FIXTURE, tmp_path)
    assert probe["status"] in (0, 1)
    loaded = [m for m in probe["modules"] if m in HEAVY or m.split(".")[0] in HEAVY]
    assert loaded == []


def test_unreadable_file_check_imports_no_heavy_module(tmp_path):
    bad = tmp_path / "bad.yaml"
    bad.write_text("id: A\nrated:\n  power: 15 kg\n")  # a usual unit of the wrong kind
    probe = _probe(bad, tmp_path)
    assert probe["status"] == 2
    loaded = [m for m in probe["modules"] if m in HEAVY or m.split(".")[0] in HEAVY]
    assert loaded == []
