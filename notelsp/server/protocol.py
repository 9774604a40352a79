"""Where notelsp's JSON-RPC handling departs from pygls's, through pygls's public API only.

The hooks are public: ``structure_message``, ``handle_message`` and
``set_writer`` of pygls's protocol, and its built-in ``lsp_*`` handlers,
each wrapped around pygls's own (``super()``).  The one private name left
(the futures pygls keeps) is used through ``pygls_adapter``.

- Faults from the client: pygls drops a request whose params cannot be read
  (the client then waits forever) and pops an error up in the editor for every
  unreadable frame.  Here such a request is answered with its JSON-RPC error,
  frames that are not messages are answered per JSON-RPC 2.0 (error with id
  null), and nothing is shown in the editor for a fault of the wire.
- The fast start-up (``quickstart``) answers ``initialize`` before the server
  exists; the server's own reply to it is checked against that one and not
  written (the writer pygls is given lets every other frame through).  It
  brings only ``initialize``'s reply forward: in headless Neovim 0.7 the
  first diagnostics of a note came ~2.6 s after start with it and without it
  (medians of 8 runs each, on a loaded 2-core machine).
- Open documents take incremental changes by offset (``documents.DocumentSync``),
  not by pygls's rebuilding of the text line by line.
- ``$/cancelRequest`` also cancels the command an ``executeCommand`` is running
  (pygls cancels only the request's own future, so the command would run on).
- A notification method sent with an ``id`` is a request in JSON-RPC 2.0: it is
  handled as the notification and answered (result null); pygls never answers it.
- pygls keeps the future of every notification and generator step it runs;
  here each is dropped once done (``pygls_adapter.drop_finished_futures``), so a
  long session does not grow by one per message.
- Frames reach pygls bounded and well-formed (``framing.FrameInput``); a refused
  frame arrives as a JSON value that is no message and is answered like one.
"""

from __future__ import annotations

import asyncio
import inspect
import json
import logging
from typing import Any

from lsprotocol import types
from pygls.exceptions import (
    JsonRpcException,
    JsonRpcInvalidParams,
    JsonRpcInvalidRequest,
    JsonRpcMethodNotFound,
    JsonRpcParseError,
)
from pygls.protocol import LanguageServerProtocol
from pygls.protocol.language_server import lsp_method

from .documents import DocumentSync
from .pygls_adapter import drop_finished_futures

log = logging.getLogger("notelsp.server")
# The header pygls writes (the same as the fast start-up's), so every message looks alike.
FRAME_HEADER = b"Content-Length: %d\r\nContent-Type: application/vscode-jsonrpc; charset=utf-8\r\n\r\n"


class HandledFault(Exception):
    """A message that could not be read and has been answered (a request) or ignored (anything else)."""


def _usable_id(value: Any) -> bool:
    return isinstance(value, (int, str)) and not isinstance(value, bool)


