"""The report cache (notelsp/report_cache.py): a note unchanged since its report was kept is not reviewed again,
and the report is the same, byte for byte, as a review would write.

The reference for every comparison is the same check run without the cache (``--review-all``, or the
first run before anything was kept). Each test has a cache folder of its own (NOTELSP_CACHE_DIR in a
temporary folder), never the user's. The shapes the notes claim are the usual VSEPR ones (ClF3 T-shaped,
H2O bent; common practice, no source).
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from dataclasses import replace
from pathlib import Path

import pytest

from notelsp import cli, report_cache
from notelsp.user_cache import file_stamps
from notelsp.cli import main
from notelsp.review.settings import Settings

NOTE_A = "# Run 7\n\nThe trifluoride {ClF3: trigonal planar} and water {H2O: bent, 2 lone pairs}.\n"
NOTE_B = "Water {H2O: linear} and ammonia {NH3: trigonal pyramidal}.\n"
CELLS = ["First {ClF3: T-shaped}.\n", "Second {H2O: linear}.\n", "Third {XeF2: bent}.\n"]


def _notebook(cells: list[str]) -> str:
    listed = [{"cell_type": "markdown", "metadata": {}, "source": text} for text in cells]
    listed.insert(1, {"cell_type": "code", "metadata": {}, "source": "x = 1", "outputs": [], "execution_count": None})
    return json.dumps({"nbformat": 4, "nbformat_minor": 5, "metadata": {}, "cells": listed})


@pytest.fixture
def repo(tmp_path: Path, monkeypatch) -> Path:
    """Notes of each kind, checked from their folder with a cache folder of the test's own."""
    notes = tmp_path / "notes"
    notes.mkdir()
    (notes / "a.md").write_text(NOTE_A, encoding="utf-8")
    (notes / "b.txt").write_text(NOTE_B, encoding="utf-8")
    (notes / "cells.ipynb").write_text(_notebook(CELLS), encoding="utf-8")
    monkeypatch.chdir(tmp_path)
    monkeypatch.setenv("NOTELSP_CACHE_DIR", str(tmp_path / "cache"))
    monkeypatch.delenv(report_cache.SWITCH_VARIABLE, raising=False)
    monkeypatch.setenv(cli.COMPUTE_VARIABLE, "off")
    monkeypatch.setenv(cli.WORKERS_VARIABLE, "1")
    return notes


@pytest.fixture
def reviews(monkeypatch) -> list[str]:
    """The name of every note (or cell) the run reviews."""
    seen: list[str] = []
    reviewed = cli._reviewed

    def counted(name, *args):
        seen.append(name)
        return reviewed(name, *args)

    monkeypatch.setattr(cli, "_reviewed", counted)
    return seen


def _check(capsys, *args: str) -> tuple[int, str, str]:
    status = main(["check", *args])
    out, err = capsys.readouterr()
    return status, out, err


def _entries(tmp_path: Path) -> list[Path]:
    return sorted((tmp_path / "cache" / "reports").glob("*.json"))


@pytest.mark.parametrize("output", ["text", "json", "sarif"])
def test_a_second_run_writes_the_same_report_and_reviews_nothing(output, repo, tmp_path, capsys, monkeypatch):
    first = _check(capsys, "notes", "--format", output)
    assert first[0] == 1 and "wrong-shape" in first[1]  # ClF3 is T-shaped, not trigonal planar
    assert len(_entries(tmp_path)) == 3  # one per note, the notebook's cells together

    def no_review(*_):
        raise AssertionError("a kept note was reviewed again")

    monkeypatch.setattr(cli, "_reviewed", no_review)
    monkeypatch.setattr(cli, "_species_named", no_review)
    assert _check(capsys, "notes", "--format", output) == first


@pytest.mark.parametrize("output", ["text", "json", "sarif"])
def test_the_kept_report_is_the_report_of_a_run_without_the_cache(output, repo, capsys, reviews):
    _check(capsys, "notes", "--format", output)
    kept = _check(capsys, "notes", "--format", output)
    fresh = _check(capsys, "notes", "--format", output, "--review-all")
    assert kept == fresh
    assert len(reviews) == 2 * (2 + len(CELLS))  # the first run and --review-all; the second reviewed nothing


