"""Computed geometries in the editor: the rules' findings at once, the calculation's as it arrives.

Each time a document's diagnostics are published for its current text, the
species its annotations name (``species_to_compute``) are handed to
:func:`want`.  Those with no result yet are queued, and one background task
computes them with a :class:`~notelsp.compute.GeometryPool` made on first need
(its worker processes start then, never at start-up), as many species at a
time as the pool has workers, so a species that no open document names any
more is dropped before it starts.  Results stay in memory for the session,
shared by every document, beside the pool's disk cache; the worker processes
end after IDLE_SECONDS with nothing to compute and start again on the next need.

An arriving result republishes the diagnostics of the documents that name it,
through the one publication path of :mod:`.diagnostics` (which passes the
results to ``review_text``: :func:`computed_for`), and hover shows it
(:func:`hover_lines`).  Progress is reported with work-done progress to clients
that support it.  ``compute = false`` (settings file or editor section)
or the environment variable ``NOTELSP_COMPUTE=off`` turn it off.
Closing the last document that wants the species under way cancels their
structures not yet started; shutdown, exit and the end of input cancel
everything and stop the worker processes.
"""

from __future__ import annotations

import asyncio
import itertools
import logging
import os
from collections import OrderedDict
from collections.abc import Iterable
from typing import TYPE_CHECKING, Any

from lsprotocol import types

from .app import NoteServer
from .diagnostics import republish
from .exiting import before_leaving
from .progress import progress_token

if TYPE_CHECKING:  # the compute package (and its pool) is imported on first need: the server starts without it
    from ..compute import ComputedSpecies, GeometryPool

log = logging.getLogger("notelsp.server")

SWITCH_VARIABLE = "NOTELSP_COMPUTE"  # "off" (or 0, false, no) turns computing off for the whole process
IDLE_SECONDS = 120.0  # worker processes asked nothing for this long are ended (each holds tblite's memory)
REMEMBERED_SPECIES = 4096  # results kept in memory (a few kB each); the disk cache keeps more


def switched_off_by_environment() -> bool:
    return os.environ.get(SWITCH_VARIABLE, "").strip().lower() in ("off", "0", "false", "no")


class Geometries:
    """What the server keeps for computed geometries (one per server, made on first use)."""

    def __init__(self) -> None:
        self.results: OrderedDict[str, ComputedSpecies] = OrderedDict()  # species as written -> result
        self.wanted: dict[str, tuple[str, ...]] = {}  # open document -> the species it names
        self.queued: dict[str, None] = {}  # species to compute, in the order asked
        self.running: tuple[str, ...] = ()  # the batch the pool is computing now
        self.batch_cancelled = False
        self.pool: GeometryPool | None = None
        self.task: asyncio.Task | None = None
        self.idle: asyncio.TimerHandle | None = None  # ends the workers when nothing is asked for a while
        self.dropped = 0  # species unqueued during the current run: no open note names them any more
        self.stopped = False

    def wanted_anywhere(self) -> set[str]:
        return {species for named in self.wanted.values() for species in named}

    def remember(self, name: str, result: ComputedSpecies) -> None:
        self.results.pop(name, None)
        self.results[name] = result
        while len(self.results) > REMEMBERED_SPECIES:
            self.results.popitem(last=False)

    def stop(self) -> None:
        """Cancel everything and stop the worker processes now (from any thread; also at exit)."""
        self.stopped = True
        self.queued.clear()
        if self.task is not None and not self.task.done():
            try:
                self.task.cancel()
            except RuntimeError:  # the loop is gone (called on the way out of the process)
                pass
        pool, self.pool = self.pool, None
        if pool is not None:
            pool.stop()


def _state(ls: NoteServer) -> Geometries:
    state = getattr(ls, "geometries", None)
    if state is None:
        state = Geometries()
        ls.geometries = state  # type: ignore[attr-defined]
        before_leaving(state.stop)
    return state


def enabled(ls: NoteServer, uri: str) -> bool:
    return not switched_off_by_environment() and ls.settings_for(uri)[0].compute


# --- what the review and hover read ----------------------------------------------


def computed_for(ls: NoteServer, uri: str, species: Iterable[str] | None = None) -> dict[str, ComputedSpecies]:
    """The results known for ``species`` (default: those the document named when last reviewed), for ``review_text``."""
    state: Geometries | None = getattr(ls, "geometries", None)
    if state is None or not state.results or not enabled(ls, uri):
        return {}
    names = state.wanted.get(uri, ()) if species is None else species
    return {name: state.results[name] for name in names if name in state.results}


