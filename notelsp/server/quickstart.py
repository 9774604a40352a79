"""Fast start-up on stdio: answer ``initialize`` before pygls is even imported.

Importing lsprotocol and pygls takes about half a second, and an editor waits
for the ``initialize`` reply before it sends anything else.  So the first
frame is read here with the standard library only; if it is a well-formed
``initialize``, it is answered at once from the capabilities snapshot
(``initialize_snapshot``, generated from the real server), and the server is
built afterwards and handed the same request, so its state (client
capabilities, position encoding, workspace folders, initialization options)
is the usual.  The protocol drops its own reply to that request after checking
it equals the early one (``NoteProtocol.expect_early_reply``).  Anything else
as the first frame is handed to pygls unchanged.
"""

from __future__ import annotations

import json
import queue
import threading
from dataclasses import dataclass
from typing import Any, BinaryIO

from .. import __version__
from .exiting import leave_now
from .framing import Frame, FrameInput, read_frame
from .initialize_snapshot import CAPABILITIES, CHANGES_WHEN_OFFERED

SERVER_NAME = "notelsp"
# pygls negotiates among these, taking the client's first supported preference, else UTF-16.
SUPPORTED_ENCODINGS = ("utf-8", "utf-16", "utf-32")
DEFAULT_ENCODING = "utf-16"
# The header pygls writes, so the early reply looks like every other message.
CONTENT_TYPE = b"Content-Type: application/vscode-jsonrpc; charset=utf-8\r\n"
_NOT_READABLE = object()  # a client capability of a shape the snapshot does not cover


@dataclass(frozen=True)
class EarlyStart:
    """What the front did: the bytes pygls must still read, and the reply it already sent (if any)."""

    replay: bytes
    answered_id: int | str | None = None
    answered_result: dict[str, Any] | None = None


def _capability(capabilities: dict[str, Any], path: list[str]) -> Any:
    value: Any = capabilities
    for key in path:
        if value is None:
            return None
        if not isinstance(value, dict):
            return _NOT_READABLE
        value = value.get(key)
    return value


def offered_kind(value: Any) -> str | None:
    """How a client capability was offered: None (absent), "true", "false", "object"; else not readable."""
    if value is None:
        return None
    if value is True or value is False:
        return "true" if value else "false"
    if isinstance(value, dict):
        return "object"
    raise ValueError(f"capability of an unexpected shape: {value!r}")


def negotiated_encoding(capabilities: dict[str, Any]) -> str:
    offered = _capability(capabilities, ["general", "positionEncodings"])
    if offered is None:
        return DEFAULT_ENCODING
    if not isinstance(offered, list) or not all(isinstance(kind, str) for kind in offered):
        raise ValueError(f"position encodings of an unexpected shape: {offered!r}")
    return next((kind for kind in offered if kind in SUPPORTED_ENCODINGS), DEFAULT_ENCODING)


def _merged(base: dict[str, Any], change: dict[str, Any]) -> dict[str, Any]:
    merged = dict(base)
    for key, value in change.items():
        merged[key] = _merged(merged[key], value) if isinstance(value, dict) and isinstance(merged.get(key), dict) else value
    return merged


def early_result(params: dict[str, Any]) -> dict[str, Any]:
    """The ``InitializeResult`` (as JSON) pygls would give for ``params``; ValueError when unsure."""
    capabilities = params.get("capabilities")
    if not isinstance(capabilities, dict):
        raise ValueError("initialize without a capabilities object")
    server_capabilities = {"positionEncoding": negotiated_encoding(capabilities), **CAPABILITIES}
    for path, by_kind in CHANGES_WHEN_OFFERED.items():
        value = _capability(capabilities, path.split("."))
        if value is _NOT_READABLE:
            raise ValueError(f"client capability {path} inside something that is not an object")
        kind = offered_kind(value)
        if kind is not None and kind in by_kind:
            server_capabilities = _merged(server_capabilities, by_kind[kind])
    return {"capabilities": server_capabilities, "serverInfo": {"name": SERVER_NAME, "version": __version__}}


