"""Helpers shared by the end-to-end tests: process results and a sealed git environment."""

from __future__ import annotations

import json
import os
import subprocess
from dataclasses import dataclass
from pathlib import Path
from typing import Any


@dataclass
class Run:
    """What a command did: exit code and its two streams."""

    code: int
    stdout: str
    stderr: str

    def json(self) -> dict[str, Any]:
        data: dict[str, Any] = json.loads(self.stdout)
        return data


def git_env(home: Path, ceiling: Path | None = None, **extra: str) -> dict[str, str]:
    """An environment that keeps git away from the user's own configuration."""
    cfg = home / "gitconfig"
    if not cfg.exists():
        cfg.write_text("", encoding="utf-8")
    env = dict(os.environ)
    env.update({
        "GIT_CONFIG_GLOBAL": str(cfg), "GIT_CONFIG_NOSYSTEM": "1",
        "GIT_AUTHOR_NAME": "Test Author", "GIT_AUTHOR_EMAIL": "author@example.invalid",
        "GIT_COMMITTER_NAME": "Test Author", "GIT_COMMITTER_EMAIL": "author@example.invalid",
        "GIT_CEILING_DIRECTORIES": str(ceiling if ceiling is not None else home.parent), "NO_COLOR": "1",
    })
    env.update(extra)
    return env


def git(repo: Path, env: dict[str, str], *args: str) -> str:
    out = subprocess.run(["git", *args], cwd=repo, env=env, capture_output=True, text=True, timeout=300)
    assert out.returncode == 0, out.stderr
    return out.stdout
