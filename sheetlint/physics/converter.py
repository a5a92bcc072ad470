"""The voltages a converter-fed drive works within: one rule whether the sheet gives the mains or
the DC link (DESIGN.md, Judgement 3).

- A six-pulse diode front end's DC link is (3·√2/π)·U_mains = 1.35·U_mains under load and
  √2·U_mains at no load (power-electronics texts, e.g. N. Mohan, T. M. Undeland,
  W. P. Robbins, *Power Electronics*, 3rd ed., Wiley 2003, ch. 5; from memory: chapter).
- The largest linear fundamental line voltage of space-vector modulation is U_dc/√2 (same text,
  ch. 8; from memory: chapter). That is the voltage limit of a running drive for every model
  calculation. A point that needs more but no more than the mains voltage is reachable with
  overmodulation; beyond it, not. With a stated DC link the mains-equivalent is U_dc/1.35.
- A converter that stops switching holds its DC link at the no-load value: √2·U_mains, or the
  stated DC link. That is the threshold of the overspeed check.

Every function takes and returns SI floats (volts, line-to-line rms unless said).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

SQRT2 = math.sqrt(2.0)
#: mean DC-link voltage of a six-pulse diode bridge under load over the mains line voltage
DIODE_BRIDGE_DC_RATIO = 3.0 * SQRT2 / math.pi


@dataclass(frozen=True, slots=True)
class DriveVoltages:
    """The voltages of one drive, from its stated supply."""

    linear: float  # largest linear fundamental line rms voltage, U_dc/√2 (under load)
    overmodulation: float  # the most a point may need with overmodulation: the mains voltage
    dc_link_no_load: float  # what a stopped converter's DC link holds
    how: str  # how the figures were found, for messages


def drive_voltages(dc_link: float | None, mains: float | None) -> DriveVoltages | None:
    """The drive's voltages from a stated DC link (preferred) or mains voltage; None when
    neither is stated.

    Example (REFERENCES vector, derived by arithmetic): 400 V mains → U_dc = 540.2 V under
    load, linear limit 382.0 V, overmodulation up to 400 V, no-load DC link 565.7 V.
    """
    if dc_link is not None and dc_link > 0.0:
        return DriveVoltages(dc_link / SQRT2, dc_link / DIODE_BRIDGE_DC_RATIO, dc_link,
                             f"stated DC link {dc_link:.0f} V: linear modulation up to "
                             f"U_dc/√2 = {dc_link / SQRT2:.0f} V")
    if mains is not None and mains > 0.0:
        loaded = DIODE_BRIDGE_DC_RATIO * mains
        return DriveVoltages(loaded / SQRT2, mains, SQRT2 * mains,
                             f"diode front end on {mains:.0f} V mains: U_dc = 1.35·U_mains = "
                             f"{loaded:.0f} V under load, linear modulation up to U_dc/√2 = "
                             f"{loaded / SQRT2:.0f} V")
    return None
