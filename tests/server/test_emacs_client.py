"""Emacs in batch with eglot (Debian 12: emacs-nox 28 + elpa-eglot 1.9) loading editors/emacs, against the real server.

What Emacs saw is written to JSON by tests/server/emacs/drive.el: Flymake's diagnostics, a hover,
eglot's own quick-fix command applied to the buffer, and eglot-workspace-configuration honoured.
ClF3 claimed trigonal planar: VSEPR predicts t-shaped; H2O claimed sp: steric number 4 predicts sp3
(standard VSEPR and hybridization, from memory).
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
from pathlib import Path

import pytest

from notelsp.review.describe import rule_doc_url

from .lsp_harness import SERVER_COMMAND

ROOT = Path(__file__).resolve().parents[2]
pytestmark = pytest.mark.client
NOTE = "# Notes\n\nChlorine trifluoride {ClF3: trigonal planar}.\nWater {H2O: sp}.\n"


@pytest.fixture(scope="module")
def emacs() -> str:
    found = shutil.which("emacs")
    if found is None:
        pytest.skip("emacs is not installed and `make test` could not install it (apt-get install -y emacs-nox elpa-eglot)")
    probe = subprocess.run([found, "--batch", "--eval", "(require 'eglot)"], capture_output=True, timeout=60, check=False)
    if probe.returncode != 0:
        pytest.skip("emacs has no eglot (Emacs 28: apt-get install -y elpa-eglot; built into Emacs 29+)")
    return found


def drive(emacs: str, note: Path, tmp_path: Path) -> dict:
    out = tmp_path / "emacs.json"
    env = dict(
        os.environ,
        NOTELSP_EDITORS=str(ROOT / "editors" / "emacs"),
        NOTELSP_CMD=json.dumps(SERVER_COMMAND),
        NOTELSP_NOTE=str(note),
        NOTELSP_OUT=str(out),
        HOME=str(tmp_path),  # no user init, and Emacs's state files stay out of the real home
    )
    script = ROOT / "tests" / "server" / "emacs" / "drive.el"
    completed = subprocess.run([emacs, "--batch", "-l", str(script)], env=env, cwd=tmp_path,
                               timeout=240, check=False, capture_output=True, text=True)
    assert out.exists(), f"Emacs wrote no result:\n{completed.stderr[-2000:]}"
    return json.loads(out.read_text())


@pytest.mark.parametrize("name", ["note.md", "note.txt"])
def test_emacs_eglot_diagnoses_hovers_fixes_and_honours_settings(emacs, tmp_path, name):
    note = tmp_path / name
    note.write_text(NOTE)
    result = drive(emacs, note, tmp_path)
    assert "error" not in result, result
    assert result["managed"] is True, result  # eglot started notelsp for the note
    by_code = {d["code"]: d for d in result["diagnostics"]}
    assert set(by_code) == {"wrong-shape", "wrong-hybridization"}, result
    shape = by_code["wrong-shape"]
    assert (shape["line"], shape["text"], shape["source"]) == (2, "trigonal planar", "notelsp")
    assert shape["href"] == rule_doc_url("wrong-shape")
    assert "ClF3" in result["hover"] and "T-shaped" in result["hover"]
    assert result["after_fix"] == NOTE.replace("trigonal planar", "T-shaped")
    assert result["fix_cleared"] is True  # the server saw eglot's change and dropped the finding
    assert result["before_settings"] is True
    assert result["settings_cleared"] is True  # eglot-workspace-configuration disabled the rule
    assert not result["final"]
