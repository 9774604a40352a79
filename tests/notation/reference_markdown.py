"""Reference Markdown structure for tests: the same interface as notelsp.notation.markdown,
computed with markdown-it-py (CommonMark, plus its dollarmath plugin for $...$ and $$...$$).

Markdown as people write it is read with markdown-it-py's own strikethrough rule
(``~~...~~``) and mdit-py-plugins: front_matter (YAML ``---`` front matter), admon
(``!!!`` / ``???`` admonitions) and colon_fence (``:::`` fences).  What no plugin
reads is said where it is done: TOML ``+++`` front matter is handed to the
front_matter plugin as ``---`` (the same characters' count, so offsets hold); a
wiki link (``[[target|label]]``) is one small inline rule placed before
markdown-it's link rule; and a MyST directive's body (a fence or colon fence with
a ``{name}`` info string) is parsed again as a Markdown document of its own, as
MyST does, and placed back at its lines.

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
from mdit_py_plugins.admon import admon_plugin
from mdit_py_plugins.colon_fence import colon_fence_plugin
from mdit_py_plugins.dollarmath import dollarmath_plugin
from mdit_py_plugins.dollarmath import index as dollarmath_index
from mdit_py_plugins.front_matter import front_matter_plugin

from notelsp.notation.markdown import MarkdownStructure, Segment
from notelsp.notation.markdown_blocks import CODE_DIRECTIVES, MARKDOWN_DIRECTIVES
from notelsp.notation.model import Span

BONDING_INFO = "bonding"
_SKIPPED_INLINE_RULES = ("math_inline", "escape", "backticks", "autolink", "html_inline", "image")
_SKIPS_KEY = "notelsp_skips"
_TILDES_KEY = "notelsp_tildes"  # id of each '~~' token -> its offset in the inline text
_SKIP_STARTS = frozenset("$\\`<![~")  # the characters the skipped inline rules (and links) begin with


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
            if "{" not in token.content or "skips" in token.meta:
                continue  # no annotation can start here (or a directive's body, already read)
            if _SKIP_STARTS.isdisjoint(token.content):
                token.meta["skips"] = ()  # none of the skipped constructs can begin here
                continue
            state.env[_SKIPS_KEY] = []
            state.env[_TILDES_KEY] = {}
            state.md.inline.parse(token.content, state.md, state.env, token.children)
            skips = state.env.pop(_SKIPS_KEY)
            skips.extend(_struck(token.children, state.env.pop(_TILDES_KEY)))
            token.meta["skips"] = tuple(skips)


def _struck(children: list[Any], offsets: dict[int, int]) -> list[tuple[int, int]]:
    """The struck-through ranges, '~~' to '~~': markdown-it turned the paired '~~' tokens into
    s_open and s_close, and the recording strikethrough rule noted where each one stood."""
    ranges, open_at = [], []
    for child in children:
        if child.type == "s_open":
            open_at.append(offsets[id(child)])
        elif child.type == "s_close":
            ranges.append((open_at.pop(), offsets[id(child)] + 2))
    return ranges


def _recording_tildes(rule: Any) -> Any:
    """markdown-it's strikethrough rule, noting the offset of each '~' and '~~' token it makes."""

    def run(state: Any, silent: bool) -> bool:
        start, before = state.pos, len(state.tokens)
        matched = rule(state, silent)
        offsets = state.env.get(_TILDES_KEY)
        if matched and not silent and offsets is not None:
            length = state.pos - start
            made = state.tokens[before:][-(length // 2 + length % 2) :]  # its own, after any pending text
            offset = start
            for token in made:
                offsets[id(token)] = offset
                offset += len(token.content)
        return matched

    return run


# A wiki link, [[target]] or [[target|label]] (common practice, no source): no plugin reads it,
# so this rule does, before markdown-it's link rule.  The target is skipped; the label is text.
_WIKI_LINK = re.compile(r"\[\[([^\[\]|\r\n]+)(?:\|([^\[\]\r\n]*))?\]\]")


def _wiki_link(state: Any, silent: bool) -> bool:
    if not state.src.startswith("[[", state.pos):
        return False
    match = _WIKI_LINK.match(state.src, state.pos, state.posMax)
    if match is None:
        return False
    if not silent:
        skips = state.env.get(_SKIPS_KEY)
        if skips is not None:
            if match.group(2) is None:
                skips.append((match.start(), match.end()))
            else:
                skips.extend([(match.start(), match.start(2)), (match.end(2), match.end())])
        state.push("text", "", 0).content = match.group(2) or ""
    state.pos = match.end()
    return True


_DIRECTIVE_NAME = re.compile(r"\{([^{}\s]+)\}")


def _is_markdown_directive(token: Any) -> bool:
    """A fence whose body MyST reads as Markdown: a known directive in a backtick or tilde
    fence, any colon fence but a code one."""
    name = _DIRECTIVE_NAME.match(token.info.strip())
    if token.type == "colon_fence":
        return name is None or name.group(1) not in CODE_DIRECTIVES
    return token.type == "fence" and name is not None and name.group(1) in MARKDOWN_DIRECTIVES


def _directive_bodies(state: Any) -> None:
    """Parse each Markdown-bodied directive's content as a document of its own (as MyST does)
    and put its tokens after the fence, at the fence's lines."""
    tokens = []
    for token in state.tokens:
        tokens.append(token)
        if token.type in ("fence", "colon_fence") and token.map and _is_markdown_directive(token):
            token.type = "directive"  # not a code fence (nor a bonding one) any more
            first_line = token.map[0] + 1
            for inner in state.md.parse(token.content, state.env):
                if inner.map:
                    inner.map = [inner.map[0] + first_line, inner.map[1] + first_line]
                inner.level += token.level + 1
                tokens.append(inner)
    state.tokens[:] = tokens


class _PastTheEnd(str):
    """The source text, reading as "" one past its end (see ``_reading_past_the_end``)."""

    def __getitem__(self, key: Any) -> str:
        if isinstance(key, int) and key == len(self):
            return ""
        return str.__getitem__(self, key)


def _reading_past_the_end(rule: Any) -> Any:
    """mdit-py-plugins 0.7's colon-fence rule reads ``src[pos]`` for a block quote's last line
    when it is empty and ends the text ('> :::\\n>'), one past the end: an IndexError.  That
    character is no colon, so it is read as "" there."""

    def run(state: Any, start_line: int, end_line: int, silent: bool) -> bool:
        source = state.src
        state.src = _PastTheEnd(source)
        try:
            return rule(state, start_line, end_line, silent)
        finally:
            state.src = source

    return run


def _toml_front_matter_as_yaml(text: str) -> str:
    """``text`` with TOML front matter's '+++' opening and closing lines written as '---',
    for the front_matter plugin (which knows '---' only); the closing line is found by the
    plugin's own rule (a run at least as long, at most 3 spaces in, nothing after)."""
    if not text.startswith("+++"):
        return text
    lines = text.splitlines(keepends=True)
    count = len(lines[0]) - len(lines[0].lstrip("+"))
    for number, line in enumerate(lines[1:], start=1):
        body = line.rstrip("\r\n")
        if body.startswith("...") and not body[3:].strip(" \t"):  # a YAML end line closes it too
            return "-" * count + text[count:]
        stripped = body.lstrip(" ")
        if len(body) - len(stripped) <= 3 and len(stripped) - len(stripped.lstrip("+")) >= count and not stripped.lstrip("+").strip(" \t"):
            swapped = lines[:]
            swapped[0] = "-" * count + lines[0][count:]
            swapped[number] = line.replace("+", "-")
            return "".join(swapped)
    return text


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
    md = MarkdownIt("commonmark").enable(["table", "strikethrough"])
    dollarmath_plugin(md)
    front_matter_plugin(md)
    admon_plugin(md)
    colon_fence_plugin(md)
    md.inline.ruler.before("link", "wikilink", _wiki_link)
    for rule in md.block.ruler.__rules__:
        if rule.name == "math_block":
            rule.fn = _within_container(rule.fn)
        elif rule.name == "colon_fence":
            rule.fn = _reading_past_the_end(rule.fn)
    md.block.ruler.__cache__ = None
    for rule in md.inline.ruler.__rules__:
        if rule.name in _SKIPPED_INLINE_RULES or rule.name == "link":
            rule.fn = _recording(rule.name, rule.fn)
        elif rule.name == "strikethrough":
            rule.fn = _recording_tildes(rule.fn)
    md.inline.ruler.__cache__ = None
    md.core.ruler.at("inline", _inline_with_skips)
    md.core.ruler.before("inline", "directive_bodies", _directive_bodies)
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
    searchable = _toml_front_matter_as_yaml(text.replace("\0", "\ufffd"))
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
