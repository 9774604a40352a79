"""Review a whole document: scan it, analyse each species, run the rules.

Pure: text in, a :class:`DocumentReview` out.  The findings of one annotation
depend only on its own text and the settings, so they are cached by that text
(position-free) and shifted into place; a species is analysed once per
process by the analyser's own cache.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property, lru_cache
from typing import Any, Literal

from ..chem import analyse
from ..notation import scan
from ..notation.model import Annotation, ScannedDocument, Span
from ..positions import LineIndex
from .findings import Finding, Fix
from .rules import RuleContext, rules_for
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

    def annotation_at(self, offset: int) -> Annotation | None:
        for annotation in self.scanned.annotations:
            if annotation.span.start <= offset <= annotation.span.end:
                return annotation
        return None

    def findings_in(self, span: Span) -> tuple[Finding, ...]:
        """Findings whose range overlaps ``span`` (touching counts, so empty ranges are found)."""
        return tuple(f for f in self.findings if f.span.start <= span.end and span.start <= f.span.end)


def kind_of_path(path: str) -> DocumentKind:
    return "text" if path.lower().endswith(".txt") else "markdown"


def analyses_of(annotation: Annotation) -> tuple[Any, ...]:
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


def review_annotation(text: str, annotation: Annotation, settings: Settings) -> tuple[Finding, ...]:
    """Findings of one annotation, from the position-free cache."""
    start = annotation.span.start
    relative = _cached_review(text[start : annotation.span.end], annotation.form, settings, _Keyed(annotation))
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
    analyses = analyses_of(annotation)
    found: list[Finding] = []
    targets = [None, *annotation.claims]
    for claim in targets:
        for rule in rules_for(claim):
            if not settings.enabled(rule.code):
                continue
            context = RuleContext(rule, annotation, claim, analyses, settings)
            found.extend(rule.check(context))
    return tuple(_shift(finding, -annotation.span.start) for finding in found)


def _notation_error_findings(error: Any, settings: Settings) -> list[Finding]:
    from .rules import RULES

    rule = RULES.get(error.code)
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
