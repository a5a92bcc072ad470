"""Write the servo catalogue demo data in fixtures/servo/ (invented makers and models).

A small servo family as a catalogue prints it: R and L terminal to terminal, Kt and Ke at
20 °C, a standstill point at 0 rpm, the no-load speed at a stated DC supply, time constants
in ms, the motor constant in N·m/√W, values at 2–3 significant digits. The figures are
worked out here from each motor's design values with the textbook definitions
(τe = L/R, Km = Kt/√(3·R_phase), τm = 3·J·R_phase/Kt², Kt = √3·Ke, no-load speed a few
per cent under U_dc/(√2·Ke)); the planted files each carry one usual slip.

Run: ``python tools/make_servo_fixtures.py`` (rewrites the files).
"""

from __future__ import annotations

import math
from pathlib import Path

import yaml

OUT = Path(__file__).resolve().parent.parent / "fixtures" / "servo"
MAKER = "Kestrel Motion (invented)"
DC_SUPPLY = 560.0  # V DC, the DC link of a 400 V converter
KT_PER_KE = math.sqrt(3.0) * 60.0 / (2 * math.pi * 1000.0)  # N·m/A per V/krpm (line rms)
NO_LOAD_SHARE = 0.955  # catalogue no-load speed over U_dc/(√2·Ke) (a few per cent under)

# name, poles, Ke [V/krpm line rms, 20 °C], R line [ohm, 20 °C], L line [mH], J [kg·cm²],
# rated speed [rpm], rated torque [N·m], standstill torque [N·m], peak/standstill torque,
# max speed [rpm], demagnetisation current [A rms, 120 °C]
MOTORS = (
    ("KM-S 40-30", 8, 29.0, 5.8, 17.0, 0.31, 3000, 0.55, 0.64, 3.2, 6000, 9.5),
    ("KM-S 60-30", 8, 58.0, 2.4, 9.6, 1.2, 3000, 2.4, 2.6, 2.9, 6000, 25.0),
    ("KM-S 80-30", 10, 87.0, 1.1, 6.3, 4.6, 3000, 6.2, 7.1, 3.0, 5000, 44.0),
    ("KM-S 100-20", 10, 118.0, 0.62, 5.1, 14.0, 2000, 13.0, 15.5, 3.1, 4000, 62.0),
    ("KM-T 140-15 (torque motor)", 20, 235.0, 0.94, 11.0, 95.0, 1500, 38.0, 44.0, 2.6, 2500,
     48.0),
)


def printed(value: float, digits: int = 2) -> float:
    """The value rounded to ``digits`` significant digits, as a catalogue prints it."""
    exponent = math.floor(math.log10(abs(value))) - digits + 1
    return round(round(value / 10 ** exponent) * 10 ** exponent, 10)


def number(value: float, digits: int = 2) -> str:
    """The printed value as text, keeping a significant trailing zero (``4.0``)."""
    rounded = printed(value, digits)
    if abs(rounded) >= 10 ** (digits - 1):
        return f"{rounded:.0f}"
    return f"{rounded:#.{digits}g}"


def record(motor: tuple) -> dict:
    (name, poles, ke, r_line, l_line_mh, j_kgcm2, speed, torque, t0, peak_ratio, max_speed,
     demag) = motor
    kt = KT_PER_KE * ke
    r_phase = r_line / 2
    inertia = j_kgcm2 * 1e-4
    tau_e = l_line_mh * 1e-3 / r_line
    km = kt / math.sqrt(3 * r_phase)
    tau_m = 3 * inertia * r_phase / kt ** 2
    no_load = NO_LOAD_SHARE * DC_SUPPLY / math.sqrt(2) / ke * 1000
    i0 = t0 / kt  # standstill: T/I = Kt
    peak_torque = peak_ratio * t0
    peak_current = peak_torque / (0.88 * kt)  # saturation: 0.88 of Kt at peak
    rated_current = torque / (0.93 * kt)  # warm magnets and losses at the rated point
    power = torque * speed * 2 * math.pi / 60
    return {
        "id": name,
        "maker": MAKER,
        "machine": {"topology": "spm", "poles": poles, "thermal_class": 155,
                    "inertia": f"{number(j_kgcm2)} kg*cm**2"},
        "rated": {"speed": f"{speed} rpm", "torque": f"{number(torque)} N*m",
                  "power": f"{number(power / 1000)} kW",
                  "current": f"{number(rated_current)} A"},
        "emf": {"constant": {"value": printed(ke, 3), "unit": "V/krpm", "basis": "line_rms"},
                "magnet_temperature": "20 °C"},
        "torque_constant": {"value": printed(kt, 3), "unit": "N*m/A",
                            "magnet_temperature": "20 °C"},
        "circuit": {"resistance": {"value": printed(r_line), "unit": "ohm", "basis": "line",
                                   "temperature": "20 °C"},
                    "ld": {"value": printed(l_line_mh), "unit": "mH", "basis": "line"},
                    "lq": {"value": printed(l_line_mh), "unit": "mH", "basis": "line"}},
        "limits": {"max_speed": f"{max_speed} rpm",
                   "peak_torque": f"{number(peak_torque)} N*m",
                   "peak_current": f"{number(peak_current)} A",
                   "no_load_speed": {"value": printed(no_load), "unit": "rpm",
                                     "supply": f"{DC_SUPPLY:g} V DC"},
                   "demagnetisation_current": {"value": demag, "unit": "A",
                                               "magnet_temperature": "120 °C"}},
        "dynamics": {"electrical_time_constant": f"{number(tau_e * 1e3)} ms",
                     "mechanical_time_constant": f"{number(tau_m * 1e3)} ms",
                     "motor_constant": f"{number(km)} N*m/√W",
                     "thermal_time_constant": "25 min"},
        "points": [{"speed": "0 rpm", "torque": f"{number(t0)} N*m",
                    "current": f"{number(i0)} A"}],
    }


