"""Run a cross-check: cached results first, the rest in a worker process.

Every isomer is optimised by its own ``python -m notelsp.crosscheck.worker``
process, so the caller's event loop never blocks and cancelling (cancel the
awaiting task) kills the process at once.  One wall-time budget covers all
the isomers of the species.  A worker serves one job and ends, so none
carries memory from one job to the next; each caps its own address space
(WORKER_MEMORY_BYTES), and one killed from outside is replaced once.
"""

from __future__ import annotations

import asyncio
import json
import os
import sys
from collections.abc import Callable
from dataclasses import dataclass
from typing import Literal

from . import cache
from .availability import missing_extra
from .levels import DEFAULT_LEVEL, LevelOfTheory, Limits
from .protocol import Job, OptimisedIsomer, job_to_json
from .start import StartingGeometry, Unsupported, starting_geometries
from ..notation.model import Formula

Status = Literal["done", "unsupported", "missing-extra", "timeout", "failed"]
WORKER = ("-m", "notelsp.crosscheck.worker")
# Address space each worker may take (set in the worker with RLIMIT_AS): a calculation that would need
# more fails there (MemoryError, or PySCF's own allocation error) instead of pressing on the editor's
# machine.  Address space, not resident memory: measured here, PySCF reserves 3.6 GiB of it for water
# at HF/STO-3G with one thread and 6.9 GiB with two while touching ~140 MB, so the cap is generous and
# grows with the threads the libraries may start (one per CPU).
WORKER_MEMORY_BYTES = (8 + 4 * (os.cpu_count() or 1)) * 1024**3
# A worker killed from outside (the out-of-memory killer, a signal) is started again once for the same
# isomer; a second kill fails the cross-check.  Every isomer has a fresh worker, so none is reused.
WORKER_RETRIES = 1


@dataclass(frozen=True, slots=True)
class Progress:
    species: str
    isomer: str
    isomer_index: int  # 1-based
    isomer_count: int
    step: int  # 0 when the isomer starts
    max_steps: int
    energy_hartree: float | None
    cached: bool = False

    @property
    def fraction(self) -> float:
        """Rough share done: whole isomers plus this one's steps against the step bound."""
        within = 1.0 if self.cached else min(self.step / self.max_steps, 0.95)
        return min(1.0, (self.isomer_index - 1 + within) / self.isomer_count)

    @property
    def message(self) -> str:
        which = f" {self.isomer}" if self.isomer else ""
        head = f"{self.species}{which} ({self.isomer_index}/{self.isomer_count})"
        if self.cached:
            return f"{head}: from cache"
        if self.step == 0:
            return f"{head}: starting"
        return f"{head}: step {self.step}, E = {self.energy_hartree:.6f} Eh"


@dataclass(frozen=True, slots=True)
class CrossCheckResult:
    species: str
    level: LevelOfTheory
    status: Status
    isomers: tuple[OptimisedIsomer, ...]  # in the analyser's rank order
    message: str = ""  # why the status is not "done"
    cached: int = 0  # how many isomers came from the disk cache


ProgressCallback = Callable[[Progress], None]


async def cross_check(
    formula: Formula,
    level: LevelOfTheory = DEFAULT_LEVEL,
    limits: Limits = Limits(),
    on_progress: ProgressCallback | None = None,
) -> CrossCheckResult:
    """Optimise every isomer of ``formula`` (up to the limits); raises CancelledError when cancelled."""
    report = on_progress or (lambda progress: None)
    missing = missing_extra()
    if missing:
        return CrossCheckResult(formula.text, level, "missing-extra", (), missing)
    geometries = starting_geometries(formula, limits.max_atoms)
    if isinstance(geometries, Unsupported):
        return CrossCheckResult(formula.text, level, "unsupported", (), geometries.reason)
    note = ""
    if len(geometries) > limits.max_isomers:
        note = f"only the first {limits.max_isomers} of {len(geometries)} isomers were computed"
        geometries = geometries[: limits.max_isomers]
    loop = asyncio.get_running_loop()
    deadline = loop.time() + limits.wall_time_s
    done: list[OptimisedIsomer] = []
    from_cache = 0
    for index, geometry in enumerate(geometries, start=1):
        def progress(step: int, energy: float | None, cached: bool = False) -> None:
            report(Progress(formula.text, geometry.isomer, index, len(geometries), step, limits.max_steps, energy, cached))

        stored = cache.load(geometry.species, geometry.isomer, level.label, expected=geometry)
        if stored is not None:
            done.append(stored)
            from_cache += 1
            progress(0, stored.energy_hartree, cached=True)
            continue
        progress(0, None)
        outcome = await _run_worker_again_if_killed(Job(geometry, level, limits.max_steps), deadline, progress)
        if isinstance(outcome, OptimisedIsomer):
            done.append(outcome)
            if outcome.converged:
                cache.store(outcome)
            continue
        status, message = outcome
        if status == "timeout":
            message = f"{message} (wall-time bound {limits.wall_time_s:.0f} s for {formula.text} at {level.label})"
        return CrossCheckResult(formula.text, level, status, tuple(done), message, from_cache)
    return CrossCheckResult(formula.text, level, "done", tuple(done), note, from_cache)


