"""Every cache in notelsp has a size cap, and stays at it however much is put through it.

A server runs for days and every keystroke makes new annotation text: a cache
keyed by text, position or path that is never emptied holds every annotation
ever typed.  The inventory test finds every ``functools`` cache in the package,
so a new one without a cap fails here; the other tests fill each cache past its
cap and check its size.
"""

from __future__ import annotations

import functools
import importlib
import inspect
import pkgutil
from pathlib import Path

import pytest

import notelsp
from notelsp import elements, positions
from notelsp.chem import analysis, isomers, polyhedra
from notelsp.chem.model import Ligand
from notelsp.notation import markdown, markdown_blocks, scanner, transform
from notelsp.notation.model import Formula
from notelsp.review import describe, document, workspace
from notelsp.review.settings import Settings

# Caches whose keys come from a closed set inside notelsp, never from a note, a path or a client:
# they cannot grow past that set.
KEYED_BY_A_CLOSED_SET = {
    "notelsp.notation.model._fields_of": "one entry per model class",
}


def _all_function_caches() -> list[tuple[str, functools._lru_cache_wrapper]]:
    found = []
    for module_info in pkgutil.walk_packages(notelsp.__path__, "notelsp."):
        if module_info.name.endswith("__main__"):
            continue  # running it starts a program
        module = importlib.import_module(module_info.name)
        for name, value in vars(module).items():
            if isinstance(value, functools._lru_cache_wrapper) and value.__module__ == module.__name__:
                found.append((f"{module.__name__}.{name}", value))
    return found


def test_every_function_cache_has_a_cap():
    caches = _all_function_caches()
    assert len(caches) >= 15  # the walk reached the package (sanity: it found the known ones)
    uncapped = [
        name for name, cached in caches
        if cached.cache_parameters()["maxsize"] is None
        and inspect.signature(cached).parameters  # a function of no arguments holds one entry
        and name not in KEYED_BY_A_CLOSED_SET
    ]
    assert uncapped == []


def _fill(cached: functools._lru_cache_wrapper, call, extra: int = 50) -> None:
    """Call ``call(i)`` for more distinct ``i`` than the cache holds; its size must stay at the cap."""
    cap = cached.cache_parameters()["maxsize"]
    cached.cache_clear()
    try:
        for number in range(cap + extra):
            call(number)
        assert cached.cache_info().currsize == cap
    finally:
        cached.cache_clear()


def test_annotation_body_parses_stay_at_the_cap():
    # Bodies past MAX_BODY_CHARS are refused without the grammar: a cheap way to make many distinct entries.
    long_tail = "x" * (transform.MAX_BODY_CHARS + 1)
    _fill(transform.parse_body, lambda n: transform.parse_body(f"{n}{long_tail}"))


