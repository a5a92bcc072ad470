"""Configuration files, their discovery and the merge with the command line (config.py),
and the progress line of long batches (progress.py)."""

from __future__ import annotations

import io
import json
from pathlib import Path

import pytest

from sheetlint.cli import main
from sheetlint.config import ConfigError, find_config, read_config, resolve
from sheetlint.progress import with_progress
from tests.conftest import pmx15

KNOWN = ("power-torque-speed", "voltage-margin", "magnet-temperature", "emf-constant",
         "resistance-drop")

#: spm, U = 398 V, Ke = 180 V/krpm: E = 270 V at 1500 rpm, a margin of +47 % (far above the
#: 6-7 % band of common practice) -> voltage-margin warning with the default options (398 V,
#: not 400 V: a supply class listed as rated voltage is only an info). Current and cos φ are
#: left out: with them, T/I against √3·Ke would show that no Ke reconciles such a sheet.
WIDE_MARGIN = (pmx15("Invented PMX-15W", ke="180 V/krpm").replace('"400 V"', '"398 V"')
               .replace('  current: "26.5 A"\n', "").replace("  power_factor: 0.9\n", ""))
#: torque 15 % above P/omega: power-torque-speed error (P = T*omega, SI definition)
PLANTED = WIDE_MARGIN.replace('"95.5 N*m"', '"110 N*m"')


def _known() -> tuple[str, ...]:
    return KNOWN


# --- discovery ------------------------------------------------------------------------------
def test_discovery_walks_up_and_skips_pyproject_without_table(tmp_path: Path):
    (tmp_path / "sheetlint.toml").write_text('fail-on = "warning"\n', encoding="utf-8")
    project = tmp_path / "project"
    (project / "motors" / "deep").mkdir(parents=True)
    (project / "pyproject.toml").write_text('[project]\nname = "x"\n', encoding="utf-8")
    assert find_config(project / "motors" / "deep") == (tmp_path / "sheetlint.toml").resolve()


def test_discovery_takes_pyproject_with_tool_sheetlint(tmp_path: Path):
    (tmp_path / "sheetlint.toml").write_text("", encoding="utf-8")
    project = tmp_path / "project"
    (project / "motors").mkdir(parents=True)
    (project / "pyproject.toml").write_text('[tool.sheetlint]\nfail-on = "info"\n',
                                            encoding="utf-8")
    assert find_config(project / "motors") == (project / "pyproject.toml").resolve()
    assert read_config(find_config(project / "motors")).fail_on == "info"


def test_sheetlint_toml_wins_over_pyproject_in_the_same_folder(tmp_path: Path):
    (tmp_path / "pyproject.toml").write_text('[tool.sheetlint]\nfail-on = "info"\n',
                                             encoding="utf-8")
    (tmp_path / "sheetlint.toml").write_text('fail-on = "warning"\n', encoding="utf-8")
    assert find_config(tmp_path) == (tmp_path / "sheetlint.toml").resolve()


# --- reading --------------------------------------------------------------------------------
def test_pyproject_table_gives_only_skip_exclude_severity_fail_on_and_tuning(tmp_path: Path):
    path = tmp_path / "pyproject.toml"
    path.write_text("""
[tool.sheetlint]
only = ["power-torque-speed", "voltage-margin"]
skip = ["resistance-drop"]
exclude = ["archive/**"]
fail-on = "warning"

[tool.sheetlint.severity]
voltage-margin = "error"

[tool.sheetlint.tuning.voltage-margin]
band = [0.05, 0.08]

[tool.sheetlint.tuning.emf-constant]
allowance = 0.1

[tool.sheetlint.tuning.magnet-temperature]
alpha = -0.0012
""", encoding="utf-8")
    config = read_config(path)
    assert config.only == {"power-torque-speed", "voltage-margin"}
    assert config.skip == {"resistance-drop"}
    assert config.exclude == ("archive/**",)
    assert config.severity == {"voltage-margin": "error"}
    assert config.fail_on == "warning"
    assert config.options == {"voltage-margin": {"band": (0.05, 0.08)},
                              "emf-constant": {"allowance": 0.1},
                              "magnet-temperature": {"alpha": -0.0012}}
    resolved = resolve(config=str(path), known_rules=_known, exclude=["old/*"])
    assert resolved.exclude == ("archive/**", "old/*")
    settings = resolved.settings
    assert settings.severity == {"voltage-margin": "error"}
    assert settings.option("voltage-margin", "band", None) == (0.05, 0.08)
    assert settings.option("magnet-temperature", "alpha", None) == -0.0012
    assert settings.option("emf-constant", "missing", "default") == "default"


