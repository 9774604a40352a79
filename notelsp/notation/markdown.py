"""Where annotations may stand in a Markdown document, and re-parsing only around an edit.

The block and inline structure comes from notelsp's own line-oriented scanner
(:mod:`notelsp.notation.markdown_blocks`, :mod:`notelsp.notation.markdown_inline`),
checked against markdown-it-py, a general-purpose CommonMark parser, in the tests.
"""

from __future__ import annotations

import threading
from bisect import bisect_left, bisect_right
from dataclasses import dataclass
from itertools import chain
from operator import attrgetter

from ..positions import lf_line_starts as line_starts  # Markdown lines end at LF here
from .markdown_blocks import BONDING_INFO, ParsedBlocks, Segment, line_numbering, parse_blocks
from .model import Span

__all__ = ["BONDING_INFO", "MarkdownStructure", "Segment", "forget_documents", "line_starts", "markdown_structure"]


@dataclass(frozen=True, slots=True)
class MarkdownStructure:
    segments: tuple[Segment, ...]
    bonding_lines: tuple[Span, ...]  # content lines of ```bonding blocks


def markdown_structure(text: str) -> MarkdownStructure:
    """Inline segments and bonding-block lines of a Markdown document.

    An edited document is re-parsed only around the edit: see :func:`_blocks_of`.
    """
    if "{" not in text and BONDING_INFO not in text:
        return MarkdownStructure((), ())
    blocks = _blocks_of(text).blocks
    return MarkdownStructure(
        tuple(chain.from_iterable(map(_SEGMENTS, blocks))), tuple(chain.from_iterable(map(_BONDING, blocks)))
    )


_SEGMENTS, _BONDING = attrgetter("segments"), attrgetter("bonding")


# --- top-level blocks, re-parsed only where an edit touched them ------------------------
#
# CommonMark parses blocks forwards, and between two top-level blocks nothing
# carries over (the one exception, link reference definitions, makes us parse
# the whole text).  Whether a block ends is decided by at most the first two
# lines of the next one.  So after an edit, the blocks well before it and the
# blocks after it are unchanged (moved by the edit's length) as soon as a
# parse of the edited region starts a block exactly where an old block, in
# unchanged text, started.


class _Parsed:
    """A parsed document: its text, its blocks and, once an edit needs them, its line starts
    (a full check does not: most of a note is parsed a block at a time, not a line)."""

    __slots__ = ("text", "parsed", "_starts")

    def __init__(self, text: str, parsed: ParsedBlocks, starts: tuple[int, ...] | None = None) -> None:
        self.text, self.parsed, self._starts = text, parsed, starts

    @property
    def starts(self) -> tuple[int, ...]:
        if self._starts is None:  # two threads may both compute it: the same tuple either way
            self._starts = tuple(line_numbering(self.text))
        return self._starts


_RECENT_LIMIT = 4  # documents remembered for incremental re-parsing (about one per open editor)
_recent: list[_Parsed] = []  # most recent last
_recent_lock = threading.Lock()
_COMPARE_STEP = 4096
_SMALL_EDIT_CHARS = 4096  # an edit this small in the latest version: no need to compare older ones
_BACKED_UP_BLOCKS = 2  # blocks re-parsed before the edit: their ends may depend on its lines
_MARGIN_BLOCKS = 2  # old blocks after the resync point included in the parse window


def forget_documents() -> None:
    """Drop the remembered documents (the next parse of any text is a whole parse)."""
    with _recent_lock:
        _recent.clear()


def _blocks_of(text: str) -> ParsedBlocks:
    with _recent_lock:
        recent = list(_recent)
    for remembered in reversed(recent):
        if remembered.text == text:
            return remembered.parsed
    parsed, starts = None, None
    # Reference definitions reach across blocks, and whether a '$$' line opens display math
    # depends on a closing line anywhere below it: with either, parse the whole text.  So
    # does a lone CR (the line numbering below counts LF only).
    # Each test reads the whole text: only made when there is an earlier version to compare with.
    if recent and not _may_define_or_open_math(text) and ("\r" not in text or text.count("\r") == text.count("\r\n")):
        previous = _closest(recent, text)
        if previous is not None:
            starts = tuple(line_starts(text))
            parsed = _reparsed(previous, text, starts)
    if parsed is None:
        parsed = parse_blocks(text)
    with _recent_lock:
        _recent.append(_Parsed(text, parsed, starts))
        del _recent[:-_RECENT_LIMIT]
    return parsed


