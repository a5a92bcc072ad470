"""Configuration: defaults, a configuration file and command-line options, merged in one place.

A project configures sheetlint in ``sheetlint.toml`` (keys at the top level) or in
``pyproject.toml`` under ``[tool.sheetlint]``::

    [tool.sheetlint]
    select = ["power-torque-speed", "voltage-margin"]   # run only these (default: all)
    ignore = ["resistance-drop"]                        # never run these
    fail-on = "warning"                                 # lowest severity giving exit status 1

    [tool.sheetlint.rules.voltage-margin]
    band = [0.05, 0.08]

    [tool.sheetlint.rules.magnet-temperature]
    alpha = -0.0012

Discovery: from the current directory upwards, the first directory holding a ``sheetlint.toml``,
or a ``pyproject.toml`` with a ``[tool.sheetlint]`` table, gives the configuration; within one
directory ``sheetlint.toml`` comes first. ``--config FILE`` names the file instead,
``--no-config`` ignores every file.

Precedence: a command-line option replaces the file's value of the same name (``--select`` the
file's ``select``, ``--ignore`` its ``ignore``, ``--fail-on`` its ``fail-on``); the file
replaces the defaults. Per-rule options (``rules.<rule-id>.<name>``) go to
``Settings.options[rule][name]``, where relations read them with
``sheet.option(rule, name, default)``.

A configuration file that cannot be read or has a wrong key or value raises
:class:`ConfigError` with a message naming the file; unknown rule ids are warnings.
"""

from __future__ import annotations

import difflib
import math
import tomllib
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from sheetlint.engine.core import SEVERITY_RANK, RuleOption, Settings

SHEETLINT_TOML = "sheetlint.toml"
PYPROJECT_TOML = "pyproject.toml"
DEFAULT_FAIL_ON = "error"
FAIL_ON_CHOICES = ("error", "warning", "info")
TOP_LEVEL_KEYS = ("select", "ignore", "fail-on", "rules")
#: rule ids that findings may carry without a relation in the registry
ENGINE_RULES = ("unreadable",)

OptionValue = bool | float | str | tuple[Any, ...]
#: returns each rule's declared options
OptionDeclarations = Callable[[], Mapping[str, Mapping[str, RuleOption]]]


class ConfigError(Exception):
    """A configuration file that cannot be used; the message names the file and the key."""


@dataclass(slots=True)
class FileConfig:
    """What one configuration file says (``None``: the file does not set it)."""

    path: str | None = None
    select: frozenset[str] | None = None
    ignore: frozenset[str] | None = None
    fail_on: str | None = None
    options: dict[str, dict[str, OptionValue]] = field(default_factory=dict)


@dataclass(slots=True)
class Resolved:
    """The merged result: engine settings, the exit threshold, and where they came from."""

    settings: Settings
    fail_on: str = DEFAULT_FAIL_ON
    config_path: str | None = None
    warnings: list[str] = field(default_factory=list)


# --- discovery --------------------------------------------------------------------------------
def find_config(start: str | Path | None = None) -> Path | None:
    """The configuration file that applies in ``start`` (default: the current directory).

    Walks from ``start`` up to the file-system root; in each directory a ``sheetlint.toml``
    wins over a ``pyproject.toml``, and a ``pyproject.toml`` counts only when it has a
    ``[tool.sheetlint]`` table.
    """
    here = Path(start) if start is not None else Path.cwd()
    try:
        here = here.resolve()
    except OSError:
        return None
    for folder in (here, *here.parents):
        candidate = folder / SHEETLINT_TOML
        if candidate.is_file():
            return candidate
        candidate = folder / PYPROJECT_TOML
        if candidate.is_file() and _pyproject_has_table(candidate):
            return candidate
    return None


def _pyproject_has_table(path: Path) -> bool:
    try:
        text = path.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError):
        return False
    if "sheetlint" not in text:  # cheap: most pyproject files never mention us
        return False
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        # it mentions sheetlint, so the user meant it as configuration: say it is broken
        raise ConfigError(f"{path}: not valid TOML ({exc})") from None
    tool = data.get("tool")
    return isinstance(tool, dict) and "sheetlint" in tool


