"""``sheetlint derive``: the input records completed with every derived value.

The input is copied with its comments, order and layout (YAML through ruamel.yaml's
round-trip mode; JSON keeps its key order). Each derived value of a contract field is added in
the object form::

    voltage: {value: 214.2, unit: V, basis: line_rms, magnet_temperature: 20 °C,
              speed: 1500 r/min, derived: true, rule: emf-constant,
              from: [emf.constant, rated.speed]}

``derived: true`` marks it: when the completed file is checked, the engine works the value out
again from the same inputs instead of reading it as a given figure, so the completed file gives
the same findings as the input. A loss part (``rated.losses.copper``) is written under a stated
or derived total only; a total given as text (``losses: 4320 W``) is turned into the object
form to hold it.
"""

from __future__ import annotations

import io
import json
import math
import re
from pathlib import Path
from typing import Any

from sheetlint.engine.core import Known
from sheetlint.engine.run import check_record
from sheetlint.fields import BASES, FIELDS, POINT_FIELDS, display_quantity, spec_for
from sheetlint.intake.records import InputProblem, load_records

#: the basis every derived value is expressed in (the engine's canonical basis)
CANONICAL_BASIS = {"voltage": "line_rms", "emf_constant": "line_rms", "current": "rms",
                   "torque_constant": "rms", "resistance": "phase", "inductance": "phase"}
#: fields whose reference temperature is a magnet temperature (else a winding temperature)
MAGNET_FIELDS = ("emf.", "torque_constant")
#: display units in our own spelling
UNIT_SPELLING = {"rpm": "r/min", "degC": "°C"}
#: the magnet temperature of a back-EMF a sheet gives without one (DESIGN.md: 20 °C)
ROOM_KELVIN = 293.15
_TEXT_VALUE = re.compile(r"^\s*([-+]?\d+(?:\.\d*)?(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")


def significant_digits(uncertainty: float) -> int:
    """Digits written for a derived value: what its uncertainty supports, at least 4."""
    if uncertainty <= 0 or not math.isfinite(uncertainty):
        return 6
    return max(4, min(6, math.floor(-math.log10(2.0 * uncertainty)) + 1))


def rounded(value: float, digits: int) -> float | int:
    """``value`` to ``digits`` significant digits, as a number (an int when whole)."""
    if value == 0 or not math.isfinite(value):
        return value
    number = float(f"{value:.{digits}g}")
    return int(number) if number.is_integer() and abs(number) < 1e15 else number


def _contract_field(path: str) -> bool:
    if path in FIELDS and path not in ("machine.pole_pairs",):
        return True
    if path.startswith("points["):
        return path.partition("].")[2] in POINT_FIELDS
    return False


def derived_entry(name: str, known: Known, rated_speed: float | None,
                  emf_temperature: float = ROOM_KELVIN) -> dict[str, Any]:
    """The object written for one derived value: number, unit, basis, reference temperature
    (a back-EMF or torque constant without one of its own is at the record's EMF magnet
    temperature, 20 °C unless stated), the speed of a back-EMF, the marker and its origin."""
    shown, unit = display_quantity(name, known.value, celsius="°C")
    entry: dict[str, Any] = {"value": rounded(shown, significant_digits(known.uncertainty))}
    if unit:
        entry["unit"] = UNIT_SPELLING.get(unit, unit)
    spec = spec_for(name.partition("].")[2] if name.startswith("points[") else name)
    if spec is not None and spec.kind in CANONICAL_BASIS and spec.kind in BASES:
        entry["basis"] = CANONICAL_BASIS[spec.kind]
    temperature = known.temperature
    if temperature is None and name in ("emf.voltage", "emf.constant", "torque_constant",
                                        "emf.flux_linkage"):
        temperature = emf_temperature
    if temperature is not None and math.isfinite(temperature):
        key = "magnet_temperature" if name.startswith(MAGNET_FIELDS) else "temperature"
        entry[key] = f"{rounded(temperature - 273.15, 4)} °C"
    if name == "emf.voltage" and rated_speed is not None:
        entry["speed"] = f"{rounded(rated_speed * 60 / (2 * math.pi), 5)} r/min"
    entry["derived"] = True
    if known.is_estimate:
        entry["note"] = "estimate by a rule of thumb, not a derivation"
    entry["rule"] = known.rule
    entry["from"] = list(known.inputs)
    return entry


