"""LSP base-protocol frames (``Content-Length`` headers, a blank line, a body), read off a byte stream.

Standard library only: the fast start-up front reads the client's first frame
with it before anything heavy is imported, and the test and benchmark clients
read the server's replies with it.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import BinaryIO, Iterator

LENGTH_HEADER = b"content-length"


@dataclass(frozen=True)
class Frame:
    raw: bytes  # every byte read for this frame, headers included, to hand on unchanged
    body: bytes | None  # None when the headers name no usable length or the stream ended inside the frame
    ended: bool = False  # the stream ended before the frame did (or before it began: raw is empty)


def read_frame(stream: BinaryIO) -> Frame:
    """The next frame; ``raw == b""`` once the stream has ended."""
    raw = bytearray()
    length: int | None = None
    while True:
        line = stream.readline()
        raw += line
        if not line.endswith(b"\n"):  # end of stream (inside the headers, or before anything)
            return Frame(bytes(raw), None, ended=True)
        line = line.strip()
        if not line:
            break
        name, _, value = line.partition(b":")
        if name.strip().lower() == LENGTH_HEADER:
            value = value.strip()
            length = int(value) if value.isdigit() else None
    if length is None:
        return Frame(bytes(raw), None)
    body = stream.read(length)
    raw += body
    whole = len(body) == length
    return Frame(bytes(raw), body if whole else None, ended=not whole)


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
