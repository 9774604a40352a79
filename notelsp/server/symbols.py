"""Document symbols: one per annotated species, with its predicted shape as detail.

At most ``MAX_DOCUMENT_SYMBOLS`` are listed (a note of 100,000 annotations
would otherwise send tens of megabytes); when the outline stops early, a last
symbol says so at the first annotation left out.
"""

from __future__ import annotations

from lsprotocol import types

from ..review.predictions import predicted_shape, written_shape
from .app import HeldDocument, NoteServer

MAX_DOCUMENT_SYMBOLS = 1_000


def _symbol(held: HeldDocument, annotation) -> types.DocumentSymbol:
    analyses = held.review.analyses_of(annotation)
    shape = predicted_shape(analyses[0]) if analyses and not annotation.is_comparison else None
    return types.DocumentSymbol(
        name=" vs ".join(f.text for f in annotation.formulas),
        detail=written_shape(shape) if shape else None,
        kind=types.SymbolKind.Struct,
        range=held.index.range(annotation.span),
        selection_range=held.index.range(annotation.formulas[0].span),
    )


def _stopped_here(held: HeldDocument, annotation, left: int) -> types.DocumentSymbol:
    where = held.index.range(annotation.span)
    return types.DocumentSymbol(
        name=f"… the outline stops at {MAX_DOCUMENT_SYMBOLS:,} species",
        detail=f"up to {left:,} more annotations from here are not listed",
        kind=types.SymbolKind.Null,
        range=where,
        selection_range=where,
    )


def document_symbols(held: HeldDocument) -> list[types.DocumentSymbol]:
    scanned = held.review.scanned
    found: list[types.DocumentSymbol] = []
    for index in range(len(scanned.found)):
        annotation = scanned.annotation(index)  # made one at a time: the rest of a long note is never built
        if not annotation.formulas:
            continue
        if len(found) == MAX_DOCUMENT_SYMBOLS:
            found.append(_stopped_here(held, annotation, len(scanned.found) - index))
            break
        found.append(_symbol(held, annotation))
    return found


def register(server: NoteServer) -> None:
    @server.feature(types.TEXT_DOCUMENT_DOCUMENT_SYMBOL)
    def symbols(ls: NoteServer, params: types.DocumentSymbolParams) -> list[types.DocumentSymbol]:
        held = ls.held(params.text_document.uri)
        if held is None or held.review is None:
            return []
        return document_symbols(held)