def _set(data: dict, path: str, text: str) -> None:
    node = data
    *parents, last = path.split(".")
    for part in parents:
        node = node[int(part)] if part.isdigit() else node[part]
    if isinstance(node[last], dict):
        number_text, _, unit = text.partition(" ")
        node[last]["value"] = float(number_text)
        node[last]["unit"] = unit
    else:
        node[last] = text


def planted() -> dict[str, tuple[str, dict]]:
    """file name -> (header comment, record with one slip) on the KM-S 60-30 figures."""
    base = MOTORS[1]
    kt = KT_PER_KE * base[2]
    r_line, l_line, inertia = base[3], base[4] * 1e-3, base[5] * 1e-4
    out = {}

    def slip(name: str, comment: str, path: str, text: str) -> None:
        data = record(base)
        data["id"] = f"{data['id']} ({name})"
        _set(data, path, text)
        out[f"planted-{name}.yaml"] = (comment, data)

    slip("time-constant-in-s", "the electrical time constant in ms written as s; expect "
         "servo-constants on dynamics.electrical_time_constant, ×1000",
         "dynamics.electrical_time_constant", f"{number(l_line / r_line * 1e3)} s")
    slip("mechanical-time-constant-line-r", "τm worked out with the terminal resistance as if "
         "per phase (twice the true value); expect servo-constants on "
         "dynamics.mechanical_time_constant, ×2",
         "dynamics.mechanical_time_constant",
         f"{number(3 * inertia * r_line / kt ** 2 * 1e3)} ms")
    slip("motor-constant-line-r", "Km = Kt/√R_line (per √ of the line resistance); expect "
         "servo-constants on dynamics.motor_constant, ×√(3/2)",
         "dynamics.motor_constant", f"{number(kt / math.sqrt(r_line))} N*m/√W")
    slip("standstill-current-peak", "the standstill current given as peak (basis unstated); "
         "expect servo-constants on points[0].current, peak rather than rms",
         "points.0.current", f"{number(base[8] / kt * math.sqrt(2))} A")
    slip("no-load-speed-dc-as-rms", "the no-load speed worked out as U_dc/Ke, the DC supply "
         "taken as line rms; expect servo-constants on limits.no_load_speed, ×√2",
         "limits.no_load_speed",
         f"{printed(NO_LOAD_SHARE * DC_SUPPLY / base[2] * 1000)} rpm")
    return out


def main() -> None:
    OUT.mkdir(parents=True, exist_ok=True)
    header = ("# Servo catalogue (invented maker and models), written by "
              "tools/make_servo_fixtures.py.\n")
    family = {"records": [record(m) for m in MOTORS]}
    (OUT / "consistent-servo-family.yaml").write_text(
        header + "# Consistent: expect no error and no warning.\n"
        + yaml.safe_dump(family, sort_keys=False, allow_unicode=True), encoding="utf-8")
    for name, (comment, data) in planted().items():
        (OUT / name).write_text(header + f"# Planted slip: {comment}.\n"
                                + yaml.safe_dump(data, sort_keys=False, allow_unicode=True),
                                encoding="utf-8")


if __name__ == "__main__":
    main()