def test_segment_scans_stay_at_the_cap_in_segments_and_in_annotations_held():
    _fill(scanner._block_body, lambda n: scanner._block_body(f"# comment {n}"))
    scanner._inline_groups.cache_clear()
    try:
        for number in range(scanner._SEGMENT_CACHE_SIZE + 50):  # segments without annotations
            scanner._inline_groups(f"prose {number} without braces", ())
        assert len(scanner._segment_groups) == scanner._SEGMENT_CACHE_SIZE
        # Annotation-dense paragraphs: the parses they hold are capped, not only their count.
        dense = " ".join(["{ClF3: t-shaped}"] * 40)
        for number in range(scanner._SEGMENT_CACHE_ANNOTATIONS // 40 + 50):
            assert len(scanner._inline_groups(f"Run {number}: {dense}", ())) == 40
            held = sum(len(groups) for groups in scanner._segment_groups.values())
            assert held == scanner._segment_annotations <= scanner._SEGMENT_CACHE_ANNOTATIONS
        assert held > scanner._SEGMENT_CACHE_ANNOTATIONS - 40  # full, not emptied
        assert len(scanner._segment_groups) <= scanner._SEGMENT_CACHE_SIZE
    finally:
        scanner._inline_groups.cache_clear()
    assert scanner._segment_annotations == 0 and not scanner._segment_groups


def test_paragraph_pieces_and_fence_patterns_stay_at_the_cap():
    _fill(markdown_blocks._paragraph_pieces, lambda n: markdown_blocks._paragraph_pieces(f"line {n}", frozenset()))
    _fill(markdown_blocks._fence_closer, lambda n: markdown_blocks._fence_closer("`", n + 3))


def test_remembered_documents_stay_at_the_cap():
    memory = markdown.BlockMemory()
    for number in range(markdown._RECENT_LIMIT + 10):
        markdown.markdown_structure(f"# Note {number}\n\nText {{ClF3: t-shaped}} {number}\n", memory)
        assert len(memory) <= markdown._RECENT_LIMIT
    assert len(memory) == markdown._RECENT_LIMIT


def test_line_starts_and_line_indexes_stay_at_the_cap():
    from notelsp.server import positions as server_positions

    _fill(positions.lf_line_starts, lambda n: positions.lf_line_starts(f"line {n}\nnext\n"))
    _fill(server_positions.line_index, lambda n: server_positions.line_index(f"line {n}\nnext\n", "utf-16"))


def test_whole_reviews_and_file_patterns_stay_at_the_cap():
    memory = document.ReviewMemory()
    for n in range(document._FINISHED_LIMIT + 10):
        document.review_text(f"Note {n}: {{SF4: seesaw}}\n", "markdown", Settings(), memory=memory)
        assert len(memory.finished) <= document._FINISHED_LIMIT
    assert len(memory.finished) == document._FINISHED_LIMIT  # full, not emptied
    patterns = [value for name, value in vars(workspace).items() if isinstance(value, functools._lru_cache_wrapper)]
    assert patterns  # the files patterns' compiled forms
    for cached in patterns:
        (parameter,) = inspect.signature(cached).parameters
        _fill(cached, lambda n, cached=cached: cached(f"notes/{n}/*.md"))


def test_server_path_and_symbol_caches_stay_at_the_cap(tmp_path: Path):
    from notelsp.server import app, workspace_symbols

    root = tmp_path
    _fill(app._relative_path, lambda n: app._relative_path((root / f"note{n}.md").as_uri(), root))
    note = tmp_path / "species.md"
    note.write_text("{SF4: seesaw}\n", encoding="utf-8")
    _fill(workspace_symbols._species_in_file,
          lambda n: workspace_symbols._species_in_file(str(note), n, note.stat().st_size, "utf-16"), extra=5)


def test_rule_addresses_stay_at_the_cap():
    _fill(describe.rule_doc_url, lambda n: describe.rule_doc_url(f"no-such-rule-{n}"))


def test_polyhedra_are_one_entry_each():
    cached = polyhedra.polyhedron
    assert cached.cache_parameters()["maxsize"] == len(polyhedra.POLYHEDRA)
    for name in polyhedra.POLYHEDRA * 2:
        cached(name)
    with pytest.raises(Exception):
        cached("no-such-polyhedron")  # refused, and nothing kept for it
    assert cached.cache_info().currsize == len(polyhedra.POLYHEDRA)


def test_isomer_enumerations_stay_at_the_cap():
    fluorines = (Ligand("F", "F", 1, 3.98),) * 2  # Pauling electronegativity of F (mendeleev)
    # The centre's electronegativity is part of the key: distinct values make distinct entries.
    _fill(isomers._isomers, lambda n: isomers._isomers("linear", fluorines, 0, 1.0 + n / 10_000), extra=20)


def test_element_names_are_looked_up_without_a_cache_per_word():
    for number in range(2_000):
        assert elements.by_name(f"unobtainium{number}") is None  # words typed in claims: never kept
    assert elements.by_name("Fluorine").symbol == "F"
    assert elements._by_lower_name.cache_info().currsize == 1
    assert len(elements._by_lower_name()) == len(elements.table())


def _formula(text: str) -> Formula:
    parsed = transform.parse_body(text)
    assert not parsed.errors, parsed.errors
    return parsed.formulas[0]


def test_species_analyses_stay_at_the_cap(monkeypatch):
    monkeypatch.setattr(analysis, "_CACHE_LIMIT", 10)
    analysis._cache.clear()
    try:
        for carbons in range(1, 25):  # 24 distinct alkanes
            analysis.analyse(_formula(f"C{carbons}H{2 * carbons + 2}"))
            assert len(analysis._cache) <= 10
    finally:
        analysis._cache.clear()


def test_annotation_reviews_stay_at_the_cap_within_one_note_and_across_notes(monkeypatch):
    monkeypatch.setattr(document, "_REVIEWS_LIMIT", 20)
    memory = document.ReviewMemory()
    settings = Settings()
    # One note with more distinct annotations (each with a finding) than the cap.
    note = "".join(f"Run {n}: {{ClF3: trigonal planar, angle {90 + n}°}}\n\n" for n in range(50))
    document.review_text(note, "markdown", settings, memory=memory)
    relative, placed = memory.reviews[settings]
    assert 0 < len(relative) <= 20 and 0 < len(placed) <= 20
    for n in range(50):
        document.review_text(f"Edit {n}: {{SF4: tetrahedral, angle {100 + n}°}}\n", "markdown", settings, memory=memory)
        relative, placed = memory.reviews[settings]
        assert len(relative) <= 20 and len(placed) <= 20
    # More sets of settings than are kept.
    for n in range(document._SETTINGS_LIMIT + 5):
        document.review_text("{SF4: seesaw}", "markdown", Settings(disabled=frozenset({f"rule-{n}"})), memory=memory)
        assert len(memory.reviews) <= document._SETTINGS_LIMIT


def test_a_review_after_a_cache_was_emptied_is_the_same():
    note = "".join(f"Run {n}: {{ClF3: trigonal planar, angle {90 + n}°}}\n\n" for n in range(30))
    first = document.review_text(note, memory=document.ReviewMemory())
    for cached in (transform.parse_body, scanner._inline_groups, scanner._block_body, markdown_blocks._paragraph_pieces):
        cached.cache_clear()
    analysis._cache.clear()
    assert document.review_text(note, memory=document.ReviewMemory()).findings == first.findings
