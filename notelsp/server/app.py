"""The language server object: held documents, settings, feature registration.

Handlers live in one small module per feature (``notelsp.server.<feature>``),
each with ``register(server)``; this module only builds the server and holds
what they share.  No chemistry here: reviews come from ``notelsp.review``.
"""

from __future__ import annotations

import asyncio
import gc
import importlib
import logging
import sys
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from urllib.parse import unquote, urlparse

from lsprotocol import types
from pygls.exceptions import JsonRpcException
from pygls.lsp.server import LanguageServer

from .. import __version__
from ..notation.model import Span
from ..review.document import DocumentReview, kind_of_path, review_around, review_text
from ..review.settings import Settings
from ..review.workspace import cached_review, is_reviewed
from .positions import LineIndex, line_index
from .exiting import leave_now
from .framing import FrameInput
from .protocol import NoteProtocol, report_wire_fault

log = logging.getLogger("notelsp.server")
SETTINGS_FILE = ".notelsp.toml"

# Registered in this order; optional modules are skipped when they cannot be imported.
FEATURES = (
    "lifecycle",
    "configuration",
    "diagnostics",
    "hover",
    "code_actions",
    "completion",
    "inlay_hints",
    "symbols",
    "workspace_diagnostics",
    "workspace_symbols",
    "semantic_tokens",
    "notebooks",
    "geometries",
)
OPTIONAL_FEATURES = ("crosscheck",)


@dataclass(frozen=True)
class HeldDocument:
    """One open document as the server sees it, with its review."""

    uri: str
    version: int | None
    text: str
    index: LineIndex
    review: DocumentReview | None  # None when the file type is not reviewed or the review failed


