"""Where annotations may stand in a Markdown document, found with markdown-it-py.

Block structure (fences, indented code, display math, HTML blocks) comes from
markdown-it's block tokens and their line maps.  Inline structure (code spans,
inline math, inline HTML, autolinks, escapes, link destinations) has no
positions in markdown-it's tokens, so the inline rules are wrapped to record
the exact source range each one consumed; those ranges are skipped.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cache
from typing import Any

from markdown_it import MarkdownIt
from mdit_py_plugins.dollarmath import dollarmath_plugin

from .model import Span

BONDING_INFO = "bonding"
_SKIPPED_INLINE_RULES = ("math_inline", "escape", "backticks", "autolink", "html_inline", "image")
_SKIPS_KEY = "notelsp_skips"


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
    starts = [0]
    position = text.find("\n")
    while position != -1:
        starts.append(position + 1)
        position = text.find("\n", position + 1)
    return starts


def _line(text: str, starts: list[int], index: int) -> tuple[int, str]:
    start = starts[index]
    end = starts[index + 1] - 1 if index + 1 < len(starts) else len(text)
    return start, text[start:end].rstrip("\r")


def markdown_structure(text: str) -> MarkdownStructure:
    """Inline segments and bonding-block lines of a Markdown document."""
    if "{" not in text and BONDING_INFO not in text:
        return MarkdownStructure((), ())
    tokens = _markdown().parse(text, {})
    starts = line_starts(text)
    segments: list[Segment] = []
    bonding: list[Span] = []
    cursors: dict[int, int] = {}  # per line: where the previous inline fragment ended (table cells)
    for token in tokens:
        if token.type == "fence" and token.map and token.info.strip().split()[:1] == [BONDING_INFO]:
            first = token.map[0] + 1
            for index in range(first, first + token.content.count("\n")):
                start, line = _line(text, starts, index)
                bonding.append(Span(start, start + len(line)))
        elif token.type == "inline" and token.map and "{" in token.content:
            segments.extend(_inline_segments(text, starts, token, cursors))
    return MarkdownStructure(tuple(segments), tuple(bonding))


def _inline_segments(text: str, starts: list[int], token: Any, cursors: dict[int, int]) -> list[Segment]:
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
