"""workspace/symbol: where the notes of the workspace name a species.

One symbol per formula written in an annotation, named as written, in the
note (the container) and at the place it stands, for the open notes and the
note files under the root (chosen as for workspace diagnostics).  The query
matches case-insensitively inside the formula, with subscript digits read as
digits (``clf3`` finds ``ClF₃``); an empty query lists every species.  At most
``MAX_SYMBOLS`` are returned.  A file on disk is scanned once per
modification time and size.
"""

from __future__ import annotations

import asyncio
import logging
from functools import lru_cache
from pathlib import Path

from lsprotocol import types

from ..notation.scanner import scan
from ..review.document import kind_of_path
from .app import NoteServer
from .positions import line_index
from .workspace_diagnostics import MAX_NOTES, UnreadableNote, local_path, note_files, read_saved_note

log = logging.getLogger("notelsp.server")
MAX_SYMBOLS = 500
_SUBSCRIPT_DIGITS = str.maketrans("₀₁₂₃₄₅₆₇₈₉", "0123456789")

# (name, start line, start character, end line, end character) of each formula in a note
Named = tuple[str, int, int, int, int]


def searchable(text: str) -> str:
    return text.translate(_SUBSCRIPT_DIGITS).casefold()


def species_named(text: str, kind: str, encoding: str) -> tuple[Named, ...]:
    index = line_index(text, encoding)
    named = []
    for annotation in scan(text, kind).annotations:
        for formula in annotation.formulas:
            start = index.line_character(formula.span.start)
            end = index.line_character(formula.span.end)
            named.append((formula.text, *start, *end))
    return tuple(named)


@lru_cache(maxsize=MAX_NOTES)
def _species_in_file(path: str, modified: int, size: int, encoding: str) -> tuple[Named, ...]:
    return species_named(read_saved_note(Path(path)), kind_of_path(path), encoding)


def _symbols(uri: str, container: str, named: tuple[Named, ...], query: str, found: list) -> None:
    for name, line, character, end_line, end_character in named:
        if len(found) >= MAX_SYMBOLS:
            return
        if query in searchable(name):
            where = types.Range(types.Position(line, character), types.Position(end_line, end_character))
            found.append(types.WorkspaceSymbol(name=name, kind=types.SymbolKind.Struct,
                                               location=types.Location(uri=uri, range=where),
                                               container_name=container))


def workspace_symbols(open_notes: list[tuple[str, str, str, str]], root: Path | None, settings, encoding: str,
                      query: str) -> list[types.WorkspaceSymbol]:
    """``open_notes``: (uri, container name, text, kind) of each open reviewed note."""
    query = searchable(query.strip())
    found: list[types.WorkspaceSymbol] = []
    open_paths = set()
    for uri, container, text, kind in open_notes:
        if (path := local_path(uri)) is not None:
            open_paths.add(path)
        _symbols(uri, container, species_named(text, kind, encoding), query, found)
    if root is None or not root.is_dir():
        return found
    for count, path in enumerate(note_files(root, settings)):
        if len(found) >= MAX_SYMBOLS or count >= MAX_NOTES:
            break
        try:
            resolved = path.resolve()
            if resolved in open_paths:
                continue
            status = resolved.stat()
            named = _species_in_file(str(resolved), status.st_mtime_ns, status.st_size, encoding)
        except (OSError, RuntimeError, UnreadableNote) as problem:
            log.info("workspace symbols: %s skipped: %s", path, problem)
            continue
        _symbols(resolved.as_uri(), path.relative_to(root).as_posix(), named, query, found)
    return found


def register(server: NoteServer) -> None:
    @server.feature(types.WORKSPACE_SYMBOL)
    async def symbols(ls: NoteServer, params: types.WorkspaceSymbolParams) -> list[types.WorkspaceSymbol]:
        open_notes = [
            (uri, ls.relative_path(uri) or uri, document.source, ls.review_kind(uri))  # a notebook cell: Markdown
            for uri, document in list(ls.workspace.text_documents.items())
            if ls.is_reviewed(uri)
        ]
        return await asyncio.to_thread(workspace_symbols, open_notes, ls.root, ls.settings, ls.encoding(), params.query)
