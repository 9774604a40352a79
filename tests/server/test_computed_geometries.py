"""Computed geometries in the editor: rule findings at once, GFN2-xTB results in the background.

Each test starts its own server with computing on (tests/conftest.py turns it off for every
other server) and a private cache folder, so every species is computed afresh.

Reference: the gas-phase H-O-H angle of water is 104.5° (CRC Handbook of Chemistry and Physics,
from memory); the README's measured uncertainty of GFN2-xTB angles is 6° (ANGLE_UNCERTAINTY_DEG).
"""

from __future__ import annotations

import os
import re
from pathlib import Path

import pytest
from lsprotocol import types
from pytest_lsp import LanguageClient, client_capabilities
from pytest_lsp.client import make_test_lsp_client

from notelsp.compute import ANGLE_UNCERTAINTY_DEG, compute_species
from notelsp.compute.method import missing_packages
from notelsp.review.document import review_text
from notelsp.server.geometries import SWITCH_VARIABLE

from .lsp_harness import SERVER_COMMAND, file_uri, wait_for
from .test_session import open_note, position_of

pytestmark = pytest.mark.skipif(bool(missing_packages()), reason="tblite and ASE are not installed")

NOTE = "Water {H2O: H-O-H 115°} is bent.\n"
WATER_EXPERIMENT_DEG = 104.5  # CRC Handbook, from memory
COMPUTE_TIMEOUT = 240.0  # cold workers import tblite and ASE first; the machine may be shared


class Publications(dict):
    """``client.diagnostics`` that also counts every publication per document."""

    def __init__(self) -> None:
        super().__init__()
        self.count: dict[str, int] = {}

    def __setitem__(self, uri, diagnostics) -> None:
        self.count[uri] = self.count.get(uri, 0) + 1
        super().__setitem__(uri, diagnostics)


def _environment(cache: Path) -> dict[str, str]:
    environment = {k: v for k, v in os.environ.items() if k not in (SWITCH_VARIABLE, "NOTELSP_CACHE_DIR")}
    environment["XDG_CACHE_HOME"] = str(cache)
    return environment


async def _started(tmp_path: Path, progress: bool = True, capabilities=None) -> LanguageClient:
    client = make_test_lsp_client()
    client.diagnostics = Publications()
    await client.start_io(*SERVER_COMMAND, env=_environment(tmp_path / "cache"))
    capabilities = capabilities or client_capabilities("neovim@v0.7.0")  # pushed diagnostics
    capabilities.window = types.WindowClientCapabilities(work_done_progress=progress)
    await client.initialize_session(types.InitializeParams(capabilities=capabilities, root_uri=file_uri(tmp_path)))
    return client


@pytest.fixture
async def session(tmp_path):
    clients: list[LanguageClient] = []

    async def start(progress: bool = True, capabilities=None) -> LanguageClient:
        clients.append(await _started(tmp_path, progress, capabilities))
        return clients[-1]

    yield start
    for client in clients:
        await client.shutdown_session()


async def _hover(client: LanguageClient, uri: str, text: str, needle: str) -> str:
    answer = await client.text_document_hover_async(
        types.HoverParams(text_document=types.TextDocumentIdentifier(uri=uri), position=position_of(text, needle, 1)))
    return "" if answer is None else answer.contents.value


def _ended(client: LanguageClient) -> list:
    return [reports for reports in client.progress_reports.values()
            if reports and isinstance(reports[-1], types.WorkDoneProgressEnd)]


def _water(tmp_path: Path):
    """H2O computed by the library itself (the server's results are now in the same cache folder)."""
    previous = os.environ.get("XDG_CACHE_HOME")
    os.environ["XDG_CACHE_HOME"] = str(tmp_path / "cache")
    try:
        return compute_species("H2O")
    finally:
        if previous is None:
            del os.environ["XDG_CACHE_HOME"]
        else:
            os.environ["XDG_CACHE_HOME"] = previous


