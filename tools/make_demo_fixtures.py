"""Write the demo records in fixtures/ from synthetic consistent machines.

Scenario (invented): the Millbrook Valley water utility replaces the induction motors of its
raw-water pumps and aeration blowers with converter-fed PM motors and vets the bids. All makers
and model designations are invented. Consistent machines come straight from
``sheetlint.synth``; the planted faults are applied afterwards, one per file.

Run: python tools/make_demo_fixtures.py   (rewrites fixtures/*.yaml)
"""

from __future__ import annotations

import copy
import math
from pathlib import Path

import yaml

from sheetlint.synth import MachineSpec, design, record

OUT = Path(__file__).resolve().parent.parent / "fixtures"

CONSISTENT = {
    "consistent-spm-5k5-dosing-pump.yaml": (
        MachineSpec(5.5, 3000, 6, copper_fraction=0.03),
        "AQ-DP 5.5-30", "Aldermoor Drives (invented)"),
    "consistent-ipm-45k-blower.yaml": (
        MachineSpec(45, 1800, 8, topology="ipm", copper_fraction=0.018),
        "KB-450 IPM", "Kestrel Motorworks (invented)"),
    "consistent-spm-160k-raw-water-pump.yaml": (
        MachineSpec(160, 1500, 10, copper_fraction=0.012, mains_voltage=690),
        "NHE-PM 160-15", "Nordhaven Elektro (invented)"),
    "consistent-ipm-315k-booster-pump.yaml": (
        MachineSpec(315, 1000, 12, topology="ipm", copper_fraction=0.01, mains_voltage=690),
        "NHE-IP 315-10", "Nordhaven Elektro (invented)"),
}


def safe_max_speed(spec: MachineSpec) -> float:
    """A maximum speed whose cold peak back-EMF stays under √2·U_mains, rounded down to 50 rpm.

    Ke at 20 °C from the design; the margin of 5 % keeps the demo machines clear of the
    overspeed-emf warning that a real vendor would have to address.
    """
    ke_20 = design(spec)["ke_20"]  # V_LL,rms per rad/s at 20 °C
    omega = 0.95 * math.sqrt(2) * spec.mains_voltage / (math.sqrt(2) * ke_20)
    return min(1.2 * spec.speed_rpm, math.floor(omega * 60 / (2 * math.pi) / 50) * 50)


def _dump(name: str, data: dict, comment: str) -> None:
    text = "# " + comment.replace("\n", "\n# ") + "\n" + yaml.safe_dump(
        data, sort_keys=False, allow_unicode=True)
    (OUT / name).write_text(text, encoding="utf-8")


def main() -> None:
    OUT.mkdir(exist_ok=True)
    base = {}
    for name, (spec, model, maker) in CONSISTENT.items():
        data = record(spec, model, maker)
        data["limits"] = {"max_speed": f"{safe_max_speed(spec):g} rpm"}
        if name == "consistent-ipm-45k-blower.yaml":
            data["efficiency_class"] = "IE5"
        base[name] = (spec, data)
        _dump(name, data, f"Millbrook Valley water utility bid (invented): {model}.\n"
                          "Consistent demo machine: expect no error and no warning.")

    # 1. Ke per phase, basis left unstated: the Kt, T/I and margin relations break by √3
    spec, data = base["consistent-spm-5k5-dosing-pump.yaml"]
    d = copy.deepcopy(data)
    d["id"] = "AQ-DP 5.5-30 (bid B)"
    ke = d["emf"]["constant"]
    d["emf"]["constant"] = {"value": round(ke["value"] / math.sqrt(3), 1), "unit": "V/krpm"}
    d["torque_constant"] = f"{ke['value'] * 0.016540:.3f} N*m/A"
    _dump("planted-ke-per-phase.yaml", d,
          "Planted fault: the back-EMF constant is the per-phase value, basis unstated,\n"
          "next to a Kt that matches line-to-line. Expect a warning naming emf.constant, x sqrt3.")

    # 2. Pole count that cannot make the rated speed at the rated frequency
    spec, data = base["consistent-ipm-45k-blower.yaml"]
    d = copy.deepcopy(data)
    d["id"] = "KB-450 IPM (rev. 2 sheet)"
    d["machine"]["poles"] = 6
    _dump("planted-wrong-pole-count.yaml", d,
          "Planted fault: 6 poles printed where the machine has 8 (1800 rpm at 120 Hz).\n"
          "Expect a synchronous-speed error.")

    # 3. Power given in hp but labelled kW (torque and currents belong to 20 hp)
    spec = MachineSpec(20 * 0.7456998715822702, 1500, 8, copper_fraction=0.025)
    d = record(spec, "AQ-PM 20 (catalogue 2026)", "Aldermoor Drives (invented)")
    d["rated"]["power"] = "20 kW"
    d["rated"].pop("losses")
    _dump("planted-hp-as-kw.yaml", d,
          "Planted fault: a 20 hp machine whose power is labelled 20 kW.\n"
          "Expect power-torque-speed and electrical-power errors naming rated.power, hp/kW.")

    # 4. Hot back-EMF above rated voltage on a surface-magnet machine; max speed beyond DC link
    spec, data = base["consistent-spm-160k-raw-water-pump.yaml"]
    d = copy.deepcopy(data)
    d["id"] = "NHE-PM 160-15 HV"
    d["emf"]["constant"]["value"] = round(d["emf"]["constant"]["value"] * 1.12, 1)
    d["limits"]["max_speed"] = "2400 rpm"
    d["rated"].pop("current")
    d["rated"].pop("power_factor")
    d.pop("torque_constant", None)
    _dump("planted-emf-above-voltage.yaml", d,
          "Planted faults: back-EMF constant 12 % high, so the hot back-EMF exceeds the\n"
          "rated voltage; maximum speed 2400 rpm takes the back-EMF above the DC link.\n"
          "Expect voltage-margin and overspeed-emf warnings.")

    # 5. An efficiency class one step too high for the declared efficiency
    spec = MachineSpec(5.5, 3000, 6, copper_fraction=0.02, iron_fraction=0.045,
                       friction_fraction=0.01)
    d = record(spec, "AQ-DP 5.5-30 E", "Aldermoor Drives (invented)")
    d["efficiency_class"] = "IE5"
    _dump("planted-class-too-high.yaml", d,
          "Planted fault: a consistent 5.5 kW machine whose declared efficiency reaches IE4\n"
          "but claims IE5. Expect an efficiency-class warning (converter-fed: compared with\n"
          "the IEC 60034-30-1 4-pole limit as an approximation, so at most a warning).")

    # 6. An impossible value: odd pole count and efficiency above 100 %
    spec, data = base["consistent-spm-5k5-dosing-pump.yaml"]
    d = copy.deepcopy(data)
    d["id"] = "AQ-DP 5.5-30 (scan)"
    d["machine"]["poles"] = 7
    d["rated"]["efficiency"] = "101.5 %"
    _dump("planted-impossible-values.yaml", d,
          "Planted faults: 7 poles (odd) and 101.5 % efficiency. Expect value-range errors;\n"
          "the other relations are still checked without those values.")


if __name__ == "__main__":
    main()
