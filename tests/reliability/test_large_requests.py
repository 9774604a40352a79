"""Requests over a whole large note stay bounded: code actions and document symbols are capped, with a note.

Work is counted (annotation objects made, actions and symbols returned), never
timed.  The range lookup is compared with the plain definition: every
annotation whose span touches the range, ends included (LSP ranges).
"""

from __future__ import annotations

import random

from notelsp.notation.model import Span
from notelsp.review.document import review_text
from notelsp.review.settings import Settings
from notelsp.server.app import HeldDocument
from notelsp.server.code_actions import MAX_CODE_ACTIONS, annotations_touching
from notelsp.server.positions import line_index
from notelsp.server.symbols import MAX_DOCUMENT_SYMBOLS, document_symbols

from .in_process import notification, request, serve, start
from .scale import scaled, tried

LINE = "{ClF3: trigonal planar} and {H2O: bent}, {NH3: t-shaped}.\n"  # two findings with fixes per line
SYMBOL_KIND_NULL = 21  # LSP 3.17 SymbolKind.Null (from memory)


def _held(text: str) -> HeldDocument:
    return HeldDocument("file:///large.md", 1, text, line_index(text), review_text(text, "markdown", Settings()))


def test_whole_note_requests_are_capped_with_a_note():
    lines = scaled(7_000, 34_000)  # 21,000 / 102,000 annotations
    uri = "file:///reliability/large.md"
    whole = {"start": {"line": 0, "character": 0}, "end": {"line": lines + 1, "character": 0}}
    server, sent = serve(start() + [
        notification("textDocument/didOpen", {"textDocument": {"uri": uri, "languageId": "markdown", "version": 1,
                                                               "text": LINE * lines}}),
        request(2, "textDocument/codeAction", {"textDocument": {"uri": uri}, "range": whole,
                                               "context": {"diagnostics": []}}),
        request(3, "textDocument/documentSymbol", {"textDocument": {"uri": uri}}),
    ])
    tried("annotations in notes asked for whole-note code actions and symbols", lines * 3)
    (actions,) = [m["result"] for m in sent if m.get("id") == 2]
    (symbols,) = [m["result"] for m in sent if m.get("id") == 3]
    assert len(actions) == MAX_CODE_ACTIONS  # the client shows no disabled actions: the note is a log message
    assert [m for m in sent if m.get("method") == "window/logMessage"
            and f"only the first {MAX_CODE_ACTIONS} code actions" in m["params"]["message"]]
    assert len(symbols) == MAX_DOCUMENT_SYMBOLS + 1 and symbols[-1]["kind"] == SYMBOL_KIND_NULL
    assert [s["name"] for s in symbols[:3]] == ["ClF3", "H2O", "NH3"]
    # the note of the cut is placed at the first species left out: line 333, its second annotation
    assert symbols[-1]["range"]["start"] == {"line": MAX_DOCUMENT_SYMBOLS // 3, "character": LINE.index("{H2O")}


def test_a_small_range_makes_only_the_annotations_it_touches():
    held = _held(LINE * 5_000)
    wanted = Span(held.text.index("{H2O", 40_000), held.text.index("{H2O", 40_000) + 3)
    touching = list(annotations_touching(held.review, wanted))
    assert [a.formulas[0].text for a in touching] == ["H2O"]
    assert len(held.review.scanned._made) <= 2  # not the 15,000 of the note
    tried("range lookups compared with the plain definition")


def test_range_lookup_agrees_with_the_plain_definition():
    text = "".join(random.Random(3).choice([LINE, "plain text\n", "{PCl5}{SF4: seesaw}\n", "\n"]) for _ in range(400))
    held = _held(text)
    every = held.review.annotations
    rng = random.Random(11)
    count = scaled(300, 3_000)
    for _ in range(count):
        start = rng.randrange(len(text) + 1)
        wanted = Span(start, min(len(text), start + rng.choice([0, 1, 5, 60, 2_000])))
        expected = [a for a in every if a.span.start <= wanted.end and wanted.start <= a.span.end]
        assert list(annotations_touching(held.review, wanted)) == expected
    tried("range lookups compared with the plain definition", count)


def test_symbols_below_the_cap_are_all_listed():
    held = _held(LINE * 10)
    symbols = document_symbols(held)
    assert [s.name for s in symbols] == ["ClF3", "H2O", "NH3"] * 10
