"""Finding notes and settings files on disk, and reading them safely.

The edge of the file system for the command line and the server: which files
are notes and which ``files`` patterns select them is decided in
``notelsp.review.workspace`` (pure); this module walks folders, finds the
settings file nearest each note, and reads files.

Only regular files are read.  Each is looked at with ``os.stat`` before it is
opened, opened non-blocking (a FIFO swapped in meanwhile cannot block) and
checked again through the open descriptor, then read in chunks up to a size
cap, so a FIFO, a device or an endless file never hangs or exhausts a run.
"""

from __future__ import annotations

import codecs
import os
import re
import stat
from dataclasses import dataclass, field
from pathlib import Path

from .review.settings import MAX_SETTINGS_CHARS, Settings, SettingsProblem, settings_from_toml
from .review.workspace import NoteKind, is_hidden, is_selected, note_kind

SETTINGS_NAME = ".notelsp.toml"
# The review reads up to 4,000,000 characters and reports a larger note (note-too-large); at up to
# four bytes a character, this many bytes always hold more than that, so the rule still sees it.
MAX_NOTE_BYTES = 4 * 4_000_000 + 4
MAX_SETTINGS_BYTES = MAX_SETTINGS_CHARS
_CHUNK = 1 << 20
_NONBLOCKING = getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0) | getattr(os, "O_BINARY", 0)


class FileProblem(Exception):
    """A file that cannot be read as asked; the message is the reason, for a person."""


@dataclass(frozen=True)
class ReadText:
    """A note's text as read, and whether only its beginning was."""

    text: str
    truncated: bool  # the file was larger than the cap; ``text`` is its beginning


def read_text(path: str | os.PathLike[str], limit: int) -> ReadText:
    """The UTF-8 text of a regular file (a leading byte-order mark dropped, line breaks kept), at most ``limit`` bytes."""
    data, truncated = read_bytes(path, limit)
    decoder = codecs.getincrementaldecoder("utf-8-sig")()
    try:
        # Not final when truncated: a character cut by the cap is left out, not an error.
        text = decoder.decode(data, final=not truncated)
    except UnicodeDecodeError as error:
        raise FileProblem(f"not UTF-8 text (byte {error.start})") from None
    return ReadText(text, truncated)


def read_bytes(path: str | os.PathLike[str], limit: int, follow_links: bool = True) -> tuple[bytes, bool]:
    """(at most ``limit`` bytes of a regular file, whether it held more); raises :class:`FileProblem`.

    ``follow_links=False`` refuses a symbolic link (cache entries: a link could point anywhere).
    """
    try:
        before = os.stat(path) if follow_links else os.lstat(path)
        _must_be_regular(before.st_mode)
        descriptor = os.open(path, os.O_RDONLY | _NONBLOCKING | (0 if follow_links else getattr(os, "O_NOFOLLOW", 0)))
    except OSError as error:
        raise FileProblem(error.strerror or str(error)) from None
    try:
        after = os.fstat(descriptor)
        _must_be_regular(after.st_mode)  # what was opened, not what was looked at: no swap in between
        chunks, size = [], 0
        while size <= limit:
            chunk = os.read(descriptor, min(_CHUNK, limit + 1 - size))
            if not chunk:
                break
            chunks.append(chunk)
            size += len(chunk)
    except OSError as error:
        raise FileProblem(error.strerror or str(error)) from None
    finally:
        os.close(descriptor)
    data = b"".join(chunks)
    return (data[:limit], True) if len(data) > limit else (data, False)


def _must_be_regular(mode: int) -> None:
    if stat.S_ISREG(mode):
        return
    what = ("a folder" if stat.S_ISDIR(mode) else "a FIFO" if stat.S_ISFIFO(mode)
            else "a socket" if stat.S_ISSOCK(mode) else "a device" if stat.S_ISCHR(mode) or stat.S_ISBLK(mode)
            else "a special file")
    raise FileProblem(f"{what}, not a regular file")


