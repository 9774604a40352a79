"""Find every annotation in a document and place its parse at the right offsets.

A brace group is an annotation when it begins with an element symbol (or '['
for a bracketed ion) and either contains ':' or reads cleanly as a formula.
Everything else in braces (``{a, b}``, ``{#id .class}``, LaTeX arguments) is
left alone.  Bodies are parsed through the position-free cache of
:func:`notelsp.notation.transform.parse_body` and shifted into place.
"""

from __future__ import annotations

from bisect import bisect_right
from functools import lru_cache
from typing import Literal

from .. import elements
from .markdown import MarkdownStructure, Segment, line_starts, markdown_structure
from .model import Annotation, ParsedBody, ScannedDocument, Span
from .transform import MAX_BODY_CHARS, parse_body

DocumentKind = Literal["markdown", "text"]

# A brace right after these belongs to something else: \frac{a}, x_{i}, x^{2}, }{.
_NOT_BEFORE_ANNOTATION = set("\\_^}$") | set("abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789")

# Placed annotations are remembered by their exact place, so the part of an edited
# document before the edit costs nothing to re-scan (the part after it has moved and
# is placed again from the position-free parse cache).  About two large documents' worth.
_PLACED_CACHE_SIZE = 8192


def scan(text: str, kind: DocumentKind = "markdown") -> ScannedDocument:
    """Every annotation in ``text``, with code-point offsets into it."""
    if kind == "markdown":
        return scan_with_structure(text, markdown_structure(text))
    return scan_with_structure(text, MarkdownStructure(_text_segments(text), ()))


def scan_with_structure(text: str, structure: MarkdownStructure) -> ScannedDocument:
    """The annotations of ``text`` where ``structure`` says they may stand (tests pass a reference structure)."""
    segments, bonding_lines = structure.segments, structure.bonding_lines
    annotations = [annotation for segment in segments for annotation in _segment_annotations(segment)]
    annotations.extend(
        annotation for line in bonding_lines if (annotation := _block_annotation(text[line.start : line.end], line))
    )
    annotations.sort(key=lambda annotation: annotation.span.start)
    return ScannedDocument(tuple(annotations))


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


@lru_cache(maxsize=_PLACED_CACHE_SIZE)
def _segment_annotations(segment: Segment) -> tuple[Annotation, ...]:
    return tuple(_inline_annotations(segment))


def _inline_annotations(segment: Segment) -> list[Annotation]:
    text, found = segment.text, []
    skip_starts = [start for start, _ in segment.skips]
    opening, closing = text.find("{"), -1
    while opening != -1:
        if closing < opening:  # reuse the last '}' while it is still ahead: linear in the line
            closing = text.find("}", opening + 1)
            if closing == -1:
                break
        inner = text.find("{", opening + 1, closing)
        if inner != -1:  # nested braces: only the innermost group can be an annotation
            opening = inner
            continue
        annotation = _inline_candidate(segment, opening, closing, skip_starts)
        if annotation is not None:
            found.append(annotation)
            opening = text.find("{", closing + 1)
        else:
            opening = text.find("{", opening + 1)
    return found


def _inline_candidate(segment: Segment, opening: int, closing: int, skip_starts: list[int]) -> Annotation | None:
    text, skips = segment.text, segment.skips
    if opening > 0 and text[opening - 1] in _NOT_BEFORE_ANNOTATION:
        return None
    if skips and _overlaps_skip(opening, closing, skips, skip_starts):
        return None
    body = text[opening + 1 : closing]
    if not _begins_with_element(body[:8]):
        return None
    parsed = parse_body(body[: MAX_BODY_CHARS + 1] if len(body) > MAX_BODY_CHARS else body)
    if not parsed.has_colon and parsed.errors and len(body) <= MAX_BODY_CHARS:
        return None  # not a formula on its own: some other use of braces
    start = segment.start + opening
    return _placed(parsed, Span(start, segment.start + closing + 1), Span(start + 1, segment.start + closing), "inline")


@lru_cache(maxsize=_PLACED_CACHE_SIZE)
def _block_annotation(content: str, line: Span) -> Annotation | None:
    """The annotation on one line of a bonding block (``content`` is the line's text)."""
    code = content.split("#", 1)[0]
    if not code.strip():
        return None
    lead = len(code) - len(code.lstrip())
    body = code.strip()
    body_start = line.start + lead
    parsed = parse_body(body[: MAX_BODY_CHARS + 1])
    return _placed(parsed, line, Span(body_start, body_start + len(body)), "block")


def _placed(parsed: ParsedBody, span: Span, body: Span, form: Literal["inline", "block"]) -> Annotation:
    return Annotation(span=span, body=body, parsed=parsed, form=form)
