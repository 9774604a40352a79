"""positionEncoding negotiation end to end: the same note, emoji + CJK + CRLF, in each encoding.

Code-unit counts follow the Unicode encodings (common practice, no source):
U+1F9EA is 4 UTF-8 bytes / 2 UTF-16 units; U+6C1F (氟) 3 bytes / 1 unit.
"""

from __future__ import annotations

import pytest
import pytest_lsp
from lsprotocol import types
from pytest_lsp import ClientServerConfig, LanguageClient, client_capabilities

from .lsp_harness import SERVER_COMMAND, apply_edits, file_uri, wait_for

NOTE = "# Notes\r\n\N{TEST TUBE} 氟 {ClF3: trigonal planar}\r\nend\r\n"
PREFIX_UNITS = {"utf-8": 4 + 1 + 3 + 1 + 7, "utf-16": 2 + 1 + 1 + 1 + 7, "utf-32": 1 + 1 + 1 + 1 + 7}


@pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER_COMMAND))
async def client(lsp_client: LanguageClient):
    yield
    await lsp_client.shutdown_session()


@pytest.mark.parametrize("offered, chosen", [
    (None, "utf-16"),  # no offer: the LSP default
    (["utf-8", "utf-16"], "utf-8"),
    (["utf-32"], "utf-32"),
    (["utf-16"], "utf-16"),
])
async def test_diagnostic_and_fix_columns_in_the_negotiated_encoding(client: LanguageClient, tmp_path, offered, chosen):
    capabilities = client_capabilities("neovim@v0.7.0")
    if offered:
        capabilities.general = types.GeneralClientCapabilities(position_encodings=offered)
    result = await client.initialize_session(types.InitializeParams(capabilities=capabilities, root_uri=file_uri(tmp_path)))
    assert result.capabilities.position_encoding == chosen

    uri = file_uri(tmp_path / "unicode.md")
    client.text_document_did_open(types.DidOpenTextDocumentParams(types.TextDocumentItem(uri, "markdown", 1, NOTE)))
    diagnostics = await wait_for(lambda: [d for d in client.diagnostics.get(uri, []) if d.code == "wrong-shape"])
    start = PREFIX_UNITS[chosen]
    assert diagnostics[0].range == types.Range(types.Position(1, start), types.Position(1, start + len("trigonal planar")))

    actions = await client.text_document_code_action_async(
        types.CodeActionParams(types.TextDocumentIdentifier(uri), diagnostics[0].range, types.CodeActionContext(diagnostics))
    )
    fix = next(a for a in actions if isinstance(a, types.CodeAction) and a.kind == types.CodeActionKind.QuickFix)
    fixed = apply_edits(NOTE, fix.edit.changes[uri], chosen)
    assert fixed == NOTE.replace("trigonal planar", "T-shaped")

    # The client sends the edit back in the same encoding; the server's copy must match.
    client.text_document_did_change(
        types.DidChangeTextDocumentParams(
            types.VersionedTextDocumentIdentifier(uri=uri, version=2),
            [types.TextDocumentContentChangePartial(range=e.range, text=e.new_text) for e in fix.edit.changes[uri]],
        )
    )
    await wait_for(lambda: not any(d.code == "wrong-shape" for d in client.diagnostics.get(uri, diagnostics)))
    hover = await client.text_document_hover_async(
        types.HoverParams(types.TextDocumentIdentifier(uri), types.Position(1, PREFIX_UNITS[chosen] - 3))
    )
    assert hover is not None and hover.range.start.line == 1
