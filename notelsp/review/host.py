"""The one owner of the analysis state: documents and what is derived from them.

An :class:`AnalysisHost` takes inputs (a document opened, edited by exact
ranges, closed; the settings that govern it; results computed outside the
rules) and hands out immutable :class:`Snapshot`s of the review.  Everything a
review leaves for the next one (findings per annotation text, findings at
their offsets, complete reviews, the last documents' Markdown blocks) lives
in the host's :class:`~notelsp.review.document.ReviewMemory`, so two hosts
share nothing and a fresh host is a fresh start.  Pure: the host reads no file
and no clock; the server and the command line read them and hand them in.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field, replace
from types import MappingProxyType
from typing import TYPE_CHECKING, Callable

from ..notation.model import Annotation, Span
from .document import DocumentKind, DocumentReview, ReviewMemory, review_around, review_text
from .findings import Finding
from .settings import Settings

if TYPE_CHECKING:  # only the type: computed results are an input
    from ..compute.result import ComputedSpecies

Edit = tuple[int, int, str]  # replace text[start:end] (code points) with the string
_EMPTY: Mapping = MappingProxyType({})


@dataclass(frozen=True, slots=True)
class OpenDocument:
    uri: str
    version: int | None
    text: str
    kind: DocumentKind


@dataclass(frozen=True)
class Snapshot:
    """One document's review as it stood: nothing in it changes after it is handed out."""

    document: OpenDocument
    settings: Settings
    review: DocumentReview
    checked: tuple[Finding, ...] = ()  # cross-check findings whose annotation is still there unchanged

    @property
    def findings(self) -> tuple[Finding, ...]:
        """The review's findings, then the cross-checks'."""
        return self.review.findings + self.checked if self.checked else self.review.findings

    def annotation_at(self, offset: int) -> Annotation | None:
        return self.review.annotation_at(offset)


@dataclass(frozen=True)
class _Inputs:  # replaced whole on every input, so a reader on another thread sees one consistent set
    document: OpenDocument
    settings: Settings = field(default_factory=Settings)
    computed: Mapping[str, "ComputedSpecies"] = field(default_factory=lambda: _EMPTY)
    checked: Mapping[str, tuple[Finding, ...]] = field(default_factory=lambda: _EMPTY)  # annotation text -> findings from its start


