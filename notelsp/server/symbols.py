"""Document symbols: one per annotated species, with its predicted shape as detail."""

from __future__ import annotations

from lsprotocol import types

from ..review.predictions import predicted_shape, written_shape
from .app import NoteServer


def register(server: NoteServer) -> None:
    @server.feature(types.TEXT_DOCUMENT_DOCUMENT_SYMBOL)
    def symbols(ls: NoteServer, params: types.DocumentSymbolParams) -> list[types.DocumentSymbol]:
        held = ls.held(params.text_document.uri)
        if held is None or held.review is None:
            return []
        found = []
        for annotation in held.review.annotations:
            if not annotation.formulas:
                continue
            analyses = held.review.analyses_of(annotation)
            shape = predicted_shape(analyses[0]) if analyses and not annotation.is_comparison else None
            formula = annotation.formulas[0]
            found.append(
                types.DocumentSymbol(
                    name=" vs ".join(f.text for f in annotation.formulas),
                    detail=written_shape(shape) if shape else None,
                    kind=types.SymbolKind.Struct,
                    range=held.index.range(annotation.span),
                    selection_range=held.index.range(formula.span),
                )
            )
        return found
