"""Open documents whose incremental changes are spliced in by offset.

pygls applies a change by splitting the whole text into lines and writing it
out again, and splits at every Unicode line break (U+2028, form feed, ...)
where LSP breaks lines only at CR, LF and CRLF.  Here the change's range is
converted with the same line index the diagnostics use (cached for the text
just published, so usually no work) and the text is spliced in one step.
"""

from __future__ import annotations

from lsprotocol import types
from pygls.workspace import TextDocument, Workspace

from .positions import UTF16, line_index


class SplicedDocument(TextDocument):
    def _apply_incremental_change(self, change: types.TextDocumentContentChangePartial) -> None:
        source = self.source
        index = line_index(source, self.position_codec.encoding or UTF16)  # the index names the encoding
        start, end = sorted((index.offset(change.range.start), index.offset(change.range.end)))
        self._source = source[:start] + change.text + source[end:]


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


def spliced(workspace: Workspace | None) -> Workspace | None:
    """``workspace`` (pygls's, just built on initialize) as a :class:`SplicedWorkspace`; it holds no documents yet."""
    if workspace is not None and type(workspace) is Workspace:
        workspace.__class__ = SplicedWorkspace  # same state, one method more: no copy of pygls's constructor
    return workspace