async def _run_worker_again_if_killed(
    job: Job, deadline: float, progress: Callable[[int, float | None], None]
) -> OptimisedIsomer | tuple[Status, str]:
    """Run the job in a worker; a worker killed by a signal is replaced once and the job sent again."""
    loop = asyncio.get_running_loop()
    for _ in range(WORKER_RETRIES):
        outcome = await _run_worker(job, deadline - loop.time(), progress)
        if not isinstance(outcome, _Killed):
            return outcome
    outcome = await _run_worker(job, deadline - loop.time(), progress)
    if isinstance(outcome, _Killed):
        return "failed", f"{outcome.message}, again after a restart"
    return outcome


@dataclass(frozen=True, slots=True)
class _Killed:
    """A worker ended by a signal before answering (not a failure of the calculation itself)."""

    message: str


async def _run_worker(
    job: Job, seconds_left: float, progress: Callable[[int, float | None], None]
) -> OptimisedIsomer | tuple[Status, str] | _Killed:
    if seconds_left <= 0:
        return "timeout", "no time left for the next isomer"
    process = await asyncio.create_subprocess_exec(
        sys.executable,
        *WORKER,
        "--memory-bytes",
        str(WORKER_MEMORY_BYTES),
        stdin=asyncio.subprocess.PIPE,
        stdout=asyncio.subprocess.PIPE,
        stderr=asyncio.subprocess.DEVNULL,
    )
    loop = asyncio.get_running_loop()
    deadline = loop.time() + seconds_left
    try:
        assert process.stdin is not None and process.stdout is not None
        process.stdin.write(job_to_json(job).encode())
        await process.stdin.drain()
        process.stdin.close()
        while True:
            try:
                line = await asyncio.wait_for(process.stdout.readline(), max(deadline - loop.time(), 0.001))
            except asyncio.TimeoutError:
                return "timeout", f"the calculation of {_described(job.geometry)} ran out of time"
            except ValueError:  # a line beyond the stream's limit: not our worker's protocol
                return "failed", f"the worker for {_described(job.geometry)} sent an unusable answer (a line too long)"
            if not line:
                code = await process.wait()
                if code < 0:
                    return _Killed(f"the worker for {_described(job.geometry)} was killed (signal {-code})")
                return "failed", f"the worker for {_described(job.geometry)} ended without an answer (exit code {code})"
            try:
                message = json.loads(line)
                event = message.get("event")
                if event == "step":
                    progress(int(message["step"]), float(message["energy"]))
                elif event == "done":
                    return cache.checked_isomer(message["isomer"], expected=job.geometry)
                elif event == "error":
                    kind = "missing-extra" if message.get("kind") == "missing-extra" else "failed"
                    return kind, str(message.get("message", "the calculation failed"))[:2000]
            except (ValueError, KeyError, TypeError, AttributeError, RecursionError) as error:  # BadEntry included
                return "failed", f"the worker for {_described(job.geometry)} sent an unusable answer ({error})"
    finally:
        if process.returncode is None:
            process.kill()
            await asyncio.shield(process.wait())


def _described(geometry: StartingGeometry) -> str:
    return f"{geometry.species} {geometry.isomer}".strip()
