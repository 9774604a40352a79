"""Compute many species at once: cached structures first, the rest in worker processes.

A pool of worker processes (``spawn``, one per core, each replaced after
``Limits.tasks_per_worker`` structures) optimises one structure per job.  At
most one job per worker is handed over at a time, so every job's deadline
runs from when it really starts; the rest wait here, where :meth:`cancel`
can drop them.  Whatever happens to a job (a failed SCF, the time or memory
bound, a worker killed by the kernel) comes back as a result whose
``failed`` says why, never as an exception or a hang.
"""

from __future__ import annotations

import multiprocessing
import os
import threading
import time
from collections import deque
from collections.abc import Callable, Sequence
from concurrent.futures import FIRST_COMPLETED, Future, ProcessPoolExecutor, wait
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass, replace

from ..chem import analyse
from ..chem.analysis import SpeciesAnalysis
from ..notation import parse_formula
from ..notation.model import Formula
from . import cache, species_cache, worker
from .geometry import Skipped, Structure, failure, start_structures
from .identity import closest_start
from .method import METHOD, Limits, missing_packages, versions
from .result import BadResult, ComputedGeometry, ComputedSpecies, geometry_from_dict, ordered

# Added to a job's own wall-time bound before the parent gives up on it: a fresh worker first
# imports tblite and ASE (3-5 s on an idle core, several times that on a loaded machine).
STARTUP_GRACE_S = 30.0
POLL_S = 0.2  # how often a waiting compute() looks at the cancel flag


@dataclass(frozen=True, slots=True)
class Request:
    """A species to compute; ``unpaired`` chooses the spin state instead of the default."""

    species: str | Formula | SpeciesAnalysis
    unpaired: int | None = None


@dataclass(slots=True)
class _Job:
    """One structure waiting to be optimised: which species, which of its structures, tries so far."""

    species: int  # index of the request
    slot: int  # index of the structure within it
    structure: Structure
    attempts: int = 0