class NoteProtocol(DocumentSync, LanguageServerProtocol):
    exit_status = 0  # LSP: 1 when ``exit`` comes without ``shutdown`` before it

    def __init__(self, *args, **kwargs) -> None:
        self._early_reply: tuple[int | str, dict[str, Any]] | None = None
        self.frames_with_headers = True  # as set_writer was told (pygls's default)
        self.shut_down = False  # a shutdown request was handled: pygls now ignores everything but exit
        # request id -> the task running its executeCommand's command
        self.running_commands: dict[Any, asyncio.Task] = {}
        # (message, id) of the notification just read that carried an id: it is owed an answer
        self._notification_with_id: tuple[Any, Any] | None = None
        super().__init__(*args, **kwargs)
        drop_finished_futures(self)

    # --- what the server writes ---------------------------------------------------

    def set_writer(self, writer, include_headers: bool = True) -> None:
        self.frames_with_headers = include_headers
        super().set_writer(_Outgoing(self, writer), include_headers)

    def send_json(self, message: dict[str, Any]) -> None:
        """Write one JSON-RPC message that is JSON already (no lsprotocol objects, no cattrs)."""
        if self.writer is None:
            log.error("no transport to send %s on", message.get("method") or message.get("id"))
            return
        body = json.dumps(message).encode("utf-8")
        written = self.writer.write(FRAME_HEADER % len(body) + body if self.frames_with_headers else body)
        if inspect.isawaitable(written):
            asyncio.ensure_future(written)

    def notify_json(self, method: str, params: dict[str, Any]) -> None:
        """Send a notification whose params are JSON already (skips lsprotocol objects and cattrs)."""
        self.send_json({"jsonrpc": "2.0", "method": method, "params": params})

    # --- the initialize reply the fast start-up sent already ---------------------

    def expect_early_reply(self, request_id: int | str, result: dict[str, Any]) -> None:
        """``initialize`` ``request_id`` was answered with ``result`` before this server existed: send no second reply."""
        self._early_reply = (request_id, result)

    def sent_already(self, frame: bytes) -> bool:
        """Whether ``frame`` (about to be written) is the initialize reply the fast start-up sent; then it is not sent."""
        if self._early_reply is None:
            return False
        body = frame.split(b"\r\n\r\n", 1)[-1] if self.frames_with_headers else frame
        try:
            message = json.loads(body)
        except ValueError:
            return False
        if not isinstance(message, dict) or "method" in message or message.get("id") != self._early_reply[0]:
            return False
        early, self._early_reply = self._early_reply[1], None
        own = message.get("result") if "error" not in message else None
        if own != early:  # the snapshot no longer matches the server: say so, the client has the early one
            log.warning("the early initialize reply differs from the server's own (%s); "
                        "run python -m notelsp.server.snapshot_tool", message.get("error") or own)
        return True

    # --- shutdown, as pygls sees it ----------------------------------------------

    @lsp_method(types.SHUTDOWN)
    def lsp_shutdown(self, *args):
        result = yield from super().lsp_shutdown(*args)
        self.shut_down = True  # pygls has set its own flag at this very point
        return result

    # --- $/cancelRequest reaching the command an executeCommand runs -------------

    @lsp_method(types.WORKSPACE_EXECUTE_COMMAND)
    def lsp_workspace__execute_command(self, params: types.ExecuteCommandParams):
        """pygls's, with the command's task kept under the request's id so that a cancel stops it too.

        pygls cancels only the request's own future; the command it yielded to would run on.
        """
        steps = super().lsp_workspace__execute_command(params)
        request = self.msg_id
        step = next(steps)  # (command, args, kwargs); raises as pygls does for an unknown command
        while True:
            command, args, kwargs = step
            if asyncio.iscoroutinefunction(command) and request is not None:
                command = self._cancellable(request, command)
            try:
                step = steps.send((yield command, args, kwargs))
            except StopIteration as done:
                return done.value

    def _cancellable(self, request: Any, command):
        async def run(*args, **kwargs):
            task = self.running_commands[request] = asyncio.current_task()
            try:
                return await command(*args, **kwargs)
            finally:
                if self.running_commands.get(request) is task:
                    del self.running_commands[request]

        return run

    def structure_message(self, data: dict[str, Any]):
        try:
            message = super().structure_message(data)
            if "id" in data and "method" in data and not hasattr(message, "id"):  # a notification's type
                self._notification_with_id = (message, data["id"])
            return message
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
        method = getattr(message, "method", None)
        if method == types.EXIT:
            self.exit_status = 0 if self.shut_down else 1
        elif method == types.CANCEL_REQUEST and not self.shut_down:
            running = self.running_commands.pop(getattr(message.params, "id", None), None)
            if running is not None:
                running.cancel()  # then pygls cancels the request's own future
        if not hasattr(message, "jsonrpc"):  # a JSON value that is no message: [], 1, {}, null, a refused frame
            self.answer_fault(None, JsonRpcInvalidRequest())
            refused = message.get("frameRefused") if isinstance(message, dict) else None
            raise HandledFault(f"refused a frame: {refused}" if isinstance(refused, str)
                               else f"not a JSON-RPC message: {type(message).__name__}")
        owed, self._notification_with_id = self._notification_with_id, None
        if owed is not None and owed[0] is message:  # JSON-RPC 2.0: with an id it is a request, owed a response
            if not _usable_id(owed[1]):
                self.answer_fault(None, JsonRpcInvalidRequest())
                raise HandledFault(f"notification {message.method!r} with an unusable id")
            ignored = self.shut_down and method != types.EXIT  # pygls ignores it: so is its id
            handled = super().handle_message(message)
            if not ignored:
                self.send_json({"jsonrpc": "2.0", "id": owed[1], "result": None})
            return handled
        return super().handle_message(message)

    def answer_fault(self, msg_id: int | str | None, error: JsonRpcException) -> None:
        """Answer request ``msg_id`` (None: a message whose id could not be read) with ``error``."""
        fault: dict[str, Any] = {"code": error.code, "message": error.message}
        if error.data is not None:
            fault["data"] = error.data if isinstance(error.data, (str, int, float, bool, list, dict)) else str(error.data)
        self.send_json({"jsonrpc": "2.0", "id": msg_id, "error": fault})


class _Outgoing:
    """The writer pygls is given: every frame goes through, except the initialize reply sent already."""

    def __init__(self, protocol: NoteProtocol, writer) -> None:
        self.protocol = protocol
        self.writer = writer

    def write(self, data: bytes):
        if self.protocol.sent_already(data):
            return None
        return self.writer.write(data)

    def close(self):
        return self.writer.close()


def report_wire_fault(protocol: NoteProtocol, error: Exception) -> None:
    """A frame the reader could not handle: log it; answer unparseable JSON with a parse error."""
    log.warning("ignored a faulty message from the client: %s", error)
    if not isinstance(error, HandledFault):
        protocol.answer_fault(None, JsonRpcParseError())
