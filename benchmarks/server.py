"""Figures through the real server over stdio: startup_s, edit_ms_p50/p95, hover_ratio_p50, rss_mb.

startup_s: process start -> initialize reply (median of a few fresh processes);
startup_floor_s is the same for the bare pygls server.
ready_s: process start -> the reply to the first request after initialize
(notelsp answers initialize before its server is built; this is when it is).
edit_ms: one-line edit in the middle of the note -> the publishDiagnostics for
that version, any pause for a burst of edits included.
hover_ratio_p50: median hover round trip on notelsp ÷ the same on a bare
pygls server answering a constant (bare_server.py, same transport).
first_publication_s / whole_publication_s: didOpen -> the first publication (partial, with
review-continues, when the review ran past the server's 200 ms budget) and -> the whole one;
first_diagnostics_right compares the whole one.
rss_mb: server resident memory once the note has been analysed
(rss_mb_after_edits: the same after the edits).
"""

from __future__ import annotations

import statistics
import sys
import tempfile
import time
from pathlib import Path

from lsp_client import StdioClient
from notebook import make_notebook

HERE = Path(__file__).resolve().parent
NOTELSP = [sys.executable, "-m", "notelsp.server"]
BARE = [sys.executable, str(HERE / "bare_server.py")]
STARTUPS = 5
EDITS = 40
HOVERS = 200


def _percentile(samples: list[float], fraction: float) -> float:
    ordered = sorted(samples)
    return ordered[min(len(ordered) - 1, round(fraction * (len(ordered) - 1)))]


def _open(client: StdioClient, uri: str, text: str) -> None:
    client.notify(
        "textDocument/didOpen",
        {"textDocument": {"uri": uri, "languageId": "markdown", "version": 1, "text": text}},
    )


def _is_whole(params) -> bool:
    """A publication of the whole review (not the part sent first when a review runs past its budget)."""
    return not any(d.get("code") == "review-continues" for d in params["diagnostics"])


def _diagnostics_for(client: StdioClient, uri: str, version: int, timeout: float = 120.0, whole: bool = True):
    return client.wait_notification(
        "textDocument/publishDiagnostics",
        lambda params: params["uri"] == uri and params.get("version") == version and (_is_whole(params) or not whole),
        timeout,
    )


def startup_s(root: Path, command: list[str] = NOTELSP) -> tuple[float, float]:
    """Medians of (process start -> initialize reply, process start -> reply to the next request)."""
    replies, ready = [], []
    for _ in range(STARTUPS):
        client = StdioClient(command, cwd=str(root))
        reply = client.initialize(root.as_uri())
        # a request both servers answer (notelsp with nothing: the note is not open)
        answered = client.request("textDocument/hover", {"textDocument": {"uri": (root / "closed.md").as_uri()},
                                                         "position": {"line": 0, "character": 0}})
        replies.append(reply.at - client.started)
        ready.append(answered.at - client.started)
        client.close()
    return statistics.median(replies), statistics.median(ready)


def _edit_line(text: str) -> tuple[int, str, str]:
    """A line near the middle holding an inline annotation, and its prose before the annotation."""
    lines = text.split("\n")
    middle = len(lines) // 2
    for number in range(middle, len(lines)):
        if " Checked {" in lines[number]:
            original = lines[number]
            head = original[: original.index(" Checked {")]
            return number, original, head
    raise RuntimeError("no inline annotation after the middle of the note")


def _hover_position(text: str) -> dict[str, int]:
    from notelsp.notation import scan
    from notelsp.positions import LineIndex

    index = LineIndex(text)
    middle = len(text) // 2
    annotation = next(a for a in scan(text, "markdown").annotations if a.span.start >= middle)
    line, column = index.line_col(annotation.span.start + 2)
    return {"line": line, "character": column}  # the note is BMP-only: code points equal UTF-16 units


def _hover_round_trip(client: StdioClient, params: dict) -> float:
    start = time.perf_counter()
    client.request("textDocument/hover", params)
    return time.perf_counter() - start


