"""Diagnostics: pushed after a short pause in typing, and pulled on request.

A change schedules a review of that version ~30 ms later; a newer change
cancels it, and a result whose version is no longer current is dropped.
The review runs in a worker thread so hover and completion stay responsive.
Clients that pull diagnostics (textDocument/diagnostic) are not also pushed
to, so nothing is shown twice.
"""

from __future__ import annotations

import asyncio
import logging

from lsprotocol import types

from ..review.document import DocumentReview, kind_of_path
from ..review.findings import Finding, Severity
from ..review.workspace import cached_review
from .app import NoteServer
from .positions import LineIndex, line_index

log = logging.getLogger("notelsp.server")
DEBOUNCE_SECONDS = 0.03  # long enough to merge a burst of keystrokes; a re-review takes ~30 ms
SOURCE = "notelsp"

_SEVERITY = {
    Severity.ERROR: types.DiagnosticSeverity.Error,
    Severity.WARNING: types.DiagnosticSeverity.Warning,
    Severity.INFORMATION: types.DiagnosticSeverity.Information,
    Severity.HINT: types.DiagnosticSeverity.Hint,
}


def to_diagnostic(finding: Finding, index: LineIndex) -> types.Diagnostic:
    return types.Diagnostic(
        range=index.range(finding.span),
        severity=_SEVERITY[finding.severity],
        code=finding.code,
        source=SOURCE,
        message=finding.message,
    )


def diagnostics_of(review: DocumentReview | None, index: LineIndex) -> list[types.Diagnostic]:
    return [] if review is None else [to_diagnostic(f, index) for f in review.findings]


def _client_pulls(ls: NoteServer) -> bool:
    document = ls.client_capabilities.text_document
    return bool(document and document.diagnostic)


def _computed(ls: NoteServer, uri: str) -> list[types.Diagnostic]:
    """Findings of cross-checks run on this document (optional feature notelsp.server.crosscheck)."""
    try:
        from .crosscheck import computed_diagnostics  # imported late: it imports this module
    except ImportError:
        return []
    held = ls.held(uri)
    return [] if held is None else computed_diagnostics(ls, held)


def _cross_check_later(ls: NoteServer, uri: str) -> None:
    """Let the optional cross-check look at the edit (it runs only with cross_check_automatic)."""
    try:
        from .crosscheck import schedule_automatic
    except ImportError:
        return
    schedule_automatic(ls, uri)


def schedule(ls: NoteServer, uri: str, delay: float = DEBOUNCE_SECONDS) -> None:
    _cross_check_later(ls, uri)
    if _client_pulls(ls):
        return
    tasks = ls.pending
    if (previous := tasks.pop(uri, None)) is not None:
        previous.cancel()
    tasks[uri] = asyncio.get_running_loop().create_task(_publish_later(ls, uri, delay))


async def _publish_later(ls: NoteServer, uri: str, delay: float) -> None:
    await asyncio.sleep(delay)
    document = ls.open_document(uri)
    if document is None:
        return
    text, version = document.source, document.version
    diagnostics: list[types.Diagnostic] = []
    if ls.is_reviewed(uri):
        kind, settings, encoding = kind_of_path(ls.relative_path(uri) or uri), ls.settings, ls.encoding()
        try:
            diagnostics = await asyncio.to_thread(
                lambda: diagnostics_of(cached_review(text, kind, settings), line_index(text, encoding))
            )
        except Exception:
            log.exception("review of %s failed", uri)
    current = ls.open_document(uri)
    if current is None or current.version != version:
        return  # stale: a newer change has its own publication scheduled (or the document closed)
    diagnostics += _computed(ls, uri)
    ls.text_document_publish_diagnostics(
        types.PublishDiagnosticsParams(uri=uri, version=version, diagnostics=diagnostics)
    )


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
        if not _client_pulls(ls):
            ls.text_document_publish_diagnostics(types.PublishDiagnosticsParams(uri=uri, diagnostics=[]))

    @server.feature(
        types.TEXT_DOCUMENT_DIAGNOSTIC,
        types.DiagnosticOptions(identifier=SOURCE, inter_file_dependencies=False, workspace_diagnostics=False),
    )
    def pulled(ls: NoteServer, params: types.DocumentDiagnosticParams) -> types.FullDocumentDiagnosticReport:
        held = ls.held(params.text_document.uri)
        items = [] if held is None else diagnostics_of(held.review, held.index) + _computed(ls, held.uri)
        return types.FullDocumentDiagnosticReport(items=items)