@pytest.mark.parametrize(("text", "needle"), [
    ("only = [\n", "not valid TOML"),
    ('fail_on = "warning"\n', "did you mean 'fail-on'"),
    ('fail-on = "fatal"\n', "must be one of error, warning, info"),
    ("only = [1, 2]\n", "list of rule ids"),
    ("exclude = [1]\n", "list of file globs"),
    ('[severity]\noverspeed-emf = "fatal"\n', "must be one of error, warning, info"),
    ('select = ["power-torque-speed"]\n', "unknown key"),
    ('ignore = ["power-torque-speed"]\n', "unknown key"),
    ("[rules.voltage-margin]\nband = [0.05, 0.08]\n", "unknown key"),
    ('[tool.sheetlint]\nfail-on = "info"\n', "without a [tool.sheetlint] header"),
    ("tuning = 3\n", "table of rule tables"),
    ("[tuning.voltage-margin]\nband = { low = 1 }\n", "must be a number"),
    ("[tuning.voltage-margin]\nband = nan\n", "finite"),
])
def test_bad_configuration_is_a_config_error_naming_the_file(tmp_path: Path, text: str,
                                                             needle: str):
    path = tmp_path / "sheetlint.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(ConfigError) as caught:
        read_config(path)
    assert str(path) in str(caught.value)
    assert needle in str(caught.value)


def test_pyproject_named_by_config_must_have_the_table(tmp_path: Path):
    path = tmp_path / "pyproject.toml"
    path.write_text('[project]\nname = "x"\n', encoding="utf-8")
    with pytest.raises(ConfigError, match=r"no \[tool.sheetlint\] table"):
        read_config(path)


# --- merging --------------------------------------------------------------------------------
def test_command_line_wins_over_file_and_file_over_defaults(tmp_path: Path):
    (tmp_path / "sheetlint.toml").write_text(
        'only = ["voltage-margin"]\nskip = ["emf-constant"]\nfail-on = "warning"\n',
        encoding="utf-8")
    from_file = resolve(start=tmp_path, known_rules=_known)
    assert from_file.settings.only == {"voltage-margin"}
    assert from_file.settings.skip == {"emf-constant"}
    assert from_file.fail_on == "warning"
    assert from_file.config_path == str((tmp_path / "sheetlint.toml").resolve())
    cli = resolve(start=tmp_path, only=["power-torque-speed"], skip=[], fail_on="error",
                  known_rules=_known)
    assert cli.settings.only == {"power-torque-speed"}
    assert cli.settings.skip == frozenset()
    assert cli.fail_on == "error"
    defaults = resolve(start=tmp_path, use_config=False, known_rules=_known)
    assert defaults.settings.only is None and defaults.fail_on == "error"
    assert defaults.config_path is None


