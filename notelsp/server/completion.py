"""Completion inside an annotation: element symbols in the formula, claim words after the colon."""

from __future__ import annotations

from lsprotocol import types

from ..notation.model import Span
from ..review.vocabulary import place_in_annotation, word_start, words_for
from .app import NoteServer

_KIND = {
    "element": types.CompletionItemKind.Constant,
    "shape": types.CompletionItemKind.EnumMember,
    "claim": types.CompletionItemKind.Keyword,
}


def register(server: NoteServer) -> None:
    @server.feature(types.TEXT_DOCUMENT_COMPLETION, types.CompletionOptions(trigger_characters=["{", ":", ",", " "]))
    def complete(ls: NoteServer, params: types.CompletionParams) -> types.CompletionList | None:
        held = ls.held(params.text_document.uri)
        if held is None or not ls.is_reviewed(held.uri):
            return None
        offset = held.index.offset(params.position)
        place = place_in_annotation(held.text, offset)
        if place is None:
            return None
        # replace what was typed of the word, so several-word claims complete as one
        typed = held.index.range(Span(word_start(held.text, offset, place), offset))
        items = [
            types.CompletionItem(label=w.label, detail=w.detail, kind=_KIND[w.kind], filter_text=w.label,
                                 text_edit=types.TextEdit(range=typed, new_text=w.label))
            for w in words_for(place)
        ]
        return types.CompletionList(is_incomplete=False, items=items)
