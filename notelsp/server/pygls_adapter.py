"""The one place notelsp reaches into pygls's private names (pinned: pygls == ``PYGLS_VERSION``).

Everything else in ``notelsp.server`` uses pygls's public API: its server
and protocol classes, the ``lsp_*`` built-in handlers and public methods it
overrides (``structure_message``, ``handle_message``, ``set_writer``), the
workspace's ``text_documents`` and the documents' ``apply_change`` and
``source``.  What is left here has no public equivalent in pygls 2.1.1:

``JsonRPCProtocol._request_futures`` (read and replaced)
    pygls files the future of every notification it handles, and of every
    step of a generator handler (its built-in ``didOpen``, ``didChange``,
    ``executeCommand``, ...), under a fresh uuid nobody asks for again, so
    the dict grows by one entry per message for the whole session.  Here it
    is replaced by a dict that drops each future once done.  User-visible
    gain: a long editing session does not grow the server's memory.
    Measured in process (the session of
    ``tests/reliability/test_session_memory.py``, one-character edits, traced
    with tracemalloc): after 10,000 edits pygls alone still holds 10,003
    futures, about 19.6 MB more than with this (some 2 KB per message), and
    the process peaks at 188 MB instead of 109 MB; with it, none is held.

Upgrading pygls is a deliberate act: change ``PYGLS_VERSION`` and the pin in
``pyproject.toml`` together, and ``tests/server/test_pygls_adapter.py`` says
which private name moved or changed its shape (it records each one) before
anything else runs into it.
"""

from __future__ import annotations

from typing import Any

PYGLS_VERSION = "2.1.1"

# (pygls module, class, attribute): every private name used below, for the adapter's test.
PRIVATE_NAMES = (
    ("pygls.protocol.json_rpc", "JsonRPCProtocol", "_request_futures"),
)


class _FuturesDroppedWhenDone(dict):
    """pygls's in-flight futures by message id, each entry removed once its future is done."""

    def __setitem__(self, msg_id: Any, future: Any) -> None:
        super().__setitem__(msg_id, future)
        if hasattr(future, "add_done_callback"):  # concurrent and asyncio futures alike
            future.add_done_callback(lambda done: self._drop(msg_id, done))

    def _drop(self, msg_id: Any, future: Any) -> None:
        if self.get(msg_id) is future:  # a request's own entry may have been taken (and the id reused) already
            self.pop(msg_id, None)

    def items(self):  # pygls cancels futures while walking the items (shutdown): walk a copy
        return list(super().items())


def drop_finished_futures(protocol: Any) -> None:
    """Make ``protocol`` (a pygls protocol, just built) forget each handler's future once it is done."""
    protocol._request_futures = _FuturesDroppedWhenDone(protocol._request_futures)


def held_futures(protocol: Any) -> int:
    """How many handler futures ``protocol`` still holds (for the session-memory tests)."""
    return len(protocol._request_futures)