@pytest.mark.parametrize(("text", "cli", "needle"), [
    ('skip = ["voltage-margn"]\n', {}, "skip: unknown rule 'voltage-margn' (did you mean "
                                        "'voltage-margin'?)"),
    ("[tuning.no-such-rule]\nx = 1\n", {}, "tuning.no-such-rule: unknown rule"),
    ('[severity]\noverspeed-emf = "error"\n', {}, "severity.overspeed-emf: unknown rule"),
    ("", {"only": ["power-torque-speed", "bogus"]}, "--only: unknown rule 'bogus'"),
    ("", {"skip": ["power-torque-sped"]}, "did you mean 'power-torque-speed'"),
])
def test_an_unknown_rule_anywhere_is_a_config_error_with_a_suggestion(
        tmp_path: Path, text: str, cli: dict[str, list[str]], needle: str):
    # a typo must never turn every rule off and let the file pass
    (tmp_path / "sheetlint.toml").write_text(text, encoding="utf-8")
    with pytest.raises(ConfigError) as caught:
        resolve(start=tmp_path, known_rules=_known, **cli)  # type: ignore[arg-type]
    assert needle in str(caught.value)


# --- through the command line -----------------------------------------------------------------
def _check(capsys: pytest.CaptureFixture[str], *argv: str) -> tuple[int, str, str]:
    status = main(["check", *argv])
    out = capsys.readouterr()
    return status, out.out, out.err


def test_config_skip_and_cli_override_change_the_exit_status(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "m.yaml").write_text(PLANTED, encoding="utf-8")
    assert _check(capsys, "m.yaml", "--no-settings")[0] == 1
    (tmp_path / "pyproject.toml").write_text(
        '[tool.sheetlint]\nskip = ["power-torque-speed"]\n', encoding="utf-8")
    status, out, _ = _check(capsys, "m.yaml")
    assert status == 0 and "power-torque-speed" not in out
    # the command line replaces the file's skip list
    status, out, _ = _check(capsys, "m.yaml", "--skip", "resistance-drop")
    assert status == 1 and "power-torque-speed" in out


def test_fail_on_from_config_and_cli(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                     capsys: pytest.CaptureFixture[str]):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "m.yaml").write_text(WIDE_MARGIN, encoding="utf-8")
    status, out, _ = _check(capsys, "m.yaml", "--format", "json", "--no-settings")
    findings = json.loads(out)["files"][0]["records"][0]["findings"]
    assert not [f for f in findings if f["severity"] == "error"]
    assert any(f["rule"] == "voltage-margin" and f["severity"] == "warning" for f in findings)
    assert status == 0
    (tmp_path / "sheetlint.toml").write_text('fail-on = "warning"\n', encoding="utf-8")
    assert _check(capsys, "m.yaml")[0] == 1
    assert _check(capsys, "m.yaml", "--fail-on", "error")[0] == 0


def test_rule_options_reach_the_relation(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                         capsys: pytest.CaptureFixture[str]):
    # voltage-margin reads band and warn through sheet.option; widening warn to 90 % turns
    # the +48 % warning into an info that quotes the configured band
    monkeypatch.chdir(tmp_path)
    (tmp_path / "m.yaml").write_text(WIDE_MARGIN, encoding="utf-8")
    (tmp_path / "sheetlint.toml").write_text(
        "[tuning.voltage-margin]\nband = [0.05, 0.08]\nwarn = [0.0, 0.9]\n", encoding="utf-8")
    status, out, err = _check(capsys, "m.yaml", "--format", "json")
    assert err == ""
    assert status == 0
    margin = [f for f in json.loads(out)["files"][0]["records"][0]["findings"]
              if f["rule"] == "voltage-margin"]
    assert len(margin) == 1
    assert margin[0]["severity"] == "info"
    assert "5%–8%" in margin[0]["message"]


def test_bad_config_is_exit_2_with_a_message_not_a_traceback(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "m.yaml").write_text(WIDE_MARGIN, encoding="utf-8")
    (tmp_path / "sheetlint.toml").write_text("only = [\n", encoding="utf-8")
    status, out, err = _check(capsys, "m.yaml")
    assert status == 2
    assert out == ""
    assert err.startswith("sheetlint: ") and "sheetlint.toml" in err
    assert "Traceback" not in err
    status, _, err = _check(capsys, "m.yaml", "--settings", "nowhere.toml")
    assert status == 2 and "cannot read configuration file" in err
    # --no-settings ignores the broken file
    assert _check(capsys, "m.yaml", "--no-settings")[0] == 0


