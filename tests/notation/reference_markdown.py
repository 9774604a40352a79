"""Reference Markdown structure for tests: the same interface as notelsp.notation.markdown,
computed with markdown-it-py (CommonMark, plus its dollarmath plugin for $...$ and $$...$$).

notelsp's own scanner is line-oriented and written for speed; this module keeps the
general-purpose CommonMark parser as the reference it is compared against
(tests/notation/test_markdown_reference.py).  Only the whole-document parse is kept.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from functools import cache
from typing import Any

from markdown_it import MarkdownIt
from mdit_py_plugins.dollarmath import dollarmath_plugin
from mdit_py_plugins.dollarmath import index as dollarmath_index

from notelsp.notation.markdown import MarkdownStructure, Segment
from notelsp.notation.model import Span

BONDING_INFO = "bonding"
_SKIPPED_INLINE_RULES = ("math_inline", "escape", "backticks", "autolink", "html_inline", "image")
_SKIPS_KEY = "notelsp_skips"
_SKIP_STARTS = frozenset("$\\`<![")  # the characters the skipped inline rules (and links) begin with


_ASCII_PUNCTUATION = frozenset("!\"#$%&'()*+,-./:;<=>?@[\\]^_`{|}~")  # CommonMark 2.1


def _literal(name: str, state: Any, start: int, tokens_before: int) -> bool:
    """Whether a rule that matched only passed its characters on as text.

    markdown-it's backtick rule also consumes a run with no closer, and its escape
    rule a backslash before a character that cannot be escaped; both are literal
    text in CommonMark (6.1, 2.4), not skipped constructs.
    """
    if name == "backticks":
        return len(state.tokens) == tokens_before  # no code span pushed
    if name == "escape":
        return state.src[start + 1] not in _ASCII_PUNCTUATION and state.src[start + 1] != "\n"
    return False


def _recording(name: str, rule: Any) -> Any:
    def run(state: Any, silent: bool) -> bool:
        start, tokens_before = state.pos, len(state.tokens)
        matched = rule(state, silent)
        skips = state.env.get(_SKIPS_KEY)
        if matched and not silent and skips is not None and not _literal(name, state, start, tokens_before):
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


def _dollar_is_escaped(state: Any, position: int, mod: int = 0) -> bool:
    """Whether an odd number of backslashes stands right before ``position``.

    Replaces the plugin's ``is_escaped`` (mdit-py-plugins 0.7), whose count runs
    past the start of the text to ``src[-1]``: a '$' opening a paragraph that
    ends with a backslash was taken for an escaped one.
    """
    backslashes = 0
    while position - backslashes - 1 >= 0 and state.src[position - backslashes - 1] == "\\":
        backslashes += 1
    return backslashes % 2 != mod if backslashes else False


def _within_container(rule: Any) -> Any:
    """The plugin's display-math rule, stopped at the first line outside its container.

    Its search for the closing '$$' runs on past the end of a block quote or
    list item (into a lazy or unindented line); markdown-it's own fence rule
    stops at a line indented less than the container's content, and so does this.
    """

    def run(state: Any, start_line: int, end_line: int, silent: bool) -> bool:
        limit = start_line + 1
        while limit < end_line and not (
            state.sCount[limit] < state.blkIndent and state.bMarks[limit] + state.tShift[limit] < state.eMarks[limit]
        ):
            limit += 1
        return rule(state, start_line, limit, silent)

    return run


@cache
def _markdown() -> MarkdownIt:
    dollarmath_index.is_escaped = _dollar_is_escaped  # looked up when the rule runs
    md = MarkdownIt("commonmark").enable("table")
    dollarmath_plugin(md)
    for rule in md.block.ruler.__rules__:
        if rule.name == "math_block":
            rule.fn = _within_container(rule.fn)
    md.block.ruler.__cache__ = None
    for rule in md.inline.ruler.__rules__:
        if rule.name in _SKIPPED_INLINE_RULES or rule.name == "link":
            rule.fn = _recording(rule.name, rule.fn)
    md.inline.ruler.__cache__ = None
    md.core.ruler.at("inline", _inline_with_skips)
    # Only structure is wanted: skip the typographic core steps.
    md.disable(["replacements", "smartquotes", "text_join"], ignoreInvalid=True)
    return md


_LINE_END = re.compile(r"\r\n|\r|\n")  # markdown-it (like CommonMark) reads all three as line endings


def line_starts(text: str) -> list[int]:
    """Offset of each line's first character, a line ending at '\\r\\n', '\\r' or '\\n'."""
    return [0, *(match.end() for match in _LINE_END.finditer(text))]