class NoteServer(LanguageServer):
    def __init__(self) -> None:
        super().__init__("notelsp", __version__, text_document_sync_kind=types.TextDocumentSyncKind.Incremental,
                         protocol_cls=NoteProtocol)
        self.settings = Settings()
        self.file_settings: Settings | None = None  # from .notelsp.toml, the base editor settings apply over
        self.pushed_settings: dict | None = None  # the "notelsp" section of the last didChangeConfiguration
        self.editor_values: dict | None = None  # the editor's section in force (pulled, else pushed)
        self.folder_settings: dict[Path, tuple[Settings, list[str]]] = {}  # nested .notelsp.toml files, read once
        self.root: Path | None = None
        self.pending: dict[str, asyncio.Task] = {}  # uri -> its scheduled diagnostics publication

    def start_io(self, stdin=None, stdout=None) -> None:
        """Serve ``stdin`` (the fast start-up hands a :class:`~.quickstart.ClientInput`)."""
        # End of input means the client is gone: leave at once (status 0, or 1 after an exit
        # without shutdown), without waiting for running reviews.
        frames = stdin if isinstance(stdin, FrameInput) else FrameInput(stdin or sys.stdin.buffer)
        frames.on_end = lambda: leave_now(self.protocol.exit_status)  # bounded frames only: see framing
        super().start_io(frames, stdout)

    def report_server_error(self, error: Exception, source) -> None:
        if source is JsonRpcException:  # the reader's own: a faulty frame from the client, not our failure
            report_wire_fault(self.protocol, error)
        else:
            super().report_server_error(error, source)

    # --- shared helpers for the feature modules ---------------------------------

    def encoding(self) -> str:
        encoding = self.workspace.position_encoding or types.PositionEncodingKind.Utf16
        return str(getattr(encoding, "value", encoding))

    def relative_path(self, uri: str) -> str | None:
        """The document's path relative to the workspace root (or its name), None for non-file URIs."""
        return _relative_path(uri, self.root)

    def settings_for(self, uri: str) -> tuple[Settings, str | None]:
        """The settings that govern a document and its path relative to their file's folder.

        As on the command line, the nearest ``.notelsp.toml`` between the document's folder and
        the workspace root governs it, with the editor's section over it; the root's own (or
        none) is ``self.settings``.  Nested files are read once, until settings are reloaded.
        """
        relative = self.relative_path(uri)
        if relative is None or self.root is None or "/" not in relative or urlparse(uri).scheme not in ("file", ""):
            return self.settings, relative
        parts = relative.split("/")
        for depth in range(len(parts) - 1, 0, -1):
            folder = self.root.joinpath(*parts[:depth])
            if (folder / SETTINGS_FILE).is_file():
                return self._folder_settings(folder), "/".join(parts[depth:])
        return self.settings, relative

    def _folder_settings(self, folder: Path) -> Settings:
        from ..notefiles import read_settings_file
        from ..review.settings import settings_from_mapping

        if folder not in self.folder_settings:
            settings, problems = read_settings_file(folder / SETTINGS_FILE)
            messages = [f"{folder / SETTINGS_FILE}: {problem}" for problem in problems]
            if self.editor_values:
                settings, more = settings_from_mapping(self.editor_values, settings)
                messages += [f"editor setting: {problem}" for problem in more]
            self.folder_settings[folder] = (settings, messages)
            if messages:
                self.show("notelsp settings problem (defaults kept for these): " + "; ".join(messages),
                          types.MessageType.Error)
        return self.folder_settings[folder][0]

    def is_reviewed(self, uri: str) -> bool:
        from .notebooks import reviewed_cell  # a notebook's cell is judged by its notebook, not its URI

        if (cell := reviewed_cell(self, uri)) is not None:
            return cell
        settings, relative = self.settings_for(uri)
        return relative is not None and is_reviewed(relative, settings)

    def review_kind(self, uri: str):
        """How a reviewed document is read: a notebook's cell as Markdown, a file by its name."""
        from .notebooks import reviewed_cell

        return "markdown" if reviewed_cell(self, uri) else kind_of_path(self.relative_path(uri) or uri)

    def open_document(self, uri: str):
        """The open text document, or None (never read from disk)."""
        return self.workspace.text_documents.get(unquote(uri))

    def held(self, uri: str, around: types.Position | types.Range | None = None) -> HeldDocument | None:
        """The open document with its (cached) review; reviews on demand.

        ``around``: only the annotations there are reviewed (the complete review when one is at
        hand), so hover and code actions never wait for the review of a whole large note.
        """
        document = self.open_document(uri)
        if document is None:
            return None
        text = document.source
        index = line_index(text, self.encoding())
        review = None
        if self.is_reviewed(uri):
            try:
                from .geometries import computed_for

                settings = self.settings_for(uri)[0]
                computed = computed_for(self, uri)  # geometries computed so far for the species it names
                if around is None:
                    review = (review_text(text, self.review_kind(uri), settings, computed=computed) if computed
                              else cached_review(text, self.review_kind(uri), settings))
                else:
                    span = index.span(around) if isinstance(around, types.Range) else Span(*[index.offset(around)] * 2)
                    review = review_around(text, self.review_kind(uri), settings, span, computed=computed)
            except Exception:
                log.exception("review of %s failed", uri)
        return HeldDocument(uri, document.version, text, index, review)

    def show(self, message: str, kind: types.MessageType = types.MessageType.Warning) -> None:
        log.warning("%s", message)
        self.window_log_message(types.LogMessageParams(type=kind, message=message))
        self.window_show_message(types.ShowMessageParams(type=kind, message=message))


@lru_cache(maxsize=1024)  # resolving a path touches the file system; asked on every request
def _relative_path(uri: str, root: Path | None) -> str | None:
    parsed = urlparse(uri)
    if parsed.scheme not in ("file", ""):
        return Path(unquote(parsed.path)).name or None
    path = Path(unquote(parsed.path))
    if root is not None:
        try:
            return path.resolve().relative_to(root.resolve()).as_posix()
        except (ValueError, OSError, RuntimeError):  # outside the root, or a symlink loop
            pass
    return path.name


def settle_long_lived_objects() -> None:
    """Take what exists now (modules, grammar, element tables) out of the cyclic collector's full passes.

    A review allocates enough to trigger a full collection every few dozen
    edits; over the ~150,000 objects of the loaded libraries each took ~65 ms,
    longer than the whole edit-to-diagnostics path.  Call after loading them.
    """
    gc.freeze()


def build_server() -> NoteServer:
    server = NoteServer()
    for name in FEATURES:
        importlib.import_module(f"{__package__}.{name}").register(server)
    for name in OPTIONAL_FEATURES:
        try:
            module = importlib.import_module(f"{__package__}.{name}")
        except ImportError:
            log.info("optional feature %s is not available", name)
            continue
        module.register(server)
    return server
