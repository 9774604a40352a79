"""workspace/diagnostic: the findings of every note of the workspace, open or not.

The notes are the open documents that are reviewed plus the note files under
the workspace root that the server would review if they were open (the
``files`` patterns and note types of ``notelsp.review.workspace``, which the
command line uses too; hidden and version-control folders are not searched),
at most ``MAX_NOTES`` in all.  Each report carries a result id made from everything its
diagnostics depend on (the text, the settings, the position encoding, the
server's version and any cross-check findings); a client that sends back the
same id for a note gets an "unchanged" report and the note is not reviewed
again.  Reading and reviewing run in a worker thread.
"""

from __future__ import annotations

import asyncio
import hashlib
import logging
import os
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from urllib.parse import unquote, urlparse

from lsprotocol import types

from .. import __version__
from ..review.document import DocumentReview, kind_of_path, review_text
from ..review.findings import Finding
from ..review.settings import Settings
from ..notefiles import FileProblem, read_note
from ..review.host import AnalysisHost
from ..review.workspace import is_hidden, is_reviewed
from .app import NoteServer
from .diagnostics import to_diagnostic
from .positions import line_index

log = logging.getLogger("notelsp.server")
MAX_NOTES = 1000  # a workspace report is one JSON reply: keep it bounded


@dataclass(frozen=True)
class _OpenNote:
    uri: str
    version: int | None
    text: str
    kind: str
    computed: tuple[Finding, ...]  # cross-check findings shown beside the review's


def _computed(ls: NoteServer, uri: str) -> tuple[Finding, ...]:
    """The cross-checks' findings of an open note (placed by the analysis host)."""
    held = ls.held(uri)
    return () if held is None else held.checked


Reviewer = Callable[[str, str, Settings], DocumentReview]


def local_path(uri: str) -> Path | None:
    parsed = urlparse(uri)
    if parsed.scheme not in ("file", ""):
        return None
    try:
        return Path(unquote(parsed.path)).resolve()
    except (OSError, RuntimeError):
        return None


def result_id(text: str, settings: Settings, encoding: str, computed: tuple[Finding, ...] = ()) -> str:
    """An id that changes whenever the note's diagnostics could (within one server version)."""
    digest = hashlib.blake2b(digest_size=16)
    for part in (__version__, encoding, repr(settings), repr(computed)):
        digest.update(part.encode("utf-8", "surrogatepass"))
        digest.update(b"\0")
    digest.update(text.encode("utf-8", "surrogatepass"))
    return digest.hexdigest()


def _report(uri: str, version: int | None, text: str, kind: str, settings: Settings, encoding: str,
            computed: tuple[Finding, ...], previous: str | None, reviewed: Reviewer):
    rid = result_id(text, settings, encoding, computed)
    if previous == rid:
        return types.WorkspaceUnchangedDocumentDiagnosticReport(uri=uri, version=version, result_id=rid)
    review = reviewed(text, kind, settings)
    index = line_index(text, encoding)
    items = [to_diagnostic(finding, index) for finding in (*review.findings, *computed)]
    return types.WorkspaceFullDocumentDiagnosticReport(uri=uri, version=version, items=items, result_id=rid)


def note_files(root: Path, settings: Settings):
    """The files under ``root`` the server reviews, in a stable order (sorted folder by folder)."""
    for folder, folders, files in os.walk(root):  # symlinked folders are not followed: no loops
        folders[:] = sorted(f for f in folders if not is_hidden(f + "/x"))  # hidden and version-control folders
        for name in sorted(files):
            path = Path(folder, name)
            if is_reviewed(path.relative_to(root).as_posix(), settings):
                yield path


class UnreadableNote(Exception):
    """A note file left out of workspace results; the message says why."""


def read_saved_note(path: Path) -> str:
    """A note file's text as the command line reads it (regular files only, size-capped, BOM dropped)."""
    try:
        return read_note(path).text
    except FileProblem as problem:
        raise UnreadableNote(f"{path}: {problem}") from None


def workspace_reports(open_notes: list[_OpenNote], root: Path | None, settings: Settings, encoding: str,
                      previous: dict[str, str], host: AnalysisHost | None = None,
                      saved_host: AnalysisHost | None = None) -> tuple[list, bool]:
    """The reports, and whether notes were left out because there were more than ``MAX_NOTES``.

    ``host``: the server's analysis host, whose memory the open notes' reviews share; files on
    disk are reviewed with ``saved_host`` (a memory of their own: they would only push the open
    notes' reviews out of the host's).  Without them each review starts from nothing.
    """
    open_review: Reviewer = review_text if host is None else host.review_text
    saved_review: Reviewer = review_text if saved_host is None else saved_host.review_text
    reports = []
    open_paths = set()
    for note in open_notes[:MAX_NOTES]:
        path = local_path(note.uri)
        if path is not None:
            open_paths.add(path)
        try:
            reports.append(_report(note.uri, note.version, note.text, note.kind, settings, encoding,
                                   note.computed, previous.get(note.uri), open_review))
        except Exception:
            log.exception("review of %s failed", note.uri)
    if root is None or not root.is_dir():
        return reports, len(open_notes) > MAX_NOTES
    for path in note_files(root, settings):
        try:
            resolved = path.resolve()
        except (OSError, RuntimeError):
            continue
        if resolved in open_paths:
            continue  # the editor's text, not the saved one, was reported above
        if len(reports) >= MAX_NOTES:
            return reports, True
        uri = resolved.as_uri()
        try:
            text = read_saved_note(path)
            reports.append(_report(uri, None, text, kind_of_path(path.name), settings, encoding,
                                   (), previous.get(uri), saved_review))
        except UnreadableNote as problem:  # leave it out, say why in the log
            log.warning("workspace diagnostics: %s", problem)
        except Exception:
            log.exception("review of %s failed", uri)
    return reports, False


def register(server: NoteServer) -> None:
    @server.feature(types.WORKSPACE_DIAGNOSTIC)
    async def workspace_diagnostic(ls: NoteServer, params: types.WorkspaceDiagnosticParams) -> types.WorkspaceDiagnosticReport:
        previous = {item.uri: item.value for item in params.previous_result_ids}
        open_notes = [
            _OpenNote(uri, document.version, document.source, ls.review_kind(uri),  # a notebook cell: Markdown
                      _computed(ls, uri))
            for uri, document in list(ls.workspace.text_documents.items())
            if ls.is_reviewed(uri)
        ]
        reports, capped = await asyncio.to_thread(
            workspace_reports, open_notes, ls.root, ls.settings, ls.encoding(), previous, ls.host, ls.saved_notes)
        if capped:
            ls.window_log_message(types.LogMessageParams(
                type=types.MessageType.Info,
                message=f"notelsp: workspace diagnostics cover the first {MAX_NOTES} notes only"))
        return types.WorkspaceDiagnosticReport(items=reports)