def test_review_all_neither_reads_nor_keeps(repo, tmp_path, capsys, reviews):
    _check(capsys, "notes", "--review-all")
    assert not (tmp_path / "cache" / "reports").exists()
    _check(capsys, "notes")
    entries = {entry: entry.read_bytes() for entry in _entries(tmp_path)}
    for entry in entries:
        entry.write_bytes(b"{}")  # were they read, the run would write them again
    _check(capsys, "notes", "--review-all")
    assert len(reviews) == 3 * (2 + len(CELLS)) and all(entry.read_bytes() == b"{}" for entry in entries)


def test_the_switch_turns_it_off(repo, tmp_path, capsys, reviews, monkeypatch):
    monkeypatch.setenv(report_cache.SWITCH_VARIABLE, "off")
    _check(capsys, "notes")
    _check(capsys, "notes")
    assert len(reviews) == 2 * (2 + len(CELLS)) and not (tmp_path / "cache" / "reports").exists()


def test_a_notebooks_cells_come_back_in_order(repo, capsys, reviews):
    first = _check(capsys, "notes/cells.ipynb", "--format", "json")
    second = _check(capsys, "notes/cells.ipynb", "--format", "json")
    assert second == first and len(reviews) == len(CELLS)
    (reported,) = json.loads(second[1])["files"]
    # cells are counted among all cells, the code cell second: H2O is bent (cell 3), XeF2 linear (cell 4)
    assert [finding["cell"] for finding in reported["findings"]] == [3, 4]


# --- what the key holds ----------------------------------------------------------------------


def _changed_text(notes: Path, _monkeypatch) -> list[str]:
    (notes / "a.md").write_text(NOTE_A.replace("trigonal planar", "T-shaped"), encoding="utf-8")
    return []


def _changed_by_one_character(notes: Path, _monkeypatch) -> list[str]:
    (notes / "a.md").write_text(NOTE_A + " ", encoding="utf-8")
    return []


def _settings_file(notes: Path, _monkeypatch) -> list[str]:
    (notes / ".notelsp.toml").write_text('[review]\ndisabled = ["wrong-shape"]\n', encoding="utf-8")
    return []


def _settings_severity(notes: Path, _monkeypatch) -> list[str]:
    (notes / ".notelsp.toml").write_text('[review]\nseverity = { wrong-shape = "warning" }\n', encoding="utf-8")
    return []


def _code_changed(_notes: Path, monkeypatch) -> list[str]:
    monkeypatch.setattr(report_cache, "code_fingerprint", lambda: "0" * 64)
    return []


def _cautions_left_out(_notes: Path, _monkeypatch) -> list[str]:
    return ["--cautions", "none"]


@pytest.mark.parametrize("change", [_changed_text, _changed_by_one_character, _settings_file, _settings_severity,
                                    _code_changed, _cautions_left_out])
def test_any_change_the_report_depends_on_is_a_miss(change, repo, capsys, reviews, monkeypatch):
    _check(capsys, "notes/a.md")
    more = change(repo, monkeypatch)
    after = _check(capsys, "notes/a.md", *more)
    assert reviews == ["notes/a.md", "notes/a.md"]
    fresh = _check(capsys, "notes/a.md", *more, "--review-all")
    assert after == fresh


def test_rules_only_and_computing_are_kept_apart(repo, capsys, reviews, monkeypatch):
    _check(capsys, "--rules-only", "notes/a.md")
    monkeypatch.delenv(cli.COMPUTE_VARIABLE)
    monkeypatch.setattr(cli, "_computed_for", lambda wanted, hit=False: {})  # computing, with nothing computed
    _check(capsys, "notes/a.md")
    assert reviews == ["notes/a.md", "notes/a.md"]
    _check(capsys, "notes/a.md")  # now kept for computing too
    _check(capsys, "--rules-only", "notes/a.md")
    assert len(reviews) == 2


