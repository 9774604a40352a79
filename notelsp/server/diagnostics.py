"""Diagnostics: pushed as soon as typing pauses, and pulled on request.

A change to a document with no review under way is reviewed at once; a change
that arrives while one is pending or running (a burst: paste, replace-all,
fast typing) cancels it and waits until changes have paused for ~30 ms, so a
burst costs one review.  A result whose version is no longer current is
dropped.  The review runs in a worker thread so hover and completion stay
responsive.  A review is given ~200 ms: one that would take longer (a large
note opened or pasted for the first time) publishes the findings above the
line it reached, marked ``review-continues`` there, and reviews the rest in
further slices before publishing everything.  Clients that pull diagnostics (textDocument/diagnostic) are not
also pushed to, so nothing is shown twice.

Pushed diagnostics are built as JSON directly: a long note has a thousand
findings, and lsprotocol objects serialised through cattrs cost more than the
review of a one-line edit.
"""

from __future__ import annotations

import asyncio
import logging
import time
from typing import Any, Iterable

from lsprotocol import types

from ..review.describe import rule_doc_url
from ..review.document import DocumentReview, review_text, species_to_compute
from ..review.findings import Finding, Severity
from . import geometries
from .app import NoteServer
from .positions import LineIndex, line_index

log = logging.getLogger("notelsp.server")
PAUSE_SECONDS = 0.03  # quiet time that ends a burst of changes; keystrokes are further apart
# A review taking longer than this publishes what it has (with review-continues) and goes on in slices
# this long, stopping at once when a newer version arrives.  Hover and code actions do not wait for it.
REVIEW_BUDGET_SECONDS = 0.2
SOURCE = "notelsp"
PUBLISH = types.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS

_SEVERITY = {
    Severity.ERROR: types.DiagnosticSeverity.Error,
    Severity.WARNING: types.DiagnosticSeverity.Warning,
    Severity.INFORMATION: types.DiagnosticSeverity.Information,
    Severity.HINT: types.DiagnosticSeverity.Hint,
}
_SEVERITY_NUMBER = {severity: lsp.value for severity, lsp in _SEVERITY.items()}


def to_diagnostic(finding: Finding, index: LineIndex) -> types.Diagnostic:
    href = rule_doc_url(finding.code)
    return types.Diagnostic(
        range=index.range(finding.span),
        severity=_SEVERITY[finding.severity],
        code=finding.code,
        code_description=types.CodeDescription(href=href) if href else None,
        source=SOURCE,
        message=finding.message,
    )


def diagnostics_of(review: DocumentReview | None, index: LineIndex) -> list[types.Diagnostic]:
    return [] if review is None else [to_diagnostic(f, index) for f in review.findings]


def diagnostic_json(finding: Finding, index: LineIndex) -> dict[str, Any]:
    """``to_diagnostic(finding, index)`` as the JSON lsprotocol would make of it."""
    start_line, start_character = index.line_character(finding.span.start)
    end_line, end_character = index.line_character(finding.span.end)
    diagnostic = {
        "range": {"start": {"line": start_line, "character": start_character},
                  "end": {"line": end_line, "character": end_character}},
        "severity": _SEVERITY_NUMBER[finding.severity],
        "code": finding.code,
        "source": SOURCE,
        "message": finding.message,
    }
    href = rule_doc_url(finding.code)
    if href:  # a rule's explanation; cross-check findings have none
        diagnostic["codeDescription"] = {"href": href}
    return diagnostic


def diagnostics_json(findings: Iterable[Finding], index: LineIndex) -> list[dict[str, Any]]:
    return [diagnostic_json(finding, index) for finding in findings]


def publish_json(ls: NoteServer, uri: str, version: int | None, diagnostics: list[dict[str, Any]]) -> None:
    """Push ``diagnostics`` (from ``diagnostics_json``) for that version of the document."""
    params: dict[str, Any] = {"uri": uri}
    if version is not None:
        params["version"] = version
    params["diagnostics"] = diagnostics
    ls.protocol.notify_json(PUBLISH, params)


def _client_pulls(ls: NoteServer) -> bool:
    document = ls.client_capabilities.text_document
    return bool(document and document.diagnostic)


def _computed(ls: NoteServer, uri: str) -> list[Finding]:
    """Findings of cross-checks run on this document (optional feature notelsp.server.crosscheck)."""
    try:
        from .crosscheck import computed_findings  # imported late: it imports this module
    except ImportError:
        return []
    held = ls.held(uri)
    return [] if held is None else computed_findings(ls, held)


def _cross_check_later(ls: NoteServer, uri: str) -> None:
    """Let the optional cross-check look at the edit (it runs only with cross_check_automatic)."""
    try:
        from .crosscheck import schedule_automatic
    except ImportError:
        return
    schedule_automatic(ls, uri)


def schedule(ls: NoteServer, uri: str, delay: float | None = None) -> None:
    """Publish the document's diagnostics after ``delay``; by default at once, or after the pause in a burst."""
    _cross_check_later(ls, uri)
    if _client_pulls(ls):
        return
    _publish_soon(ls, uri, delay)


def republish(ls: NoteServer, uri: str) -> None:
    """Results computed in the background arrived (geometries, cross-checks): show the document's
    diagnostics again, by the same path as after an edit (a pulling client is asked to pull)."""
    if _client_pulls(ls):
        workspace = ls.client_capabilities.workspace
        if workspace and workspace.diagnostics and workspace.diagnostics.refresh_support:
            ls.workspace_diagnostic_refresh(None)
        return
    if ls.open_document(uri) is not None:
        _publish_soon(ls, uri, 0.0)


