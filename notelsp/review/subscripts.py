"""The "convert to subscripts" fix: ``ClF3`` -> ``ClF₃`` (counts only, never charges)."""

from __future__ import annotations

from ..notation.model import Atom, Formula, Group, Span
from .findings import Fix

_SUBSCRIPT = str.maketrans("0123456789", "₀₁₂₃₄₅₆₇₈₉")


def _count_spans(text: str, parts: tuple[Atom | Group, ...]) -> list[Span]:
    """The spans of the ASCII count digits that end each atom or group."""
    spans: list[Span] = []
    for part in parts:
        if isinstance(part, Group):
            spans.extend(_count_spans(text, part.parts))
        written = text[part.span.start : part.span.end]
        digits = len(written) - len(written.rstrip("0123456789"))
        if digits:
            spans.append(Span(part.span.end - digits, part.span.end))
    return spans


def subscript_fix(text: str, formula: Formula) -> Fix | None:
    """One fix rewriting the formula's counts as subscript digits; None when there are none."""
    spans = _count_spans(text, formula.parts)
    if not spans:
        return None
    start, end = min(s.start for s in spans), max(s.end for s in spans)
    written = list(text[start:end])
    for span in spans:
        for offset in range(span.start, span.end):
            written[offset - start] = text[offset].translate(_SUBSCRIPT)
    return Fix("Convert counts to subscripts", Span(start, end), "".join(written))
