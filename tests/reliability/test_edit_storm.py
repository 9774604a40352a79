"""Edit storm: a burst of incremental didChange edits over stdio; the final pushed diagnostics
equal those of a fresh ``notelsp check`` of the final text.

The bounded run sends its edits as fast as the pipe takes them; under
``make fuzz`` the storm is paced at 1,000 edits a second for 10 seconds.
Columns are checked independently of the server's own conversion (UTF-16 code
units by counting the encoded bytes; common practice, no source).
"""

from __future__ import annotations

import json
import random
import subprocess
import sys
import time
from pathlib import Path

from .scale import FUZZ, scaled, tried
from .stdio_wire import start_server

SEED_NOTE = (
    "# Storm\n"
    "The trifluoride {ClF3: trigonal planar} fumes; {NH₃: sp3, 1 lone pair} \N{TEST TUBE} is fine.\n"
    "```bonding\nXeF4: square planar, nonpolar\nSF4: tetrahedral\n```\n"
)
# What the storm types: annotation pieces, so the text keeps passing through near-valid notation.
TYPED = ["{", "}", ":", ",", " ", "\n", "ClF3", "PCl3F2", "SF4", "XeF4", "t-shaped", "bent", "sp3d", "polar",
         "F axial", "H-N-H 107°", "₃", "\N{TEST TUBE}", "氟", "é", "2 isomers", "```bonding\n", "```\n"]


def _position(text: str, offset: int) -> dict[str, int]:
    line_start = text.rfind("\n", 0, offset) + 1
    return {"line": text.count("\n", 0, offset), "character": len(text[line_start:offset].encode("utf-16-le")) // 2}


def _random_edit(rng: random.Random, text: str) -> tuple[int, int, str]:
    start = rng.randrange(len(text) + 1)
    if rng.random() < 0.35 and text:
        end = min(len(text), start + rng.randrange(1, 12))  # delete or replace a run
    else:
        end = start
    return start, end, rng.choice(TYPED) if rng.random() < 0.8 or start == end else ""


def _check_of(text: str, folder: Path) -> list[tuple[str, str, int, int, int, int]]:
    note = folder / "final.md"
    note.write_text(text, encoding="utf-8", newline="")
    run = subprocess.run([sys.executable, "-m", "notelsp", "check", "--format", "json", str(note)],
                         capture_output=True, text=True, timeout=120, cwd=folder)
    assert run.returncode in (0, 1), run.stderr
    (report,) = json.loads(run.stdout)["files"]
    return sorted((f["code"], f["message"], f["line"] - 1, f["column"] - 1, f["end_line"] - 1, f["end_column"] - 1)
                  for f in report["findings"])


def _code_points(text: str, line: int, units: int) -> int:
    """UTF-16 column -> code-point column on ``line`` of ``text``."""
    content = text.split("\n")[line]
    column, seen = 0, 0
    while seen < units:
        seen += 2 if ord(content[column]) > 0xFFFF else 1
        column += 1
    return column


def test_edit_storm_ends_with_the_diagnostics_of_a_fresh_check(tmp_path):
    rng = random.Random(20)  # fixed seed: the same storm every run
    server = start_server(cwd=str(tmp_path))
    try:
        server.initialize(root_uri=tmp_path.as_uri())
        uri = (tmp_path / "storm.md").as_uri()
        text, version = SEED_NOTE, 1
        server.notify("textDocument/didOpen", {"textDocument": {"uri": uri, "languageId": "markdown",
                                                                "version": version, "text": text}})
        edits = scaled(2_000, 10_000)
        pace = 1 / 1000 if FUZZ else 0.0  # 1,000 edits a second under make fuzz
        began = time.monotonic()
        for number in range(edits):
            start, end, typed = _random_edit(rng, text)
            change = {"range": {"start": _position(text, start), "end": _position(text, end)}, "text": typed}
            text = text[:start] + typed + text[end:]
            version += 1
            server.notify("textDocument/didChange", {"textDocument": {"uri": uri, "version": version},
                                                     "contentChanges": [change]})
            if pace and (lag := began + (number + 1) * pace - time.monotonic()) > 0:
                time.sleep(lag)
        # A last incremental edit puts known findings at the top, so the comparison is never of two empty lists.
        head = "{ClF3: trigonal planar} {PCl3F2: Cl axial}\n\n"
        start = {"line": 0, "character": 0}
        text, version = head + text, version + 1
        server.notify("textDocument/didChange", {"textDocument": {"uri": uri, "version": version},
                                                 "contentChanges": [{"range": {"start": start, "end": start},
                                                                     "text": head}]})
        tried("storm edits sent (incremental didChange)", edits + 1)
        final = server.wait(lambda m: m.get("method") == "textDocument/publishDiagnostics"
                            and m["params"].get("version") == version, timeout=120)
        stale = [m for m in server.drain() if m.get("method") == "textDocument/publishDiagnostics"
                 and (m["params"].get("version") or 0) > version]
        assert not stale
        pushed = sorted(
            (d["code"], d["message"], d["range"]["start"]["line"],
             _code_points(text, d["range"]["start"]["line"], d["range"]["start"]["character"]),
             d["range"]["end"]["line"], _code_points(text, d["range"]["end"]["line"], d["range"]["end"]["character"]))
            for d in final["params"]["diagnostics"]
        )
        assert pushed == _check_of(text, tmp_path)
        assert {"wrong-shape", "misplaced-ligand"} <= {finding[0] for finding in pushed}
        server.request("shutdown")
        server.notify("exit", None)
        assert server.process.wait(timeout=10) == 0
    finally:
        server.close()
