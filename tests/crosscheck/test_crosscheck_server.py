"""The cross-check through a real LSP client (pytest-lsp) against ``python -m notelsp serve``.

Water at the default level (HF/6-31G*, one worker, seconds to tens of seconds): its
H-O-H angle comes out near the 104.0 deg of ASE's G2 set (Curtiss et al., J. Chem.
Phys. 1997), so a claimed 120 deg disagrees and a claimed 104.5 deg agrees
within the default 5 deg tolerance.  The review layer's own expectation for
water (about 104.5 deg, VSEPR from memory) is not what is tested here.
"""

from __future__ import annotations

import asyncio
import os
import sys
import uuid
from pathlib import Path

import pytest
import pytest_asyncio
from lsprotocol import types
from pytest_lsp import ClientServerConfig, LanguageClient, client_capabilities

from notelsp.server.crosscheck import ACTION_KIND, COMMAND, REQUEST, wants_cross_check_actions

pytestmark = pytest.mark.skipif(not Path("/proc/self/stat").exists(), reason="reads worker processes from /proc")

SERVER = [sys.executable, "-m", "notelsp", "serve"]
WRONG_ANGLE = "H-O-H 120°"
NOTE = f"# Water\n\nWater is bent {{H2O: {WRONG_ANGLE}}}.\n"
WAIT = 90.0  # seconds a calculation may take on a busy two-core machine before a test gives up


@pytest_asyncio.fixture
async def client(private_cache):
    config = ClientServerConfig(server_command=SERVER, server_env={**os.environ, "NOTELSP_CACHE_DIR": str(private_cache)})
    lsp_client = await config.start()
    yield lsp_client
    await lsp_client.shutdown_session()
    await lsp_client.stop()


def capabilities(progress: bool = True) -> types.ClientCapabilities:
    chosen = client_capabilities("neovim@v0.7.0")  # pushes diagnostics, no pull
    chosen.window = types.WindowClientCapabilities(work_done_progress=progress)
    return chosen


async def start(client: LanguageClient, root: Path, text: str = NOTE) -> str:
    await client.initialize_session(types.InitializeParams(capabilities=capabilities(), root_uri=root.resolve().as_uri()))
    uri = (root / "water.md").resolve().as_uri()
    client.text_document_did_open(
        types.DidOpenTextDocumentParams(text_document=types.TextDocumentItem(uri=uri, language_id="markdown", version=1, text=text))
    )
    await wait_for(lambda: uri in client.diagnostics)
    return uri


async def wait_for(predicate, timeout: float = WAIT):
    deadline = asyncio.get_running_loop().time() + timeout
    while not (value := predicate()):
        if asyncio.get_running_loop().time() > deadline:
            raise AssertionError(f"gave up after {timeout:.0f} s")
        await asyncio.sleep(0.05)
    return value


def span_range(text: str, needle: str) -> types.Range:
    offset = text.index(needle)
    line, column = text.count("\n", 0, offset), offset - (text.rfind("\n", 0, offset) + 1)  # ASCII line
    return types.Range(types.Position(line, column), types.Position(line, column + len(needle)))


def codes(client: LanguageClient, uri: str) -> list[str]:
    return [str(d.code) for d in client.diagnostics.get(uri, [])]


def workers_of(server_pid: int) -> list[int]:
    """Running cross-check worker processes whose parent is the server."""
    found = []
    for stat in Path("/proc").glob("[0-9]*/stat"):
        try:
            state_and_parent = stat.read_text().rsplit(")", 1)[1].split()
            command = (stat.parent / "cmdline").read_bytes()
        except (OSError, IndexError):
            continue  # the process ended while being read
        if int(state_and_parent[1]) == server_pid and b"notelsp.crosscheck.worker" in command:
            found.append(int(stat.parent.name))
    return found


def kinds(reports: list) -> list[str]:
    return [type(r).__name__ for r in reports]


