"""Hover over an annotation: the lead's description of the species and its findings."""

from __future__ import annotations

import logging

from lsprotocol import types

from ..formats.drawing import angles_claimed, picture_markdown
from ..review.describe import hover_markdown  # the review layer writes all chemistry text
from .app import NoteServer
from .geometries import hover_lines


def renders_images(ls: NoteServer) -> bool:
    """Whether the client says it renders Markdown (LSP 3.16 ``general.markdown``) in hover.

    Clients that only accept Markdown text (and would show a data URI as text) do not send
    ``general.markdown``; they get the text alone.
    """
    capabilities = ls.client_capabilities
    general = getattr(capabilities, "general", None)
    hover = getattr(getattr(capabilities, "text_document", None), "hover", None)
    formats = getattr(hover, "content_format", None) or ()
    return getattr(general, "markdown", None) is not None and types.MarkupKind.Markdown in formats


def register(server: NoteServer) -> None:
    @server.feature(types.TEXT_DOCUMENT_HOVER)
    def hover(ls: NoteServer, params: types.HoverParams) -> types.Hover | None:
        held = ls.held(params.text_document.uri, around=params.position)
        if held is None or held.review is None:
            return None
        offset = held.index.offset(params.position)
        annotation = held.review.annotation_at(offset)
        if annotation is None:
            return None

        markdown = hover_markdown(held.review, annotation, offset)
        computed = hover_lines(ls, held.uri, [formula.written for formula in annotation.formulas])
        if computed:  # the calculation's geometry, "computing…" while it runs, or why it failed
            markdown = "\n\n".join(([markdown, "---"] if markdown else []) + computed)
        if not markdown:
            return None
        if ls.settings_for(params.text_document.uri)[0].hover_pictures and renders_images(ls):
            pictures = [picture_markdown(analysis, angles_claimed(annotation))
                        for analysis in held.review.analyses_of(annotation)]
            markdown = "\n\n".join([p for p in pictures if p] + [markdown])
        return types.Hover(
            contents=types.MarkupContent(kind=types.MarkupKind.Markdown, value=markdown),
            range=held.index.range(annotation.span),
        )