def _publish_soon(ls: NoteServer, uri: str, delay: float | None) -> None:
    previous = ls.pending.pop(uri, None)
    if previous is asyncio.current_task():  # a publication asking for the next one: it is ending anyway
        previous = None
    in_burst = previous is not None and not previous.done()
    if previous is not None:
        previous.cancel()
    if delay is None:
        delay = PAUSE_SECONDS if in_burst else 0.0
    ls.pending[uri] = asyncio.get_running_loop().create_task(_publish_later(ls, uri, delay))


def _reviewed_slice(text: str, kind, settings, encoding: str, done_before: int,
                    computed: dict) -> tuple[list[dict[str, Any]], int | None, tuple[str, ...]]:
    """One slice of the review as JSON, where it stopped (None: the whole note) and the species it names.

    It goes on past ``done_before`` (where the previous slice stopped: those lines are found in the
    review's caches) whatever the clock says, then for about REVIEW_BUDGET_SECONDS more, so every
    slice gets further than the last."""
    deadline = time.monotonic() + REVIEW_BUDGET_SECONDS
    review = review_text(text, kind, settings, computed=computed,
                         more_time=lambda line_start: line_start <= done_before or time.monotonic() < deadline)
    species = species_to_compute(review) if review.stopped_at is None else ()
    return diagnostics_json(review.findings, line_index(text, encoding)), review.stopped_at, species


async def _publish_later(ls: NoteServer, uri: str, delay: float) -> None:
    if delay > 0:
        await asyncio.sleep(delay)
    document = ls.open_document(uri)
    if document is None:
        return
    text, version = document.source, document.version
    diagnostics: list[dict[str, Any]] = []
    whole = True
    species: tuple[str, ...] | None = None  # named by the annotations, once the whole review is done
    results = geometries.computed_for(ls, uri)  # the calculations' results known so far
    if ls.is_reviewed(uri):
        kind, settings, encoding = ls.review_kind(uri), ls.settings_for(uri)[0], ls.encoding()
        first, stopped_at = True, 0
        while first or not whole:  # a review past its budget: what it has first, then the rest slice by slice
            try:
                diagnostics, stopped_at, species = await asyncio.to_thread(
                    _reviewed_slice, text, kind, settings, encoding, stopped_at or 0, results)
            except Exception:
                log.exception("review of %s failed", uri)
                diagnostics, stopped_at, species = [], None, None
            whole = stopped_at is None
            current = ls.open_document(uri)
            if current is None or current.version != version:
                return  # stale: a newer change has its own publication scheduled (or the document closed)
            if first and not whole:
                publish_json(ls, uri, version, diagnostics)  # carries review-continues where it stopped
            first = False
    current = ls.open_document(uri)
    if current is None or current.version != version:
        return  # stale: a newer change has its own publication scheduled (or the document closed)
    checked = _computed(ls, uri)
    if checked:
        diagnostics += diagnostics_json(checked, line_index(text, ls.encoding()))
    publish_json(ls, uri, version, diagnostics)
    if species is not None and geometries.want(ls, uri, species, results):
        _publish_soon(ls, uri, 0.0)  # results computed for another document or before this edit: use them


def refresh_all(ls: NoteServer) -> None:
    """Settings changed: recheck every open document."""
    if _client_pulls(ls):
        workspace = ls.client_capabilities.workspace
        if workspace and workspace.diagnostics and workspace.diagnostics.refresh_support:
            ls.workspace_diagnostic_refresh(None)
        return
    for uri in list(ls.workspace.text_documents):
        schedule(ls, uri, delay=0)


def register(server: NoteServer) -> None:
    @server.feature(types.TEXT_DOCUMENT_DID_OPEN)
    def opened(ls: NoteServer, params: types.DidOpenTextDocumentParams) -> None:
        schedule(ls, params.text_document.uri, delay=0)

    @server.feature(types.TEXT_DOCUMENT_DID_CHANGE)
    def changed(ls: NoteServer, params: types.DidChangeTextDocumentParams) -> None:
        schedule(ls, params.text_document.uri)

    @server.feature(types.TEXT_DOCUMENT_DID_CLOSE)
    def closed(ls: NoteServer, params: types.DidCloseTextDocumentParams) -> None:
        uri = params.text_document.uri
        if (task := ls.pending.pop(uri, None)) is not None:
            task.cancel()
        geometries.forget(ls, uri)
        if not _client_pulls(ls):
            publish_json(ls, uri, None, [])

    @server.feature(
        types.TEXT_DOCUMENT_DIAGNOSTIC,
        types.DiagnosticOptions(identifier=SOURCE, inter_file_dependencies=False, workspace_diagnostics=False),
    )
    def pulled(ls: NoteServer, params: types.DocumentDiagnosticParams) -> types.FullDocumentDiagnosticReport:
        held = ls.held(params.text_document.uri)  # reviewed with the calculations' results known so far
        items = [] if held is None else diagnostics_of(held.review, held.index) + [
            to_diagnostic(finding, held.index) for finding in _computed(ls, held.uri)]
        if held is not None and held.review is not None and held.review.stopped_at is None:
            if geometries.want(ls, held.uri, species_to_compute(held.review),
                               geometries.computed_for(ls, held.uri)):
                republish(ls, held.uri)  # known results the document had not named before: pull again
        return types.FullDocumentDiagnosticReport(items=items)