def test_the_settings_key_holds_every_field_in_one_canonical_form():
    from notelsp.review.findings import Severity

    one = Settings(disabled=frozenset(["wrong-shape", "wrong-angle"]), severities=(("wrong-shape", Severity.HINT),))
    two = Settings(disabled=frozenset(["wrong-angle", "wrong-shape"]), severities=(("wrong-shape", Severity.HINT),))
    assert report_cache._settings_key(one) == report_cache._settings_key(two)
    written = json.loads(report_cache._settings_key(one))
    assert [name for name, _ in written] == list(Settings.__dataclass_fields__)
    assert dict(written)["disabled"] == ["wrong-angle", "wrong-shape"]
    assert dict(written)["severities"] == [["wrong-shape", "hint"]]
    for field in Settings.__dataclass_fields__:  # each field changes the key
        value = getattr(one, field)
        other = {bool: lambda v: not v, float: lambda v: v + 1, tuple: lambda v: v + ("x",),
                 frozenset: lambda v: v | {"z"}}[type(value)](value)
        assert report_cache._settings_key(replace(one, **{field: other})) != report_cache._settings_key(one), field


def test_the_code_fingerprint_follows_every_file_of_the_package(tmp_path, monkeypatch):
    package = Path(report_cache.__file__).resolve().parent
    before = report_cache.code_fingerprint()
    report_cache.code_fingerprint.cache_clear()
    file_stamps.cache_clear()  # the walk is kept per process too
    demo = package / "demo" / "notebook.md"  # a data file, not code: the walk takes every file all the same
    status = demo.stat()
    try:
        os.utime(demo, ns=(status.st_atime_ns, status.st_mtime_ns + 1))
        assert report_cache.code_fingerprint() != before
    finally:
        os.utime(demo, ns=(status.st_atime_ns, status.st_mtime_ns))
        report_cache.code_fingerprint.cache_clear()
        file_stamps.cache_clear()
    assert report_cache.code_fingerprint() == before


def test_standard_input_is_not_kept(repo, tmp_path, capsys, reviews, monkeypatch):
    import io

    for _ in range(2):
        monkeypatch.setattr(cli, "_stdin_read", [])
        monkeypatch.setattr(sys, "stdin", io.TextIOWrapper(io.BytesIO(NOTE_A.encode())))
        status, out, _ = _check(capsys, "-")
        assert status == 1 and "wrong-shape" in out
    assert reviews == ["<stdin>", "<stdin>"] and _entries(tmp_path) == []


def test_a_note_edited_between_lookup_and_review_is_not_kept(tmp_path):
    cache = report_cache.ReportCache(tmp_path, True, False)
    remembered = cache.remembered("a.md", "markdown", NOTE_A, Settings(), False)
    assert not remembered.keep(NOTE_A + "edited", [])
    assert list(tmp_path.iterdir()) == []


# --- hostile or damaged entries --------------------------------------------------------------


def _rewrite(path: Path, change) -> None:
    payload = json.loads(path.read_text(encoding="utf-8"))
    change(payload)
    path.write_text(json.dumps(payload), encoding="utf-8")


def _set(field: str, value):
    return lambda d: d["files"][0].__setitem__(field, value)


def _first(field: str, value):
    return lambda d: d["files"][0][field].__setitem__(0, value)


DAMAGE = {
    "not JSON": lambda p: p.write_bytes(b"{\"format\": 1, \"key\": "),
    "not UTF-8": lambda p: p.write_bytes(b"\xff\xfe"),
    "empty": lambda p: p.write_bytes(b""),
    "nested deep": lambda p: p.write_text("[" * 100_000 + "]" * 100_000),
    "too large": lambda p: p.write_bytes(b" " * (report_cache.MAX_ENTRY_BYTES + 1)),
    "unknown severity": lambda p: _rewrite(p, _first("severities", "fatal")),
    "a severity that is a list": lambda p: _rewrite(p, _first("severities", ["error"])),
    "a count as text": lambda p: _rewrite(p, _set("annotations", "2")),
    "a negative count": lambda p: _rewrite(p, _set("annotations", -1)),
    "a bool for a line": lambda p: _rewrite(p, _first("regions", True)),
    "a line as text": lambda p: _rewrite(p, _first("regions", "3")),
    "a line of 0": lambda p: _rewrite(p, _first("regions", 0)),
    "a region backwards": lambda p: _rewrite(p, _set("regions", [3, 9, 3, 2])),
    "another path": lambda p: _rewrite(p, _set("path", "notes/other.md")),
    "another key": lambda p: _rewrite(p, lambda d: d.__setitem__("key", "0" * 64)),
    "another format": lambda p: _rewrite(p, lambda d: d.__setitem__("format", 99)),
    "an extra field": lambda p: _rewrite(p, lambda d: d.__setitem__("run", "rm -rf /")),
    "a field missing": lambda p: _rewrite(p, lambda d: d["files"][0].pop("claims")),
    "a column cut short": lambda p: _rewrite(p, lambda d: d["files"][0]["codes"].pop()),
    "a message that is a number": lambda p: _rewrite(p, _first("messages", 7)),
    "a rule code not kebab-case": lambda p: _rewrite(p, _first("codes", "Wrong Shape")),
    "fix counts not adding up": lambda p: _rewrite(p, _first("fix_counts", 2)),
    "an annotation's text not asked for": lambda p: _rewrite(p, _first("annotation_texts", "{ClF3: T-shaped}")),
    "no files": lambda p: _rewrite(p, lambda d: d.__setitem__("files", [])),
    "two files for a note": lambda p: _rewrite(p, lambda d: d["files"].append(d["files"][0])),
    "a cell in a note": lambda p: _rewrite(p, _set("cell", 1)),
    "cautions as an object": lambda p: _rewrite(p, _set("cautions", {"a": "b"})),
    "cautions not in pairs": lambda p: _rewrite(p, lambda d: d["files"][0]["cautions"].append("x")),
    "a symbolic link": lambda p: (p.rename(p.with_suffix(".real")), p.symlink_to(p.with_suffix(".real").name)),
    "writable by others": lambda p: p.chmod(0o666),
    "a folder": lambda p: (p.unlink(), p.mkdir()),
}