def hover_lines(ls: NoteServer, uri: str, species: Iterable[str]) -> list[str]:
    """Hover text for each species: its computed geometry, "computing…" while pending, or why it failed."""
    if not enabled(ls, uri):
        return []
    state: Geometries | None = getattr(ls, "geometries", None)
    lines = []
    for name in species:
        result = state.results.get(name) if state is not None else None
        if result is not None:
            lines.append(computed_markdown(name, result))
        elif state is not None and (name in state.queued or name in state.running):
            lines.append(f"{name}: geometry (GFN2-xTB) computing…")
    return lines


def computed_markdown(name: str, result: ComputedSpecies) -> str:
    """One line per usable structure: "computed, GFN2-xTB: H-N-H 107.7°" (isomers named, energy gaps given)."""
    failed = result.failed
    if failed is not None:
        return f"{name}: no computed geometry ({result.method}): {failed}"
    gaps = dict(result.relative_energies_kj_mol())
    lines = []
    for structure in (s for s in result.structures if s.usable):
        angles = _angle_text(structure.angles)
        isomer = f" {structure.isomer}" if structure.isomer else ""
        gap = gaps.get(structure.isomer)
        above = f", {gap:.1f} kJ/mol above the lowest" if gap else ""
        spin = f" ({structure.spin})" if structure.unpaired else ""  # open shells say which state was taken
        lines.append(f"{name}{isomer} computed, {result.method}: {angles}{above}{spin}")
    return "\n\n".join(lines + list(result.notes))


def _angle_text(angles) -> str:
    """Each kind of angle once, with its distinct values (within 0.5° they are one), smallest first."""
    by_kind: dict[str, list[float]] = {}
    for angle in angles:
        a, centre, b = angle.labels
        kind = "-".join((min(a, b), centre, max(a, b)))
        by_kind.setdefault(kind, []).append(angle.degrees)
    parts = []
    for kind, values in by_kind.items():
        distinct: list[float] = []
        for value in sorted(values):
            if not distinct or value - distinct[-1] > 0.5:
                distinct.append(value)
        parts.append(f"{kind} " + "/".join(f"{v:.1f}°" for v in distinct))
    return ", ".join(parts) or "no angle at the centre"


# --- what the diagnostics module tells ---------------------------------------------


def want(ls: NoteServer, uri: str, species: tuple[str, ...], used: dict[str, Any]) -> bool:
    """The document (current version) names ``species``; queue those not computed yet.

    ``used``: the results its publication was reviewed with.  Answers whether a result it
    did not use is known already (named anew, computed for another document): then the
    caller publishes again.
    """
    state = _state(ls)
    if state.stopped:
        return False
    if not enabled(ls, uri):
        state.wanted.pop(uri, None)
        _drop_unwanted(state)
        return False
    state.wanted[uri] = species
    for name in species:
        if name not in state.results and name not in state.running:
            state.queued.setdefault(name, None)
    _drop_unwanted(state)
    if state.queued and (state.task is None or state.task.done()):
        if state.idle is not None:
            state.idle.cancel()
        state.dropped = 0
        state.task = asyncio.get_running_loop().create_task(_compute_queued(ls, state))
    return any(name in state.results and name not in used for name in species)


def forget(ls: NoteServer, uri: str) -> None:
    """The document closed: what only it named is not computed."""
    state: Geometries | None = getattr(ls, "geometries", None)
    if state is not None and state.wanted.pop(uri, None) is not None:
        _drop_unwanted(state)


def _drop_unwanted(state: Geometries) -> None:
    """Unqueue species no open document names; cancel the running batch when none of it is wanted."""
    wanted = state.wanted_anywhere()
    for name in [n for n in state.queued if n not in wanted]:
        del state.queued[name]
        state.dropped += 1
    if state.running and not wanted.intersection(state.running) and state.pool is not None:
        state.batch_cancelled = True
        state.pool.cancel()  # structures not started are dropped; running ones end within their bound


# --- the background work ---------------------------------------------------------


def _new_pool() -> GeometryPool:
    from ..compute import GeometryPool

    return GeometryPool()