class GeometryPool:
    """Worker processes that optimise structures; use as a context manager, or call close()."""

    def __init__(self, limits: Limits = Limits(), workers: int | None = None, use_cache: bool = True) -> None:
        self.limits = limits
        self.workers = max(1, workers or os.cpu_count() or 1)
        self.use_cache = use_cache
        self._executor: ProcessPoolExecutor | None = None
        self._cancelled = threading.Event()
        self._lock = threading.Lock()
        self._computing = threading.Lock()  # one compute() at a time; cancel() may come from any thread

    def __enter__(self) -> GeometryPool:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def cancel(self) -> None:
        """Start no further structure (from any thread); those not started come back failed as cancelled.

        Structures already running finish within their own wall-time bound.
        """
        self._cancelled.set()

    def stop(self) -> None:
        """Cancel, and stop every worker process now, running structures included (from any thread).

        For a caller that is leaving (a server's shutdown or exit): no orphan worker outlives it.
        """
        self.cancel()
        self._discard_pool()

    def close(self) -> None:
        with self._lock:
            executor, self._executor = self._executor, None
        if executor is not None:
            executor.shutdown(wait=True, cancel_futures=True)

    # --- computing -----------------------------------------------------------------

    def compute(self, requests: Sequence[Request | str | Formula | SpeciesAnalysis],
                on_species: Callable[[ComputedSpecies], None] | None = None) -> list[ComputedSpecies]:
        """Every request's computed species, in the order asked; ``on_species`` hears each as it completes.

        One call at a time per pool (a second waits for the first).
        """
        with self._computing:
            return self._compute(requests, on_species)

    def _compute(self, requests: Sequence[Request | str | Formula | SpeciesAnalysis],
                 on_species: Callable[[ComputedSpecies], None] | None) -> list[ComputedSpecies]:
        self._cancelled.clear()
        asked = [r if isinstance(r, Request) else Request(r) for r in requests]
        missing = missing_packages()
        if missing:
            return [ComputedSpecies(_name(r.species), 0, METHOD, versions(), (),
                                    f"{' and '.join(missing)} not installed (pip install tblite ase)") for r in asked]
        results: list[ComputedSpecies | None] = [None] * len(asked)
        if self.use_cache:  # a species indexed whole needs no analysis, no structures built
            for index, request in enumerate(asked):
                if isinstance(request.species, str):
                    results[index] = species_cache.load(request.species, request.unpaired, self.limits)
        # Species are built one at a time while the workers compute what was built before (building
        # is the chemistry: isomers, point groups, a molecule's 3D model), so the first job starts at
        # once and the parent's building overlaps the workers' start and their calculations.
        starts: list[tuple[SpeciesAnalysis, tuple[Structure, ...]] | Skipped | None] = [None] * len(asked)
        slots: list[list[ComputedGeometry | None]] = [[] for _ in asked]
        cached = [0] * len(asked)
        unbuilt = deque(index for index, result in enumerate(results) if result is None)
        pending: deque[_Job] = deque()
        heard = [False] * len(asked)

        def build_next() -> None:
            index = unbuilt.popleft()
            start = starts[index] = _structures(asked[index], self.limits)
            if isinstance(start, Skipped):
                return
            slots[index] = [None] * len(start[1])
            for slot, structure in enumerate(start[1]):
                stored = cache.load(structure) if self.use_cache else None
                if stored is not None:
                    slots[index][slot] = stored
                    cached[index] += 1
                else:
                    pending.append(_Job(index, slot, structure))

        def finish_ready() -> None:
            for index, start in enumerate(starts):
                if results[index] is None and start is not None and all(g is not None for g in slots[index]):
                    done = results[index] = _species(asked[index], start, slots[index], cached[index])  # type: ignore[arg-type]
                    request = asked[index]
                    if self.use_cache and isinstance(request.species, str):
                        species_cache.store(request.species, request.unpaired, self.limits, done)
                if results[index] is not None and not heard[index]:
                    heard[index] = True
                    if on_species is not None:
                        on_species(results[index])  # type: ignore[arg-type]

        finish_ready()
        self._run(pending, slots, unbuilt, build_next, finish_ready)
        return results  # type: ignore[return-value]

    def _run(self, pending: deque[_Job], slots: list[list[ComputedGeometry | None]], unbuilt: deque[int],
             build_next: Callable[[], None], finish_ready: Callable[[], None]) -> None:
        running: dict[Future, tuple[_Job, float]] = {}
        while pending or running or unbuilt:
            if self._cancelled.is_set():
                while unbuilt:  # built, so that each of its structures comes back cancelled
                    build_next()
                while pending:
                    job = pending.popleft()
                    slots[job.species][job.slot] = failure(job.structure, "cancelled before it started")
                finish_ready()
            while pending and len(running) < self.workers:
                job = pending.popleft()
                job.attempts += 1
                future = self._pool().submit(worker.run, {"structure": job.structure.to_dict(),
                                                          "limits": _limits_dict(self.limits)})
                running[future] = (job, time.monotonic() + self.limits.wall_time_s + 2.0 + STARTUP_GRACE_S)
            timeout = POLL_S
            if unbuilt and not self._cancelled.is_set():
                build_next()  # one species between looks at the workers, so answers are taken in time
                finish_ready()  # a species found whole in the cache is done at once
                timeout = 0.0
            if not running:
                continue
            soonest = min(deadline for _, deadline in running.values())
            done, _ = wait(running, timeout=max(0.0, min(timeout, soonest - time.monotonic())),
                           return_when=FIRST_COMPLETED)
            broken = False
            for future in done:
                job, _ = running.pop(future)
                answer = self._answer(future, job)
                if answer is None:  # the worker died under it: once more on a fresh worker
                    broken = True
                    if job.attempts < 2:
                        pending.appendleft(job)
                        continue
                    answer = failure(job.structure, f"its worker process ended twice (the memory bound of "
                                                     f"{self.limits.memory_bytes >> 20} MB of address space, the "
                                                     f"CPU-time bound, or a crash in the library)")
                slots[job.species][job.slot] = answer
                if self.use_cache:
                    cache.store(answer)
            if done:
                finish_ready()
            now = time.monotonic()
            late = [f for f, (_, deadline) in running.items() if deadline <= now]
            if late or broken:
                for future in late:
                    job, _ = running.pop(future)
                    slots[job.species][job.slot] = failure(
                        job.structure, f"ran out of time (no answer within {self.limits.wall_time_s:g} s "
                                       f"plus {STARTUP_GRACE_S:g} s to start a worker); its worker was stopped")
                # A stuck or dead worker takes the pool with it: the others' jobs go back in line.
                for future, (job, _) in running.items():
                    job.attempts -= 1 if not future.done() else 0
                    pending.appendleft(job)
                running.clear()
                self._discard_pool()
                finish_ready()

    def _answer(self, future: Future, job: _Job) -> ComputedGeometry | None:
        """The job's checked result; None when its worker process died."""
        try:
            raw = future.result()
        except BrokenProcessPool:
            return None
        except MemoryError:  # wherever in the worker the bound was reached (loading, unpickling, the job)
            return failure(job.structure, f"the worker ran out of its memory bound "
                                          f"({self.limits.memory_bytes >> 20} MB of address space)")
        except Exception as error:  # anything the worker let through (it should not): a failure, not a crash
            return failure(job.structure, f"the worker raised {type(error).__name__}: {str(error)[:300]}")
        try:
            found = geometry_from_dict(raw)
        except BadResult as error:
            return failure(job.structure, f"the worker's answer is unusable ({error})")
        if (found.species, found.isomer, found.symbols, found.labels) != (
                job.structure.species, job.structure.isomer, job.structure.symbols, job.structure.labels):
            return failure(job.structure, "the worker answered for another structure")
        return found

    def _pool(self) -> ProcessPoolExecutor:
        with self._lock:
            if self._executor is None:
                self._executor = ProcessPoolExecutor(
                    max_workers=self.workers, mp_context=multiprocessing.get_context("spawn"),
                    initializer=worker.initialise, initargs=(self.limits.memory_bytes,),
                    max_tasks_per_child=self.limits.tasks_per_worker)
            return self._executor

    def _discard_pool(self) -> None:
        """Stop every worker now (a hung one included) and forget the pool; the next job starts a new one."""
        with self._lock:
            executor, self._executor = self._executor, None
        if executor is None:
            return
        kill = getattr(executor, "kill_workers", None)  # Python 3.14+
        if kill is not None:
            kill()
        else:
            for process in list((getattr(executor, "_processes", None) or {}).values()):
                if process.is_alive():
                    process.kill()
        executor.shutdown(wait=False, cancel_futures=True)