@pytest.mark.parametrize("damage", sorted(DAMAGE))
def test_a_damaged_or_hostile_entry_is_a_miss_and_is_written_again(damage, repo, tmp_path, capsys, reviews):
    first = _check(capsys, "notes/a.md")
    (entry,) = _entries(tmp_path)
    DAMAGE[damage](entry)
    assert _check(capsys, "notes/a.md") == first  # reviewed again, the same report, no error
    assert reviews == ["notes/a.md", "notes/a.md"]
    if damage != "a folder":  # a folder in the entry's place cannot be replaced by a file: it stays a miss
        assert _check(capsys, "notes/a.md") == first
        assert len(reviews) == 2  # the entry was written again, whole
        assert entry.is_file() and not entry.is_symlink()


def test_a_notebooks_cells_out_of_order_are_a_miss(repo, tmp_path, capsys, reviews):
    first = _check(capsys, "notes/cells.ipynb", "--format", "json")
    (entry,) = _entries(tmp_path)
    _rewrite(entry, lambda d: d["files"].reverse())  # the cells' records, last first
    assert _check(capsys, "notes/cells.ipynb", "--format", "json") == first
    assert len(reviews) == 2 * len(CELLS)


# --- a folder that cannot be written, pruning ------------------------------------------------


def test_a_cache_folder_that_cannot_be_made_is_no_error(repo, tmp_path, capsys, reviews, monkeypatch):
    blocked = tmp_path / "a-file"
    blocked.write_text("not a folder", encoding="utf-8")
    monkeypatch.setenv("NOTELSP_CACHE_DIR", str(blocked))
    first = _check(capsys, "notes")
    assert _check(capsys, "notes") == first and first[2] == ""
    assert len(reviews) == 2 * (2 + len(CELLS))


def test_a_full_disk_is_no_error(repo, tmp_path, capsys, reviews, monkeypatch):
    import errno

    real_replace = os.replace

    def full(source, target):
        if "reports" in str(target):
            raise OSError(errno.ENOSPC, "No space left on device")
        return real_replace(source, target)

    monkeypatch.setattr(os, "replace", full)
    first = _check(capsys, "notes")
    assert first[2] == "" and _entries(tmp_path) == []
    assert not list((tmp_path / "cache" / "reports").glob(".entry-*"))  # no temporary file left behind
    monkeypatch.setattr(os, "replace", real_replace)
    assert _check(capsys, "notes") == first


def test_pruning_keeps_the_cap(repo, tmp_path, capsys, monkeypatch):
    monkeypatch.setattr(report_cache, "MAX_ENTRIES", 6)
    for number in range(10):
        (repo / f"more{number}.md").write_text(f"{{H2O: bent}} run {number}\n", encoding="utf-8")
    _check(capsys, "notes")  # 13 entries written, pruned to 90% of the cap
    assert len(_entries(tmp_path)) <= 6
    for round_ in range(3):
        for number in range(10):
            (repo / f"more{number}.md").write_text(f"{{H2O: bent}} run {number} round {round_}\n", encoding="utf-8")
        _check(capsys, "notes")
        assert len(_entries(tmp_path)) <= 6


