"""Cross-check an annotation with a calculation, from the editor.

- a code action "Cross-check with a calculation" on each annotation
  (:func:`cross_check_actions`, offered by the code-action handler) runs the
  command ``notelsp.crossCheck`` with ``[uri, offset]``;
- the request ``notelsp/crossCheck`` with ``{"uri", "offset", "level"?}`` does
  the same for clients that send requests directly.

Both report work-done progress (begin, one report per optimisation step,
end), stop when the progress is cancelled or the request is cancelled
(``$/cancelRequest``: the request's task is cancelled, which kills the worker
process), and answer ``{"status", "markdown", "findings"}``.  The computed
findings are kept per document (:func:`computed_diagnostics`) and published
with the review's diagnostics once the calculation ends.  Nothing runs by
itself.
"""

from __future__ import annotations

import asyncio
import itertools
import logging
from typing import Any

from lsprotocol import types

from ..crosscheck.availability import missing_extra
from ..crosscheck.levels import DEFAULT_LEVEL_TEXT, Limits, parse_level
from ..crosscheck.report import cross_check_findings, cross_check_markdown
from ..crosscheck.runner import Progress, cross_check
from ..notation.model import Annotation, Span
from ..review.findings import Finding
from .app import HeldDocument, NoteServer
from .diagnostics import diagnostics_of, to_diagnostic

log = logging.getLogger("notelsp.server")

COMMAND = "notelsp.crossCheck"
REQUEST = "notelsp/crossCheck"
ACTION_KIND = "source.crossCheck"  # a sub-kind of source: editors list it with source actions
_tokens = itertools.count(1)


def cross_check_actions(held: HeldDocument, wanted: Span) -> list[types.CodeAction]:
    """One "cross-check" action per annotation touching ``wanted`` (for the code-action handler)."""
    if held.review is None:
        return []
    actions = []
    for annotation in held.review.annotations:
        if annotation.formula is None or annotation.errors:
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


def _computed(ls: NoteServer) -> dict[str, dict[str, tuple[Finding, ...]]]:
    """uri -> annotation text -> computed findings (relative to the annotation's start)."""
    store = getattr(ls, "crosscheck_findings", None)
    if store is None:
        store = {}
        ls.crosscheck_findings = store  # type: ignore[attr-defined]
    return store


def computed_diagnostics(ls: NoteServer, held: HeldDocument) -> list[types.Diagnostic]:
    """Diagnostics of the cross-checks run on this document whose annotation is still there unchanged."""
    if held.review is None:
        return []
    kept = _computed(ls).get(held.uri, {})
    diagnostics = []
    for annotation in held.review.annotations:
        relative = kept.get(held.text[annotation.span.start : annotation.span.end])
        for finding in relative or ():
            diagnostics.append(to_diagnostic(_shifted(finding, annotation.span.start), held.index))
    return diagnostics


def _shifted(finding: Finding, delta: int) -> Finding:
    return Finding(finding.code, finding.severity, finding.message, finding.span.shifted(delta), finding.formula, finding.claim, finding.fixes)


def _publish(ls: NoteServer, held: HeldDocument) -> None:
    document = ls.client_capabilities.text_document
    if document and document.diagnostic:
        return  # a pulling client asks again; the diagnostics handler can merge computed_diagnostics
    ls.text_document_publish_diagnostics(
        types.PublishDiagnosticsParams(
            uri=held.uri,
            version=held.version,
            diagnostics=diagnostics_of(held.review, held.index) + computed_diagnostics(ls, held),
        )
    )


class _ProgressReporter:
    """Work-done progress for one cross-check; cancelling it cancels ``task``."""

    def __init__(self, ls: NoteServer, task: asyncio.Task) -> None:
        self.ls, self.task = ls, task
        self.token: str | None = None
        self.cancelled_by_client = False

    async def begin(self, title: str) -> None:
        window = self.ls.client_capabilities.window
        if not (window and window.work_done_progress):
            return
        token = f"notelsp-crosscheck-{next(_tokens)}"
        await self.ls.work_done_progress.create_async(token)
        self.token = token
        loop = asyncio.get_running_loop()
        cancelled = self.ls.work_done_progress.tokens[token]
        cancelled.add_done_callback(lambda future: future.cancelled() and loop.call_soon_threadsafe(self._cancel))
        self.ls.work_done_progress.begin(token, types.WorkDoneProgressBegin(title=title, cancellable=True, percentage=0))

    def _cancel(self) -> None:
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


async def run_cross_check(ls: NoteServer, uri: str, offset: int, level_text: str | None = None) -> dict[str, Any]:
    """Cross-check the annotation at ``offset`` of the open document ``uri``; the answer both entry points give."""
    held = ls.held(uri)
    annotation: Annotation | None = held.review.annotation_at(offset) if held and held.review else None
    if held is None or annotation is None or annotation.formula is None:
        return {"status": "no-annotation", "markdown": "", "findings": [], "message": f"no annotation at offset {offset} of {uri}"}
    try:
        level = parse_level(level_text or DEFAULT_LEVEL_TEXT)
    except ValueError as error:
        return {"status": "bad-level", "markdown": "", "findings": [], "message": str(error)}
    missing = missing_extra()
    if missing:
        ls.show(f"notelsp cross-check unavailable: {missing}")
        return {"status": "missing-extra", "markdown": "", "findings": [], "message": missing}
    task = asyncio.current_task()
    assert task is not None
    reporter = _ProgressReporter(ls, task)
    formula = annotation.formula
    await reporter.begin(f"Cross-check {formula.text} ({level.label})")
    try:
        result = await cross_check(formula, level, Limits(), reporter.report)
    except asyncio.CancelledError:
        reporter.end("cancelled")
        if not reporter.cancelled_by_client:
            raise  # $/cancelRequest or shutdown: the request itself is cancelled
        # the progress was cancelled: answer normally (raising here would leave
        # an executeCommand request unanswered)
        return {"status": "cancelled", "markdown": "", "findings": [], "message": "cancelled from the progress"}
    except Exception:
        reporter.end("failed")
        raise
    reporter.end(result.message or result.status)
    findings = cross_check_findings(result, annotation, ls.settings.angle_tolerance)
    markdown = cross_check_markdown(result, annotation, ls.settings.angle_tolerance)
    source = held.text[annotation.span.start : annotation.span.end]
    _computed(ls).setdefault(uri, {})[source] = tuple(_shifted(f, -annotation.span.start) for f in findings)
    current = ls.held(uri)
    if current is not None:
        _publish(ls, current)
    ls.window_log_message(types.LogMessageParams(type=types.MessageType.Info, message=markdown))
    return {
        "status": result.status,
        "message": result.message,
        "markdown": markdown,
        "findings": [_finding_json(f, held) for f in findings],
    }


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
