"""Semantic tokens for annotations, so an editor can colour what the notation reads.

Standard token types of the LSP specification only, so every theme already has
a colour for them: a formula is a ``type`` (a species is what the claims are
about), and so is the atom a claim names (``C2`` in ``C2 trigonal planar``);
a claim's words are ``keyword``s (with ``is``/``has`` after an atom and the
``smiles`` marker), its numbers (angles, counts,
percentages, indices) are ``number``s, and the notation's punctuation (``:``,
``,``, ``vs``, ``<``, ``°`` ...) is ``operator``.  Only annotations are
tokenised; the rest of the note is left to the editor.  Whole documents and
ranges are served; both read the document's cached review.
"""

from __future__ import annotations

import bisect
import re
from collections.abc import Iterator

from lsprotocol import types

from ..notation.model import Annotation
from .app import NoteServer
from .positions import LineIndex

TOKEN_TYPES = ("type", "keyword", "number", "operator")
TYPE, KEYWORD, NUMBER, OPERATOR = range(len(TOKEN_TYPES))
LEGEND = types.SemanticTokensLegend(token_types=list(TOKEN_TYPES), token_modifiers=[])

# Inside a claim: numbers, words (letters, digits after a letter, hyphens, carets as in sp^2.5),
# and single punctuation marks.  Whitespace separates and is not a token.
_CLAIM_PIECES = re.compile(r"(?P<number>\d+(?:\.\d+)?)|(?P<word>[^\W\d_](?:[\w^-]*\w)?)|(?P<mark>[^\w\s])")
# Between formulas and claims (the body's own punctuation): "vs" and single marks.
_GLUE_PIECES = re.compile(r"\b(?P<word>vs)\b|\b(?P<keyword>(?i:smiles|is|has))\b|(?P<mark>[^\w\s])")


def _claim_tokens(text: str, start: int) -> Iterator[tuple[int, int, int]]:
    for match in _CLAIM_PIECES.finditer(text):
        kind = NUMBER if match.lastgroup == "number" else KEYWORD if match.lastgroup == "word" else OPERATOR
        yield start + match.start(), start + match.end(), kind


def _glue_tokens(text: str, start: int) -> Iterator[tuple[int, int, int]]:
    for match in _GLUE_PIECES.finditer(text):
        yield start + match.start(), start + match.end(), KEYWORD if match.lastgroup == "keyword" else OPERATOR


def annotation_tokens(annotation: Annotation, text: str) -> list[tuple[int, int, int]]:
    """(start, end, token type) in document offsets, in order, for one annotation's body."""
    parts = sorted([(f.span.start, f.span.end, TYPE) for f in annotation.formulas]
                   + [(c.span.start, c.span.end, KEYWORD) for c in annotation.claims]
                   + [(c.atom_span.start, c.atom_span.end, TYPE) for c in annotation.claims if c.atom_span is not None])
    tokens: list[tuple[int, int, int]] = []
    cursor = annotation.body.start
    for start, end, kind in parts:
        if start < cursor:
            continue  # overlapping parts (not expected): keep the first
        tokens += _glue_tokens(text[cursor:start], cursor)
        if kind == TYPE:
            tokens.append((start, end, TYPE))
        else:
            tokens += _claim_tokens(text[start:end], start)
        cursor = end
    tokens += _glue_tokens(text[cursor:annotation.body.end], cursor)
    return tokens


def encode(tokens: list[tuple[int, int, int]], index: LineIndex) -> list[int]:
    """LSP's relative encoding: (line delta, start delta, length, type, modifiers) per token."""
    data: list[int] = []
    previous_line = previous_character = 0
    for start, end, kind in tokens:
        line, character = index.line_character(start)
        end_line, end_character = index.line_character(end)
        if end_line != line or end <= start:
            continue  # a token never spans lines (annotations do not); never an empty one
        delta_character = character - previous_character if line == previous_line else character
        data += (line - previous_line, delta_character, end_character - character, kind, 0)
        previous_line, previous_character = line, character
    return data


def _tokens(held, span: tuple[int, int] | None = None) -> types.SemanticTokens:
    """The tokens of a held document's annotations, all or those overlapping ``span`` (offsets)."""
    if held is None or held.review is None:
        return types.SemanticTokens(data=[])
    annotations = held.review.annotations
    if span is not None:
        starts = [a.span.start for a in annotations]
        first = max(bisect.bisect_right(starts, span[0]) - 1, 0)
        last = bisect.bisect_left(starts, span[1])
        annotations = [a for a in annotations[first:last] if a.span.end > span[0]]
    tokens = [token for annotation in annotations for token in annotation_tokens(annotation, held.text)]
    return types.SemanticTokens(data=encode(tokens, held.index))


def register(server: NoteServer) -> None:
    @server.feature(types.TEXT_DOCUMENT_SEMANTIC_TOKENS_FULL, LEGEND)
    def full(ls: NoteServer, params: types.SemanticTokensParams) -> types.SemanticTokens:
        return _tokens(ls.held(params.text_document.uri))

    @server.feature(types.TEXT_DOCUMENT_SEMANTIC_TOKENS_RANGE, LEGEND)
    def in_range(ls: NoteServer, params: types.SemanticTokensRangeParams) -> types.SemanticTokens:
        held = ls.held(params.text_document.uri)
        if held is None:
            return types.SemanticTokens(data=[])
        span = held.index.span(params.range)
        return _tokens(held, (span.start, span.end))
