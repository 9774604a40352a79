"""Notebook documents through the real server (LSP 3.17 notebook sync, pytest-lsp's client).

Chemistry expectations: ClF3 has 3 bonds + 2 lone pairs on Cl, so VSEPR
predicts t-shaped (standard VSEPR, from memory).  The notebook type
``jupyter-notebook`` and the ``vscode-notebook-cell:`` URI scheme are what
VS Code sends for .ipynb files (common practice, no source).
"""

from __future__ import annotations

import pytest_lsp
from lsprotocol import types
from pytest_lsp import ClientServerConfig, LanguageClient, client_capabilities

from .lsp_harness import SERVER_COMMAND, apply_edits, file_uri, wait_for

MARKDOWN = "# Run 7\n\nThe trifluoride {ClF3: trigonal planar} fumes.\n"
CODE = "shapes = {ClF3: 'linear'}\n"  # a code cell: never reviewed, whatever it holds
WRONG = "trigonal planar"
SETTINGS = '[review]\nfiles = ["**/*.md", "**/*.ipynb"]\n'


def notebook_capabilities(pull: bool = False) -> types.ClientCapabilities:
    capabilities = client_capabilities("neovim@v0.7.0")  # pushes diagnostics
    capabilities.notebook_document = types.NotebookDocumentClientCapabilities(
        synchronization=types.NotebookDocumentSyncClientCapabilities()
    )
    if pull:
        capabilities.text_document.diagnostic = types.DiagnosticClientCapabilities()
    return capabilities


def cell_uri(notebook: str, handle: str) -> str:
    return f"vscode-notebook-cell:{notebook.removeprefix('file://')}#{handle}"


@pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER_COMMAND))
async def client(lsp_client: LanguageClient):
    yield
    await lsp_client.shutdown_session()


async def open_notebook(client: LanguageClient, tmp_path, pull: bool = False) -> tuple[str, str, str]:
    (tmp_path / ".notelsp.toml").write_text(SETTINGS, encoding="utf-8")
    result = await client.initialize_session(
        types.InitializeParams(capabilities=notebook_capabilities(pull), root_uri=file_uri(tmp_path))
    )
    (selector,) = result.capabilities.notebook_document_sync.notebook_selector
    assert selector.notebook == "jupyter-notebook"
    assert [cell.language for cell in selector.cells] == ["markdown"]
    notebook = file_uri(tmp_path / "run7.ipynb")
    code, markdown = cell_uri(notebook, "W0sZmlsZQ%3D%3D"), cell_uri(notebook, "W1sZmlsZQ%3D%3D")
    client.notebook_document_did_open(
        types.DidOpenNotebookDocumentParams(
            notebook_document=types.NotebookDocument(
                uri=notebook,
                notebook_type="jupyter-notebook",
                version=1,
                cells=[types.NotebookCell(kind=types.NotebookCellKind.Code, document=code),
                       types.NotebookCell(kind=types.NotebookCellKind.Markup, document=markdown)],
            ),
            cell_text_documents=[
                types.TextDocumentItem(uri=code, language_id="python", version=1, text=CODE),
                types.TextDocumentItem(uri=markdown, language_id="markdown", version=1, text=MARKDOWN),
            ],
        )
    )
    return notebook, code, markdown


def position_of(text: str, needle: str, extra: int = 0) -> types.Position:
    offset = text.index(needle) + extra
    return types.Position(text.count("\n", 0, offset), offset - (text.rfind("\n", 0, offset) + 1))


async def test_markdown_cell_is_diagnosed_and_edits_update_it(client: LanguageClient, tmp_path):
    notebook, code, markdown = await open_notebook(client, tmp_path)
    diagnostics = await wait_for(lambda: client.diagnostics.get(markdown))
    (shape,) = [d for d in diagnostics if d.code == "wrong-shape"]
    assert shape.range.start == position_of(MARKDOWN, WRONG)  # within the cell, not the notebook file
    assert shape.range.end == position_of(MARKDOWN, WRONG, len(WRONG))
    assert not client.diagnostics.get(code)  # the code cell's braces are code

    # the cell's claim becomes another wrong one: the diagnostic follows it
    start, end = position_of(MARKDOWN, WRONG), position_of(MARKDOWN, WRONG, len(WRONG))
    client.notebook_document_did_change(
        types.DidChangeNotebookDocumentParams(
            notebook_document=types.VersionedNotebookDocumentIdentifier(version=2, uri=notebook),
            change=types.NotebookDocumentChangeEvent(
                cells=types.NotebookDocumentCellChanges(
                    text_content=[
                        types.NotebookDocumentCellContentChanges(
                            document=types.VersionedTextDocumentIdentifier(uri=markdown, version=2),
                            changes=[types.TextDocumentContentChangePartial(
                                range=types.Range(start, end), text="linear")],
                        )
                    ]
                )
            ),
        )
    )
    changed = await wait_for(lambda: [d for d in client.diagnostics.get(markdown, [])
                                      if d.code == "wrong-shape" and "linear" in d.message])
    assert changed[0].range.start == start
    assert changed[0].range.end == types.Position(start.line, start.character + len("linear"))

    client.notebook_document_did_close(
        types.DidCloseNotebookDocumentParams(
            notebook_document=types.NotebookDocumentIdentifier(uri=notebook),
            cell_text_documents=[types.TextDocumentIdentifier(uri=code), types.TextDocumentIdentifier(uri=markdown)],
        )
    )
    await wait_for(lambda: len(client.diagnostics.get(markdown, [shape])) == 0)  # cleared on close


