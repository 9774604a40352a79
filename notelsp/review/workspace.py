"""Which files are notes, which of them the ``files`` patterns select, and reviews cached by their inputs.

Pure: paths are strings, nothing is read.  The command line (through
``notelsp.notefiles``) and the server both decide here, so they agree.

``files`` patterns are gitignore-like and matched against a note's path
relative to the folder of the settings file that holds them (the workspace
root for editor settings, or when there is no file):

- ``*`` and ``?`` match within one folder or file name, ``[...]`` is a class
  as in :mod:`fnmatch` (``[!...]`` negates); none of them matches ``/``;
- a whole ``**`` segment spans folders: ``**/`` zero or more, a final ``/**``
  everything below;
- a pattern with no ``/`` but at its end (``*.md``, ``drafts/``) matches a name
  at any depth; one with a ``/`` elsewhere is anchored at the settings folder;
- a pattern that matches a folder selects the notes inside it; a final ``/``
  matches folders only.

Matching simulates the pattern as a small automaton over the path, so its cost
is at most (pattern length) × (path length), whatever the pattern.
"""

from __future__ import annotations

import fnmatch
import re
from functools import lru_cache
from typing import Literal, NamedTuple

from .settings import Settings

NoteKind = Literal["markdown", "text", "notebook"]

# Lower-case suffix -> kind.  Quarto (.qmd), R Markdown (.Rmd) and MDX are Markdown with extras the
# scanner already skips (code chunks are fenced code); a notebook's Markdown cells are its notes.
NOTE_KINDS: dict[str, NoteKind] = {
    ".md": "markdown",
    ".markdown": "markdown",
    ".qmd": "markdown",
    ".rmd": "markdown",
    ".mdx": "markdown",
    ".txt": "text",
    ".ipynb": "notebook",
}
NOTE_SUFFIXES = tuple(NOTE_KINDS)
# Folders never searched for notes (version control, dependencies, caches), besides hidden ones.
SKIPPED_FOLDERS = frozenset({".git", ".hg", ".svn", "_darcs", "CVS", "node_modules", "__pycache__"})


def note_kind(path: str) -> NoteKind | None:
    """The kind of note a file name says it is, or None when it is not a note."""
    name = path.replace("\\", "/").rsplit("/", 1)[-1]
    dot = name.rfind(".")
    return NOTE_KINDS.get(name[dot:].lower()) if dot > 0 else None


def is_hidden(relative_path: str) -> bool:
    """Whether a path (relative to where the search starts) goes through a hidden or skipped folder or is hidden."""
    parts = relative_path.replace("\\", "/").strip("/").split("/")
    return any(part.startswith(".") and part not in (".", "..") for part in parts) or any(
        part in SKIPPED_FOLDERS for part in parts[:-1])


def is_selected(relative_path: str, globs: tuple[str, ...]) -> bool:
    """Whether any ``files`` pattern selects the path (relative to the patterns' folder, ``/``-separated)."""
    path = relative_path.replace("\\", "/").strip("/")
    return bool(path) and any(glob_matches(glob, path) for glob in globs)


def is_reviewed(relative_path: str, settings: Settings) -> bool:
    """Whether the server reviews a document (path relative to the workspace root, ``/``-separated).

    Notebooks are not reviewed as open documents: their text is JSON, and only their
    Markdown cells are notes (the command line reads those).
    """
    kind = note_kind(relative_path)
    if kind is None or kind == "notebook":
        return False
    return not is_hidden(relative_path) and is_selected(relative_path, settings.globs)


# --- the pattern automaton ---------------------------------------------------------------

_LITERAL, _ONE, _CLASS, _STAR, _FOLDERS, _BELOW = range(6)


class _Step(NamedTuple):
    kind: int
    char: str = ""  # _LITERAL
    members: re.Pattern[str] | None = None  # _CLASS: matches one character


class _Compiled(NamedTuple):
    steps: tuple[_Step, ...]
    folders_only: bool


