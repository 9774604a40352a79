"""Find every annotation in a document and place its parse at the right offsets.

A brace group is an annotation when it begins with an element symbol (or '['
for a bracketed ion, or ``smiles "`` for a SMILES) and either contains ':' or
reads cleanly as a formula (a quoted SMILES always is one).
Everything else in braces (``{a, b}``, ``{#id .class}``, LaTeX arguments) is
left alone.  Bodies are parsed through the position-free cache of
:func:`notelsp.notation.transform.parse_body`; an annotation is recorded as
plain offsets beside that parse (:data:`notelsp.notation.model.Found`).
"""

from __future__ import annotations

import threading
from bisect import bisect_right
from functools import lru_cache
from heapq import merge
from operator import itemgetter
from typing import Iterator, Literal

from .. import elements
from .markdown import BlockMemory, MarkdownStructure, Segment, line_starts, markdown_structure
from .model import Found, ParsedBody, ScannedDocument, Span
from .transform import MAX_BODY_CHARS, NEAR_MISS_CHARS, near_miss_body, parse_body, starts_with_smiles

DocumentKind = Literal["markdown", "text"]
_START = itemgetter(0)

# A brace right after these belongs to something else: \frac{a}, x_{i}, x^{2}, }{.
_NOT_BEFORE_ANNOTATION = set("\\_^}$") | set("abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789")

# Segments (a line, or a paragraph's whole lines) are remembered by their text, not their
# place: after an edit, the segments that moved are placed again (plain offsets, cheap)
# without being looked at again.  About two large documents' worth.  Each remembered segment
# holds its annotations' parses, and a paragraph may hold hundreds: the annotations held
# together are capped too, or a long session of edits to annotation-dense paragraphs would
# keep every parse typed (8,192 segments x their annotations) after parse_body let it go.
_SEGMENT_CACHE_SIZE = 8192
_SEGMENT_CACHE_ANNOTATIONS = 32_768
Groups = tuple[tuple[int, int, ParsedBody], ...]
_segment_groups: dict[tuple[str, tuple[tuple[int, int], ...]], Groups] = {}  # oldest first
_segment_annotations = 0  # annotations held in _segment_groups
_segment_lock = threading.Lock()


def scan(text: str, kind: DocumentKind = "markdown", memory: BlockMemory | None = None) -> ScannedDocument:
    """Every annotation in ``text``, with code-point offsets into it (``memory``: see ``markdown_structure``)."""
    if kind == "markdown":
        return scan_with_structure(text, markdown_structure(text, memory))
    return scan_with_structure(text, MarkdownStructure(_text_segments(text), ()))


def scan_with_structure(text: str, structure: MarkdownStructure) -> ScannedDocument:
    """The annotations of ``text`` where ``structure`` says they may stand (tests pass a reference structure)."""
    found = [placed for segment in structure.segments for placed in _segment_found(segment)]
    if structure.bonding_lines:
        found.extend(placed for line in structure.bonding_lines if (placed := _block_found(text, line)))
        found.sort(key=_START)
    return ScannedDocument(tuple(found))


def scan_pieces(text: str, kind: DocumentKind = "markdown", memory: BlockMemory | None = None) -> Iterator[list[Found]]:
    """The annotations of ``text`` one piece at a time, in document order.

    A piece is one inline segment (a line, or a paragraph's lines) or one line of a
    bonding block, so a consumer may stop between pieces and have scanned nothing
    it does not use; pieces without annotations are passed over.
    """
    structure = markdown_structure(text, memory) if kind == "markdown" else MarkdownStructure(_text_segments(text), ())
    if not structure.bonding_lines:
        for segment in structure.segments:
            if found := _segment_found(segment):
                yield found
        return
    pieces = merge(((segment.start, segment) for segment in structure.segments),
                   ((line.start, line) for line in structure.bonding_lines), key=_START)
    for _, piece in pieces:
        if isinstance(piece, Span):
            if (placed := _block_found(text, piece)) is not None:
                yield [placed]
        elif found := _segment_found(piece):
            yield found


