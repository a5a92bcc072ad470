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
from typing import Any, NamedTuple

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


class DuplicateKey(NamedTuple):
    """A key written twice in one mapping: its path and the lines of the two keys."""

    path: str  # in the record ("rated.power"), or in the file outside any record
    first_line: int
    second_line: int


def _nowhere(_path: str) -> None:
    """The locator of a record that did not come from a file."""
    return None


@dataclass(slots=True)
class RawRecord:
    data: Any
    index: int | None  # position in "records", None for a single-record file
    prefix: str  # path prefix of this record in the file ("records[3]." or "")
    locate_in_file: Locator = field(default=_nowhere)
    #: keys written twice in this record (the loader keeps the later value)
    duplicates: tuple[DuplicateKey, ...] = ()

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
        data, locate, duplicates = _load_json(name, text)
    else:
        data, locate, duplicates = _load_yaml(name, text)
    return LoadedFile(name, split_records(name, data, locate, duplicates))


def split_records(name: str, data: Any, locate: Locator,
                  duplicates: list[DuplicateKey] | None = None) -> list[RawRecord]:
    """The records of a loaded file, each with the keys repeated inside it.

    A key repeated outside every record of a ``{"records": [...]}`` file (two ``records``
    lists) makes the file unreadable: which records were meant cannot be told.
    """
    duplicates = duplicates or []
    if isinstance(data, dict) and "records" in data and "id" not in data:
        records = data["records"]
        if not isinstance(records, list):
            raise InputProblem(f"{name}: 'records' must be a list")
        inside: dict[int, list[DuplicateKey]] = {}
        for repeat in duplicates:
            index_match = _RECORD_PATH.match(repeat.path)
            if index_match is None:
                raise InputProblem(f"{name}: key '{repeat.path}' is written twice, at lines "
                                   f"{repeat.first_line} and {repeat.second_line}")
            inside.setdefault(int(index_match.group(1)), []).append(
                repeat._replace(path=repeat.path[index_match.end():]))
        return [RawRecord(r, i, f"records[{i}].", locate, tuple(inside.get(i, ())))
                for i, r in enumerate(records)]
    if isinstance(data, dict):
        return [RawRecord(data, None, "", locate, tuple(duplicates))]
    if data is None:
        raise InputProblem(f"{name}: file is empty")
    raise InputProblem(f"{name}: expected a record (a mapping with 'id') or "
                       f"{{\"records\": [...]}}, found {type(data).__name__}")


_RECORD_PATH = re.compile(r"records\[(\d+)\]\.")


# --- JSON ---------------------------------------------------------------------------------------
def _reject_constant(text: str) -> Any:
    raise ValueError(f"'{text}' is not a finite number")


class _DuplicateWatch:
    """``object_pairs_hook`` of one JSON load: builds each object, notes whether a key repeats.

    The hook sees no paths or lines; when it saw a repeat, :func:`_json_duplicates` scans the
    text once for them (only files with a repeated key pay for that scan).
    """

    __slots__ = ("seen",)

    def __init__(self) -> None:
        self.seen = False

    def __call__(self, pairs: list[tuple[str, Any]]) -> dict[str, Any]:
        built = dict(pairs)
        if len(built) != len(pairs):
            self.seen = True
        return built


def _load_json(name: str, text: str) -> tuple[Any, Locator, list[DuplicateKey]]:
    watch = _DuplicateWatch()
    try:
        data = json.loads(text, parse_float=WrittenFloat, parse_constant=_reject_constant,
                          object_pairs_hook=watch)
    except json.JSONDecodeError as exc:
        raise InputProblem(f"{name}: line {exc.lineno} column {exc.colno}: broken JSON "
                           f"({exc.msg})") from None
    except ValueError as exc:
        raise InputProblem(f"{name}: {exc}") from None
    except RecursionError:
        raise InputProblem(f"{name}: document nested too deeply") from None
    # a document cannot nest deeper than it has brackets: most files skip the walk
    if text.count("{") + text.count("[") > MAX_DEPTH and _depth_exceeds(data, MAX_DEPTH):
        raise InputProblem(f"{name}: document nested deeper than {MAX_DEPTH} levels")
    duplicates = _json_duplicates(text) if watch.seen else []
    return data, JsonLines(text), duplicates


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


