"""The disk cache: round trip, hostile entries, size bound, concurrent writers."""

from __future__ import annotations

import json
import os
import threading
import time
from pathlib import Path

import pytest

from notelsp.chem import analyse
from notelsp.compute import cache
from notelsp.compute.geometry import start_structures
from notelsp.compute.result import geometry_to_dict
from notelsp.notation import parse_formula
from notelsp.compute.geometry import failure


def structure(text: str = "NH3"):
    return start_structures(analyse(parse_formula(text)))[0]


def fake_result(text: str = "NH3"):
    """A plausible result without computing: the starting structure itself, marked converged."""
    start = structure(text)
    failed = failure(start, "x")
    raw = geometry_to_dict(failed)
    raw.update(failed=None, converged=True, energy_ev=-100.0, steps=3, wall_time_s=0.1)
    from notelsp.compute.result import geometry_from_dict

    return start, geometry_from_dict(raw)


def test_the_folder_follows_xdg(private_cache):
    assert cache.cache_root() == private_cache


def test_a_stored_result_comes_back_equal():
    start, result = fake_result()
    cache.store(result)
    assert cache.load(start) == result
    assert [p.suffix for p in cache.cache_root().iterdir()] == [".json"]


def testfailures_are_not_stored():
    start = structure()
    cache.store(failure(start, "ran out of time"))
    assert cache.load(start) is None


def test_the_key_holds_the_arrangement_and_the_spin():
    first, second = start_structures(analyse(parse_formula("PCl3F2")))[:2]
    assert cache.entry_path(first) != cache.entry_path(second)
    (triplet,) = start_structures(analyse(parse_formula("CH2")))
    (singlet,) = start_structures(analyse(parse_formula("CH2")), unpaired=0)
    assert cache.entry_path(triplet) != cache.entry_path(singlet)


def write(start, content: str | bytes) -> Path:
    path = cache.entry_path(start)
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_bytes(content.encode() if isinstance(content, str) else content)
    return path


def valid_payload(result) -> dict:
    start = structure(result.species)
    return {"key": cache.entry_key(start), "geometry": geometry_to_dict(result)}


def hostile_payloads(result):
    good = valid_payload(result)
    nan = json.loads(json.dumps(good))
    nan["geometry"]["positions"][1][0] = float("nan")
    huge_number = json.loads(json.dumps(good))
    huge_number["geometry"]["energy_ev"] = 1e308
    wrong_count = json.loads(json.dumps(good))
    wrong_count["geometry"]["positions"].pop()
    wrong_type = json.loads(json.dumps(good))
    wrong_type["geometry"]["converged"] = "yes"
    other_species = json.loads(json.dumps(good))
    other_species["geometry"]["labels"] = ["F", "F", "F"]
    bool_charge = json.loads(json.dumps(good))
    bool_charge["geometry"]["charge"] = True
    return {
        "a list": "[1, 2, 3]",
        "NaN": json.dumps(nan),  # json.dumps writes NaN, which json.loads accepts: the schema must refuse it
        "1e308": json.dumps(huge_number),
        "a position missing": json.dumps(wrong_count),
        "converged as text": json.dumps(wrong_type),
        "another species' ligands": json.dumps(other_species),
        "a boolean charge": json.dumps(bool_charge),
        "deep nesting": "[" * 100_000 + "]" * 100_000,
        "too large": json.dumps({**good, "padding": "x" * (cache.MAX_ENTRY_BYTES + 10)}),
        "not UTF-8": b"\xff\xfe{}",
        "another key": json.dumps({**good, "key": ["other"]}),
        "truncated": json.dumps(good)[:-20],
    }


@pytest.mark.parametrize("kind", [
    "a list", "NaN", "1e308", "a position missing", "converged as text", "another species' ligands",
    "a boolean charge", "deep nesting", "too large", "not UTF-8", "another key", "truncated"])
def test_hostile_entries_are_treated_as_absent(kind):
    start, result = fake_result()
    write(start, hostile_payloads(result)[kind])
    assert cache.load(start) is None


def test_the_valid_payload_the_hostile_ones_start_from_is_accepted():
    start, result = fake_result()
    write(start, json.dumps(valid_payload(result)))
    assert cache.load(start) == result


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="FIFOs are POSIX")
def test_a_fifo_in_place_of_an_entry_neither_blocks_nor_is_read():
    start = structure()
    path = cache.entry_path(start)
    path.parent.mkdir(parents=True, exist_ok=True)
    os.mkfifo(path)
    assert cache.load(start) is None  # a blocking open would hang here (pytest-timeout ends it)


def test_a_symlink_to_a_valid_entry_is_not_followed(tmp_path):
    start, result = fake_result()
    elsewhere = tmp_path / "elsewhere.json"
    elsewhere.write_text(json.dumps(valid_payload(result)))
    path = cache.entry_path(start)
    path.parent.mkdir(parents=True, exist_ok=True)
    path.symlink_to(elsewhere)
    assert cache.load(start) is None


def test_the_oldest_entries_go_past_the_size_bound():
    results = [fake_result(text)[1] for text in ("NH3", "H2O", "CH4", "PH3", "SiH4", "H2S")]
    for age, result in enumerate(results):
        cache.store(result)
        path = cache.entry_path(structure(result.species))
        os.utime(path, (1_000_000 + age, 1_000_000 + age))
    size = cache.entry_path(structure("NH3")).stat().st_size
    removed = cache.evict(limit=int(size * 3.5))
    assert removed >= 3
    assert cache.load(structure("NH3")) is None and cache.load(structure("H2S")) is not None


def test_concurrent_writers_and_readers_never_see_half_an_entry():
    start, result = fake_result()
    seen: list[object] = []
    stop = threading.Event()

    def writer():
        while not stop.is_set():
            cache.store(result)

    def reader():
        # 300 reads, and on until the first whole entry is seen: 300 reads of a missing file can all
        # happen before a writer thread gets the interpreter for its first write
        deadline = time.monotonic() + 30
        while len(seen) < 300 or (result not in seen and time.monotonic() < deadline):
            seen.append(cache.load(start))

    writers = [threading.Thread(target=writer) for _ in range(3)]
    for thread in writers:
        thread.start()
    reader()
    stop.set()
    for thread in writers:
        thread.join()
    assert all(found is None or found == result for found in seen)
    assert any(found == result for found in seen)
    assert not [p for p in cache.cache_root().iterdir() if p.name.startswith(".entry-")]
    assert cache.load(start) == result