def _put(record: Any, path: str, value: dict[str, Any], new_map: Any) -> None:
    """Add ``value`` at ``path`` unless something is there; create missing sections; a loss
    part goes only under a total in the object form (a text total is converted)."""
    parts = path.split(".")
    node: Any = record
    for depth, part in enumerate(parts[:-1]):
        if "[" in part:
            name, _, index = part.partition("[")
            seq = node.get(name)
            position = int(index.rstrip("]"))
            if not isinstance(seq, list) or position >= len(seq):
                return
            node = seq[position]
            continue
        child = node.get(part)
        if child is None:
            if depth > 0:  # a sub-part of a value that is not there: nowhere to hold it
                return
            child = node[part] = new_map()
        elif isinstance(child, str) and depth > 0:
            match = _TEXT_VALUE.match(child)
            if match is None:
                return
            number = float(match.group(1))
            child = node[part] = new_map(
                [("value", int(number) if number.is_integer() else number),
                 ("unit", match.group(2))] if match.group(2) else [("value", number)])
        elif not isinstance(child, dict):
            return
        node = child
    if isinstance(node, dict) and parts[-1] not in node:
        node[parts[-1]] = new_map(value.items())


def _completions(path: str, include_estimates: bool) -> tuple[list[tuple[int | None, list[
        tuple[str, dict[str, Any]]]]], list[str], bool]:
    """Per record (its index in ``records``, or None): the derived entries to add; errors;
    whether the file holds a ``records`` list."""
    loaded = load_records(path)
    out = []
    errors: list[str] = []
    for raw in loaded.records:
        result = check_record(raw)
        if result.error:
            errors.append(f"{path}: {result.id}: {result.error}")
            out.append((raw.index, []))
            continue
        sheet = result.sheet
        speed = sheet.get("rated.speed") if sheet is not None else None
        rated_speed = speed.value if speed is not None else None
        emf_magnets = sheet.get("emf.magnet_temperature") if sheet is not None else None
        emf_temperature = emf_magnets.value if emf_magnets is not None else ROOM_KELVIN
        entries = []
        names = sorted(result.derived, key=lambda n: n.count("."))  # a total before its parts
        for name in names:
            known = result.derived[name]
            if not _contract_field(name) or (known.is_estimate and not include_estimates):
                continue
            entries.append((name, derived_entry(name, known, rated_speed, emf_temperature)))
        out.append((raw.index, entries))
    many = bool(loaded.records) and loaded.records[0].index is not None
    return out, errors, many


def completed_document(path: str, include_estimates: bool = False,
                       yaml_out: bool | None = None) -> tuple[str, list[str]]:
    """The completed file as text, and the records that could not be read.

    ``yaml_out`` None writes the input's format. Raises InputProblem for a file that cannot be
    read at all (a PDF gets a pointer to ``extract``)."""
    if path.lower().endswith(".pdf"):
        stem = Path(path).with_suffix(".yaml").name
        raise InputProblem(f"{path}: derive reads JSON or YAML records; turn the PDF's tables "
                           f"into records first with `sheetlint extract {path} --format yaml "
                           f"-o {stem}`, then run `sheetlint derive {stem} -o ...`")
    completions, errors, many = _completions(path, include_estimates)
    input_yaml = not path.lower().endswith(".json")
    if yaml_out is None:
        yaml_out = input_yaml
    text = Path(path).read_bytes().decode("utf-8-sig")
    if input_yaml:
        from ruamel.yaml import YAML
        from ruamel.yaml.comments import CommentedMap

        yaml = YAML(typ="rt")
        yaml.preserve_quotes = True
        yaml.width = 4096
        document = yaml.load(text)

        def new_map(items: Any = ()) -> Any:
            node = CommentedMap()
            for key, value in items:
                node[key] = new_map(value.items()) if isinstance(value, dict) else value
            if items:
                node.fa.set_flow_style()
            return node
    else:
        document = json.loads(text)
        yaml = None

        def new_map(items: Any = ()) -> Any:
            return dict(items)

    for index, entries in completions:
        record = document["records"][index] if many else document
        for name, entry in entries:
            _put(record, name, entry, new_map)
    if yaml_out and yaml is not None:
        stream = io.StringIO()
        yaml.dump(document, stream)
        return stream.getvalue().rstrip("\n"), errors
    if yaml_out:
        from ruamel.yaml import YAML

        plain_yaml = YAML(typ="safe", pure=True)
        plain_yaml.default_flow_style = False
        plain_yaml.allow_unicode = True
        stream = io.StringIO()
        plain_yaml.dump(_plain(document), stream)
        return stream.getvalue().rstrip("\n"), errors
    return json.dumps(_plain(document), indent=2, ensure_ascii=False), errors


def _plain(data: Any) -> Any:
    """Round-trip containers and scalars as plain dicts, lists, numbers and text (for JSON)."""
    if isinstance(data, dict):
        return {str(k): _plain(v) for k, v in data.items()}
    if isinstance(data, list):
        return [_plain(v) for v in data]
    if isinstance(data, bool) or data is None:
        return data
    if isinstance(data, int):
        return int(data)
    if isinstance(data, float):
        return float(data)
    if isinstance(data, str):
        return str(data)
    return str(data)