def _looks_like_initialize_params(params: Any) -> bool:
    """The fields of InitializeParams whose wrong type makes pygls refuse the request (LSP 3.17)."""
    if not isinstance(params, dict) or not isinstance(params.get("capabilities"), dict):
        return False
    process_id = params.get("processId")
    if process_id is not None and (not isinstance(process_id, int) or isinstance(process_id, bool)):
        return False
    if any(params.get(name) is not None and not isinstance(params[name], str) for name in ("rootUri", "rootPath", "locale")):
        return False
    if params.get("trace") not in (None, "off", "messages", "verbose"):
        return False
    folders = params.get("workspaceFolders")
    if folders is not None and not (
        isinstance(folders, list)
        and all(isinstance(f, dict) and isinstance(f.get("uri"), str) and isinstance(f.get("name"), str) for f in folders)
    ):
        return False
    client = params.get("clientInfo")
    return client is None or (isinstance(client, dict) and isinstance(client.get("name"), str))


def _initialize_request(body: bytes) -> dict[str, Any] | None:
    try:
        message = json.loads(body)
    except (ValueError, RecursionError):  # not JSON, not UTF-8, or nested beyond the parser
        return None
    if not isinstance(message, dict) or message.get("jsonrpc") != "2.0" or message.get("method") != "initialize":
        return None
    request_id = message.get("id")
    if isinstance(request_id, bool) or not isinstance(request_id, (int, str)):
        return None
    return message if _looks_like_initialize_params(message.get("params")) else None


def answer_initialize(stdin: BinaryIO, stdout: BinaryIO) -> EarlyStart | None:
    """Read the first frame and answer it if it is ``initialize``; None when the client has already gone."""
    frame = read_frame(stdin)
    if frame.ended:
        return None  # end of input before a whole frame: nobody is left to serve
    request = _initialize_request(frame.body) if frame.body is not None else None
    if request is None:
        return EarlyStart(frame.raw)
    try:
        result = early_result(request["params"])
    except ValueError:
        return EarlyStart(frame.raw)
    reply = json.dumps({"id": request["id"], "jsonrpc": "2.0", "result": result}).encode("utf-8")
    stdout.write(b"Content-Length: %d\r\n" % len(reply) + CONTENT_TYPE + b"\r\n" + reply)
    stdout.flush()
    return EarlyStart(frame.raw, request["id"], result)


class ClientInput(FrameInput):
    """The client's frames, read by a thread of its own from the fast start-up on.

    Building the server takes about half a second after the early reply.  A
    client that closes its end, or sends ``exit``, in that time must not wait
    for it: until :meth:`server_ready`, frames are read whole (bounded, see
    ``framing``), and either ends the process at once unless a request read
    meanwhile still wants its answer (a client that sends everything, then
    closes, is served first).  The server reads them as :class:`FrameInput`
    shows them, replay first.  Once the server is ready the thread stops after
    the frame it is reading, and frames are read directly: no hand-over
    between threads per message for the rest of the session.
    """

    def __init__(self, stream: BinaryIO, replay: bytes = b"") -> None:
        super().__init__(stream, replay)
        self._replayed = bool(replay)  # the first frame is the one the front read (answered there, or pygls's)
        self._direct = False  # the thread has stopped: read frames here
        self._arrived: queue.SimpleQueue[Frame | None] = queue.SimpleQueue()  # None: the thread has stopped
        self._ready = threading.Event()
        self._requests_waiting = False  # a request arrived while building: its answer is owed
        threading.Thread(target=self._pump, name="notelsp-input", daemon=True).start()

    def server_ready(self) -> None:
        self._ready.set()

    def _pump(self) -> None:
        try:
            while not self._ready.is_set():
                frame = read_frame(self._source)
                method = self._method_of(frame.body, owed=not self._replayed)
                self._replayed = False
                if not self._ready.is_set() and not self._requests_waiting:
                    if frame.ended:
                        leave_now(0)  # the client is gone before the server was even built
                    if method == "exit":
                        leave_now(1)  # LSP: exit without a shutdown before it is status 1
                self._arrived.put(frame)
                if frame.ended:
                    return
        except Exception:  # a reader that cannot go on: the server sees the end of input, never silence
            self._arrived.put(Frame(b"", None, ended=True))
            return
        self._arrived.put(None)  # frames are read directly from here on, at a frame boundary

    def _method_of(self, body: bytes | None, owed: bool = True) -> str | None:
        try:
            message = json.loads(body) if body else None
        except (ValueError, RecursionError):
            return None
        if not isinstance(message, dict):
            return None
        if owed and "id" in message and "method" in message:
            self._requests_waiting = True
        return message.get("method")

    def next_frame(self) -> Frame:
        if not self._direct:
            frame = self._arrived.get()
            if frame is not None:
                return frame
            self._direct = True  # the thread has stopped
        return read_frame(self._source)
