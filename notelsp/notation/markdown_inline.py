"""Where, inside one run of Markdown inline text, annotations may not start.

CommonMark's inline constructs that are not prose are skipped: code spans,
``$...$`` math, backslash escapes, autolinks, raw HTML, images whole, and a
link's ``[`` and ``](destination "title")`` (its label stays prose).  So are
struck-through text (``~~...~~``, GFM) and a wiki link's target (``[[target]]``,
``[[target|label]]``: the label stays prose, read as plain text).  The
constructs are tried left to right in CommonMark's order of precedence, as an
inline parser would, but only where one of their opening characters occurs;
runs of plain text are jumped over with one regular-expression search.

Which ``~~`` runs pair up is decided as markdown-it decides it: by CommonMark's
delimiter algorithm over the ``~~``, ``*`` and ``_`` runs together (an emphasis
closed across a ``~~`` hides it), each link label on its own.  ``*`` and ``_``
are only looked at in text holding ``~~``.

One difference from CommonMark is deliberate: the quoted SMILES of an annotation
(``{smiles "C[N+](C)(C)C"}``) is opaque, as a code span is, because SMILES is
full of Markdown's characters (``[N+](C)`` would otherwise be a link).
"""

from __future__ import annotations

import re
import unicodedata
from functools import cache

Skip = tuple[int, int]  # half-open range of the inline text

# A character at which a skipped construct (or a link, which holds prose) can begin.
SKIP_START = re.compile(r"[$\\`<\[!~]")
_SKIP_OR_DELIMITER = re.compile(r"[$\\`<\[!~*_]")  # in text holding "~~": emphasis runs count too
# A wiki link: [[target]] or [[target|label]], on one line, no brackets inside (common practice, no source).
_WIKI_LINK = re.compile(r"\[\[([^\[\]|\r\n]+)(?:\|([^\[\]\r\n]*))?\]\]")
_ASCII_PUNCTUATION = frozenset("!\"#$%&'()*+,-./:;<=>?@[\\]^_`{|}~")
_BACKTICK_RUN = re.compile(r"`+")

_ATTRIBUTE = r"""(?:\s+[A-Za-z_:][A-Za-z0-9:._\-]*(?:\s*=\s*(?:[^"'=<>`\x00-\x20]+|'[^']*'|"[^"]*"))?)"""


@cache  # compiled when a paragraph first holds "<": a note without it never pays for them
def _autolink_and_html_tag() -> tuple[re.Pattern[str], re.Pattern[str]]:
    """CommonMark 0.31, section 6.5 (autolinks) and 6.6 (raw HTML)."""
    autolink = re.compile(r"<(?:[A-Za-z][A-Za-z0-9.+\-]{1,31}:[^<>\x00-\x20]*"
                          r"|[A-Za-z0-9.!#$%&'*+/=?^_`{|}~\-]+@[A-Za-z0-9](?:[A-Za-z0-9\-]{0,61}[A-Za-z0-9])?"
                          r"(?:\.[A-Za-z0-9](?:[A-Za-z0-9\-]{0,61}[A-Za-z0-9])?)*)>")
    html_tag = re.compile(r"<[A-Za-z][A-Za-z0-9\-]*" + _ATTRIBUTE + r"*\s*/?>|</[A-Za-z][A-Za-z0-9\-]*\s*>")
    return autolink, html_tag
# Raw HTML that runs to a fixed closer (CommonMark 0.31, 6.6), longest opener first.
_HTML_CLOSERS = (("<![CDATA[", "]]>"), ("<!--", "-->"), ("<?", "?>"), ("<!", ">"))
_ANGLE_DESTINATION = re.compile(r"(?:\\.|[^>\r\n<\\])*")  # up to the first unescaped ">", "<" or line break
_DESTINATION_EVENT = re.compile(r"[\x00- \x7f()\\]")
_LINK_TITLE = re.compile(r'"(?:[^"\\]|\\[\s\S])*"|\'(?:[^\'\\]|\\[\s\S])*\'|\((?:[^()\\]|\\[\s\S])*\)')
_SPACES = re.compile(r"[ \t]*(?:\r\n|\r|\n)?[ \t]*")  # at most one line break, of any kind
_MAX_LINK_NESTING = 32  # parentheses in a bare destination, as CommonMark implementations cap it
# The quoted SMILES of an annotation, from its opening quote to its closing one, on one line.
_QUOTED_SMILES = re.compile(r'(?i)\{[ \t]*smiles[ \t]*("[^"\r\n]*")')