def _hover_samples(ours: StdioClient, bare: StdioClient, uri: str, position: dict[str, int]) -> tuple[list, list]:
    """Round trips on both servers, alternating, so both see the same load on a shared machine."""
    params = {"textDocument": {"uri": uri}, "position": position}
    for client in (ours, bare):
        _hover_round_trip(client, params)  # first hover: any lazy work out of the way
    samples: tuple[list, list] = ([], [])
    for _ in range(HOVERS):
        samples[0].append(_hover_round_trip(ours, params))
        samples[1].append(_hover_round_trip(bare, params))
    return samples


def measure() -> dict[str, str]:
    from notelsp.review.document import review_text

    text = make_notebook()
    expected = len(review_text(text, "markdown").findings)
    figures: dict[str, str] = {}
    with tempfile.TemporaryDirectory() as folder:
        root = Path(folder)
        path = root / "notebook.md"
        path.write_text(text, encoding="utf-8")
        uri = path.as_uri()
        startup, ready = startup_s(root)
        figures["startup_s"] = f"{startup:.2f}"
        figures["ready_s"] = f"{ready:.2f}"
        figures["startup_floor_s"] = f"{startup_s(root, BARE)[0]:.2f}"  # bare pygls: Python + pygls + lsprotocol

        client = StdioClient(NOTELSP, cwd=str(root))
        try:
            client.initialize(root.as_uri())
            _open(client, uri, text)
            opened = time.perf_counter()
            first_part = _diagnostics_for(client, uri, 1, whole=False)
            figures["first_publication_s"] = f"{first_part.at - opened:.2f}"
            figures["first_publication_partial"] = "no" if _is_whole(first_part.message["params"]) else "yes"
            first = first_part if _is_whole(first_part.message["params"]) else _diagnostics_for(client, uri, 1)
            figures["whole_publication_s"] = f"{first.at - opened:.2f}"
            published = len(first.message["params"]["diagnostics"])
            figures["first_diagnostics_right"] = "yes" if published == expected else f"no ({published} != {expected})"
            figures["rss_mb"] = f"{client.rss_mb():.0f}"

            number, original, head = _edit_line(text)
            latencies = []
            for version in range(2, EDITS + 2):
                # Every version is a new text (no whole-review cache hit); the claim alternates right/wrong.
                claim = "t-shaped" if version % 2 else "trigonal planar"
                new_line = f"{head} Checked {{ClF3: {claim}}} in run {version}."
                edit = {
                    "range": {"start": {"line": number, "character": 0}, "end": {"line": number + 1, "character": 0}},
                    "text": new_line + "\n",
                }
                sent = time.perf_counter()
                client.notify(
                    "textDocument/didChange",
                    {"textDocument": {"uri": uri, "version": version}, "contentChanges": [edit]},
                )
                latencies.append(_diagnostics_for(client, uri, version).at - sent)
            figures["edit_ms_p50"] = f"{_percentile(latencies, 0.50) * 1e3:.0f}"
            figures["edit_ms_p95"] = f"{_percentile(latencies, 0.95) * 1e3:.0f}"
            figures["rss_mb_after_edits"] = f"{client.rss_mb():.0f}"

            bare = StdioClient(BARE, cwd=str(root))
            try:
                bare.initialize(root.as_uri())
                _open(bare, uri, text)
                ours, floor = _hover_samples(client, bare, uri, _hover_position(text))
            finally:
                bare.close()
        finally:
            client.close()
        figures["hover_ms_p50"] = f"{statistics.median(ours) * 1e3:.2f}"
        figures["hover_floor_ms_p50"] = f"{statistics.median(floor) * 1e3:.2f}"
        figures["hover_ratio_p50"] = f"{statistics.median(ours) / statistics.median(floor):.2f}"
    return figures


def main() -> None:
    for name, value in measure().items():
        print(f"{name}: {value}")


if __name__ == "__main__":
    main()
