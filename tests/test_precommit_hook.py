"""The pre-commit hook of ``.pre-commit-hooks.yaml``, run by pre-commit on a temporary git
repository. No network: the hook definition from our manifest is used as a ``repo: local``
hook with ``language: system`` pointing at the installed ``sheetlint``."""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys
from pathlib import Path
from typing import Any

import pytest
import yaml

ROOT = Path(__file__).resolve().parent.parent
MANIFEST = ROOT / ".pre-commit-hooks.yaml"
BIN = Path(sys.executable).parent

GOOD = """\
id: "Invented PMX-15"
machine: {topology: spm, poles: 8}
rated: {power: "15 kW", torque: "95.5 N*m", speed: "1500 rpm", frequency: "100 Hz",
        voltage: "400 V", current: "26.5 A", power_factor: 0.9, efficiency: "94 %"}
emf: {constant: "240 V/krpm"}
"""
#: torque 15 % above P/omega: power-torque-speed error (P = T*omega, SI definition)
BAD = GOOD.replace('"95.5 N*m"', '"110 N*m"').replace("PMX-15", "PMX-15T")


def _tool(name: str) -> str | None:
    local = BIN / name
    return str(local) if local.exists() else shutil.which(name)


GIT = shutil.which("git")
PRE_COMMIT = _tool("pre-commit")
SHEETLINT = _tool("sheetlint")
pytestmark = [
    pytest.mark.skipif(GIT is None, reason="git is not installed"),
    pytest.mark.skipif(PRE_COMMIT is None, reason="pre-commit is not installed"),
    pytest.mark.skipif(SHEETLINT is None, reason="the sheetlint command is not installed"),
]


def _hook(hook_id: str) -> dict[str, Any]:
    hooks = yaml.safe_load(MANIFEST.read_text(encoding="utf-8"))
    return next(h for h in hooks if h["id"] == hook_id)


def _env(tmp_path: Path) -> dict[str, str]:
    env = dict(os.environ)
    env.update({
        "PRE_COMMIT_HOME": str(tmp_path / "pre-commit-cache"),
        "PATH": f"{BIN}{os.pathsep}{env.get('PATH', '')}",
        "GIT_AUTHOR_NAME": "Test", "GIT_AUTHOR_EMAIL": "test@example.invalid",
        "GIT_COMMITTER_NAME": "Test", "GIT_COMMITTER_EMAIL": "test@example.invalid",
        "GIT_CONFIG_NOSYSTEM": "1", "HOME": str(tmp_path),
    })
    env.pop("PRE_COMMIT", None)
    return env


def _run(args: list[str], cwd: Path, env: dict[str, str]) -> subprocess.CompletedProcess[str]:
    return subprocess.run(args, cwd=cwd, env=env, capture_output=True, text=True, timeout=120,
                          check=False)


@pytest.fixture
def repo(tmp_path: Path) -> tuple[Path, dict[str, str]]:
    """A git repository whose .pre-commit-config.yaml uses our manifest's hook locally."""
    env = _env(tmp_path)
    work = tmp_path / "motor-data"
    work.mkdir()
    assert _run([GIT, "init", "-q"], work, env).returncode == 0
    hook = dict(_hook("sheetlint"))
    hook.update({"entry": f"{SHEETLINT} {hook['entry'].split(' ', 1)[1]}",
                 "language": "system"})
    hook.pop("minimum_pre_commit_version", None)
    config = {"repos": [{"repo": "local", "hooks": [hook]}]}
    (work / ".pre-commit-config.yaml").write_text(yaml.safe_dump(config), encoding="utf-8")
    (work / "motors").mkdir()
    (work / "motors" / "good.yaml").write_text(GOOD, encoding="utf-8")
    assert _run([GIT, "add", "."], work, env).returncode == 0
    return work, env


def test_manifest_is_valid_for_pre_commit(tmp_path: Path):
    result = _run([PRE_COMMIT, "validate-manifest", str(MANIFEST)], ROOT, _env(tmp_path))
    assert result.returncode == 0, result.stdout + result.stderr
    hook = _hook("sheetlint")
    assert hook["entry"] == "sheetlint check"
    assert hook["require_serial"] is True and hook["verbose"] is True
    assert set(hook["types_or"]) == {"json", "yaml"}


def test_hook_passes_consistent_record_and_skips_dot_files(repo: tuple[Path, dict[str, str]]):
    work, env = repo
    result = _run([PRE_COMMIT, "run", "--all-files"], work, env)
    # .pre-commit-config.yaml is YAML but no record: were it checked, exit status 2
    assert result.returncode == 0, result.stdout + result.stderr
    assert "Passed" in result.stdout


def test_hook_rejects_a_commit_with_a_planted_error(repo: tuple[Path, dict[str, str]]):
    work, env = repo
    assert _run([PRE_COMMIT, "install"], work, env).returncode == 0
    first = _run([GIT, "commit", "-q", "-m", "good data"], work, env)
    assert first.returncode == 0, first.stdout + first.stderr
    (work / "motors" / "bad.yaml").write_text(BAD, encoding="utf-8")
    _run([GIT, "add", "motors/bad.yaml"], work, env)
    second = _run([GIT, "commit", "-q", "-m", "bad data"], work, env)
    output = second.stdout + second.stderr
    assert second.returncode != 0, output
    assert "Failed" in output
    assert "power-torque-speed" in output and "motors/bad.yaml" in output
    log = _run([GIT, "log", "--oneline"], work, env).stdout.splitlines()
    assert len(log) == 1  # the bad commit did not happen


