"""Settings an editor pushes with workspace/didChangeConfiguration (Kate 22.12, Neovim 0.7 never answer
workspace/configuration), and how they combine with .notelsp.toml and with pulled settings.

ClF3 claimed trigonal planar is a wrong-shape error: VSEPR predicts t-shaped (from memory).
"""

from __future__ import annotations

import pytest_lsp
from lsprotocol import types
from pytest_lsp import ClientServerConfig, LanguageClient

from .lsp_harness import SERVER_COMMAND, file_uri, wait_for
from .test_session import NOTE, open_note, push_capabilities, start


@pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER_COMMAND))
async def client(lsp_client: LanguageClient):
    yield
    await lsp_client.shutdown_session()


def push(client: LanguageClient, settings) -> None:
    client.workspace_did_change_configuration(types.DidChangeConfigurationParams(settings=settings))


def codes(client: LanguageClient, uri: str) -> set[str]:
    return {d.code for d in client.diagnostics.get(uri, [])}


async def shape_shown_then(client: LanguageClient, tmp_path, name: str):
    """Open the note, wait until wrong-shape is shown; the caller's push should then remove it (or not)."""
    uri = file_uri(tmp_path / name)
    open_note(client, uri, NOTE)
    await wait_for(lambda: "wrong-shape" in codes(client, uri))
    return uri


async def test_pushed_section_disables_a_rule(client: LanguageClient, tmp_path):
    await start(client, tmp_path)  # Neovim 0.7's capabilities: no workspace/configuration
    uri = await shape_shown_then(client, tmp_path, "pushed.md")
    push(client, {"notelsp": {"disabled": ["wrong-shape"]}})
    await wait_for(lambda: uri in client.diagnostics and "wrong-shape" not in codes(client, uri))
    assert client.messages == []


async def test_pushed_review_table_form_is_accepted(client: LanguageClient, tmp_path):
    await start(client, tmp_path)
    uri = await shape_shown_then(client, tmp_path, "table.md")
    push(client, {"notelsp": {"review": {"disabled": ["wrong-shape"]}}})
    await wait_for(lambda: uri in client.diagnostics and "wrong-shape" not in codes(client, uri))


async def test_pushed_settings_apply_over_the_file_and_can_be_withdrawn(client: LanguageClient, tmp_path):
    (tmp_path / ".notelsp.toml").write_text('[review]\nseverity = { wrong-shape = "hint" }\n')
    await start(client, tmp_path)
    uri = file_uri(tmp_path / "layered.md")
    open_note(client, uri, NOTE)

    def shape_severity():
        return next((d.severity for d in client.diagnostics.get(uri, []) if d.code == "wrong-shape"), None)

    assert await wait_for(shape_severity) == types.DiagnosticSeverity.Hint  # the file's choice
    push(client, {"notelsp": {"severity": {"wrong-shape": "warning"}}})
    await wait_for(lambda: shape_severity() == types.DiagnosticSeverity.Warning)  # the editor's, over it
    push(client, {"other-server": {}})  # the section removed: the file alone again
    await wait_for(lambda: shape_severity() == types.DiagnosticSeverity.Hint)


async def test_null_push_keeps_what_was_pushed(client: LanguageClient, tmp_path):
    await start(client, tmp_path)
    uri = await shape_shown_then(client, tmp_path, "kept.md")
    push(client, {"notelsp": {"disabled": ["wrong-shape"]}})
    await wait_for(lambda: uri in client.diagnostics and "wrong-shape" not in codes(client, uri))
    client.diagnostics.pop(uri)
    push(client, None)  # LSP allows null settings: a trigger, not "forget everything"
    await wait_for(lambda: uri in client.diagnostics)
    assert "wrong-shape" not in codes(client, uri)


async def test_pulled_settings_win_over_pushed_ones(client: LanguageClient, tmp_path):
    client.set_configuration({"disabled": []}, section="notelsp")
    capabilities = push_capabilities()
    capabilities.workspace.configuration = True
    await start(client, tmp_path, capabilities)
    uri = await shape_shown_then(client, tmp_path, "pulled.md")
    client.diagnostics.pop(uri)
    push(client, {"notelsp": {"disabled": ["wrong-shape"]}})  # this client answers the pull: that decides
    await wait_for(lambda: uri in client.diagnostics)
    assert "wrong-shape" in codes(client, uri)


async def test_bad_pushed_value_is_an_error_message(client: LanguageClient, tmp_path):
    await start(client, tmp_path)
    push(client, {"notelsp": {"angle_tolerance": "wide"}})
    message = await wait_for(lambda: client.messages)
    assert message[0].type == types.MessageType.Error
    assert "editor setting notelsp" in message[0].message and "angle_tolerance" in message[0].message


async def test_invalid_settings_file_is_an_error_message(client: LanguageClient, tmp_path):
    (tmp_path / ".notelsp.toml").write_text("[review]\ninlay_hints = yes\n")
    await start(client, tmp_path)
    message = await wait_for(lambda: client.messages)
    assert message[0].type == types.MessageType.Error
    assert ".notelsp.toml" in message[0].message and "line 2" in message[0].message


async def test_bad_value_in_the_file_names_its_line_and_key(client: LanguageClient, tmp_path):
    (tmp_path / ".notelsp.toml").write_text('[review]\ndisabled = ["wrong-shape"]\nangle_tolerance = "wide"\n')
    await start(client, tmp_path)
    message = await wait_for(lambda: client.messages)
    assert message[0].type == types.MessageType.Error
    assert "line 3" in message[0].message and "angle_tolerance" in message[0].message
    uri = file_uri(tmp_path / "rest-applies.md")
    open_note(client, uri, NOTE)  # the good value of the same file still applies
    await wait_for(lambda: uri in client.diagnostics)
    assert "wrong-shape" not in codes(client, uri)