def test_unknown_rule_in_settings_or_on_the_command_line_is_exit_2(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "m.yaml").write_text(WIDE_MARGIN, encoding="utf-8")
    status, out, err = _check(capsys, "m.yaml", "--no-settings", "--only", "power-torque-sped")
    assert status == 2 and out == ""
    assert "did you mean 'power-torque-speed'" in err and "Traceback" not in err
    (tmp_path / "sheetlint.toml").write_text('skip = ["power-torque-sped"]\n',
                                             encoding="utf-8")
    status, out, err = _check(capsys, "m.yaml")
    assert status == 2 and out == ""
    assert "sheetlint.toml: skip: unknown rule 'power-torque-sped'" in err


def test_severity_table_raises_a_rule_to_error_and_fails_the_run(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]):
    # the +48 % voltage margin is a warning by default (exit 0); severity makes it an error
    monkeypatch.chdir(tmp_path)
    (tmp_path / "m.yaml").write_text(WIDE_MARGIN, encoding="utf-8")
    assert _check(capsys, "m.yaml", "--no-settings")[0] == 0
    (tmp_path / "sheetlint.toml").write_text('[severity]\nvoltage-margin = "error"\n',
                                             encoding="utf-8")
    status, out, _ = _check(capsys, "m.yaml")
    assert status == 1
    assert "error    voltage-margin" in out


def test_exclude_globs_from_settings_and_command_line_leave_files_out(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "motors" / "archive").mkdir(parents=True)
    (tmp_path / "motors" / "good.yaml").write_text(WIDE_MARGIN, encoding="utf-8")
    (tmp_path / "motors" / "archive" / "old.yaml").write_text(PLANTED, encoding="utf-8")
    (tmp_path / "motors" / "draft.yaml").write_text(PLANTED, encoding="utf-8")
    assert _check(capsys, "motors", "--no-settings")[0] == 1
    (tmp_path / "sheetlint.toml").write_text('exclude = ["motors/archive/**"]\n',
                                             encoding="utf-8")
    status, out, _ = _check(capsys, "motors", "--exclude", "draft.yaml")
    assert status == 0, out
    assert "Checked 1 file," in out
    # a file named on the command line is excluded too (pre-commit names every file)
    status, out, _ = _check(capsys, "motors/archive/old.yaml", "motors/good.yaml")
    assert status == 0 and "Checked 1 file," in out


@pytest.mark.parametrize(("text", "needle"), [
    # each is a value every relation would have choked on: float() of a list raised a
    # TypeError ("internal error"), a text band a ValueError blamed on the sheet's values
    ("[tuning.temperature-rise]\nreference_temperature_spread_k = [1, 2]\n",
     "tuning.temperature-rise.reference_temperature_spread_k: must be a number"),
    ('[tuning.voltage-margin]\nband = "x"\n',
     "tuning.voltage-margin.band: must be two numbers [low, high]"),
    ("[tuning.voltage-margin]\nwarn = [0.3, 0.1]\n", "with low ≤ high"),
    ("[tuning.voltage-margin]\nband = [0.05]\n", "found [0.05]"),
    ("[tuning.pull-out-margin]\nmin_ratio = true\n", "must be a number"),
])
def test_a_rule_option_of_the_wrong_kind_is_exit_2_naming_the_file_and_key(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str],
        text: str, needle: str):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "m.yaml").write_text(WIDE_MARGIN, encoding="utf-8")
    (tmp_path / "sheetlint.toml").write_text(text, encoding="utf-8")
    status, out, err = _check(capsys, "m.yaml")
    assert status == 2 and out == ""
    assert "sheetlint.toml" in err and needle in err
    assert "internal error" not in err and "Traceback" not in err