def read_note(path: str | os.PathLike[str]) -> ReadText:
    """A note's text, bounded (see MAX_NOTE_BYTES); raises :class:`FileProblem`."""
    return read_text(path, MAX_NOTE_BYTES)


def read_settings_file(path: str | os.PathLike[str], base: Settings | None = None) -> tuple[Settings, list[SettingsProblem]]:
    """A settings file read and parsed; a file that cannot be read is one problem (defaults returned)."""
    try:
        read = read_text(path, MAX_SETTINGS_BYTES)
    except FileProblem as problem:
        return base or Settings(), [SettingsProblem(f"cannot read it: {problem}")]
    if read.truncated:
        return base or Settings(), [SettingsProblem(f"larger than {MAX_SETTINGS_BYTES:,} bytes; not a settings file")]
    return settings_from_toml(read.text, base)


# --- which notes a command checks ---------------------------------------------------------


@dataclass(frozen=True)
class NoteFile:
    """A note to check, its kind and the settings that govern it."""

    path: Path  # as named, or as found below a named folder (reports show it so)
    kind: NoteKind | None
    settings: Settings
    problem: str | None = None  # why it is not read: not a note type, missing


@dataclass
class _Governing:
    """The settings file that governs a folder, and the folder its patterns are relative to."""

    settings: Settings
    folder: Path | None  # the settings file's folder, which its ``files`` patterns are relative to


@dataclass
class NoteFinder:
    """Notes below the named paths, each with the settings of the nearest settings file.

    ``config`` (``--config``) governs every note instead.  Settings files are read once,
    and the nearest one of each folder is remembered.  ``problems`` collects every
    settings problem met, as ``file:line: message``.
    """

    config: str | None = None
    problems: list[str] = field(default_factory=list)
    _nearest: dict[Path, Path | None] = field(default_factory=dict)
    _parsed: dict[Path, _Governing] = field(default_factory=dict)
    _seen: set[Path] = field(default_factory=set)  # a note named twice, or below two named folders, is checked once

    def __post_init__(self) -> None:
        if self.config is not None:  # read at once: a bad --config is reported even when no note is found
            self._read_governing(Path(self.config).absolute(), shown=self.config)

    def notes(self, name: str) -> list[NoteFile]:
        """The notes a named path stands for: a note, the notes below a folder, or one refused entry."""
        path = Path(name)
        try:
            is_folder = path.is_dir()
        except OSError:
            is_folder = False
        if is_folder:
            return list(self._notes_below(path))
        kind = note_kind(name)
        real_folder = _real_folder(path.parent)
        if real_folder / path.name in self._seen:
            return []
        self._seen.add(real_folder / path.name)
        governing = self._governing(real_folder)
        if not os.path.lexists(path):
            return [NoteFile(path, kind, governing.settings, "no such file or folder")]
        if kind is None:
            return [NoteFile(path, None, governing.settings,
                             "not a note (notes end in .md, .markdown, .qmd, .Rmd, .mdx, .txt or .ipynb)")]
        return [NoteFile(path, kind, governing.settings)]  # named: checked whatever the ``files`` patterns say

    def settings_at(self, folder: Path) -> Settings:
        """The settings for a note in ``folder`` (standard input: the current folder)."""
        return self._governing(_real_folder(folder)).settings

    def _notes_below(self, top: Path):
        real_top = _real_folder(top)
        # os.walk does not follow symlinked folders: a folder loop is never entered.
        for root, folders, files in os.walk(top):
            relative_root = os.path.relpath(root, top)
            real_root = real_top if relative_root == "." else real_top / relative_root
            folders[:] = sorted(f for f in folders if not is_hidden(f + "/x"))
            governing = self._governing(real_root)
            for file in sorted(files):
                kind = note_kind(file)
                if kind is None or is_hidden(file) or real_root / file in self._seen:
                    continue
                base = governing.folder if governing.folder is not None and _is_within(real_root, governing.folder) \
                    else real_top  # no settings file, or --config elsewhere: patterns are relative to the named folder
                relative = (real_root / file).relative_to(base).as_posix()
                if is_selected(relative, governing.settings.globs):
                    self._seen.add(real_root / file)
                    yield NoteFile(Path(root, file), kind, governing.settings)

    def _governing(self, real_folder: Path) -> _Governing:
        if self.config is not None:
            return self._parsed[Path(self.config).absolute()]
        settings_file = self._nearest_file(real_folder)
        if settings_file is None:
            return _Governing(Settings(), None)
        return self._parsed.get(settings_file) or self._read_governing(settings_file, _shown_path(settings_file))

    def _read_governing(self, settings_file: Path, shown: str) -> _Governing:
        settings, problems = read_settings_file(settings_file)
        self.problems.extend(problem.located(shown) for problem in problems)
        governing = self._parsed[settings_file] = _Governing(settings, _real_folder(settings_file.parent))
        return governing

    def _nearest_file(self, folder: Path) -> Path | None:
        """The settings file in ``folder`` or the nearest folder above it, remembered per folder."""
        looked_at: list[Path] = []
        found: Path | None = None
        for candidate_folder in (folder, *folder.parents):
            if candidate_folder in self._nearest:
                found = self._nearest[candidate_folder]
                break
            looked_at.append(candidate_folder)
            candidate = candidate_folder / SETTINGS_NAME
            if os.path.lexists(candidate):  # present, even if dangling or not a file: reading it says what is wrong
                found = candidate
                break
        for looked in looked_at:
            self._nearest[looked] = found
        return found


