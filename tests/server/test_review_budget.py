"""A large note through the real server: the first publication comes within the review's time budget
(carrying review-continues where it stopped, or already everything), the last one is the whole review,
equal to what ``notelsp check`` finds; hover answers from the annotation under the cursor alone."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest_lsp
from lsprotocol import types
from pytest_lsp import ClientServerConfig, LanguageClient

from .lsp_harness import SERVER_COMMAND, file_uri, wait_for
from .test_session import open_note, start

# Every annotation distinct, so nothing is found in a cache: several seconds of first review on this
# machine, far past the 200 ms budget.  ClF3 is T-shaped (VSEPR, common practice, no source).
LARGE_NOTE = "# Runs\n\n" + "".join(
    f"Run {n}: {{ClF3: trigonal planar, angle {80 + n % 90}.{n // 90}°}} and {{SF4: seesaw, F-S-F {n % 170 + 5}°}}\n\n"
    for n in range(1_500)
)


class _EveryPublication(dict):
    """pytest-lsp keeps the last diagnostics per document; this keeps every publication as well."""

    def __init__(self) -> None:
        super().__init__()
        self.history: list[tuple[str, list[types.Diagnostic]]] = []

    def __setitem__(self, uri, diagnostics) -> None:
        self.history.append((uri, list(diagnostics)))
        super().__setitem__(uri, diagnostics)


def _checked(text: str, folder) -> list[tuple]:
    note = folder / "check.md"
    note.write_text(text, encoding="utf-8", newline="")
    run = subprocess.run([sys.executable, "-m", "notelsp", "check", "--format", "json", str(note)],
                         capture_output=True, text=True, timeout=300, cwd=folder)
    assert run.returncode in (0, 1), run.stderr
    (report,) = json.loads(run.stdout)["files"]
    return sorted((f["code"], f["message"], f["line"] - 1, f["column"] - 1, f["end_line"] - 1, f["end_column"] - 1)
                  for f in report["findings"])


def _published(diagnostics: list[types.Diagnostic]) -> list[tuple]:
    return sorted((d.code, d.message, d.range.start.line, d.range.start.character, d.range.end.line,
                   d.range.end.character) for d in diagnostics)  # ASCII note: UTF-16 units are code points


@pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER_COMMAND))
async def client(lsp_client: LanguageClient):
    yield
    await lsp_client.shutdown_session()


async def test_a_large_note_is_published_first_in_part_then_whole(client: LanguageClient, tmp_path):
    client.diagnostics = publications = _EveryPublication()
    await start(client, tmp_path)
    uri = file_uri(tmp_path / "runs.md")
    expected = _checked(LARGE_NOTE, tmp_path)
    open_note(client, uri, LARGE_NOTE)

    line = LARGE_NOTE.count("\n", 0, LARGE_NOTE.index("Run 1200:"))
    hover = await client.text_document_hover_async(
        types.HoverParams(text_document=types.TextDocumentIdentifier(uri), position=types.Position(line, 12)))
    assert hover is not None and "ClF3" in hover.contents.value

    await wait_for(lambda: [d for u, d in publications.history if u == uri and _published(d) == expected],
                   timeout=240)
    ours = [diagnostics for published_uri, diagnostics in publications.history if published_uri == uri]
    first, last = ours[0], ours[-1]
    assert _published(last) == expected
    assert "review-continues" not in {d.code for d in last}
    if len(ours) > 1:  # cut by the budget: the part before the mark is exactly the whole review's start
        (mark,) = [d for d in first if d.code == "review-continues"]
        assert mark.severity == types.DiagnosticSeverity.Information
        stop = (mark.range.start.line, mark.range.start.character)
        assert mark.range.start.character == 0
        before = [d for d in _published(first) if d[0] != "review-continues"]
        assert before == [d for d in expected if (d[2], d[3]) < stop]
        assert len(ours) == 2  # nothing else in between: the rest is published once, whole
    else:  # a machine fast enough to review it all within the budget
        assert _published(first) == expected
    assert {"wrong-shape"} <= {d[0] for d in expected}
