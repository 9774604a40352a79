"""Many notes reviewed by a pool of processes give the same report, byte for byte, as one process.

NOTELSP_WORKERS=1 keeps a check in one process; NOTELSP_WORKERS=2 forces the pool whatever the
number of notes. The reference is the single-process report; JSON and SARIF are also parsed with
the standard library's json module and must be one valid document each.
"""

import json
import os
import random
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

NOTES = 240

# Species and claims, right and wrong, for generated notes (from memory: VSEPR shapes of common
# species). Angles vary, so most annotation texts differ between notes.
SPECIES = [
    ("H2O", ["bent", "linear", "H-O-H {}°"]),
    ("NH3", ["trigonal pyramidal", "trigonal planar", "H-N-H {}°"]),
    ("ClF3", ["t-shaped", "trigonal planar"]),
    ("XeF2", ["linear", "bent"]),
    ("SF4", ["seesaw", "tetrahedral", "F-S-F {}°"]),
    ("CH4", ["tetrahedral", "square planar", "H-C-H {}°"]),
    ("BF3", ["trigonal planar", "sp3"]),
]


def _note(rng: random.Random, number: int) -> str:
    lines = [f"# Run {number}", ""]
    for _ in range(rng.randint(0, 6)):
        formula, claims = rng.choice(SPECIES)
        claim = rng.choice(claims).format(f"{rng.uniform(85, 130):.1f}")
        lines.append(f"Weighed {{{formula}: {claim}}} and `{{{formula}: code}}` skipped.")
        lines.append("")
    return "\n".join(lines) + "\n"


def _notebook(rng: random.Random) -> str:
    cells = [{"cell_type": "markdown", "metadata": {}, "source": _note(rng, n)} for n in range(3)]
    cells.insert(1, {"cell_type": "code", "metadata": {}, "source": "x = 1", "outputs": [], "execution_count": None})
    return json.dumps({"nbformat": 4, "nbformat_minor": 5, "metadata": {}, "cells": cells})


@pytest.fixture(scope="module")
def repo(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("repo")
    rng = random.Random(240)
    for number in range(NOTES):
        week = folder / f"week{number // 50}"
        week.mkdir(exist_ok=True)
        suffix = ".txt" if number % 17 == 0 else ".md"
        (week / f"run{number:03d}{suffix}").write_text(_note(rng, number), encoding="utf-8")
    (folder / "week1" / "cells.ipynb").write_text(_notebook(rng), encoding="utf-8")
    (folder / "week2" / "scan.md").write_bytes(b"\xff\xfe not UTF-8")  # unreadable, reported at the end
    return folder


def _check(repo: Path, workers: int, *args: str, stdin: str | None = None) -> subprocess.CompletedProcess:
    env = {**os.environ, "NOTELSP_WORKERS": str(workers)}
    return subprocess.run([sys.executable, "-m", "notelsp", "check", *args], cwd=repo, env=env, input=stdin,
                          capture_output=True, text=True, encoding="utf-8", timeout=600)


@pytest.mark.parametrize(
    "options",
    [
        ("--format", "text"),
        ("--format", "text", "--cautions", "per-file"),
        ("--format", "json"),
        ("--format", "json", "--indent", "2"),
        ("--format", "sarif"),
    ],
)
def test_pool_writes_the_single_process_report(repo: Path, options: tuple[str, ...]):
    # standard input in the middle: reviewed in the main process, reported in its place
    args = ("week0", "week1", "-", "week2", "week3", "week4", *options)
    stdin = "{ClF3: trigonal planar} {XeF2: linear}\n"
    single = _check(repo, 1, *args, stdin=stdin)
    pooled = _check(repo, 2, *args, stdin=stdin)
    assert single.returncode == pooled.returncode == 2  # findings, and one unreadable file
    assert pooled.stdout == single.stdout
    assert pooled.stderr == single.stderr
    assert "Traceback" not in pooled.stderr
    if "text" not in options:
        report = json.loads(pooled.stdout)
        files = report["files"] if "json" in options else report["runs"][0]["artifacts"]
        assert len(files) == NOTES + 1 + 1  # every note, the notebook once, standard input
    else:
        assert f"{NOTES + 2} files" in pooled.stdout.splitlines()[-1]


def test_pool_gives_the_same_exit_status_for_each_gate(repo: Path):
    for level in ("error", "warning", "information", "hint"):
        single = _check(repo, 1, "week0", "--fail-level", level, "--format", "json")
        pooled = _check(repo, 2, "week0", "--fail-level", level, "--format", "json")
        assert (pooled.returncode, pooled.stdout) == (single.returncode, single.stdout)


def test_bad_worker_count_is_a_usage_error(repo: Path):
    done = _check(repo, 0, "week0")  # type: ignore[arg-type]
    assert done.returncode == 2
    assert "NOTELSP_WORKERS" in done.stderr and "Traceback" not in done.stderr


def test_closed_pipe_ends_the_pooled_check_quietly(repo: Path):
    env = {**os.environ, "NOTELSP_WORKERS": "2"}
    check = subprocess.Popen([sys.executable, "-m", "notelsp", "check", "."], cwd=repo, env=env,
                             stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    assert check.stdout is not None and check.stderr is not None
    check.stdout.readline()  # the reader takes one line and leaves, as `| head -1` does
    check.stdout.close()
    status = check.wait(timeout=600)
    errors = check.stderr.read().decode("utf-8")
    assert status == 0, errors
    assert "Traceback" not in errors and "BrokenPipeError" not in errors


def test_interrupt_ends_the_pooled_check_and_its_workers(tmp_path: Path):
    rng = random.Random(7)
    for number in range(1_500):  # long enough to be still running when interrupted
        (tmp_path / f"n{number:04d}.md").write_text(_note(rng, number) * 10, encoding="utf-8")
    env = {**os.environ, "NOTELSP_WORKERS": "2"}
    check = subprocess.Popen([sys.executable, "-m", "notelsp", "check", "."], cwd=tmp_path, env=env,
                             stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    assert check.stdout is not None
    check.stdout.readline()  # the pool has started and reported its first notes
    workers = _descendants(check.pid)  # the fork server, its workers, the resource tracker
    assert workers or not Path("/proc").is_dir()
    if check.poll() is not None:
        pytest.skip("the check finished before it could be interrupted")
    check.send_signal(signal.SIGINT)  # what Ctrl-C sends the foreground process
    _, errors = check.communicate(timeout=120)
    assert check.returncode == 130
    assert "Traceback" not in errors.decode("utf-8")
    deadline = time.monotonic() + 30
    while _alive(workers) and time.monotonic() < deadline:
        time.sleep(0.2)
    assert not _alive(workers)  # the fork server and the workers ended with the check


def _descendants(pid: int) -> set[int]:
    """Processes below ``pid`` (Linux /proc; elsewhere none are seen)."""
    parents: dict[int, int] = {}
    for entry in Path("/proc").iterdir() if Path("/proc").is_dir() else ():
        if entry.name.isdigit():
            try:
                parents[int(entry.name)] = int((entry / "stat").read_text().rsplit(")", 1)[1].split()[1])
            except (OSError, ValueError, IndexError):
                continue
    found, frontier = set(), {pid}
    while frontier:
        frontier = {child for child, parent in parents.items() if parent in frontier} - found
        found |= frontier
    return found


def _alive(pids: set[int]) -> set[int]:
    """Those of ``pids`` still running (a zombie, ended and not yet collected, is not)."""
    running = set()
    for pid in pids:
        try:
            state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
        except (OSError, IndexError):
            continue
        if state != "Z":
            running.add(pid)
    return running