# --- reading ----------------------------------------------------------------------------------
def read_config(path: str | Path) -> FileConfig:
    """Read and validate one configuration file. Raises :class:`ConfigError`."""
    name = str(path)
    try:
        text = Path(path).read_bytes().decode("utf-8-sig")
    except OSError as exc:
        raise ConfigError(f"{name}: cannot read configuration file "
                          f"({exc.strerror or exc})") from None
    except UnicodeDecodeError as exc:
        raise ConfigError(f"{name}: not UTF-8 text (byte {exc.start})") from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise ConfigError(f"{name}: not valid TOML ({exc})") from None
    if Path(name).name == PYPROJECT_TOML:
        tool = data.get("tool")
        table = tool.get("sheetlint") if isinstance(tool, dict) else None
        if table is None:
            raise ConfigError(f"{name}: has no [tool.sheetlint] table")
        prefix = "tool.sheetlint."
    else:
        table = data
        prefix = ""
    if not isinstance(table, dict):
        raise ConfigError(f"{name}: '{prefix.rstrip('.')}' must be a table")
    return _parse_table(name, table, prefix)


def _parse_table(name: str, table: dict[str, Any], prefix: str) -> FileConfig:
    config = FileConfig(path=name)
    for key, value in table.items():
        where = f"{name}: {prefix}{key}"
        if key == "select":
            config.select = frozenset(_rule_list(where, value))
        elif key == "ignore":
            config.ignore = frozenset(_rule_list(where, value))
        elif key == "fail-on":
            if value not in FAIL_ON_CHOICES:
                raise ConfigError(f"{where}: must be one of {', '.join(FAIL_ON_CHOICES)} "
                                  f"(found {value!r})")
            config.fail_on = value
        elif key == "rules":
            config.options = _rule_options(where, value)
        else:
            hint = ""
            if key == "tool" and not prefix:
                hint = (f"; in {SHEETLINT_TOML} write the keys at the top level, without a "
                        "[tool.sheetlint] header")
            else:
                close = difflib.get_close_matches(key, TOP_LEVEL_KEYS, n=1)
                if close:
                    hint = f"; did you mean '{close[0]}'?"
            raise ConfigError(f"{where}: unknown key (known keys: {', '.join(TOP_LEVEL_KEYS)})"
                              f"{hint}")
    return config


def _rule_list(where: str, value: Any) -> list[str]:
    if isinstance(value, str):
        value = [value]
    if not isinstance(value, list) or not all(isinstance(v, str) and v.strip() for v in value):
        raise ConfigError(f"{where}: must be a list of rule ids, e.g. [\"power-torque-speed\"]")
    return [v.strip() for v in value]


def _rule_options(where: str, value: Any) -> dict[str, dict[str, OptionValue]]:
    if not isinstance(value, dict):
        raise ConfigError(f"{where}: must be a table of rule tables, e.g. "
                          "[tool.sheetlint.rules.voltage-margin]")
    out: dict[str, dict[str, OptionValue]] = {}
    for rule, options in value.items():
        if not isinstance(options, dict):
            raise ConfigError(f"{where}.{rule}: must be a table of options, e.g. "
                              "band = [0.05, 0.08]")
        out[rule] = {name: _option_value(f"{where}.{rule}.{name}", v)
                     for name, v in options.items()}
    return out


def _option_value(where: str, value: Any) -> OptionValue:
    """A rule option: a number (as float), a boolean, a string, or a list of those (a tuple)."""
    if isinstance(value, bool | str):
        return value
    if isinstance(value, int | float):
        number = float(value)
        if not math.isfinite(number):
            raise ConfigError(f"{where}: must be a finite number (found {value!r})")
        return number
    if isinstance(value, list):
        return tuple(_option_value(where, v) for v in value)
    raise ConfigError(f"{where}: must be a number, a boolean, a string or a list of those "
                      f"(found {type(value).__name__})")


