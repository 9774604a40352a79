"""The pre-commit hook (.pre-commit-hooks.yaml) through the real pre-commit, in a scratch git repository.

A git pre-commit hook runs ``pre-commit try-repo`` on this repository's last commit (``--ref HEAD``:
the hook file and the package as committed, so uncommitted or untracked work elsewhere in the tree
does not decide the result), so each ``git commit`` of the scratch repository is checked as a
user's would be.  try-repo installs notelsp into a fresh environment of its own with pip on every
run (pip's cache is used), so the test makes two commits only.
ClF3 claimed trigonal planar is an error (VSEPR: t-shaped), t-shaped is right (from memory).
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
HOOK_ID = "notelsp-check"
# Each try-repo run installs notelsp and its dependencies into a new environment: minutes, not seconds.
pytestmark = [pytest.mark.slow, pytest.mark.timeout(1500)]
# What pip says when it cannot reach an index: then the hook's environment cannot be built here.
OFFLINE_SIGNS = ("No matching distribution", "Could not find a version", "Failed to establish a new connection",
                 "Temporary failure in name resolution", "Network is unreachable", "ProxyError", "Read timed out")


@pytest.fixture(scope="module")
def pre_commit_home(tmp_path_factory) -> Path:
    try:
        import pre_commit  # noqa: F401
    except ImportError:
        pytest.skip("pre-commit is not installed (it is in the test extra: pip install -e '.[test]')")
    if shutil.which("git") is None:
        pytest.skip("git is not installed")
    return tmp_path_factory.mktemp("pre-commit-home")


def git(repo: Path, *args: str, env=None) -> subprocess.CompletedProcess:
    return subprocess.run(["git", *args], cwd=repo, env=env, capture_output=True, text=True, timeout=900, check=False)


@pytest.fixture
def repository(tmp_path, pre_commit_home) -> tuple[Path, dict]:
    repo = tmp_path / "notes"
    repo.mkdir()
    env = dict(os.environ, PRE_COMMIT_HOME=str(pre_commit_home), GIT_CONFIG_NOSYSTEM="1", PIP_DISABLE_PIP_VERSION_CHECK="1",
               GIT_AUTHOR_NAME="Test", GIT_AUTHOR_EMAIL="test@example.org",
               GIT_COMMITTER_NAME="Test", GIT_COMMITTER_EMAIL="test@example.org")
    env.pop("PRE_COMMIT", None)  # not inside another pre-commit run
    assert git(repo, "init", "-q", env=env).returncode == 0
    hook = repo / ".git" / "hooks" / "pre-commit"
    hook.write_text(f'#!/bin/sh\nexec "{sys.executable}" -m pre_commit try-repo "{ROOT}" {HOOK_ID} --ref HEAD\n')
    hook.chmod(0o755)
    return repo, env


def commit(repo: Path, env: dict, name: str, text: str) -> subprocess.CompletedProcess:
    (repo / name).write_text(text)
    git(repo, "add", name, env=env)
    result = git(repo, "commit", "-q", "-m", f"add {name}", env=env)
    output = result.stdout + result.stderr
    if result.returncode != 0 and "CalledProcessError" in output and any(sign in output for sign in OFFLINE_SIGNS):
        pytest.skip(f"pre-commit could not build the hook's environment offline:\n{output[-1500:]}")
    return result


def committed(repo: Path, env: dict) -> list[str]:
    return git(repo, "log", "--format=%s", env=env).stdout.split("\n")[:-1]


def test_a_clean_note_is_committed_and_an_error_blocks_the_commit(repository):
    repo, env = repository
    # A Python file with a claim-like comment goes in with the clean note: not a note, so not checked.
    (repo / "script.py").write_text("# {ClF3: trigonal planar}\n")
    git(repo, "add", "script.py", env=env)
    clean = commit(repo, env, "fluorides.md", "# Fluorides\n\nChlorine trifluoride {ClF3: t-shaped}.\n")
    assert clean.returncode == 0, clean.stdout + clean.stderr
    assert committed(repo, env) == ["add fluorides.md"]

    wrong = commit(repo, env, "more.md", "# More\n\nChlorine trifluoride {ClF3: trigonal planar}.\n")
    assert wrong.returncode != 0
    output = wrong.stdout + wrong.stderr
    assert "wrong-shape" in output and "more.md" in output, output
    assert committed(repo, env) == ["add fluorides.md"]  # nothing new was committed
