"""The server end to end through pytest-lsp's client: a real subprocess over stdio.

Chemistry expectations: ClF3 has 3 bonds + 2 lone pairs on Cl, so VSEPR
predicts t-shaped (standard VSEPR, from memory).
"""

from __future__ import annotations

import pytest_lsp
from lsprotocol import types
from pytest_lsp import ClientServerConfig, LanguageClient, client_capabilities

from .lsp_harness import SERVER_COMMAND, apply_edits, file_uri, wait_for

NOTE = "# Halogen fluorides\n\nChlorine trifluoride {ClF3: trigonal planar} is a strong oxidiser.\n"
WRONG = "trigonal planar"


def push_capabilities() -> types.ClientCapabilities:
    return client_capabilities("neovim@v0.7.0")  # pushes only: no pull diagnostics


async def start(client: LanguageClient, root, capabilities=None) -> types.InitializeResult:
    params = types.InitializeParams(capabilities=capabilities or push_capabilities(), root_uri=file_uri(root))
    return await client.initialize_session(params)


def open_note(client: LanguageClient, uri: str, text: str, version: int = 1, language: str = "markdown") -> None:
    client.text_document_did_open(
        types.DidOpenTextDocumentParams(
            text_document=types.TextDocumentItem(uri=uri, language_id=language, version=version, text=text)
        )
    )


def position_of(text: str, needle: str, extra: int = 0) -> types.Position:
    offset = text.index(needle) + extra
    line = text.count("\n", 0, offset)
    return types.Position(line, offset - (text.rfind("\n", 0, offset) + 1))  # ASCII lines: units = code points


@pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER_COMMAND))
async def client(lsp_client: LanguageClient):
    yield
    await lsp_client.shutdown_session()


async def test_open_diagnose_hover_fix_change_close(client: LanguageClient, tmp_path):
    await start(client, tmp_path)
    uri = file_uri(tmp_path / "fluorides.md")
    open_note(client, uri, NOTE)
    diagnostics = await wait_for(lambda: client.diagnostics.get(uri))
    shape = [d for d in diagnostics if d.code == "wrong-shape"]
    assert shape, diagnostics
    assert shape[0].source == "notelsp"
    assert shape[0].range.start == position_of(NOTE, WRONG)
    assert shape[0].range.end == position_of(NOTE, WRONG, len(WRONG))

    hover = await client.text_document_hover_async(
        types.HoverParams(text_document=types.TextDocumentIdentifier(uri), position=position_of(NOTE, "ClF3", 1))
    )
    assert hover is not None and hover.contents.kind == types.MarkupKind.Markdown
    assert "ClF3" in hover.contents.value

    actions = await client.text_document_code_action_async(
        types.CodeActionParams(
            text_document=types.TextDocumentIdentifier(uri),
            range=shape[0].range,
            context=types.CodeActionContext(diagnostics=shape),
        )
    )
    # lsprotocol reads any action that carries a command (the cross-check) as a Command: skip those
    actions = [a for a in actions if isinstance(a, types.CodeAction)]
    quickfixes = [a for a in actions if a.kind == types.CodeActionKind.QuickFix and a.edit]
    assert quickfixes, actions
    edits = quickfixes[0].edit.changes[uri]
    assert [e.range for e in edits] == [shape[0].range]  # replaces exactly the wrong claim
    fixed = apply_edits(NOTE, edits)
    assert "{ClF3: T-shaped}" in fixed

    # Apply the fix as an incremental change; the finding must go away.
    client.text_document_did_change(
        types.DidChangeTextDocumentParams(
            text_document=types.VersionedTextDocumentIdentifier(uri=uri, version=2),
            content_changes=[types.TextDocumentContentChangePartial(range=e.range, text=e.new_text) for e in edits],
        )
    )
    await wait_for(lambda: not any(d.code == "wrong-shape" for d in client.diagnostics.get(uri, [shape[0]])))

    client.text_document_did_close(types.DidCloseTextDocumentParams(text_document=types.TextDocumentIdentifier(uri)))
    await wait_for(lambda: uri in client.diagnostics and len(client.diagnostics[uri]) == 0)