async def test_rules_first_then_the_computed_geometry_with_progress(session, tmp_path):
    client = await session()
    uri = file_uri(tmp_path / "water.md")
    open_note(client, uri, NOTE)
    await wait_for(lambda: uri in client.diagnostics)
    assert "computing…" in await _hover(client, uri, NOTE, "H2O")  # workers take seconds to start

    reports = (await wait_for(lambda: _ended(client), timeout=COMPUTE_TIMEOUT))[0]
    begin, *middle, end = reports
    assert isinstance(begin, types.WorkDoneProgressBegin) and "GFN2-xTB" in begin.title
    assert any(isinstance(r, types.WorkDoneProgressReport) and "H2O" in (r.message or "") for r in middle)
    assert end.message == "1 species computed"

    hover = await _hover(client, uri, NOTE, "H2O")
    found = re.search(r"H2O computed, GFN2-xTB: H-O-H (\d+\.\d)°", hover)
    assert found, hover
    water = _water(tmp_path)
    assert found.group(1) == f"{water.lowest.angles_between('H', 'H')[0]:.1f}"  # the library's own value
    assert abs(float(found.group(1)) - WATER_EXPERIMENT_DEG) <= ANGLE_UNCERTAINTY_DEG

    # Published again with the review that knows the result: what the review layer gives for it.
    await wait_for(lambda: client.diagnostics.count[uri] >= 2)
    expected = review_text(NOTE, "markdown", computed={"H2O": water}).findings
    await wait_for(lambda: sorted((d.code, d.message) for d in client.diagnostics[uri])
                   == sorted((f.code, f.message) for f in expected))


async def test_without_the_progress_capability_results_still_arrive(session, tmp_path):
    client = await session(progress=False)
    uri = file_uri(tmp_path / "quiet.md")
    open_note(client, uri, NOTE)
    await wait_for(lambda: client.diagnostics.count.get(uri, 0) >= 2, timeout=COMPUTE_TIMEOUT)
    assert "H2O computed, GFN2-xTB: H-O-H" in await _hover(client, uri, NOTE, "H2O")
    assert client.progress_reports == {}


async def test_hover_says_why_a_species_has_no_computed_geometry(session, tmp_path):
    client = await session(progress=False)
    text = "Iron pentacarbonyl {Fe(CO)5: trigonal bipyramidal}.\n"
    uri = file_uri(tmp_path / "iron.md")
    open_note(client, uri, text)
    await wait_for(lambda: client.diagnostics.count.get(uri, 0) >= 2, timeout=COMPUTE_TIMEOUT)
    reason = compute_species("Fe(CO)5").failed  # the library's own reason (nothing is computed: it is skipped)
    assert reason
    assert f"Fe(CO)5: no computed geometry (GFN2-xTB): {reason}" in await _hover(client, uri, text, "Fe(CO)5")


async def test_a_settings_file_turns_it_off(session, tmp_path):
    (tmp_path / ".notelsp.toml").write_text("[review]\ncompute = false\n")
    client = await session()
    uri = file_uri(tmp_path / "off.md")
    open_note(client, uri, NOTE)
    await wait_for(lambda: uri in client.diagnostics)
    hover = await _hover(client, uri, NOTE, "H2O")
    assert "H2O" in hover and "computing" not in hover and "computed" not in hover
    assert client.progress_reports == {}


async def test_an_editor_section_pushed_turns_it_off(session, tmp_path):
    client = await session()
    client.workspace_did_change_configuration(
        types.DidChangeConfigurationParams(settings={"notelsp": {"compute": False}}))
    uri = file_uri(tmp_path / "pushed-off.md")
    open_note(client, uri, NOTE)
    await wait_for(lambda: uri in client.diagnostics)
    hover = await _hover(client, uri, NOTE, "H2O")
    assert "H2O" in hover and "computing" not in hover and "computed" not in hover
    assert client.messages == []  # the key is known: no settings problem shown


async def test_a_pulling_client_is_asked_to_pull_again(session, tmp_path):
    capabilities = client_capabilities("visual-studio-code")
    capabilities.text_document.diagnostic = types.DiagnosticClientCapabilities(dynamic_registration=False)
    capabilities.workspace.diagnostics = types.DiagnosticWorkspaceClientCapabilities(refresh_support=True)
    capabilities.workspace.did_change_watched_files = None  # pytest-lsp's client cannot register capabilities
    client = await session(progress=False, capabilities=capabilities)
    await wait_for(lambda: client.diagnostic_refresh_count >= 1)  # the one after settings are read at start-up
    uri = file_uri(tmp_path / "pulled.md")
    open_note(client, uri, NOTE)
    asked = types.DocumentDiagnosticParams(text_document=types.TextDocumentIdentifier(uri))
    await client.text_document_diagnostic_async(asked)  # rules only; the calculation starts now
    refreshes = client.diagnostic_refresh_count
    await wait_for(lambda: client.diagnostic_refresh_count > refreshes, timeout=COMPUTE_TIMEOUT)
    report = await client.text_document_diagnostic_async(asked)
    expected = review_text(NOTE, "markdown", computed={"H2O": _water(tmp_path)}).findings
    assert sorted((d.code, d.message) for d in report.items) == sorted((f.code, f.message) for f in expected)
    assert uri not in client.diagnostics  # pulled, never pushed