def inline_skips(text: str, references: frozenset[str] = frozenset()) -> tuple[Skip, ...]:
    """The skipped ranges of ``text``; ``references`` are the document's link labels, normalised."""
    skips: list[Skip] = []
    delimiters: list[_Delimiter] | None = [] if "~~" in text else None
    opaque = _quoted_smiles(text)
    _scan(text, 0, len(text), references, skips, in_link=False, dead_ends={}, delimiters=delimiters, opaque=opaque)
    if delimiters:
        skips.extend(_struck(delimiters))
    if delimiters is not None:
        return _disjoint(skips)
    return tuple(skips)


def _quoted_smiles(text: str) -> dict[int, int]:
    """Start -> end of each quoted SMILES in ``text`` (nothing inside is Markdown); empty in text without one."""
    if "smiles" not in text and "SMILES" not in text and "Smiles" not in text:
        return {}
    return {match.start(1): match.end(1) for match in _QUOTED_SMILES.finditer(text)}


def _disjoint(skips: list[Skip]) -> tuple[Skip, ...]:
    """The skipped ranges in order and merged: struck text holds other skipped ranges."""
    merged: list[list[int]] = []
    for start, end in sorted(skips):
        if merged and start <= merged[-1][1]:
            merged[-1][1] = max(merged[-1][1], end)
        else:
            merged.append([start, end])
    return tuple((start, end) for start, end in merged)


def normalise_label(label: str) -> str:
    """A link label as references are matched: case-folded, inner whitespace collapsed."""
    return " ".join(label.split()).casefold()


# ``dead_ends`` remembers, per closer ("$" or a backtick width), the offset after which a search
# found none: later searches from beyond it fail at once, so scanning stays linear in the text.
DeadEnds = dict[object, int]


def _scan(
    text: str, position: int, end: int, references: frozenset[str], skips: list[Skip], in_link: bool,
    dead_ends: DeadEnds, delimiters: list[_Delimiter] | None = None, opaque: dict[int, int] | None = None,
) -> None:
    events = SKIP_START if delimiters is None else _SKIP_OR_DELIMITER
    if opaque:
        events = re.compile(events.pattern[:-1] + '"]')  # a quote may open a quoted SMILES
    while True:
        found = events.search(text, position, end)
        if found is None:
            return
        position = found.start()
        character = text[position]
        if character == '"':
            position = opaque.get(position, position + 1) if opaque else position + 1
            continue
        if character in "~*_":
            position = _delimiter_run(text, position, end, delimiters) if delimiters is not None else position + 1
        elif character == "$":
            position = _math(text, position, end, skips, dead_ends)
        elif character == "\\":
            if position + 1 < end and (text[position + 1] in _ASCII_PUNCTUATION or text[position + 1] in "\r\n"):
                skips.append((position, position + 2))  # an escape, or a hard line break
            position += 2
        elif character == "`":
            position = _code_span(text, position, end, skips, dead_ends)
        elif character == "<":
            html_end = _html_end(text, position, end, dead_ends)
            if html_end is not None:
                skips.append((position, html_end))
                position = html_end
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
            wiki = _WIKI_LINK.match(text, position, end) if text.startswith("[[", position) else None
            if wiki is not None:  # its label is plain text: nothing in it is looked at
                if wiki.group(2) is None:
                    skips.append((position, wiki.end()))
                else:
                    skips.append((position, wiki.start(2)))
                    skips.append((wiki.end(2), wiki.end()))
                position = wiki.end()
                continue
            link = None if in_link else _link(text, position, end, references, dead_ends)
            if link is None:
                position += 1
                continue
            label_end, link_end = link
            skips.append((position, position + 1))
            # A link's label is balanced on its own (markdown-it keeps its delimiters apart).
            inner: list[_Delimiter] | None = None if delimiters is None else []
            _scan(text, position + 1, label_end, references, skips, True, dead_ends, inner, opaque)
            if inner:
                skips.extend(_struck(inner))
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
        if closing == -1:  # none unescaped from where this search began
            dead_ends[("$", end)] = min(position + 1, dead_ends.get(("$", end), position + 1))
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
            # None from where this search began (not from where it gave up): a later opener
            # of this width before that point would otherwise read the same runs again.
            dead_ends[key] = min(run.end(), dead_ends.get(key, run.end()))
            return run.end()  # no closing run of the same length: the backticks are text
        if closing.end() - closing.start() == width:
            skips.append((position, closing.end()))
            return closing.end()
        search = closing.end()