async def test_rapid_edits_publish_only_the_latest_version(client: LanguageClient, tmp_path):
    await start(client, tmp_path)
    uri = file_uri(tmp_path / "typing.md")
    open_note(client, uri, "")
    await wait_for(lambda: uri in client.diagnostics)
    text = ""
    for version, char in enumerate("{ClF3: trigonal planar}", start=2):
        end = types.Position(0, len(text))
        text += char
        client.text_document_did_change(
            types.DidChangeTextDocumentParams(
                text_document=types.VersionedTextDocumentIdentifier(uri=uri, version=version),
                content_changes=[types.TextDocumentContentChangePartial(range=types.Range(end, end), text=char)],
            )
        )
    diagnostics = await wait_for(lambda: [d for d in client.diagnostics.get(uri, []) if d.code == "wrong-shape"])
    assert diagnostics[0].range.start == position_of(text, WRONG)


async def test_pull_diagnostics_and_no_push(client: LanguageClient, tmp_path):
    capabilities = client_capabilities("visual-studio-code")
    capabilities.text_document.diagnostic = types.DiagnosticClientCapabilities(dynamic_registration=False)
    capabilities.workspace.did_change_watched_files = None  # pytest-lsp's client cannot register capabilities
    result = await start(client, tmp_path, capabilities)
    assert result.capabilities.diagnostic_provider is not None
    uri = file_uri(tmp_path / "pulled.md")
    open_note(client, uri, NOTE)
    report = await client.text_document_diagnostic_async(
        types.DocumentDiagnosticParams(text_document=types.TextDocumentIdentifier(uri))
    )
    assert any(d.code == "wrong-shape" for d in report.items)
    assert uri not in client.diagnostics  # pulled, so never pushed as well


async def test_unknown_file_type_gets_no_diagnostics(client: LanguageClient, tmp_path):
    await start(client, tmp_path)
    uri = file_uri(tmp_path / "script.py")
    open_note(client, uri, "# {ClF3: trigonal planar}\n", language="python")
    markdown = file_uri(tmp_path / "after.md")
    open_note(client, markdown, NOTE)  # published after the .py one would have been
    await wait_for(lambda: client.diagnostics.get(markdown))
    assert not client.diagnostics.get(uri)
    hover = await client.text_document_hover_async(
        types.HoverParams(text_document=types.TextDocumentIdentifier(uri), position=types.Position(0, 4))
    )
    assert hover is None


async def test_empty_document(client: LanguageClient, tmp_path):
    await start(client, tmp_path)
    uri = file_uri(tmp_path / "empty.md")
    open_note(client, uri, "")
    await wait_for(lambda: uri in client.diagnostics)
    assert len(client.diagnostics[uri]) == 0
    document = types.TextDocumentIdentifier(uri)
    assert await client.text_document_hover_async(types.HoverParams(document, types.Position(0, 0))) is None
    assert not await client.text_document_document_symbol_async(types.DocumentSymbolParams(document))
    hints = await client.text_document_inlay_hint_async(
        types.InlayHintParams(document, types.Range(types.Position(0, 0), types.Position(0, 0)))
    )
    assert not hints


async def test_bad_config_file_is_reported_and_defaults_kept(client: LanguageClient, tmp_path):
    (tmp_path / ".notelsp.toml").write_text("[review]\nangle_tolerance = 'wide'\ninlay_hints = yes\n")
    await start(client, tmp_path)
    await wait_for(lambda: client.messages)
    assert "not valid TOML" in client.messages[0].message
    assert client.messages[0].type == types.MessageType.Error  # a broken file is an error, not a quiet fallback
    uri = file_uri(tmp_path / "still-works.md")
    open_note(client, uri, NOTE)
    assert any(d.code == "wrong-shape" for d in await wait_for(lambda: client.diagnostics.get(uri)))


async def test_bad_setting_value_is_named(client: LanguageClient, tmp_path):
    (tmp_path / ".notelsp.toml").write_text("[review]\nangle_tolerance = 'wide'\n")
    await start(client, tmp_path)
    await wait_for(lambda: client.messages)
    assert "angle_tolerance" in client.messages[0].message


async def test_config_file_disables_a_rule(client: LanguageClient, tmp_path):
    (tmp_path / ".notelsp.toml").write_text('[review]\ndisabled = ["wrong-shape"]\n')
    await start(client, tmp_path)
    uri = file_uri(tmp_path / "quiet.md")
    open_note(client, uri, NOTE)
    await wait_for(lambda: uri in client.diagnostics)
    assert not any(d.code == "wrong-shape" for d in client.diagnostics[uri])
    assert client.messages == []