def _line(text: str, starts, index: int) -> tuple[int, str]:
    start = starts[index]
    end = starts[index + 1] if index + 1 < len(starts) else len(text)
    return start, text[start:end].rstrip("\r\n")


def markdown_structure(text: str) -> MarkdownStructure:
    """Inline segments and bonding-block lines of a Markdown document (whole parse)."""
    # markdown-it reads NUL as U+FFFD (CommonMark 2.3); the same length, so offsets hold.
    searchable = text.replace("\0", "\ufffd")
    starts = tuple(line_starts(searchable))
    blocks = _parse_blocks(searchable, starts)
    return MarkdownStructure(
        tuple(
            Segment(segment.start, text[segment.start : segment.start + len(segment.text)], segment.skips)
            for block in blocks
            for segment in block.segments
        ),
        tuple(span for block in blocks for span in block.bonding),
    )


@dataclass(frozen=True, slots=True)
class _Block:
    first_line: int
    segments: tuple[Segment, ...]
    bonding: tuple[Span, ...]


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
            bonding.extend(_fence_content_lines(text, starts, token))
        elif token.type == "inline" and token.map and "{" in token.content:
            segments.extend(_inline_segments(text, starts, token, cursors))
    return _Block(first, tuple(segments), tuple(bonding))


def _fence_content_lines(text: str, starts, token: Any) -> list[Span]:
    """Each content line of a fence, as CommonMark defines it: without the container
    prefixes ('> ', a list item's indentation) and the fence's own indentation
    (CommonMark 0.31, section 4.5), which markdown-it has already removed from
    ``token.content``.  A last line without a line ending is a line too (unclosed fence)."""
    lines = token.content.split("\n")
    if token.content.endswith("\n"):
        lines.pop()
    spans = []
    for index, content in zip(range(token.map[0] + 1, len(starts)), lines):
        start, line = _line(text, starts, index)
        # A tab partly taken by the removed indentation is spaces in the content: the line
        # starts at the first character written as it stands in the content.
        written = content
        while not line.endswith(written):
            written = written[1:]
        spans.append(Span(start + len(line) - len(written), start + len(line)))
    return spans


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
        located = _located(line, fragment, cursors.get(index, 0)) if fragment else None
        if located is not None:
            column, written, column_of = located
            cursors[index] = column + len(written)
            end = content_offset + len(fragment)
            local = tuple(
                (column_of(max(a, content_offset) - content_offset), column_of(min(b, end) - content_offset))
                for a, b in skips
                if a < end and b > content_offset
            )
            segments.append(Segment(line_start + column, written, _disjoint(local)))
        content_offset += len(fragment) + 1
    return segments


def _disjoint(skips) -> tuple[tuple[int, int], ...]:
    """The skipped ranges in order and merged (Segment's contract): a link's label may hold
    skipped ranges of its own, recorded before the link's."""
    merged: list[list[int]] = []
    for start, end in sorted(skips):
        if merged and start <= merged[-1][1]:
            merged[-1][1] = max(merged[-1][1], end)
        else:
            merged.append([start, end])
    return tuple((start, end) for start, end in merged)


def _located(line: str, fragment: str, cursor: int) -> tuple[int, str, Any] | None:
    """Where ``fragment`` (a line of inline content) was written in ``line``.

    Returns its column, the text as written, and a map from positions in the
    fragment to positions in that text.  The content differs from the source in
    two ways: markdown-it expands tabs in a continuation line's indentation to
    spaces (which inline parsing then drops), and a table cell's content has
    each '\\|' unescaped to '|' (GFM 0.29, example 200).
    """
    column = line.find(fragment, cursor)
    if column >= 0:
        return column, fragment, lambda position: position
    stripped = fragment.lstrip(" \t")
    lead = len(fragment) - len(stripped)
    for written in (stripped, stripped.replace("|", "\\|")):
        column = line.find(written, cursor) if written else -1
        if column >= 0:
            pipes = [position for position, character in enumerate(stripped) if character == "|"]
            escaped = written is not stripped

            def column_of(position: int, pipes=pipes, escaped=escaped) -> int:
                position = max(position - lead, 0)
                return position + (sum(1 for pipe in pipes if pipe < position) if escaped else 0)

            return column, written, column_of
    return None
