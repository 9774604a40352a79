"""Markdown block structure, one line at a time, as far as annotations care.

A CommonMark block parser reduced to what decides where annotations stand:
which lines are prose (paragraphs, headings, table cells, inside block quotes
and list items), which are code (fenced, indented), display math (``$$``),
raw HTML, link reference definitions or front matter (YAML ``---`` or TOML
``+++`` at the very start), and which are the content lines of a
```` ```bonding ```` fence.  The bodies of MyST directives (a fence or ``:::``
colon fence with a ``{name}`` info string) and of admonitions (``!!! note``,
``??? note``, body indented) are read as Markdown, like a block quote's.  Prose is grouped into inline runs (a paragraph,
a heading, a table cell) whose skipped ranges come from
:mod:`notelsp.notation.markdown_inline`; only runs holding a ``{`` are looked
at closely.  A paragraph's inline reading is remembered by its text.

One reader, with a fast path in front of it.  ``_Parser._line`` reads a line
against the open containers and leaf and is the whole of the block grammar.
Most of a note, though, is plain paragraphs, blank lines, unindented ATX
headings and code fences at top level, whose reading cannot depend on any
context; while no container is open (and the text has LF breaks only),
``_Parser._whole_blocks`` matches such blocks a whole block at a time with one
regular expression (``_TOP_LEVEL_BLOCK``) and hands the first line it does not
match to ``_line``.  It decides nothing the line reader would decide
differently: what it leaves alone (tables, lists, quotes, HTML, math,
directives, indented code, a ``{`` info string) goes line by line.  A fence
outside containers, whoever opened it, has its content and closing line taken
by one search (``_fence_content``); inside a container (or in a text with CR
breaks) ``_fence_line`` reads it a line at a time; both close it by one definition (``_closes_fence``, and
``_fence_closer`` built from the same pieces).  The fast path is kept because
reading every line through the containers costs several times as much: on a
note of 603,031 characters and 10,099 lines (100 notes of
``benchmarks/repo.py``'s ``make_note``, seed 7, joined), ``parse_blocks`` took
10.9 and 14.2 ms with the fast path and 52.5 and 85.8 ms line by line only (the
same note with CRLF breaks, which the fast path leaves to the line reader),
4.8 and 6.0 times as long (best of 7 and of 15, two runs on a shared two-core
machine).  A note is parsed whole when it is opened, inside the
server's 200 ms answer; an edit re-parses the blocks around it only
(:mod:`notelsp.notation.markdown`), through the same two paths.
Both paths are compared with markdown-it-py (CRLF documents take the line
path): ``tests/notation/test_markdown_reference.py`` and
``tests/notation/test_markdown_fences.py``.

The output is a list of top-level blocks (first offset, segments, bonding lines)
so an edited document can be re-parsed around the edit only (see
:mod:`notelsp.notation.markdown`).
"""

from __future__ import annotations

import re
from bisect import bisect_left, bisect_right
from dataclasses import dataclass
from functools import cache, cached_property, lru_cache
from itertools import accumulate
from typing import NamedTuple

from .markdown_inline import SKIP_START, Skip, inline_skips, normalise_label
from .model import Span

BONDING_INFO = "bonding"


class Segment(NamedTuple):
    """Inline text, with the ranges in it where annotations may not start.

    One line, or several whole lines of a paragraph (annotations never span a line break).
    A named tuple: a note has thousands, made on every full parse.
    """

    start: int  # document offset of text[0]
    text: str
    skips: tuple[tuple[int, int], ...] = ()  # half-open, relative to ``text``


class Block(NamedTuple):
    """One top-level block that contributes something: where it starts, and what, in document offsets.

    A named tuple, not a dataclass: a note has thousands of blocks, made on every full parse.
    """

    start: int  # the offset of its first line
    segments: tuple[Segment, ...]
    bonding: tuple[Span, ...]  # content lines of ```bonding fences

    def moved(self, chars: int) -> "Block":
        if chars == 0:
            return self
        return Block(
            self.start + chars,
            tuple(Segment(s.start + chars, s.text, s.skips) for s in self.segments),
            tuple(Span(b.start + chars, b.end + chars) for b in self.bonding),
        )


class ParsedBlocks(NamedTuple):
    """A document's top-level blocks: where each one starts, and those that contribute something.

    Every block start is a place where parsing may begin afresh (see
    :mod:`notelsp.notation.markdown`); most blocks contribute nothing (no brace, no bonding
    line) and are kept as where they start only.
    """

    starts: tuple[int, ...]  # the offset of every top-level block's first line, in order
    blocks: tuple[Block, ...]
    front_matter: bool = False  # the first block is front matter