def _may_define_or_open_math(text: str) -> bool:
    """Whether ``text`` may hold a link reference definition ("]:") or a "$$" line."""
    # One character is searched for many times faster than two.
    return ("]" in text and "]:" in text) or ("$" in text and "$$" in text)


def _common_prefix(a: str, b: str) -> int:
    limit, index = min(len(a), len(b)), 0
    while index < limit and a[index : index + _COMPARE_STEP] == b[index : index + _COMPARE_STEP]:
        index += _COMPARE_STEP
    index = min(index, limit)
    while index < limit and a[index] == b[index]:
        index += 1
    return index


def _common_suffix(a: str, b: str, limit: int) -> int:
    length = 0
    while length < limit:
        step = min(_COMPARE_STEP, limit - length)
        if a[len(a) - length - step : len(a) - length] != b[len(b) - length - step : len(b) - length]:
            break
        length += step
    while length < limit and a[len(a) - length - 1] == b[len(b) - length - 1]:
        length += 1
    return length


def _closest(recent: list[_Parsed], text: str) -> tuple[_Parsed, int, int] | None:
    """The remembered document sharing the most text with ``text``, with the shared prefix and suffix."""
    best = None
    for parsed in reversed(recent):  # most recent first: usually the version just before this one
        prefix = _common_prefix(parsed.text, text)
        suffix = _common_suffix(parsed.text, text, min(len(parsed.text), len(text)) - prefix)
        if best is None or prefix + suffix > best[1] + best[2]:
            best = (parsed, prefix, suffix)
        if len(text) - (prefix + suffix) <= _SMALL_EDIT_CHARS:
            break
    if best is None or best[1] + best[2] < len(text) // 2:
        return None  # mostly different text: a full parse is as cheap
    return best


def _reparsed(previous: tuple[_Parsed, int, int], text: str, starts: tuple[int, ...]) -> ParsedBlocks | None:
    old, prefix, suffix = previous
    firsts, blocks = old.parsed
    if not firsts:
        return None
    first_changed = bisect_right(old.starts, prefix) - 1
    # First old line whose preceding newline is in the unchanged tail, so it starts a line in both texts.
    unchanged_from = bisect_right(old.starts, len(old.text) - suffix)
    line_shift, char_shift = len(starts) - len(old.starts), len(text) - len(old.text)
    touched = bisect_right(firsts, first_changed) - 1
    keep = max(touched - _BACKED_UP_BLOCKS, 0)
    window_first = firsts[keep] if keep > 0 else 0
    given_firsts = [block.first_line for block in blocks]  # only the blocks that contribute something
    kept = blocks[: bisect_left(given_firsts, window_first)]
    resync = max(bisect_left(firsts, unchanged_from), touched + 1)
    while True:
        if resync >= len(firsts):
            window_end = len(starts)
        else:
            end_block = resync + _MARGIN_BLOCKS
            window_end = firsts[end_block] + line_shift if end_block < len(firsts) else len(starts)
        fresh = _parse_window(text, starts, window_first, window_end)
        if resync >= len(firsts):
            return ParsedBlocks(firsts[:keep] + fresh.firsts, kept + fresh.blocks)
        target = firsts[resync] + line_shift
        at = bisect_left(fresh.firsts, target)
        if at < len(fresh.firsts) and fresh.firsts[at] == target:
            fresh_given = fresh.blocks[: bisect_left([block.first_line for block in fresh.blocks], target)]
            later = blocks[bisect_left(given_firsts, firsts[resync]) :]
            later_firsts = firsts[resync:] if line_shift == 0 else tuple(first + line_shift for first in firsts[resync:])
            return ParsedBlocks(
                firsts[:keep] + fresh.firsts[:at] + later_firsts,
                kept + fresh_given + tuple(block.moved(line_shift, char_shift) for block in later),
            )
        resync = len(firsts)  # the edit reaches further (say, an unclosed fence): parse to the end


def _parse_window(text: str, starts: tuple[int, ...], first: int, end: int) -> ParsedBlocks:
    """The blocks of lines [first, end) parsed on their own, placed in the document."""
    begin = starts[first] if first < len(starts) else len(text)
    stop = starts[end] if end < len(starts) else len(text)
    fresh = parse_blocks(text[begin:stop])
    return ParsedBlocks(tuple(line + first for line in fresh.firsts), tuple(block.moved(first, begin) for block in fresh.blocks))