def scan_pieces_around(text: str, kind: DocumentKind, start: int, end: int,
                       memory: BlockMemory | None = None) -> Iterator[list[Found]]:
    """The annotations of the pieces (see :func:`scan_pieces`) that touch ``[start, end]``, and no others."""
    structure = markdown_structure(text, memory) if kind == "markdown" else MarkdownStructure(_text_segments(text), ())
    pieces: list[list[Found]] = []
    for segment in structure.segments:
        if segment.start <= end and start <= segment.start + len(segment.text) and (found := _segment_found(segment)):
            pieces.append(found)
    for line in structure.bonding_lines:
        if line.start <= end and start <= line.end and (placed := _block_found(text, line)) is not None:
            pieces.append([placed])
    return iter(sorted(pieces, key=lambda piece: piece[0][0]))


def _text_segments(text: str) -> tuple[Segment, ...]:
    if "{" not in text:
        return ()
    starts = line_starts(text)
    segments = []
    for index, start in enumerate(starts):
        end = starts[index + 1] - 1 if index + 1 < len(starts) else len(text)
        if text.find("{", start, end) != -1:
            segments.append(Segment(start, text[start:end].rstrip("\r")))
    return tuple(segments)


def _overlaps_skip(opening: int, closing: int, skips: tuple[tuple[int, int], ...], skip_starts: list[int]) -> bool:
    """Whether a skipped range meets the braces ``[opening, closing]``.

    Skipped ranges are disjoint and in order, so only the last one starting at or
    before ``closing`` needs looking at (a bisection: linear even on a 1 MB line).
    """
    last = bisect_right(skip_starts, closing) - 1
    return last >= 0 and skips[last][1] > opening


def _begins_with_element(body: str) -> bool:
    head = body.lstrip()
    return head.startswith("[") or elements.is_symbol(head[:2]) or elements.is_symbol(head[:1])


def _segment_found(segment: Segment) -> list[Found]:
    start = segment.start
    groups = _segment_groups.get((segment.text, segment.skips))
    if groups is None:
        groups = _inline_groups(segment.text, segment.skips)
    return [
        (start + opening, start + closing + 1, start + opening + 1, start + closing, parsed, "inline")
        for opening, closing, parsed in groups
    ]


def _inline_groups(text: str, skips: tuple[tuple[int, int], ...]) -> Groups:
    """(opening brace, closing brace, parse) of each annotation in a segment of inline text (remembered)."""
    global _segment_annotations
    key = (text, skips)
    groups = _segment_groups.get(key)
    if groups is not None:
        return groups
    groups = _find_inline_groups(text, skips)
    with _segment_lock:
        if key not in _segment_groups:
            _segment_groups[key] = groups
            _segment_annotations += len(groups)
        while len(_segment_groups) > _SEGMENT_CACHE_SIZE or _segment_annotations > _SEGMENT_CACHE_ANNOTATIONS:
            _segment_annotations -= len(_segment_groups.pop(next(iter(_segment_groups))))  # the oldest
    return groups


def _forget_segment_groups() -> None:
    global _segment_annotations
    with _segment_lock:
        _segment_groups.clear()
        _segment_annotations = 0


_inline_groups.cache_clear = _forget_segment_groups  # type: ignore[attr-defined]  # as for the lru caches