_LINE_BREAK = re.compile(r"\r\n|\r|\n")
# A fence closes on a line holding, 0-3 spaces in, a run of its character at least as long as
# its opening run and then spaces and tabs only (CommonMark 4.5; markdown-it's skipSpaces: no
# other white space).  ``_closes_fence`` reads one line by it; ``_fence_closer``, the search
# for the closing line over a text, is built from the same pieces.
_CLOSING_INDENT = " {0,3}"
_AFTER_CLOSING_RUN = r"[ \t]*"
_REST_OF_CLOSING_LINE = re.compile(_AFTER_CLOSING_RUN)
# The commonest top-level blocks, each matched whole from the start of a line (in a document
# with LF line breaks, outside any container, while no leaf but a paragraph is open):
#   plain:   lines that can only be paragraph text, whatever comes before them (none starts
#            with a character that could begin another block);
#   blank:   blank lines, which end a paragraph;
#   heading: an unindented ATX heading;
#   fence:   the opening line of an unindented code fence (the fence is its whole run of
#            backticks or tildes: a tilde fence's info string may hold tildes); its content
#            and closing line are taken by ``_Parser._fence_content``.
# A line holding "|" may be a table header, which comes first: such headings and fence
# openings are left to the line-by-line path, as are fences whose info string starts with
# "{" (perhaps a directive) and everything else.
_TOP_LEVEL_BLOCK = re.compile(
    r"(?P<plain>(?:[^ \t>\-+*_#=`~$<|:!?\[0-9\n][^\n]*(?:\n|\Z))+)"
    r"|(?P<blank>(?:[ \t]*\n)+|[ \t]*\Z)"
    r"|(?P<heading>#{1,6}(?:[ \t][^|\n]*)?(?:\n|\Z))"
    r"|(?P<fence>(?P<ticks>`{3,})(?![`{]|[ \t]+\{)(?P<info>[^`|\n]*)\n"
    r"|(?P<tildes>~{3,})(?![~{]|[ \t]+\{)(?P<tilde_info>[^|\n]*)\n)"
)
_ATX_HEADING = re.compile(r"(#{1,6})(?:[ \t]+|$)")
_FENCE_OPEN = re.compile(r"(`{3,}|~{3,})(.*)")
_THEMATIC_BREAK = re.compile(r"(?:(?:\*[ \t]*){3,}|(?:-[ \t]*){3,}|(?:_[ \t]*){3,})$")
_BLANK_REST = re.compile(r"\s*$")
_COLON_FENCE = re.compile(r":{3,}")
_DIRECTIVE_NAME = re.compile(r"\{([^{}\s]+)\}")
_FRONT_MATTER_OPENER = re.compile(r"-{3,}|\+{3,}")
_ADMONITION_MARKERS = ("???+", "!!!", "???")  # the longest first
_ADMONITION_TAGS_AND_TITLE = re.compile(r'^\s*(?P<tokens>[^"\s](?:[^"]*[^"\s])?)\s+"(?P<title>.*)"[^\s"]*$')
# MyST directives whose body is Markdown, in a backtick or tilde fence (```{note}); any other
# name there is code (```{python} is a code cell in Quarto and R Markdown).  In a colon fence
# (:::{note}) every body is Markdown but those of the code directives (common practice, no source).
MARKDOWN_DIRECTIVES = frozenset({
    "admonition", "attention", "caution", "danger", "error", "hint", "important", "note", "seealso", "tip",
    "warning", "todo", "versionadded", "versionchanged", "deprecated", "topic", "sidebar", "margin",
    "dropdown", "card", "grid", "grid-item", "grid-item-card", "tab-set", "tab-item", "figure", "table",
    "list-table", "epigraph", "pull-quote", "highlights", "compound", "container", "div", "only",
    "glossary", "exercise", "solution",
})
CODE_DIRECTIVES = frozenset({
    "code", "code-block", "code-cell", "sourcecode", "literalinclude", "math", "raw", "eval-rst", "mermaid",
    "graphviz", "csv-table",
})  # whitespace to the end: what str.strip() would leave empty
# Containers (block quotes, list items, admonitions, directives) nested deeper than this are
# not opened: their markers are read as text, as CommonMark parsers cap nesting (markdown-it's
# maxNesting).
# It bounds the work per line, so a line of a hundred thousand "- " stays linear.
MAX_NESTING = 32
_SETEXT_UNDERLINE = re.compile(r"(?:=+|-+)[ \t]*$")
_LIST_MARKER = re.compile(r"([-+*]|(\d{1,9})[.)])(?=[ \t]|$)")
_TABLE_DELIMITER = re.compile(r"[|:\-][|:\- \t]*$")
_TABLE_DELIMITER_CELL = re.compile(r":?-+:?$")
_REFERENCE_DEFINITION = re.compile(r"\[((?:[^\[\]\\]|\\.){1,999})\]:")
_MATH_LABEL_CLOSE = re.compile(r".*\$\$\s*\([^)$\r\n]+?\)\s*$")
_ATTRIBUTE = r"""(?:[ \t]+[A-Za-z_:][A-Za-z0-9:._\-]*(?:[ \t]*=[ \t]*(?:[^"'=<>`\x00-\x20]+|'[^']*'|"[^"]*"))?)"""


@cache  # compiled when a line first starts with "<": a note without HTML never pays for them
def _html_openers() -> tuple[tuple[re.Pattern[str], re.Pattern[str] | None], ...]:
    """CommonMark 0.31, section 4.6: start condition -> end condition (None: a blank line)."""
    return (
        (re.compile(r"<(?:script|pre|style|textarea)(?:[ \t>]|$)", re.I), re.compile(r"</(?:script|pre|style|textarea)>", re.I)),
        (re.compile(r"<!--"), re.compile(r"-->")),
        (re.compile(r"<\?"), re.compile(r"\?>")),
        (re.compile(r"<![A-Za-z]"), re.compile(r">")),
        (re.compile(r"<!\[CDATA\["), re.compile(r"\]\]>")),
        (re.compile(
            r"</?(?:address|article|aside|base|basefont|blockquote|body|caption|center|col|colgroup|dd|details|"
            r"dialog|dir|div|dl|dt|fieldset|figcaption|figure|footer|form|frame|frameset|h[1-6]|head|header|hr|"
            r"html|iframe|legend|li|link|main|menu|menuitem|nav|noframes|ol|optgroup|option|p|param|search|"
            r"section|summary|table|tbody|td|tfoot|th|thead|title|tr|track|ul)(?:[ \t]|/?>|$)", re.I), None),
    )


@cache
def _html_tag_alone() -> re.Pattern[str]:
    """Start condition 7: one complete tag and nothing else on the line."""
    return re.compile(r"(?:<[A-Za-z][A-Za-z0-9\-]*" + _ATTRIBUTE + r"*[ \t]*/?>|</[A-Za-z][A-Za-z0-9\-]*[ \t]*>)[ \t]*$")


@lru_cache(maxsize=64)
def _fence_closer(character: str, length: int) -> re.Pattern[str]:
    """The search for the closing line of a fence of ``length`` ``character``s in a text of LF lines."""
    return re.compile("^" + _CLOSING_INDENT + re.escape(character) + "{" + str(length) + ",}" + _AFTER_CLOSING_RUN + "$",
                      re.M)


def split_lines(text: str) -> tuple[list[int], list[str]]:
    """Each line's start offset and text without its line break (CRLF, CR or LF)."""
    if "\r" not in text:
        lines = text.split("\n")
        return list(accumulate([len(line) + 1 for line in lines], initial=0))[:-1], lines
    starts, lines, offset = [], [], 0
    for match in _LINE_BREAK.finditer(text):
        starts.append(offset)
        lines.append(text[offset : match.start()])
        offset = match.end()
    starts.append(offset)
    lines.append(text[offset:])
    return starts, lines


_MARKER_PREFIX = re.compile(r"[ \t>\-+*.)0-9]*")


def _expanded_marker_tabs(line: str, in_container: bool) -> tuple[str, str] | None:
    """(expanded, original) block-quote and list-marker prefix of a line whose prefix holds a tab.

    A tab after a marker, or under a container's indent, is only partly consumed
    (CommonMark 2.2); as spaces that falls out of counting columns.  None when
    there is nothing to expand.
    """
    prefix = _MARKER_PREFIX.match(line).group()
    if "\t" not in prefix or (not in_container and prefix.strip(" \t0123456789") == ""):
        return None
    return prefix.expandtabs(4), prefix


def _is_thematic_break(line: str, at: int) -> bool:
    """A thematic break from ``at`` to the end of ``line``.

    Checked from the end first: a line of list markers ending in text ("- - - a")
    is rejected at once rather than read to its end from every marker.
    """
    return len(line.rstrip("-*_ \t")) <= at and _THEMATIC_BREAK.match(line, at) is not None