class AnalysisHost:
    """Takes edits, hands out snapshots; the only owner of the review path's state."""

    def __init__(self) -> None:
        self.memory = ReviewMemory()
        self._inputs: dict[str, _Inputs] = {}

    # --- inputs -----------------------------------------------------------------------

    def open(self, uri: str, version: int | None, text: str, kind: DocumentKind) -> None:
        previous = self._inputs.get(uri)
        if previous is None:
            self._inputs[uri] = _Inputs(OpenDocument(uri, version, text, kind))
        else:  # opened again (or read afresh): settings and computed results stay until changed
            self._inputs[uri] = replace(previous, document=OpenDocument(uri, version, text, kind))

    def apply_change(self, uri: str, version: int | None, edits: Iterable[Edit]) -> None:
        """Apply ``edits`` in order, each by code-point offsets into the text as the previous one left it."""
        inputs = self._inputs[uri]
        old = text = inputs.document.text
        prefix = suffix = len(text)  # unchanged at either end, counted in the text so far
        for start, end, new in edits:
            if not 0 <= start <= end <= len(text):
                raise ValueError(f"edit {start}..{end} outside a text of {len(text)} characters")
            prefix, suffix = min(prefix, start), min(suffix, len(text) - end)
            text = text[:start] + new + text[end:]
        limit = min(len(old), len(text))
        prefix = min(prefix, limit)
        suffix = min(suffix, limit - prefix)
        if text is not old:
            self.memory.blocks.expect_edit(old, text, prefix, suffix)
        self._inputs[uri] = replace(inputs, document=OpenDocument(uri, version, text, inputs.document.kind))

    def close(self, uri: str) -> None:
        self._inputs.pop(uri, None)

    def set_settings(self, uri: str, settings: Settings) -> None:
        if self._inputs[uri].settings != settings:
            self._inputs[uri] = replace(self._inputs[uri], settings=settings)

    def set_computed(self, uri: str, computed: Mapping[str, "ComputedSpecies"]) -> None:
        """Geometries computed outside the rules for the species the document names (keyed as written)."""
        self._inputs[uri] = replace(self._inputs[uri], computed=MappingProxyType(dict(computed)) if computed else _EMPTY)

    def set_checked(self, uri: str, checked: Mapping[str, tuple[Finding, ...]]) -> None:
        """Cross-check findings by annotation text, offsets from the annotation's start (dropped when the
        document closed meanwhile: a calculation may outlast it)."""
        if uri not in self._inputs:
            return
        self._inputs[uri] = replace(self._inputs[uri], checked=MappingProxyType(dict(checked)) if checked else _EMPTY)

    # --- readers ----------------------------------------------------------------------

    def uris(self) -> tuple[str, ...]:
        """The open documents."""
        return tuple(self._inputs)

    def document(self, uri: str) -> OpenDocument | None:
        inputs = self._inputs.get(uri)
        return None if inputs is None else inputs.document

    def settings(self, uri: str) -> Settings | None:
        inputs = self._inputs.get(uri)
        return None if inputs is None else inputs.settings

    def computed(self, uri: str) -> Mapping[str, "ComputedSpecies"]:
        inputs = self._inputs.get(uri)
        return _EMPTY if inputs is None else inputs.computed

    def checked(self, uri: str) -> Mapping[str, tuple[Finding, ...]]:
        inputs = self._inputs.get(uri)
        return _EMPTY if inputs is None else inputs.checked

    def snapshot(self, uri: str, more_time: Callable[[int], bool] | None = None,
                 around: Span | None = None) -> Snapshot | None:
        """The document's review, None when it is not open.

        ``more_time``: as for ``review_text`` (the review may stop early).  ``around``: only the
        annotations touching that span are reviewed (the complete review when one is at hand).
        """
        inputs = self._inputs.get(uri)
        if inputs is None:
            return None
        document = inputs.document
        computed = inputs.computed or None
        if around is None:
            review = review_text(document.text, document.kind, inputs.settings, more_time, computed, self.memory)
        else:
            review = review_around(document.text, document.kind, inputs.settings, around, computed, self.memory)
        return Snapshot(document, inputs.settings, review, _placed_checks(document.text, review, inputs.checked))

    def review(self, uri: str) -> DocumentReview | None:
        snapshot = self.snapshot(uri)
        return None if snapshot is None else snapshot.review

    def findings(self, uri: str) -> tuple[Finding, ...]:
        snapshot = self.snapshot(uri)
        return () if snapshot is None else snapshot.findings

    def annotation_at(self, uri: str, offset: int) -> Annotation | None:
        snapshot = self.snapshot(uri, around=Span(offset, offset))
        return None if snapshot is None else snapshot.annotation_at(offset)

    def review_text(self, text: str, kind: DocumentKind = "markdown", settings: Settings | None = None,
                    more_time: Callable[[int], bool] | None = None,
                    computed: Mapping[str, "ComputedSpecies"] | None = None) -> DocumentReview:
        """A text that is no open document (a file on disk, a notebook's cell), with this host's memory."""
        return review_text(text, kind, settings, more_time, computed, self.memory)


def _placed_checks(text: str, review: DocumentReview, checked: Mapping[str, tuple[Finding, ...]]) -> tuple[Finding, ...]:
    """The cross-check findings of each annotation still there unchanged, placed at it."""
    if not checked:
        return ()
    placed: list[Finding] = []
    for annotation in review.annotations:
        relative = checked.get(text[annotation.span.start : annotation.span.end])
        placed += [finding.shifted(annotation.span.start) for finding in relative or ()]
    return tuple(placed)
