"""`notelsp check` in a child process: which files are notes, their nearest settings, and files that are not files.

FIFOs, devices and symlinks to them are what a shared folder can hold; each run
must finish (the child has a timeout) and name the file it skipped.
"""

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from notelsp.notefiles import NoteFinder
from notelsp.review.settings import Settings, settings_from_toml
from notelsp.review.workspace import is_reviewed

WRONG = "{ClF3: trigonal planar}\n"  # ClF3 is T-shaped (VSEPR; common practice, no source)
needs_fifo = pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="no named pipes here")


def check(*args: str, cwd: Path) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "notelsp", "check", *args], capture_output=True, text=True,
                          encoding="utf-8", cwd=cwd, timeout=60)


def reviewed_paths(run: subprocess.CompletedProcess) -> list[str]:
    return sorted(f["path"].replace("\\", "/") for f in json.loads(run.stdout)["files"])


def write(path: Path, text: str = WRONG) -> Path:
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8")
    return path


@needs_fifo
def test_a_fifo_in_a_checked_folder_is_skipped_and_named(tmp_path):
    write(tmp_path / "notes" / "a.md")
    os.mkfifo(tmp_path / "notes" / "note.md")
    run = check("notes", cwd=tmp_path)
    assert run.returncode == 2
    assert "notes/note.md: a FIFO, not a regular file" in run.stderr
    assert "notes/a.md:1:8: error[wrong-shape]" in run.stdout


@needs_fifo
def test_a_fifo_named_directly_is_skipped_and_the_others_checked(tmp_path):
    write(tmp_path / "a.md")
    os.mkfifo(tmp_path / "pipe.md")
    run = check("pipe.md", "a.md", cwd=tmp_path)
    assert run.returncode == 2 and "pipe.md: a FIFO, not a regular file" in run.stderr
    assert "a.md:1:8: error[wrong-shape]" in run.stdout


@pytest.mark.skipif(not os.path.exists("/dev/zero"), reason="no /dev/zero here")
@pytest.mark.parametrize("device", ["/dev/zero", "/dev/urandom"])
def test_a_symlink_to_an_endless_device_is_not_read(tmp_path, device):
    write(tmp_path / "a.md")
    (tmp_path / "x.md").symlink_to(device)
    run = check(".", cwd=tmp_path)
    assert run.returncode == 2 and "x.md: a device, not a regular file" in run.stderr
    assert "a.md:1:8: error[wrong-shape]" in run.stdout


@needs_fifo
def test_a_fifo_settings_file_stops_the_run_with_a_message(tmp_path):
    write(tmp_path / "a.md")
    os.mkfifo(tmp_path / ".notelsp.toml")
    run = check("a.md", cwd=tmp_path)
    assert run.returncode == 2 and run.stdout == ""
    assert ".notelsp.toml: cannot read it: a FIFO, not a regular file" in run.stderr


def test_every_markdown_family_type_is_found_and_other_files_are_left(tmp_path):
    for name in ("a.md", "b.markdown", "c.txt", "d.qmd", "e.Rmd", "f.mdx", "g.py", "h.csv", "sub/i.md"):
        write(tmp_path / name)
    run = check("--format", "json", ".", cwd=tmp_path)
    assert reviewed_paths(run) == ["a.md", "b.markdown", "c.txt", "d.qmd", "e.Rmd", "f.mdx", "sub/i.md"]


def test_a_file_that_is_not_a_note_is_refused_when_named(tmp_path):
    write(tmp_path / "a.md")
    write(tmp_path / "plot.py", "x = 1\n")
    run = check("plot.py", "a.md", cwd=tmp_path)
    assert run.returncode == 2 and "plot.py: not a note" in run.stderr
    assert "a.md:1:8: error[wrong-shape]" in run.stdout and "plot.py:1" not in run.stdout  # refused, never read


def test_a_pattern_without_a_slash_matches_at_any_depth(tmp_path):
    write(tmp_path / ".notelsp.toml", '[review]\nfiles = ["*.md"]\n')
    for name in ("top.md", "a/b/nested.md", "a/plain.txt"):
        write(tmp_path / name)
    run = check("--format", "json", ".", cwd=tmp_path)
    assert reviewed_paths(run) == ["a/b/nested.md", "top.md"]