def _atx_content_end(text: str) -> int:
    """Where an ATX heading's content ends: before its optional closing run of '#' (CommonMark 4.2).

    Read from the end of the line, so a long run of spaces before a closing "#x" costs one pass.
    """
    body = len(text.rstrip(" \t"))
    run = len(text[:body].rstrip("#"))  # where the last run of '#' starts
    if run == body:  # no closing sequence
        return len(text)
    if run == 0:
        return 0
    if text[run - 1] not in " \t":  # "foo#": the '#' are content
        return len(text)
    return len(text[:run].rstrip(" \t"))


def _closes_fence(line: str, at: int, run: str) -> bool:
    """Whether ``line`` (its indentation, under 4 columns, ending at ``at``) closes a fence or
    directive opened by ``run``: as long a run or longer, then only spaces and tabs."""
    if not line.startswith(run, at):
        return False
    end = at + len(run)
    while end < len(line) and line[end] == run[0]:
        end += 1
    return _REST_OF_CLOSING_LINE.fullmatch(line, end) is not None


def _admonition(line: str, at: int) -> tuple[int, int, str] | None:
    """(body column, title offset, title) of an admonition opening at ``at``, or None.

    As mdit-py-plugins' admon reads it: a marker, then a kind and an optional title; the body
    is indented to where the kind starts (``???+`` counts as three characters).
    """
    for marker in _ADMONITION_MARKERS:
        if line.startswith(marker, at):
            break
    else:
        return None
    params_at = at + len(marker)
    params = line[params_at:]
    stripped = params.strip()
    if not stripped:
        return None
    kind_at = params_at
    while kind_at < len(line) and line[kind_at] == " ":
        kind_at += 1
    indent = kind_at - at + 3 - len(marker)
    lead = params_at + len(params) - len(params.lstrip())
    quoted = _ADMONITION_TAGS_AND_TITLE.match(stripped)
    if quoted is not None:
        return indent, lead + quoted.start("title"), quoted.group("title")
    kind, _, title = stripped.partition(" ")
    if not title or title == '""':
        return indent, lead, ""
    return indent, lead + len(kind) + 1, title


def _fence_opening(line: str, at: int) -> re.Match[str] | None:
    """A code fence opening at ``at`` (a backtick fence's info string holds no backtick)."""
    fence = _FENCE_OPEN.match(line, at)
    if fence is None or (fence.group(1)[0] == "`" and "`" in fence.group(2)):
        return None
    return fence


def _with_expanded_tabs(line: str) -> str:
    """``line`` with the tabs of its marker prefix expanded (for looking ahead; offsets are not kept)."""
    if "\t" not in line:
        return line
    expanded = _expanded_marker_tabs(line, True)
    return line if expanded is None else expanded[0] + line[len(expanded[1]) :]


def _column(line: str, position: int) -> int:
    """The column of ``line[position]``, tabs stopping every 4 columns."""
    column = 0
    for character in line[:position]:
        column += 4 - column % 4 if character == "\t" else 1
    return column


def _indent(line: str, position: int) -> tuple[int, int]:
    """(columns of whitespace, offset of the first other character) from ``position``; tabs stop every 4."""
    length = len(line)
    if "\t" not in line:
        at = position
        while at < length and line[at] == " ":
            at += 1
        return at - position, at
    start = column = _column(line, position)
    while position < length:
        character = line[position]
        if character == " ":
            column += 1
        elif character == "\t":
            column += 4 - column % 4
        else:
            break
        position += 1
    return column - start, position


def _advance(line: str, position: int, columns: int) -> int:
    """The offset after consuming up to ``columns`` columns of whitespace (a tab is taken whole)."""
    taken = 0
    while taken < columns and position < len(line) and line[position] in " \t":
        taken += 1 if line[position] == " " else 4 - taken % 4
        position += 1
    return position


def _cells(row: str) -> list[tuple[int, int]]:
    """Ranges of a table row's cells, split at unescaped pipes, outer pipes dropped."""
    stripped_start = len(row) - len(row.lstrip())
    stripped_end = len(row.rstrip())
    bounds, start, position, escaped = [], stripped_start, stripped_start, False
    while position < stripped_end:
        character = row[position]
        if character == "|" and not escaped:
            bounds.append((start, position))
            start = position + 1
        escaped = character == "\\" and not escaped
        position += 1
    bounds.append((start, stripped_end))
    if bounds and bounds[0][0] == bounds[0][1]:
        bounds.pop(0)
    if bounds and bounds[-1][0] == bounds[-1][1]:
        bounds.pop()
    return bounds


def _delimiter_cells(line: str) -> int | None:
    """The number of columns of a table delimiter row, or None when ``line`` is not one."""
    stripped = line.strip()
    if not _TABLE_DELIMITER.match(stripped) or (stripped[0] == "-" and len(stripped) > 1 and stripped[1] in " \t"):
        return None
    if len(stripped) < 2:
        return None
    columns = stripped.split("|")
    count = 0
    for index, column in enumerate(columns):
        column = column.strip()
        if not column:
            if index == 0 or index == len(columns) - 1:
                continue
            return None
        if not _TABLE_DELIMITER_CELL.match(column):
            return None
        count += 1
    return count


# --- open blocks --------------------------------------------------------------------


_ITEM, _QUOTE, _DIRECTIVE, _ADMONITION = range(4)


@dataclass(slots=True, eq=False)
class _Container:
    """An open container block: a list item, a block quote, a directive or an admonition."""

    kind: int  # _ITEM, _QUOTE, _DIRECTIVE or _ADMONITION
    indent: int = 0  # a list item's or admonition's content column; a directive fence's indentation
    closer: str = ""  # a directive's shortest closing run

    @property
    def quote(self) -> bool:
        return self.kind == _QUOTE


@dataclass(slots=True)
class _Paragraph:
    """An open paragraph.  While its lines are whole top-level lines of the document only
    their range is kept; the first line that is not (indented, in a container) makes the
    list of (document offset, text) explicit."""

    begin: int  # its text, ``document[begin:end]``, while ``lines`` is None
    end: int
    follows: int  # where the line after its last one starts
    lines: list[tuple[int, str]] | None = None

    def explicit(self, parser: "_Parser") -> list[tuple[int, str]]:
        if self.lines is None:
            self.lines = _lines_of(parser.text, self.begin, self.end)
        return self.lines


def _lines_of(text: str, begin: int, end: int) -> list[tuple[int, str]]:
    """(offset, text) of each line of ``text[begin:end]``, a run of whole lines."""
    lines, offset = [], begin
    for line_break in _LINE_BREAK.finditer(text, begin, end):
        lines.append((offset, text[offset : line_break.start()]))
        offset = line_break.end()
    lines.append((offset, text[offset:end]))
    return lines


@dataclass(slots=True)
class _Fence:
    """An open fenced code block (a ```bonding one holds annotations)."""

    character: str
    length: int
    indent: int
    bonding: bool
    marker: str = ""  # the shortest closing run, made once (not once per line)

    def __post_init__(self) -> None:
        self.marker = self.character * self.length


