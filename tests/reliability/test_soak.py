"""Soak: a long session of edits through the real server over stdio, every edit typing annotation
texts never seen before (the server's situation over a long day of note-taking), with the server's
resident memory (VmRSS from /proc/<pid>/status) sampled as it goes.

Every cache in notelsp is capped (tests/review/test_caches.py); this checks that nothing else keeps
each annotation: once the caches are full (the warm-up), memory stays flat (growth under 10 %).
The CI run types twelve new annotations per edit, so that its 5,000 edits fill the caches (the
largest holds 32,768 annotations) within the first 3,000; under NOTELSP_FUZZ, 200,000 edits of one
each, 50,000 of them warm-up.
"""

from __future__ import annotations

import sys

import pytest

from .scale import scaled, tried
from .soak_notes import EDITED_LINE, SEED, new_annotation
from .stdio_wire import start_server

pytestmark = pytest.mark.skipif(not sys.platform.startswith("linux"), reason="reads /proc/<pid>/status")

def rss_kib(pid: int) -> int:
    with open(f"/proc/{pid}/status", encoding="ascii") as status:
        for line in status:
            if line.startswith("VmRSS:"):
                return int(line.split()[1])
    raise AssertionError("no VmRSS line")


@pytest.mark.slow  # about a minute on a quiet 2-core machine; 15-20 minutes under NOTELSP_FUZZ
@pytest.mark.timeout(scaled(900, 7_200))
def test_memory_stays_flat_over_a_long_session_of_new_annotations(tmp_path):
    edits, per_edit, warm_up = scaled(5_000, 200_000), scaled(12, 1), scaled(3_000, 50_000)
    server = start_server(cwd=str(tmp_path))
    try:
        server.initialize(root_uri=tmp_path.as_uri())
        uri = (tmp_path / "day.md").as_uri()
        server.notify("textDocument/didOpen", {"textDocument": {"uri": uri, "languageId": "markdown",
                                                                "version": 1, "text": SEED}})
        published = lambda version: lambda m: (m.get("method") == "textDocument/publishDiagnostics"  # noqa: E731
                                               and m["params"].get("version") == version)
        server.wait(published(1), timeout=60)
        samples: list[tuple[int, int]] = []
        whole_line = {"start": {"line": EDITED_LINE, "character": 0}, "end": {"line": EDITED_LINE + 1, "character": 0}}
        for edit in range(edits):
            typed = " and ".join(new_annotation(edit * per_edit + k) for k in range(per_edit))
            version = edit + 2
            server.notify("textDocument/didChange", {"textDocument": {"uri": uri, "version": version},
                                                     "contentChanges": [{"range": whole_line,
                                                                         "text": f"Run {edit}: {typed}\n"}]})
            server.wait(published(version), timeout=60)  # every version reviewed: no burst merges them
            server.seen.clear()
            if edit % 100 == 99:
                samples.append((edit + 1, rss_kib(server.process.pid)))
        tried("soak edits, each typing new annotation texts (RSS flat after warm-up)", edits)
        tried("soak: new annotation texts typed", edits * per_edit)
        after_warm_up = [rss for done, rss in samples if done > warm_up]
        # The highest sample near the end of the warm-up against the highest after it.
        baseline = max(rss for done, rss in samples if warm_up * 0.9 < done <= warm_up)
        growth = max(after_warm_up) / baseline - 1
        print(f"soak: {edits:,} edits, RSS {baseline / 1024:.0f} MB after warm-up, "
              f"highest {max(after_warm_up) / 1024:.0f} MB after ({growth:+.1%})")
        assert growth < 0.10, samples
        server.request("shutdown")
        server.notify("exit", None)
        assert server.process.wait(timeout=10) == 0
    finally:
        server.close()