def test_patterns_are_relative_to_the_settings_file_not_to_the_checked_folder(tmp_path):
    write(tmp_path / ".notelsp.toml", '[review]\nfiles = ["2026-q*/**/*.md"]\n')
    write(tmp_path / "2026-q1" / "week1" / "a.md")
    write(tmp_path / "2026-q1" / "b.md")
    write(tmp_path / "old" / "c.md")
    from_root = check("--format", "json", ".", cwd=tmp_path)
    assert reviewed_paths(from_root) == ["2026-q1/b.md", "2026-q1/week1/a.md"]
    from_inside = check("--format", "json", ".", cwd=tmp_path / "2026-q1")
    assert reviewed_paths(from_inside) == ["b.md", "week1/a.md"]


def test_each_note_uses_its_nearest_settings_file(tmp_path):
    write(tmp_path / "strict" / "a.md")
    write(tmp_path / "relaxed" / ".notelsp.toml", '[review]\ndisabled = ["wrong-shape"]\n')
    write(tmp_path / "relaxed" / "deeper" / "b.md")
    run = check("strict", "relaxed", cwd=tmp_path)
    assert "strict/a.md:1:8: error[wrong-shape]" in run.stdout
    assert "relaxed/deeper/b.md:1:8" not in run.stdout


def test_config_option_governs_every_note(tmp_path):
    write(tmp_path / "one" / "a.md")
    write(tmp_path / "two" / ".notelsp.toml", '[review]\nangle_tolerance = 3\n')
    write(tmp_path / "two" / "b.md")
    write(tmp_path / "team.toml", '[review]\ndisabled = ["wrong-shape"]\n')
    run = check("--config", "team.toml", "one", "two", cwd=tmp_path)
    assert run.returncode == 0, run.stdout + run.stderr
    assert "wrong-shape" not in run.stdout


def test_an_invalid_settings_file_stops_the_run_naming_line_and_key(tmp_path):
    write(tmp_path / "a.md")
    write(tmp_path / ".notelsp.toml", '# shared\n[review]\ndisabled = []\nangle_tolerance = "five"\n')
    run = check("a.md", cwd=tmp_path)
    assert run.returncode == 2 and run.stdout == ""
    assert ('.notelsp.toml:4: review.angle_tolerance must be a number of degrees from 0 to 45, not "five"'
            in run.stderr)


def test_a_settings_file_with_a_byte_order_mark_is_read(tmp_path):
    write(tmp_path / "a.md")
    (tmp_path / ".notelsp.toml").write_bytes(b'\xef\xbb\xbf[review]\ndisabled = ["wrong-shape"]\n')
    run = check("a.md", cwd=tmp_path)
    assert run.returncode == 0, run.stderr


def test_deeply_nested_settings_are_a_clear_error(tmp_path):
    write(tmp_path / "a.md")
    write(tmp_path / ".notelsp.toml", "[review]\nfiles = " + "[" * 500 + "]" * 500 + "\n")
    run = check("a.md", cwd=tmp_path)
    assert run.returncode == 2 and ".notelsp.toml:2: arrays or tables nested more than" in run.stderr
    assert "Traceback" not in run.stderr


@pytest.mark.parametrize("globs", [
    (), ("*.md",), ("lab/**",), ("2026-q*/**/*.md", "notes.txt"), ("**/week?.md",), ("drafts/",),
])
def test_the_command_line_and_the_server_pick_the_same_files(tmp_path, globs):
    names = ["notes.txt", "a.md", "lab/b.md", "lab/x/c.qmd", "2026-q1/w/week1.md", "2026-q2/d.md", "drafts/e.md",
             "deep/drafts/f.Rmd", "deep/notes.txt", "g.py", ".hidden/h.md", "lab/.i.md", "node_modules/j.md"]
    for name in names:
        write(tmp_path / name)
    if globs:
        write(tmp_path / ".notelsp.toml", "[review]\nfiles = " + json.dumps(list(globs)) + "\n")
    settings = settings_from_toml((tmp_path / ".notelsp.toml").read_text())[0] if globs else Settings()
    finder = NoteFinder()
    command_line = sorted(note.path.relative_to(tmp_path).as_posix() for note in finder.notes(str(tmp_path)))
    server = sorted(name for name in names if is_reviewed(name, settings))  # relative to the workspace root
    assert finder.problems == []
    assert command_line == server