@dataclass(slots=True)
class _Swallowing:
    """Lines taken whole until ``end`` matches a line (HTML blocks 1-5, display math) or a blank line."""

    end: re.Pattern[str] | None
    math: bool = False
    lines_left: int = 0  # a link reference definition: this many more lines, whatever they hold


@dataclass(slots=True)
class _Table:
    """An open table, by its number of columns."""

    columns: int
    delimiter_next: bool = False  # the header was found looking ahead: the next line is its delimiter row


class _Indented:
    __slots__ = ()


_INDENTED = _Indented()


class _Parser:
    def __init__(self, text: str, document_start: bool = True) -> None:
        self.text = text
        self.document_start = document_start  # the text is a whole document (front matter may open it)
        self.references = _reference_labels(text)
        self.block_starts: list[int] = []  # the offset of every top-level block's first line
        self.blocks: list[tuple[int, list[Segment], list[Span]]] = []  # the blocks given something
        self.tab_prefix: tuple[int, str] | None = None  # (line start, original prefix) while a line's prefix tabs are expanded
        self.containers: list[_Container] = []
        self.leaf: object | None = None
        self._math_closers: list[int] | None = None
        # Per container (by id): (container, first line, line reached, whether that line is outside it).
        self._inside: dict[int, tuple[_Container, int, int, bool]] = {}
        self._empty: dict[tuple[int, int], tuple[_Container, bool]] = {}  # see _empty_for
        self.front_matter = False

    # Each line's start and text: only the line-by-line path needs them, and a note made of
    # plain paragraphs, headings and fences never takes it.
    @cached_property
    def _split(self) -> tuple[list[int], list[str]]:
        return split_lines(self.text)

    @property
    def starts(self) -> list[int]:
        return self._split[0]

    @property
    def lines(self) -> list[str]:
        return self._split[1]

    def parse(self) -> ParsedBlocks:
        text = self.text
        whole_blocks = "\r" not in text  # the whole-block matches below know LF line breaks only
        # The line being read, and while ``whole_blocks`` its offset.  Reading whole blocks
        # counts no lines: the index is found again (None until then) when a line is read alone.
        index: int | None = None
        offset = self._front_matter() if self.document_start else 0
        while offset <= len(text):
            if index is not None and index >= len(self.lines):
                break
            if whole_blocks and not self.containers:
                leaf = self.leaf
                if leaf is None or type(leaf) is _Paragraph:
                    offset = self._whole_blocks(offset)
                    if offset is None:
                        break  # the text is taken to its end
                    index = None
                elif type(leaf) is _Fence:  # opened by a line read alone; ``offset`` is the next line's
                    offset = self._fence_content(offset, leaf)
                    if offset is None:
                        break  # the fence runs to the end of the text
                    index = None
                    continue
            if index is None:
                index = bisect_left(self.starts, offset)
                if index >= len(self.lines):
                    break
            self._line(index, self.lines[index], self.starts[index])
            index += 1
            if whole_blocks and index < len(self.lines):
                offset = self.starts[index]
        self._close_leaf()
        blocks = tuple([Block(start, tuple(segments), tuple(bonding)) for start, segments, bonding in self.blocks])
        return ParsedBlocks(tuple(self.block_starts), blocks, self.front_matter)

    def _front_matter(self) -> int:
        """Where reading starts: after front matter opening the document, if there is one.

        As mdit-py-plugins' front_matter reads it ('---', and '+++' for TOML alike): a run of three
        or more at the very start (the rest of that line not looked at), closed by a line with as
        long a run or longer and nothing after it (at most 3 spaces in), or by a YAML '...' line.
        Unclosed, it is no front matter.
        """
        text = self.text
        opener = _FRONT_MATTER_OPENER.match(text)
        if opener is None:
            return 0
        run = opener.group()
        next_break = _LINE_BREAK.search(text)
        while next_break is not None:
            line_start = next_break.end()
            next_break = _LINE_BREAK.search(text, line_start)
            line = text[line_start : next_break.start() if next_break else len(text)]
            columns, at = _indent(line, 0)
            if (line.startswith("...") and not line[3:].strip(" \t")) or (
                columns < 4 and line.startswith(run, at) and not line[at:].lstrip(run[0]).strip(" \t")
            ):
                self.block_starts.append(0)
                self.front_matter = True
                return next_break.end() if next_break else len(text) + 1
        return 0

    def _whole_blocks(self, offset: int) -> int | None:
        """Take the blocks ``_TOP_LEVEL_BLOCK`` matches from the line at ``offset`` on, one after
        another; the offset of the first line it does not match (None: the text is taken)."""
        text, match, block_starts = self.text, _TOP_LEVEL_BLOCK.match, self.block_starts
        # An open paragraph of whole lines is kept in locals here, its text [begin, end);
        # begin is -1 while none is open.
        begin, ended = -1, False
        leaf = self.leaf
        if type(leaf) is _Paragraph and leaf.lines is None:
            begin, end = leaf.begin, leaf.end
            self.leaf = None
        while (block := match(text, offset)) is not None:
            block_end = block.end()
            # Every block matched ends with a line break or at the end of the text.
            ended = not text.endswith("\n", offset, block_end)
            last_end = block_end if ended else block_end - 1  # the end of its last line
            kind = block.lastgroup
            if kind == "plain":
                if self.leaf is not None:  # a paragraph with lines in a container or indented goes on
                    self.leaf.lines.extend(_lines_of(text, offset, last_end))
                elif begin >= 0:
                    end = last_end
                else:
                    block_starts.append(offset)
                    begin, end = offset, last_end
            else:
                if begin >= 0:
                    self._emit_whole_lines(begin, end)
                    begin = -1
                elif self.leaf is not None:
                    self._close_leaf()
                if kind == "heading":
                    block_starts.append(offset)
                    line = text[offset:last_end]
                    if "{" in line:
                        self._emit_heading(line, offset, _ATX_HEADING.match(line))
                elif kind == "fence":
                    block_starts.append(offset)
                    info, run = block.group("info", "ticks")
                    if info is None:
                        info, run = block.group("tilde_info", "tildes")
                    bonding = BONDING_INFO in info and info.split()[:1] == [BONDING_INFO]
                    block_end = self._fence_content(block_end, _Fence(run[0], len(run), 0, bonding))
                    if block_end is None or block_end > len(text):
                        return None  # the fence runs to the end of the text, or closes on its last line
            offset = block_end
            if ended:
                break
        if begin >= 0:
            self.leaf = _Paragraph(begin, end, offset)
        return None if ended else offset

    def _open_heading(self, index: int, line: str, start: int, heading: re.Match[str]) -> None:
        self._close_leaf()
        self._begin_block(index)
        if "{" in line:
            self._emit_heading(line, start, heading)

    def _emit_heading(self, line: str, start: int, heading: re.Match[str]) -> None:
        text = line[heading.end() :]
        self._emit_run([(start + heading.end(), text[: _atx_content_end(text)])])

    def _open_directive(self, index: int, run: str, columns: int) -> None:
        """A directive (or colon fence) whose body is read as Markdown, up to a closing run."""
        self._close_leaf()
        self._begin_block(index)
        self.containers.append(_Container(_DIRECTIVE, indent=columns, closer=run))

    def _open_fence(self, index: int, fence: re.Match[str], columns: int) -> None:
        self._close_leaf()
        self._begin_block(index)
        character = fence.group(1)[0]
        self.leaf = _Fence(character, len(fence.group(1)), columns, fence.group(2).split()[:1] == [BONDING_INFO])

    def _fence_content(self, start: int, fence: _Fence) -> int | None:
        """Take a top-level fence's content, from the line at ``start`` to its closing line, in one
        search (outside containers, in a text of LF breaks: whether opened by ``_TOP_LEVEL_BLOCK``
        or by a line read alone); the offset of the line after the closing one, None when no line
        closes the fence.  Inside a container the same closing is read a line at a time
        (``_fence_line``)."""
        text = self.text
        closing = _fence_closer(fence.character, fence.length).search(text, start)
        if fence.bonding:
            bonding, indent = self._given()[2], fence.indent
            # the content lines: up to the closing line's break, else every line to the end
            lines = (text[start : closing.start() - 1].split("\n") if closing.start() > start else []) if closing \
                else text[start:].split("\n")
            for line in lines:
                content = _advance(line, 0, indent) if indent else 0
                bonding.append(Span(start + content, start + len(line)))
                start += len(line) + 1
        if closing is None:
            return None
        self.leaf = None
        return closing.end() + 1

    # --- one line ------------------------------------------------------------

    def _swallowed(self) -> None:
        """One more line of a link reference definition taken."""
        self.leaf.lines_left -= 1
        if not self.leaf.lines_left:
            self.leaf = None

    def _document_offset(self, start: int, index: int) -> int:
        """The document offset of ``line[index]`` for the line being read (its prefix tabs may be expanded)."""
        if self.tab_prefix is None:
            return start + index
        line_start, prefix = self.tab_prefix
        expanded_length = len(prefix.expandtabs(4))
        if index >= expanded_length:
            return start + index
        column = 0
        for position, character in enumerate(prefix):  # inside the expansion: the character covering it
            column = column + 4 - column % 4 if character == "\t" else column + 1
            if column > index:
                return line_start + position + (1 if character == "\t" else 0)
        return line_start + len(prefix)

    def _matched_containers(self, line: str, index: int | None = None) -> tuple[int, int]:
        """How many open containers ``line`` (the line at ``index``) continues, and the offset after their markers."""
        blank = not line.strip(" \t")
        position, matched = 0, 0
        for depth, container in enumerate(self.containers):
            kind = container.kind
            if blank:  # list items and directives go on, block quotes end, admonitions after two
                if kind == _QUOTE or (kind == _ADMONITION and self._ends_admonition(index, depth)):
                    break
                matched += 1
                continue
            columns, at = _indent(line, position)
            if kind == _QUOTE:
                if columns < 4 and at < len(line) and line[at] == ">":
                    position = at + 1
                    if position < len(line) and line[position] in " \t":
                        position += 1
                    matched += 1
                    continue
                break
            if kind == _DIRECTIVE:
                if columns < 4 and _closes_fence(line, at, container.closer):
                    break
                position = _advance(line, position, container.indent)
                matched += 1
                continue
            if at >= len(line):  # blank (after the markers matched so far)
                if kind == _ADMONITION and self._ends_admonition(index, depth):
                    break
                matched += 1
                continue
            if columns >= container.indent:
                position = _advance(line, position, container.indent)
                matched += 1
                continue
            break
        return matched, position

    def _ends_admonition(self, index: int | None, depth: int) -> bool:
        """Whether the line at ``index`` ends the admonition ``containers[depth]``: it and the
        line before are both "empty" for it (markdown-it's admon plugin)."""
        return index is not None and index > 0 and self._empty_for(index, depth) and self._empty_for(index - 1, depth)

    def _empty_for(self, number: int, depth: int) -> bool:
        """Whether line ``number`` is blank and indented less than the body of the admonition
        ``containers[depth]`` (two such lines in a row end it).  Remembered per line and admonition."""
        container = self.containers[depth]
        known = self._empty.get((number, depth))
        if known is not None and known[0] is container:
            return known[1]
        line = _with_expanded_tabs(self.lines[number])
        position, owed, empty = 0, 0, None
        for outer in self.containers[:depth]:
            columns, at = _indent(line, position)
            if outer.kind == _QUOTE:
                if columns < 4 and at < len(line) and line[at] == ">":
                    position = at + 1 + (at + 1 < len(line) and line[at + 1] in " \t")
                    continue
                empty = False  # outside the quote: not a line of the admonition at all
                break
            if at >= len(line):
                owed += outer.indent
            elif columns >= outer.indent:
                position = _advance(line, position, outer.indent)
            else:
                empty = False
                break
        if empty is None:
            columns, at = _indent(line, position)
            empty = at >= len(line) and columns < owed + container.indent
        self._empty[(number, depth)] = (container, empty)
        return empty

    def _line(self, index: int, line: str, start: int) -> None:
        self.tab_prefix = None
        if "\t" in line:
            expanded = _expanded_marker_tabs(line, bool(self.containers))
            if expanded is not None:
                self.tab_prefix = (start, expanded[1])
                line, start = expanded[0] + line[len(expanded[1]) :], start - (len(expanded[0]) - len(expanded[1]))
        matched, position = self._matched_containers(line, index) if self.containers else (0, 0)
        rest_blank = not line[position:].strip()
        if matched < len(self.containers):
            ended = self.containers[matched]
            if ended.kind == _DIRECTIVE and _closes_fence(line, _indent(line, position)[1], ended.closer):
                self._close_leaf()  # the directive's closing line
                del self.containers[matched:]
                return
            # Outside the paragraph's containers any list marker ends it (as markdown-it reads it).
            # A link reference definition is read from a paragraph, so its lines may be lazy too.
            # Nothing continues lazily into a directive or an admonition (their ends are fixed first).
            definition = type(self.leaf) is _Swallowing and self.leaf.lines_left
            lazy = (type(self.leaf) is _Paragraph or definition) and not rest_blank
            if lazy and any(container.kind >= _DIRECTIVE for container in self.containers[matched:]):
                lazy = False
            if lazy and definition and not self._interrupts(index, line, position, any_list_marker=True):
                self._swallowed()
                return
            if lazy and not self._interrupts(index, line, position, any_list_marker=True):
                self.leaf.explicit(self).append(self._content(line, start, position))  # lazy continuation
                return
            self._close_leaf()
            del self.containers[matched:]
        leaf = self.leaf
        if type(leaf) is _Fence:
            self._fence_line(leaf, index, line, start, position)
            return
        if type(leaf) is _Swallowing and leaf.lines_left:  # the further lines of a link reference definition
            self._swallowed()
            return
        if type(leaf) is _Swallowing:
            if leaf.math:
                if line[position:].strip().endswith("$$") or _MATH_LABEL_CLOSE.match(line, position):
                    self.leaf = None
            elif leaf.end is None:
                if rest_blank:
                    self.leaf = None
            elif leaf.end.search(line, position):
                self.leaf = None
            return
        if leaf is _INDENTED:
            if rest_blank or _indent(line, position)[0] >= 4:
                return
            self.leaf = None
        self._open_containers_and_leaf(index, line, start, position)

    def _open_containers_and_leaf(self, index: int, line: str, start: int, position: int) -> None:
        while len(self.containers) < MAX_NESTING:
            columns, at = _indent(line, position)
            if columns >= 4 or at >= len(line):
                break
            character = line[at]
            if character == ">":
                self._close_leaf()
                self._begin_block(index)
                self.containers.append(_Container(_QUOTE))
                position = at + 1
                if position < len(line) and line[position] in " \t":
                    position += 1
                continue
            if character in "-+*0123456789":
                item = self._list_item(line, position, at, columns)
                if item is not None:
                    self._close_leaf()
                    self._begin_block(index)
                    self.containers.append(_Container(_ITEM, indent=item[0]))
                    position = item[1]
                    continue
            if character in "!?" and (admonition := _admonition(line, at)) is not None:
                indent, title_at, title = admonition
                self._close_leaf()
                self._begin_block(index)
                self.containers.append(_Container(_ADMONITION, indent=indent))
                if "{" in title:  # the title is inline text; the rest of the line is its kind
                    self._emit_run([(start + title_at, title)])
                return
            break
        self._leaf_line(index, line, start, position)

    def _list_item(self, line: str, position: int, at: int, columns: int) -> tuple[int, int] | None:
        """(content column, content offset) of a list item starting at ``at``, or None."""
        marker = _LIST_MARKER.match(line, at)
        if marker is None or _is_thematic_break(line, at):
            return None
        after = marker.end()
        empty = _BLANK_REST.match(line, after) is not None
        if type(self.leaf) is _Paragraph and (empty or (marker.group(2) is not None and int(marker.group(2)) != 1)):
            return None  # cannot interrupt a paragraph
        # Columns are absolute (tab stops count from the line's start); the content column is
        # returned relative to ``position``, where this item's parent content begins.
        tabbed = "\t" in line
        base = _column(line, position) if tabbed else position
        marker_end = (_column(line, at) if tabbed else at) + (after - at)
        content, column = after, marker_end
        while content < len(line) and line[content] in " \t":
            column += 1 if line[content] == " " else 4 - column % 4
            content += 1
        spaces = column - marker_end
        if empty or spaces > 4:
            return marker_end + 1 - base, min(after + 1, len(line))
        return column - base, content

    def _leaf_line(self, index: int, line: str, start: int, position: int) -> None:
        leaf = self.leaf
        columns, at = _indent(line, position)
        if at >= len(line):  # blank
            if type(leaf) in (_Paragraph, _Table):
                self._close_leaf()
            return
        if columns >= 4:
            if type(leaf) is _Paragraph or len(self.containers) >= MAX_NESTING:
                # At the nesting cap, indentation may belong to containers not opened: text, not code.
                if type(leaf) is _Paragraph:
                    leaf.explicit(self).append(self._content(line, start, at))
                else:
                    self._close_leaf()
                    self._begin_block(index)
                    self.leaf = _Paragraph(0, 0, 0, lines=[self._content(line, start, at)])
                return
            self._close_leaf()
            self._begin_block(index)
            self.leaf = _INDENTED
            return
        character = line[at]
        if type(leaf) is _Table:  # every line is a row until a block that ends tables starts
            if leaf.delimiter_next:
                leaf.delimiter_next = False
                return
            if self._table_row(leaf, index, line, start, at):
                return
            leaf = None
        if "|" in line and self._table_header_here(index, line, start, at):  # tables come before any other block
            return
        if character == "#" and (heading := _ATX_HEADING.match(line, at)):
            self._open_heading(index, line, start, heading)
            return
        # A directive is a container too: past the nesting cap its opening line is text.
        nestable = len(self.containers) < MAX_NESTING
        if character in "`~" and (fence := _fence_opening(line, at)):
            name = _DIRECTIVE_NAME.match(fence.group(2).strip())
            if name is None or name.group(1) not in MARKDOWN_DIRECTIVES:
                self._open_fence(index, fence, columns)
                return
            if nestable:
                self._open_directive(index, fence.group(1), columns)
                return
        if character == ":" and nestable and (colons := _COLON_FENCE.match(line, at)):
            name = _DIRECTIVE_NAME.match(line[colons.end() :].strip())
            if name is not None and name.group(1) in CODE_DIRECTIVES:
                self._close_leaf()
                self._begin_block(index)
                self.leaf = _Fence(":", len(colons.group()), columns, False)
            else:
                self._open_directive(index, colons.group(), columns)
            return
        # Display math cannot interrupt a paragraph (as in markdown-it's dollarmath plugin).
        if character == "$" and type(leaf) is not _Paragraph and line.startswith("$$", at) and self._math_block(index, line, at):
            return
        if character == "<" and self._html_block(index, line, at):
            return
        if type(leaf) is _Paragraph:
            if _SETEXT_UNDERLINE.match(line, at):
                self._close_leaf()  # the paragraph was a heading; its text is prose all the same
                return
        if character in "*-_" and _THEMATIC_BREAK.match(line, at):
            self._close_leaf()
            self._begin_block(index)
            return
        if type(leaf) is _Paragraph and character in "|:-" and self._table_starts(leaf, line, at):
            return
        if leaf is None and character == "[" and (length := self._definition_length(index, line, at)):
            self._begin_block(index)  # a link reference definition: destination and title are not prose
            if length > 1:
                self.leaf = _Swallowing(None, lines_left=length - 1)
            return
        if type(leaf) is not _Paragraph:
            self._close_leaf()
            self._begin_block(index)
            if at == 0 and not self.containers:
                self.leaf = _Paragraph(self.starts[index], self.starts[index] + len(self.lines[index]), self._line_after(index))
                return
            leaf = self.leaf = _Paragraph(0, 0, 0, lines=[])
        if leaf.lines is None and leaf.follows == self.starts[index] and at == 0 and not self.containers:
            leaf.end, leaf.follows = self.starts[index] + len(self.lines[index]), self._line_after(index)
        else:
            leaf.explicit(self).append((start + at, line[at:]))

    # --- leaves --------------------------------------------------------------

    def _fence_line(self, fence: _Fence, index: int, line: str, start: int, position: int) -> None:
        columns, at = _indent(line, position)
        if columns < 4 and _closes_fence(line, at, fence.marker):
            self.leaf = None
            return
        if fence.bonding:
            content = _advance(line, position, fence.indent)
            self._given()[2].append(Span(self._document_offset(start, content), start + len(line)))

    def _math_block(self, index: int, line: str, at: int) -> bool:
        """Open (or take whole) a ``$$`` display-math block; False when the line is not one."""
        text = line[at:]
        stripped = text.strip()
        closed_here = False
        if len(stripped) > 3:
            if stripped.endswith("$$") or _MATH_LABEL_CLOSE.match(text):
                closed_here = True
            elif "$$" in text[2:]:
                return False
        if not closed_here and self._next_math_closer(index) is None:
            return False  # never closed: the line is text
        self._close_leaf()
        self._begin_block(index)
        if not closed_here:
            self.leaf = _Swallowing(None, math=True)
        return True

    def _next_math_closer(self, index: int) -> int | None:
        if self._math_closers is None:
            self._math_closers = [
                number
                for number, line in enumerate(self.lines)
                if "$$" in line and (line.rstrip().endswith("$$") or _MATH_LABEL_CLOSE.match(line))
            ]
        found = bisect_right(self._math_closers, index)
        if found == len(self._math_closers):
            return None
        closer = self._math_closers[found]
        if self.containers and self._first_line_outside(index, closer) is not None:
            return None  # the closing line is outside the block quote or list item the math opened in
        return closer

    def _first_line_outside(self, index: int, limit: int) -> int | None:
        """The first line after ``index`` (up to ``limit``) that does not continue every open container.

        Remembered per innermost container: the lines already found inside it are not read
        again for the next opener in it, so many "$$" openers in one list item stay linear.
        """
        container, depth = self.containers[-1], len(self.containers)
        known = self._inside.get(id(container))
        if known is not None and known[0] is container and known[1] <= index + 1 <= known[2]:
            _, first, reached, outside = known
            if outside:
                return reached if reached <= limit else None
        else:
            first = reached = index + 1
        while reached <= limit:
            if self._matched_containers(_with_expanded_tabs(self.lines[reached]), reached)[0] < depth:
                self._inside[id(container)] = (container, first, reached, True)
                return reached
            reached += 1
        self._inside[id(container)] = (container, first, reached, False)
        return None

    def _html_block(self, index: int, line: str, at: int) -> bool:
        for opener, end in _html_openers():
            if opener.match(line, at):
                break
        else:
            if type(self.leaf) is _Paragraph or not _html_tag_alone().match(line, at):
                return False
            end = None
        self._close_leaf()
        self._begin_block(index)
        if end is None or not end.search(line, at):
            self.leaf = _Swallowing(end)
        return True

    def _table_starts(self, paragraph: _Paragraph, line: str, at: int) -> bool:
        """A delimiter row under a paragraph's last line makes that line a table header."""
        columns = _delimiter_cells(line[at:])
        if columns is None:
            return False
        lines = paragraph.explicit(self)
        header_start, header = lines[-1]
        if "|" not in header.strip() or len(_cells(header)) != columns:
            return False
        lines.pop()
        self._close_leaf()
        self._emit_cells(header_start, header)
        self.leaf = _Table(columns)
        return True

    def _table_header_here(self, index: int, line: str, start: int, at: int) -> bool:
        """A table whose header is this line, its delimiter row the next (CommonMark tables extension)."""
        if index + 1 >= len(self.lines):
            return False
        following = _with_expanded_tabs(self.lines[index + 1])
        matched, position = self._matched_containers(following, index + 1) if self.containers else (0, 0)
        if matched < len(self.containers) or _indent(following, position)[0] >= 4:
            return False
        columns = _delimiter_cells(following[position:])
        header = line[at:]
        if columns is None or "|" not in header.strip() or len(_cells(header)) != columns:
            return False
        self._close_leaf()
        self._begin_block(index)
        self._emit_cells(start + at, header)
        self.leaf = _Table(columns, delimiter_next=True)
        return True

    def _table_row(self, table: _Table, index: int, line: str, start: int, at: int) -> bool:
        """A body row of an open table; False when the line ends it."""
        if self._interrupts(index, line, at, any_list_marker=True):
            self._close_leaf()
            return False
        self._emit_cells(start + at, line[at:], table.columns)
        return True

    def _interrupts(self, index: int, line: str, position: int, any_list_marker: bool = False) -> bool:
        """Whether ``line`` (from ``position``) starts a block that ends a paragraph."""
        columns, at = _indent(line, position)
        if at >= len(line):
            return True
        if columns >= 4:
            return False
        character = line[at]
        if character == ">":
            return True
        if character == "#" and _ATX_HEADING.match(line, at):
            return True
        if character in "`~" and _fence_opening(line, at):
            return True
        if character == ":" and _COLON_FENCE.match(line, at):
            return True
        if character in "!?" and _admonition(line, at) is not None:
            return True
        if character in "*-_" and _THEMATIC_BREAK.match(line, at):
            return True
        if character == "<" and any(opener.match(line, at) for opener, _ in _html_openers()):
            return True
        if character in "-+*0123456789":
            marker = _LIST_MARKER.match(line, at)
            if marker and (any_list_marker or (line[marker.end() :].strip() and marker.group(2) in (None, "1"))):
                return True
        return False

    def _close_leaf(self) -> None:
        leaf = self.leaf
        if type(leaf) is _Paragraph:
            if leaf.lines is None:
                self._emit_whole_lines(leaf.begin, leaf.end)
            else:
                self._emit_run(leaf.lines)
        self.leaf = None

    def _begin_block(self, index: int) -> None:
        if not self.containers:
            self.block_starts.append(self.starts[index])

    def _line_after(self, index: int) -> int:
        return self.starts[index + 1] if index + 1 < len(self.starts) else len(self.text) + 1

    def _given(self) -> tuple[int, list[Segment], list[Span]]:
        """The segments and bonding lines of the current top-level block, to add to."""
        start = self.block_starts[-1]
        if not self.blocks or self.blocks[-1][0] != start:
            self.blocks.append((start, [], []))
        return self.blocks[-1]

    def _content(self, line: str, start: int, position: int) -> tuple[int, str]:
        at = _indent(line, position)[1]
        return start + at, line[at:]

    def _definition_length(self, index: int, line: str, at: int) -> int:
        """How many lines a link reference definition starting at ``at`` takes (0: it is not one).

        CommonMark 4.7: ``[label]:``, a destination (on this line or the next), an
        optional title (after whitespace, on the destination's line or the next, and
        possibly over several lines), then nothing else on the title's last line.
        """
        label = _REFERENCE_DEFINITION.match(line, at)
        if label is None or not label.group(1).strip():
            return 0
        following = []  # the paragraph's further lines: a definition cannot run past its paragraph
        for number in range(index + 1, min(index + 1 + _DEFINITION_LOOKAHEAD, len(self.lines))):
            raw = _with_expanded_tabs(self.lines[number])
            matched, position = self._matched_containers(raw, number) if self.containers else (0, 0)
            if self._interrupts(number, raw, position, any_list_marker=matched < len(self.containers)):
                break
            following.append(raw[position:].lstrip(" \t"))
        text = "\n".join([line[label.end() :], *following])
        position = _DEFINITION_SPACE.match(text).end()
        if position < len(text) and text[position] == "<":
            closing = text.find(">", position)
            if closing == -1 or "\n" in text[position:closing]:
                return 0
            destination_end = closing + 1
        else:
            destination = _BARE_DESTINATION.match(text, position)
            if destination is None:
                return 0
            destination_end = destination.end()
        after = _DEFINITION_SPACE.match(text, destination_end).end()
        title = _DEFINITION_TITLE.match(text, after) if after > destination_end else None
        if title is not None:
            title_line_rest = text[title.end() : _line_end(text, title.end())]
            if not title_line_rest.strip():
                return text.count("\n", 0, title.end()) + 1
        # No valid title: the destination must end its line.
        if text[destination_end : _line_end(text, destination_end)].strip():
            return 0
        return text.count("\n", 0, destination_end) + 1

    # --- inline runs -----------------------------------------------------------

    def _emit_whole_lines(self, begin: int, end: int) -> None:
        """Segments of a paragraph made of whole lines, ``document[begin:end]``."""
        if self.text.find("{", begin, end) == -1:
            return
        text = self.text[begin:end]
        pieces = _paragraph_pieces(text, self.references) if len(text) <= _SEGMENT_CHARS else _pieces(text, self.references)
        self._given()[1].extend([Segment(begin + offset, piece, skips) for offset, piece, skips in pieces])

    def _emit_run(self, lines: list[tuple[int, str]]) -> None:
        """Segments of one inline run (lines of a paragraph or one heading), with their skipped ranges."""
        braced = [number for number, (_, text) in enumerate(lines) if "{" in text]
        if not braced:
            return
        segments = self._given()[1]
        joined = lines[0][1] if len(lines) == 1 else "\n".join([text for _, text in lines])
        skips = inline_skips(joined, self.references) if SKIP_START.search(joined) else ()
        if not skips:
            segments.extend(Segment(*lines[number]) for number in braced)
            return
        ends = [end for _, end in skips]
        line_offsets = list(accumulate([len(text) + 1 for _, text in lines], initial=0))
        for number in braced:
            offset, text = lines[number]
            begin = line_offsets[number]
            end = begin + len(text)
            segments.append(Segment(offset, text, _share_of(skips, ends, begin, end)))

    def _emit_cells(self, offset: int, row: str, columns: int | None = None) -> None:
        """One table row: each cell an inline run of its own (cells past the header's ``columns`` are dropped)."""
        if "{" not in row:
            return
        skips: list[tuple[int, int]] = []
        cells = _cells(row)
        if columns is not None and len(cells) > columns:
            skips.append((cells[columns][0], len(row)))
            cells = cells[:columns]
        for start, end in cells:
            cell = row[start:end]
            if "{" in cell and SKIP_START.search(cell):
                skips.extend((start + a, start + b) for a, b in inline_skips(cell, self.references))
        pipes = [(end, end + 1) for _, end in cells[:-1]]  # the pipes between cells: no annotation spans one
        self._given()[1].append(Segment(offset, row, tuple(sorted(skips + pipes))))