async def test_a_cell_added_later_is_diagnosed_and_hover_works_in_it(client: LanguageClient, tmp_path):
    notebook, _, markdown = await open_notebook(client, tmp_path)
    await wait_for(lambda: client.diagnostics.get(markdown))
    added = cell_uri(notebook, "W2sZmlsZQ%3D%3D")
    text = "Also {SF4: square planar}.\n"  # SF4: 4 bonds + 1 lone pair, seesaw (standard VSEPR, from memory)
    client.notebook_document_did_change(
        types.DidChangeNotebookDocumentParams(
            notebook_document=types.VersionedNotebookDocumentIdentifier(version=2, uri=notebook),
            change=types.NotebookDocumentChangeEvent(
                cells=types.NotebookDocumentCellChanges(
                    structure=types.NotebookDocumentCellChangeStructure(
                        array=types.NotebookCellArrayChange(
                            start=2, delete_count=0,
                            cells=[types.NotebookCell(kind=types.NotebookCellKind.Markup, document=added)]),
                        did_open=[types.TextDocumentItem(uri=added, language_id="markdown", version=1, text=text)],
                    )
                )
            ),
        )
    )
    diagnostics = await wait_for(lambda: client.diagnostics.get(added))
    assert [d.range.start for d in diagnostics if d.code == "wrong-shape"] == [position_of(text, "square planar")]
    hover = await client.text_document_hover_async(
        types.HoverParams(text_document=types.TextDocumentIdentifier(added), position=position_of(text, "SF4", 1))
    )
    assert hover is not None and "SF4" in hover.contents.value
    (shape,) = [d for d in diagnostics if d.code == "wrong-shape"]
    actions = await client.text_document_code_action_async(
        types.CodeActionParams(text_document=types.TextDocumentIdentifier(added), range=shape.range,
                               context=types.CodeActionContext(diagnostics=[shape]))
    )
    fixes = [a for a in actions if isinstance(a, types.CodeAction) and a.kind == types.CodeActionKind.QuickFix]
    assert fixes and list(fixes[0].edit.changes) == [added]  # the edit is to the cell, not the notebook file
    assert apply_edits(text, fixes[0].edit.changes[added]) == "Also {SF4: seesaw}.\n"


async def test_pulled_diagnostics_for_a_cell(client: LanguageClient, tmp_path):
    _, code, markdown = await open_notebook(client, tmp_path, pull=True)
    report = await client.text_document_diagnostic_async(
        types.DocumentDiagnosticParams(text_document=types.TextDocumentIdentifier(markdown))
    )
    assert [d.range.start for d in report.items if d.code == "wrong-shape"] == [position_of(MARKDOWN, WRONG)]
    report = await client.text_document_diagnostic_async(
        types.DocumentDiagnosticParams(text_document=types.TextDocumentIdentifier(code))
    )
    assert len(report.items) == 0
    assert markdown not in client.diagnostics  # a pulling client is not pushed to


async def test_changes_to_a_notebook_or_cell_not_open_are_dropped_quietly(client: LanguageClient, tmp_path):
    notebook, _, markdown = await open_notebook(client, tmp_path)
    await wait_for(lambda: client.diagnostics.get(markdown))

    def change(uri: str, cell: str) -> None:
        client.notebook_document_did_change(
            types.DidChangeNotebookDocumentParams(
                notebook_document=types.VersionedNotebookDocumentIdentifier(version=5, uri=uri),
                change=types.NotebookDocumentChangeEvent(cells=types.NotebookDocumentCellChanges(text_content=[
                    types.NotebookDocumentCellContentChanges(
                        document=types.VersionedTextDocumentIdentifier(uri=cell, version=5),
                        changes=[types.TextDocumentContentChangeWholeDocument(text="{SF4: linear}")])])),
            )
        )

    change(file_uri(tmp_path / "never-opened.ipynb"), cell_uri(notebook, "never"))
    change(notebook, cell_uri(notebook, "never"))
    hover = await client.text_document_hover_async(  # the server still answers, and nothing was shown
        types.HoverParams(text_document=types.TextDocumentIdentifier(markdown), position=position_of(MARKDOWN, "ClF3", 1))
    )
    assert hover is not None and "ClF3" in hover.contents.value
    assert not [m for m in client.messages if m.type == types.MessageType.Error]
