"""Offsets → lines and columns, with one definition of a line for everything.

Everything below the edge speaks in code-point offsets into the document.
The CLI reports 1-based lines and columns in code points; the server converts
columns to the encoding its client negotiated (notelsp/server/positions.py).
Both break lines where LSP does, at ``\\r\\n``, ``\\r`` or ``\\n``, so a
terminal report and an editor agree on every line number.
"""

from __future__ import annotations

import re
from bisect import bisect_right
from functools import lru_cache
from itertools import accumulate

LINE_BREAK = re.compile(r"\r\n?|\n")


@lru_cache(maxsize=4)  # the scanner and the server's line index ask for the same text's starts
def lf_line_starts(text: str) -> tuple[int, ...]:
    """Offset of each line's first character, lines ending at '\\n' only (built in C, not a Python loop)."""
    return tuple(accumulate(map((1).__add__, map(len, text.split("\n"))), initial=0))[:-1]


def line_starts(text: str) -> tuple[int, ...]:
    """Offset of the first character of every line, lines ending at CRLF, CR or LF."""
    if "\r" not in text:
        return lf_line_starts(text)
    return (0, *(match.end() for match in LINE_BREAK.finditer(text)))


class LineIndex:
    """Code-point (line, column) of any offset in a text."""

    __slots__ = ("text", "starts")

    def __init__(self, text: str) -> None:
        self.text = text
        self.starts = line_starts(text)

    def line_col(self, offset: int) -> tuple[int, int]:
        """0-based line and 0-based code-point column of ``offset``."""
        offset = max(0, min(offset, len(self.text)))
        line = bisect_right(self.starts, offset) - 1
        return line, offset - self.starts[line]
