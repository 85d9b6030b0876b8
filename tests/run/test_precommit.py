"""plantlint as a pre-commit hook, end to end with the real ``pre-commit`` and git.

A temporary repository gets two clean models (copied fixtures), a local hook that
calls the installed plantlint, and ``pre-commit install``; then a commit that
makes a plant non-minimum phase is refused and a clean edit goes through.
Nothing touches the network (``repo: local`` with ``language: system``) or the
user's own git and pre-commit settings (``GIT_CONFIG_GLOBAL``, ``PRE_COMMIT_HOME``).
"""

from __future__ import annotations

import shlex
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from conftest import REPO, git, git_env

PROJECT = REPO
FIXTURES = PROJECT / "tests" / "fixtures" / "rules"
PRE_COMMIT = shutil.which("pre-commit")

pytestmark = pytest.mark.skipif(PRE_COMMIT is None, reason="pre-commit is not installed (pip install -e '.[test]')")


def hook_entry() -> str:
    """The installed console script when it is on PATH, else this interpreter's module."""
    script = shutil.which("plantlint")
    if script is not None:
        return f"{shlex.quote(script)} check"
    return f"{shlex.quote(sys.executable)} -m checker check"


CONFIG = """repos:
  - repo: local
    hooks:
      - id: plantlint-check
        name: plantlint
        entry: {entry}
        language: system
        files: '\\.plant$'
        pass_filenames: true
        require_serial: true
"""


def environment(home: Path) -> dict[str, str]:
    return git_env(home, ceiling=home, PRE_COMMIT_HOME=str(home / "pre-commit-home"), PRE_COMMIT_COLOR="never")


def run(cmd: list[str], cwd: Path, env: dict[str, str]) -> subprocess.CompletedProcess[str]:
    return subprocess.run(cmd, cwd=cwd, env=env, capture_output=True, text=True, timeout=300)


def test_hook_refuses_a_broken_model_and_lets_a_clean_change_through(tmp_path: Path) -> None:
    env = environment(tmp_path)
    repo = tmp_path / "controls"
    (repo / "models").mkdir(parents=True)
    git(repo, env, "init", "-q", "-b", "main")
    tail = repo / "models" / "tail.plant"
    shutil.copyfile(FIXTURES / "zero-dynamics-unstable.ok.plant", tail)
    shutil.copyfile(FIXTURES / "expectation-failed.ok.plant", repo / "models" / "cart.plant")
    (repo / "README.md").write_text("Demo controls repository (invented).\n", encoding="utf-8")
    (repo / ".pre-commit-config.yaml").write_text(CONFIG.format(entry=hook_entry()), encoding="utf-8")
    git(repo, env, "add", ".")
    git(repo, env, "commit", "-q", "-m", "clean models")

    installed = run([str(PRE_COMMIT), "install"], repo, env)
    assert installed.returncode == 0, installed.stdout + installed.stderr
    assert (repo / ".git" / "hooks" / "pre-commit").is_file()

    # make the internal state unstable while the output is held: z' = z + x
    good = tail.read_text(encoding="utf-8")
    assert "rate z = -z + x" in good
    tail.write_text(good.replace("rate z = -z + x", "rate z = z + x"), encoding="utf-8")
    git(repo, env, "add", "models/tail.plant")
    refused = run(["git", "commit", "-m", "make the tail non-minimum phase"], repo, env)
    output = refused.stdout + refused.stderr
    assert refused.returncode != 0, output
    assert "zero-dynamics-unstable" in output and "tail.plant" in output
    assert "Traceback" not in output
    assert git(repo, env, "rev-list", "--count", "HEAD").strip() == "1"

    # a clean change to the same model goes through (the hook runs and passes)
    tail.write_text(good.replace("rate z = -z + x", "rate z = -2*z + x"), encoding="utf-8")
    git(repo, env, "add", "models/tail.plant")
    accepted = run(["git", "commit", "-m", "faster internal decay"], repo, env)
    assert accepted.returncode == 0, accepted.stdout + accepted.stderr
    assert "plantlint" in accepted.stdout + accepted.stderr and "Passed" in accepted.stdout + accepted.stderr
    assert git(repo, env, "rev-list", "--count", "HEAD").strip() == "2"

    # a commit without models skips the hook; the cache stays out of git's way
    (repo / "README.md").write_text("Demo controls repository (invented). Notes.\n", encoding="utf-8")
    git(repo, env, "add", "README.md")
    skipped = run(["git", "commit", "-m", "notes"], repo, env)
    assert skipped.returncode == 0 and "Skipped" in skipped.stdout + skipped.stderr
    assert git(repo, env, "status", "--porcelain") == ""


def test_project_hook_manifest_is_valid_for_pre_commit(tmp_path: Path) -> None:
    manifest = PROJECT / ".pre-commit-hooks.yaml"
    checked = run([str(PRE_COMMIT), "validate-manifest", str(manifest)], PROJECT, environment(tmp_path))
    assert checked.returncode == 0, checked.stdout + checked.stderr

    import yaml  # pre-commit's own dependency

    hooks = yaml.safe_load(manifest.read_text(encoding="utf-8"))
    (hook,) = [h for h in hooks if h["id"] == "plantlint-check"]
    assert {"id", "name", "entry", "language", "files"} <= set(hook)
    assert hook["entry"].split()[0] == "plantlint"  # the console script of pyproject's [project.scripts]
    assert hook["pass_filenames"] is True
    import re

    assert re.search(hook["files"], "models/arm.plant") and not re.search(hook["files"], "models/arm.plant.bak")


def test_manifest_validation_can_fail(tmp_path: Path) -> None:
    """The validator is a real check: a hook without an entry is refused."""
    broken = tmp_path / ".pre-commit-hooks.yaml"
    broken.write_text("- id: x\n  name: x\n  language: system\n", encoding="utf-8")
    checked = run([str(PRE_COMMIT), "validate-manifest", str(broken)], tmp_path, environment(tmp_path))
    assert checked.returncode != 0
