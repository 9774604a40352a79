"""Where, inside one run of Markdown inline text, annotations may not start.

CommonMark's inline constructs that are not prose are skipped: code spans,
``$...$`` math, backslash escapes, autolinks, raw HTML, images whole, and a
link's ``[`` and ``](destination "title")`` (its label stays prose).  The
constructs are tried left to right in CommonMark's order of precedence, as an
inline parser would, but only where one of their opening characters occurs;
runs of plain text are jumped over with one regular-expression search.
"""

from __future__ import annotations

import re

Skip = tuple[int, int]  # half-open range of the inline text

# A character at which a skipped construct (or a link, which holds prose) can begin.
SKIP_START = re.compile(r"[$\\`<\[!]")
_ASCII_PUNCTUATION = frozenset("!\"#$%&'()*+,-./:;<=>?@[\\]^_`{|}~")
_BACKTICK_RUN = re.compile(r"`+")

# CommonMark 0.31, section 6.5 (autolinks) and 6.6 (raw HTML).
_AUTOLINK = re.compile(r"<(?:[A-Za-z][A-Za-z0-9.+\-]{1,31}:[^<>\x00-\x20]*"
                       r"|[A-Za-z0-9.!#$%&'*+/=?^_`{|}~\-]+@[A-Za-z0-9](?:[A-Za-z0-9\-]{0,61}[A-Za-z0-9])?"
                       r"(?:\.[A-Za-z0-9](?:[A-Za-z0-9\-]{0,61}[A-Za-z0-9])?)*)>")
_ATTRIBUTE = r"""(?:\s+[A-Za-z_:][A-Za-z0-9:._\-]*(?:\s*=\s*(?:[^"'=<>`\x00-\x20]+|'[^']*'|"[^"]*"))?)"""
RAW_HTML = re.compile(
    r"<[A-Za-z][A-Za-z0-9\-]*" + _ATTRIBUTE + r"*\s*/?>"
    r"|</[A-Za-z][A-Za-z0-9\-]*\s*>"
    r"|<!---?>|<!--(?:[^-]|-[^-]|--[^>])*-->"
    r"|<[?][\s\S]*?[?]>"
    r"|<![A-Za-z][^>]*>"
    r"|<!\[CDATA\[[\s\S]*?\]\]>"
)
_LINK_TITLE = re.compile(r'"(?:[^"\\]|\\[\s\S])*"|\'(?:[^\'\\]|\\[\s\S])*\'|\((?:[^()\\]|\\[\s\S])*\)')
_SPACES = re.compile(r"[ \t]*\n?[ \t]*")
_MAX_LINK_NESTING = 32  # parentheses in a bare destination, as CommonMark implementations cap it


def inline_skips(text: str, references: frozenset[str] = frozenset()) -> tuple[Skip, ...]:
    """The skipped ranges of ``text``; ``references`` are the document's link labels, normalised."""
    skips: list[Skip] = []
    _scan(text, 0, len(text), references, skips, in_link=False, dead_ends={})
    return tuple(skips)


def normalise_label(label: str) -> str:
    """A link label as references are matched: case-folded, inner whitespace collapsed."""
    return " ".join(label.split()).casefold()


# ``dead_ends`` remembers, per closer ("$" or a backtick width), the offset after which a search
# found none: later searches from beyond it fail at once, so scanning stays linear in the text.
DeadEnds = dict[object, int]


def _scan(
    text: str, position: int, end: int, references: frozenset[str], skips: list[Skip], in_link: bool,
    dead_ends: DeadEnds,
) -> None:
    while True:
        found = SKIP_START.search(text, position, end)
        if found is None:
            return
        position = found.start()
        character = text[position]
        if character == "$":
            position = _math(text, position, end, skips, dead_ends)
        elif character == "\\":
            if position + 1 < end:  # an escape (or hard break) takes the next character whatever it is
                skips.append((position, position + 2))
            position += 2
        elif character == "`":
            position = _code_span(text, position, end, skips, dead_ends)
        elif character == "<":
            match = _AUTOLINK.match(text, position, end) or RAW_HTML.match(text, position, end)
            if match:
                skips.append((position, match.end()))
                position = match.end()
            else:
                position += 1
        elif character == "!":
            if position + 1 < end and text[position + 1] == "[":
                link = _link(text, position + 1, end, references, dead_ends)
                if link is not None:
                    skips.append((position, link[1]))
                    position = link[1]
                    continue
            position += 1
        else:  # '['
            link = None if in_link else _link(text, position, end, references, dead_ends)
            if link is None:
                position += 1
                continue
            label_end, link_end = link
            skips.append((position, position + 1))
            _scan(text, position + 1, label_end, references, skips, True, dead_ends)
            skips.append((label_end, link_end))
            position = link_end