_SPACE = re.compile(r"[ \t\n\r]*")
_KEY = re.compile(r'"((?:[^"\\]|\\.)*)"[ \t\n\r]*:[ \t\n\r]*')
_INDEX = re.compile(r"\[(\d+)\]")
_FIRST_KEY = re.compile(r"[^.\[]*")
#: after a value: spaces, and a comma with the spaces after it when another member follows
_NEXT = re.compile(r"[ \t\n\r]*(?:(,)[ \t\n\r]*)?")
_skip_value = json.scanner.make_scanner(json.JSONDecoder())  # type: ignore[attr-defined]


class JsonLines:
    """The line of the value at a key path of a valid JSON text, found when asked.

    Only the path asked for is followed: each object or array on the way is read as far as
    needed and what was read is kept for the next question (the offset of each member or
    item; a value passed over is skipped by the C scanner of :mod:`json`, not parsed in
    Python), and the line is the count of newlines before the value. A file whose findings
    name no location costs nothing; one that does costs the text up to the values named, read
    once. Paths are the record's (``rated.power``, ``points[1].speed``,
    ``records[2].rated.power``); of repeated keys the first is found.
    """

    __slots__ = ("found", "items", "members", "start", "text")

    def __init__(self, text: str) -> None:
        self.text = text
        self.start = -1  # offset of the document's value, found on the first question
        self.found: dict[str, dict[str, Any] | None] = {}
        #: object offset -> [key -> value offset, offset to read on from (-1: all read)]
        self.members: dict[int, list[Any]] = {}
        #: array offset -> [item offsets, offset to read on from (-1: all read)]
        self.items: dict[int, list[Any]] = {}

    def __call__(self, path: str) -> dict[str, Any] | None:
        try:
            return self.found[path]
        except KeyError:
            pass
        try:
            offset = self._offset(path)
        except (ValueError, IndexError, StopIteration):  # not there (or not valid JSON)
            offset = None
        where = None if offset is None else {"line": self.text.count("\n", 0, offset) + 1}
        self.found[path] = where
        return where

    def _offset(self, path: str) -> int | None:
        """Offset of the first character of the value at ``path``, None when absent."""
        text = self.text
        if self.start < 0:
            self.start = _SPACE.match(text, 0).end()  # type: ignore[union-attr]
        position = self.start
        rest = path
        while rest:
            opening = text[position]
            if opening == "{" and rest[0] != "[":
                key = _FIRST_KEY.match(rest).group(0)  # type: ignore[union-attr]
                found = self._member(position, key)
                if found < 0 and len(rest) > len(key):  # perhaps a key with "." or "[" in it
                    found, key = self._dotted_member(position, rest)
                rest = rest[len(key):]
            elif opening == "[" and rest[0] == "[":
                index_match = _INDEX.match(rest)
                if index_match is None:
                    return None
                found = self._item(position, int(index_match.group(1)))
                rest = rest[index_match.end():]
            else:
                return None
            if found < 0:
                return None
            position = found
            if rest[:1] == ".":
                rest = rest[1:]
        return position

    def _member(self, position: int, key: str | None) -> int:
        """Offset of the value of ``key`` in the object at ``position`` (-1: no such key);
        ``key`` None reads the whole object."""
        state = self.members.get(position)
        text = self.text
        if state is None:
            state = self.members[position] = [
                {}, _SPACE.match(text, position + 1).end()]  # type: ignore[union-attr]
        offsets = state[0]
        if key in offsets:
            return offsets[key]  # type: ignore[index]
        at = state[1]
        while at >= 0:
            key_match = _KEY.match(text, at)
            if key_match is None:  # the closing brace
                at = -1
                break
            name = key_match.group(1)
            if "\\" in name:
                name = json.loads(f'"{name}"')
            value_at = key_match.end()
            if name not in offsets:
                offsets[name] = value_at
            after = _NEXT.match(text, _skip_value(text, value_at)[1])
            at = after.end() if after.group(1) else -1  # type: ignore[union-attr]
            if name == key:
                break
        state[1] = at
        return offsets.get(key, -1)  # type: ignore[arg-type]

    def _dotted_member(self, position: int, rest: str) -> tuple[int, str]:
        """The member whose key ``rest`` starts with, though the key holds "." or "["."""
        self._member(position, None)
        for key, offset in self.members[position][0].items():
            if rest.startswith(key) and (len(rest) == len(key) or rest[len(key)] in ".["):
                return offset, key
        return -1, ""

    def _item(self, position: int, index: int) -> int:
        """Offset of item ``index`` of the array at ``position`` (-1: no such item)."""
        state = self.items.get(position)
        text = self.text
        if state is None:
            first = _SPACE.match(text, position + 1).end()  # type: ignore[union-attr]
            state = self.items[position] = [[], -1 if text[first] == "]" else first]
        offsets = state[0]
        at = state[1]
        while len(offsets) <= index and at >= 0:
            offsets.append(at)
            after = _NEXT.match(text, _skip_value(text, at)[1])
            at = after.end() if after.group(1) else -1  # type: ignore[union-attr]
        state[1] = at
        return offsets[index] if index < len(offsets) else -1


