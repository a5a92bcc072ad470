"""Loaders for JSON and YAML record files: raw mappings plus the source line of each value.

A file holds one record or ``{"records": [...]}``. Numbers keep the text they were written
with (so the engine can tell ``1420`` from ``1420.0``). Unreadable files raise
:class:`InputProblem` with a message that names the file; nothing here raises anything else.
"""

from __future__ import annotations

import json
import os
import re
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import yaml

MAX_BYTES = 20_000_000
MAX_DEPTH = 64
MAX_NODES = 200_000

Locator = Callable[[str], dict[str, Any] | None]


class InputProblem(Exception):
    """A file (or record) that cannot be read; the message is for the user."""


class WrittenFloat(float):
    """A float that remembers how it was written (``1420.0`` vs ``1420``)."""

    written: str

    def __new__(cls, text: str) -> WrittenFloat:
        obj = super().__new__(cls, text)
        obj.written = text
        return obj


def _nowhere(_path: str) -> None:
    """The locator of a record that did not come from a file."""
    return None


@dataclass(slots=True)
class RawRecord:
    data: Any
    index: int | None  # position in "records", None for a single-record file
    prefix: str  # path prefix of this record in the file ("records[3]." or "")
    locate_in_file: Locator = field(default=_nowhere)

    @property
    def has_locations(self) -> bool:
        return self.locate_in_file is not _nowhere

    def locate(self, path: str) -> dict[str, Any] | None:
        """Source location of a field path of this record (walks up to the nearest parent)."""
        parts = path
        while parts:
            found = self.locate_in_file(self.prefix + parts)
            if found:
                return found
            if "." not in parts and "[" not in parts:
                break
            cut = max(parts.rfind("."), parts.rfind("["))
            parts = parts[:cut]
        return self.locate_in_file(self.prefix.rstrip(".")) if self.prefix else None


@dataclass(slots=True)
class LoadedFile:
    path: str
    records: list[RawRecord]


def load_records(path: str | os.PathLike[str], max_bytes: int = MAX_BYTES) -> LoadedFile:
    """Read a JSON or YAML data file into raw records. Raises :class:`InputProblem`."""
    name = str(path)
    try:
        size = os.path.getsize(path)
        if size > max_bytes:
            raise InputProblem(f"{name}: file is {size} bytes, over the limit of {max_bytes}")
        raw = Path(path).read_bytes()
    except OSError as exc:
        raise InputProblem(f"{name}: cannot read file ({exc.strerror or exc})") from None
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise InputProblem(f"{name}: not UTF-8 text (byte {exc.start})") from None
    if not text.strip():
        raise InputProblem(f"{name}: file is empty")
    suffix = Path(name).suffix.lower()
    if suffix == ".json":
        data, locate = _load_json(name, text)
    else:
        data, locate = _load_yaml(name, text)
    return LoadedFile(name, split_records(name, data, locate))


def split_records(name: str, data: Any, locate: Locator) -> list[RawRecord]:
    if isinstance(data, dict) and "records" in data and "id" not in data:
        records = data["records"]
        if not isinstance(records, list):
            raise InputProblem(f"{name}: 'records' must be a list")
        return [RawRecord(r, i, f"records[{i}].", locate) for i, r in enumerate(records)]
    if isinstance(data, dict):
        return [RawRecord(data, None, "", locate)]
    if data is None:
        raise InputProblem(f"{name}: file is empty")
    raise InputProblem(f"{name}: expected a record (a mapping with 'id') or "
                       f"{{\"records\": [...]}}, found {type(data).__name__}")


# --- JSON ---------------------------------------------------------------------------------------
def _reject_constant(text: str) -> Any:
    raise ValueError(f"'{text}' is not a finite number")


def _load_json(name: str, text: str) -> tuple[Any, Locator]:
    try:
        data = json.loads(text, parse_float=WrittenFloat, parse_constant=_reject_constant)
    except json.JSONDecodeError as exc:
        raise InputProblem(f"{name}: line {exc.lineno} column {exc.colno}: broken JSON "
                           f"({exc.msg})") from None
    except ValueError as exc:
        raise InputProblem(f"{name}: {exc}") from None
    except RecursionError:
        raise InputProblem(f"{name}: document nested too deeply") from None
    if _depth_exceeds(data, MAX_DEPTH):
        raise InputProblem(f"{name}: document nested deeper than {MAX_DEPTH} levels")
    lines: dict[str, int] | None = None

    def locate(path: str) -> dict[str, Any] | None:
        nonlocal lines
        if lines is None:
            lines = _json_lines(text)
        line = lines.get(path)
        return {"line": line} if line else None

    return data, locate


def _depth_exceeds(data: Any, limit: int) -> bool:
    stack = [(data, 1)]
    while stack:
        item, depth = stack.pop()
        if depth > limit:
            return True
        if isinstance(item, dict):
            stack.extend((v, depth + 1) for v in item.values())
        elif isinstance(item, list):
            stack.extend((v, depth + 1) for v in item)
    return False


_JSON_TOKEN = re.compile(r'"(?:[^"\\]|\\.)*"|[{}\[\]:,]|[^\s{}\[\]:,"]+|\s+')


