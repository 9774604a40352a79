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
from collections.abc import Callable
from dataclasses import dataclass
from functools import lru_cache
from typing import Any
from pathlib import Path
from urllib.parse import unquote, urlparse

from lsprotocol import types
from pygls.exceptions import JsonRpcException
from pygls.lsp.server import LanguageServer

from .. import __version__
from ..notation.model import Span
from ..review.document import DocumentKind, DocumentReview, kind_of_path
from ..review.findings import Finding
from ..review.host import AnalysisHost, OpenDocument
from ..review.settings import Settings
from ..review.workspace import is_reviewed
from .documents import SplicedDocument
from .positions import LineIndex, line_index
from .exiting import leave_now
from .framing import FrameInput
from .protocol import NoteProtocol, report_wire_fault

log = logging.getLogger("notelsp.server")
SETTINGS_FILE = ".notelsp.toml"
# Notebook sync (LSP 3.17), offered only to clients that declare it: the Markdown cells of notebooks
# stored as .ipynb ("jupyter-notebook", VS Code's name and the specification's examples'); see notebooks.
NOTEBOOK_SYNC = types.NotebookDocumentSyncOptions(
    notebook_selector=[types.NotebookDocumentFilterWithNotebook(
        notebook="jupyter-notebook", cells=[types.NotebookCellLanguage(language="markdown")])],
)

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
    checked: tuple[Finding, ...] = ()  # cross-check findings of annotations still there unchanged


class NoteServer(LanguageServer):
    def __init__(self) -> None:
        super().__init__("notelsp", __version__, text_document_sync_kind=types.TextDocumentSyncKind.Incremental,
                         notebook_document_sync=NOTEBOOK_SYNC, protocol_cls=NoteProtocol)
        self.settings = Settings()
        self.file_settings: Settings | None = None  # from .notelsp.toml, the base editor settings apply over
        self.pushed_settings: dict | None = None  # the "notelsp" section of the last didChangeConfiguration
        self.editor_values: dict | None = None  # the editor's section in force (pulled, else pushed)
        self.folder_settings: dict[Path, tuple[Settings, list[str]]] = {}  # nested .notelsp.toml files, read once
        self.root: Path | None = None
        self.pending: dict[str, asyncio.Task] = {}  # uri -> its scheduled diagnostics publication
        self.host = AnalysisHost()  # the one owner of the open documents' analysis (see notelsp.review.host)
        self.saved_notes = AnalysisHost()  # notes on disk for workspace diagnostics: a memory of their own
        # Set by the feature modules that know, so this module imports none of them: whether a URI is a
        # notebook's cell and then whether it is reviewed (notebooks); the geometries computed for a
        # document, and whether it names species to compute or known results it did not use (geometries);
        # what else looks at a change (the optional cross-check) or a closed document (geometries).
        self.cell_reviewed: Callable[[NoteServer, str], bool | None] = lambda ls, uri: None
        self.computed_geometries: Callable[[NoteServer, str], dict] = lambda ls, uri: {}
        self.wants_geometries: Callable[[NoteServer, str, tuple[str, ...], Any], bool] = lambda *_: False
        self.on_change: list[Callable[[NoteServer, str], None]] = []
        self.on_close: list[Callable[[NoteServer, str], None]] = []

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
        if (cell := self.cell_reviewed(self, uri)) is not None:  # a notebook's cell: judged by its notebook
            return cell
        settings, relative = self.settings_for(uri)
        return relative is not None and is_reviewed(relative, settings)

    def review_kind(self, uri: str) -> DocumentKind:
        """How a reviewed document is read: a notebook's cell as Markdown, a file by its name."""
        return "markdown" if self.cell_reviewed(self, uri) else kind_of_path(self.relative_path(uri) or uri)

    def open_document(self, uri: str):
        """The open text document, or None (never read from disk)."""
        return self.workspace.text_documents.get(unquote(uri))

    def synced(self, uri: str) -> OpenDocument | None:
        """Hand the analysis host what changed in the open document since it was last asked.

        The edits go in as the exact offsets the editor sent (kept by ``SplicedDocument``), with the
        settings that govern the document and the geometries computed so far for the species it
        names; None when the document is not open (the host forgets it).
        """
        key = unquote(uri)
        document = self.open_document(uri)
        if document is None:
            self.host.close(key)
            return None
        edits_from, edits = document.take_edits() if isinstance(document, SplicedDocument) else (None, [])
        text, version, kind = document.source, document.version, self.review_kind(uri)
        current = self.host.document(key)
        if current is None or current.kind != kind:
            self.host.open(key, version, text, kind)
        elif current.text is not text or current.version != version:
            if edits and edits_from is not None and (edits_from is current.text or edits_from == current.text):
                self.host.apply_change(key, version, edits)
                if self.host.document(key).text != text:
                    log.warning("edits of %s did not give the editor's text; taking the whole text", uri)
            self.host.open(key, version, text, kind)  # the editor's own string: later calls compare by identity
        if self.is_reviewed(uri):
            self.host.set_settings(key, self.settings_for(uri)[0])
            self.host.set_computed(key, self.computed_geometries(self, uri))
        return self.host.document(key)

    def held(self, uri: str, around: types.Position | types.Range | None = None) -> HeldDocument | None:
        """The open document with its review (from the analysis host's snapshot); reviews on demand.

        ``around``: only the annotations there are reviewed (the complete review when one is at
        hand), so hover and code actions never wait for the review of a whole large note.
        """
        document = self.synced(uri)
        if document is None:
            return None
        index = line_index(document.text, self.encoding())
        review, checked = None, ()
        if self.is_reviewed(uri):
            try:
                span = None
                if around is not None:
                    span = index.span(around) if isinstance(around, types.Range) else Span(*[index.offset(around)] * 2)
                snapshot = self.host.snapshot(document.uri, around=span)
                if snapshot is not None:
                    review, checked = snapshot.review, snapshot.checked
            except Exception:
                log.exception("review of %s failed", uri)
        return HeldDocument(uri, document.version, document.text, index, review, checked)

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