_JSON_TOKEN = re.compile(r'"(?:[^"\\]|\\.)*"|[{}\[\]:,]|[^\s{}\[\]:,"]+|\s+')


def _json_duplicates(text: str) -> list[DuplicateKey]:
    """Every repeated key of a (valid) JSON text: its path and the lines of both keys.

    A full scan of the text, run only for a file in which the load saw a repeated key.
    """
    out: list[DuplicateKey] = []
    # per open container: [is_object, path, next index, keys seen -> line, expecting a key]
    stack: list[list[Any]] = []
    line = 1
    for match in _JSON_TOKEN.finditer(text):
        token = match.group(0)
        if token.isspace():
            line += token.count("\n")
            continue
        top = stack[-1] if stack else None
        if token == ",":
            if top is not None:
                if top[0]:
                    top[4] = True
                else:
                    top[2] += 1
            continue
        if token == ":":
            continue
        if token in ("}", "]"):
            stack.pop()
            continue
        if top is not None and top[0] and top[4]:
            key = json.loads(token)
            path = f"{top[1]}.{key}" if top[1] else key
            if key in top[3]:
                out.append(DuplicateKey(path, top[3][key], line))
            else:
                top[3][key] = line
            top[2] = path
            top[4] = False
            continue
        if top is None:
            path = ""
        elif top[0]:
            path = top[2]
        else:
            path = f"{top[1]}[{top[2]}]"
        if token == "{":
            stack.append([True, path, "", {}, True])
        elif token == "[":
            stack.append([False, path, 0, {}, False])
        line += token.count("\n")
    return out


# --- YAML ---------------------------------------------------------------------------------------
_Loader = getattr(yaml, "CSafeLoader", yaml.SafeLoader)
_MERGE_TAG = "tag:yaml.org,2002:merge"


def _load_yaml(name: str, text: str) -> tuple[Any, Locator, list[DuplicateKey]]:
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
        return None, lambda _p: None, []
    lines: dict[str, int] = {}
    builder = _YamlBuilder(name, lines)
    data = builder.build(node, "", 1)
    return (data, lambda path: ({"line": lines[path]} if path in lines else None),
            builder.duplicates)


class _YamlBuilder:
    """Turns a composed YAML node tree into Python data, recording lines, bounding expansion."""

    def __init__(self, name: str, lines: dict[str, int]) -> None:
        self.name = name
        self.lines = lines
        self.nodes = 0
        self.duplicates: list[DuplicateKey] = []
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
            key_lines: dict[str, int] = {}
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
                key_line = key_node.start_mark.line + 1
                if key in key_lines:
                    self.duplicates.append(DuplicateKey(child, key_lines[key], key_line))
                else:
                    key_lines[key] = key_line
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
