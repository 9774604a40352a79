"""ClientInput: the stream the server reads after the fast start-up.  It hands on every frame the
client sent, in order, as well-formed frames only (a frame beyond the reader's bounds is handed on as a
refusal, answered by the protocol), and while the server is still being built an exit or the end of
input ends the process at once (LSP 3.17, "exit" notification: status 1 without a shutdown before it,
from memory).
"""

from __future__ import annotations

import io
import os
import threading

import pytest

import notelsp.server.quickstart as quickstart
from notelsp.server.framing import MAX_BODY_BYTES, encode_frame, fault_body
from notelsp.server.quickstart import ClientInput


class _Left(Exception):
    pass


@pytest.fixture
def exits(monkeypatch):
    """Record the status the pump would leave with (instead of leaving), and stop its thread there."""
    statuses: list[int] = []
    done = threading.Event()

    def leave(status: int = 0):
        statuses.append(status)
        done.set()
        raise _Left  # ends the pump thread, as os._exit would end the process

    monkeypatch.setattr(quickstart, "leave_now", leave)
    monkeypatch.setattr(threading, "excepthook", lambda args: None)  # the _Left above is expected
    return statuses, done


def _frames(*bodies: bytes) -> bytes:
    return b"".join(encode_frame(body) for body in bodies)


def _read_everything(client_input: ClientInput) -> bytes:
    """Read as pygls does (a header line, a blank line, then a body by length), until the input ends."""
    out = bytearray()
    while line := client_input.readline():
        assert line.startswith(b"Content-Length: ") and line.endswith(b"\r\n")  # pygls's own pattern
        length = int(line.split(b":")[1])
        assert client_input.readline() == b"\r\n"
        out += encode_frame(client_input.read(length))
    return bytes(out)


def _ready_input(sent: bytes, replay: bytes = b"") -> ClientInput:
    """A ClientInput on a pipe that ends only once the server is ready (as a client closing later)."""
    read_end, write_end = os.pipe()
    client_input = ClientInput(os.fdopen(read_end, "rb"), replay)
    with os.fdopen(write_end, "wb") as pipe:
        pipe.write(sent)
        pipe.flush()
        client_input.server_ready()
    return client_input


def test_every_byte_is_handed_on_replay_first(exits):
    replay = _frames(b'{"jsonrpc": "2.0", "id": 1, "method": "initialize", "params": {"capabilities": {}}}')
    rest = _frames(b'{"jsonrpc":"2.0","method":"initialized","params":{}}', b"x" * 200_000, "{\"é\": 1}".encode())
    assert _read_everything(_ready_input(rest, replay)) == replay + rest
    assert exits[0] == []


def test_junk_without_line_breaks_is_refused_once_and_a_short_body_ends_the_input(exits):
    sent = b"junk" * 50_000 + b"\r\n" + b"Content-Length: 99\r\n\r\n{}"
    client_input = _ready_input(sent)
    assert client_input.readline().startswith(b"Content-Length: ")
    assert client_input.readline() == b"\r\n"
    assert client_input.read(1000).startswith(b'{"frameRefused": "headers longer than')  # one refusal for the run
    assert client_input.readline() == b""  # the input ended inside the body


def test_a_length_beyond_the_bound_is_refused_without_reading_the_body(exits):
    after = _frames(b'{"jsonrpc":"2.0","method":"initialized","params":{}}')
    sent = b"Content-Length: 99999999999999\r\n\r\n" + after
    client_input = ClientInput(io.BytesIO(sent))  # read while "building": the thread must survive it
    assert _read_everything(client_input) == encode_frame(fault_body(
        f"Content-Length 99999999999999 beyond {MAX_BODY_BYTES} bytes")) + after
    assert exits[0] == [0]  # the end of input, seen by the thread, not a crash


class _Broken(io.RawIOBase):
    def readable(self) -> bool:
        return True

    def readinto(self, buffer) -> int:
        raise OSError("the pipe broke")


def test_a_reader_that_fails_while_building_ends_the_input(exits):
    client_input = ClientInput(io.BufferedReader(_Broken()))
    assert client_input.readline() == b""  # the server sees the end of input instead of waiting forever


def test_frames_before_the_server_is_ready_are_kept(exits):
    statuses, done = exits
    sent = _frames(b'{"jsonrpc":"2.0","method":"initialized","params":{}}', b'{"jsonrpc":"2.0","method":"exit"}')
    client_input = ClientInput(io.BytesIO(sent))
    assert done.wait(5) and statuses == [1]
    assert client_input.readline() == b"Content-Length: 52\r\n"


def test_a_request_read_while_building_is_answered_before_leaving(exits):
    statuses, _ = exits
    request = b'{"jsonrpc":"2.0","id":2,"method":"shutdown"}'
    sent = _frames(request, b'{"jsonrpc":"2.0","method":"exit"}')
    client_input = ClientInput(io.BytesIO(sent))  # then the input ends, still while building
    assert _read_everything(client_input) == sent  # all handed on for the server to answer
    assert statuses == []


def test_exit_without_shutdown_while_building_leaves_with_status_one(exits):
    statuses, done = exits
    ClientInput(io.BytesIO(_frames(b'{"jsonrpc":"2.0","method":"exit"}')))
    assert done.wait(5) and statuses == [1]


@pytest.mark.parametrize("sent", [b"", b"Content-Length: 40\r\n\r\n{\"jsonrpc\""], ids=["closed", "inside a frame"])
def test_end_of_input_while_building_leaves_with_status_zero(exits, sent):
    statuses, done = exits
    ClientInput(io.BytesIO(sent))
    assert done.wait(5) and statuses == [0]


def test_unreadable_frames_while_building_are_not_mistaken_for_exit(exits):
    statuses, done = exits
    sent = _frames(b"not json", b"[1, 2]", b'"exit"', b'\xff\xfe')
    client_input = ClientInput(io.BytesIO(sent))
    assert done.wait(5) and statuses == [0]  # only the end of input ended it
    assert client_input.readline() == b"Content-Length: 8\r\n"


def test_after_the_server_is_ready_the_stream_is_read_directly(exits):
    read_end, write_end = os.pipe()
    client_input = ClientInput(os.fdopen(read_end, "rb"))
    pipe = os.fdopen(write_end, "wb")
    first = _frames(b'{"jsonrpc":"2.0","method":"initialized","params":{}}')
    pipe.write(first)
    pipe.flush()
    client_input.server_ready()
    later = _frames(b'{"jsonrpc":"2.0","id":2,"method":"shutdown"}', b"y" * 100_000)
    pipe.write(later[:30])  # the thread's last frame may arrive in pieces
    pipe.flush()
    assert client_input.readline() == b"Content-Length: 52\r\n"  # the frame read before readiness
    assert client_input.readline() == b"\r\n"
    assert client_input.read(52) == first[len(b"Content-Length: 52\r\n\r\n"):]

    def send_the_rest() -> None:  # more than a pipe holds: written while the test reads
        pipe.write(later[30:])
        pipe.close()

    writer = threading.Thread(target=send_the_rest)
    writer.start()
    assert _read_everything(client_input) == later
    writer.join(5)
    assert client_input._direct and exits[0] == []
