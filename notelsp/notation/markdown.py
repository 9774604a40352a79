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
from .markdown_blocks import _FRONT_MATTER_OPENER, BONDING_INFO, ParsedBlocks, Segment, parse_blocks
from .model import Span

__all__ = ["BONDING_INFO", "BlockMemory", "MarkdownStructure", "Segment", "line_starts", "markdown_structure"]


@dataclass(frozen=True, slots=True)
class MarkdownStructure:
    """What of a Markdown document is read for annotations: its prose segments and ```bonding lines."""

    segments: tuple[Segment, ...]
    bonding_lines: tuple[Span, ...]  # content lines of ```bonding blocks


def markdown_structure(text: str, memory: BlockMemory | None = None) -> MarkdownStructure:
    """Inline segments and bonding-block lines of a Markdown document.

    With ``memory`` (the analysis host's), an edited document is re-parsed only around the
    edit: see :meth:`BlockMemory.blocks_of`; without it the whole text is parsed.
    """
    if "{" not in text and BONDING_INFO not in text:
        return MarkdownStructure((), ())
    blocks = (parse_blocks(text) if memory is None else memory.blocks_of(text)).blocks
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


@dataclass(slots=True)
class _Parsed:
    """One version of a document with its parsed blocks, kept for re-parsing the next version."""

    text: str
    parsed: ParsedBlocks
    _reaches_across: bool | None = None  # found out when first compared with a later version

    def reaches_across(self) -> bool:
        """Whether this version may hold a link reference definition or a "$$" line."""
        if self._reaches_across is None:
            self._reaches_across = _may_define_or_open_math(self.text)
        return self._reaches_across


_RECENT_LIMIT = 4  # documents remembered for incremental re-parsing (about one per open editor)
_COMPARE_STEP = 4096
_SMALL_EDIT_CHARS = 4096  # an edit this small in the latest version: no need to compare older ones
_BACKED_UP_BLOCKS = 2  # blocks re-parsed before the edit: their ends may depend on its lines
_MARGIN_BLOCKS = 2  # old blocks after the resync point included in the parse window


class BlockMemory:
    """The last few documents' blocks, so the next version is re-parsed only around its edit.

    Owned by an analysis host (``notelsp.review.host``), never shared between hosts.  Where the edit
    is known (:meth:`expect_edit`, from the ranges the editor sent) its unchanged prefix and suffix
    are taken as given; otherwise they are found by comparing the text with the remembered ones.
    """

    def __init__(self) -> None:
        self._recent: list[_Parsed] = []  # most recent last
        self._edits: list[tuple[str, str, int, int]] = []  # (old text, new text, unchanged prefix, suffix)
        self._lock = threading.Lock()

    def __len__(self) -> int:
        return len(self._recent)

    def expect_edit(self, old: str, new: str, prefix: int, suffix: int) -> None:
        """``new`` is ``old`` with everything but its first ``prefix`` and last ``suffix`` characters replaced."""
        with self._lock:
            self._edits.append((old, new, prefix, suffix))
            del self._edits[:-_RECENT_LIMIT]

    def blocks_of(self, text: str) -> ParsedBlocks:
        with self._lock:
            recent, edits = list(self._recent), list(self._edits)
        for remembered in reversed(recent):
            if remembered.text == text:
                return remembered.parsed
        parsed = None
        # Reference definitions reach across blocks, and whether a '$$' line opens display math
        # depends on a closing line anywhere below it: with either, in this version or in the one
        # it is compared with (an edit may remove or change a definition every link relied on),
        # parse the whole text.  So does a lone CR, a line break too rare in notes to be worth
        # re-parsing around.  Each test reads the whole text: only made when there is an earlier
        # version to compare with.
        if recent and not _may_define_or_open_math(text) and ("\r" not in text or text.count("\r") == text.count("\r\n")):
            comparable = [remembered for remembered in recent if not remembered.reaches_across()]
            previous = _known_edit(comparable, edits, text) if comparable else None
            if previous is None and comparable:
                previous = _closest(comparable, text)
            if previous is not None:
                parsed = _reparsed(previous, text)
        if parsed is None:
            parsed = parse_blocks(text)
        with self._lock:
            self._recent.append(_Parsed(text, parsed))
            del self._recent[:-_RECENT_LIMIT]
            self._edits = [edit for edit in self._edits if edit[1] is not text]  # used: its text is remembered now
        return parsed


