"""``notelsp check --cross-check``: cross_check_paths, then the command itself in a subprocess.

Water's angle: 104.0 deg in ASE's G2 set (Curtiss et al. 1997); HF/STO-3G
lands within 5 deg of 104.5 (from memory: about 100 deg).
"""

import io
import os
import subprocess
import sys

from notelsp.crosscheck.cli import EXIT_CANNOT_RUN, EXIT_DISAGREES, EXIT_OK, cross_check_paths


class FakeTerminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_report_and_plain_progress_when_not_a_terminal(tmp_path):
    note = tmp_path / "water.md"
    note.write_text("Water is bent {H2O: H-O-H 104.5°}.\n", encoding="utf-8")
    out, progress = io.StringIO(), io.StringIO()
    code = cross_check_paths([note], level="HF/STO-3G", stream=out, progress=progress)
    assert code == EXIT_OK, out.getvalue()
    report = out.getvalue()
    assert "Cross-check of H2O (HF/STO-3G)" in report and "computed (HF/STO-3G): H-O-H" in report
    lines = progress.getvalue().splitlines()
    assert lines[0] == "cross-check: H2O (1/1): starting"
    assert any("step 1" in line for line in lines) and "\r" not in progress.getvalue()


def test_disagreement_sets_the_exit_code_and_terminal_gets_a_bar(tmp_path):
    note = tmp_path / "water.md"
    note.write_text("{H2O: H-O-H 120°}\n", encoding="utf-8")
    out, terminal = io.StringIO(), FakeTerminal()
    assert cross_check_paths([note], level="HF/STO-3G", stream=out, progress=terminal) == EXIT_DISAGREES
    drawn = terminal.getvalue()
    assert "\r[" in drawn and "#" in drawn and drawn.endswith("\n")
    assert "⚠ computed (HF/STO-3G): H-O-H" in out.getvalue()


def test_bad_level_and_unreadable_file(tmp_path):
    out = io.StringIO()
    assert cross_check_paths([tmp_path / "x.md"], level="MP2/STO-3G", stream=out, progress=io.StringIO()) == EXIT_CANNOT_RUN
    assert "METHOD/BASIS" in out.getvalue()
    out = io.StringIO()
    assert cross_check_paths([tmp_path / "missing.md"], stream=out, progress=io.StringIO()) == EXIT_CANNOT_RUN
    assert "cannot read" in out.getvalue()


def _notelsp(*arguments: str, cache) -> subprocess.CompletedProcess:
    environment = {**os.environ, "NOTELSP_CACHE_DIR": str(cache)}
    return subprocess.run(
        [sys.executable, "-m", "notelsp", *arguments], capture_output=True, text=True, timeout=240, env=environment
    )


def test_check_command_cross_checks_in_a_subprocess(tmp_path, private_cache):
    note = tmp_path / "water.md"
    note.write_text("Water is bent {H2O: H-O-H 104.5°}.\n", encoding="utf-8")
    done = _notelsp("check", "--cross-check", "--level", "HF/STO-3G", str(note), cache=private_cache)
    assert done.returncode == 0, done.stdout + done.stderr
    assert "### Cross-check of H2O (HF/STO-3G)" in done.stdout
    assert "agrees within 5°" in done.stdout and "Traceback" not in done.stderr
    assert "cross-check: H2O (1/1): starting" in done.stderr.splitlines()  # plain progress lines off a terminal
    assert list(private_cache.rglob("*.json"))  # the converged result is kept for next time


def test_check_command_refuses_an_unknown_level(tmp_path, private_cache):
    note = tmp_path / "water.md"
    note.write_text("{H2O: bent}\n", encoding="utf-8")
    done = _notelsp("check", "--cross-check", "--level", "MP2/STO-3G", str(note), cache=private_cache)
    assert done.returncode == 2 and "METHOD/BASIS" in done.stdout + done.stderr
    assert not list(private_cache.rglob("*.json"))
