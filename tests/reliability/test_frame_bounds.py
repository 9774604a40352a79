"""Hostile frames over stdio: lengths and headers beyond the reader's bounds.

Each is refused with one JSON-RPC error (id null, -32600 Invalid Request;
jsonrpc.org specification 2.0, from memory) or dropped, the next request is
answered, and the server still exits as soon as its input ends.  The bounds
are the reader's own (``notelsp.server.framing``).
"""

from __future__ import annotations

import subprocess

import pytest

from notelsp.server.framing import MAX_BODY_BYTES, MAX_HEADER_BYTES, MAX_HEADER_LINES

from .scale import tried
from .stdio_wire import frame as message_frame, message, start_server

INVALID_REQUEST = -32600
NOTE_URI = "file:///reliability/bounds.md"
NOTE = "# Bounds\n{ClF3: trigonal planar}\n"
HOVER = {"textDocument": {"uri": NOTE_URI}, "position": {"line": 1, "character": 2}}
JUNK_LINES = 2_000_000  # the attack as measured on the previous release: no reply within 60 s


def _hostile_frames() -> dict[str, bytes]:
    follow = message({"jsonrpc": "2.0", "method": "notelsp/after", "params": {}})
    return {
        "Content-Length of 99999999999999": b"Content-Length: 99999999999999\r\n\r\n" + follow,
        "Content-Length one past the bound": b"Content-Length: %d\r\n\r\n" % (MAX_BODY_BYTES + 1) + follow,
        "a Content-Length of a thousand digits": b"Content-Length: " + b"9" * 1000 + b"\r\n\r\n",
        "one more header line than the bound": b"X-Junk: 1\r\n" * MAX_HEADER_LINES + follow,
        "a header line longer than the bound": b"X-Junk: " + b"j" * (4 * MAX_HEADER_BYTES) + b"\r\n" + follow,
        "a megabyte without a line break": b"j" * 1_000_000 + b"\r\n",
        f"{JUNK_LINES:,} junk header lines": b"X-Junk: 1\r\n" * JUNK_LINES + b"\r\n",
    }


HOSTILE = _hostile_frames()


def _serving(server) -> None:
    answer = server.request("textDocument/hover", HOVER, timeout=60)
    assert answer.get("result") is not None, answer
    tried("valid requests answered after a fault")


def _open(server) -> None:
    server.notify("textDocument/didOpen", {"textDocument": {"uri": NOTE_URI, "languageId": "markdown",
                                                            "version": 1, "text": NOTE}})


def _exits_when_input_ends(server) -> int:
    server.process.stdin.close()
    try:
        return server.process.wait(timeout=5)
    except subprocess.TimeoutExpired:
        server.process.kill()
        raise AssertionError("the server did not leave when its input ended") from None


def _refused(server) -> list[dict]:
    server.request("shutdown")  # every earlier message has been read and answered before this reply
    return [m for m in server.drain() if "error" in m and m.get("id") is None]


@pytest.mark.parametrize("name", sorted(HOSTILE))
def test_hostile_frame_in_a_running_server(name):
    server = start_server()
    try:
        server.initialize()
        _open(server)
        _serving(server)
        server.send_raw(HOSTILE[name])
        tried("hostile frames sent over stdio (beyond the length and header bounds)")
        _serving(server)
        refused = _refused(server)
        assert [m["error"]["code"] for m in refused] == [INVALID_REQUEST]  # one answer, however long the junk
        server.notify("exit", None)
        assert server.process.wait(timeout=5) == 0
    finally:
        server.close()


@pytest.mark.parametrize("name", ["Content-Length of 99999999999999", "one more header line than the bound"])
def test_hostile_first_frame_after_initialized(name):
    """The frame arrives while the server is still being built (read by the fast start-up's thread)."""
    server = start_server()
    try:
        server.initialize()
        server.send_raw(HOSTILE[name])
        tried("hostile frames sent over stdio (beyond the length and header bounds)")
        _open(server)
        _serving(server)
        assert _exits_when_input_ends(server) == 0
    finally:
        server.close()


def test_hostile_frame_before_initialize_then_the_input_ends():
    server = start_server()
    try:
        server.send_raw(HOSTILE["Content-Length of 99999999999999"])
        tried("hostile frames sent over stdio (beyond the length and header bounds)")
        server.initialize()
        _open(server)
        _serving(server)
        assert _exits_when_input_ends(server) == 0
    finally:
        server.close()


def test_json_nested_a_million_deep_is_a_parse_error():
    """Within the length bound but beyond any parser's nesting: -32700 (id null), before and after initialize."""
    deep = b"[" * 1_000_000 + b"]" * 1_000_000
    server = start_server()
    try:
        server.send_raw(message_frame(deep))  # read by the fast start-up's front first
        server.initialize()
        server.send_raw(message_frame(deep))
        tried("hostile frames sent over stdio (beyond the length and header bounds)", 2)
        _open(server)
        _serving(server)
        assert [m["error"]["code"] for m in _refused(server)] == [-32700, -32700]  # JSON-RPC 2.0 parse error
    finally:
        server.close()