# --- merging ----------------------------------------------------------------------------------
def resolve(*, config: str | None = None, use_config: bool = True,
            select: Iterable[str] | None = None, ignore: Iterable[str] | None = None,
            fail_on: str | None = None, start: str | Path | None = None,
            known_rules: Callable[[], Iterable[str]] | None = None,
            known_options: OptionDeclarations | None = None) -> Resolved:
    """Merge defaults, the configuration file and command-line values (the command line wins).

    Parameters
    ----------
    config : str, optional
        ``--config FILE``; when absent the file is found from ``start`` upwards.
    use_config : bool
        False for ``--no-config``: defaults and command line only.
    select, ignore, fail_on
        Command-line values; ``None`` where the option was not given.
    start : path, optional
        Where discovery starts (default: the current directory).
    known_rules : callable, optional
        Returns the rule ids that exist (default: the relation registry); ids not among them
        become warnings.
    known_options : callable, optional
        Returns each rule's declared options (default: the relation registry): a value of
        the wrong kind raises ConfigError, an undeclared option becomes a warning.

    Raises
    ------
    ConfigError
        The configuration file cannot be read or is wrong.
    """
    file_config = FileConfig()
    if config is not None:
        file_config = read_config(config)
    elif use_config:
        found = find_config(start)
        if found is not None:
            file_config = read_config(found)
    if fail_on is not None and fail_on not in SEVERITY_RANK:
        raise ConfigError(f"--fail-on must be one of {', '.join(FAIL_ON_CHOICES)}")
    cli_select = frozenset(select) if select is not None else None
    cli_ignore = frozenset(ignore) if ignore is not None else None
    # an empty --select means every rule, whatever the file selects
    chosen_select = (cli_select or None) if cli_select is not None else file_config.select
    chosen_ignore = cli_ignore if cli_ignore is not None else file_config.ignore
    resolved = Resolved(
        Settings(select=chosen_select, ignore=chosen_ignore or frozenset(),
                 options={rule: dict(opts) for rule, opts in file_config.options.items()}),
        fail_on or file_config.fail_on or DEFAULT_FAIL_ON,
        file_config.path,
    )
    resolved.warnings = _unknown_rule_warnings(file_config, cli_select, cli_ignore, known_rules)
    resolved.warnings += _check_rule_options(file_config, known_options)
    return resolved


def _check_rule_options(file_config: FileConfig,
                        known_options: OptionDeclarations | None) -> list[str]:
    """Each rule option against the rule's declaration: a value of the wrong kind is a
    ConfigError (naming the file and key); an option the rule does not have is a warning."""
    if not file_config.options:
        return []
    if known_options is None:
        from sheetlint.relations.registry import rule_options

        known_options = rule_options
    declared = known_options()
    where = file_config.path or ""
    warnings = []
    for rule, options in file_config.options.items():
        if rule not in declared:
            continue  # an unknown rule is warned about already
        own = declared[rule]
        for name, value in options.items():
            key = f"{where}: rules.{rule}.{name}"
            spec = own.get(name)
            if spec is None:
                close = difflib.get_close_matches(name, list(own), n=1)
                hint = (f"did you mean '{close[0]}'?" if close else
                        f"its options: {', '.join(sorted(own))}" if own else "it has none")
                warnings.append(f"{key}: not an option of {rule} ({hint}); it has no effect")
            elif not _fits(spec, value):
                shown = (f"[{', '.join(repr(v) for v in value)}]" if isinstance(value, tuple)
                         else repr(value))
                expected = ("a number" if spec.kind == "number"
                            else "two numbers [low, high] with low ≤ high")
                raise ConfigError(f"{key}: must be {expected} ({spec.meaning}; found {shown})")
    return warnings


def _fits(spec: RuleOption, value: OptionValue) -> bool:
    def number(v: object) -> bool:
        return isinstance(v, float)  # integers arrive as floats, booleans stay booleans

    if spec.kind == "number":
        return number(value)
    return (isinstance(value, tuple) and len(value) == 2 and number(value[0])
            and number(value[1]) and value[0] <= value[1])  # type: ignore[operator]


def _unknown_rule_warnings(file_config: FileConfig, cli_select: frozenset[str] | None,
                           cli_ignore: frozenset[str] | None,
                           known_rules: Callable[[], Iterable[str]] | None) -> list[str]:
    mentioned: list[tuple[str, str]] = []
    where = file_config.path or ""
    for rule in sorted(file_config.select or ()):
        mentioned.append((rule, f"{where}: select"))
    for rule in sorted(file_config.ignore or ()):
        mentioned.append((rule, f"{where}: ignore"))
    for rule in file_config.options:
        mentioned.append((rule, f"{where}: rules.{rule}"))
    for rule in sorted(cli_select or ()):
        mentioned.append((rule, "--select"))
    for rule in sorted(cli_ignore or ()):
        mentioned.append((rule, "--ignore"))
    if not mentioned:
        return []
    if known_rules is None:
        from sheetlint.relations.registry import rule_ids

        known_rules = rule_ids
    known = sorted({*known_rules(), *ENGINE_RULES})
    warnings = []
    for rule, place in mentioned:
        if rule in known:
            continue
        close = difflib.get_close_matches(rule, known, n=1)
        hint = f" (did you mean '{close[0]}'?)" if close else ""
        warnings.append(f"{place}: unknown rule '{rule}'{hint}; it has no effect")
    return warnings


def split_rule_list(text: str | None) -> frozenset[str] | None:
    """A comma-separated command-line list of rule ids; ``None`` when not given."""
    if text is None:
        return None
    return frozenset(t.strip() for t in text.split(",") if t.strip())