def test_pruning_removes_the_least_recently_used(tmp_path):
    for number in range(5):
        entry = tmp_path / f"{number:032x}.json"
        entry.write_text("{}", encoding="utf-8")
        os.utime(entry, ns=(0, (number + 1) * 10**9))
    (tmp_path / "unrelated.txt").write_text("kept", encoding="utf-8")
    assert report_cache.prune(tmp_path, 3) == (3, 2)
    assert sorted(p.name for p in tmp_path.iterdir()) == [f"{n:032x}.json" for n in (2, 3, 4)] + ["unrelated.txt"]


def test_the_counter_lists_the_folder_only_when_the_cap_may_be_passed(tmp_path, monkeypatch):
    listed = []
    real = report_cache.prune
    monkeypatch.setattr(report_cache, "prune", lambda where, keep: listed.append(keep) or real(where, keep))
    report_cache.prune_if_due(tmp_path, 3, cap=10)  # no counter yet: counted once
    report_cache.prune_if_due(tmp_path, 3, cap=10)
    report_cache.prune_if_due(tmp_path, 4, cap=10)  # 0 + 3 + 4 <= 10
    assert listed == [9]
    report_cache.prune_if_due(tmp_path, 4, cap=10)  # 11 > 10: counted again
    assert listed == [9, 9]


# --- computed geometries ---------------------------------------------------------------------


def _computing_with(monkeypatch, species: dict) -> list[dict]:
    """Computing on, each species answered from ``species`` (stored real results); the species asked for."""
    asked: list[dict] = []

    def computed_for(wanted, computing_hit=False):
        asked.append(dict(wanted))
        return {text: species[text] for text in wanted if text in species}

    monkeypatch.delenv(cli.COMPUTE_VARIABLE)
    monkeypatch.setattr(cli, "_computed_for", computed_for)
    return asked


def test_with_computing_a_kept_note_is_neither_scanned_nor_computed(repo, tmp_path, capsys, reviews, monkeypatch):
    from tests.review.computed_fixture import stored

    (repo / "nf3.md").write_text("Fluoride {NF3: F-N-F 112.5°}.\n", encoding="utf-8")
    asked = _computing_with(monkeypatch, {"NF3": stored()["NF3"]})
    first = _check(capsys, "notes/nf3.md")
    assert "angle-against-calculation" in first[1]  # NF3's F-N-F is 102.2° (gas phase, from memory)
    assert asked == [{"NF3": None}]
    monkeypatch.setattr(cli, "_species_named", lambda *_: pytest.fail("a kept note was scanned"))
    assert _check(capsys, "notes/nf3.md") == first
    assert asked[1] == {} and reviews == ["notes/nf3.md"]


def test_with_computing_a_note_naming_a_failed_calculation_is_not_kept(repo, tmp_path, capsys, reviews, monkeypatch):
    from tests.review.computed_fixture import stored

    whole = stored()["NF3"]
    cut_short = replace(whole, species="NH3", structures=tuple(replace(s, failed="the time limit (20 s) was reached")
                                                               for s in whole.structures))
    (repo / "nf3.md").write_text("Fluoride {NF3: F-N-F 112.5°}.\n", encoding="utf-8")
    (repo / "both.md").write_text("Fluoride {NF3: F-N-F 112.5°} and {NH3: trigonal pyramidal}.\n", encoding="utf-8")
    _computing_with(monkeypatch, {"NF3": whole, "NH3": cut_short})
    _check(capsys, "notes/nf3.md", "notes/both.md")
    _check(capsys, "notes/nf3.md", "notes/both.md")
    assert reviews == ["notes/nf3.md", "notes/both.md", "notes/both.md"]


def test_with_computing_a_note_whose_settings_say_compute_false_is_kept_as_rules_only(repo, capsys, reviews,
                                                                                      monkeypatch):
    (repo / ".notelsp.toml").write_text("[review]\ncompute = false\n", encoding="utf-8")
    _check(capsys, "--rules-only", "notes/a.md")
    asked = _computing_with(monkeypatch, {})
    _check(capsys, "notes/a.md")
    assert reviews == ["notes/a.md"] and asked == [{}]  # the same review: no geometry is used for it


