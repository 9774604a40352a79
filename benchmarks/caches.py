"""Empty notelsp's result caches, so a benchmark measures work rather than look-ups.

``clear_result_caches`` empties all of them (a fresh analysis host, :func:`host`,
and the pure functions' memo); ``clear_document_caches`` only the ones about
whole documents (see there).

What a process pays once (element data, the grammar's parser, the Markdown
parser object, per-class field tables) is kept: the figures exclude a cold
process.  Every cache of results (parses, line scans, placed findings,
species analyses, isomers, polyhedra, remembered documents) is emptied.
"""

from __future__ import annotations

import sys

_hosts: list = []  # the benchmark's analysis host; a fresh one when results are cleared


def host():
    """The analysis host a benchmark reviews with (what an editor session or a check would use)."""
    if not _hosts:
        from notelsp.review.host import AnalysisHost

        _hosts.append(AnalysisHost())
    return _hosts[0]

PROCESS_SETUP = {
    ("notelsp.elements", "_by_lower_name"),
    ("notelsp.notation.grammar", "parser"),
    ("notelsp.notation.markdown", "_markdown"),
    ("notelsp.notation.model", "_fields_of"),
    ("notelsp.review.document", "_chemistry"),
}


def clear_result_caches() -> int:
    """Empty every result cache in the loaded notelsp modules; the number emptied."""
    emptied = 0
    for name, module in list(sys.modules.items()):
        if not name.startswith("notelsp"):
            continue
        for attribute, value in list(vars(module).items()):
            if (name, attribute) in PROCESS_SETUP or getattr(value, "__module__", None) != name:
                continue
            if callable(getattr(value, "cache_clear", None)):
                value.cache_clear()
                emptied += 1
    from notelsp.chem import analysis

    with analysis._cache_lock:
        analysis._cache.clear()
    _hosts.clear()  # findings per annotation text and at their places, remembered documents: a fresh host
    return emptied + 2


def clear_document_caches() -> None:
    """Empty only what is remembered about whole documents.

    Kept: the caches keyed by text alone (a body's parse, a paragraph's pieces
    and skipped ranges, a segment's annotation groups, a species' analysis, an
    annotation text's findings), which a process fills once per distinct text.
    What remains to do is the whole scan of the document's block structure, every
    annotation's offsets and the placing of every finding: a check of a note whose
    paragraphs were met before (none of them at its place).
    """
    from notelsp import positions

    positions.lf_line_starts.cache_clear()  # keyed by the whole text
    host().memory.forget_placed()  # findings at their offsets, complete reviews, remembered documents
