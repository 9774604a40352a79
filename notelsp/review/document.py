"""Review a whole document: scan it, analyse each species, run the rules.

Pure: text in, a :class:`DocumentReview` out.  The findings of one annotation
depend only on its own text and the settings, so they are cached by that text
(position-free) and shifted into place; a species is analysed once per
process by the analyser's own cache.
"""

from __future__ import annotations

from bisect import bisect_left, bisect_right
from dataclasses import dataclass
from functools import cache, cached_property
from typing import Any, Literal

from ..notation import scan
from ..notation.model import Annotation, Found, ScannedDocument, Span, annotation_of
from ..positions import LineIndex
from .findings import Finding
from .settings import Settings

DocumentKind = Literal["markdown", "text"]


@dataclass(frozen=True)
class DocumentReview:
    text: str
    scanned: ScannedDocument
    findings: tuple[Finding, ...]

    @cached_property
    def line_index(self) -> LineIndex:
        return LineIndex(self.text)

    @property
    def annotations(self) -> tuple[Annotation, ...]:
        return self.scanned.annotations

    def analyses_of(self, annotation: Annotation) -> tuple[Any, ...]:
        return analyses_of(annotation)

    @cached_property
    def _finding_starts(self) -> list[int]:
        return [finding.span.start for finding in self.findings]

    @cached_property
    def _longest_finding(self) -> int:
        return max((finding.span.end - finding.span.start for finding in self.findings), default=0)

    def annotation_at(self, offset: int) -> Annotation | None:
        """The first annotation (in document order) whose span holds ``offset``, ends included."""
        found = self.scanned.found
        # Annotations are sorted by start and do not overlap: only the last two starting at or before
        # ``offset`` can hold it, and of those the earlier wins when both touch it.
        last = bisect_right(self.scanned.starts, offset) - 1
        for index in range(max(last - 1, 0), last + 1):
            if found[index][0] <= offset <= found[index][1]:
                return self.scanned.annotation(index)  # only this one is made, not all of them
        return None

    def findings_in(self, span: Span) -> tuple[Finding, ...]:
        """Findings whose range overlaps ``span`` (touching counts, so empty ranges are found)."""
        # Findings are sorted by start; none is longer than the longest, which bounds where to look.
        first = bisect_left(self._finding_starts, span.start - self._longest_finding)
        stop = bisect_right(self._finding_starts, span.end)
        return tuple(f for f in self.findings[first:stop] if f.span.start <= span.end and span.start <= f.span.end)


def kind_of_path(path: str) -> DocumentKind:
    return "text" if path.lower().endswith(".txt") else "markdown"


@cache
def _chemistry() -> Any:
    """The analyser and the rules, imported once on first use (numpy and the isomer tables
    are not needed to start a server, only to review)."""
    from .. import chem
    from . import rules

    return chem, rules


def analyses_of(annotation: Annotation) -> tuple[Any, ...]:
    analyse = _chemistry()[0].analyse
    return tuple(analyse(formula) for formula in annotation.formulas)


def review_text(text: str, kind: DocumentKind = "markdown", settings: Settings | None = None) -> DocumentReview:
    settings = settings or Settings()
    rules = _chemistry()[1]
    reviewed = _reviewed_length(text, rules.notation.MAX_REVIEWED_CHARS)
    scanned = scan(text if reviewed == len(text) else text[:reviewed], kind)
    reviews, placed = _reviews_for(settings)
    findings: list[Finding] = []
    for found in scanned.found:
        start, end, _, _, _, form = found
        source = text[start:end]
        relative = reviews.get((source, form))
        if relative is None:
            if len(reviews) >= _REVIEWS_LIMIT:  # a note of more distinct annotations than the cap
                reviews.clear()
            relative = reviews[(source, form)] = _review_relative(_relative_annotation(found), settings)
        if relative:  # most annotations have no findings: nothing to place
            key = (source, form, start)
            here = placed.get(key)
            if here is None:
                if len(placed) >= _REVIEWS_LIMIT:
                    placed.clear()
                here = placed[key] = tuple([finding.shifted(start) for finding in relative])
            findings.extend(here)
    # Each annotation's findings are sorted and lie inside it, and annotations neither overlap
    # nor touch: in document order the findings are sorted already.
    whole_note = rules.whole_note_findings(text, reviewed, settings)
    if whole_note:
        findings.extend(whole_note)
        findings.sort(key=_ORDER)
    return DocumentReview(text, scanned, tuple(findings))


def _ORDER(finding: Finding) -> tuple[int, int, str]:
    return finding.span.start, finding.span.end, finding.code


def _reviewed_length(text: str, limit: int) -> int:
    """How much of ``text`` is reviewed: all of it, or up to the last line break within ``limit``."""
    if len(text) <= limit:
        return len(text)
    line_break = text.rfind("\n", 0, limit)
    return line_break + 1 if line_break > 0 else limit


# The findings of each annotation text (offsets from the annotation's start), per settings.
# An annotation's findings depend only on its own text, its form and the settings.  Beside
# them, the same findings placed at an offset: after an edit, the annotations before it are
# where they were, and their findings are taken as they are.
_REVIEWS_LIMIT = 20_000
Relative = dict[tuple[str, str], tuple[Finding, ...]]
Placed = dict[tuple[str, str, int], tuple[Finding, ...]]
_reviews: dict[Settings, tuple[Relative, Placed]] = {}


_SETTINGS_LIMIT = 8  # settings change rarely; a few sets are plenty


def _reviews_for(settings: Settings) -> tuple[Relative, Placed]:
    """The caches for ``settings``; each is emptied when full (edits leave findings at old offsets
    behind, and a long session types ever new annotations: both are cheap to compute again)."""
    reviews = _reviews.get(settings)
    if reviews is None:
        if len(_reviews) >= _SETTINGS_LIMIT:
            _reviews.clear()
        reviews = _reviews[settings] = ({}, {})
    return reviews


def forget_placed_results() -> None:
    """Empty only the caches of results at positions (placed findings)."""
    for _, placed in list(_reviews.values()):
        placed.clear()


def forget_cached_results() -> None:
    """Empty the review path's result caches (parses, line scans, findings, remembered documents).

    For tests and benchmarks that need a review computed afresh; species analyses keep their own cache.
    """
    from ..notation import markdown, markdown_blocks, scanner, transform

    _reviews.clear()
    for cached in (transform.parse_body, scanner._inline_groups, scanner._block_body, markdown_blocks._paragraph_pieces):
        cached.cache_clear()
    markdown.forget_documents()


def _relative_annotation(found: Found) -> Annotation:
    """The annotation with offsets counted from its own start (as if it were the whole text)."""
    start, end, body_start, body_end, parsed, form = found
    return annotation_of((0, end - start, body_start - start, body_end - start, parsed, form))


def _review_relative(annotation: Annotation, settings: Settings) -> tuple[Finding, ...]:
    """Run every enabled rule on one annotation (placed as if it were the whole text)."""
    rules = _chemistry()[1]
    analyses = analyses_of(annotation)
    found: list[Finding] = []
    for claim in (None, *annotation.claims):
        for rule in rules.rules_for(claim):
            if settings.enabled(rule.code):
                found.extend(rule.check(rules.RuleContext(rule, annotation, claim, analyses, settings)))
    return tuple(sorted(found, key=_ORDER))
