"""The grammar's parser cache: used when it is verifiably this grammar's, ignored (never a crash) otherwise."""

from __future__ import annotations

import os
import pickle

import pytest
from lark import Lark

from notelsp.notation import grammar

# Formulas and claims from the README's notation section; lark's own in-memory parser is the reference.
SAMPLES = (("formula_spec", "ClF3"), ("formula_spec", "SO4^2-"), ("formula_spec", "HOCl @O"),
           ("claim", "T-shaped"), ("claim", "sp3d2"), ("claim", "trigonal bipyramidal"),
           ("formula_spec", "CH2=CH2"), ("formula_spec", 'smiles "CC(=O)O"'), ("claim", "C2 trigonal planar"),
           ("claim", "O=C-O 123°"))


class _Marker:
    """Unpickling this creates a folder: proof that a file was unpickled."""

    def __init__(self, path):
        self.path = str(path)

    def __reduce__(self):
        return (os.mkdir, (self.path,))


@pytest.fixture
def cache_home(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    grammar.parser.cache_clear()
    yield tmp_path / "cache" / grammar.CACHE_FOLDER_NAME
    grammar.parser.cache_clear()


def _reference() -> Lark:
    return Lark(grammar.grammar_text(), **grammar.PARSER_OPTIONS)


def _cache_file(folder):
    (path,) = folder.glob(f"{grammar.CACHE_PREFIX}*{grammar.CACHE_SUFFIX}")
    return path


def _fingerprint() -> str:
    return grammar.grammar_fingerprint(grammar.grammar_text())


def _parses(parser: Lark) -> list:
    return [parser.parse(text, start=start) for start, text in SAMPLES]


def test_the_first_process_writes_the_cache_and_later_ones_load_it(cache_home):
    built = grammar.parser()
    path = _cache_file(cache_home)
    loaded = grammar.load_cached_parser(path, _fingerprint())
    assert loaded is not None and loaded is not built
    assert _parses(loaded) == _parses(_reference()) == _parses(built)


def test_a_corrupted_cache_file_is_ignored_and_replaced(cache_home):
    grammar.parser()
    path = _cache_file(cache_home)
    whole = path.read_bytes()
    header_end = whole.index(b"\n") + 1
    for broken in (whole[: header_end + 100], whole[:header_end] + b"\x80\x05not a pickle at all", b"", b"\n\n"):
        path.write_bytes(broken)
        assert grammar.load_cached_parser(path, _fingerprint()) is None
        grammar.parser.cache_clear()
        assert _parses(grammar.parser()) == _parses(_reference())
        assert grammar.load_cached_parser(_cache_file(cache_home), _fingerprint()) is not None  # rewritten


def test_a_foreign_cache_file_is_never_unpickled(cache_home, tmp_path):
    grammar.parser()
    path = _cache_file(cache_home)
    marker = tmp_path / "unpickled"
    payload = pickle.dumps(_Marker(marker))
    header = grammar.CACHE_MAGIC + _fingerprint().encode("ascii") + b"\n"
    for foreign in (
        payload,  # no header at all (say, lark's own cache format)
        grammar.CACHE_MAGIC + b"0" * 64 + b"\n" + payload,  # another grammar's fingerprint
        header.replace(b"-1 ", b"-0 ") + payload,  # another cache format
    ):
        path.write_bytes(foreign)
        assert grammar.load_cached_parser(path, _fingerprint()) is None
        assert not marker.exists()
    # The right header, but a file others may write: not trusted either.
    path.write_bytes(header + payload)
    path.chmod(0o666)
    assert grammar.load_cached_parser(path, _fingerprint()) is None
    assert not marker.exists()
    grammar.parser.cache_clear()
    assert _parses(grammar.parser()) == _parses(_reference())


def test_an_unwritable_cache_folder_means_building_in_memory(tmp_path, monkeypatch):
    blocker = tmp_path / "a-file"
    blocker.write_text("not a folder")
    monkeypatch.setenv("XDG_CACHE_HOME", str(blocker))  # ~/.cache/notelsp cannot be made below a file
    grammar.parser.cache_clear()
    try:
        assert _parses(grammar.parser()) == _parses(_reference())
    finally:
        grammar.parser.cache_clear()
    assert blocker.read_text() == "not a folder"


def test_a_changed_grammar_has_another_fingerprint():
    text = grammar.grammar_text()
    assert grammar.grammar_fingerprint(text) != grammar.grammar_fingerprint(text + "\n// edited\n")


def test_a_relative_xdg_cache_home_is_ignored(monkeypatch, tmp_path):
    # The XDG base directory specification: relative paths are invalid and should be ignored.
    monkeypatch.setenv("XDG_CACHE_HOME", "relative/cache")
    monkeypatch.setenv("HOME", str(tmp_path))
    assert grammar.cache_folder() == tmp_path / ".cache" / grammar.CACHE_FOLDER_NAME