async def cross_check_action(client: LanguageClient, uri: str, text: str) -> dict:
    """The cross-check source action over the formula, as the JSON the server sent.

    Read unconverted: lsprotocol's client-side converter takes any code action
    carrying a ``command`` for a bare Command and mangles it (editors tell the
    two apart by the type of ``command``, as the LSP specification says).
    """
    params = types.CodeActionParams(
        text_document=types.TextDocumentIdentifier(uri),
        range=span_range(text, "H2O"),
        context=types.CodeActionContext(diagnostics=[], only=[types.CodeActionKind.Source]),
    )
    protocol = client.protocol
    protocol.get_result_type = lambda method: None  # instance attribute: this client only
    try:
        actions = await protocol.send_request_async(types.TEXT_DOCUMENT_CODE_ACTION, params)
    finally:
        del protocol.get_result_type
    (action,) = [a for a in actions if a.get("kind") == ACTION_KIND]
    assert action["command"]["command"] == COMMAND
    return action


def execute(client: LanguageClient, action: dict):
    command = action["command"]
    return client.workspace_execute_command_async(
        types.ExecuteCommandParams(command=command["command"], arguments=command["arguments"])
    )


@pytest.mark.parametrize(
    ("only", "offered"),
    [(None, False), ([], False), (["quickfix"], False), (["source.organizeImports"], False), (["source"], True), ([ACTION_KIND], True)],
)
def test_the_action_is_a_source_action(only, offered):
    assert wants_cross_check_actions(only) is offered


async def test_action_runs_with_progress_and_its_findings_survive_the_next_review(client, tmp_path):
    uri = await start(client, tmp_path)
    plain = await client.text_document_code_action_async(
        types.CodeActionParams(
            text_document=types.TextDocumentIdentifier(uri),
            range=span_range(NOTE, "H2O"),
            context=types.CodeActionContext(diagnostics=[]),
        )
    )
    assert all(isinstance(a, types.CodeAction) and a.kind != ACTION_KIND for a in plain or [])  # only on request
    action = await cross_check_action(client, uri, NOTE)
    assert "H2O" in action["title"]
    assert client.progress_reports == {}  # nothing runs until asked (cross_check_automatic is off)

    answer = await execute(client, action)
    assert answer["status"] == "done", answer
    assert "Cross-check of H2O (HF/6-31G*)" in answer["markdown"]
    assert any(f["code"] == "computed-angle" and f["severity"] == "warning" for f in answer["findings"])

    (reports,) = client.progress_reports.values()
    assert kinds(reports)[0] == "WorkDoneProgressBegin" and kinds(reports)[-1] == "WorkDoneProgressEnd"
    assert "H2O" in reports[0].title and reports[0].cancellable
    steps = [r for r in reports if isinstance(r, types.WorkDoneProgressReport)]
    assert any("step 1" in (r.message or "") for r in steps)

    computed = await wait_for(lambda: [d for d in client.diagnostics.get(uri, []) if d.code == "computed-angle"])
    assert computed[0].range == span_range(NOTE, WRONG_ANGLE) and computed[0].source == "notelsp"
    assert computed[0].message.startswith("computed (HF/6-31G*): H-O-H")

    # An edit elsewhere: the next review keeps the computed finding beside its own.
    added = "\nChlorine trifluoride {ClF3: trigonal planar}.\n"
    end = types.Position(NOTE.count("\n"), 0)
    client.text_document_did_change(
        types.DidChangeTextDocumentParams(
            text_document=types.VersionedTextDocumentIdentifier(uri=uri, version=2),
            content_changes=[types.TextDocumentContentChangePartial(range=types.Range(end, end), text=added)],
        )
    )
    await wait_for(lambda: "wrong-shape" in codes(client, uri))
    assert "computed-angle" in codes(client, uri)

    # Editing the annotation itself drops what was computed for its old text.
    claim = span_range(NOTE, "120")
    client.text_document_did_change(
        types.DidChangeTextDocumentParams(
            text_document=types.VersionedTextDocumentIdentifier(uri=uri, version=3),
            content_changes=[types.TextDocumentContentChangePartial(range=claim, text="104.5")],
        )
    )
    await wait_for(lambda: "computed-angle" not in codes(client, uri))
    assert "wrong-shape" in codes(client, uri)


async def test_cancelling_the_progress_stops_the_worker(client, tmp_path):
    uri = await start(client, tmp_path)
    action = await cross_check_action(client, uri, NOTE)
    server = client._server.pid
    running = asyncio.ensure_future(execute(client, action))
    (token,) = await wait_for(lambda: list(client.progress_reports))
    await wait_for(lambda: workers_of(server))
    client.window_work_done_progress_cancel(types.WorkDoneProgressCancelParams(token=token))
    answer = await asyncio.wait_for(running, WAIT)
    assert answer["status"] == "cancelled" and not answer["findings"]
    assert workers_of(server) == []
    reports = client.progress_reports[token]
    assert kinds(reports)[-1] == "WorkDoneProgressEnd" and reports[-1].message == "cancelled"
    assert "computed-angle" not in codes(client, uri)