def _find_inline_groups(text: str, skips: tuple[tuple[int, int], ...]) -> Groups:
    found = []
    skip_starts = [start for start, _ in skips]
    opening, closing = text.find("{"), -1
    while opening != -1:
        if closing < opening:  # reuse the last '}' while it is still ahead: linear in the line
            closing = text.find("}", opening + 1)
            if closing == -1:
                break
        inner = text.find("{", opening + 1, closing)
        if inner != -1:  # nested braces: only the innermost group can be an annotation
            meant = _latex_charge_group(text, skips, skip_starts, opening, inner, closing)
            if meant is not None:  # {SO4^{2-}: ...}: an annotation written with a LaTeX charge
                found.append(meant)
                opening, closing = text.find("{", meant[1] + 1), meant[1]
                continue
            opening = inner
            continue
        if text.find("\n", opening, closing) != -1:  # a segment of several lines: no group spans two
            opening = text.find("{", opening + 1)
            continue
        parsed = _inline_candidate(text, skips, skip_starts, opening, closing)
        if parsed is not None:
            found.append((opening, closing, parsed))
            opening = text.find("{", closing + 1)
        else:
            opening = text.find("{", opening + 1)
    return tuple(found)


def _inline_candidate(
    text: str, skips: tuple[tuple[int, int], ...], skip_starts: list[int], opening: int, closing: int
) -> ParsedBody | None:
    if opening > 0 and text[opening - 1] in _NOT_BEFORE_ANNOTATION:
        return None
    if skips and _overlaps_skip(opening, closing, skips, skip_starts):
        return None
    body = text[opening + 1 : closing]
    if not (_begins_with_element(body[:8]) or starts_with_smiles(body[:32], quoted=False)):
        return near_miss_body(body) if body[:1].isalpha() else None
    parsed = parse_body(body[: MAX_BODY_CHARS + 1] if len(body) > MAX_BODY_CHARS else body)
    if not parsed.has_colon and parsed.errors and len(body) <= MAX_BODY_CHARS and not starts_with_smiles(body):
        return near_miss_body(body)  # some other use of braces, unless clearly meant as an annotation (smiles "...)
    return parsed


def _latex_charge_group(
    text: str, skips: tuple[tuple[int, int], ...], skip_starts: list[int], opening: int, inner: int, closing: int
) -> tuple[int, int, ParsedBody] | None:
    """(opening, outer closing, parse) when ``{...^{2-}...}`` is an annotation meant with a LaTeX charge."""
    if text[inner - 1] != "^" or (opening > 0 and text[opening - 1] in _NOT_BEFORE_ANNOTATION):
        return None
    outer = text.find("}", closing + 1, closing + 1 + NEAR_MISS_CHARS)  # bounded: linear on any line
    if outer == -1 or text.find("{", closing + 1, outer) != -1 or text.find("\n", opening, outer) != -1:
        return None
    if skips and _overlaps_skip(opening, outer, skips, skip_starts):
        return None
    parsed = near_miss_body(text[opening + 1 : outer])
    return (opening, outer, parsed) if parsed is not None else None


def _block_found(text: str, line: Span) -> Found | None:
    """The annotation on one line of a bonding block, if the line holds more than a comment."""
    body = _block_body(text[line.start : line.end])
    if body is None:
        return None
    lead, length, parsed = body
    return (line.start, line.end, line.start + lead, line.start + lead + length, parsed, "block")


@lru_cache(maxsize=_SEGMENT_CACHE_SIZE)
def _block_body(content: str) -> tuple[int, int, ParsedBody] | None:
    """(offset, length, parse) of the body of one bonding-block line: the line without its comment."""
    code = content[:_comment_start(content)]
    body = code.strip()
    if not body:
        return None
    return len(code) - len(code.lstrip()), len(body), parse_body(body[: MAX_BODY_CHARS + 1])


def _comment_start(line: str) -> int:
    """Where a bonding-block line's comment begins: a '#' at the start or after a space, outside a
    quoted SMILES (``HC#CH`` and ``smiles "C#N"`` use '#' as a triple bond); len(line) if none."""
    quoted = False
    for index, char in enumerate(line):
        if char == '"':
            quoted = not quoted
        elif char == "#" and not quoted and (index == 0 or line[index - 1] in " \t"):
            return index
    return len(line)
