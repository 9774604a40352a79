"""Hostile cache entries and broken workers: discarded and recomputed, or a failure of its own, never a crash.

The cache folder is outside notelsp's control, so each entry below is put
where a real result would be found.  Every one must be treated as absent (the
structure is computed again) and the report must come out whole.  The
calculation itself is replaced by a stand-in returning the starting structure
(the real worker is tested in test_crosscheck_runner.py); the JSON texts are
read by Python's own json module, which accepts NaN and Infinity (Python
documentation, json module, from memory).
"""

from __future__ import annotations

import asyncio
import io
import json
import os

import pytest

from notelsp.crosscheck import cache, runner
from notelsp.crosscheck.cli import EXIT_CALCULATION_FAILED, EXIT_OK, cross_check_paths
from notelsp.crosscheck.levels import parse_level
from notelsp.crosscheck.protocol import OptimisedIsomer, isomer_to_dict
from notelsp.crosscheck.report import cross_check_markdown
from notelsp.crosscheck.start import starting_geometries
from notelsp.notation import parse_formula

LEVEL = parse_level("HF/STO-3G")
WATER = parse_formula("H2O")
(GEOMETRY,) = starting_geometries(WATER)
KEY = [cache.FORMAT, GEOMETRY.species, GEOMETRY.isomer, LEVEL.label]


def _computed() -> OptimisedIsomer:
    """What the stand-in calculation returns: the starting structure, converged (a real energy is about -75 Eh)."""
    return OptimisedIsomer(GEOMETRY.species, GEOMETRY.isomer, GEOMETRY.rank, LEVEL.label, GEOMETRY.symbols,
                           GEOMETRY.positions, GEOMETRY.ligand_sites, -75.0, True, 5)


GOOD = json.loads(json.dumps(isomer_to_dict(_computed())))  # as stored: lists, not tuples


def _entry(**changes) -> str:
    return json.dumps({"key": KEY, "isomer": {**GOOD, **changes}})