# --- the manifest as a user gets it: pre-commit try-repo against a local clone -------------------
FIXTURES = ROOT / "fixtures"
WORKFLOW = "name: data checks\non: [push]\njobs:\n  check:\n    runs-on: ubuntu-latest\n"


@pytest.fixture
def hook_clone(tmp_path: Path) -> tuple[Path, dict[str, str]]:
    """A clone of this repository whose manifest runs the installed sheetlint (no network:
    ``language: system`` instead of building a Python environment from the registry)."""
    env = _env(tmp_path)
    if not (ROOT / ".git").exists():
        pytest.skip("not a git checkout")
    clone = tmp_path / "sheetlint-clone"
    result = _run([GIT, "clone", "-q", "--depth", "1", f"file://{ROOT}", str(clone)], tmp_path,
                  env)
    if result.returncode != 0:
        pytest.skip(f"cannot clone this checkout: {result.stderr.strip()[:200]}")
    # the working tree's manifest (it may be newer than the last commit)
    hooks = yaml.safe_load(MANIFEST.read_text(encoding="utf-8"))
    for hook in hooks:
        command = hook["entry"].split(" ", 1)
        hook["entry"] = " ".join([SHEETLINT, *command[1:]])
        hook["language"] = "system"
    (clone / ".pre-commit-hooks.yaml").write_text(yaml.safe_dump(hooks), encoding="utf-8")
    assert _run([GIT, "commit", "-q", "-am", "run the installed sheetlint"], clone,
                env).returncode == 0
    return clone, env


def _motor_repository(tmp_path: Path, env: dict[str, str], copies: int) -> Path:
    work = tmp_path / "motor-data"
    (work / "motors").mkdir(parents=True)
    assert _run([GIT, "init", "-q"], work, env).returncode == 0
    # a safety warning (overspeed-emf) and no error: the hook passes and must still show it
    warning = (FIXTURES / "planted-emf-above-voltage.yaml").read_text(encoding="utf-8")
    (work / "motors" / "hv.yaml").write_text(warning, encoding="utf-8")
    for i in range(copies):
        (work / "motors" / f"good-{i:02d}.yaml").write_text(
            GOOD.replace("PMX-15", f"PMX-15-{i:02d}"), encoding="utf-8")
    (work / "package.json").write_text('{"name": "motor-data-site", "version": "1.0.0"}',
                                       encoding="utf-8")
    (work / "ci").mkdir()
    (work / "ci" / "checks.yml").write_text(WORKFLOW, encoding="utf-8")
    assert _run([GIT, "add", "."], work, env).returncode == 0
    return work


def test_try_repo_passes_shows_the_safety_warning_and_prints_one_summary(
        tmp_path: Path, hook_clone: tuple[Path, dict[str, str]]):
    clone, env = hook_clone
    # 30 files: pre-commit would split them over the CPUs without require_serial
    work = _motor_repository(tmp_path, env, copies=30)
    result = _run([PRE_COMMIT, "try-repo", str(clone), "sheetlint", "--all-files"], work, env)
    output = result.stdout + result.stderr
    assert result.returncode == 0, output  # package.json and the workflow are skipped
    assert "Passed" in output
    assert "overspeed-emf" in output and "safety: read the cautions" in output
    assert output.count("Checked ") == 1, output
    assert "Checked 33 files, 31 records" in output
    assert "2 files skipped" in output


def test_try_repo_fails_on_a_safety_warning_raised_by_the_settings(
        tmp_path: Path, hook_clone: tuple[Path, dict[str, str]]):
    clone, env = hook_clone
    work = _motor_repository(tmp_path, env, copies=1)
    (work / "sheetlint.toml").write_text('[severity]\noverspeed-emf = "error"\n',
                                         encoding="utf-8")
    result = _run([PRE_COMMIT, "try-repo", str(clone), "sheetlint", "--all-files"], work, env)
    output = result.stdout + result.stderr
    assert result.returncode != 0, output
    assert "Failed" in output and "error    overspeed-emf" in output


def test_try_repo_repository_hook_checks_everything_once(
        tmp_path: Path, hook_clone: tuple[Path, dict[str, str]]):
    clone, env = hook_clone
    work = _motor_repository(tmp_path, env, copies=3)
    result = _run([PRE_COMMIT, "try-repo", str(clone), "sheetlint-repository", "--all-files"],
                  work, env)
    output = result.stdout + result.stderr
    assert result.returncode == 0, output
    assert output.count("Checked ") == 1 and "4 records" in output


def test_the_readme_local_snippet_works_as_written(tmp_path: Path):
    # the README's `repo: local` configuration, copied verbatim (sheetlint is on PATH)
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    blocks = re.findall(r"```yaml\n(.*?)```", readme, re.S)
    snippet = next(b for b in blocks if "repo: local" in b)
    env = _env(tmp_path)
    work = _motor_repository(tmp_path, env, copies=2)
    (work / ".pre-commit-config.yaml").write_text(snippet, encoding="utf-8")
    _run([GIT, "add", "."], work, env)
    result = _run([PRE_COMMIT, "run", "--all-files"], work, env)
    output = result.stdout + result.stderr
    assert result.returncode == 0, output
    assert "overspeed-emf" in output and output.count("Checked ") == 1
