"""A raw JSON-RPC client over the server's stdin/stdout pipes, for sending faulty bytes on purpose.

pytest-lsp speaks only well-formed messages; these tests need to write broken
frames, so they frame (or mis-frame) the bytes themselves.
"""

from __future__ import annotations

import json
import os
import queue
import subprocess
import sys
import threading
import time
from dataclasses import dataclass, field
from typing import Any

from notelsp.server.framing import encode_frame as frame, frame_bodies

SERVER_COMMAND = [sys.executable, "-m", "notelsp", "serve"]


def message(body: dict[str, Any]) -> bytes:
    return frame(json.dumps(body).encode("utf-8"))


@dataclass
class WireServer:
    """The server subprocess, with a thread that splits its stdout into messages."""

    process: subprocess.Popen
    inbox: "queue.Queue[dict[str, Any]]" = field(default_factory=queue.Queue)
    seen: list[dict[str, Any]] = field(default_factory=list)
    next_id: int = 1000

    def send_raw(self, data: bytes) -> None:
        self.process.stdin.write(data)
        self.process.stdin.flush()

    def send(self, body: dict[str, Any]) -> None:
        self.send_raw(message(body))

    def notify(self, method: str, params: Any) -> None:
        self.send({"jsonrpc": "2.0", "method": method, "params": params})

    def request(self, method: str, params: Any = None, timeout: float = 20.0) -> dict[str, Any]:
        """Send a request and wait for the response with its id (other messages are kept in ``seen``)."""
        self.next_id += 1
        request_id = self.next_id
        body = {"jsonrpc": "2.0", "id": request_id, "method": method}
        if params is not None:
            body["params"] = params
        self.send(body)
        return self.wait(lambda m: m.get("id") == request_id and "method" not in m, timeout)

    def wait(self, predicate, timeout: float = 20.0) -> dict[str, Any]:
        for earlier in self.seen:
            if predicate(earlier):
                self.seen.remove(earlier)
                return earlier
        deadline = time.monotonic() + timeout
        while True:
            remaining = deadline - time.monotonic()
            if remaining <= 0:
                raise AssertionError(f"no matching message from the server within {timeout}s")
            try:
                received = self.inbox.get(timeout=remaining)
            except queue.Empty:
                continue
            if predicate(received):
                return received
            self.seen.append(received)

    def drain(self) -> list[dict[str, Any]]:
        """Everything received so far, without waiting."""
        while True:
            try:
                self.seen.append(self.inbox.get_nowait())
            except queue.Empty:
                return self.seen

    def initialize(self, root_uri: str | None = None, capabilities: dict | None = None) -> dict[str, Any]:
        result = self.request("initialize", {"processId": os.getpid(), "rootUri": root_uri,
                                             "capabilities": capabilities or {}})
        self.notify("initialized", {})
        return result

    def close(self) -> int:
        if self.process.poll() is None:
            try:
                self.process.stdin.close()
            except OSError:
                pass
            try:
                self.process.wait(timeout=5)
            except subprocess.TimeoutExpired:
                self.process.kill()
                self.process.wait()
        return self.process.returncode


def _read_messages(stream, inbox: "queue.Queue[dict[str, Any]]") -> None:
    for body in frame_bodies(stream):
        inbox.put(json.loads(body))


def start_server(cwd: str | None = None) -> WireServer:
    process = subprocess.Popen(SERVER_COMMAND, stdin=subprocess.PIPE, stdout=subprocess.PIPE,
                               stderr=subprocess.DEVNULL, cwd=cwd)
    server = WireServer(process)
    threading.Thread(target=_read_messages, args=(process.stdout, server.inbox), daemon=True).start()
    return server
