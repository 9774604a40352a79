"""Soak figures through the real server over stdio: soak_rss_growth_pct and the RSS around it.

20,000 edits of one line of a small note, each typing three annotation texts never seen before
(60,000 in all), every version reviewed and published before the next edit.  The server's resident
memory (VmRSS) is sampled every 100 edits; the figure is the highest sample after the warm-up (the
first 12,000 edits, by when every cache is full) against the highest in the last tenth of the
warm-up.  tests/reliability/test_soak.py holds the same session to under 10 %.
"""

from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

from lsp_client import StdioClient

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))  # the session the soak test drives
from tests.reliability.soak_notes import EDITED_LINE, SEED, new_annotation  # noqa: E402

NOTELSP = [sys.executable, "-m", "notelsp.server"]
EDITS = 20_000
PER_EDIT = 3
WARM_UP = 12_000
def measure() -> dict[str, str]:
    with tempfile.TemporaryDirectory() as folder:
        root = Path(folder)
        uri = (root / "day.md").as_uri()
        client = StdioClient(NOTELSP, cwd=folder)
        try:
            client.initialize(root.as_uri())
            client.notify("textDocument/didOpen",
                          {"textDocument": {"uri": uri, "languageId": "markdown", "version": 1, "text": SEED}})
            client.wait_notification("textDocument/publishDiagnostics", lambda p: p.get("version") == 1)
            line = {"start": {"line": EDITED_LINE, "character": 0}, "end": {"line": EDITED_LINE + 1, "character": 0}}
            samples: list[tuple[int, float]] = []
            began = time.perf_counter()
            for edit in range(EDITS):
                typed = " and ".join(new_annotation(edit * PER_EDIT + k) for k in range(PER_EDIT))
                client.notify("textDocument/didChange", {"textDocument": {"uri": uri, "version": edit + 2},
                                                         "contentChanges": [{"range": line, "text": f"Run {edit}: {typed}\n"}]})
                client.wait_notification("textDocument/publishDiagnostics", lambda p, v=edit + 2: p.get("version") == v)
                if edit % 100 == 99:
                    samples.append((edit + 1, client.rss_mb()))
            seconds = time.perf_counter() - began
        finally:
            client.close()
    baseline = max(rss for done, rss in samples if WARM_UP * 0.9 < done <= WARM_UP)
    highest = max(rss for done, rss in samples if done > WARM_UP)
    return {
        "soak_edits": f"{EDITS:,} ({EDITS * PER_EDIT:,} new annotation texts, {seconds:.0f} s)",
        "soak_rss_mb_start": f"{samples[0][1]:.0f}",
        "soak_rss_mb_after_warm_up": f"{baseline:.0f}",
        "soak_rss_mb_highest_after": f"{highest:.0f}",
        "soak_rss_growth_pct": f"{(highest / baseline - 1) * 100:.1f}",
    }


def main() -> None:
    for name, value in measure().items():
        print(f"{name}: {value}")


if __name__ == "__main__":
    main()
