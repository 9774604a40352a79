"""What runs inside a worker process: bounds first, then one optimisation per job.

Jobs and answers cross the process boundary as plain JSON-able dicts; the
parent reads every answer through ``result.geometry_from_dict``.
"""

from __future__ import annotations

import os
import resource
import signal
import time
from typing import Any

# One thread per worker: the pool already runs one worker per core, and OpenMP threads on top
# of that only fight over the same cores.  Set before tblite (and its OpenMP runtime) loads.
THREAD_VARIABLES = ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS", "OMP_STACKSIZE")
CPU_SECONDS_PER_WALL_SECOND = 3  # the CPU-time backstop: generous, it only stops a runaway
_load_error: str | None = None  # why this worker cannot compute, when it cannot


def initialise(memory_bytes: int) -> None:
    for name in THREAD_VARIABLES[:3]:
        os.environ[name] = "1"
    os.environ.setdefault("OMP_STACKSIZE", "64M")
    try:
        _, hard = resource.getrlimit(resource.RLIMIT_AS)
        cap = memory_bytes if hard == resource.RLIM_INFINITY else min(memory_bytes, hard)
        resource.setrlimit(resource.RLIMIT_AS, (cap, hard))
    except (ValueError, OSError):  # a platform without the limit: the wall-time bound still holds
        pass
    signal.signal(signal.SIGALRM, _out_of_time)
    global _load_error
    try:  # load the libraries (and the chemistry that builds structures) now: a job's wall time is the job's
        import ase.optimize  # noqa: F401
        import tblite.ase  # noqa: F401

        from . import geometry  # noqa: F401
    except (ImportError, MemoryError, OSError) as error:  # each job then fails with the reason
        _load_error = (f"the worker could not load tblite and ASE within its memory bound "
                       f"({memory_bytes >> 20} MB of address space): {type(error).__name__}: {str(error)[:200]}")


def _out_of_time(signum: int, frame: Any) -> None:
    from .geometry import OutOfTime

    raise OutOfTime


def run(job: dict[str, Any]) -> dict[str, Any]:
    """Optimise the structure ``job`` describes; answer its result as a dict (never raises for the chemistry)."""
    if _load_error is not None:  # answered from the job alone: the chemistry may be what did not load
        return _failure(job["structure"], _load_error)
    from .geometry import Structure, optimise
    from .method import Limits
    from .result import geometry_to_dict

    structure = Structure.from_dict(job["structure"])
    limits = Limits(**job["limits"])
    _cap_cpu_time(limits.wall_time_s)
    # The optimiser checks the clock every step; the alarm (a little later) stops a single step that hangs.
    signal.setitimer(signal.ITIMER_REAL, limits.wall_time_s + 2.0)
    try:
        return geometry_to_dict(optimise(structure, limits))
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)


def _failure(structure: dict[str, Any], reason: str) -> dict[str, Any]:
    """The answer for a structure this worker cannot compute, as ``geometry.failure`` words it."""
    from .method import METHOD, versions

    positions = [list(p) for p in structure["positions"]]
    return {"species": structure["species"], "charge": structure["charge"], "isomer": structure["isomer"],
            "rank": structure["rank"], "method": METHOD, "versions": [list(v) for v in versions()],
            "symbols": list(structure["symbols"]), "labels": list(structure["labels"]),
            "sites": list(structure["sites"]), "unpaired": structure["unpaired"], "spin": structure["spin"],
            "start": positions, "positions": positions, "energy_ev": None, "converged": False, "steps": 0,
            "wall_time_s": 0.0, "failed": reason, "notes": [],
            "connections": [list(c) for c in structure["connections"]]}


def _cap_cpu_time(wall_time_s: float) -> None:
    """Past this job's share of CPU time the kernel ends the process (the parent reports it)."""
    try:
        used = time.process_time()
        _, hard = resource.getrlimit(resource.RLIMIT_CPU)
        soft = int(used + CPU_SECONDS_PER_WALL_SECOND * wall_time_s + 5)
        resource.setrlimit(resource.RLIMIT_CPU, (soft if hard == resource.RLIM_INFINITY else min(soft, hard), hard))
    except (ValueError, OSError):
        pass