def _label_end(text: str, opening: int, end: int, dead_ends: DeadEnds) -> int | None:
    """Offset of the ``]`` closing the label opened at ``opening`` (before ``end``), or None.

    Brackets nest; code spans, math, autolinks, raw HTML and escapes inside a
    label are stepped over whole, so their brackets do not count.  Every
    bracket of the run is matched in one pass, the first time one is asked for,
    so a line of ten thousand ``[`` costs one pass, not ten thousand.
    """
    matches = dead_ends.get("labels")
    if matches is None:
        matches = dead_ends["labels"] = _matched_brackets(text, dead_ends)
    closing = matches.get(opening)
    return closing if closing is not None and closing < end else None


_LABEL_EVENT = re.compile(r"[\[\]\\`$<]")


def _matched_brackets(text: str, dead_ends: DeadEnds) -> dict[int, int]:
    matches: dict[int, int] = {}
    open_brackets: list[int] = []
    position, end = 0, len(text)
    while (found := _LABEL_EVENT.search(text, position)) is not None:
        position = found.start()
        character = text[position]
        if character == "\\":
            position += 2
            continue
        if character in "`$":
            stepped = (_code_span if character == "`" else _math)(text, position, end, [], dead_ends)
            position = max(stepped, position + 1)
            continue
        if character == "<":
            html_end = _html_end(text, position, end, dead_ends)
            position = html_end if html_end is not None else position + 1
            continue
        if character == "[":
            open_brackets.append(position)
        elif open_brackets:
            matches[open_brackets.pop()] = position
        position += 1
    return matches


def _html_end(text: str, position: int, end: int, dead_ends: DeadEnds) -> int | None:
    """End of the autolink or raw HTML at ``position``, or None.

    Comments, processing instructions, CDATA and declarations run to a fixed
    closer; once a closer is known to be absent past some offset, later openers
    fail at once (so a line of many unclosed openers stays linear).
    """
    if text.startswith("<?", position) or text.startswith("<!", position):
        for opener, closer in _HTML_CLOSERS:
            if text.startswith(opener, position):
                if opener == "<!--" and (text.startswith("<!-->", position) or text.startswith("<!--->", position)):
                    return position + (5 if text[position + 4] == ">" else 6)
                if opener == "<!" and not (position + 2 < end and text[position + 2].isascii() and text[position + 2].isalpha()):
                    return None
                if position >= dead_ends.get(("html", closer, end), end + 1):
                    return None
                closing = text.find(closer, position + len(opener), end)
                if closing == -1:
                    dead_ends[("html", closer, end)] = position
                    return None
                return closing + len(closer)
        return None
    autolink, html_tag = _autolink_and_html_tag()
    match = autolink.match(text, position, end) or html_tag.match(text, position, end)
    return match.end() if match else None


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
    # Reference links: [text][label], [label][] and [label].  A label holds at most 999
    # characters (CommonMark 4.7), so a longer one is not looked up: "[" nested thousands
    # deep is not normalised once per bracket.
    if after < end and text[after] == "[":
        second = _label_end(text, after, end, dead_ends)
        if second is not None:
            label = (after + 1, second) if second > after + 1 else (opening + 1, label_end)
            if _is_reference(text, *label, references):
                return label_end, second + 1
            return None
    if _is_reference(text, opening + 1, label_end, references):
        return label_end, after
    return None


_MAX_LABEL_CHARS = 999


def _is_reference(text: str, start: int, end: int, references: frozenset[str]) -> bool:
    return end - start <= _MAX_LABEL_CHARS and normalise_label(text[start:end]) in references


def _inline_destination(text: str, position: int, end: int) -> int | None:
    """End (past ``)``) of ``(destination "title")`` whose ``(`` precedes ``position``, or None."""
    position = _SPACES.match(text, position, end).end()
    if position < end and text[position] == "<":
        closing = _ANGLE_DESTINATION.match(text, position + 1, end).end()
        if closing >= end or text[closing] != ">":
            return None
        position = closing + 1
    else:
        depth = 0
        while position < end:
            # Jump over ordinary characters to the next one that matters.
            found = _DESTINATION_EVENT.search(text, position, end)
            if found is None:
                position = end
                break
            position = found.start()
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


# --- strikethrough: delimiter runs and their pairing ------------------------------------------


