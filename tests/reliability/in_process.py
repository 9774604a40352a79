"""The real server, in this process, reading a fixed byte stream through pygls's own message loop.

For tests that look inside the server after a session (what it still holds),
which a subprocess would hide.  The input is read with the server's frame
reader (``FrameInput``), exactly as on stdio; the session ends with the input.
"""

from __future__ import annotations

import asyncio
import io
import json
import threading
from typing import Any

from pygls.io_ import StdinAsyncReader, run_async

from notelsp.server.app import NoteServer, build_server
from notelsp.server.framing import FrameInput, encode_frame, frame_bodies


def message(body: dict[str, Any]) -> bytes:
    return encode_frame(json.dumps(body).encode("utf-8"))


def notification(method: str, params: Any) -> bytes:
    return message({"jsonrpc": "2.0", "method": method, "params": params})


def request(request_id: int, method: str, params: Any) -> bytes:
    return message({"jsonrpc": "2.0", "id": request_id, "method": method, "params": params})


def start() -> list[bytes]:
    return [request(1, "initialize", {"capabilities": {}}), notification("initialized", {})]


class _Collected:
    def __init__(self) -> None:
        self.data = bytearray()

    def write(self, data: bytes) -> None:
        self.data += data

    def close(self) -> None:
        pass


def serve(frames: list[bytes]) -> tuple[NoteServer, list[dict[str, Any]]]:
    """Run a fresh server over ``frames`` until the input ends; the server and every message it sent."""
    server = build_server()
    written = _Collected()
    server.protocol.set_writer(written)  # with Content-Length headers (the default): frames as on stdio
    reader = StdinAsyncReader(FrameInput(io.BytesIO(b"".join(frames))), server.thread_pool)
    asyncio.run(run_async(threading.Event(), reader, server.protocol))
    return server, [json.loads(body) for body in frame_bodies(io.BytesIO(bytes(written.data)))]
