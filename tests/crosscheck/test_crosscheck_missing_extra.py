"""Without the qc extra: a clear message with the install command, no traceback."""

import asyncio
import subprocess
import sys

from notelsp.crosscheck.availability import INSTALL_HINT, missing_extra
from notelsp.crosscheck.cli import cross_check_paths
from notelsp.crosscheck.levels import DEFAULT_LEVEL
from notelsp.crosscheck.protocol import Job, job_to_json
from notelsp.crosscheck.runner import cross_check
from notelsp.crosscheck.start import starting_geometries
from notelsp.notation import parse_formula

INSTALL = "pip install 'notelsp[qc]'"


def test_installed_extra_is_found():
    assert missing_extra() is None


def test_missing_extra_is_named(without_qc_extra):
    message = missing_extra()
    assert message is not None and "pyscf" in message and INSTALL in message
    assert INSTALL in INSTALL_HINT


def test_cross_check_reports_the_missing_extra(without_qc_extra):
    result = asyncio.run(cross_check(parse_formula("H2O")))
    assert result.status == "missing-extra" and INSTALL in result.message and not result.isomers


def test_cli_says_how_to_install(without_qc_extra, tmp_path, capsys):
    note = tmp_path / "note.md"
    note.write_text("Water {H2O: bent}\n", encoding="utf-8")
    code = cross_check_paths([note], stream=sys.stdout, progress=sys.stderr)
    out, err = capsys.readouterr()
    assert code == 2 and INSTALL in out and "Traceback" not in out + err


def test_worker_without_pyscf_answers_with_the_hint(tmp_path):
    # a module named pyscf that refuses to import stands for an uninstalled one
    (tmp_path / "pyscf.py").write_text("raise ImportError('No module named pyscf', name='pyscf')\n")
    (start,) = starting_geometries(parse_formula("H2O"))
    job = job_to_json(Job(start, DEFAULT_LEVEL, 5))
    done = subprocess.run(
        [sys.executable, "-m", "notelsp.crosscheck.worker"],
        input=job, capture_output=True, text=True, timeout=60,
        env={**__import__("os").environ, "PYTHONPATH": str(tmp_path)},
    )
    assert done.returncode == 3
    assert '"missing-extra"' in done.stdout and INSTALL in done.stdout
    assert "Traceback" not in done.stderr
