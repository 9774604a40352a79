"""Reading notes and settings files: regular files only, bounded, and the nearest settings file per folder."""

import os

import pytest

from notelsp import notefiles
from notelsp.notefiles import FileProblem, NoteFinder, read_settings_file, read_text

needs_fifo = pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="no named pipes here")


def test_text_keeps_line_breaks_and_drops_a_byte_order_mark(tmp_path):
    note = tmp_path / "a.md"
    note.write_bytes(b"\xef\xbb\xbfone\r\ntwo\n")
    read = read_text(note, 100)
    assert read.text == "one\r\ntwo\n" and not read.truncated


def test_a_file_over_the_cap_is_cut_at_a_whole_character(tmp_path):
    note = tmp_path / "a.md"
    note.write_bytes("é".encode() * 10)  # two bytes each in UTF-8 (RFC 3629)
    read = read_text(note, 5)
    assert read.truncated and read.text == "éé"  # the third character, cut in half, is left out


def test_text_that_is_not_utf8_is_named_with_its_byte(tmp_path):
    note = tmp_path / "a.md"
    note.write_bytes(b"ok \xff")
    with pytest.raises(FileProblem, match=r"not UTF-8 text \(byte 3\)"):
        read_text(note, 100)


@needs_fifo
def test_a_fifo_is_refused_without_being_waited_on(tmp_path):
    pipe = tmp_path / "p.md"
    os.mkfifo(pipe)
    with pytest.raises(FileProblem, match="a FIFO, not a regular file"):
        read_text(pipe, 100)


@needs_fifo
def test_a_fifo_settings_file_is_a_problem_not_a_hang(tmp_path):
    os.mkfifo(tmp_path / ".notelsp.toml")
    settings, (problem,) = read_settings_file(tmp_path / ".notelsp.toml")
    assert "a FIFO, not a regular file" in problem and settings.globs == ("**/*",)


def test_a_folder_is_refused(tmp_path):
    with pytest.raises(FileProblem, match="a folder, not a regular file"):
        read_text(tmp_path, 100)


def test_an_oversized_settings_file_is_refused(tmp_path, monkeypatch):
    monkeypatch.setattr(notefiles, "MAX_SETTINGS_BYTES", 64)
    config = tmp_path / ".notelsp.toml"
    config.write_text("[review]\n" + "# x\n" * 40)
    _, (problem,) = read_settings_file(config)
    assert "larger than 64 bytes" in problem


def test_nearest_settings_files_are_looked_up_once_per_folder(tmp_path, monkeypatch):
    (tmp_path / ".notelsp.toml").write_text('[review]\nangle_tolerance = 2\n')
    for folder in ("a/b/c", "a/d"):
        (tmp_path / folder).mkdir(parents=True)
        (tmp_path / folder / "n.md").write_text("x\n")
    looked = []
    real_lexists = os.path.lexists
    monkeypatch.setattr(notefiles.os.path, "lexists", lambda p: looked.append(str(p)) or real_lexists(p))
    finder = NoteFinder()
    notes = finder.notes(str(tmp_path / "a"))
    assert len(notes) == 2 and all(note.settings.angle_tolerance == 2.0 for note in notes)
    candidates = [p for p in looked if p.endswith(".notelsp.toml")]
    assert len(candidates) == len(set(candidates))  # each folder asked once: a, a/b, a/b/c, a/d, then the root