def glob_matches(glob: str, path: str) -> bool:
    """Whether ``glob`` selects ``path`` (normalised: ``/``-separated, no leading or doubled ``/``)."""
    compiled = _compile(glob)
    if not compiled.steps:
        return False
    steps, count = compiled.steps, len(compiled.steps)
    # Two states per step: at it (for _FOLDERS: at the start of a folder name), and inside it
    # (_FOLDERS: within a folder name; _BELOW: past at least one character).
    at, inside = bytearray(count + 1), bytearray(count + 1)
    at[0] = 1
    _close(steps, at)
    for position, char in enumerate(path):
        if char == "/":
            # The path so far is a folder holding the file: a pattern matching it selects the file.
            if _accepts(steps, at, inside):
                return True
        next_at, next_inside = bytearray(count + 1), bytearray(count + 1)
        for index in range(count):
            step = steps[index]
            kind = step.kind
            if at[index]:
                if kind == _LITERAL:
                    if char == step.char:
                        next_at[index + 1] = 1
                elif kind == _BELOW:
                    next_inside[index] = 1
                elif char != "/":
                    if kind == _ONE or kind == _CLASS and step.members.match(char):
                        next_at[index + 1] = 1
                    elif kind == _STAR:
                        next_at[index] = 1
                    elif kind == _FOLDERS:
                        next_inside[index] = 1
            if inside[index]:
                if kind == _BELOW:
                    next_inside[index] = 1
                elif char != "/":  # _FOLDERS within a name
                    next_inside[index] = 1
                else:
                    next_at[index] = 1
        if not any(next_at) and not any(next_inside):
            return False
        at, inside = next_at, next_inside
        _close(steps, at)
    return not compiled.folders_only and _accepts(steps, at, inside)


def _close(steps: tuple[_Step, ...], at: bytearray) -> None:
    """Follow the steps that may match nothing (``*``, ``**/``); they only lead forward, so one pass."""
    for index, step in enumerate(steps):
        if at[index] and (step.kind == _STAR or step.kind == _FOLDERS):
            at[index + 1] = 1


def _accepts(steps: tuple[_Step, ...], at: bytearray, inside: bytearray) -> bool:
    return bool(at[len(steps)]) or (steps[-1].kind == _BELOW and bool(inside[len(steps) - 1]))


@lru_cache(maxsize=256)
def _compile(glob: str) -> _Compiled:
    pattern = glob.replace("\\", "/")
    folders_only = pattern.endswith("/")
    pattern = pattern.rstrip("/")
    if "/" in pattern:
        pattern = pattern.lstrip("/")  # a leading "/" only anchors, as a middle one does
    else:
        pattern = "**/" + pattern  # a bare name matches at any depth
    if not pattern:
        return _Compiled((), folders_only)
    segments = pattern.split("/")
    steps: list[_Step] = []
    for number, segment in enumerate(segments):
        last = number == len(segments) - 1
        if segment == "**":
            steps.append(_Step(_BELOW if last else _FOLDERS))
            continue  # _FOLDERS takes its own "/" after each folder name
        steps.extend(_segment_steps(segment))
        if not last:
            steps.append(_Step(_LITERAL, "/"))
    return _Compiled(tuple(steps), folders_only)


def _segment_steps(segment: str) -> list[_Step]:
    steps: list[_Step] = []
    index, length = 0, len(segment)
    while index < length:
        char = segment[index]
        index += 1
        if char == "*":
            if not (steps and steps[-1].kind == _STAR):  # "**" inside a name is one "*"
                steps.append(_Step(_STAR))
        elif char == "?":
            steps.append(_Step(_ONE))
        elif char == "[" and (end := _class_end(segment, index)) is not None:
            # fnmatch's own reading of the class, compiled to match exactly one character
            steps.append(_Step(_CLASS, members=re.compile(fnmatch.translate(segment[index - 1:end + 1]))))
            index = end + 1
        else:
            steps.append(_Step(_LITERAL, char))
    return steps


def _class_end(segment: str, start: int) -> int | None:
    """Where the class opened just before ``start`` closes (fnmatch's rule: a leading ``!`` and ``]`` belong to it)."""
    index = start
    if index < len(segment) and segment[index] == "!":
        index += 1
    if index < len(segment) and segment[index] == "]":
        index += 1
    while index < len(segment) and segment[index] != "]":
        index += 1
    return index if index < len(segment) else None
