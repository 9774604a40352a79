"""Review a whole document: scan it, analyse each species, run the rules.

Pure: text in, a :class:`DocumentReview` out.  The findings of one annotation
depend only on its own text and the settings, so they are cached by that text
(position-free) and shifted into place; a species is analysed once per
process by the analyser's own cache.
"""

from __future__ import annotations

from bisect import bisect_left, bisect_right
from dataclasses import dataclass
from functools import cache, cached_property, lru_cache
from typing import Any, Literal

from ..notation import scan
from ..notation.model import Annotation, ScannedDocument, Span
from ..positions import LineIndex
from .findings import Finding, Fix
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
    def _annotation_starts(self) -> list[int]:
        return [annotation.span.start for annotation in self.scanned.annotations]

    @cached_property
    def _finding_starts(self) -> list[int]:
        return [finding.span.start for finding in self.findings]

    @cached_property
    def _longest_finding(self) -> int:
        return max((finding.span.end - finding.span.start for finding in self.findings), default=0)

    def annotation_at(self, offset: int) -> Annotation | None:
        """The first annotation (in document order) whose span holds ``offset``, ends included."""
        annotations = self.scanned.annotations
        # Annotations are sorted by start and do not overlap: only the last two starting at or before
        # ``offset`` can hold it, and of those the earlier wins when both touch it.
        last = bisect_right(self._annotation_starts, offset) - 1
        for annotation in annotations[max(last - 1, 0) : last + 1]:
            if annotation.span.start <= offset <= annotation.span.end:
                return annotation
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
    scanned = scan(text, kind)
    findings: list[Finding] = []
    for annotation in scanned.annotations:
        findings.extend(review_annotation(text, annotation, settings))
    for error in scanned.errors:
        findings.extend(_notation_error_findings(error, settings))
    findings.sort(key=lambda f: (f.span.start, f.span.end, f.code))
    return DocumentReview(text, scanned, tuple(findings))


def forget_cached_results() -> None:
    """Empty the review path's result caches (parses, placed annotations, findings, remembered documents).

    For tests and benchmarks that need a review computed afresh; species analyses keep their own cache.
    """
    from ..notation import markdown, scanner, transform

    caches = (_cached_review, _placed_review, transform.parse_body, scanner._segment_annotations, scanner._block_annotation)
    for cached in caches:
        cached.cache_clear()
    markdown.forget_documents()


def review_annotation(text: str, annotation: Annotation, settings: Settings) -> tuple[Finding, ...]:
    """Findings of one annotation, from the position-free cache."""
    start = annotation.span.start
    return _placed_review(text[start : annotation.span.end], start, annotation.form, settings, _Keyed(annotation))


# Findings remembered at their exact place too: in an edited document everything before
# the edit is found here unshifted.  About two large documents' worth of annotations.
@lru_cache(maxsize=8192)
def _placed_review(source: str, start: int, form: str, settings: Settings, keyed: "_Keyed") -> tuple[Finding, ...]:
    relative = _cached_review(source, form, settings, keyed)
    return tuple(_shift(finding, start) for finding in relative)


class _Keyed:
    """Carries the annotation into the cached call without being part of its key."""

    __slots__ = ("annotation",)

    def __init__(self, annotation: Annotation) -> None:
        self.annotation = annotation

    def __hash__(self) -> int:
        return 0

    def __eq__(self, other: object) -> bool:
        return isinstance(other, _Keyed)


@lru_cache(maxsize=20_000)
def _cached_review(source: str, form: str, settings: Settings, keyed: _Keyed) -> tuple[Finding, ...]:
    annotation = keyed.annotation
    rules = _chemistry()[1]
    analyses = analyses_of(annotation)
    found: list[Finding] = []
    targets = [None, *annotation.claims]
    for claim in targets:
        for rule in rules.rules_for(claim):
            if not settings.enabled(rule.code):
                continue
            context = rules.RuleContext(rule, annotation, claim, analyses, settings)
            found.extend(rule.check(context))
    return tuple(_shift(finding, -annotation.span.start) for finding in found)


def _notation_error_findings(error: Any, settings: Settings) -> list[Finding]:
    rule = _chemistry()[1].RULES.get(error.code)
    if rule is None or not settings.enabled(rule.code):
        return []
    fixes = (Fix(f"Replace with '{error.suggestion}'", error.span, error.suggestion),) if error.suggestion else ()
    return [Finding(rule.code, settings.severity_of(rule), error.message, error.span, "", None, fixes)]


def _shift(finding: Finding, delta: int) -> Finding:
    if delta == 0:
        return finding
    fixes = tuple(Fix(f.title, f.span.shifted(delta), f.replacement) for f in finding.fixes)
    return Finding(
        finding.code,
        finding.severity,
        finding.message,
        finding.span.shifted(delta),
        finding.formula,
        finding.claim,
        fixes,
    )
