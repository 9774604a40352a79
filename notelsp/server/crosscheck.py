"""Cross-check an annotation with a calculation, from the editor.

- a source action "Cross-check ... with a calculation" on each annotation
  (:func:`cross_check_actions`, offered by the code-action handler when the
  editor asks for source actions) runs the command ``notelsp.crossCheck``
  with ``[uri, offset]``;
- the request ``notelsp/crossCheck`` with ``{"uri", "offset", "level"?}`` does
  the same for clients that send requests directly;
- with the setting ``cross_check_automatic``, :func:`schedule_automatic`
  (called by the diagnostics module after each open and change) cross-checks
  the document's annotations by itself, a while after typing stops.

Every run reports work-done progress (begin, one report per optimisation
step, end) and stops when the progress is cancelled or the request is
cancelled (``$/cancelRequest`` of the ``notelsp/crossCheck`` request or of the
``workspace/executeCommand``, which ``NoteProtocol`` passes on to the command:
the running task is cancelled, which kills the worker process).  Requests
answer ``{"status", "markdown", "findings"}``.
The computed findings are handed to the analysis host per document, keyed by
the annotation's text (``AnalysisHost.set_checked``); its snapshots place them
beside the review's and the diagnostics module publishes them, so they survive
later reviews and vanish when the annotation is edited.  Results are also kept in memory by species and level,
so automatic runs never repeat a calculation.
"""

from __future__ import annotations

import asyncio
import logging
from collections.abc import Mapping
from typing import TYPE_CHECKING, Any
from urllib.parse import unquote

from lsprotocol import types

from ..crosscheck.availability import missing_extra
from ..crosscheck.levels import DEFAULT_LEVEL, DEFAULT_LEVEL_TEXT, LevelOfTheory, Limits, parse_level
from ..notation.model import Annotation, Span
from ..review.findings import Finding
from .app import HeldDocument, NoteServer
from .diagnostics import republish
from .progress import progress_token

if TYPE_CHECKING:  # the runner and the report are imported on the first calculation: the server starts without them
    from ..crosscheck.runner import CrossCheckResult, Progress

log = logging.getLogger("notelsp.server")

COMMAND = "notelsp.crossCheck"
REQUEST = "notelsp/crossCheck"
ACTION_KIND = "source.crossCheck"  # a sub-kind of source: editors list it with source actions
AUTOMATIC_DELAY_SECONDS = 1.5  # far longer than the review's pause: a calculation costs seconds of CPU
REMEMBERED_RESULTS = 64  # species x level results kept in memory


def wants_cross_check_actions(only: list[str] | None) -> bool:
    """Whether a code-action request asks for source actions (``only`` names ``source`` or our kind).

    Offered only then, as editors list source actions in their own menu
    ("Source Action...", ``only = {"source"}``) and never in the light bulb.
    It also spares clients built on lsprotocol's converter, which reads any
    code action that carries a command as a bare Command.
    """
    return bool(only) and any(ACTION_KIND == kind or ACTION_KIND.startswith(f"{kind}.") for kind in map(str, only))


def _checkable(annotation: Annotation) -> bool:
    return annotation.formula is not None and not annotation.errors and not annotation.is_comparison


def cross_check_actions(held: HeldDocument, wanted: Span) -> list[types.CodeAction]:
    """One "cross-check" action per annotation touching ``wanted`` (for the code-action handler)."""
    if held.review is None:
        return []
    actions = []
    for annotation in held.review.annotations:
        if not _checkable(annotation):
            continue
        if not (annotation.span.start <= wanted.end and wanted.start <= annotation.span.end):
            continue
        title = f"Cross-check {annotation.formula.text} with a calculation ({DEFAULT_LEVEL_TEXT})"
        actions.append(
            types.CodeAction(
                title=title,
                kind=ACTION_KIND,
                command=types.Command(title=title, command=COMMAND, arguments=[held.uri, annotation.span.start]),
            )
        )
    return actions


# --- what the server keeps between runs -----------------------------------------


def _state(ls: NoteServer, name: str, factory):
    """Per-server state of this feature, created on first use (the server object is not ours)."""
    value = getattr(ls, name, None)
    if value is None:
        value = factory()
        setattr(ls, name, value)
    return value


def _kept(ls: NoteServer, uri: str) -> Mapping[str, tuple[Finding, ...]]:
    """Annotation text -> the document's computed findings (relative to the annotation's start), from the host."""
    return ls.host.checked(unquote(uri))


def _results(ls: NoteServer) -> dict[tuple[str, str], CrossCheckResult]:
    """(formula, level label) -> the last result, oldest first."""
    return _state(ls, "crosscheck_results", dict)


