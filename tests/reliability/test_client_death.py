"""Client death: the server never outlives its client, and a clean goodbye exits with status 0."""

from __future__ import annotations

import subprocess
import time

from .scale import tried
from .stdio_wire import message, start_server

# How long the server may take to notice the end of its input (the bound; common practice, no source).
EXIT_WITHIN_SECONDS = 1.0


def _exits_quickly(server, within: float = EXIT_WITHIN_SECONDS) -> int:
    try:
        return server.process.wait(timeout=within)
    except subprocess.TimeoutExpired:
        server.process.kill()
        raise AssertionError(f"the server outlived its client by more than {EXIT_WITHIN_SECONDS}s") from None


def test_stdin_closed_after_initialize_exits_zero():
    server = start_server()
    server.initialize()
    server.notify("textDocument/didOpen", {"textDocument": {"uri": "file:///d.md", "languageId": "markdown",
                                                            "version": 1, "text": "{ClF3: trigonal planar}"}})
    server.wait(lambda m: m.get("method") == "textDocument/publishDiagnostics")
    server.process.stdin.close()
    tried("client deaths survived")
    assert _exits_quickly(server) == 0


def test_stdin_closed_before_anything_exits_zero():
    server = start_server()
    server.process.stdin.close()
    tried("client deaths survived")
    assert _exits_quickly(server, within=30) == 0  # the bound here includes the server's own start-up


def test_stdin_closed_in_the_middle_of_a_frame_exits_zero():
    server = start_server()
    server.initialize()
    server.send_raw(message({"jsonrpc": "2.0", "id": 5, "method": "textDocument/hover", "params": {}})[:-9])
    server.process.stdin.close()
    tried("client deaths survived")
    assert _exits_quickly(server) == 0


def test_stdin_closed_while_a_review_is_running_exits_zero():
    server = start_server()
    server.initialize()
    big = "{ClF3: trigonal planar} {PCl3F2: Cl axial}\n" * 20_000
    server.notify("textDocument/didOpen", {"textDocument": {"uri": "file:///big.md", "languageId": "markdown",
                                                            "version": 1, "text": big}})
    time.sleep(0.2)  # let the review start (bounded: the test does not wait for it)
    server.process.stdin.close()
    tried("client deaths survived")
    assert _exits_quickly(server) == 0


def test_shutdown_then_exit_is_status_zero():
    server = start_server()
    server.initialize()
    assert server.request("shutdown") == {"jsonrpc": "2.0", "id": server.next_id, "result": None}
    server.notify("exit", None)
    tried("client deaths survived")
    assert _exits_quickly(server) == 0


def test_requests_after_shutdown_are_refused_then_exit_is_zero():
    server = start_server()
    server.initialize()
    server.request("shutdown")
    server.send({"jsonrpc": "2.0", "id": 4, "method": "textDocument/hover",
                  "params": {"textDocument": {"uri": "file:///x.md"},
                             "position": {"line": 0, "character": 0}}})
    server.notify("exit", None)
    tried("client deaths survived")
    assert _exits_quickly(server) == 0
    answered = [m for m in server.drain() if m.get("id") == 4]
    assert all("error" in m for m in answered)  # LSP: after shutdown a request is an error (or dropped)


def test_exit_without_shutdown_is_status_one():
    server = start_server()
    server.initialize()
    server.notify("exit", None)
    tried("client deaths survived")
    assert _exits_quickly(server) == 1  # LSP specification 3.17, "exit" notification (from memory)
