"""workspace/diagnostic, workspace/symbol and semantic tokens through pytest-lsp's client.

ClF3 claimed trigonal planar is a wrong-shape error (VSEPR: t-shaped), H2O bent is right
(standard VSEPR, from memory).  Token types are the LSP specification's standard names and the
relative encoding is decoded here as the specification describes it (common practice, no source).
"""

from __future__ import annotations

import os

import pytest_lsp
from lsprotocol import types
from pytest_lsp import ClientServerConfig, LanguageClient, client_capabilities

from notelsp.review.describe import rule_doc_url
from notelsp.server import workspace_diagnostics, workspace_symbols
from notelsp.review.settings import Settings

from .lsp_harness import SERVER_COMMAND, file_uri
from .test_session import NOTE, open_note, start

CLEAN = "Water {H2O: bent}\n"


@pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER_COMMAND))
async def client(lsp_client: LanguageClient):
    yield
    await lsp_client.shutdown_session()


def pulling() -> types.ClientCapabilities:
    capabilities = client_capabilities("visual-studio-code")
    capabilities.text_document.diagnostic = types.DiagnosticClientCapabilities(dynamic_registration=False)
    capabilities.workspace.did_change_watched_files = None  # pytest-lsp's client cannot register capabilities
    capabilities.workspace.configuration = False
    return capabilities


def workspace(tmp_path):
    (tmp_path / "fluorides.md").write_text(NOTE)
    (tmp_path / "lab" / "week1").mkdir(parents=True)
    (tmp_path / "lab" / "week1" / "water.txt").write_text(CLEAN)
    for skipped in (".hidden/x.md", "node_modules/y.md"):  # hidden and vendored folders, as notelsp check skips
        (tmp_path / skipped).parent.mkdir()
        (tmp_path / skipped).write_text(NOTE)
    (tmp_path / "script.py").write_text("# {ClF3: trigonal planar}\n")  # not a note


async def workspace_report(client, previous=()) -> dict:
    report = await client.workspace_diagnostic_async(
        types.WorkspaceDiagnosticParams(previous_result_ids=list(previous), identifier="notelsp"))
    return {item.uri: item for item in report.items}


async def test_workspace_diagnostics_cover_open_and_saved_notes_with_result_ids(client, tmp_path):
    workspace(tmp_path)
    result = await start(client, tmp_path, pulling())
    assert result.capabilities.diagnostic_provider.workspace_diagnostics is True
    open_uri, disk_uri = file_uri(tmp_path / "fluorides.md"), file_uri(tmp_path / "lab" / "week1" / "water.txt")
    edited = NOTE + "Also {XeF4: square planar}.\n"
    open_note(client, open_uri, edited, version=7)

    first = await workspace_report(client)
    assert set(first) == {open_uri, disk_uri}
    opened = first[open_uri]
    assert opened.kind == "full" and opened.version == 7  # the editor's text, not the saved one
    shape = [d for d in opened.items if d.code == "wrong-shape"]
    assert len(shape) == 1 and shape[0].code_description.href == rule_doc_url("wrong-shape")
    assert first[disk_uri].kind == "full" and not first[disk_uri].items and first[disk_uri].version is None

    previous = [types.PreviousResultId(uri=uri, value=item.result_id) for uri, item in first.items()]
    second = await workspace_report(client, previous)
    assert {uri: item.kind for uri, item in second.items()} == {open_uri: "unchanged", disk_uri: "unchanged"}
    assert all(second[uri].result_id == first[uri].result_id for uri in first)

    (tmp_path / "lab" / "week1" / "water.txt").write_text(CLEAN + "{ClF3: trigonal planar}\n")
    third = await workspace_report(client, previous)
    assert third[open_uri].kind == "unchanged"
    assert third[disk_uri].kind == "full" and [d.code for d in third[disk_uri].items] == ["wrong-shape"]
    assert third[disk_uri].result_id != first[disk_uri].result_id


def test_workspace_diagnostics_are_bounded(tmp_path, monkeypatch):
    for number in range(5):
        (tmp_path / f"note{number}.md").write_text(CLEAN)
    monkeypatch.setattr(workspace_diagnostics, "MAX_NOTES", 3)
    reports, capped = workspace_diagnostics.workspace_reports([], tmp_path, Settings(), "utf-16", {})
    assert len(reports) == 3 and capped