def _json_lines(text: str) -> dict[str, int]:
    """Map each key path of a (valid) JSON text to the line where its value starts."""
    out: dict[str, int] = {}
    stack: list[list[Any]] = []  # [kind, path, key_or_index, expecting_key]
    line = 1
    pending_key: str | None = None
    for match in _JSON_TOKEN.finditer(text):
        token = match.group(0)
        if token.isspace() or token == "":
            line += token.count("\n")
            continue
        if token == ":" or token == ",":
            if token == "," and stack and stack[-1][0] == "list":
                stack[-1][2] += 1
            continue
        if stack and stack[-1][0] == "dict" and pending_key is None and token.startswith('"'):
            pending_key = json.loads(token)
            continue
        # a value starts here
        if stack:
            kind, base, index, _ = stack[-1]
            if kind == "dict":
                path = f"{base}.{pending_key}" if base else str(pending_key)
            else:
                path = f"{base}[{index}]"
            out.setdefault(path, line)
        else:
            path = ""
        pending_key = None
        if token == "{":
            stack.append(["dict", path, 0, True])
        elif token == "[":
            stack.append(["list", path, 0, False])
        elif token in ("}", "]"):
            if stack:
                stack.pop()
        line += token.count("\n")
    # closing brackets were treated as values above; drop their bogus paths
    return out


# --- YAML ---------------------------------------------------------------------------------------
_Loader = getattr(yaml, "CSafeLoader", yaml.SafeLoader)
_MERGE_TAG = "tag:yaml.org,2002:merge"


def _load_yaml(name: str, text: str) -> tuple[Any, Locator]:
    try:
        loader = _Loader(text)
        try:
            node = loader.get_single_node()
        finally:
            loader.dispose()
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark
        where = f"line {mark.line + 1} column {mark.column + 1}: " if mark else ""
        raise InputProblem(f"{name}: {where}broken YAML ({exc.problem})") from None
    except yaml.YAMLError as exc:
        raise InputProblem(f"{name}: broken YAML ({exc})") from None
    except RecursionError:
        raise InputProblem(f"{name}: document nested too deeply") from None
    if node is None:
        return None, lambda _p: None
    lines: dict[str, int] = {}
    builder = _YamlBuilder(name, lines)
    data = builder.build(node, "", 1)
    return data, lambda path: ({"line": lines[path]} if path in lines else None)


class _YamlBuilder:
    """Turns a composed YAML node tree into Python data, recording lines, bounding expansion."""

    def __init__(self, name: str, lines: dict[str, int]) -> None:
        self.name = name
        self.lines = lines
        self.nodes = 0
        self.constructor = yaml.SafeLoader("")  # only for scalar resolution

    def build(self, node: yaml.Node, path: str, depth: int, line: int | None = None) -> Any:
        self.nodes += 1
        if self.nodes > MAX_NODES:
            raise InputProblem(f"{self.name}: document expands to more than {MAX_NODES} nodes "
                               "(YAML aliases or an oversize document); refused")
        if depth > MAX_DEPTH:
            raise InputProblem(f"{self.name}: document nested deeper than {MAX_DEPTH} levels")
        if path:
            self.lines.setdefault(path, line or node.start_mark.line + 1)
        if isinstance(node, yaml.MappingNode):
            out: dict[str, Any] = {}
            for key_node, value_node in node.value:
                # a plain << is a merge key; a quoted '<<' is an ordinary text key
                if isinstance(key_node, yaml.ScalarNode) and key_node.tag == _MERGE_TAG:
                    raise InputProblem(f"{self.name}: line {key_node.start_mark.line + 1}: "
                                       "YAML merge keys are not supported")
                key = self._scalar(key_node) if isinstance(key_node, yaml.ScalarNode) else None
                if not isinstance(key, (str, int, float)) or isinstance(key, bool):
                    raise InputProblem(f"{self.name}: line {key_node.start_mark.line + 1}: "
                                       "mapping keys must be text")
                key = str(key)
                child = f"{path}.{key}" if path else key
                out[key] = self.build(value_node, child, depth + 1,
                                      key_node.start_mark.line + 1)
            return out
        if isinstance(node, yaml.SequenceNode):
            return [self.build(item, f"{path}[{i}]", depth + 1)
                    for i, item in enumerate(node.value)]
        return self._scalar(node)

    def _scalar(self, node: yaml.Node) -> Any:
        try:
            value = self.constructor.construct_object(node, deep=True)
        except yaml.YAMLError as exc:
            raise InputProblem(f"{self.name}: line {node.start_mark.line + 1}: {exc}") from None
        except Exception:  # PyYAML's own constructors fail on some explicit tags ('!!float ')
            tag = node.tag.rsplit(":", 1)[-1]
            raise InputProblem(f"{self.name}: line {node.start_mark.line + 1}: '{node.value}' "
                               f"cannot be read as {tag}") from None
        if isinstance(value, float) and not isinstance(value, bool):
            if value != value or value in (float("inf"), float("-inf")):
                raise InputProblem(f"{self.name}: line {node.start_mark.line + 1}: "
                                   f"'{node.value}' is not a finite number")
            try:
                return WrittenFloat(node.value.replace("_", ""))
            except ValueError:
                return value
        if hasattr(value, "isoformat"):
            return str(node.value)
        if isinstance(value, bytes):
            return node.value
        return value
