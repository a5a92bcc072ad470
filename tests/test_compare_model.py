"""compare beyond the worked tender: a duty point in field weakening worked out by hand,
the questions an unstated basis or temperature raises, and a PDF offer.

Field weakening by hand (surface magnets, L_d = L_q = L, resistance left out so that the
closed form is exact): the torque fixes i_q = T/(1.5·p·ψ); on the voltage limit
(ω_e·(L·i_d + ψ))² + (ω_e·L·i_q)² = U², so i_d = (√((U/ω_e)² − (L·i_q)²) − ψ)/L
(steady-state dq equations of REFERENCES.md §4; Krishnan 2010, chapter from memory). The
voltage limit is U_dc/√2 with U_dc = 3·√2/π·U_mains (REFERENCES.md §8).
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest
import yaml

from sheetlint.compare.offers import compare_offers
from sheetlint.compare.requirement import requirement_from_data

ROOT = Path(__file__).resolve().parent.parent
OFFER_A = ROOT / "fixtures" / "tender" / "offer-a-compliant.yaml"
RPM = 2 * math.pi / 60


def _offer(tmp_path: Path, change) -> str:
    data = yaml.safe_load(OFFER_A.read_text(encoding="utf-8"))
    change(data)
    path = tmp_path / "offer.yaml"
    path.write_text(yaml.safe_dump(data, allow_unicode=True), encoding="utf-8")
    return str(path)


def _result(offer, name):
    return next(r for r in offer.evaluation.results if r.requirement == name)


def test_duty_above_base_speed_in_field_weakening_by_hand(tmp_path):
    def change(data):
        data["circuit"].pop("resistance")  # R = 0: the closed form above is exact
        data["limits"]["max_speed"] = "2600 rpm"

    requirement = requirement_from_data({
        "duty": [{"speed": "2400 rpm", "torque": "400 N*m"}],
        "supply": {"mains_voltage": "690 V"}, "converter": {"max_current": "215 A"},
        "site": {"ambient": "45 °C"}})
    offer = compare_offers([_offer(tmp_path, change)], requirement).offers[0]
    # offer A: p = 5, Ke 341.0 V/krpm at 20 °C, magnets at 100 + 5 = 105 °C, L = 0.5493 mH
    ke_hot = 341.0 / (1000 * RPM) * (1 - 0.0011 * (105 - 20))
    psi = ke_hot / (math.sqrt(1.5) * 5)  # 0.48204 Wb
    u_peak = (3 * 690 / math.pi) / math.sqrt(1.5)  # 658.90 V line rms -> 537.99 V peak phase
    omega_e = 5 * 2400 * RPM  # 1256.6 rad/s: ω_e·ψ = 605.7 V > 538 V, so field weakening
    assert omega_e * psi > u_peak
    i_q = 400 / (1.5 * 5 * psi)  # 110.64 A peak
    inductance = 0.5493e-3
    i_d = (math.sqrt((u_peak / omega_e) ** 2 - (inductance * i_q) ** 2) - psi) / inductance
    current = math.hypot(i_d, i_q) / math.sqrt(2)
    assert i_d == pytest.approx(-106.06, abs=0.05) and current == pytest.approx(108.4, abs=0.05)
    duty = _result(offer, "duty[0]")
    assert offer.evaluation.duty[0].region == "field-weakening"
    assert duty.status == "met" and duty.figure == pytest.approx(current, rel=1e-6)
    assert "field weakening" in duty.detail


def test_unstated_basis_and_temperature_become_questions(tmp_path):
    def change(data):
        data["emf"] = {"constant": "341.0 V/krpm"}  # no basis, no magnet temperature
        data["circuit"]["resistance"] = "0.008436 ohm"  # no basis, no temperature

    requirement = requirement_from_data({
        "duty": [{"speed": "1500 rpm", "torque": "1000 N*m"}],
        "supply": {"mains_voltage": "690 V"}, "converter": {"max_current": "215 A"}})
    offer = compare_offers([_offer(tmp_path, change)], requirement).offers[0]
    text = "\n".join(offer.questions)
    assert "basis of emf.constant" in text and "basis of circuit.resistance" in text
    assert "magnet temperature emf.constant refers to" in text
    assert "winding temperature circuit.resistance refers to" in text


def test_a_pdf_offer_is_checked_and_evaluated():
    requirement = requirement_from_data({
        "duty": [{"speed": "1500 rpm", "torque": "100 N*m"}],
        "supply": {"mains_voltage": "400 V"}, "converter": {"max_current": "200 A"},
        "speed_range": {"max": "2000 rpm"}})
    offers = compare_offers([str(ROOT / "fixtures" / "pdf" / "pump_motor_en.pdf")],
                            requirement).offers
    assert offers and all(o.error is None and o.evaluation is not None for o in offers)
    # 2000 r/min on 400 V mains: the back-EMF at the top speed is checked and carries a caution
    emf = _result(offers[0], "emf_margin")
    assert emf.status in ("met", "not_met") and emf.caution


def test_an_unreadable_offer_is_reported_and_the_others_compared(tmp_path):
    broken = tmp_path / "broken.yaml"
    broken.write_text("id: X\nrated: {power: fifteen kW}\n", encoding="utf-8")
    requirement = requirement_from_data({"duty": [{"speed": "1500 rpm", "torque": "1000 N*m"}]})
    comparison = compare_offers([str(broken), str(OFFER_A)], requirement)
    assert len(comparison.errors) == 1 and "rated.power" in comparison.errors[0]
    readable = [o for o in comparison.offers if o.error is None]
    assert len(readable) == 1 and readable[0].evaluation is not None
