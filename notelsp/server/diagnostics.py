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
review of a one-line edit.  :func:`diagnostic_json` is the one place a finding
becomes a diagnostic; the lsprotocol object pulled diagnostics and code actions
need is read from that JSON.

Every review comes from the server's analysis host (``NoteServer.host``): the
document's edits, settings and computed results are handed to it
(``NoteServer.synced``), and what is published is its snapshot's findings,
the cross-checks' included.  Results computed in the background come in the
same way and are shown by :func:`republish`, the same path as an edit's.
"""

from __future__ import annotations

import asyncio
import logging
import time
from typing import Any, Iterable
from urllib.parse import unquote

from lsprotocol import types

from lsprotocol.converters import get_converter

from ..review.describe import rule_doc_url
from ..review.document import species_to_compute
from ..review.findings import Finding, Severity
from ..review.host import AnalysisHost
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


_CONVERTER = get_converter()


def to_diagnostic(finding: Finding, index: LineIndex) -> types.Diagnostic:
    """``diagnostic_json(finding, index)`` as an lsprotocol object (for replies built from objects)."""
    return _CONVERTER.structure(diagnostic_json(finding, index), types.Diagnostic)


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


def schedule(ls: NoteServer, uri: str, delay: float | None = None) -> None:
    """Publish the document's diagnostics after ``delay``; by default at once, or after the pause in a burst."""
    for changed in ls.on_change:  # the optional cross-check looks at the edit (only with cross_check_automatic)
        changed(ls, uri)
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


def _reviewed_slice(host: AnalysisHost, key: str, version: int | None, encoding: str,
                    done_before: int) -> tuple[list[dict[str, Any]], int | None, tuple[str, ...]] | None:
    """One slice of the host's review as JSON, where it stopped (None: the whole note) and the species it names;
    None when the host holds another version by now (a newer change has its own publication).

    It goes on past ``done_before`` (where the previous slice stopped: those lines are found in the
    host's memory) whatever the clock says, then for about REVIEW_BUDGET_SECONDS more, so every
    slice gets further than the last.  A whole review carries the cross-checks' findings too."""
    deadline = time.monotonic() + REVIEW_BUDGET_SECONDS
    snapshot = host.snapshot(key, more_time=lambda line_start: line_start <= done_before or time.monotonic() < deadline)
    if snapshot is None or snapshot.document.version != version:
        return None
    review = snapshot.review
    whole = review.stopped_at is None
    species = species_to_compute(review) if whole else ()
    findings = snapshot.findings if whole else review.findings
    return diagnostics_json(findings, line_index(snapshot.document.text, encoding)), review.stopped_at, species


async def _publish_later(ls: NoteServer, uri: str, delay: float) -> None:
    if delay > 0:
        await asyncio.sleep(delay)
    document = ls.synced(uri)  # the host takes the edits since it was last asked
    if document is None:
        return
    key, version = document.uri, document.version
    diagnostics: list[dict[str, Any]] = []
    whole = True
    species: tuple[str, ...] | None = None  # named by the annotations, once the whole review is done
    results = ls.host.computed(key)  # the calculations' results known so far, as the review uses them
    if ls.is_reviewed(uri):
        encoding = ls.encoding()
        first, stopped_at = True, 0
        while first or not whole:  # a review past its budget: what it has first, then the rest slice by slice
            try:
                sliced = await asyncio.to_thread(_reviewed_slice, ls.host, key, version, encoding, stopped_at or 0)
            except Exception:
                log.exception("review of %s failed", uri)
                sliced = [], None, None
            current = ls.open_document(uri)
            if sliced is None or current is None or current.version != version:
                return  # stale: a newer change has its own publication scheduled (or the document closed)
            diagnostics, stopped_at, species = sliced
            whole = stopped_at is None
            if first and not whole:
                publish_json(ls, uri, version, diagnostics)  # carries review-continues where it stopped
            first = False
    current = ls.open_document(uri)
    if current is None or current.version != version:
        return  # stale: a newer change has its own publication scheduled (or the document closed)
    publish_json(ls, uri, version, diagnostics)
    if species is not None and ls.wants_geometries(ls, uri, species, results):
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
        ls.host.close(unquote(uri))
        for closed_by in ls.on_close:  # what only it named is not computed
            closed_by(ls, uri)
        if not _client_pulls(ls):
            publish_json(ls, uri, None, [])

    @server.feature(
        types.TEXT_DOCUMENT_DIAGNOSTIC,
        types.DiagnosticOptions(identifier=SOURCE, inter_file_dependencies=False, workspace_diagnostics=False),
    )
    def pulled(ls: NoteServer, params: types.DocumentDiagnosticParams) -> types.FullDocumentDiagnosticReport:
        held = ls.held(params.text_document.uri)  # reviewed with the calculations' results known so far
        items = [] if held is None or held.review is None else [
            to_diagnostic(finding, held.index) for finding in (*held.review.findings, *held.checked)]
        if held is not None and held.review is not None and held.review.stopped_at is None:
            if ls.wants_geometries(ls, held.uri, species_to_compute(held.review),
                                   ls.computed_geometries(ls, held.uri)):
                republish(ls, held.uri)  # known results the document had not named before: pull again
        return types.FullDocumentDiagnosticReport(items=items)