def _is_escaped(text: str, position: int) -> bool:
    """An odd number of backslashes right before ``position``."""
    count = 0
    while position - count - 1 >= 0 and text[position - count - 1] == "\\":
        count += 1
    return count % 2 == 1


def _math(text: str, position: int, end: int, skips: list[Skip], dead_ends: DeadEnds) -> int:
    """``$...$`` up to the next unescaped dollar; a lone or empty ``$`` is text."""
    search = position + 1
    while True:
        closing = -1 if search >= dead_ends.get(("$", end), end + 1) else text.find("$", search, end)
        if closing == -1:
            dead_ends[("$", end)] = min(search, dead_ends.get(("$", end), search))
            return position + 1
        if not _is_escaped(text, closing):
            break
        search = closing + 1
    if closing == position + 1:
        return position + 1  # '$$' with nothing between: not math
    skips.append((position, closing + 1))
    return closing + 1


def _code_span(text: str, position: int, end: int, skips: list[Skip], dead_ends: DeadEnds) -> int:
    run = _BACKTICK_RUN.match(text, position, end)
    width = run.end() - position
    search = run.end()
    key = (width, end)
    while True:
        closing = None if search >= dead_ends.get(key, end + 1) else _BACKTICK_RUN.search(text, search, end)
        if closing is None:
            dead_ends[key] = min(search, dead_ends.get(key, search))
            return run.end()  # no closing run of the same length: the backticks are text
        if closing.end() - closing.start() == width:
            skips.append((position, closing.end()))
            return closing.end()
        search = closing.end()


def _label_end(text: str, opening: int, end: int, dead_ends: DeadEnds) -> int | None:
    """Offset of the ``]`` closing the label opened at ``opening``, or None.

    Brackets nest; code spans, math, autolinks, raw HTML and escapes inside the
    label are stepped over whole, so their brackets do not count.
    """
    depth, position = 1, opening + 1
    while position < end:
        character = text[position]
        if character == "\\":
            position += 2
            continue
        if character in "`$":
            stepped = (_code_span if character == "`" else _math)(text, position, end, [], dead_ends)
            if stepped > position + 1:
                position = stepped
                continue
        if character == "<":
            match = _AUTOLINK.match(text, position, end) or RAW_HTML.match(text, position, end)
            if match:
                position = match.end()
                continue
        if character == "[":
            depth += 1
        elif character == "]":
            depth -= 1
            if depth == 0:
                return position
        position += 1
    return None


def _link(
    text: str, opening: int, end: int, references: frozenset[str], dead_ends: DeadEnds
) -> tuple[int, int] | None:
    """(label end, link end) of a link whose ``[`` is at ``opening``, or None when it is not one."""
    label_end = _label_end(text, opening, end, dead_ends)
    if label_end is None:
        return None
    after = label_end + 1
    if after < end and text[after] == "(":
        inline_end = _inline_destination(text, after + 1, end)
        if inline_end is not None:
            return label_end, inline_end
    if not references:
        return None
    # Reference links: [text][label], [label][] and [label].
    if after < end and text[after] == "[":
        second = _label_end(text, after, end, dead_ends)
        if second is not None:
            label = text[after + 1 : second] or text[opening + 1 : label_end]
            if normalise_label(label) in references:
                return label_end, second + 1
            return None
    if normalise_label(text[opening + 1 : label_end]) in references:
        return label_end, after
    return None


def _inline_destination(text: str, position: int, end: int) -> int | None:
    """End (past ``)``) of ``(destination "title")`` whose ``(`` precedes ``position``, or None."""
    position = _SPACES.match(text, position, end).end()
    if position < end and text[position] == "<":
        closing = position + 1
        while closing < end and text[closing] not in ">\n<":
            closing += 2 if text[closing] == "\\" else 1
        if closing >= end or text[closing] != ">":
            return None
        position = closing + 1
    else:
        depth = 0
        while position < end:
            character = text[position]
            if character == "\\" and position + 1 < end and text[position + 1] in _ASCII_PUNCTUATION:
                position += 2
                continue
            if character <= " " or character == "\x7f":
                break
            if character == "(":
                depth += 1
                if depth > _MAX_LINK_NESTING:
                    return None
            elif character == ")":
                if depth == 0:
                    break
                depth -= 1
            position += 1
        if depth != 0:
            return None
    spaced = _SPACES.match(text, position, end).end()
    if spaced < end and spaced > position and text[spaced] in "\"'(":
        title = _LINK_TITLE.match(text, spaced, end)
        if title is not None:
            position = _SPACES.match(text, title.end(), end).end()
        else:
            position = spaced
    else:
        position = spaced
    if position < end and text[position] == ")":
        return position + 1
    return None
