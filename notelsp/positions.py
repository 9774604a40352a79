"""Offsets ↔ lines and columns.

Everything below the edge speaks in code-point offsets into the document.
The CLI reports 1-based lines and columns in code points; the server converts
columns to the encoding its client negotiated (UTF-16 by default).
A line ends at ``\\n``; a ``\\r`` before it belongs to no column.
"""

from __future__ import annotations

from bisect import bisect_right


class LineIndex:
    """Start offset of every line of a text, for fast offset → (line, column)."""

    __slots__ = ("text", "starts")

    def __init__(self, text: str) -> None:
        self.text = text
        starts = [0]
        find = text.find
        position = find("\n")
        while position != -1:
            starts.append(position + 1)
            position = find("\n", position + 1)
        self.starts = starts

    def line_col(self, offset: int) -> tuple[int, int]:
        """0-based line and 0-based code-point column of ``offset``."""
        offset = max(0, min(offset, len(self.text)))
        line = bisect_right(self.starts, offset) - 1
        return line, offset - self.starts[line]

    def offset(self, line: int, column: int) -> int:
        """Offset of a 0-based line and code-point column, clamped into the line."""
        if line >= len(self.starts):
            return len(self.text)
        start = self.starts[max(line, 0)]
        end = self.starts[line + 1] - 1 if line + 1 < len(self.starts) else len(self.text)
        if end > start and self.text[end - 1] == "\r":
            end -= 1
        return start + max(0, min(column, end - start))

    def line_text(self, line: int) -> str:
        start = self.starts[line]
        end = self.starts[line + 1] - 1 if line + 1 < len(self.starts) else len(self.text)
        return self.text[start:end].rstrip("\r")
