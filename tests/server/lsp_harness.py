"""Shared helpers for the server tests: start the server as a real subprocess, apply edits."""

from __future__ import annotations

import asyncio
import sys
from pathlib import Path

from lsprotocol import types

from notelsp.server.positions import line_index

SERVER_COMMAND = [sys.executable, "-m", "notelsp.server"]


def apply_edits(text: str, edits: list[types.TextEdit], encoding: str = "utf-16") -> str:
    """Apply LSP text edits (non-overlapping) to ``text`` the way an editor does."""
    index = line_index(text, encoding)
    spans = sorted(((index.span(e.range), e.new_text) for e in edits), key=lambda item: item[0].start, reverse=True)
    for span, new_text in spans:
        text = text[: span.start] + new_text + text[span.end :]
    return text


async def wait_for(predicate, timeout: float = 30.0, step: float = 0.05):
    """Poll ``predicate`` until it returns something truthy (bounded; generous, as CI machines may be busy)."""
    deadline = asyncio.get_running_loop().time() + timeout
    while True:
        value = predicate()
        if value:
            return value
        if asyncio.get_running_loop().time() > deadline:
            raise AssertionError(f"timed out after {timeout}s waiting for the server")
        await asyncio.sleep(step)


def file_uri(path: Path) -> str:
    return path.resolve().as_uri()