def _text_entries() -> dict[str, bytes]:
    good = _entry()
    entries = {
        "a top-level list": b"[1, 2, 3]",
        "a top-level string": b'"isomer"',
        "null": b"null",
        "100,000-deep JSON": b"[" * 100_000 + b"]" * 100_000,
        "100,000-deep JSON inside the isomer": f'{{"key": {json.dumps(KEY)}, "isomer": '.encode()
        + b"{\"x\":" * 100_000 + b"1" + b"}" * 100_001,
        "too few coordinates": _entry(positions=[[0.0, 0.0], [0.9, 0.0], [0.0, 0.9]]).encode(),
        "all-zero positions": _entry(positions=[[0.0, 0.0, 0.0]] * 3).encode(),
        "1e308 coordinates": _entry(positions=[[0.0, 0.0, 0.0], [1e308, 0.0, 0.0], [0.0, 1e308, 0.0]]).encode(),
        "NaN coordinates": good.replace("0.0", "NaN").encode(),
        "Infinity energy": _entry(energy_hartree=float("inf")).encode(),
        "thousands of symbols": _entry(symbols=["H"] * 5_000, positions=[[1.0, 0.0, 0.0]] * 5_000).encode(),
        "symbols that are numbers": _entry(symbols=[8, 1, 1]).encode(),
        "more positions than atoms": _entry(positions=GOOD["positions"] + [[2.0, 2.0, 2.0]]).encode(),
        "too few ligand sites": _entry(ligand_sites=GOOD["ligand_sites"][:1]).encode(),
        "a rank of true": _entry(rank=True).encode(),
        "converged as a word": _entry(converged="yes").encode(),
        "an energy as text": _entry(energy_hartree="-75.0").encode(),
        "atoms of another species": _entry(symbols=["S", "H", "H"]).encode(),
        "the key of another species": json.dumps({"key": [cache.FORMAT, "H2S", "", LEVEL.label],
                                                  "isomer": GOOD}).encode(),
        "the isomer missing": json.dumps({"key": KEY}).encode(),
        "truncated JSON": good[: len(good) // 2].encode(),
        "not UTF-8": b"\xff\xfe" + good.encode("utf-16-le"),
        "empty": b"",
        "larger than an entry can be": good.encode() + b" " * (cache.MAX_ENTRY_BYTES + 1),
    }
    return entries


TEXT_ENTRIES = _text_entries()
SPECIAL_ENTRIES = ("a FIFO", "a folder", "a symlink to a good entry")


def _place(name: str) -> None:
    path = cache.cache_path(GEOMETRY.species, GEOMETRY.isomer, LEVEL.label)
    path.parent.mkdir(parents=True, exist_ok=True)
    if name == "a FIFO":
        os.mkfifo(path)  # opening it for reading without O_NONBLOCK waits for a writer forever
    elif name == "a folder":
        path.mkdir()
    elif name == "a symlink to a good entry":
        target = path.parent / "elsewhere.json"
        target.write_text(_entry(), encoding="utf-8")
        path.symlink_to(target)
    else:
        path.write_bytes(TEXT_ENTRIES[name])


@pytest.fixture
def stand_in_calculation(monkeypatch):
    """Count calculations; each returns the starting structure."""
    calls: list[str] = []

    async def calculate(job, seconds_left, progress):
        calls.append(job.geometry.species)
        return _computed()

    monkeypatch.setattr(runner, "_run_worker", calculate)
    return calls


def test_a_good_entry_is_used(stand_in_calculation):
    cache.store(_computed())
    result = asyncio.run(runner.cross_check(WATER, LEVEL))
    assert result.cached == 1 and stand_in_calculation == []  # the positive control for the cases below


@pytest.mark.parametrize("name", sorted(TEXT_ENTRIES) + list(SPECIAL_ENTRIES))
def test_hostile_entry_is_discarded_and_recomputed(name, stand_in_calculation):
    _place(name)
    assert cache.load(GEOMETRY.species, GEOMETRY.isomer, LEVEL.label, expected=GEOMETRY) is None
    result = asyncio.run(runner.cross_check(WATER, LEVEL))
    assert result.status == "done" and result.cached == 0 and stand_in_calculation == ["H2O"]
    (annotation,) = _annotations("{H2O: H-O-H 104.5°}")
    report = cross_check_markdown(result, annotation)
    assert "Cross-check of H2O" in report and "nan" not in report.lower()


def test_hostile_entries_through_the_command(tmp_path, stand_in_calculation):
    """The FIFO that hung the command, read through ``check --cross-check``'s own function."""
    _place("a FIFO")
    note = tmp_path / "water.md"
    note.write_text("{H2O: H-O-H 104.5°}\n", encoding="utf-8")
    out = io.StringIO()
    assert cross_check_paths([note], level=LEVEL.label, stream=out, progress=io.StringIO()) == EXIT_OK
    assert "Cross-check of H2O" in out.getvalue()


def _annotations(text: str):
    from notelsp.notation import scan

    return scan(text, "markdown").annotations


WORKERS = {
    "killed": "import os, signal; os.kill(os.getpid(), signal.SIGKILL)",
    "exits without a word": "raise SystemExit(3)",
    "prints garbage": "print('not json at all')",
    "prints a line too long": "print('x' * 200_000)",
    "answers with NaN coordinates": "import json; print(json.dumps({'event': 'done', 'isomer': %r}))"
    % {**GOOD, "positions": [[float("nan")] * 3] * 3},
    "answers with another molecule": "import json; print(json.dumps({'event': 'done', 'isomer': %r}))"
    % {**GOOD, "symbols": ["S", "H", "H"]},
}


@pytest.mark.parametrize("name", sorted(WORKERS))
def test_a_broken_worker_gives_its_own_exit_status(name, tmp_path, monkeypatch):
    monkeypatch.setattr(runner, "WORKER", ("-c", WORKERS[name]))
    note = tmp_path / "water.md"
    note.write_text("{H2O: H-O-H 104.5°}\n", encoding="utf-8")
    out = io.StringIO()
    assert cross_check_paths([note], level=LEVEL.label, stream=out, progress=io.StringIO()) == EXIT_CALCULATION_FAILED
    assert "not run" in out.getvalue() and "Traceback" not in out.getvalue()
    assert not list(cache.cache_root().rglob("*.json"))  # nothing kept from a failed calculation


def test_the_check_command_exits_with_the_failure_status(tmp_path, monkeypatch, capsys):
    from notelsp.cli import main

    monkeypatch.setattr(runner, "WORKER", ("-c", WORKERS["killed"]))
    note = tmp_path / "water.md"
    note.write_text("{H2O: H-O-H 104.5°}\n", encoding="utf-8")
    assert main(["check", "--cross-check", "--level", LEVEL.label, str(note)]) == EXIT_CALCULATION_FAILED
    assert "cross-check of H2O not run: the worker for H2O" in capsys.readouterr().out


def test_settings_decide_whether_a_disagreeing_cross_check_fails_the_command(tmp_path, stand_in_calculation):
    from notelsp.crosscheck.cli import EXIT_DISAGREES
    from notelsp.review.settings import settings_from_toml

    note = tmp_path / "water.md"
    note.write_text("{H2O: H-O-H 150°}\n", encoding="utf-8")  # water's angle is near 104.5° (G2 set)

    def outcome(toml: str) -> tuple[int, str]:
        settings, problems = settings_from_toml(toml)
        assert problems == []
        out = io.StringIO()
        code = cross_check_paths([note], level=LEVEL.label, stream=out, progress=io.StringIO(), settings=settings)
        return code, out.getvalue()

    code, report = outcome("")
    assert code == EXIT_DISAGREES and "away" in report  # the positive control
    code, report = outcome('[review]\ndisabled = ["computed-angle"]\n')
    assert code == EXIT_OK and "away" not in report
    code, _ = outcome('[review.severity]\n"computed-angle" = "information"\n')
    assert code == EXIT_OK
