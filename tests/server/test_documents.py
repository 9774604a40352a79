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

from notelsp.server.documents import SplicedDocument, SplicedWorkspace, spliced

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


def test_the_workspace_pygls_builds_is_turned_into_one_that_splices():
    workspace = Workspace(None, types.TextDocumentSyncKind.Incremental)
    assert isinstance(spliced(workspace), SplicedWorkspace)
    workspace.put_text_document(types.TextDocumentItem(uri="file:///n.md", language_id="markdown", version=1, text="x"))
    assert isinstance(workspace.get_text_document("file:///n.md"), SplicedDocument)
