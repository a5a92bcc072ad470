"""Configuration: defaults, a settings file and command-line options, merged in one place.

A project configures sheetlint in ``sheetlint.toml`` (keys at the top level) or in
``pyproject.toml`` under ``[tool.sheetlint]``::

    [tool.sheetlint]
    only = ["power-torque-speed", "voltage-margin"]     # check only these (default: all)
    skip = ["resistance-drop"]                          # never check these
    exclude = ["archive/**", "**/package.json"]         # files a folder walk leaves out
    fail-on = "warning"                                 # lowest severity giving exit status 1

    [tool.sheetlint.severity]                           # raise or lower a rule
    overspeed-emf = "error"

    [tool.sheetlint.tuning.voltage-margin]              # a rule's tunable values
    band = [0.05, 0.08]

Discovery: from the current directory upwards, the first directory holding a ``sheetlint.toml``,
or a ``pyproject.toml`` with a ``[tool.sheetlint]`` table, gives the settings; within one
directory ``sheetlint.toml`` comes first. ``--settings FILE`` names the file instead,
``--no-settings`` ignores every file.

Precedence: a command-line option replaces the file's value of the same name (``--only`` the
file's ``only``, ``--skip`` its ``skip``, ``--fail-on`` its ``fail-on``); ``--exclude`` adds
to the file's ``exclude``; the file replaces the defaults. Tuning values
(``tuning.<rule-id>.<name>``) go to ``Settings.options[rule][name]``, where relations read
them with ``sheet.option(rule, name, default)``.

A settings file that cannot be read, has a wrong key or value, or names a rule that does not
exist raises :class:`ConfigError` with a message naming the file and the key; so does an
unknown rule given with ``--only`` or ``--skip`` (a typo must never switch every rule off).
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
TOP_LEVEL_KEYS = ("only", "skip", "exclude", "fail-on", "severity", "tuning")
SEVERITY_CHOICES = ("error", "warning", "info")
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
    only: frozenset[str] | None = None
    skip: frozenset[str] | None = None
    exclude: tuple[str, ...] = ()
    fail_on: str | None = None
    severity: dict[str, str] = field(default_factory=dict)
    options: dict[str, dict[str, OptionValue]] = field(default_factory=dict)


@dataclass(slots=True)
class Resolved:
    """The merged result: engine settings, the exit threshold, and where they came from."""

    settings: Settings
    fail_on: str = DEFAULT_FAIL_ON
    config_path: str | None = None
    warnings: list[str] = field(default_factory=list)
    #: globs of files to leave out (the file's ``exclude`` plus ``--exclude``)
    exclude: tuple[str, ...] = ()


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
        if key == "only":
            config.only = frozenset(_rule_list(where, value))
        elif key == "skip":
            config.skip = frozenset(_rule_list(where, value))
        elif key == "exclude":
            config.exclude = tuple(_glob_list(where, value))
        elif key == "severity":
            config.severity = _severity_table(where, value)
        elif key == "fail-on":
            if value not in FAIL_ON_CHOICES:
                raise ConfigError(f"{where}: must be one of {', '.join(FAIL_ON_CHOICES)} "
                                  f"(found {value!r})")
            config.fail_on = value
        elif key == "tuning":
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


def _glob_list(where: str, value: Any) -> list[str]:
    if isinstance(value, str):
        value = [value]
    if not isinstance(value, list) or not all(isinstance(v, str) and v.strip() for v in value):
        raise ConfigError(f"{where}: must be a list of file globs, e.g. [\"archive/**\"]")
    return [v.strip() for v in value]


def _severity_table(where: str, value: Any) -> dict[str, str]:
    if not isinstance(value, dict):
        raise ConfigError(f"{where}: must be a table rule = level, e.g. "
                          "overspeed-emf = \"error\"")
    out = {}
    for rule, level in value.items():
        if level not in SEVERITY_CHOICES:
            raise ConfigError(f"{where}.{rule}: must be one of {', '.join(SEVERITY_CHOICES)} "
                              f"(found {level!r})")
        out[rule] = level
    return out


def _rule_options(where: str, value: Any) -> dict[str, dict[str, OptionValue]]:
    if not isinstance(value, dict):
        raise ConfigError(f"{where}: must be a table of rule tables, e.g. "
                          "[tool.sheetlint.tuning.voltage-margin]")
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
            only: Iterable[str] | None = None, skip: Iterable[str] | None = None,
            fail_on: str | None = None, exclude: Iterable[str] | None = None,
            start: str | Path | None = None,
            known_rules: Callable[[], Iterable[str]] | None = None,
            known_options: OptionDeclarations | None = None) -> Resolved:
    """Merge defaults, the settings file and command-line values (the command line wins).

    Parameters
    ----------
    config : str, optional
        ``--settings FILE``; when absent the file is found from ``start`` upwards.
    use_config : bool
        False for ``--no-settings``: defaults and command line only.
    only, skip, fail_on
        Command-line values; ``None`` where the option was not given.
    exclude : iterable of str, optional
        ``--exclude`` globs, added to the file's ``exclude``.
    start : path, optional
        Where discovery starts (default: the current directory).
    known_rules : callable, optional
        Returns the rule ids that exist (default: the relation registry).
    known_options : callable, optional
        Returns each rule's declared options (default: the relation registry): a value of
        the wrong kind raises ConfigError, an undeclared option becomes a warning.

    Raises
    ------
    ConfigError
        The settings file cannot be read or is wrong, or a rule named anywhere does not exist.
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
    cli_only = frozenset(only) if only is not None else None
    cli_skip = frozenset(skip) if skip is not None else None
    _refuse_unknown_rules(file_config, cli_only, cli_skip, known_rules)
    # an empty --only means every rule, whatever the file chooses
    chosen_only = (cli_only or None) if cli_only is not None else file_config.only
    chosen_skip = cli_skip if cli_skip is not None else file_config.skip
    resolved = Resolved(
        Settings(only=chosen_only, skip=chosen_skip or frozenset(),
                 options={rule: dict(opts) for rule, opts in file_config.options.items()},
                 severity=dict(file_config.severity)),
        fail_on or file_config.fail_on or DEFAULT_FAIL_ON,
        file_config.path,
    )
    resolved.exclude = (*file_config.exclude, *(exclude or ()))
    resolved.warnings = _check_rule_options(file_config, known_options)
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
            continue  # an unknown rule is refused already
        own = declared[rule]
        for name, value in options.items():
            key = f"{where}: tuning.{rule}.{name}"
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
    if not (isinstance(value, tuple) and len(value) == 2):
        return False
    low, high = value
    return isinstance(low, float) and isinstance(high, float) and low <= high


