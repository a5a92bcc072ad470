"""The field catalogue: every physical field of the data contract, its kind and its bases.

Field paths are the contract of DESIGN.md ("Data contract"): add fields freely, rename none.
A *kind* fixes the SI unit the engine holds the value in and the unit findings show it in.
``declared`` fields are ratings whose every written digit counts; the others are
characteristics that catalogues round at trailing zeros.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True, slots=True)
class Kind:
    name: str
    si_unit: str  # pint spelling of the SI unit the engine uses
    display_unit: str  # unit used when a finding shows a value
    display_factor: float  # SI value / display_factor = displayed value
    restricted: bool = False  # only the listed spellings are accepted (see units.py)


KINDS: dict[str, Kind] = {
    k.name: k
    for k in (
        Kind("power", "W", "kW", 1e3),
        Kind("torque", "N*m", "N*m", 1.0),
        Kind("speed", "rad/s", "rpm", 2 * 3.141592653589793 / 60, restricted=True),
        Kind("frequency", "Hz", "Hz", 1.0),
        Kind("voltage", "V", "V", 1.0),
        Kind("current", "A", "A", 1.0),
        Kind("ratio", "", "", 1.0),
        Kind("resistance", "ohm", "ohm", 1.0),
        Kind("inductance", "H", "mH", 1e-3),
        Kind("emf_constant", "V*s/rad", "V/krpm", 60 / (2 * 3.141592653589793) / 1000,
             restricted=True),
        Kind("torque_constant", "N*m/A", "N*m/A", 1.0, restricted=True),
        Kind("flux_linkage", "Wb", "Wb", 1.0, restricted=True),
        Kind("motor_constant", "N*m/W**0.5", "N*m/√W", 1.0, restricted=True),
        Kind("temperature", "K", "degC", 1.0),
        Kind("temperature_difference", "K", "K", 1.0),
        Kind("mass", "kg", "kg", 1.0),
        Kind("inertia", "kg*m**2", "kg*m**2", 1.0),
        Kind("length", "m", "m", 1.0),
        Kind("time", "s", "s", 1.0),
        Kind("count", "", "", 1.0),
    )
}

#: bases accepted per kind; the first is the default (the engine's canonical basis)
BASES: dict[str, tuple[str, ...]] = {
    "voltage": ("line_rms", "line_peak", "phase_rms", "phase_peak"),
    "current": ("rms", "peak"),
    "emf_constant": ("line_rms", "line_peak", "phase_rms", "phase_peak"),
    "torque_constant": ("rms", "peak"),
    "resistance": ("phase", "line", "delta_branch"),
    "inductance": ("phase", "line"),
}


@dataclass(frozen=True, slots=True)
class FieldSpec:
    path: str
    kind: str
    declared: bool = False
    description: str = ""


def _f(path: str, kind: str, declared: bool = False, description: str = "") -> FieldSpec:
    return FieldSpec(path, kind, declared, description)


#: physical fields of one operating point (``rated`` and each entry of ``points``)
POINT_FIELDS: dict[str, FieldSpec] = {
    f.path: f
    for f in (
        _f("power", "power", True, "shaft output power"),
        _f("torque", "torque", False, "shaft torque"),
        _f("speed", "speed", True, "mechanical speed"),
        _f("frequency", "frequency", True, "stator electrical frequency"),
        _f("voltage", "voltage", True, "terminal voltage (default line-to-line rms)"),
        _f("current", "current", False, "line current (default rms)"),
        _f("power_factor", "ratio", False, "cos phi"),
        _f("efficiency", "ratio", False, "efficiency, fraction or %"),
    )
}

RATED_ONLY_FIELDS: tuple[FieldSpec, ...] = (
    _f("rated.losses", "power", False, "total losses at the rated point"),
    _f("rated.losses.copper", "power"),
    _f("rated.losses.iron", "power"),
    _f("rated.losses.friction", "power"),
    _f("rated.losses.stray", "power"),
    _f("rated.temperature_rise", "temperature_difference", True, "winding temperature rise"),
    _f("rated.magnet_temperature", "temperature", False, "magnet temperature at rated point"),
)

FIELDS: dict[str, FieldSpec] = {}
for _spec in POINT_FIELDS.values():
    FIELDS["rated." + _spec.path] = FieldSpec("rated." + _spec.path, _spec.kind, _spec.declared,
                                             _spec.description)
for _spec in (
    *RATED_ONLY_FIELDS,
    _f("machine.poles", "count", True, "pole count"),
    _f("machine.pole_pairs", "count", True, "pole pairs"),
    _f("machine.phases", "count", True, "phase count"),
    _f("machine.ambient", "temperature", True, "coolant temperature"),
    _f("machine.ambient.min", "temperature", True, "lowest coolant temperature"),
    _f("machine.altitude", "length", True, "site altitude"),
    _f("machine.mass", "mass", False, "mass"),
    _f("machine.inertia", "inertia", False, "rotor moment of inertia"),
    _f("machine.rotor_diameter", "length", False, "rotor outer diameter"),
    _f("machine.stack_length", "length", False, "active (stack) length"),
    _f("emf.constant", "emf_constant", False, "back-EMF constant Ke"),
    _f("emf.voltage", "voltage", False, "back-EMF at emf.speed"),
    _f("emf.speed", "speed", True, "speed of emf.voltage"),
    _f("emf.flux_linkage", "flux_linkage", False, "PM flux linkage, peak per phase"),
    _f("emf.magnet_temperature", "temperature", False, "magnet temperature of the EMF data"),
    _f("torque_constant", "torque_constant", False, "torque constant Kt"),
    _f("circuit.resistance", "resistance", False, "stator resistance"),
    _f("circuit.ld", "inductance", False, "d-axis inductance"),
    _f("circuit.lq", "inductance", False, "q-axis inductance"),
    _f("limits.max_speed", "speed", True, "maximum mechanical speed"),
    _f("limits.peak_torque", "torque", False, "short-time torque"),
    _f("limits.peak_current", "current", False, "short-time current"),
    _f("limits.no_load_speed", "speed", True, "speed with no load at a stated supply"),
    _f("limits.no_load_speed.supply", "voltage", True, "supply voltage of the no-load speed "
       "(marked DC or AC)"),
    _f("limits.demagnetisation_current", "current", False, "current above which the magnets "
       "may be demagnetised"),
    _f("dynamics.electrical_time_constant", "time", False, "electrical time constant L/R"),
    _f("dynamics.mechanical_time_constant", "time", False, "mechanical time constant J/Km²"),
    _f("dynamics.motor_constant", "motor_constant", False, "motor constant "
       "T/√(copper loss)"),
    _f("dynamics.thermal_time_constant", "time", False, "winding thermal time constant"),
    _f("supply.mains_voltage", "voltage", True, "converter mains voltage"),
    _f("supply.dc_link_voltage", "voltage", True, "converter DC-link voltage"),
):
    FIELDS[_spec.path] = _spec

#: engine-internal fields (derived only, never read from input)
INTERNAL_FIELDS: dict[str, FieldSpec] = {
    f.path: f
    for f in (
        _f("machine.pole_pairs", "count"),
        _f("emf.constant_hot", "emf_constant", False, "Ke at the rated magnet temperature"),
        _f("emf.constant_cold", "emf_constant", False, "Ke at the lowest ambient"),
        _f("circuit.resistance_hot", "resistance", False, "phase resistance at the rated "
                                                        "winding temperature"),
        _f("emf.flux_linkage_hot", "flux_linkage", False, "psi at rated magnet temperature"),
    )
}

#: the non-physical (attribute) fields of the contract: path -> python type name
ATTRIBUTE_FIELDS: dict[str, str] = {
    "id": "str",
    "maker": "str",
    "machine.topology": "spm|ipm|pmasynrm",
    "machine.connection": "star|delta",
    "machine.thermal_class": "130|155|180 (B/F/H)",
    "machine.temperature_rise_class": "130|155|180 (B/F/H)",
    "machine.cooling": "IC code",
    "machine.duty": "S1..S10",
    "machine.magnet": "NdFeB|SmCo|ferrite",
    "machine.conductor": "copper|aluminium",
    "efficiency_class": "IE1..IE5",
}


def spec_for(path: str) -> FieldSpec | None:
    """The spec of a field path, including operating points (``points[2].torque``)."""
    spec = FIELDS.get(path) or INTERNAL_FIELDS.get(path)
    if spec is not None:
        return spec
    if path.startswith("points["):
        _, _, rest = path.partition("].")
        return POINT_FIELDS.get(rest)
    return None


#: fields shown in a unit of their own rather than their kind's: path -> (unit, SI per unit)
DISPLAY_OVERRIDES: dict[str, tuple[str, float]] = {
    "dynamics.electrical_time_constant": ("ms", 1e-3),
    "dynamics.mechanical_time_constant": ("ms", 1e-3),
    "dynamics.thermal_time_constant": ("min", 60.0),
}


def display_quantity(path: str, si_value: float, celsius: str = "degC") -> tuple[float, str]:
    """An SI value of ``path`` in its display unit: (value, unit); temperatures in ``celsius``."""
    override = DISPLAY_OVERRIDES.get(path)
    if override is not None:
        return si_value / override[1], override[0]
    spec = spec_for(path)
    kind = KINDS[spec.kind] if spec else KINDS["ratio"]
    if kind.name == "temperature":
        return si_value - 273.15, celsius
    return si_value / kind.display_factor, kind.display_unit


def display(path: str, si_value: float, digits: int = 4) -> str:
    """Format an SI value of ``path`` in its display unit, e.g. ``'95.49 N*m'``."""
    value, unit = display_quantity(path, si_value)
    if path.endswith("efficiency"):
        return f"{_sig(value * 100, digits)} %"
    if path.endswith("power_factor"):
        return _sig(value, digits)
    return f"{_sig(value, digits)} {unit}".rstrip()


def _sig(value: float, digits: int) -> str:
    if value == 0 or value != value or value in (float("inf"), float("-inf")):
        return str(value)
    return f"{value:.{digits}g}"
