"""Stand between an editor and a language server, passing every LSP message on unchanged and logging it.

Usage: python lsp_tee.py LOG -- SERVER COMMAND...

Each message is appended to LOG as one JSON line, {"from": "client"|"server", "message": {...}},
flushed at once so a test can read the log while the session runs. The bytes forwarded are the bytes
read: the log is a copy, never a re-encoding.
"""

from __future__ import annotations

import json
import subprocess
import sys
import threading
from typing import BinaryIO


def read_frame(stream: BinaryIO) -> tuple[bytes, bytes] | None:
    """One base-protocol frame as (header bytes, body bytes), or None at the end of the stream."""
    header = b""
    length = None
    while True:
        line = stream.readline()
        if not line:
            return None
        header += line
        if line in (b"\r\n", b"\n"):
            break
        name, _, value = line.decode("ascii", "replace").partition(":")
        if name.strip().lower() == "content-length":
            length = int(value.strip())
    if length is None:
        raise ValueError(f"frame without Content-Length: {header!r}")
    body = stream.read(length)
    if len(body) < length:
        return None
    return header, body


def pump(source: BinaryIO, sink: BinaryIO, side: str, log: BinaryIO, lock: threading.Lock) -> None:
    try:
        while (frame := read_frame(source)) is not None:
            header, body = frame
            sink.write(header + body)
            sink.flush()
            try:
                message = json.loads(body)
            except ValueError:
                message = {"unparsed": body.decode("utf-8", "replace")}
            with lock:
                log.write(json.dumps({"from": side, "message": message}).encode() + b"\n")
                log.flush()
    except (BrokenPipeError, ValueError, OSError):
        pass
    finally:
        try:
            sink.close()
        except OSError:
            pass


def main(argv: list[str]) -> int:
    log_path, separator, *command = argv
    if separator != "--" or not command:
        raise SystemExit("usage: lsp_tee.py LOG -- SERVER COMMAND...")
    server = subprocess.Popen(command, stdin=subprocess.PIPE, stdout=subprocess.PIPE)
    lock = threading.Lock()
    with open(log_path, "ab", buffering=0) as log:
        to_server = threading.Thread(
            target=pump, args=(sys.stdin.buffer, server.stdin, "client", log, lock), daemon=True)
        to_server.start()
        pump(server.stdout, sys.stdout.buffer, "server", log, lock)  # ends when the server closes its output
        return server.wait()


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
