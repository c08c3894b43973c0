"""A throw-away git repository for tests (git is installed on the machine)."""

from __future__ import annotations

import os
import subprocess
from pathlib import Path

GIT_ENV = {
    "GIT_AUTHOR_NAME": "Test", "GIT_AUTHOR_EMAIL": "test@example.invalid",
    "GIT_COMMITTER_NAME": "Test", "GIT_COMMITTER_EMAIL": "test@example.invalid",
    "GIT_CONFIG_GLOBAL": os.devnull, "GIT_CONFIG_NOSYSTEM": "1",
}


def git(repo: Path, *args: str, check: bool = True) -> subprocess.CompletedProcess[str]:
    """Run git in ``repo`` with a neutral identity and no user configuration."""
    env = {**os.environ, **GIT_ENV}
    return subprocess.run(["git", *args], cwd=repo, env=env, capture_output=True, text=True,
                          check=check)


def new_repo(path: Path) -> Path:
    """An empty repository at ``path`` on branch ``main``."""
    path.mkdir(parents=True, exist_ok=True)
    git(path, "init", "-q", "-b", "main")
    return path


def commit_file(repo: Path, name: str, text: str, message: str = "change") -> None:
    """Write, stage and commit one file."""
    target = repo / name
    target.parent.mkdir(parents=True, exist_ok=True)
    target.write_text(text)
    git(repo, "add", name)
    git(repo, "commit", "-q", "--no-verify", "-m", message)
