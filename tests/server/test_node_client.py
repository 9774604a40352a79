"""A second, independent client: Node.js with vscode-jsonrpc (tests/clients/node/drive.js).

It runs `python -m notelsp serve` over stdio exactly as an editor would and
prints what it received as JSON.  ClF3 -> t-shaped: standard VSEPR (3 bonds,
2 lone pairs), from memory.
"""

from __future__ import annotations

import json
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
CLIENT = ROOT / "tests" / "clients" / "node"
COMMAND = [sys.executable, "-m", "notelsp", "serve"]
NOTE = "# Fluorides\n\nChlorine trifluoride {ClF3: trigonal planar}.\n"
WRONG = "trigonal planar"
pytestmark = pytest.mark.client


@pytest.fixture(scope="module")
def node() -> str:
    found = shutil.which("node")
    if found is None:
        pytest.skip("node is not installed (the Node.js client needs Node 18+)")
    if not (CLIENT / "node_modules" / "vscode-jsonrpc").is_dir():
        pytest.skip("vscode-jsonrpc is not installed: run `npm install --no-audit --no-fund` in tests/clients/node "
                    "(`make test` does this when npm exists)")
    return found


def drive(node: str, note: Path) -> dict:
    finished = subprocess.run(
        [node, str(CLIENT / "drive.js"), json.dumps(COMMAND), str(note)],
        cwd=note.parent, capture_output=True, text=True, timeout=150, check=False,
    )
    assert finished.stdout.strip(), f"the Node client printed nothing; stderr: {finished.stderr}"
    return json.loads(finished.stdout.strip().splitlines()[-1])


def test_node_client_gets_diagnostics_hover_and_a_fix(node, tmp_path):
    note = tmp_path / "fluorides.md"
    note.write_text(NOTE, encoding="utf-8")
    result = drive(node, note)
    assert "error" not in result, result
    assert result["server"]["name"] == "notelsp"

    shape = [d for d in result["diagnostics"] if d["code"] == "wrong-shape"]
    assert shape, result["diagnostics"]
    line = NOTE.splitlines()[2]
    assert shape[0]["range"] == {
        "start": {"line": 2, "character": line.index(WRONG)},
        "end": {"line": 2, "character": line.index(WRONG) + len(WRONG)},
    }
    assert shape[0]["source"] == "notelsp"
    assert "T-shaped" in shape[0]["message"]

    hover = result["hover"]["contents"]
    assert hover["kind"] == "markdown"
    assert "ClF3" in hover["value"] and "T-shaped" in hover["value"]

    fixes = [a for a in result["actions"] if a.get("kind") == "quickfix"]
    assert fixes, result["actions"]
    edits = [e for changes in fixes[0]["edit"]["changes"].values() for e in changes]
    assert [e["newText"] for e in edits] == ["T-shaped"]
    assert edits[0]["range"] == shape[0]["range"]

    assert result["steps"][-1] == "exited"
    assert result["exit_code"] == 0
