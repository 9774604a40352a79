"""Open documents whose incremental changes are spliced in by offset.

pygls applies a change by splitting the whole text into lines and writing it
out again, and splits at every Unicode line break (U+2028, form feed, ...)
where LSP breaks lines only at CR, LF and CRLF.  Here the change's range is
converted with the same line index the diagnostics use (cached for the text
just published, so usually no work) and the text is spliced in one step.
Each edit is also kept as code-point offsets (:meth:`SplicedDocument.take_edits`) and handed to
the analysis host as it is (``NoteServer.synced``), so nothing below has to work out what changed.
A notebook change naming a notebook or cell that is not open is dropped
(pygls would fail on it and show the user an error).
"""

from __future__ import annotations

import logging
from urllib.parse import unquote

from lsprotocol import types
from pygls.workspace import TextDocument, Workspace

from .positions import UTF16, line_index


_KEPT_EDITS = 256  # more edits than this before anyone asks: the host is handed the whole text instead


class SplicedDocument(TextDocument):
    _edits_from: str | None = None  # the text the kept edits apply to
    _edits: list[tuple[int, int, str]] | None = None

    def _apply_incremental_change(self, change: types.TextDocumentContentChangePartial) -> None:
        source = self.source
        index = line_index(source, self.position_codec.encoding or UTF16)  # the index names the encoding
        start, end = sorted((index.offset(change.range.start), index.offset(change.range.end)))
        self._keep_edit(source, start, end, change.text)
        self._source = source[:start] + change.text + source[end:]

    def _apply_full_change(self, change: types.TextDocumentContentChangeEvent) -> None:
        self._keep_edit(self.source, 0, len(self.source), change.text)
        super()._apply_full_change(change)

    def _keep_edit(self, source: str, start: int, end: int, text: str) -> None:
        if self._edits is None:
            self._edits_from, self._edits = source, []
        elif self._edits_from is None:
            return  # lost count already: the host takes the whole text
        self._edits.append((start, end, text))
        if len(self._edits) > _KEPT_EDITS:
            self._edits_from, self._edits = None, []  # too many to be worth replaying

    def take_edits(self) -> tuple[str | None, list[tuple[int, int, str]]]:
        """The text the edits since the last call apply to (None: unknown), and the edits in order."""
        edits_from, edits = self._edits_from, self._edits or []
        self._edits_from, self._edits = None, None
        return edits_from, edits


class SplicedWorkspace(Workspace):
    def _create_text_document(self, doc_uri, source=None, version=None, language_id=None) -> TextDocument:
        return SplicedDocument(
            doc_uri,
            source=source,
            version=version,
            language_id=language_id,
            sync_kind=self._sync_kind,
            position_codec=self._position_codec,
        )

    def update_notebook_document(self, params: types.DidChangeNotebookDocumentParams) -> None:
        """pygls's, except that a change to a notebook or cell that is not open is dropped (logged), not an error."""
        if self.get_notebook_document(notebook_uri=params.notebook_document.uri) is None:
            logging.getLogger("notelsp.server").warning("change to a notebook that is not open: %s",
                                                        params.notebook_document.uri)
            return
        cells = params.change.cells
        if cells is not None and cells.text_content:
            opening = {unquote(item.uri) for item in (cells.structure.did_open or ())} if cells.structure else set()
            cells.text_content = [content for content in cells.text_content
                                  if unquote(content.document.uri) in self._text_documents
                                  or unquote(content.document.uri) in opening]
        super().update_notebook_document(params)


def spliced(workspace: Workspace | None) -> Workspace | None:
    """``workspace`` (pygls's, just built on initialize) as a :class:`SplicedWorkspace`; it holds no documents yet."""
    if workspace is not None and type(workspace) is Workspace:
        workspace.__class__ = SplicedWorkspace  # same state, one method more: no copy of pygls's constructor
    return workspace