# Six species; the pool computes as many at a time as the machine has cores.
SEVERAL = "{H2O: bent} {NH3: trigonal pyramidal} {PH3: trigonal pyramidal} {H2S: bent} {NF3: trigonal pyramidal} {OF2: bent}\n"


async def test_species_an_edit_removed_are_not_computed(session, tmp_path):
    first_batch = os.cpu_count() or 1
    dropped = ["H2O", "NH3", "PH3", "H2S", "NF3", "OF2"][max(first_batch, 1):]
    if not dropped:
        pytest.skip("this machine computes all six species at once")
    client = await session()
    uri = file_uri(tmp_path / "edited.md")
    open_note(client, uri, SEVERAL)
    await wait_for(lambda: uri in client.diagnostics)
    # Workers take seconds to start: the edit arrives while the first species are still being computed.
    client.text_document_did_change(types.DidChangeTextDocumentParams(
        text_document=types.VersionedTextDocumentIdentifier(uri=uri, version=2),
        content_changes=[types.TextDocumentContentChangeWholeDocument(text=NOTE)]))
    reports = (await wait_for(lambda: _ended(client), timeout=COMPUTE_TIMEOUT))[0]
    said = " ".join(r.message or "" for r in reports[:-1])
    assert not [name for name in dropped if name in said], said
    _assert_dropped(reports[-1].message, len(dropped))
    assert "H2O computed, GFN2-xTB" in await _hover(client, uri, NOTE, "H2O")


def _assert_dropped(message: str, at_least: int) -> None:
    """The run's end counts what it computed and what it dropped (all six species accounted for)."""
    found = re.fullmatch(r"(\d+) species computed; (\d+) no open note names any more", message)
    assert found, message
    computed, unnamed = map(int, found.groups())
    assert unnamed >= at_least and computed + unnamed <= 6


async def test_closing_the_note_stops_what_has_not_started(session, tmp_path):
    first_batch = os.cpu_count() or 1
    dropped = ["H2O", "NH3", "PH3", "H2S", "NF3", "OF2"][max(first_batch, 1):]
    if not dropped:
        pytest.skip("this machine computes all six species at once")
    client = await session()
    uri = file_uri(tmp_path / "closed-early.md")
    open_note(client, uri, SEVERAL)
    await wait_for(lambda: client.progress_reports)  # the run began; its workers take seconds to start
    client.text_document_did_close(types.DidCloseTextDocumentParams(types.TextDocumentIdentifier(uri=uri)))
    reports = (await wait_for(lambda: _ended(client), timeout=COMPUTE_TIMEOUT))[0]
    said = " ".join(r.message or "" for r in reports[:-1])
    assert not [name for name in dropped if name in said], said
    _assert_dropped(reports[-1].message, len(dropped))


async def test_closing_the_note_and_exit_leave_no_worker_behind(tmp_path):
    client = await _started(tmp_path)
    uri = file_uri(tmp_path / "closed.md")
    open_note(client, uri, NOTE)
    server = client._server.pid  # the subprocess pygls started
    workers = await wait_for(lambda: _workers(server), timeout=COMPUTE_TIMEOUT)
    children = _children(server)  # the workers and multiprocessing's resource tracker
    client.text_document_did_close(types.DidCloseTextDocumentParams(types.TextDocumentIdentifier(uri=uri)))
    await client.shutdown_session()
    assert set(workers) <= set(children)
    await wait_for(lambda: not any(_alive(pid) for pid in children))


def _children(pid: int) -> list[int]:
    found = []
    for status in Path("/proc").glob("[0-9]*/status"):
        try:
            fields = dict(line.split(":\t", 1) for line in status.read_text().splitlines() if ":\t" in line)
        except OSError:
            continue
        if fields.get("PPid", "").strip() == str(pid):
            found.append(int(status.parent.name))
    return found


def _workers(pid: int) -> list[int]:
    """The server's children that are the pool's worker processes (started by multiprocessing's spawn)."""
    workers = []
    for child in _children(pid):
        try:
            if b"multiprocessing.spawn" in Path(f"/proc/{child}/cmdline").read_bytes():
                workers.append(child)
        except OSError:
            continue
    return workers


def _alive(pid: int) -> bool:
    try:
        state = next(line for line in Path(f"/proc/{pid}/status").read_text().splitlines() if line.startswith("State:"))
    except (OSError, StopIteration):
        return False
    return "Z" not in state  # a zombie has ended; only its entry waits for its parent
