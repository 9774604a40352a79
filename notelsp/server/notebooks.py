"""Notebook documents (LSP 3.17 notebook sync): each Markdown cell of a Jupyter notebook is a note.

The client opens a notebook with the text of its cells; pygls keeps each
cell as a text document of its own (its URI is the cell's, e.g.
``vscode-notebook-cell:...``) and applies cell edits to it.  Here a cell that
is Markdown, in a notebook whose file the settings review, is reviewed like
any open note: diagnostics are scheduled as for a note's own changes (and
pulled for it the same way), so hover, fixes and hints work in cells too.
The capability itself (which notebooks and cells) is a constructor option of
pygls's server: ``app.NOTEBOOK_SYNC``.
"""

from __future__ import annotations

from urllib.parse import unquote

from lsprotocol import types

from ..review.workspace import is_hidden, is_selected, note_kind
from .app import NoteServer
from .diagnostics import publish_json, schedule


def reviewed_cell(ls: NoteServer, uri: str) -> bool | None:
    """For a cell of an open notebook: whether it is reviewed (a Markdown cell of a reviewed notebook).

    None when ``uri`` is no notebook cell, so the caller judges it as a file.
    """
    notebook = ls.workspace.get_notebook_document(cell_uri=uri)
    if notebook is None:
        return None
    relative = ls.relative_path(notebook.uri)
    if relative is None or note_kind(relative) != "notebook" or is_hidden(relative) \
            or not is_selected(relative, ls.settings.globs):
        return False
    wanted = unquote(uri)
    return any(unquote(cell.document) == wanted and cell.kind == types.NotebookCellKind.Markup
               for cell in notebook.cells)


def _forget(ls: NoteServer, uri: str) -> None:
    """A cell went away: drop its pending publication and clear what was shown for it."""
    if (task := ls.pending.pop(uri, None)) is not None:
        task.cancel()
    ls.host.close(unquote(uri))
    document = ls.client_capabilities.text_document
    if not (document and document.diagnostic):  # a pulling client asks again by itself
        publish_json(ls, uri, None, [])


def register(server: NoteServer) -> None:
    server.cell_reviewed = reviewed_cell

    @server.feature(types.NOTEBOOK_DOCUMENT_DID_OPEN)
    def opened(ls: NoteServer, params: types.DidOpenNotebookDocumentParams) -> None:
        for cell in params.cell_text_documents:
            schedule(ls, cell.uri, delay=0)

    @server.feature(types.NOTEBOOK_DOCUMENT_DID_CHANGE)
    def changed(ls: NoteServer, params: types.DidChangeNotebookDocumentParams) -> None:
        cells = params.change.cells
        if cells is None:
            return
        touched: dict[str, None] = {}
        if cells.structure is not None:
            for closed in cells.structure.did_close or ():
                _forget(ls, closed.uri)
            touched.update(dict.fromkeys(opened.uri for opened in cells.structure.did_open or ()))
        touched.update(dict.fromkeys(data.document for data in cells.data or ()))  # a cell's kind may change
        touched.update(dict.fromkeys(text.document.uri for text in cells.text_content or ()))
        for uri in touched:
            if ls.open_document(uri) is not None:
                schedule(ls, uri)

    @server.feature(types.NOTEBOOK_DOCUMENT_DID_CLOSE)
    def closed(ls: NoteServer, params: types.DidCloseNotebookDocumentParams) -> None:
        for cell in params.cell_text_documents:
            _forget(ls, cell.uri)