def _remember_result(ls: NoteServer, result: CrossCheckResult) -> None:
    results = _results(ls)
    results.pop((result.species, result.level.label), None)
    results[(result.species, result.level.label)] = result
    while len(results) > REMEMBERED_RESULTS:
        results.pop(next(iter(results)))


def _keep_findings(ls: NoteServer, held: HeldDocument, annotation: Annotation, findings: tuple[Finding, ...]) -> None:
    source = held.text[annotation.span.start : annotation.span.end]
    key = unquote(held.uri)
    kept = {**ls.host.checked(key), source: tuple(f.shifted(-annotation.span.start) for f in findings)}
    ls.host.set_checked(key, kept)  # the host places them with the review's findings


def _publish(ls: NoteServer, uri: str) -> None:
    """Show the document's computed findings beside the review's, by the diagnostics module's one path."""
    republish(ls, uri)


# --- one calculation, with progress ---------------------------------------------


class ProgressCancelled(Exception):
    """The user cancelled the work-done progress of a cross-check."""


class _ProgressReporter:
    """Work-done progress for one cross-check; cancelling it cancels ``task``."""

    def __init__(self, ls: NoteServer, task: asyncio.Task) -> None:
        self.ls, self.task = ls, task
        self.token: str | None = None
        self.cancelled_by_client = False

    async def begin(self, title: str) -> None:
        token = await progress_token(self.ls, "crosscheck")
        if token is None:
            return
        self.token = token
        loop = asyncio.get_running_loop()
        cancelled = self.ls.work_done_progress.tokens[token]
        cancelled.add_done_callback(lambda future: future.cancelled() and loop.call_soon_threadsafe(self._cancel))
        self.ls.work_done_progress.begin(token, types.WorkDoneProgressBegin(title=title, cancellable=True, percentage=0))

    def _cancel(self) -> None:
        if self.token is not None:  # a cancel arriving after the end changes nothing
            self.cancelled_by_client = True
            self.task.cancel()

    def report(self, progress: Progress) -> None:
        if self.token is not None:
            self.ls.work_done_progress.report(
                self.token,
                types.WorkDoneProgressReport(message=progress.message, percentage=round(100 * progress.fraction), cancellable=True),
            )

    def end(self, message: str) -> None:
        if self.token is not None:
            self.ls.work_done_progress.end(self.token, types.WorkDoneProgressEnd(message=message))
            self.ls.work_done_progress.tokens.pop(self.token, None)
            self.token = None


async def _calculated(ls: NoteServer, annotation: Annotation, level: LevelOfTheory) -> CrossCheckResult:
    """Run the calculation of the annotation's species with work-done progress.

    Raises ProgressCancelled when the user cancels the progress, CancelledError
    when the running task is cancelled otherwise ($/cancelRequest, shutdown).
    """
    task = asyncio.current_task()
    assert task is not None
    reporter = _ProgressReporter(ls, task)
    from ..crosscheck.runner import cross_check

    formula = annotation.formula
    await reporter.begin(f"Cross-check {formula.text} ({level.label})")
    try:
        result = await cross_check(formula, level, Limits(), reporter.report)
    except asyncio.CancelledError:
        reporter.end("cancelled")
        if reporter.cancelled_by_client:
            task.uncancel()
            raise ProgressCancelled() from None
        raise
    except Exception:
        reporter.end("failed")
        raise
    reporter.end(result.message or result.status)
    _remember_result(ls, result)
    return result


async def run_cross_check(ls: NoteServer, uri: str, offset: int, level_text: str | None = None) -> dict[str, Any]:
    """Cross-check the annotation at ``offset`` of the open document ``uri``; the answer both entry points give."""
    from ..crosscheck.report import cross_check_findings, cross_check_markdown

    held = ls.held(uri)
    annotation: Annotation | None = held.review.annotation_at(offset) if held and held.review else None
    if held is None or annotation is None or not _checkable(annotation):
        return {"status": "no-annotation", "markdown": "", "findings": [], "message": f"no annotation to cross-check at offset {offset} of {uri}"}
    try:
        level = parse_level(level_text or DEFAULT_LEVEL_TEXT)
    except ValueError as error:
        return {"status": "bad-level", "markdown": "", "findings": [], "message": str(error)}
    missing = missing_extra()
    if missing:
        ls.show(f"notelsp cross-check unavailable: {missing}")
        return {"status": "missing-extra", "markdown": "", "findings": [], "message": missing}
    try:
        result = await _calculated(ls, annotation, level)
    except ProgressCancelled:
        # answer normally: raising here would leave an executeCommand request unanswered
        return {"status": "cancelled", "markdown": "", "findings": [], "message": "cancelled from the progress"}
    findings = cross_check_findings(result, annotation, ls.settings.angle_tolerance, settings=ls.settings)
    markdown = cross_check_markdown(result, annotation, ls.settings.angle_tolerance, settings=ls.settings)
    _keep_findings(ls, held, annotation, findings)
    _publish(ls, uri)
    ls.window_log_message(types.LogMessageParams(type=types.MessageType.Info, message=markdown))
    return {
        "status": result.status,
        "message": result.message,
        "markdown": markdown,
        "findings": [_finding_json(f, held) for f in findings],
    }


