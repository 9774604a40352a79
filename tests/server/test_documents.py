"""Incremental changes spliced by offset give the text pygls itself gives (the reference: pygls's
TextDocument, a general-purpose implementation of LSP text synchronisation), in every position
encoding, and break lines only where LSP does (CR, LF, CRLF; LSP 3.17 "Text Documents", from memory).
"""

from __future__ import annotations

import random

import pytest
from lsprotocol import types
from pygls.workspace import TextDocument, Workspace
from pygls.workspace.position_codec import PositionCodec

from notelsp.server.app import build_server
from notelsp.server.documents import SplicedDocument, adopt

ENCODINGS = ("utf-8", "utf-16", "utf-32")
PIECES = ["ClF3", " ", "{SF4: seesaw}", "\n", "\r\n", "é", "😀", "e\u0301", "中文", "H₂O", "\t", "x"]


def _change(start: tuple[int, int], end: tuple[int, int], text: str) -> types.TextDocumentContentChangePartial:
    return types.TextDocumentContentChangePartial(
        range=types.Range(types.Position(*start), types.Position(*end)), text=text
    )


def _pair(text: str, encoding: str) -> tuple[TextDocument, SplicedDocument]:
    made = [cls("file:///n.md", source=text, version=1, position_codec=PositionCodec(encoding))
            for cls in (TextDocument, SplicedDocument)]
    return made[0], made[1]


