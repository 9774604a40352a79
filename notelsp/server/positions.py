"""Code-point offsets <-> LSP positions in the negotiated encoding.

The review layer speaks code-point offsets into the whole text; LSP speaks
(line, character) where ``character`` counts UTF-16 code units by default,
or UTF-8 bytes / UTF-32 code points when negotiated.  Lines end at ``\\n``,
``\\r\\n`` or a lone ``\\r`` (the LSP definition).
"""

from __future__ import annotations

from bisect import bisect_right
import re
from dataclasses import dataclass, field
from functools import lru_cache

from lsprotocol import types

from ..notation.model import Span
from ..positions import line_starts

UTF8, UTF16, UTF32 = "utf-8", "utf-16", "utf-32"
# Codec and bytes per unit, for counting a long slice's units at C speed.
_CODECS = {UTF8: ("utf-8", 1), UTF16: ("utf-16-le", 2)}
_WIDE_IN = {UTF8: re.compile(r"[^\x00-\x7f]"), UTF16: re.compile("[\U00010000-\U0010ffff]")}


def units_of(char: str, encoding: str) -> int:
    """Code units one code point takes in ``encoding``."""
    if encoding == UTF32:
        return 1
    point = ord(char)
    if encoding == UTF8:
        return 1 if point < 0x80 else 2 if point < 0x800 else 3 if point < 0x10000 else 4
    return 2 if point > 0xFFFF else 1


# A line holding wide characters is measured in blocks of this many code points: converting a
# position encodes at most one block, so a 1 MB line costs the same per position as a short one.
BLOCK = 256


@dataclass(frozen=True)
class LineIndex:
    """Where each line of ``text`` starts, for converting positions both ways."""

    text: str
    encoding: str
    starts: tuple[int, ...]
    # line -> None when each of its code points is one unit, else the units before each block of
    # BLOCK code points (prefix sums); filled lazily, once per line, so converting is O(BLOCK) per position.
    _blocks: dict[int, list[int] | None] = field(default_factory=dict, compare=False, repr=False)

    def _units_before_blocks(self, line: int) -> list[int] | None:
        if self.encoding == UTF32:
            return None
        if line not in self._blocks:
            start, end = self.starts[line], self._line_end(line)
            blocks = None
            if _WIDE_IN[self.encoding].search(self.text, start, end) is not None:
                codec, width = _CODECS[self.encoding]
                blocks = [0]
                for block_start in range(start, end, BLOCK):
                    block = self.text[block_start : min(block_start + BLOCK, end)]
                    blocks.append(blocks[-1] + len(block.encode(codec, "surrogatepass")) // width)
            self._blocks[line] = blocks
        return self._blocks[line]

    def _line_end(self, line: int) -> int:
        """Offset of the line's terminator (or the end of the text)."""
        end = self.starts[line + 1] if line + 1 < len(self.starts) else len(self.text)
        while end > self.starts[line] and self.text[end - 1] in "\r\n":
            end -= 1
        return end

    def line_character(self, offset: int) -> tuple[int, int]:
        """(line, character) of ``offset``, without building a Position (publishing converts thousands)."""
        offset = max(0, min(offset, len(self.text)))
        line = bisect_right(self.starts, offset) - 1
        start = self.starts[line]
        blocks = self._units_before_blocks(line)
        if blocks is None:
            return line, offset - start
        whole, _ = divmod(offset - start, BLOCK)
        whole = min(whole, len(blocks) - 1)  # an offset in the terminator counts from the last block
        codec, width = _CODECS[self.encoding]
        rest = self.text[start + whole * BLOCK : offset]
        return line, blocks[whole] + len(rest.encode(codec, "surrogatepass")) // width

    def position(self, offset: int) -> types.Position:
        line, character = self.line_character(offset)
        return types.Position(line=line, character=character)

    def offset(self, position: types.Position) -> int:
        """Code-point offset of ``position``; columns past the line's end clamp to it."""
        if position.line >= len(self.starts):
            return len(self.text)
        start, end = self.starts[position.line], self._line_end(position.line)
        blocks = self._units_before_blocks(position.line)
        if blocks is None:
            return min(start + position.character, end)
        whole = bisect_right(blocks, position.character) - 1  # the last block starting at or before it
        if whole >= len(blocks) - 1:
            return end
        remaining, offset = position.character - blocks[whole], start + whole * BLOCK
        while offset < end and remaining > 0:
            remaining -= units_of(self.text[offset], self.encoding)
            offset += 1
        return offset

    def range(self, span: Span) -> types.Range:
        return types.Range(start=self.position(span.start), end=self.position(span.end))

    def span(self, range_: types.Range) -> Span:
        return Span(self.offset(range_.start), self.offset(range_.end))


@lru_cache(maxsize=8)  # a few versions of the open notes; each holds the text
def line_index(text: str, encoding: str = UTF16) -> LineIndex:
    """The (cached) line index of ``text`` for ``encoding``."""
    return LineIndex(text, str(getattr(encoding, "value", encoding)), line_starts(text))
