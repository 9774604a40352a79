"""Where annotations may stand in a Markdown document, found with markdown-it-py.

Block structure (fences, indented code, display math, HTML blocks) comes from
markdown-it's block tokens and their line maps.  Inline structure (code spans,
inline math, inline HTML, autolinks, escapes, link destinations) has no
positions in markdown-it's tokens, so the inline rules are wrapped to record
the exact source range each one consumed; those ranges are skipped.
"""

from __future__ import annotations

import threading
from bisect import bisect_left, bisect_right
from dataclasses import dataclass
from functools import cache
from itertools import accumulate
from typing import Any

from markdown_it import MarkdownIt
from mdit_py_plugins.dollarmath import dollarmath_plugin

from .model import Span

BONDING_INFO = "bonding"
_SKIPPED_INLINE_RULES = ("math_inline", "escape", "backticks", "autolink", "html_inline", "image")
_SKIPS_KEY = "notelsp_skips"
_SKIP_STARTS = frozenset("$\\`<![")  # the characters the skipped inline rules (and links) begin with


@dataclass(frozen=True, slots=True)
class Segment:
    """One line of inline text, with the ranges in it where annotations may not start."""

    start: int  # document offset of text[0]
    text: str
    skips: tuple[tuple[int, int], ...] = ()  # half-open, relative to ``text``


@dataclass(frozen=True, slots=True)
class MarkdownStructure:
    segments: tuple[Segment, ...]
    bonding_lines: tuple[Span, ...]  # content lines of ```bonding blocks


def _recording(name: str, rule: Any) -> Any:
    def run(state: Any, silent: bool) -> bool:
        start = state.pos
        matched = rule(state, silent)
        skips = state.env.get(_SKIPS_KEY)
        if matched and not silent and skips is not None:
            if name != "link":
                skips.append((start, state.pos))
            else:
                # The label stays prose; '[' and '](destination "title")' are skipped.
                state.pos, end = start, state.pos
                label_end = state.md.helpers.parseLinkLabel(state, start, True)
                state.pos = end
                skips.append((start, start + 1))
                skips.append((label_end, end))
        return matched

    return run


def _inline_with_skips(state: Any) -> None:
    """markdown-it's core 'inline' step, keeping each inline token's skipped ranges in its meta."""
    for token in state.tokens:
        if token.type == "inline":
            if token.children is None:
                token.children = []
            if "{" not in token.content:
                continue  # no annotation can start here: leave its inline structure unparsed
            if _SKIP_STARTS.isdisjoint(token.content):
                token.meta["skips"] = ()  # none of the skipped constructs can begin here
                continue
            state.env[_SKIPS_KEY] = []
            state.md.inline.parse(token.content, state.md, state.env, token.children)
            token.meta["skips"] = tuple(state.env.pop(_SKIPS_KEY))


@cache
def _markdown() -> MarkdownIt:
    md = MarkdownIt("commonmark").enable("table")
    dollarmath_plugin(md)
    for rule in md.inline.ruler.__rules__:
        if rule.name in _SKIPPED_INLINE_RULES or rule.name == "link":
            rule.fn = _recording(rule.name, rule.fn)
    md.inline.ruler.__cache__ = None
    md.core.ruler.at("inline", _inline_with_skips)
    # Only structure is wanted: skip the typographic core steps.
    md.disable(["replacements", "smartquotes", "text_join"], ignoreInvalid=True)
    return md


def line_starts(text: str) -> list[int]:
    """Offset of each line's first character (lines end at '\\n'); built in C, not a Python loop."""
    lengths = map(len, text.split("\n"))
    return list(accumulate(map((1).__add__, lengths), initial=0))[:-1]


def _line(text: str, starts, index: int) -> tuple[int, str]:
    start = starts[index]
    end = starts[index + 1] - 1 if index + 1 < len(starts) else len(text)
    return start, text[start:end].rstrip("\r")


def markdown_structure(text: str) -> MarkdownStructure:
    """Inline segments and bonding-block lines of a Markdown document.

    An edited document is re-parsed only around the edit: see :func:`_blocks_of`.
    """
    if "{" not in text and BONDING_INFO not in text:
        return MarkdownStructure((), ())
    blocks = _blocks_of(text)
    return MarkdownStructure(
        tuple(segment for block in blocks for segment in block.segments),
        tuple(span for block in blocks for span in block.bonding),
    )


# --- top-level blocks, re-parsed only where an edit touched them ------------------------
#
# CommonMark parses blocks forwards, and between two top-level blocks nothing
# carries over (the one exception, link reference definitions, makes us parse
# the whole text).  Whether a block ends is decided by at most the first two
# lines of the next one.  So after an edit, the blocks well before it and the
# blocks after it are unchanged (moved by the edit's length) as soon as a
# parse of the edited region starts a block exactly where an old block, in
# unchanged text, started.


@dataclass(frozen=True, slots=True)
class _Block:
    """One top-level block: its first line and what it contributes, in document offsets."""

    first_line: int
    segments: tuple[Segment, ...]
    bonding: tuple[Span, ...]

    def moved(self, lines: int, chars: int) -> "_Block":
        if lines == 0 and chars == 0:
            return self
        return _Block(
            self.first_line + lines,
            tuple(Segment(s.start + chars, s.text, s.skips) for s in self.segments),
            tuple(Span(b.start + chars, b.end + chars) for b in self.bonding),
        )