async def test_workspace_symbols_find_species_in_open_and_saved_notes(client, tmp_path):
    workspace(tmp_path)
    (tmp_path / "lab" / "subscripts.md").write_text("Written with subscripts: {ClF₃: t-shaped}\n")
    await start(client, tmp_path)
    open_uri = file_uri(tmp_path / "fluorides.md")
    open_note(client, open_uri, "\n" + NOTE)  # one line lower than on disk; held before the next request is read

    found = await client.workspace_symbol_async(types.WorkspaceSymbolParams(query="clf3"))
    places = sorted((s.name, s.container_name, s.location.uri, s.location.range.start.line) for s in found)
    assert places == [
        ("ClF3", "fluorides.md", open_uri, 3),
        ("ClF₃", "lab/subscripts.md", file_uri(tmp_path / "lab" / "subscripts.md"), 0),
    ]
    opened = next(s for s in found if s.location.uri == open_uri)
    assert opened.location.range == types.Range(types.Position(3, len("Chlorine trifluoride {")),
                                                types.Position(3, len("Chlorine trifluoride {ClF3")))
    everything = await client.workspace_symbol_async(types.WorkspaceSymbolParams(query=""))
    assert {s.name for s in everything} == {"ClF3", "ClF₃", "H2O"}
    assert await client.workspace_symbol_async(types.WorkspaceSymbolParams(query="XeF6")) == []


def test_workspace_diagnostics_leave_out_what_is_not_a_readable_note(tmp_path):
    (tmp_path / "good.md").write_text(CLEAN)
    os.mkfifo(tmp_path / "pipe.md")  # a FIFO named like a note: reading it would block
    (tmp_path / "latin1.md").write_bytes("caf\xe9 {H2O: bent}\n".encode("latin-1"))  # not UTF-8
    reports, capped = workspace_diagnostics.workspace_reports([], tmp_path, Settings(), "utf-16", {})
    assert [report.uri for report in reports] == [file_uri(tmp_path / "good.md")] and not capped


def test_workspace_symbols_are_capped(tmp_path, monkeypatch):
    (tmp_path / "many.md").write_text("".join(f"{{H2O}} line {n}\n" for n in range(10)))
    monkeypatch.setattr(workspace_symbols, "MAX_SYMBOLS", 4)
    assert len(workspace_symbols.workspace_symbols([], tmp_path, Settings(), "utf-16", "h2o")) == 4


def decoded(data: list[int], legend: types.SemanticTokensLegend, text: str) -> list[tuple[int, str, str]]:
    """(line, token text, type name) for the relative encoding of the LSP specification (ASCII text here)."""
    lines = text.split("\n")
    out, line, character = [], 0, 0
    for index in range(0, len(data), 5):
        delta_line, delta_start, length, kind, modifiers = data[index:index + 5]
        assert modifiers == 0
        line += delta_line
        character = character + delta_start if delta_line == 0 else delta_start
        out.append((line, lines[line][character:character + length], legend.token_types[kind]))
    return out


async def test_semantic_tokens_for_annotations(client, tmp_path):
    result = await start(client, tmp_path)
    legend = result.capabilities.semantic_tokens_provider.legend
    assert set(legend.token_types) <= {t.value for t in types.SemanticTokenTypes}  # standard types only
    text = "# Notes\n\nSee {ClF3: t-shaped, F-Cl-F 87.5°} here.\n{H2O vs H2S: H-O-H > H-S-H}\n"
    uri = file_uri(tmp_path / "tokens.md")
    open_note(client, uri, text)
    document = types.TextDocumentIdentifier(uri)
    full = await client.text_document_semantic_tokens_full_async(types.SemanticTokensParams(document))
    assert decoded(full.data, legend, text) == [
        (2, "ClF3", "type"), (2, ":", "operator"), (2, "t-shaped", "keyword"), (2, ",", "operator"),
        (2, "F-Cl-F", "keyword"), (2, "87.5", "number"), (2, "°", "operator"),
        (3, "H2O", "type"), (3, "vs", "operator"), (3, "H2S", "type"), (3, ":", "operator"),
        (3, "H-O-H", "keyword"), (3, ">", "operator"), (3, "H-S-H", "keyword"),
    ]
    last_line = types.Range(types.Position(3, 0), types.Position(4, 0))
    ranged = await client.text_document_semantic_tokens_range_async(types.SemanticTokensRangeParams(document, last_line))
    assert [token for token in decoded(ranged.data, legend, text)] == [t for t in decoded(full.data, legend, text) if t[0] == 3]


def test_semantic_token_columns_count_in_the_negotiated_encoding():
    """Columns and lengths in UTF-16 and UTF-8 units, checked with Python's own codecs (LSP: character offsets
    count in the negotiated encoding)."""
    from notelsp.review.document import review_text
    from notelsp.server.positions import line_index
    from notelsp.server.semantic_tokens import annotation_tokens, encode

    text = "\N{TEST TUBE} é {ClF3: 87.5°}\n"
    review = review_text(text, "markdown")
    tokens = [token for annotation in review.annotations for token in annotation_tokens(annotation, text)]
    for encoding, codec, width in (("utf-16", "utf-16-le", 2), ("utf-8", "utf-8", 1)):
        data = encode(tokens, line_index(text, encoding))
        column = 0
        for index, (start, end, _) in enumerate(tokens):
            column += data[index * 5 + 1]
            assert column == len(text[:start].encode(codec)) // width
            assert data[index * 5 + 2] == len(text[start:end].encode(codec)) // width
