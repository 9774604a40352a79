"""Where notelsp's JSON-RPC handling departs from pygls's.

- Faults from the client: pygls drops a request whose params cannot be read
  (the client then waits forever) and pops an error up in the editor for every
  unreadable frame.  Here such a request is answered with its JSON-RPC error,
  frames that are not messages are answered per JSON-RPC 2.0 (error with id
  null), and nothing is shown in the editor for a fault of the wire.
- The fast start-up (``quickstart``) answers ``initialize`` before the server
  exists; the server's own reply to it is checked against that one and dropped.
- Open documents take incremental changes by offset (``documents``), not by
  pygls's rebuilding of the text line by line.
- ``$/cancelRequest`` also cancels what a generator handler is running for the
  request (pygls cancels only the request's own future, so an executeCommand's
  command would run on).
- A notification method sent with an ``id`` is a request in JSON-RPC 2.0: it is
  handled as the notification and answered (result null); pygls never answers it.
- pygls keeps the future of every notification and generator step it runs
  (``_request_futures``, keyed by a fresh uuid nobody asks for again); here each
  is dropped once done, so a long session does not grow by one per message.
- Frames reach pygls bounded and well-formed (``framing.FrameInput``); a refused
  frame arrives as a JSON value that is no message and is answered like one.
"""

from __future__ import annotations

import json
import logging
from concurrent.futures import Future
from functools import partial
from typing import Any

from pygls.exceptions import (
    JsonRpcException,
    JsonRpcInvalidParams,
    JsonRpcInvalidRequest,
    JsonRpcMethodNotFound,
    JsonRpcParseError,
)
from pygls.protocol import LanguageServerProtocol

from .documents import spliced

log = logging.getLogger("notelsp.server")


class HandledFault(Exception):
    """A message that could not be read and has been answered (a request) or ignored (anything else)."""


def _usable_id(value: Any) -> bool:
    return isinstance(value, (int, str)) and not isinstance(value, bool)


class NoteProtocol(LanguageServerProtocol):
    exit_status = 0  # LSP: 1 when ``exit`` comes without ``shutdown`` before it

    # pygls builds its Workspace on initialize; documents in it take changes by offset (see documents)
    @property
    def _workspace(self):
        return self.__dict__.get("_spliced_workspace")

    @_workspace.setter
    def _workspace(self, workspace) -> None:
        self.__dict__["_spliced_workspace"] = spliced(workspace)

    def __init__(self, *args, **kwargs) -> None:
        super().__init__(*args, **kwargs)
        self._early_reply: tuple[int | str, dict[str, Any]] | None = None
        # request id -> running steps of its generator handler (an executeCommand's command, for one)
        self._request_steps: dict[Any, set[Future]] = {}
        # (message, id) of the notification just read that carried an id: it is owed an answer
        self._notification_with_id: tuple[Any, Any] | None = None

    def notify_json(self, method: str, params: dict[str, Any]) -> None:
        """Send a notification whose params are JSON already (skips lsprotocol objects and cattrs)."""
        self._send_data({"jsonrpc": "2.0", "method": method, "params": params})

    # --- the initialize reply the fast start-up sent already ---------------------

    def expect_early_reply(self, request_id: int | str, result: dict[str, Any]) -> None:
        """``initialize`` ``request_id`` was answered with ``result`` before this server existed: send no second reply."""
        self._early_reply = (request_id, result)

    def _send_response(self, msg_id, result=None, error=None) -> None:
        if self._early_reply is not None and msg_id == self._early_reply[0]:
            early = self._early_reply[1]
            self._early_reply = None
            self._result_types.pop(msg_id, None)
            own = json.loads(json.dumps(result, default=self._serialize_message)) if error is None else None
            if own != early:  # the snapshot no longer matches the server: say so, the client has the early one
                log.warning("the early initialize reply differs from the server's own (%s); "
                            "run python -m notelsp.server.snapshot_tool", error or own)
            return
        super()._send_response(msg_id, result, error)

    # --- $/cancelRequest reaching the steps of a generator handler ---------------

    def _execute_handler(self, msg_id, handler, callback, args=None, kwargs=None) -> None:
        super()._execute_handler(msg_id, handler, callback, args, kwargs)
        step = self._request_futures.get(msg_id)  # only coroutine, thread and generator handlers have one
        if step is None:
            return
        if not (isinstance(callback, partial) and callback.func == self._send_handler_result):
            # a notification's or a generator step's future, under a uuid: pygls never drops it
            step.add_done_callback(lambda done: self._drop_future(msg_id, done))
        if step.done():
            return
        request = self._ctx_msg_id.get()  # the client's request this runs for (a step has an id of its own)
        if request is None or request == msg_id:
            return
        steps = self._request_steps.setdefault(request, set())
        steps.add(step)
        step.add_done_callback(lambda done: self._forget_step(request, done))

    def _drop_future(self, msg_id, future) -> None:
        if self._request_futures.get(msg_id) is future:
            del self._request_futures[msg_id]

    def _forget_step(self, request, step) -> None:
        steps = self._request_steps.get(request)
        if steps is not None:
            steps.discard(step)
            if not steps:
                del self._request_steps[request]

    def _handle_cancel_notification(self, msg_id) -> None:
        # pygls cancels only the request's own future; a generator handler such as executeCommand's
        # would keep running the command it yielded to.
        for step in list(self._request_steps.pop(msg_id, ())):
            step.cancel()
        super()._handle_cancel_notification(msg_id)

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
        if getattr(message, "method", None) == "exit":
            self.exit_status = 0 if self._shutdown else 1
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
            handled = super().handle_message(message)
            if not self._shutdown or message.method == "exit":
                self._send_response(owed[1], None)
            return handled
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
