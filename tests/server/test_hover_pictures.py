"""Hover carries a drawing for clients that render Markdown images, and only for them.

ClF3: T-shaped, both lone pairs equatorial (standard VSEPR, from memory).
"""

from __future__ import annotations

import base64
import re

import pytest_lsp
from lsprotocol import types
from pytest_lsp import ClientServerConfig, LanguageClient, client_capabilities

from .lsp_harness import SERVER_COMMAND, file_uri, wait_for
from .test_session import open_note, position_of, start

NOTE = "# Bench\n\nThe trifluoride {ClF3: T-shaped, F-Cl-F 87.5°} fumes.\n"


@pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER_COMMAND))
async def client(lsp_client: LanguageClient):
    yield
    await lsp_client.shutdown_session()


async def _hover(client: LanguageClient, tmp_path, capabilities) -> str:
    capabilities.workspace.did_change_watched_files = None  # pytest-lsp's client cannot register capabilities
    capabilities.workspace.configuration = False
    await start(client, tmp_path, capabilities)
    uri = file_uri(tmp_path / "bench.md")
    open_note(client, uri, NOTE)
    await wait_for(lambda: uri in client.diagnostics)
    hover = await client.text_document_hover_async(
        types.HoverParams(text_document=types.TextDocumentIdentifier(uri), position=position_of(NOTE, "ClF3", 1)))
    return hover.contents.value


async def test_a_client_rendering_markdown_gets_a_drawing_with_its_text_alternative(client, tmp_path):
    capabilities = client_capabilities("visual-studio-code")
    capabilities.general = types.GeneralClientCapabilities(
        markdown=types.MarkdownClientCapabilities(parser="marked", version="1.1.0"))
    value = await _hover(client, tmp_path, capabilities)
    match = re.search(r"!\[([^\]]*)\]\(data:image/svg\+xml;base64,([A-Za-z0-9+/=]+)\)", value)
    assert match, value[:300]
    alternative, data = match.groups()
    assert "T-shaped" in alternative and "2 lone pairs equatorial" in alternative
    drawing = base64.b64decode(data).decode("utf-8")
    assert drawing.startswith("<svg") and "<title>" in drawing
    assert "### ClF3" in value  # the text is still all there


async def test_a_client_without_markdown_rendering_gets_the_text_alone(client, tmp_path):
    value = await _hover(client, tmp_path, client_capabilities("neovim@v0.7.0"))
    assert "data:image" not in value and "### ClF3" in value


async def test_the_setting_turns_pictures_off(client, tmp_path):
    (tmp_path / ".notelsp.toml").write_text("[review]\nhover_pictures = false\n", encoding="utf-8")
    capabilities = client_capabilities("visual-studio-code")
    capabilities.general = types.GeneralClientCapabilities(
        markdown=types.MarkdownClientCapabilities(parser="marked", version="1.1.0"))
    value = await _hover(client, tmp_path, capabilities)
    assert "data:image" not in value and "### ClF3" in value
