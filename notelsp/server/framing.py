"""LSP base-protocol frames (``Content-Length`` headers, a blank line, a body), read off a byte stream.

Standard library only: the fast start-up front reads the client's first frame
with it before anything heavy is imported, the server reads every frame with
it (:class:`FrameInput`), and the test and benchmark clients read the server's
replies with it.

Reading is bounded: a header block of at most ``MAX_HEADER_LINES`` lines and
``MAX_HEADER_BYTES`` bytes, a body of at most ``MAX_BODY_BYTES``.  A frame
beyond a bound is refused (``Frame.fault``) after reading no more than the
bound, so a hostile length or endless headers cost neither memory nor the
session: the next frame is read as usual.
"""

from __future__ import annotations

import io
import json
from dataclasses import dataclass
from typing import Any, BinaryIO, Callable, Iterator

LENGTH_HEADER = b"content-length:"
# Bounds on one frame (no LSP message an editor sends comes near them: a 1 MB note is
# about 1 MB of JSON; common practice, no source).
MAX_BODY_BYTES = 64 * 1024 * 1024
MAX_HEADER_LINES = 100
MAX_HEADER_BYTES = 8 * 1024
_MAX_LENGTH_DIGITS = len(str(MAX_BODY_BYTES))


@dataclass(frozen=True)
class Frame:
    head: bytes  # every header byte read for this frame (junk and blank line included)
    body: bytes | None  # None when the headers name no usable length, a bound was passed, or the stream ended inside
    ended: bool = False  # the stream ended before the frame did (or before it began: head is empty)
    fault: str | None = None  # why the frame was refused (a bound passed); None for frames read or merely ignored

    @property
    def raw(self) -> bytes:
        """Every byte read for this frame, to hand on unchanged (re-reading them gives the same frame)."""
        return self.head + (self.body or b"")


def _length(value: bytes) -> int | None | str:
    """A Content-Length value: the length, None when unusable (ignored), or why it is refused."""
    value = value.strip()
    if not value.isdigit():
        return None
    if len(value) > _MAX_LENGTH_DIGITS or int(value) > MAX_BODY_BYTES:
        return f"Content-Length {value[:20].decode('ascii')}{'...' if len(value) > 20 else ''} beyond {MAX_BODY_BYTES} bytes"
    return int(value)


def read_frame(stream: BinaryIO) -> Frame:
    """The next frame; ``head == b""`` and ``ended`` once the stream has ended.

    A ``Content-Length`` header after junk on the same line is found (a wrong
    length elsewhere leaves the tail of a body before the next header), so a
    wrong length costs at most one frame.
    """
    head = bytearray()
    length: int | None = None
    for _ in range(MAX_HEADER_LINES):
        line = stream.readline(MAX_HEADER_BYTES - len(head) + 1)
        head += line
        if len(head) > MAX_HEADER_BYTES:
            return Frame(bytes(head), None, fault=f"headers longer than {MAX_HEADER_BYTES} bytes")
        if not line.endswith(b"\n"):  # end of stream (inside the headers, or before anything)
            return Frame(bytes(head), None, ended=True)
        line = line.strip()
        if not line:
            break
        at = line.lower().find(LENGTH_HEADER)
        if at >= 0 and length is None:
            found = _length(line[at + len(LENGTH_HEADER):])
            if isinstance(found, str):
                return Frame(bytes(head), None, fault=found)
            length = found
    else:
        return Frame(bytes(head), None, fault=f"more than {MAX_HEADER_LINES} header lines")
    if length is None:
        return Frame(bytes(head), None)
    body = stream.read(length)
    whole = len(body) == length
    return Frame(bytes(head), body if whole else None, ended=not whole)


def frame_bodies(stream: BinaryIO) -> Iterator[bytes]:
    """Every complete frame's body until the stream ends; frames without a usable length are skipped."""
    while True:
        frame = read_frame(stream)
        if frame.body is not None:
            yield frame.body
        if frame.ended:
            return


def encode_frame(body: bytes) -> bytes:
    return b"Content-Length: %d\r\n\r\n" % len(body) + body


class ReplayedStream:
    """``replay`` (bytes already read off ``stream``), then ``stream`` itself."""

    def __init__(self, replay: bytes, stream: BinaryIO) -> None:
        self._replay = io.BytesIO(replay) if replay else None
        self._stream = stream

    def readline(self, limit: int = -1) -> bytes:
        if self._replay is None:
            return self._stream.readline(limit)
        line = self._replay.readline(limit)
        if line.endswith(b"\n") or len(line) == limit:
            return line
        self._replay = None  # used up: the line goes on in the stream
        return line + self._stream.readline(limit - len(line) if limit >= 0 else -1)

    def read(self, size: int) -> bytes:
        if self._replay is None:
            return self._stream.read(size)
        data = self._replay.read(size)
        if len(data) < size:
            self._replay = None
            data += self._stream.read(size - len(data))
        return data


def fault_body(reason: str) -> bytes:
    """What the server is handed in place of a refused frame: a JSON value that is no JSON-RPC message,
    which the protocol answers with Invalid Request (id null), as for any other."""
    return json.dumps({"frameRefused": reason}).encode("utf-8")


class FrameInput:
    """The client's frames, shown to pygls as well-formed frames only.

    pygls reads header lines, then a body of the length they name, with no
    bound.  Here each frame is read with :func:`read_frame`; pygls sees
    ``Content-Length: N``, a blank line and the body.  A refused frame becomes
    :func:`fault_body` (one per run of refused frames, so endless junk earns one
    answer); frames without a usable length are skipped, as before.
    """

    def __init__(self, stream: BinaryIO, replay: bytes = b"") -> None:
        self._source = ReplayedStream(replay, stream)
        self.on_end: Callable[[], Any] | None = None  # called once the client has closed its end
        self._body: bytes | None = None  # the body pygls reads next
        self._blank_due = False  # the header line was handed out; the blank line is next
        self._in_fault_run = False
        self.refused = 0  # frames refused so far (a bound passed)

    def next_frame(self) -> Frame:
        return read_frame(self._source)

    def readline(self, limit: int = -1) -> bytes:
        if self._blank_due:
            self._blank_due = False
            return b"\r\n"
        while True:
            frame = self.next_frame()
            if frame.fault is not None:
                self.refused += 1
                if self._in_fault_run:
                    continue
                self._in_fault_run = True
                self._body = fault_body(frame.fault)
            elif frame.ended:
                if self.on_end is not None:
                    self.on_end()
                return b""
            elif not frame.body:  # no usable length, or an empty body: nothing to hand on
                continue
            else:
                self._in_fault_run = False
                self._body = frame.body
            self._blank_due = True
            return b"Content-Length: %d\r\n" % len(self._body)

    def read(self, size: int) -> bytes:
        body, self._body = self._body or b"", None
        return body[:size]
