"""JSON-RPC faults from the client: every readable request id gets an answer, junk is logged.

pygls drops a request whose params cannot be read (the client then waits
forever) and pops an error up in the editor for every unreadable frame.  Here
such a request is answered with its JSON-RPC error, frames that are not
messages are answered per JSON-RPC 2.0 (error with id null), and nothing is
shown in the editor for a fault of the wire.
"""

from __future__ import annotations

import logging
import os
import sys
from typing import Any, Callable, NoReturn

from pygls.exceptions import (
    JsonRpcException,
    JsonRpcInvalidParams,
    JsonRpcInvalidRequest,
    JsonRpcMethodNotFound,
    JsonRpcParseError,
)
from pygls.protocol import LanguageServerProtocol

log = logging.getLogger("notelsp.server")


HEADER = b"Content-Length:"


def leave_now(status: int = 0) -> NoReturn:
    """Exit at once: a review still running or the interpreter's teardown (over a second with
    the element tables loaded) must not keep a server alive whose client is gone."""
    for stream in (sys.stdout, sys.stderr):
        try:
            stream.flush()
        except Exception:  # the client may have closed the pipe: nothing left to tell it
            pass
    logging.shutdown()
    os._exit(status)


class ResyncingInput:
    """The client's byte stream, read so that a wrong Content-Length costs one frame, not the session.

    After a frame with a wrong length the next header shares its line with the
    tail of a body; pygls only accepts a header at the start of a line, so it
    would never find one again.  Junk before a header is dropped here.
    """

    def __init__(self, stream, on_end: Callable[[], Any] | None = None) -> None:
        self.stream = stream
        self.on_end = on_end  # called when the client closes its end

    def readline(self) -> bytes:
        line = self.stream.readline()
        if not line and self.on_end is not None:
            self.on_end()
        at = line.find(HEADER)
        return line[at:] if at > 0 else line

    def read(self, size: int) -> bytes:
        return self.stream.read(size)


class HandledFault(Exception):
    """A message that could not be read and has been answered (a request) or ignored (anything else)."""


def _usable_id(value: Any) -> bool:
    return isinstance(value, (int, str)) and not isinstance(value, bool)


class NoteProtocol(LanguageServerProtocol):
    exit_status = 0  # LSP: 1 when ``exit`` comes without ``shutdown`` before it

    def structure_message(self, data: dict[str, Any]):
        try:
            return super().structure_message(data)
        except Exception as error:
            if "method" not in data or "id" not in data:  # a response or notification: ignored per spec
                raise HandledFault(f"unreadable message {data.get('method')!r}: {error}") from error
            if not _usable_id(data["id"]):
                self.answer_fault(None, JsonRpcInvalidRequest())
            elif not isinstance(data["method"], str) or self.get_message_type(data["method"]) is None:
                self.answer_fault(data["id"], JsonRpcMethodNotFound.of(str(data["method"])))
            else:
                self.answer_fault(data["id"], error if isinstance(error, JsonRpcException) else JsonRpcInvalidParams())
            raise HandledFault(f"unreadable request {data.get('method')!r}: {error}") from error

    def handle_message(self, message):
        if getattr(message, "method", None) == "exit":
            self.exit_status = 0 if self._shutdown else 1
        if not hasattr(message, "jsonrpc"):  # a JSON value that is no message: [], 1, {}, null
            self.answer_fault(None, JsonRpcInvalidRequest())
            raise HandledFault(f"not a JSON-RPC message: {type(message).__name__}")
        return super().handle_message(message)

    def answer_fault(self, msg_id: int | str | None, error: JsonRpcException) -> None:
        if msg_id is None:  # pygls would drop the null id, which JSON-RPC 2.0 requires here
            self._send_data({"jsonrpc": "2.0", "id": None, "error": {"code": error.code, "message": error.message}})
        else:
            self._send_response(msg_id, None, error.to_response_error())


def report_wire_fault(protocol: NoteProtocol, error: Exception) -> None:
    """A frame the reader could not handle: log it; answer unparseable JSON with a parse error."""
    log.warning("ignored a faulty message from the client: %s", error)
    if not isinstance(error, HandledFault):
        protocol.answer_fault(None, JsonRpcParseError())
