"""Headless Neovim (Debian's 0.7 or newer) loading editors/neovim, against the real server.

What Neovim received is written to JSON by tests/server/neovim/drive.lua.
ClF3 -> t-shaped: standard VSEPR (3 bonds, 2 lone pairs), from memory.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
from pathlib import Path

import pytest

from .lsp_harness import SERVER_COMMAND

ROOT = Path(__file__).resolve().parents[2]
pytestmark = pytest.mark.client


@pytest.fixture(scope="module")
def nvim() -> str:
    found = shutil.which("nvim")
    if found is None:
        pytest.skip("nvim is not installed and `make test` could not install it (apt-get install -y neovim)")
    return found


def drive(nvim: str, note: Path, tmp_path: Path, script_name: str = "drive.lua") -> dict:
    out = tmp_path / "neovim.json"
    env = dict(
        os.environ,
        NOTELSP_EDITORS=str(ROOT / "editors" / "neovim"),
        NOTELSP_CMD=json.dumps(SERVER_COMMAND),
        NOTELSP_NOTE=str(note),
        NOTELSP_OUT=str(out),
        XDG_STATE_HOME=str(tmp_path / "state"),  # keep Neovim's LSP log out of $HOME
        XDG_DATA_HOME=str(tmp_path / "data"),
    )
    script = ROOT / "tests" / "server" / "neovim" / script_name
    subprocess.run(
        [nvim, "--headless", "--clean", "-c", f"luafile {script}"],
        env=env, cwd=tmp_path, timeout=120, check=False, capture_output=True,
    )
    assert out.exists(), "Neovim wrote no result"
    return json.loads(out.read_text())


def test_neovim_shows_diagnostics_hover_and_applies_the_fix(nvim, tmp_path):
    note = tmp_path / "note.md"
    note.write_text("# Fluorides\n\nChlorine trifluoride {ClF3: trigonal planar}.\n")
    result = drive(nvim, note, tmp_path)
    assert "error" not in result, result
    assert result["filetype"] == "markdown"
    shape = [d for d in result["diagnostics"] if d["code"] == "wrong-shape"]
    assert shape, result
    assert (shape[0]["lnum"], shape[0]["col"]) == (2, len("Chlorine trifluoride {ClF3: "))
    assert shape[0]["source"] == "notelsp"
    assert "ClF3" in result["hover"]["value"]
    assert result["after_fix"][2] == "Chlorine trifluoride {ClF3: T-shaped}."
    assert result["cleared"] is True


def test_neovim_settings_reach_the_server(nvim, tmp_path):
    """setup({ settings = ... }) switches a rule off: pushed by Neovim 0.7, asked for by newer versions.

    H2O claimed sp: steric number 4 predicts sp3 (from memory).
    """
    note = tmp_path / "note.md"
    note.write_text("Chlorine trifluoride {ClF3: trigonal planar}.\nWater {H2O: sp}.\n")
    result = drive(nvim, note, tmp_path, "settings.lua")
    assert "error" not in result, result
    assert result["settled"] is True, result
    assert "wrong-hybridization" in result["codes"] and "wrong-shape" not in result["codes"]
