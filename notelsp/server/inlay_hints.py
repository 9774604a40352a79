"""Inlay hints: the predicted shape after each annotation (setting ``inlay_hints``)."""

from __future__ import annotations

from lsprotocol import types

from ..review.predictions import predicted_shape, written_shape
from .app import NoteServer


def register(server: NoteServer) -> None:
    @server.feature(types.TEXT_DOCUMENT_INLAY_HINT)
    def inlay_hints(ls: NoteServer, params: types.InlayHintParams) -> list[types.InlayHint]:
        held = ls.held(params.text_document.uri)
        if held is None or held.review is None or not ls.settings_for(params.text_document.uri)[0].inlay_hints:
            return []
        wanted = held.index.span(params.range)
        hints = []
        for annotation in held.review.annotations:
            if annotation.span.end < wanted.start or annotation.span.start > wanted.end or annotation.is_comparison:
                continue
            analyses = held.review.analyses_of(annotation) if annotation.formulas else ()
            shape = predicted_shape(analyses[0]) if analyses else None
            if shape is not None:
                hints.append(
                    types.InlayHint(
                        position=held.index.position(annotation.span.end),
                        label=f"→ {written_shape(shape)}",
                        kind=types.InlayHintKind.Type,
                        padding_left=True,
                    )
                )
        return hints
