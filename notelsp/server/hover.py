"""Hover over an annotation: the lead's description of the species and its findings."""

from __future__ import annotations

import logging

from lsprotocol import types

from ..review.describe import hover_markdown  # the review layer writes all chemistry text
from .app import NoteServer

log = logging.getLogger("notelsp.server")


def register(server: NoteServer) -> None:
    @server.feature(types.TEXT_DOCUMENT_HOVER)
    def hover(ls: NoteServer, params: types.HoverParams) -> types.Hover | None:
        held = ls.held(params.text_document.uri)
        if held is None or held.review is None:
            return None
        offset = held.index.offset(params.position)
        annotation = held.review.annotation_at(offset)
        if annotation is None:
            return None

        markdown = hover_markdown(held.review, annotation, offset)
        if not markdown:
            return None
        return types.Hover(
            contents=types.MarkupContent(kind=types.MarkupKind.Markdown, value=markdown),
            range=held.index.range(annotation.span),
        )