async def test_cancel_request_stops_the_worker(client, tmp_path):
    uri = await start(client, tmp_path)
    server = client._server.pid
    request_id = str(uuid.uuid4())
    offset = NOTE.index("{H2O")
    running = asyncio.ensure_future(
        client.protocol.send_request_async(REQUEST, {"uri": uri, "offset": offset, "level": "HF/STO-3G"}, msg_id=request_id)
    )
    # the token is created before its first report arrives: wait for the report
    (token,) = await wait_for(lambda: [t for t, reports in client.progress_reports.items() if reports])
    assert "HF/STO-3G" in client.progress_reports[token][0].title
    await wait_for(lambda: workers_of(server))
    client.protocol.notify(types.CANCEL_REQUEST, types.CancelParams(id=request_id))
    with pytest.raises(Exception, match="cancel"):
        await asyncio.wait_for(running, WAIT)
    assert workers_of(server) == []
    await wait_for(lambda: kinds(client.progress_reports[token])[-1:] == ["WorkDoneProgressEnd"])
    assert client.progress_reports[token][-1].message == "cancelled"


async def test_automatic_setting_cross_checks_after_open_and_reuses_results(client, tmp_path):
    (tmp_path / ".notelsp.toml").write_text("[review]\ncross_check_automatic = true\n", encoding="utf-8")
    uri = await start(client, tmp_path)
    computed = await wait_for(lambda: [d for d in client.diagnostics.get(uri, []) if d.code == "computed-angle"])
    assert computed[0].severity == types.DiagnosticSeverity.Warning
    assert len(client.progress_reports) == 1

    # A second annotation of the same species: checked from the kept result, no new calculation.
    added = "\nAt rest {H2O: H-O-H 104.5°}.\n"
    end = types.Position(NOTE.count("\n"), 0)
    client.text_document_did_change(
        types.DidChangeTextDocumentParams(
            text_document=types.VersionedTextDocumentIdentifier(uri=uri, version=2),
            content_changes=[types.TextDocumentContentChangePartial(range=types.Range(end, end), text=added)],
        )
    )
    agreeing = await wait_for(
        lambda: [d for d in client.diagnostics.get(uri, []) if d.code == "computed-angle" and "agrees" in d.message]
    )
    assert agreeing[0].severity == types.DiagnosticSeverity.Information
    assert len(client.progress_reports) == 1


async def test_pulling_client_is_asked_to_refresh_and_pulls_the_computed_findings(client, tmp_path):
    chosen = client_capabilities("visual-studio-code")
    chosen.text_document.diagnostic = types.DiagnosticClientCapabilities(dynamic_registration=False)
    chosen.workspace.did_change_watched_files = None  # pytest-lsp's client cannot register capabilities
    chosen.workspace.diagnostics = types.DiagnosticWorkspaceClientCapabilities(refresh_support=True)
    chosen.window = types.WindowClientCapabilities(work_done_progress=False)  # and no progress at all
    await client.initialize_session(types.InitializeParams(capabilities=chosen, root_uri=tmp_path.resolve().as_uri()))
    uri = (tmp_path / "water.md").resolve().as_uri()
    client.text_document_did_open(
        types.DidOpenTextDocumentParams(text_document=types.TextDocumentItem(uri=uri, language_id="markdown", version=1, text=NOTE))
    )

    async def pulled() -> list[str]:
        report = await client.text_document_diagnostic_async(
            types.DocumentDiagnosticParams(text_document=types.TextDocumentIdentifier(uri))
        )
        return [str(d.code) for d in report.items]

    assert "computed-angle" not in await pulled()
    refreshes = client.diagnostic_refresh_count
    answer = await client.protocol.send_request_async(REQUEST, {"uri": uri, "offset": NOTE.index("{H2O"), "level": "HF/STO-3G"})
    assert answer.status == "done" and client.progress_reports == {}  # an untyped answer comes as a namedtuple
    await wait_for(lambda: client.diagnostic_refresh_count > refreshes)
    assert "computed-angle" in await pulled()
    assert client.diagnostics.get(uri) is None  # nothing pushed to a pulling client
