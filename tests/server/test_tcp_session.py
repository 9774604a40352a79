"""``notelsp serve --tcp``: one client on loopback, through the same bounded frame reader as stdio.

A frame announcing an absurd Content-Length is refused with a JSON-RPC error (-32600, id null,
as JSON-RPC 2.0 prescribes for an invalid request) and the server goes on serving.
"""

from __future__ import annotations

import json
import socket
import subprocess
import sys
import time

from notelsp.server.framing import frame_bodies


def _free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return probe.getsockname()[1]


def _send(stream, message: dict) -> None:
    body = json.dumps(message).encode("utf-8")
    stream.write(b"Content-Length: %d\r\n\r\n" % len(body) + body)
    stream.flush()


def _connect(port: int, deadline: float) -> socket.socket:
    while True:
        try:
            return socket.create_connection(("127.0.0.1", port), timeout=30)
        except OSError:
            if time.monotonic() > deadline:
                raise
            time.sleep(0.1)


def test_tcp_client_is_served_through_the_bounded_reader():
    port = _free_port()
    server = subprocess.Popen([sys.executable, "-m", "notelsp", "serve", "--tcp", f"127.0.0.1:{port}"],
                              stderr=subprocess.PIPE)
    try:
        connection = _connect(port, time.monotonic() + 60)
        reader, writer = connection.makefile("rb"), connection.makefile("wb")
        writer.write(b"Content-Length: 99999999999999\r\n\r\n{}")
        writer.flush()
        messages = (json.loads(body) for body in frame_bodies(reader))
        refusal = next(messages)
        assert refusal["error"]["code"] == -32600 and refusal["id"] is None
        _send(writer, {"jsonrpc": "2.0", "id": 1, "method": "initialize", "params": {"capabilities": {}}})
        reply = next(m for m in messages if m.get("id") == 1)
        assert reply["result"]["serverInfo"]["name"] == "notelsp"
        _send(writer, {"jsonrpc": "2.0", "id": 2, "method": "shutdown"})
        _send(writer, {"jsonrpc": "2.0", "method": "exit"})
        assert server.wait(timeout=60) == 0
    finally:
        if server.poll() is None:
            server.kill()
        server.wait()
