"""Real PM machine parameter sets from open drive-simulation packages on PyPI.

Each file in ``tests/data/open_datasets/`` holds only what its source prints, with the source
(package, version, file, what it says) named in the file's header comment. These are lab and
example machines of open packages, not vendors' catalogue files. sheetlint must raise no error
on them; the relations below are checked against the sources' own numbers by hand arithmetic
and by the generator's independent dq model (``tools/realistic_catalogue.py``), not by the
engine.
"""

from __future__ import annotations

import math
from pathlib import Path
from typing import Any

import pytest
import yaml

from tools.realistic_catalogue import (
    check_with_sheetlint,
    dq_voltages,
    mtpa_current_for_torque,
    mtpa_currents,
)

DATA = Path(__file__).resolve().parent / "data" / "open_datasets"
FILES = sorted(DATA.glob("*.yaml"))


@pytest.fixture(scope="module")
def checked() -> dict[str, dict[str, Any]]:
    """Every data file checked in one run of the command line (JSON contract), by file name."""
    results = check_with_sheetlint(DATA)
    assert all(not record.get("error") for record in results.values()), results
    return results


def test_every_source_is_named_beside_its_data() -> None:
    assert len(FILES) >= 3
    for path in FILES:
        header = path.read_text(encoding="utf-8").split("\nid:")[0]
        assert header.startswith("# Source: the PyPI package "), path.name
        assert "licence" in header and ".py" in header, path.name


@pytest.mark.parametrize("path", FILES, ids=[p.stem for p in FILES])
def test_open_dataset_gives_no_error(path: Path, checked: dict[str, dict[str, Any]]) -> None:
    record = checked[path.name]
    errors = [(f["rule"], f["message"]) for f in record["findings"] if f["severity"] == "error"]
    assert errors == []


def _si(text: str) -> float:
    """'2.2 kW' → 2200.0; only the few units these files use."""
    number, unit = str(text).split()
    scale = {"kW": 1e3, "W": 1.0, "N*m": 1.0, "Hz": 1.0, "V": 1.0, "A": 1.0, "mH": 1e-3,
             "Wb": 1.0, "mWb": 1e-3, "rpm": 1.0, "kg*m^2": 1.0}[unit]
    return float(number) * scale


def _load(name: str) -> dict[str, Any]:
    return yaml.safe_load((DATA / name).read_text(encoding="utf-8"))


@pytest.mark.parametrize(("name", "stated_power"), [
    # motulator 0.18.0 2.2 kW IPM: 14 N·m · 2π·75/3 s⁻¹ = 2199.1 W against P=2.2e3
    ("drive-simulator-2k2-ipm.yaml", 2.2e3),
    # motulator 0.18.0 5.1 kW PM-SyRM: 19 N·m · 2π·85/2 s⁻¹ = 5073.7 W against P=5.07e3
    ("drive-simulator-5k1-pmasynrm.yaml", 5.07e3),
])
def test_power_torque_speed_holds_on_the_source_numbers(name: str, stated_power: float) -> None:
    """P = T·ω with ω = 2π·f/n_p, on the values of the data file (hand arithmetic against the
    source's own NominalValues; a typo in the file fails here)."""
    record = _load(name)
    rated = record["rated"]
    omega = 2 * math.pi * _si(rated["frequency"]) / record["machine"]["pole_pairs"]
    assert _si(rated["power"]) == stated_power
    assert _si(rated["torque"]) * omega == pytest.approx(stated_power, rel=1e-3)


def test_sheetlint_derives_the_speed_and_frequency_the_sources_imply(
        checked: dict[str, dict[str, Any]]) -> None:
    """Derived values of sheetlint against the sources: 75 Hz with 3 pole pairs is 1500 rpm
    (motulator 2.2 kW); 3000 rpm with 3 pole pairs is 150 Hz (gym-electric-motor default)."""
    derived = checked["drive-simulator-2k2-ipm.yaml"]["derived"]
    assert derived["rated.speed"]["value"] == pytest.approx(1500.0, rel=1e-3)
    derived = checked["motor-control-gym-pmsm.yaml"]["derived"]
    assert derived["rated.frequency"]["value"] == pytest.approx(150.0, rel=1e-9)


def test_2k2_ipm_rated_point_fits_the_source_dq_parameters() -> None:
    """The source's own dq parameters (n_p 3, ψ 0.545 Wb peak, L_d 36 mH, L_q 51 mH, R_s 3.6 Ω)
    in the textbook steady-state dq model (Krishnan 2010), MTPA at the stated 14 N·m and
    75 Hz: the least current is 3.99 A rms, under the stated 4.3 A (the stated current also
    carries the loss torque, and the magnets are warm at rated load), and the terminal voltage
    is 363 V line rms, under the stated 370 V."""
    record = _load("drive-simulator-2k2-ipm.yaml")
    pole_pairs = record["machine"]["pole_pairs"]
    psi = _si(record["emf"]["flux_linkage"])
    ld, lq = _si(record["circuit"]["ld"]), _si(record["circuit"]["lq"])
    resistance = record["circuit"]["resistance"]["value"]
    rated = record["rated"]
    amplitude = mtpa_current_for_torque(_si(rated["torque"]), pole_pairs, psi, ld, lq)
    current = amplitude / math.sqrt(2)
    assert current == pytest.approx(3.99, abs=0.01)
    assert 0.88 * _si(rated["current"]) < current < _si(rated["current"])
    i_d, i_q = mtpa_currents(amplitude, psi, ld, lq)
    omega_e = 2 * math.pi * _si(rated["frequency"])
    voltage = math.hypot(*dq_voltages(resistance, omega_e, psi, ld, lq, i_d, i_q)) * math.sqrt(1.5)
    assert 0.95 * _si(rated["voltage"]) < voltage < _si(rated["voltage"])


def test_gym_pmsm_back_emf_stays_within_its_own_voltage_limit() -> None:
    """gym-electric-motor 3.0.3 default PMSM: no-load phase-peak EMF p·ω·ψ at the limit speed
    4000 rpm is 3·418.9·0.066 = 82.9 V, well within the 300 V phase amplitude limit that
    the same source file sets (hand arithmetic on the file's values)."""
    record = _load("motor-control-gym-pmsm.yaml")
    omega = _si(record["limits"]["max_speed"]) * 2 * math.pi / 60
    emf_peak_phase = record["machine"]["pole_pairs"] * omega * _si(record["emf"]["flux_linkage"])
    assert emf_peak_phase == pytest.approx(82.94, abs=0.01)
    assert emf_peak_phase < 300.0