async def _compute_queued(ls: NoteServer, state: Geometries) -> None:
    progress = _Progress(ls)
    loop = asyncio.get_running_loop()
    try:
        while state.queued and not state.stopped:
            if state.pool is None:
                state.pool = await asyncio.to_thread(_new_pool)  # importing the compute stack takes a while
                if state.stopped:  # stopped while the pool was made: it has no workers yet
                    state.pool = None
                    return
            pool = state.pool
            batch = tuple(itertools.islice(state.queued, pool.workers))
            for name in batch:
                del state.queued[name]
            state.running, state.batch_cancelled = batch, False
            await progress.begin(len(batch) + len(state.queued))

            def heard(result: ComputedSpecies, batch=batch) -> None:  # in the pool's thread
                loop.call_soon_threadsafe(_arrived, ls, state, batch, result, progress)

            try:
                results = await asyncio.to_thread(pool.compute, batch, heard)
            finally:
                state.running = ()
            # Arrivals were handed to the loop before the batch's end: any not placed by name is placed here.
            for name, result in zip(batch, results):
                if name not in progress.heard:
                    progress.heard.add(name)
                    if _keep(ls, state, name, result):
                        progress.report(name)
        progress.end(f"{progress.kept} species computed" + ("" if not state.dropped else
                     f"; {state.dropped} no open note names any more"))
    except asyncio.CancelledError:
        progress.end("cancelled")
        raise
    except Exception:
        log.exception("computing geometries failed")
        progress.end("failed")
    finally:
        if not state.stopped:
            state.idle = loop.call_later(IDLE_SECONDS, _close_when_idle, state)


def _close_when_idle(state: Geometries) -> None:
    """Nothing asked for a while: end the worker processes (the next need starts them again)."""
    if state.task is not None and not state.task.done():
        return
    pool, state.pool = state.pool, None
    if pool is not None:
        asyncio.get_running_loop().run_in_executor(None, pool.close)  # no structure is running: quick


def _arrived(ls: NoteServer, state: Geometries, batch: tuple[str, ...], result: ComputedSpecies,
             progress: _Progress) -> None:
    if result.species not in batch:
        return  # named otherwise by the analysis: placed when the batch ends
    progress.heard.add(result.species)
    if _keep(ls, state, result.species, result):
        progress.report(result.species)


def _keep(ls: NoteServer, state: Geometries, name: str, result: ComputedSpecies | None) -> bool:
    """Keep the result and show it in the documents that name it; False when it is not one to keep."""
    if result is None or state.stopped:
        return False
    if state.batch_cancelled and result.failed is not None:
        return False  # possibly cancelled before it started: not a result to keep
    state.remember(name, result)
    for uri, named in list(state.wanted.items()):
        if name in named:
            republish(ls, uri)
    return True


class _Progress:
    """Work-done progress over one run of the queue, for clients that support it; silent otherwise."""

    def __init__(self, ls: NoteServer) -> None:
        self.ls = ls
        self.token: str | None = None
        self.asked = False
        self.kept = 0  # results kept (reported)
        self.heard: set[str] = set()  # species of this run whose result came back
        self.total = 0

    async def begin(self, left: int) -> None:
        """A batch starts; ``left``: it and the species queued after it."""
        self.total = self.kept + left
        if self.asked:
            return
        self.asked = True
        token = await progress_token(self.ls, "geometries")
        if token is None:
            return
        self.token = token
        self.ls.work_done_progress.begin(token, types.WorkDoneProgressBegin(
            title="Computing geometries (GFN2-xTB)", message=f"{self.total} species", percentage=0, cancellable=False))

    def report(self, name: str) -> None:
        self.kept += 1
        if self.token is not None:
            total = max(self.total, self.kept)
            self.ls.work_done_progress.report(self.token, types.WorkDoneProgressReport(
                message=f"{name} ({self.kept} of {total})", percentage=round(100 * self.kept / total)))

    def end(self, message: str) -> None:
        if self.token is not None:
            self.ls.work_done_progress.end(self.token, types.WorkDoneProgressEnd(message=message))
            self.ls.work_done_progress.tokens.pop(self.token, None)
            self.token = None


def register(server: NoteServer) -> None:
    server.computed_geometries = computed_for
    server.wants_geometries = want
    server.on_close.append(forget)

    @server.feature(types.SHUTDOWN)
    def shutdown(ls: NoteServer, params: Any) -> None:
        state: Geometries | None = getattr(ls, "geometries", None)
        if state is not None:
            state.stop()

    @server.feature(types.EXIT)
    def exit_(ls: NoteServer, params: Any) -> None:
        state: Geometries | None = getattr(ls, "geometries", None)
        if state is not None:
            state.stop()
