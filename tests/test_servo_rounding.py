"""Catalogue rounding alone never trips servo-constants (a regression guard, not a check
against a source: the records come from tools/make_servo_fixtures.py, which uses the same
definitions as the relations; what this guards is that the allowances absorb figures printed
at two significant digits, R and L terminal to terminal)."""

from __future__ import annotations

import sys
from pathlib import Path

from hypothesis import given, settings
from hypothesis import strategies as st

from tests.conftest import run

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tools"))
from make_servo_fixtures import record


@settings(max_examples=40, deadline=None)
@given(poles=st.sampled_from([6, 8, 10, 12]), ke=st.floats(15, 250),
       r_line=st.floats(0.2, 12), tau_e_ms=st.floats(1.5, 12), inertia=st.floats(0.1, 100),
       speed=st.sampled_from([1500, 2000, 3000, 4500, 6000]), t0=st.floats(0.3, 60),
       rated_share=st.floats(0.8, 0.95), peak_ratio=st.floats(2.5, 3.5))
def test_servo_records_printed_at_two_digits_raise_no_servo_finding(
        poles, ke, r_line, tau_e_ms, inertia, speed, t0, rated_share, peak_ratio):
    motor = ("R (invented)", poles, ke, r_line, r_line * tau_e_ms, inertia, speed,
             t0 * rated_share, t0, peak_ratio, int(speed * 1.5), 1e4)
    findings = [f for f in run(record(motor)).findings
                if f.rule == "servo-constants" and f.severity != "info"]
    assert findings == [], [f.message for f in findings]
