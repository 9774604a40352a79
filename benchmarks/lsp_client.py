"""A small blocking JSON-RPC client that drives a language server over stdio.

Written for the benchmarks only: one reader thread files responses by id and
keeps notifications in arrival order with their receive time, so latency is
measured at the moment a message is read off the pipe.
"""

from __future__ import annotations

import json
import os
import queue
import subprocess
import threading
import time
from dataclasses import dataclass
from typing import Any

from notelsp.server.framing import encode_frame, frame_bodies


@dataclass(frozen=True)
class Received:
    at: float  # time.perf_counter() when the message was read
    message: dict[str, Any]


class StdioClient:
    def __init__(self, command: list[str], cwd: str | None = None) -> None:
        self.started = time.perf_counter()
        # The rules-only path is measured: no geometries computed in the background (workers would share the cores).
        self.process = subprocess.Popen(
            command, cwd=cwd, stdin=subprocess.PIPE, stdout=subprocess.PIPE, stderr=subprocess.DEVNULL,
            env={**os.environ, "NOTELSP_COMPUTE": "off"},
        )
        self._next_id = 0
        self._responses: dict[int, queue.Queue[Received]] = {}
        self._lock = threading.Lock()
        self.notifications: queue.Queue[Received] = queue.Queue()
        threading.Thread(target=self._read, daemon=True).start()

    # --- wire ---------------------------------------------------------------

    def _write(self, message: dict[str, Any]) -> None:
        self.process.stdin.write(encode_frame(json.dumps(message).encode("utf-8")))
        self.process.stdin.flush()

    def _read(self) -> None:
        for body in frame_bodies(self.process.stdout):
            message = json.loads(body)
            received = Received(time.perf_counter(), message)
            if "id" in message and "method" in message:
                self._write({"jsonrpc": "2.0", "id": message["id"], "result": None})  # server -> client request
            elif "id" in message:
                with self._lock:
                    box = self._responses.setdefault(message["id"], queue.Queue())
                box.put(received)
            else:
                self.notifications.put(received)

    # --- protocol -----------------------------------------------------------

    def send_request(self, method: str, params: Any) -> int:
        with self._lock:
            self._next_id += 1
            request_id = self._next_id
            self._responses.setdefault(request_id, queue.Queue())
        self._write({"jsonrpc": "2.0", "id": request_id, "method": method, "params": params})
        return request_id

    def response(self, request_id: int, timeout: float = 60.0) -> Received:
        with self._lock:
            box = self._responses.setdefault(request_id, queue.Queue())
        received = box.get(timeout=timeout)
        if "error" in received.message:
            raise RuntimeError(f"server error: {received.message['error']}")
        return received

    def request(self, method: str, params: Any, timeout: float = 60.0) -> Received:
        return self.response(self.send_request(method, params), timeout)

    def notify(self, method: str, params: Any) -> None:
        self._write({"jsonrpc": "2.0", "method": method, "params": params})

    def wait_notification(self, method: str, predicate=lambda params: True, timeout: float = 60.0) -> Received:
        deadline = time.perf_counter() + timeout
        while True:
            remaining = deadline - time.perf_counter()
            if remaining <= 0:
                raise TimeoutError(f"no {method} within {timeout}s")
            received = self.notifications.get(timeout=remaining)
            if received.message.get("method") == method and predicate(received.message.get("params")):
                return received

    def initialize(self, root_uri: str | None) -> Received:
        reply = self.request("initialize", {"processId": os.getpid(), "rootUri": root_uri, "capabilities": {}})
        self.notify("initialized", {})
        return reply

    def rss_mb(self) -> float:
        with open(f"/proc/{self.process.pid}/status", encoding="ascii") as status:
            for line in status:
                if line.startswith("VmRSS:"):
                    return int(line.split()[1]) / 1024
        raise RuntimeError("VmRSS not found")

    def close(self) -> None:
        try:
            self.request("shutdown", None, timeout=10)
            self.notify("exit", None)
            self.process.wait(timeout=10)
        except Exception:
            self.process.kill()
            self.process.wait()
