"""Settings: ``.notelsp.toml`` at the workspace root, then the editor's "notelsp" section over it.

A document below a folder with a ``.notelsp.toml`` of its own is governed by that nearest file
instead, as on the command line (``NoteServer.settings_for``).

The editor's section comes two ways.  Clients that answer
``workspace/configuration`` are asked for it (pulled) at start-up and on every
``workspace/didChangeConfiguration``.  Clients that only push (Kate 22.12,
Neovim 0.7) send it as the ``settings`` of ``workspace/didChangeConfiguration``
and are never asked; the last pushed section is kept and applied the same way.
A pulled answer, when there is one, wins over a pushed section.  Both forms
take the keys of the ``[review]`` table, flat or inside a ``review`` table.

Reading the file is the server's job (I/O at the edge); parsing is
``notelsp.review.settings``.  Problems are shown as an error message in the
editor, naming the file or the editor setting, and only the bad values fall
back to their defaults: a bad config never stops the server.
"""

from __future__ import annotations

import logging
import os
from collections.abc import Mapping

from lsprotocol import types

from ..notefiles import read_settings_file
from ..review.settings import Settings, SettingsProblem, settings_from_mapping
from .app import NoteServer

log = logging.getLogger("notelsp.server")
CONFIG_FILE = ".notelsp.toml"
SECTION = "notelsp"


def _file_settings(ls: NoteServer) -> tuple[Settings, list[str]]:
    if ls.root is None:
        return Settings(), []
    path = ls.root / CONFIG_FILE
    if not os.path.lexists(path):
        return Settings(), []
    # Read as the command line reads it: a regular file only (a FIFO never blocks), size-capped.
    settings, problems = read_settings_file(path)
    return settings, [SettingsProblem(f"line {p.line}: {p}" if p.line else p, p.line) for p in problems]


def section_of(settings: object) -> Mapping | None:
    """The review keys in an editor's settings: ``{"notelsp": {...}}`` or ``{"notelsp": {"review": {...}}}``."""
    value = settings.get(SECTION) if isinstance(settings, Mapping) else None
    return _review_table(value)


def _review_table(value: object) -> Mapping | None:
    if isinstance(value, Mapping) and isinstance(value.get("review"), Mapping):
        value = value["review"]  # accept {"notelsp": {"review": {...}}} as well as the flat form
    return value if isinstance(value, Mapping) else None


async def _pulled_values(ls: NoteServer) -> Mapping | None:
    capabilities = ls.client_capabilities.workspace
    if capabilities is None or not capabilities.configuration:
        return None
    try:
        answer = await ls.workspace_configuration_async(
            types.ConfigurationParams(items=[types.ConfigurationItem(section=SECTION)])
        )
    except Exception as error:  # a client that fails the request still gets a working server
        log.warning("workspace/configuration failed: %s", error)
        return None
    return _review_table(answer[0] if answer else None)


async def _editor_values(ls: NoteServer) -> Mapping | None:
    """The editor's section: pulled from a client that answers, else the last one pushed."""
    pulled = await _pulled_values(ls)
    return pulled if pulled is not None else ls.pushed_settings


async def reload_settings(ls: NoteServer) -> None:
    settings, problems = _file_settings(ls)
    problems = [f"{CONFIG_FILE}: {p}" for p in problems]
    values = await _editor_values(ls)
    if values:
        settings, more = settings_from_mapping(values, settings)
        problems += [f"editor setting {SECTION}: {p}" for p in more]
    ls.settings, ls.editor_values = settings, dict(values) if values else None
    ls.folder_settings.clear()  # nested settings files are read again, with the editor's section over them
    if problems:
        ls.show("notelsp settings problem (defaults kept for these): " + "; ".join(problems), types.MessageType.Error)
    from .diagnostics import refresh_all

    refresh_all(ls)


async def watch_config_file(ls: NoteServer) -> None:
    watched = ls.client_capabilities.workspace and ls.client_capabilities.workspace.did_change_watched_files
    if not (watched and watched.dynamic_registration):
        return
    options = types.DidChangeWatchedFilesRegistrationOptions(
        watchers=[types.FileSystemWatcher(glob_pattern=f"**/{CONFIG_FILE}")]
    )
    try:
        await ls.client_register_capability_async(
            types.RegistrationParams(
                registrations=[
                    types.Registration(
                        id="notelsp-config", method=types.WORKSPACE_DID_CHANGE_WATCHED_FILES, register_options=options
                    )
                ]
            )
        )
    except Exception as error:
        log.info("client refused to watch %s: %s", CONFIG_FILE, error)


def register(server: NoteServer) -> None:
    @server.feature(types.WORKSPACE_DID_CHANGE_CONFIGURATION)
    async def changed_configuration(ls: NoteServer, params: types.DidChangeConfigurationParams) -> None:
        if params.settings is not None:  # null: a pulling client's "ask me again"; keep what was pushed
            pushed = section_of(params.settings)
            ls.pushed_settings = dict(pushed) if pushed is not None else None
        await reload_settings(ls)

    @server.feature(types.WORKSPACE_DID_CHANGE_WATCHED_FILES)
    async def changed_files(ls: NoteServer, params: types.DidChangeWatchedFilesParams) -> None:
        if any(change.uri.endswith(CONFIG_FILE) for change in params.changes):
            await reload_settings(ls)