@dataclass(frozen=True, slots=True)
class _Parsed:
    text: str
    starts: tuple[int, ...]
    blocks: tuple[_Block, ...]


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


def _blocks_of(text: str) -> tuple[_Block, ...]:
    with _recent_lock:
        recent = list(_recent)
    for parsed in reversed(recent):
        if parsed.text == text:
            return parsed.blocks
    starts = tuple(line_starts(text))
    blocks = None
    # Reference definitions reach across blocks; a lone CR counts as a line break only for markdown-it.
    if "]:" not in text and ("\r" not in text or text.count("\r") == text.count("\r\n")):
        previous = _closest(recent, text)
        if previous is not None:
            blocks = _reparsed(previous, text, starts)
    if blocks is None:
        blocks = _parse_blocks(text, starts)
    with _recent_lock:
        _recent.append(_Parsed(text, starts, blocks))
        del _recent[:-_RECENT_LIMIT]
    return blocks


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


def _reparsed(previous: tuple[_Parsed, int, int], text: str, starts: tuple[int, ...]) -> tuple[_Block, ...] | None:
    old, prefix, suffix = previous
    blocks = old.blocks
    if not blocks:
        return None
    first_changed = bisect_right(old.starts, prefix) - 1
    # First old line whose preceding newline is in the unchanged tail, so it starts a line in both texts.
    unchanged_from = bisect_right(old.starts, len(old.text) - suffix)
    line_shift, char_shift = len(starts) - len(old.starts), len(text) - len(old.text)
    firsts = [block.first_line for block in blocks]
    touched = bisect_right(firsts, first_changed) - 1
    keep = max(touched - _BACKED_UP_BLOCKS, 0)
    window_first = blocks[keep].first_line if keep > 0 else 0
    resync = max(bisect_left(firsts, unchanged_from), touched + 1)
    while True:
        if resync >= len(blocks):
            window_end = len(starts)
        else:
            end_block = resync + _MARGIN_BLOCKS
            window_end = firsts[end_block] + line_shift if end_block < len(blocks) else len(starts)
        fresh = _parse_window(text, starts, window_first, window_end)
        if resync >= len(blocks):
            return blocks[:keep] + fresh
        target = firsts[resync] + line_shift
        for index, block in enumerate(fresh):
            if block.first_line == target:
                moved = tuple(block.moved(line_shift, char_shift) for block in blocks[resync:])
                return blocks[:keep] + fresh[:index] + moved
        resync = len(blocks)  # the edit reaches further (say, an unclosed fence): parse to the end


def _parse_window(text: str, starts: tuple[int, ...], first: int, end: int) -> tuple[_Block, ...]:
    """The blocks of lines [first, end) parsed on their own, placed in the document."""
    begin = starts[first] if first < len(starts) else len(text)
    stop = starts[end] if end < len(starts) else len(text)
    window = text[begin:stop]
    return tuple(block.moved(first, begin) for block in _parse_blocks(window, tuple(line_starts(window))))


def _parse_blocks(text: str, starts: tuple[int, ...]) -> tuple[_Block, ...]:
    tokens = _markdown().parse(text, {})
    groups: list[tuple[int, list[Any]]] = []
    for token in tokens:
        if token.level == 0 and token.nesting >= 0 and token.map:
            groups.append((token.map[0], []))
        if groups:
            groups[-1][1].append(token)
    return tuple(_block(text, starts, first, members) for first, members in groups)


def _block(text: str, starts: tuple[int, ...], first: int, tokens: list[Any]) -> _Block:
    segments: list[Segment] = []
    bonding: list[Span] = []
    cursors: dict[int, int] = {}  # per line: where the previous inline fragment ended (table cells)
    for token in tokens:
        if token.type == "fence" and token.map and token.info.strip().split()[:1] == [BONDING_INFO]:
            line = token.map[0] + 1
            for index in range(line, line + token.content.count("\n")):
                start, content = _line(text, starts, index)
                bonding.append(Span(start, start + len(content)))
        elif token.type == "inline" and token.map and "{" in token.content:
            segments.extend(_inline_segments(text, starts, token, cursors))
    return _Block(first, tuple(segments), tuple(bonding))


def _inline_segments(text: str, starts, token: Any, cursors: dict[int, int]) -> list[Segment]:
    """Map each line of an inline token's content back to its place in the document."""
    skips: tuple[tuple[int, int], ...] = token.meta.get("skips", ())
    segments = []
    content_offset = 0
    for number, fragment in enumerate(token.content.split("\n")):
        index = token.map[0] + number
        if index >= len(starts):
            break
        line_start, line = _line(text, starts, index)
        column = line.find(fragment, cursors.get(index, 0)) if fragment else -1
        if column >= 0:
            cursors[index] = column + len(fragment)
            end = content_offset + len(fragment)
            local = tuple(
                (max(a, content_offset) - content_offset, min(b, end) - content_offset)
                for a, b in skips
                if a < end and b > content_offset
            )
            segments.append(Segment(line_start + column, fragment, local))
        content_offset += len(fragment) + 1
    return segments
