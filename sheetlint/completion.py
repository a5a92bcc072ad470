"""``sheetlint derive``: the input records completed with every derived value.

The raw input is copied unchanged (unknown fields included); each derived value of a contract
field is added in the object form with a ``note`` naming the rule and inputs it came from, and
written with as many digits as its uncertainty supports, so that checking the completed record
again gives the same findings.
"""

from __future__ import annotations

import copy
import json
import math
from typing import Any

from sheetlint.engine.run import check_record
from sheetlint.fields import FIELDS, POINT_FIELDS, display_quantity
from sheetlint.intake.records import load_records


def significant_digits(uncertainty: float) -> int:
    """Digits whose last one's half unit still covers the relative uncertainty (2…6)."""
    if uncertainty <= 0:
        return 6
    return max(2, min(6, math.floor(-math.log10(2.0 * uncertainty)) + 1))


def _contract_field(path: str) -> bool:
    if path in FIELDS and path not in ("machine.pole_pairs",):
        return True
    if path.startswith("points["):
        return path.partition("].")[2] in POINT_FIELDS
    return False


def _put(record: dict[str, Any], path: str, value: Any) -> None:
    parts = path.split(".")
    node: Any = record
    for part in parts[:-1]:
        if "[" in part:
            name, _, index = part.partition("[")
            node = node.setdefault(name, [])[int(index.rstrip("]"))]
            continue
        child = node.get(part)
        if child is None:
            child = node[part] = {}
        elif not isinstance(child, dict):  # e.g. "rated.losses" given as a string
            return
        node = child
    if parts[-1] not in node:
        node[parts[-1]] = value


def completed_document(path: str, include_estimates: bool = False,
                       yaml_out: bool = False) -> tuple[str, list[str]]:
    loaded = load_records(path)
    out_records: list[Any] = []
    errors: list[str] = []
    for raw in loaded.records:
        result = check_record(raw)
        data = copy.deepcopy(raw.data)
        out_records.append(data)
        if result.error:
            errors.append(f"{path}: {result.id}: {result.error}")
            continue
        for name, known in result.derived.items():
            if not _contract_field(name) or (known.is_estimate and not include_estimates):
                continue
            shown, unit = display_quantity(name, known.value, celsius="°C")
            digits = significant_digits(known.uncertainty)
            # the value as text keeps its written digits (327 is not 327.0) when read back
            number = _plain_number(f"{shown:.{digits}g}")
            entry: dict[str, Any] = {"value": number}
            if unit:
                entry["unit"] = unit
            what = "estimated" if known.is_estimate else "derived"
            entry["note"] = f"{what} by sheetlint ({known.rule} from {', '.join(known.inputs)})"
            _put(data, name, entry)
    document: Any = out_records[0] if len(out_records) == 1 and loaded.records[0].index is None \
        else {"records": out_records}
    if yaml_out:
        import yaml

        return yaml.safe_dump(_plain(document), sort_keys=False, allow_unicode=True), errors
    return json.dumps(_plain(document), indent=2, ensure_ascii=False), errors


def _plain_number(text: str) -> str:
    """``'%g'`` text without an exponent (3.27e+02 → 327), digits kept."""
    if "e" not in text:
        return text
    mantissa, _, exponent = text.partition("e")
    digits = len(mantissa.replace(".", "").replace("-", "").lstrip("0"))
    value = float(text)
    decimals = max(digits - 1 - int(exponent), 0)
    return f"{value:.{decimals}f}"


def _plain(data: Any) -> Any:
    if isinstance(data, dict):
        return {k: _plain(v) for k, v in data.items()}
    if isinstance(data, list):
        return [_plain(v) for v in data]
    if isinstance(data, float):
        return float(data)
    return data