async def test_editor_settings_switch_inlay_hints_off(client: LanguageClient, tmp_path):
    client.set_configuration({"inlay_hints": False}, section="notelsp")
    capabilities = push_capabilities()
    capabilities.workspace.configuration = True
    await start(client, tmp_path, capabilities)
    uri = file_uri(tmp_path / "hints.md")
    open_note(client, uri, "{ClF3}\n")
    await wait_for(lambda: uri in client.diagnostics)
    whole = types.Range(types.Position(0, 0), types.Position(1, 0))
    hints = await client.text_document_inlay_hint_async(types.InlayHintParams(types.TextDocumentIdentifier(uri), whole))
    assert not hints


async def test_inlay_hint_symbols_and_predicted_description(client: LanguageClient, tmp_path):
    await start(client, tmp_path)
    uri = file_uri(tmp_path / "bare.md")
    text = "Bare species: {ClF3}\n"
    open_note(client, uri, text)
    await wait_for(lambda: uri in client.diagnostics)
    document = types.TextDocumentIdentifier(uri)
    whole = types.Range(types.Position(0, 0), types.Position(1, 0))
    hints = await client.text_document_inlay_hint_async(types.InlayHintParams(document, whole))
    assert [h.label for h in hints] == ["→ T-shaped"]
    assert hints[0].position == position_of(text, "}", 1)

    symbols = await client.text_document_document_symbol_async(types.DocumentSymbolParams(document))
    assert [(s.name, s.detail) for s in symbols] == [("ClF3", "T-shaped")]

    actions = await client.text_document_code_action_async(
        types.CodeActionParams(document, types.Range(position_of(text, "ClF3"), position_of(text, "ClF3")),
                               types.CodeActionContext(diagnostics=[]))
    )
    describe = [a for a in actions if a.title.startswith("Add the predicted description")]
    assert describe, [a.title for a in actions]
    described = apply_edits(text, describe[0].edit.changes[uri])
    assert described == "Bare species: {ClF3: T-shaped}\n"
    subscripts = [a for a in actions if a.title == "Convert counts to subscripts"]
    assert apply_edits(text, subscripts[0].edit.changes[uri]) == "Bare species: {ClF₃}\n"

    # Round trip: the described text raises no finding.
    client.text_document_did_change(
        types.DidChangeTextDocumentParams(
            types.VersionedTextDocumentIdentifier(uri=uri, version=2),
            [types.TextDocumentContentChangeWholeDocument(text=described)],
        )
    )
    client.diagnostics.pop(uri)
    await wait_for(lambda: uri in client.diagnostics)
    assert len(client.diagnostics[uri]) == 0


async def test_completion_inside_an_annotation(client: LanguageClient, tmp_path):
    await start(client, tmp_path)
    uri = file_uri(tmp_path / "typing.md")
    text = "Now {Cl"
    open_note(client, uri, text)
    document = types.TextDocumentIdentifier(uri)
    formula = await client.text_document_completion_async(types.CompletionParams(document, types.Position(0, 7)))
    labels = {item.label for item in formula.items}
    assert {"Cl", "F", "Xe"} <= labels

    client.text_document_did_change(
        types.DidChangeTextDocumentParams(
            types.VersionedTextDocumentIdentifier(uri=uri, version=2),
            [types.TextDocumentContentChangeWholeDocument(text="Now {ClF3: t")],
        )
    )
    claims = await client.text_document_completion_async(types.CompletionParams(document, types.Position(0, 12)))
    described = {item.label: item.detail for item in claims.items}
    assert "T-shaped" in described and described["T-shaped"]
    t_shaped = next(item for item in claims.items if item.label == "T-shaped")
    assert t_shaped.text_edit.range == types.Range(types.Position(0, 11), types.Position(0, 12))  # replaces the typed "t"
    assert t_shaped.text_edit.new_text == "T-shaped"
    outside = await client.text_document_completion_async(types.CompletionParams(document, types.Position(0, 2)))
    assert outside is None


async def test_bad_editor_setting_is_shown(client: LanguageClient, tmp_path):
    client.set_configuration({"inlay_hints": "sometimes"}, section="notelsp")
    capabilities = push_capabilities()
    capabilities.workspace.configuration = True
    await start(client, tmp_path, capabilities)
    await wait_for(lambda: client.messages)
    assert "inlay_hints must be true or false" in client.messages[0].message