# --- automatic cross-checks (setting cross_check_automatic) ----------------------


def _automatic_tasks(ls: NoteServer) -> dict[str, asyncio.Task]:
    return _state(ls, "crosscheck_automatic", dict)


def _calculating(ls: NoteServer) -> set[str]:
    """Documents whose automatic run is past its pause and calculating."""
    return _state(ls, "crosscheck_calculating", set)


def _look_again(ls: NoteServer) -> set[str]:
    """Documents edited while their automatic run was calculating."""
    return _state(ls, "crosscheck_look_again", set)


def schedule_automatic(ls: NoteServer, uri: str, delay: float = AUTOMATIC_DELAY_SECONDS) -> None:
    """After an open or change: cross-check the document's new annotations once typing pauses.

    Does nothing unless ``cross_check_automatic`` is set.  An edit during the
    pause restarts it; an edit during a calculation lets the calculation
    finish (its result is kept either way) and looks at the document again after.
    """
    if not ls.settings.cross_check_automatic:
        return
    tasks = _automatic_tasks(ls)
    running = tasks.get(uri)
    if running is not None and not running.done():
        if uri in _calculating(ls):
            _look_again(ls).add(uri)
            return
        running.cancel()
    tasks[uri] = asyncio.get_running_loop().create_task(_automatic_run(ls, uri, delay))


def _unchecked(ls: NoteServer, held: HeldDocument) -> list[Annotation]:
    """The checkable annotations with no computed findings kept for their text yet."""
    if held.review is None:
        return []
    kept = _kept(ls, held.uri)
    return [a for a in held.review.annotations if _checkable(a) and held.text[a.span.start : a.span.end] not in kept]


async def _automatic_run(ls: NoteServer, uri: str, delay: float) -> None:
    await asyncio.sleep(delay)
    if missing_extra():
        return  # nothing to run; an explicit request says how to install the extra
    from ..crosscheck.report import cross_check_findings

    lock = _state(ls, "crosscheck_lock", asyncio.Lock)  # one automatic calculation at a time: CPU is shared
    _calculating(ls).add(uri)
    try:
        while True:
            _look_again(ls).discard(uri)
            held = ls.held(uri)
            if held is None or not ls.settings.cross_check_automatic:
                return
            for annotation in _unchecked(ls, held):
                result = _results(ls).get((annotation.formula.text, DEFAULT_LEVEL.label))
                if result is None:
                    try:
                        async with lock:
                            result = await _calculated(ls, annotation, DEFAULT_LEVEL)
                    except ProgressCancelled:
                        _keep_findings(ls, held, annotation, ())  # declined: not again until the annotation is edited
                        continue
                findings = cross_check_findings(result, annotation, ls.settings.angle_tolerance, settings=ls.settings)
                _keep_findings(ls, held, annotation, findings)
                _publish(ls, uri)
            if uri not in _look_again(ls):
                return
    except Exception:
        log.exception("automatic cross-check of %s failed", uri)
    finally:
        _calculating(ls).discard(uri)


def _finding_json(finding: Finding, held: HeldDocument) -> dict[str, Any]:
    where = held.index.range(finding.span)
    return {
        "code": finding.code,
        "severity": finding.severity.value,
        "message": finding.message,
        "range": {
            "start": {"line": where.start.line, "character": where.start.character},
            "end": {"line": where.end.line, "character": where.end.character},
        },
    }


def register(server: NoteServer) -> None:
    server.on_change.append(schedule_automatic)

    @server.command(COMMAND)
    async def cross_check_command(ls: NoteServer, *arguments: Any) -> dict[str, Any]:
        """Arguments: uri, offset of the annotation, and optionally a level such as "HF/STO-3G"."""
        if len(arguments) not in (2, 3):
            return {"status": "bad-arguments", "markdown": "", "findings": [], "message": "expected [uri, offset, level?]"}
        level = arguments[2] if len(arguments) == 3 else None
        return await run_cross_check(ls, str(arguments[0]), int(arguments[1]), level)

    @server.feature(REQUEST)
    async def cross_check_request(ls: NoteServer, params: Any) -> dict[str, Any]:
        uri = _field(params, "uri")
        offset = _field(params, "offset")
        return await run_cross_check(ls, str(uri), int(offset or 0), _field(params, "level"))


def _field(params: Any, name: str) -> Any:
    if isinstance(params, dict):
        return params.get(name)
    return getattr(params, name, None)
