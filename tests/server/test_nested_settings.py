"""Each open note follows its nearest .notelsp.toml, as the command line does.

ClF3 claimed trigonal planar is a wrong-shape error (VSEPR: T-shaped; from memory).
"""

from __future__ import annotations

import subprocess
import sys

import pytest_lsp
from lsprotocol import types
from pytest_lsp import ClientServerConfig, LanguageClient, client_capabilities

from .lsp_harness import SERVER_COMMAND, file_uri, wait_for
from .test_session import open_note, start

NOTE = "Bench {ClF3: trigonal planar}.\n"


@pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER_COMMAND))
async def client(lsp_client: LanguageClient):
    yield
    await lsp_client.shutdown_session()


def _check_codes(path) -> set[str]:
    """What notelsp check reports for one note (the command line's own settings lookup)."""
    done = subprocess.run([sys.executable, "-m", "notelsp", "check", "--format", "json", str(path)],
                          capture_output=True, text=True, timeout=120)
    import json

    report = json.loads(done.stdout)
    return {f["code"] for file in report["files"] for f in file["findings"]}


async def test_a_nested_settings_file_governs_the_notes_below_it(client, tmp_path):
    (tmp_path / ".notelsp.toml").write_text("[review]\n", encoding="utf-8")
    (tmp_path / "lab").mkdir()
    (tmp_path / "lab" / ".notelsp.toml").write_text('[review]\ndisabled = ["wrong-shape"]\n', encoding="utf-8")
    (tmp_path / "lab" / "run1.md").write_text(NOTE, encoding="utf-8")
    (tmp_path / "top.md").write_text(NOTE, encoding="utf-8")
    capabilities = client_capabilities("neovim@v0.7.0")
    await start(client, tmp_path, capabilities)
    below, above = file_uri(tmp_path / "lab" / "run1.md"), file_uri(tmp_path / "top.md")
    open_note(client, below, NOTE)
    open_note(client, above, NOTE)
    above_codes = await wait_for(lambda: {d.code for d in client.diagnostics.get(above, [])} or None)
    (below_codes,) = await wait_for(lambda: below in client.diagnostics and ({d.code for d in client.diagnostics[below]},))
    assert "wrong-shape" in above_codes and "wrong-shape" not in below_codes
    # the same answers as the command line
    assert ("wrong-shape" in _check_codes(tmp_path / "top.md")) and ("wrong-shape" not in _check_codes(tmp_path / "lab" / "run1.md"))


async def test_patterns_of_a_nested_file_are_relative_to_its_folder(client, tmp_path):
    (tmp_path / "lab").mkdir()
    (tmp_path / "lab" / ".notelsp.toml").write_text('[review]\nfiles = ["/kept/*.md"]\n', encoding="utf-8")
    (tmp_path / "lab" / "kept").mkdir()
    (tmp_path / "lab" / "other").mkdir()
    await start(client, tmp_path, client_capabilities("neovim@v0.7.0"))
    kept, other = file_uri(tmp_path / "lab" / "kept" / "a.md"), file_uri(tmp_path / "lab" / "other" / "b.md")
    open_note(client, kept, NOTE)
    open_note(client, other, NOTE)
    await wait_for(lambda: any(d.code == "wrong-shape" for d in client.diagnostics.get(kept, [])))
    await wait_for(lambda: other in client.diagnostics)
    assert not client.diagnostics[other]