class _Delimiter:
    """One delimiter as markdown-it keeps it: a '~~' pair, or one '*' or '_' of a run."""

    __slots__ = ("marker", "length", "run", "position", "can_open", "can_close", "end")

    def __init__(self, marker: str, length: int, run: int, position: int, can_open: bool, can_close: bool) -> None:
        self.marker, self.length, self.run, self.position = marker, length, run, position
        self.can_open, self.can_close, self.end = can_open, can_close, -1


# CommonMark 2.1 (as markdown-it reads it): Unicode whitespace and punctuation (P and S categories).
_WHITESPACE = frozenset("\t\n\x0b\x0c\r \xa0\u1680\u202f\u205f\u3000") | frozenset(map(chr, range(0x2000, 0x200B)))


def _is_punctuation(character: str) -> bool:
    return character in _ASCII_PUNCTUATION or unicodedata.category(character)[0] in "PS"


def _delimiter_run(text: str, position: int, end: int, delimiters: list[_Delimiter]) -> int:
    """Record the run of one delimiter character at ``position``; the offset after it."""
    marker = text[position]
    run_end = position + 1
    while run_end < end and text[run_end] == marker:
        run_end += 1
    length = run_end - position
    if marker == "~" and length < 2:
        return run_end  # a single '~' is text
    before = text[position - 1] if position > 0 else " "
    after = text[run_end] if run_end < end else " "
    before_space, after_space = before in _WHITESPACE, after in _WHITESPACE
    before_punctuation, after_punctuation = _is_punctuation(before), _is_punctuation(after)
    left_flanking = not (after_space or (after_punctuation and not (before_space or before_punctuation)))
    right_flanking = not (before_space or (before_punctuation and not (after_space or after_punctuation)))
    split_word = marker != "_"  # '_' may not open or close inside a word
    can_open = left_flanking and (split_word or not right_flanking or before_punctuation)
    can_close = right_flanking and (split_word or not left_flanking or after_punctuation)
    run = len(delimiters)  # delimiters of one run share the index of its first
    if marker == "~":  # pairs of '~~', an odd one out first (markdown-it's strikethrough rule)
        for pair in range(position + length % 2, run_end, 2):
            delimiters.append(_Delimiter("~", 0, run, pair, can_open, can_close))
    else:
        for single in range(position, run_end):
            delimiters.append(_Delimiter(marker, length, run, single, can_open, can_close))
    return run_end


def _struck(delimiters: list[_Delimiter]) -> list[Skip]:
    """The struck-through ranges, '~~' to '~~' inclusive, once the delimiters are paired."""
    _pair(delimiters)
    return [
        (opener.position, delimiters[opener.end].position + 2)
        for opener in delimiters
        if opener.marker == "~" and opener.end != -1
    ]


def _pair(delimiters: list[_Delimiter]) -> None:
    """Pair openers with closers as markdown-it's balance_pairs does (CommonMark 6.2, "process
    emphasis"), with its jumps and lower bounds, so the pairing stays linear."""
    openers_bottom: dict[str, list[int]] = {}
    jumps: list[int] = []
    header, previous_run = 0, None  # previous_run: None once a pair is made (a run starts afresh)
    for closer_index, closer in enumerate(delimiters):
        jumps.append(0)
        if previous_run != closer.run or delimiters[header].marker != closer.marker:
            header = closer_index
        previous_run = closer.run
        if not closer.can_close:
            continue
        bottoms = openers_bottom.setdefault(closer.marker, [-1] * 6)
        bottom_slot = (3 if closer.can_open else 0) + closer.length % 3
        opener_index = header - jumps[header] - 1
        new_bottom = opener_index
        while opener_index > bottoms[bottom_slot]:
            opener = delimiters[opener_index]
            if opener.marker != closer.marker:
                opener_index -= jumps[opener_index] + 1
                continue
            if opener.can_open and opener.end < 0:
                odd_match = (
                    (opener.can_close or closer.can_open)
                    and (opener.length + closer.length) % 3 == 0
                    and (opener.length % 3 != 0 or closer.length % 3 != 0)
                )
                if not odd_match:
                    last_jump = jumps[opener_index - 1] + 1 if opener_index > 0 and not delimiters[opener_index - 1].can_open else 0
                    jumps[closer_index] = closer_index - opener_index + last_jump
                    jumps[opener_index] = last_jump
                    closer.can_open = False
                    opener.end = closer_index
                    opener.can_close = False
                    new_bottom = -1
                    previous_run = None
                    break
            opener_index -= jumps[opener_index] + 1
        if new_bottom != -1:
            bottoms[bottom_slot] = new_bottom
