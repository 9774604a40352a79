"""``make bench``: every benchmark, one ``name: value`` line per figure.

The pure-analysis figures run in this process; the server figures drive real
server processes over stdio.  Ratios are taken against floors measured in the
same run.
"""

from __future__ import annotations

import os
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

import analysis  # noqa: E402
import cli_start  # noqa: E402
import compute  # noqa: E402
import repo  # noqa: E402
import server  # noqa: E402
import soak  # noqa: E402


def python_loop_ms() -> float:
    """Best of five runs of one million pure-Python additions: the machine's speed, so that absolute
    figures (milliseconds, seconds) of runs on different machines can be compared."""
    best = float("inf")
    for _ in range(5):
        start, total = time.perf_counter(), 0
        for number in range(1_000_000):
            total += number
        best = min(best, time.perf_counter() - start)
    return best * 1e3


def main() -> None:
    print(f"cores: {os.cpu_count()}")
    print(f"python_loop_ms: {python_loop_ms():.0f}", flush=True)
    for name, value in server.measure().items():  # first: its fresh processes should not share the CPU with us
        print(f"{name}: {value}", flush=True)
    for name, value in cli_start.measure().items():  # processes too, before the in-process figures
        print(f"{name}: {value}", flush=True)
    for name, value in repo.measure().items():  # notelsp check over 3,000 notes, then 1,000: CPU and memory
        print(f"{name}: {value}", flush=True)
    for name, value in compute.measure().items():  # a 200-species note through check, cold and warm; the pool
        print(f"{name}: {value}", flush=True)
    for name, value in soak.measure().items():  # a long server session (a few minutes): memory only, no time
        print(f"{name}: {value}", flush=True)
    analysis.main()


if __name__ == "__main__":
    main()
