"""initialize / initialized: remember the workspace root, warm element data, load settings."""

from __future__ import annotations

import threading
from pathlib import Path
from urllib.parse import unquote, urlparse

from lsprotocol import types

from .. import elements
from .app import NoteServer, settle_long_lived_objects


def _root_of(params: types.InitializeParams) -> Path | None:
    uri = params.root_uri
    if uri is None and params.workspace_folders:
        uri = params.workspace_folders[0].uri
    if uri is not None:
        return Path(unquote(urlparse(uri).path))
    return Path(params.root_path) if params.root_path else None


def _load_element_data() -> None:
    elements.preload()
    settle_long_lived_objects()  # the tables live as long as the process


def register(server: NoteServer) -> None:
    @server.feature(types.INITIALIZE)
    def initialize(ls: NoteServer, params: types.InitializeParams) -> None:
        ls.root = _root_of(params)

    @server.feature(types.INITIALIZED)
    async def initialized(ls: NoteServer, params: types.InitializedParams) -> None:
        # mendeleev takes seconds to load: do it off the request path so start-up stays fast.
        threading.Thread(target=_load_element_data, name="notelsp-preload", daemon=True).start()
        from .configuration import reload_settings, watch_config_file

        await reload_settings(ls)
        await watch_config_file(ls)