def test_an_option_the_rule_does_not_have_warns_with_the_likely_name(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "m.yaml").write_text(WIDE_MARGIN, encoding="utf-8")
    (tmp_path / "sheetlint.toml").write_text(
        "[tuning.voltage-margin]\nbnd = [0.05, 0.08]\n[tuning.power-torque-speed]\nx = 1\n",
        encoding="utf-8")
    status, _out, err = _check(capsys, "m.yaml")
    assert status == 0  # the +48 % margin is a warning; the options change nothing
    assert "tuning.voltage-margin.bnd: not an option of voltage-margin (did you mean 'band'?)" \
        in err
    assert "tuning.power-torque-speed.x: not an option of power-torque-speed (it has none)" in err


def test_every_option_a_relation_reads_is_declared_and_explained():
    # sheet.option(rule, "name", ...) and _option_band(sheet, rule, "name", ...) in the
    # relations' source against the options the reading class's rule declares, so that a
    # configuration value is checked before any relation reads it
    import re

    from sheetlint.relations.registry import all_relations, rule_options
    from sheetlint.rules_doc import rule_text

    declared = rule_options()
    rule_of_class = {type(r).__name__: r.rule for r in all_relations()}
    pattern = re.compile(r'(?:\.option|_option_band)\(\s*(?:sheet,\s*)?([^,]+),\s*f?"([^"]*)"')
    source_dir = Path(__file__).resolve().parent.parent / "sheetlint" / "relations"
    reads = 0
    for path in sorted(source_dir.glob("*.py")):
        text = path.read_text(encoding="utf-8")
        for match in pattern.finditer(text):
            rule_expr, name = match.group(1).strip(), match.group(2)
            if rule_expr.startswith('"'):
                rule = rule_expr.strip('"')
            else:  # self.rule or rule: the rule of the class the call is in
                owner = re.findall(r"^class (\w+)\(", text[:match.start()], re.MULTILINE)
                rule = rule_of_class[owner[-1]]
            names = ([name.replace("{name}", n) for n in ("torque", "current")]
                     if "{name}" in name else [name])
            for option in names:
                assert option in declared.get(rule, {}), (path.name, rule, option)
            reads += 1
    assert reads >= 19, "fewer option reads found than exist: the pattern is stale"
    for rule, options in declared.items():
        text = rule_text(rule) or ""
        for name in options:
            assert f"  {name} = " in text, (rule, name)


# --- progress ---------------------------------------------------------------------------------
class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_progress_is_silent_when_stderr_is_not_a_terminal():
    stream = io.StringIO()
    items = list(with_progress(range(50), total=50, stream=stream, delay=0.0, interval=0.0))
    assert items == list(range(50))
    assert stream.getvalue() == ""


def test_progress_draws_and_wipes_its_line_on_a_terminal(monkeypatch: pytest.MonkeyPatch):
    monkeypatch.setenv("TERM", "xterm")
    ticks = iter(float(i) for i in range(1000))
    stream = _Terminal()
    items = list(with_progress(["a.yaml", "b.yaml", "c.yaml"], total=lambda: 3,
                               label=str, stream=stream, delay=1.5, interval=0.0,
                               clock=lambda: next(ticks)))
    assert items == ["a.yaml", "b.yaml", "c.yaml"]
    text = stream.getvalue()
    assert "sheetlint: 1/3 files" not in text  # before the delay
    assert "sheetlint: 3/3 files  c.yaml" in text
    assert text.endswith("\r")  # the line is wiped before the report is written


def test_short_batch_on_a_terminal_prints_nothing(monkeypatch: pytest.MonkeyPatch):
    monkeypatch.setenv("TERM", "xterm")
    stream = _Terminal()
    list(with_progress(range(3), total=3, stream=stream, clock=lambda: 0.0))
    assert stream.getvalue() == ""