_SEGMENT_CHARS = 2048  # a longer paragraph is split between lines (and not remembered whole)
_PARAGRAPH_CACHE_SIZE = 8192  # about two large documents' worth of paragraphs


def _pieces(text: str, references: frozenset[str]) -> tuple[tuple[int, str, tuple[Skip, ...]], ...]:
    """(offset, text, skipped ranges) of the pieces of a paragraph's text that hold a brace:
    the whole text when it is short, else runs of whole lines of about ``_SEGMENT_CHARS``."""
    skips = inline_skips(text, references) if SKIP_START.search(text) else ()
    if len(text) <= _SEGMENT_CHARS:
        return ((0, text, skips),)
    pieces, ends, piece = [], [stop for _, stop in skips], 0
    while piece < len(text):
        limit = text.rfind("\n", piece, piece + _SEGMENT_CHARS + 1)
        if limit <= piece:  # one line longer than a piece
            limit = text.find("\n", piece + _SEGMENT_CHARS)
        if limit == -1:
            limit = len(text)
        if text.find("{", piece, limit) != -1:
            pieces.append((piece, text[piece:limit], _share_of(skips, ends, piece, limit)))
        piece = limit + 1
    return tuple(pieces)


# A paragraph's pieces depend on its text alone (and the document's link labels): after an
# edit, or in a note met before, most paragraphs are found here.  Short ones only, so the
# cache stays small whatever is typed.
_paragraph_pieces = lru_cache(maxsize=_PARAGRAPH_CACHE_SIZE)(_pieces)
_DEFINITION_LOOKAHEAD = 50  # lines a definition's destination and title may take
_DEFINITION_SPACE = re.compile(r"[ \t]*\n?[ \t]*")
_BARE_DESTINATION = re.compile(r"[^\s\x00-\x1f<]+")
_DEFINITION_TITLE = re.compile(r'"(?:[^"\\]|\\.)*"|\'(?:[^\'\\]|\\.)*\'|\((?:[^()\\]|\\.)*\)', re.S)


