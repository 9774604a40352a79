"""Open documents whose incremental changes are spliced in by offset.

pygls applies a change by splitting the whole text into lines and writing it
out again, and splits at every Unicode line break (U+2028, form feed, ...)
where LSP breaks lines only at CR, LF and CRLF.  Here the change's range is
converted with the same line index the diagnostics use (cached for the text
just published, so usually no work) and the text is spliced in one step.
Each edit is also kept as code-point offsets (:meth:`SplicedDocument.take_edits`) and handed to
the analysis host as it is (``NoteServer.synced``), so nothing below has to work out what changed.

Only public pygls API is used: a :class:`SplicedDocument` overrides the
public ``apply_change`` and ``source`` of pygls's ``TextDocument``, and
:class:`DocumentSync` (mixed into ``NoteProtocol``) wraps pygls's built-in
handlers of ``didOpen`` and the notebook notifications so that each document
pygls has just put into its workspace is swapped for a ``SplicedDocument``
before any change reaches it.
A notebook change naming a notebook or cell that is not open is dropped
(pygls would fail on it, lose the rest of the change and show the user an error).
"""

from __future__ import annotations

import logging
from collections.abc import Callable, Generator
from typing import Any
from urllib.parse import unquote

from lsprotocol import types
from pygls.protocol.language_server import lsp_method
from pygls.workspace import TextDocument, Workspace

from .positions import UTF16, line_index

log = logging.getLogger("notelsp.server")

_KEPT_EDITS = 256  # more edits than this before anyone asks: the host is handed the whole text instead


class SplicedDocument(TextDocument):
    """A pygls text document that splices each change in by offset and remembers the edits."""

    def __init__(self, uri: str, source: str | None = None, *args: Any, **kwargs: Any) -> None:
        super().__init__(uri, None, *args, **kwargs)  # the text is ours (``current_text``), not pygls's
        self.current_text = source or ""
        self.edits_from: str | None = None  # the text the kept edits apply to
        self.kept_edits: list[tuple[int, int, str]] | None = None

    @property
    def source(self) -> str:
        return self.current_text

    def apply_change(self, change: types.TextDocumentContentChangeEvent) -> None:
        source = self.current_text
        if isinstance(change, types.TextDocumentContentChangePartial):
            index = line_index(source, self.position_codec.encoding or UTF16)  # the index names the encoding
            start, end = sorted((index.offset(change.range.start), index.offset(change.range.end)))
        else:  # the whole text
            start, end = 0, len(source)
        self._keep_edit(source, start, end, change.text)
        self.current_text = source[:start] + change.text + source[end:]

    def _keep_edit(self, source: str, start: int, end: int, text: str) -> None:
        if self.kept_edits is None:
            self.edits_from, self.kept_edits = source, []
        elif self.edits_from is None:
            return  # lost count already: the host takes the whole text
        self.kept_edits.append((start, end, text))
        if len(self.kept_edits) > _KEPT_EDITS:
            self.edits_from, self.kept_edits = None, []  # too many to be worth replaying

    def take_edits(self) -> tuple[str | None, list[tuple[int, int, str]]]:
        """The text the edits since the last call apply to (None: unknown), and the edits in order."""
        edits_from, edits = self.edits_from, self.kept_edits or []
        self.edits_from, self.kept_edits = None, None
        return edits_from, edits


def adopt(workspace: Workspace, uri: str) -> None:
    """Swap the open document ``uri`` pygls has just made for a :class:`SplicedDocument` with its text."""
    key = unquote(uri)
    documents = workspace.text_documents  # pygls's own mapping: what it finds changes and requests in
    document = documents.get(key)
    if document is not None and not isinstance(document, SplicedDocument):
        documents[key] = SplicedDocument(document.uri, document.source, version=document.version,
                                         language_id=document.language_id, position_codec=workspace.position_codec)


def _then(steps: Generator[Any, Any, Any], first: Callable[[], None]) -> Generator[Any, Any, Any]:
    """Run pygls's built-in handler ``steps`` up to the user's handler, call ``first``, then go on."""
    try:
        step = next(steps)  # pygls updates its workspace, then yields to the user's handler (if any)
    except StopIteration as done:
        first()
        return done.value
    first()
    while True:
        try:
            step = steps.send((yield step))
        except StopIteration as done:
            return done.value


class DocumentSync:
    """Mixed into the protocol before pygls's ``LanguageServerProtocol``: open documents splice their changes."""

    workspace: Workspace
    fm: Any

    @lsp_method(types.TEXT_DOCUMENT_DID_OPEN)
    def lsp_text_document__did_open(self, params: types.DidOpenTextDocumentParams):
        steps = super().lsp_text_document__did_open(params)  # type: ignore[misc]
        return (yield from _then(steps, lambda: adopt(self.workspace, params.text_document.uri)))

    @lsp_method(types.NOTEBOOK_DOCUMENT_DID_OPEN)
    def lsp_notebook_document__did_open(self, params: types.DidOpenNotebookDocumentParams):
        steps = super().lsp_notebook_document__did_open(params)  # type: ignore[misc]

        def adopt_cells() -> None:
            for cell in params.cell_text_documents:
                adopt(self.workspace, cell.uri)

        return (yield from _then(steps, adopt_cells))

    @lsp_method(types.NOTEBOOK_DOCUMENT_DID_CHANGE)
    def lsp_notebook_document__did_change(self, params: types.DidChangeNotebookDocumentParams):
        """pygls's, except that changes to what is not open are dropped and new cells splice their edits.

        pygls applies the cells' structure before their text in one call; the text is held back
        until the cells it opens are swapped, then applied through the (public) workspace.
        """
        workspace = self.workspace
        if workspace.get_notebook_document(notebook_uri=params.notebook_document.uri) is None:
            log.warning("change to a notebook that is not open: %s", params.notebook_document.uri)
            if (handler := self.fm.features.get(types.NOTEBOOK_DOCUMENT_DID_CHANGE)) is not None:
                yield handler, (params,), None  # the user's handler still hears of it, as from pygls
            return None
        cells = params.change.cells
        text_content = cells.text_content if cells is not None else None
        if text_content:
            cells.text_content = None  # held back until the cells this change opens splice, see below

        def adopt_then_edit() -> None:
            if cells is None:
                return
            for opened in (cells.structure.did_open or ()) if cells.structure else ():
                adopt(workspace, opened.uri)
            if not text_content:
                return
            applied = []
            for content in text_content:
                if unquote(content.document.uri) not in workspace.text_documents:  # not open (or just closed)
                    log.warning("change to a notebook cell that is not open: %s", content.document.uri)
                    continue
                for change in content.changes:
                    workspace.update_text_document(content.document, change)
                applied.append(content)
            cells.text_content = applied  # the user's handler sees the change as sent, less what was dropped

        steps = super().lsp_notebook_document__did_change(params)  # type: ignore[misc]
        return (yield from _then(steps, adopt_then_edit))
