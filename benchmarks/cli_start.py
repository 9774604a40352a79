"""``cli_start_ratio``: a one-annotation ``notelsp check`` against a bare Python start, in the same run.

The goal figure is ``cli_start_ratio``: the default ``check`` (rules and computed
geometries) of a one-annotation note, with notelsp installed from a wheel, against
``python -c pass`` of that same environment. An editable install is not measured:
its import hook runs in every Python start, ``pass`` included, and so made the ratio
look better than any installed copy gets. The run builds a wheel of this source
tree, makes a fresh virtual environment without pip and installs the wheel there
(with its console script); the dependencies are read from this environment's
site-packages through a ``.pth`` path entry, so nothing is downloaded. That entry
is a plain path: the ``.pth`` files of the dependencies themselves are not run, so
``pass`` there is, if anything, a little cheaper than in an environment with
everything installed (a stricter floor).

The species' geometry is computed once, untimed, before the timed runs: they all
read it from the disk cache (``~/.cache/notelsp``), as every check after a note's
first does. ``cli_start_rules_only_ratio`` is the same note with ``--rules-only``
(no geometry asked for at all). Each of these checks a note edited just before (one
line changed), so the report kept from the run before (``notelsp/report_cache.py``)
cannot answer and the note is reviewed, as after any edit; ``cli_start_unchanged_ratio``
is the default check of an unchanged note, answered from that kept report.
``cli_start_compiling_ratio`` is the edited note's default check with
``NOTELSP_DATACLASS_CODE=off``: the dataclasses' methods compiled in every start, as
before ``notelsp/dataclass_code.py`` kept their compiled code.
"""

from __future__ import annotations

import os
import resource
import statistics
import subprocess
import sys
import sysconfig
import tempfile
import time
from pathlib import Path

RUNS = 21  # on a busy machine single wall times jump by tens of milliseconds: a median of many
ONE_NOTE = "# Fluorides\n\nChlorine trifluoride is {ClF3: T-shaped}.\n"
SOURCE_TREE = Path(__file__).resolve().parents[1]


def _run_s(command: list[str], cwd: str, env: dict[str, str]) -> tuple[float, float]:
    """Wall time and CPU time (user + system) of one run of the command, in seconds."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    subprocess.run(command, cwd=cwd, env=env, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=False,
                   timeout=600)
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return wall, (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def installed_from_wheel(folder: Path) -> Path:
    """A fresh virtual environment in ``folder`` with notelsp installed from a wheel of this tree; its python."""
    wheels = folder / "wheel"
    subprocess.run([sys.executable, "-m", "pip", "wheel", "-q", "--no-deps", "-w", str(wheels), str(SOURCE_TREE)],
                   check=True, stdout=subprocess.DEVNULL)
    venv = folder / "venv"
    subprocess.run([sys.executable, "-m", "venv", "--without-pip", str(venv)], check=True)
    python = venv / "bin" / "python"
    subprocess.run([sys.executable, "-m", "pip", "--python", str(python), "install", "-q", "--no-deps",
                    *map(str, wheels.glob("notelsp-*.whl"))], check=True, stdout=subprocess.DEVNULL)
    site = subprocess.run([str(python), "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"],
                          check=True, capture_output=True, text=True).stdout.strip()
    Path(site, "notelsp_bench_dependencies.pth").write_text(sysconfig.get_paths()["purelib"] + "\n", encoding="utf-8")
    return python


def measure(runs: int = RUNS) -> dict[str, str]:
    with tempfile.TemporaryDirectory() as folder:
        python = installed_from_wheel(Path(folder))
        Path(folder, "one.md").write_text(ONE_NOTE, encoding="utf-8")
        env = {k: v for k, v in os.environ.items()
               if k not in ("PYTHONDONTWRITEBYTECODE", "PYTHONPATH", "NOTELSP_REPORT_CACHE", "NOTELSP_DATACLASS_CODE")}
        env["PYTHONPYCACHEPREFIX"] = str(Path(folder, "bytecode"))
        compiling = {**env, "NOTELSP_DATACLASS_CODE": "off"}  # dataclasses' methods compiled in every start
        script = str(python.parent / "notelsp")
        # (command, environment, whether the note is edited before each run: a note no check has seen,
        # so the kept report of the run before cannot answer, as after any edit)
        commands = {
            "check": ([script, "check", "edited.md"], env, True),
            "rules_only": ([script, "check", "--rules-only", "edited.md"], env, True),
            "check_compiling": ([script, "check", "edited.md"], compiling, True),
            "check_unchanged": ([script, "check", "one.md"], env, False),
            "bare": ([str(python), "-c", "pass"], env, False),
        }
        edits = iter(range(10**6))

        def edit() -> None:
            Path(folder, "edited.md").write_text(f"{ONE_NOTE}\nRun {next(edits)}.\n", encoding="utf-8")

        for command, environment, edited in commands.values():  # untimed: geometry cached, bytecode written
            if edited:
                edit()
            done = subprocess.run(command, cwd=folder, env=environment, capture_output=True, text=True, timeout=600)
            if done.returncode not in (0, 1):  # a check that fails early would look fast
                raise RuntimeError(f"{' '.join(command)} exited {done.returncode}: {done.stderr[-2000:]}")
        samples: dict[str, list[tuple[float, float]]] = {name: [] for name in commands}
        for _ in range(runs):
            for name, (command, environment, edited) in commands.items():
                if edited:
                    edit()
                samples[name].append(_run_s(command, folder, environment))
    wall = {name: statistics.median(w for w, _ in taken) for name, taken in samples.items()}
    cpu = {name: statistics.median(c for _, c in taken) for name, taken in samples.items()}
    return {
        "cli_check_ms": f"{wall['check'] * 1e3:.0f}",
        "cli_check_rules_only_ms": f"{wall['rules_only'] * 1e3:.0f}",
        "python_start_ms": f"{wall['bare'] * 1e3:.0f}",
        "cli_start_ratio": f"{wall['check'] / wall['bare']:.1f}",  # the goal figure (≤ 10)
        "cli_start_cpu_ratio": f"{cpu['check'] / cpu['bare']:.1f}",
        "cli_start_rules_only_ratio": f"{wall['rules_only'] / wall['bare']:.1f}",
        "cli_start_rules_only_cpu_ratio": f"{cpu['rules_only'] / cpu['bare']:.1f}",
        "cli_check_compiling_ms": f"{wall['check_compiling'] * 1e3:.0f}",
        "cli_start_compiling_ratio": f"{wall['check_compiling'] / wall['bare']:.1f}",
        "cli_check_unchanged_ms": f"{wall['check_unchanged'] * 1e3:.0f}",
        "cli_start_unchanged_ratio": f"{wall['check_unchanged'] / wall['bare']:.1f}",
    }


def main() -> None:
    for name, value in measure().items():
        print(f"{name}: {value}", flush=True)


if __name__ == "__main__":
    main()