def _line_end(text: str, position: int) -> int:
    end = text.find("\n", position)
    return len(text) if end == -1 else end


def _share_of(skips: tuple[Skip, ...], ends: list[int], begin: int, end: int) -> tuple[Skip, ...]:
    """The skipped ranges of an inline run that fall in ``[begin, end)`` (a line or whole lines), relative to it.

    Skipped ranges are disjoint and in order, so the first one is found by bisecting their ends.
    """
    share = []
    for index in range(bisect_right(ends, begin), len(skips)):
        start, stop = skips[index]
        if start >= end:
            break
        share.append((max(start, begin) - begin, min(stop, end) - begin))
    return tuple(share)


def _reference_labels(text: str) -> frozenset[str]:
    if "]" not in text or "]:" not in text:  # one character is found many times faster than two
        return frozenset()
    return frozenset(
        normalise_label(match.group(1))
        for match in re.finditer(r"^[ \t]{0,3}" + _REFERENCE_DEFINITION.pattern, text, re.M)
        if match.group(1).strip()
    )


def parse_blocks(text: str, document_start: bool = True) -> ParsedBlocks:
    """The top-level blocks of a Markdown document (``document_start``: ``text`` opens the
    document, so front matter may start it; False for a part re-parsed after an edit)."""
    return _Parser(text, document_start).parse()
