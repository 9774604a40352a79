"""What the server keeps after a long session: nothing per message handled, nothing per closed document.

Counted as objects the server holds (documents, scheduled publications,
pending futures), never as process memory.  pygls keeps the future of every
notification it runs unless the server drops it (notelsp.server.pygls_adapter).
"""

from __future__ import annotations

from notelsp.server.pygls_adapter import held_futures

from .in_process import notification, request, serve, start
from .scale import scaled, tried

NOTE = "# Memory\n{ClF3: trigonal planar}\n"


def _held_per_uri(server) -> dict[str, int]:
    """Every structure of the server keyed by document, with its size."""
    held = {
        "open documents": len(server.workspace.text_documents),
        "scheduled diagnostics": len(server.pending),
        "futures of running handlers": held_futures(server.protocol),
        "running commands": len(server.protocol.running_commands),
        "documents of the analysis host": len(server.host.uris()),  # with their settings and cross-checks
    }
    for name in ("crosscheck_automatic", "crosscheck_calculating", "crosscheck_look_again"):
        held[name] = len(getattr(server, name, ()) or ())
    return held


def test_one_character_edits_leave_no_future_behind():
    edits = scaled(3_000, 42_000)
    uri = "file:///memory/edited.md"
    frames = start() + [notification("textDocument/didOpen", {"textDocument": {
        "uri": uri, "languageId": "markdown", "version": 1, "text": NOTE}})]
    for version in range(2, edits + 2):
        frames.append(notification("textDocument/didChange", {
            "textDocument": {"uri": uri, "version": version},
            "contentChanges": [{"range": {"start": {"line": 0, "character": 0}, "end": {"line": 0, "character": 0}},
                                "text": "x"}]}))
    frames.append(request(2, "textDocument/hover", {"textDocument": {"uri": uri},
                                                     "position": {"line": 1, "character": 2}}))
    server, sent = serve(frames)
    tried("one-character edits sent in process (futures counted after)", edits)
    assert server.workspace.get_text_document(uri).source == "x" * edits + NOTE  # every edit was applied
    assert [m for m in sent if m.get("id") == 2 and m.get("result")]  # and the session was served
    assert held_futures(server.protocol) == 0


def test_opening_and_closing_documents_leaves_nothing_held():
    count = scaled(2_000, 20_000)
    frames = start()
    for number in range(count):
        uri = f"file:///memory/note-{number}.md"
        frames += [
            notification("textDocument/didOpen", {"textDocument": {"uri": uri, "languageId": "markdown",
                                                                   "version": 1, "text": NOTE}}),
            notification("textDocument/didChange", {"textDocument": {"uri": uri, "version": 2}, "contentChanges": [
                {"range": {"start": {"line": 0, "character": 0}, "end": {"line": 0, "character": 0}}, "text": "x"}]}),
            request(10 + number, "textDocument/documentSymbol", {"textDocument": {"uri": uri}}),
            notification("textDocument/didClose", {"textDocument": {"uri": uri}}),
        ]
    server, sent = serve(frames)
    tried("documents opened, edited and closed in process (held structures counted after)", count)
    assert len([m for m in sent if m.get("id", 0) >= 10 and m.get("result")]) == count  # each one was served
    assert _held_per_uri(server) == dict.fromkeys(_held_per_uri(server), 0)
