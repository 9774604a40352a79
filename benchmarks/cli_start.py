"""``cli_start_ratio``: a one-annotation ``notelsp check`` against a bare Python start, in the same run.

Both are whole processes, timed from spawn to exit, alternated so that a busy
moment of the machine slows both alike; one untimed run of each first (the
grammar's parser cache is written once per install, and the files are in the
page cache afterwards, as on any second use). Both may write and read
compiled bytecode, kept in a temporary folder of their own
(``PYTHONPYCACHEPREFIX``), as an installed package has it: a
``PYTHONDONTWRITEBYTECODE`` in the environment would otherwise make every
run compile notelsp's sources again.
"""

from __future__ import annotations

import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

RUNS = 11
ONE_NOTE = "# Fluorides\n\nChlorine trifluoride is {ClF3: T-shaped}.\n"


def notelsp_command() -> list[str]:
    script = Path(sys.executable).parent / "notelsp"
    return [str(script)] if script.exists() else [sys.executable, "-m", "notelsp"]


def _run_s(command: list[str], cwd: str, env: dict[str, str]) -> tuple[float, float]:
    """Wall time and CPU time (user + system) of one run of the command, in seconds."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    subprocess.run(command, cwd=cwd, env=env, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=False,
                   timeout=120)
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return wall, (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def measure(runs: int = RUNS) -> dict[str, str]:
    with tempfile.TemporaryDirectory() as folder:
        Path(folder, "one.md").write_text(ONE_NOTE, encoding="utf-8")
        env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
        env["PYTHONPYCACHEPREFIX"] = str(Path(folder, "bytecode"))
        check = [*notelsp_command(), "check", "one.md"]
        bare = [sys.executable, "-c", "pass"]
        _run_s(check, folder, env), _run_s(bare, folder, env)
        checks, bares = [], []
        for _ in range(runs):
            checks.append(_run_s(check, folder, env))
            bares.append(_run_s(bare, folder, env))
    check_s, bare_s = (statistics.median(wall for wall, _ in samples) for samples in (checks, bares))
    check_cpu_s, bare_cpu_s = (statistics.median(cpu for _, cpu in samples) for samples in (checks, bares))
    return {
        "cli_check_ms": f"{check_s * 1e3:.0f}",
        "python_start_ms": f"{bare_s * 1e3:.0f}",
        "cli_start_ratio": f"{check_s / bare_s:.1f}",
        "cli_start_cpu_ratio": f"{check_cpu_s / bare_cpu_s:.1f}",
    }


def main() -> None:
    for name, value in measure().items():
        print(f"{name}: {value}", flush=True)


if __name__ == "__main__":
    main()
