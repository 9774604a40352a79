"""The command line never prints a traceback: binary, huge and looping input, garbage formulas.

FIFOs and permission-denied files are not tried (a FIFO blocks a reader by
design; the tests may run as root, where chmod denies nothing).
"""

from __future__ import annotations

import contextlib
import io
import os
import subprocess
import sys

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from notelsp.cli import main

from .scale import scaled, tried


def _run(*args: str, cwd) -> subprocess.CompletedProcess:
    tried("CLI runs (subprocess)")
    return subprocess.run([sys.executable, "-m", "notelsp", *args], capture_output=True, text=True,
                          timeout=300, cwd=cwd, errors="replace")


def _no_traceback(run: subprocess.CompletedProcess) -> None:
    assert "Traceback" not in run.stderr and "Traceback" not in run.stdout, run.stderr
    assert "internal error" not in run.stderr, run.stderr


@pytest.fixture(scope="module")
def awkward_folder(tmp_path_factory):
    folder = tmp_path_factory.mktemp("awkward")
    (folder / "random.md").write_bytes(bytes(range(256)) * 40)  # not UTF-8
    (folder / "nul.md").write_bytes(b"{ClF3: t-shaped}\x00\x01\x02 {NH3:\x00 bent}\n")
    (folder / "bom.md").write_bytes(b"\xef\xbb\xbf{ClF3: trigonal planar}\n")
    (folder / "utf16.md").write_bytes("{ClF3: bent}".encode("utf-16"))
    (folder / "empty.md").write_bytes(b"")
    (folder / "huge.md").write_text("{ClF3: trigonal planar} and {{not, this}} {PCl3F2: Cl axial}\n" * 16_000)
    (folder / "loop").mkdir()
    (folder / "loop" / "up").symlink_to("..")  # a folder loop: never followed
    (folder / "loop" / "a.md").symlink_to("b.md")  # a symlink loop between two "notes"
    (folder / "loop" / "b.md").symlink_to("a.md")
    (folder / "dangling.md").symlink_to("nowhere.md")
    return folder


def test_check_of_an_awkward_folder(awkward_folder):
    run = _run("check", ".", cwd=awkward_folder)
    _no_traceback(run)
    assert run.returncode == 2  # unreadable files are named; the rest is still checked
    assert "random.md: not UTF-8 text" in run.stderr and "utf16.md: not UTF-8 text" in run.stderr
    assert "loop/a.md" in run.stderr and "dangling.md" in run.stderr
    assert "bom.md:1:8: error[wrong-shape]" in run.stdout  # the BOM is no column
    assert run.stdout.count("huge.md:") >= 16_000


@pytest.mark.parametrize("args", [
    ("check", "random.md"), ("check", "loop/a.md"), ("check", "nul.md", "--format", "sarif"),
    ("check", "no-such-file.md"), ("check", "huge.md", "--format", "json"), ("check", "--config", "random.md", "bom.md"),
    ("explain", "\U0001F9EA"), ("explain", "{" * 10_000), ("explain", "Cl" * 5_000), ("explain", "--format", "json", ""),
    ("frobnicate",), ("check",),
])
def test_one_awkward_command(awkward_folder, args):
    run = _run(*args, cwd=awkward_folder)
    _no_traceback(run)
    assert run.returncode in (0, 1, 2)
    assert len(run.stderr) < 2_000  # one line per problem, never the input echoed whole


@settings(max_examples=scaled(150, 3000), deadline=None)
@given(st.text(max_size=80), st.sampled_from(["text", "json"]))
def test_explain_garbage_in_process(formula, output):
    tried("explain calls with generated garbage")
    errors, printed = io.StringIO(), io.StringIO()
    with contextlib.redirect_stderr(errors), contextlib.redirect_stdout(printed):
        status = main(["explain", "--format", output, "--", formula])
    assert status in (0, 2)
    assert "internal error" not in errors.getvalue()  # what main prints instead of a traceback
    assert (status == 0) == bool(printed.getvalue())


def test_explain_garbage_prints_one_line(capsys):
    for formula in ["", "{{{", "Xe99999F2", "SO4^99-", "((((((((OH))))))))", "\x00", "[ICl4", "HOCl @Q"]:
        tried("explain calls with generated garbage")
        assert main(["explain", "--", formula]) == 2
        captured = capsys.readouterr()
        assert captured.err.startswith("notelsp: cannot read the formula") and captured.err.count("\n") == 1
        assert "Traceback" not in captured.err


def test_check_never_follows_a_folder_loop(awkward_folder):
    run = _run("check", "loop", cwd=awkward_folder)
    _no_traceback(run)
    assert run.returncode == 2 and run.stderr.count("Too many levels of symbolic links") == 2
    assert os.path.islink(awkward_folder / "loop" / "up")