def _real_folder(folder: Path) -> Path:
    try:
        return Path(os.path.realpath(folder.absolute()))
    except (OSError, RuntimeError, ValueError):  # a symlink loop: look from where it was named instead
        return folder.absolute()


def _is_within(folder: Path, ancestor: Path) -> bool:
    return folder == ancestor or ancestor in folder.parents


def _shown_path(path: Path) -> str:
    """A settings file as the user would write it: relative to the current folder when below it."""
    try:
        relative = os.path.relpath(path)
    except ValueError:  # another drive
        return str(path)
    return str(path) if relative.startswith("..") else relative


def json_nesting_depth(text: str) -> int:
    """How deeply ``text``'s JSON arrays and objects nest, counted without parsing (strings skipped).

    Checked before ``json.loads``, whose recursion a deeply nested file would exhaust.  An
    unterminated string leaves its brackets counted: the depth can only come out larger, and
    such text is no JSON anyway.
    """
    depth = deepest = 0
    for bracket in _JSON_BRACKET.findall(_JSON_STRING.sub("", text)):
        if bracket in "[{":
            depth += 1
            deepest = max(deepest, depth)
        else:
            depth -= 1
    return deepest


_JSON_STRING = re.compile(r'"(?:[^"\\]|\\.)*"')
_JSON_BRACKET = re.compile(r"[\[\]{}]")


def read_cache_entry(path: str | os.PathLike[str], limit: int) -> bytes | None:
    """The bytes of a cache entry: a regular file (no link) of at most ``limit`` bytes; else None. Never blocks."""
    try:
        data, truncated = read_bytes(path, limit, follow_links=False)
    except FileProblem:
        return None
    return None if truncated else data


def bounded_json(data: bytes, max_nesting: int):
    """JSON from ``data``, refused (ValueError with the reason) unless UTF-8 and nested at most ``max_nesting``."""
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as error:
        raise ValueError("not UTF-8") from error
    if json_nesting_depth(text) > max_nesting:
        raise ValueError(f"nested deeper than {max_nesting}")
    import json  # notebooks only: a check of notes never loads it

    try:
        return json.loads(text)
    except (ValueError, RecursionError) as error:
        raise ValueError(f"not JSON: {error}") from error