def _refuse_unknown_rules(file_config: FileConfig, cli_only: frozenset[str] | None,
                         cli_skip: frozenset[str] | None,
                         known_rules: Callable[[], Iterable[str]] | None) -> None:
    """Raise ConfigError for the first rule id, in the file or on the command line, that does
    not exist (with the closest known id as a hint)."""
    mentioned: list[tuple[str, str]] = []
    where = file_config.path or ""
    for rule in sorted(file_config.only or ()):
        mentioned.append((rule, f"{where}: only"))
    for rule in sorted(file_config.skip or ()):
        mentioned.append((rule, f"{where}: skip"))
    for rule in file_config.severity:
        mentioned.append((rule, f"{where}: severity.{rule}"))
    for rule in file_config.options:
        mentioned.append((rule, f"{where}: tuning.{rule}"))
    for rule in sorted(cli_only or ()):
        mentioned.append((rule, "--only"))
    for rule in sorted(cli_skip or ()):
        mentioned.append((rule, "--skip"))
    if not mentioned:
        return
    if known_rules is None:
        from sheetlint.relations.registry import rule_ids

        known_rules = rule_ids
    known = sorted({*known_rules(), *ENGINE_RULES})
    problems = []
    for rule, place in mentioned:
        if rule in known:
            continue
        close = difflib.get_close_matches(rule, known, n=1)
        hint = f" (did you mean '{close[0]}'?)" if close else ""
        problems.append(f"{place}: unknown rule '{rule}'{hint}")
    if problems:
        raise ConfigError("; ".join(problems) + "; `sheetlint rules` lists the rules")


def split_rule_list(text: str | None) -> frozenset[str] | None:
    """A comma-separated command-line list of rule ids; ``None`` when not given."""
    if text is None:
        return None
    return frozenset(t.strip() for t in text.split(",") if t.strip())