# --- many notes: workers keep the reports ----------------------------------------------------


def test_reports_reviewed_by_a_pool_of_workers_are_kept(tmp_path):
    notes = tmp_path / "notes"
    notes.mkdir()
    for number in range(24):
        (notes / f"run{number:02d}.md").write_text(f"# {number}\n\n{{ClF3: trigonal planar}} {{H2O: bent}} {number}\n",
                                                   encoding="utf-8")
    env = {**os.environ, "NOTELSP_CACHE_DIR": str(tmp_path / "cache"), cli.WORKERS_VARIABLE: "2",
           cli.COMPUTE_VARIABLE: "off"}
    env.pop(report_cache.SWITCH_VARIABLE, None)
    runs = [subprocess.run([sys.executable, "-m", "notelsp", "check", "notes", "--format", "sarif"], cwd=tmp_path,
                           env=env, capture_output=True, text=True, timeout=120) for _ in range(2)]
    assert [r.returncode for r in runs] == [1, 1] and runs[0].stdout == runs[1].stdout, runs[0].stderr
    assert len(list((tmp_path / "cache" / "reports").glob("*.json"))) == 24
    env[report_cache.SWITCH_VARIABLE] = "off"
    fresh = subprocess.run([sys.executable, "-m", "notelsp", "check", "notes", "--format", "sarif"], cwd=tmp_path,
                           env=env, capture_output=True, text=True, timeout=120)
    assert fresh.stdout == runs[1].stdout


# --- the nesting bound, against the json module's own reading ---------------------------------


def _depth(value) -> int:
    if isinstance(value, dict):
        return 1 + max(map(_depth, value.values()), default=0)
    if isinstance(value, list):
        return 1 + max(map(_depth, value), default=0)
    return 0


def test_the_nesting_bound_agrees_with_the_parsed_depth():
    from hypothesis import given, settings
    from hypothesis import strategies as st

    texts = st.text(alphabet='[]{}"\\ab\u00b0', max_size=6)
    values = st.recursive(st.none() | st.integers() | texts,
                          lambda inner: st.lists(inner, max_size=3) | st.dictionaries(texts, inner, max_size=3),
                          max_leaves=30)

    @settings(max_examples=400, deadline=None)
    @given(values, st.booleans())
    def check(value, ascii_only):
        data = json.dumps(value, ensure_ascii=ascii_only).encode("utf-8")
        depth = _depth(value)
        for most in range(0, 8):
            found = report_cache.nested_at_most(data, most)
            if depth <= most:
                assert found, (data, most)
            elif depth > 2 * most:
                assert not found, (data, most)

    check()


def test_an_entry_is_within_the_nesting_bound(repo, tmp_path, capsys):
    _check(capsys, "notes", "--format", "sarif")  # fixes, annotation texts and notebook cells: every column used
    for entry in _entries(tmp_path):
        assert _depth(json.loads(entry.read_bytes())) <= report_cache.MAX_NESTING


def test_with_real_computing_a_kept_note_computes_nothing_the_second_time(tmp_path):
    """GFN2-xTB through the project's pool, as a user runs it. NF3's F-N-F angle is 102.2° in the gas phase
    (from memory, as in the usual tables), so 112.5° is flagged against the calculation."""
    import shutil

    (tmp_path / "nf3.md").write_text("Fluoride {NF3: F-N-F 112.5°}.\n", encoding="utf-8")
    env = {k: v for k, v in os.environ.items() if k not in (cli.COMPUTE_VARIABLE, report_cache.SWITCH_VARIABLE)}
    env["NOTELSP_CACHE_DIR"] = str(tmp_path / "cache")

    def run() -> subprocess.CompletedProcess:
        return subprocess.run([sys.executable, "-m", "notelsp", "check", "nf3.md", "--format", "json"], cwd=tmp_path,
                              env=env, capture_output=True, text=True, timeout=280)

    first = run()
    assert "angle-against-calculation" in first.stdout, first.stderr
    shutil.rmtree(tmp_path / "cache" / "computed")  # the geometries: a second review would compute them again
    second = run()
    assert (second.returncode, second.stdout) == (first.returncode, first.stdout)
    assert not (tmp_path / "cache" / "computed").exists()  # nothing was computed: the kept report was written
