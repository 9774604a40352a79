"""``check`` computes geometries by default; ``--rules-only`` and NOTELSP_COMPUTE=off do not.

These tests run the real calculation (GFN2-xTB on small species, a cache in a
temporary folder).  NF3's F-N-F angle is 102.2° in the gas phase and NH3's H-N-H
106.7° (from memory, as in the usual tables).
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import time
from pathlib import Path

import pytest

from notelsp.cli import COMPUTE_VARIABLE

NOTE = "Fluoride {NF3: F-N-F 112.5°} beside ammonia {NH3: H-N-H 107°}.\n"


def _run(*args: str, cache: Path, compute: bool = True, stdin: str | None = None) -> subprocess.CompletedProcess:
    env = {k: v for k, v in os.environ.items() if k != COMPUTE_VARIABLE}
    env["XDG_CACHE_HOME"] = str(cache)
    if not compute:
        env[COMPUTE_VARIABLE] = "off"
    return subprocess.run([sys.executable, "-m", "notelsp", "check", *args], capture_output=True, text=True,
                          encoding="utf-8", env=env, input=stdin, timeout=280)


@pytest.fixture
def note(tmp_path: Path) -> Path:
    path = tmp_path / "note.md"
    path.write_text(NOTE, encoding="utf-8")
    return path


def test_check_computes_by_default_and_flags_a_claim_the_rules_let_pass(note, tmp_path):
    done = _run(str(note), cache=tmp_path / "cache")
    assert done.returncode == 0, done.stderr  # a warning only: never an error from a calculation
    (line,) = [line for line in done.stdout.splitlines() if "[angle-against-calculation]" in line]
    assert line.startswith(f"{note}:1:") and "NF3" in line and "GFN2-xTB" in line
    assert "NH3" not in line
    assert "computing geometries" not in done.stderr  # no progress bar when standard error is not a terminal


def test_rules_only_flag_and_switch_compute_nothing(note, tmp_path):
    for done in (_run("--rules-only", str(note), cache=tmp_path / "a"),
                 _run(str(note), cache=tmp_path / "b", compute=False)):
        assert done.returncode == 0, done.stderr
        assert "against-calculation" not in done.stdout and "no findings" in done.stdout
    assert not any((tmp_path / "a").rglob("computed")) and not any((tmp_path / "b").rglob("computed"))


@pytest.mark.parametrize("output", ["json", "sarif"])
def test_json_and_sarif_stay_parseable_with_computing(output, tmp_path):
    done = _run("--format", output, "-", cache=tmp_path / "cache", stdin=NOTE)
    assert done.returncode == 0, done.stderr
    report = json.loads(done.stdout)  # nothing but the report on standard output
    text = json.dumps(report)
    assert "angle-against-calculation" in text


def test_the_disk_cache_serves_a_second_run(note, tmp_path):
    cache = tmp_path / "cache"
    started = time.perf_counter()
    cold = _run(str(note), cache=cache)
    middle = time.perf_counter()
    warm = _run(str(note), cache=cache)
    print(f"check with computing: cold {middle - started:.2f} s, warm {time.perf_counter() - middle:.2f} s")
    assert cold.stdout == warm.stdout
    assert any(cache.rglob("computed/*.json"))  # the results were kept on disk


def test_standard_input_is_read_once_for_both_computing_and_reviewing(tmp_path):
    done = _run("-", cache=tmp_path / "cache", stdin=NOTE)
    assert done.returncode == 0, done.stderr
    assert "[angle-against-calculation]" in done.stdout and "1 file, 2 annotations" in done.stdout


def test_the_progress_bar_is_drawn_on_a_terminal_only_and_cleared_at_the_end():
    import io

    from notelsp.cli import _Progress

    class Terminal(io.StringIO):
        def isatty(self) -> bool:
            return True

    terminal, pipe = Terminal(), io.StringIO()
    for stream in (terminal, pipe):
        progress = _Progress(2, stream)
        progress.step()
        progress.step()
        progress.done()
    assert pipe.getvalue() == ""
    drawn = terminal.getvalue()
    assert "\r" in drawn and "2/2 species" in drawn and "\n" not in drawn
    assert drawn.endswith("\r\x1b[K")  # ANSI "erase to end of line" (ECMA-48 EL): the report starts on a clean line


def test_review_workers_get_the_computed_results(note, tmp_path, monkeypatch):
    (tmp_path / "second.md").write_text("Water {H2O: H-O-H 115°}.\n", encoding="utf-8")
    cache = tmp_path / "cache"
    alone = _run(str(note), str(tmp_path / "second.md"), cache=cache)
    monkeypatch.setenv("NOTELSP_WORKERS", "2")  # review in a pool of two processes (notelsp/cli.py)
    pooled = _run(str(note), str(tmp_path / "second.md"), cache=cache)
    assert alone.returncode == pooled.returncode == 0, alone.stderr + pooled.stderr
    assert pooled.stdout == alone.stdout
    assert pooled.stdout.count("[angle-against-calculation]") == 2


def test_a_settings_file_saying_compute_false_keeps_its_notes_rules_only(note, tmp_path):
    (tmp_path / ".notelsp.toml").write_text("[review]\ncompute = false\n", encoding="utf-8")
    done = _run(str(note), cache=tmp_path / "cache")
    assert done.returncode == 0, done.stderr
    assert "against-calculation" not in done.stdout and "no findings" in done.stdout
    assert not any((tmp_path / "cache").rglob("computed"))


def test_a_smiles_species_is_computed_as_the_smiles_it_names(tmp_path):
    # As a formula "CO" is carbon monoxide (two atoms, no angle to compute); as SMILES it is methanol,
    # whose C-O-H angle is 108.5° in the gas phase (from memory).
    import re

    from notelsp.compute import ANGLE_UNCERTAINTY_DEG

    path = tmp_path / "methanol.md"
    path.write_text('Methanol {smiles "CO": C-O-H 125°}.\n', encoding="utf-8")
    done = _run(str(path), cache=tmp_path / "cache")
    (line,) = [line for line in done.stdout.splitlines() if "C-O-H 125°" in line and "implausible" in line]
    computed = re.search(r"computed \(GFN2-xTB\) ([\d.]+)°", line)
    assert computed is not None, line
    assert abs(float(computed.group(1)) - 108.5) <= ANGLE_UNCERTAINTY_DEG