def _random_position(rng: random.Random, text: str, encoding: str) -> tuple[int, int]:
    """A position on a character boundary, in ``encoding`` units (as a client sends)."""
    lines = text.replace("\r\n", "\n").split("\n")
    line = rng.randrange(len(lines) + 1)
    if line == len(lines):
        return line, 0  # the line after the last: the end of the text
    prefix = lines[line][: rng.randint(0, len(lines[line]))]
    units = {"utf-8": len(prefix.encode()), "utf-16": len(prefix.encode("utf-16-le")) // 2, "utf-32": len(prefix)}
    return line, units[encoding]


@pytest.mark.parametrize("encoding", ENCODINGS)
def test_random_edits_give_the_text_pygls_gives(encoding):
    rng = random.Random(7)
    reference, ours = _pair("".join(rng.choices(PIECES, k=80)), encoding)
    for _ in range(300):
        start = _random_position(rng, ours.source, encoding)
        end = max(start, _random_position(rng, ours.source, encoding))
        change = _change(start, end, "".join(rng.choices(PIECES, k=rng.randint(0, 4))))
        reference.apply_change(change)
        ours.apply_change(change)
        assert ours.source == reference.source


def test_a_unicode_line_separator_is_not_a_line_break_for_lsp():
    _, ours = _pair("a\u2028b\nc", "utf-16")
    ours.apply_change(_change((1, 0), (1, 1), "C"))  # line 1 is "c": U+2028 does not end a line
    assert ours.source == "a\u2028b\nC"


def test_positions_past_the_end_clamp_to_it():
    _, ours = _pair("ab\ncd", "utf-16")
    ours.apply_change(_change((1, 99), (7, 3), "!"))
    assert ours.source == "ab\ncd!"


def test_a_document_pygls_opens_is_swapped_for_one_that_splices():
    workspace = Workspace(None, types.TextDocumentSyncKind.Incremental)
    workspace.put_text_document(types.TextDocumentItem(uri="file:///n.md", language_id="markdown", version=1, text="x"))
    adopt(workspace, "file:///n.md")
    document = workspace.get_text_document("file:///n.md")
    assert isinstance(document, SplicedDocument) and (document.source, document.version) == ("x", 1)
    workspace.update_text_document(types.VersionedTextDocumentIdentifier(uri="file:///n.md", version=2),
                                   _change((0, 1), (0, 1), "\u2028y"))
    assert (document.source, document.version) == ("x\u2028y", 2)


class _Discarded:
    def write(self, data: bytes) -> None:
        pass

    def close(self) -> None:
        pass


def _handle(server, method: str, params: dict, request_id: int | None = None) -> None:
    message = {"jsonrpc": "2.0", "method": method, "params": params}
    if request_id is not None:
        message["id"] = request_id
    server.protocol.handle_message(server.protocol.structure_message(message))


def test_documents_and_cells_the_server_opens_splice_their_changes():
    server = build_server()
    server.protocol.set_writer(_Discarded())
    _handle(server, "initialize", {"capabilities": {}}, 1)
    _handle(server, "textDocument/didOpen", {"textDocument": {
        "uri": "file:///n.md", "languageId": "markdown", "version": 1, "text": "a\u2028b\nc"}})
    _handle(server, "textDocument/didChange", {"textDocument": {"uri": "file:///n.md", "version": 2},
                                               "contentChanges": [{"range": {"start": {"line": 1, "character": 0},
                                                                             "end": {"line": 1, "character": 1}},
                                                                   "text": "C"}]})
    assert server.workspace.get_text_document("file:///n.md").source == "a\u2028b\nC"
    cell = {"uri": "cell:1", "languageId": "markdown", "version": 1, "text": "x"}
    _handle(server, "notebookDocument/didOpen", {
        "notebookDocument": {"uri": "file:///b.ipynb", "notebookType": "jupyter-notebook", "version": 1,
                             "cells": [{"kind": 1, "document": "cell:1"}]},
        "cellTextDocuments": [cell]})
    # a cell opened and edited in one change: the edit reaches a document that splices
    new_cell = {"uri": "cell:2", "languageId": "markdown", "version": 1, "text": "p\u2028q\nr"}
    _handle(server, "notebookDocument/didChange", {
        "notebookDocument": {"uri": "file:///b.ipynb", "version": 2},
        "change": {"cells": {
            "structure": {"array": {"start": 1, "deleteCount": 0, "cells": [{"kind": 1, "document": "cell:2"}]},
                          "didOpen": [new_cell]},
            "textContent": [{"document": {"uri": "cell:2", "version": 2}, "changes": [
                {"range": {"start": {"line": 1, "character": 0}, "end": {"line": 1, "character": 1}}, "text": "R"}]}],
        }}})
    for uri, text in (("cell:1", "x"), ("cell:2", "p\u2028q\nR")):
        document = server.workspace.get_text_document(uri)
        assert isinstance(document, SplicedDocument) and document.source == text


def test_a_notebook_change_touching_cells_not_open_keeps_the_rest():
    server = build_server()
    server.protocol.set_writer(_Discarded())
    _handle(server, "initialize", {"capabilities": {}}, 1)
    cells = [{"uri": f"cell:{n}", "languageId": "markdown", "version": 1, "text": "ab"} for n in (1, 2)]
    _handle(server, "notebookDocument/didOpen", {
        "notebookDocument": {"uri": "file:///b.ipynb", "notebookType": "jupyter-notebook", "version": 1,
                             "cells": [{"kind": 1, "document": cell["uri"]} for cell in cells]},
        "cellTextDocuments": cells})

    def edit(uri: str) -> dict:
        return {"document": {"uri": uri, "version": 2}, "changes": [
            {"range": {"start": {"line": 0, "character": 0}, "end": {"line": 0, "character": 1}}, "text": "X"}]}

    # cell:1 closed and edited in the same change, cell:9 never opened: only cell:2's edit applies
    _handle(server, "notebookDocument/didChange", {
        "notebookDocument": {"uri": "file:///b.ipynb", "version": 2},
        "change": {"cells": {
            "structure": {"array": {"start": 0, "deleteCount": 1}, "didClose": [{"uri": "cell:1"}]},
            "textContent": [edit("cell:1"), edit("cell:9"), edit("cell:2")],
        }}})
    assert "cell:1" not in server.workspace.text_documents
    assert server.workspace.get_text_document("cell:2").source == "Xb"