def compute_species(species: str | Formula | SpeciesAnalysis, limits: Limits = Limits(),
                    unpaired: int | None = None, use_cache: bool = True) -> ComputedSpecies:
    """One species with a pool of its own (for scripts and tests; a server keeps one GeometryPool)."""
    with GeometryPool(limits, use_cache=use_cache) as pool:
        return pool.compute([Request(species, unpaired)])[0]


# --- helpers ----------------------------------------------------------------------


def _name(species: str | Formula | SpeciesAnalysis) -> str:
    if isinstance(species, str):
        return species
    return species.text if isinstance(species, Formula) else species.formula


def _structures(request: Request, limits: Limits) -> tuple[SpeciesAnalysis, tuple[Structure, ...]] | Skipped:
    species = request.species
    if isinstance(species, SpeciesAnalysis):
        analysis = species
    else:
        try:
            formula = parse_formula(species) if isinstance(species, str) else species
        except ValueError as error:
            return Skipped(f"{species!r} is not a formula the notation reads: {error}")
        analysis = analyse(formula)
    built = start_structures(analysis, limits, request.unpaired)
    return built if isinstance(built, Skipped) else (analysis, built)


def _species(request: Request, start: tuple[SpeciesAnalysis, tuple[Structure, ...]] | Skipped,
             structures: list[ComputedGeometry], cached: int) -> ComputedSpecies:
    if isinstance(start, Skipped):
        return ComputedSpecies(_name(request.species), 0, METHOD, versions(), (), start.reason)
    analysis, built = start
    notes = ()
    centre = analysis.centres[0] if not built[0].connections else None  # a molecule is built once
    listed = 0 if centre is None else len(centre.isomers) - sum(
        1 for i, iso in enumerate(centre.isomers) if iso.enantiomer is not None and iso.enantiomer < i)
    if listed > len(built):
        notes = (f"only the first {len(built)} of {listed} isomers (by the analysis's rank) were computed",)
    group, unavailable = _model_symmetry(analysis, built)
    return ComputedSpecies(analysis.formula, analysis.charge, METHOD, versions(),
                           ordered(_identified(structures, built)), None, notes, cached, group, unavailable)


def _model_symmetry(analysis: SpeciesAnalysis, built: tuple[Structure, ...]) -> tuple[str | None, str | None]:
    """(point group of the 3D model, why none) for a species built as a molecule of several centres,
    whose polarity and point group the review reads from that model; (None, None) otherwise."""
    whole = analysis.molecule
    if not built[0].connections or whole is None or analysis.outside_model is not None or len(whole.centres) <= 1:
        return None, None
    from ..chem.molecule_geometry import whole_molecule_symmetry  # the model is made already (the start)

    found = whole_molecule_symmetry(whole.molecule)
    return (None, found) if isinstance(found, str) else (found[0], None)


def _identified(structures: list[ComputedGeometry], built: tuple[Structure, ...]) -> list[ComputedGeometry]:
    """Each structure, marked with the isomer it became where the optimisation carried it into another."""
    if len(built) < 2:
        return structures
    starts = [(s.positions, s.labels) for s in built]
    out = []
    for own, geometry in enumerate(structures):
        if geometry.failed is None:
            closest = closest_start(geometry.positions, geometry.labels, starts, own)
            if closest != own:
                geometry = replace(geometry, became=built[closest].isomer)
        out.append(geometry)
    return out


def _limits_dict(limits: Limits) -> dict[str, float | int]:
    return {name: getattr(limits, name) for name in Limits.__slots__}  # type: ignore[attr-defined]