def _known_edit(recent: list[_Parsed], edits: list[tuple[str, str, int, int]], text: str) -> tuple[_Parsed, int, int] | None:
    """The remembered version ``text`` was edited from, with the unchanged prefix and suffix the edit names."""
    for old, new, prefix, suffix in reversed(edits):
        if new is not text and new != text:
            continue
        for remembered in reversed(recent):
            if remembered.text is old or remembered.text == old:
                if prefix + suffix < len(text) // 2:
                    return None  # mostly different text: a full parse is as cheap
                return remembered, prefix, suffix
    return None


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


def _reparsed(previous: tuple[_Parsed, int, int], text: str) -> ParsedBlocks | None:
    """The blocks of ``text``, an edit of a remembered document, re-parsed around the edit.

    All in character offsets: blocks start at line starts, so the block holding the first
    changed character is the last one starting at or before it.
    """
    old, prefix, suffix = previous
    starts, blocks, front_matter = old.parsed
    if not starts:
        return None
    shift = len(text) - len(old.text)
    touched = bisect_right(starts, prefix) - 1
    # Front matter runs from the first line to a closing line anywhere below: unless the edit is
    # past front matter that was closed, a parse of a window around it cannot tell.
    if (_FRONT_MATTER_OPENER.match(text) or _FRONT_MATTER_OPENER.match(old.text)) and not (front_matter and touched > 0):
        return None
    keep = max(touched - _BACKED_UP_BLOCKS, 0)
    window_first = starts[keep] if keep > 0 else 0
    given_starts = [block.start for block in blocks]  # only the blocks that contribute something
    kept = blocks[: bisect_left(given_starts, window_first)]
    # Blocks starting after the first unchanged character: their line break is unchanged, so
    # they start a line in both texts.
    resync = max(bisect_right(starts, len(old.text) - suffix), touched + 1)
    while True:
        if resync >= len(starts):
            window_end = len(text)
        else:
            end_block = resync + _MARGIN_BLOCKS
            window_end = starts[end_block] + shift if end_block < len(starts) else len(text)
        fresh = _parse_window(text, window_first, window_end)
        if resync >= len(starts):
            return ParsedBlocks(starts[:keep] + fresh.starts, kept + fresh.blocks, front_matter or fresh.front_matter)
        target = starts[resync] + shift
        at = bisect_left(fresh.starts, target)
        if at < len(fresh.starts) and fresh.starts[at] == target:
            fresh_given = fresh.blocks[: bisect_left([block.start for block in fresh.blocks], target)]
            later = blocks[bisect_left(given_starts, starts[resync]) :]
            later_starts = starts[resync:] if shift == 0 else tuple(start + shift for start in starts[resync:])
            return ParsedBlocks(
                starts[:keep] + fresh.starts[:at] + later_starts,
                kept + fresh_given + tuple(block.moved(shift) for block in later),
                front_matter or fresh.front_matter,
            )
        resync = len(starts)  # the edit reaches further (say, an unclosed fence): parse to the end


def _parse_window(text: str, begin: int, stop: int) -> ParsedBlocks:
    """The blocks of ``text[begin:stop]`` (whole lines) parsed on their own, placed in the document."""
    fresh = parse_blocks(text[begin:stop], document_start=begin == 0)
    return ParsedBlocks(
        tuple(start + begin for start in fresh.starts), tuple(block.moved(begin) for block in fresh.blocks), fresh.front_matter
    )
