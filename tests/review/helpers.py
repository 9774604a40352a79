"""Shared helpers for the rule tests: review a note, pick findings, locate a claim."""

from __future__ import annotations

from notelsp.notation.model import Span
from notelsp.review.document import DocumentReview, review_text
from notelsp.review.findings import Finding
from notelsp.review.rules import RULES


def review(text: str) -> DocumentReview:
    return review_text(text, "markdown")


def span_of(text: str, written: str, after: int = 0) -> Span:
    """The span of ``written`` in ``text`` (its first occurrence at or after ``after``)."""
    start = text.index(written, after)
    return Span(start, start + len(written))


def with_code(review_or_text: DocumentReview | str, code: str) -> list[Finding]:
    found = review(review_or_text) if isinstance(review_or_text, str) else review_or_text
    return [f for f in found.findings if f.code == code]


def assert_flagged(text: str, written: str, code: str, *in_message: str, after: int = 0) -> Finding:
    """Exactly one ``code`` finding in the note, on ``written``, at the rule's default severity,
    whose message names each of ``in_message``; returns it."""
    assert code in RULES, code
    found = with_code(text, code)
    assert len(found) == 1, [f.message for f in found]
    finding = found[0]
    assert finding.span == span_of(text, written, after), (text[finding.span.start:finding.span.end], written)
    assert finding.severity is RULES[code].severity
    for words in in_message:
        assert words in finding.message, (words, finding.message)
    return finding


def assert_clean(text: str) -> None:
    """No finding at all in the note."""
    found = review(text).findings
    assert not found, [(f.code, f.message) for f in found]


def fixed(text: str, finding: Finding, which: int = 0) -> str:
    fix = finding.fixes[which]
    return text[: fix.span.start] + fix.replacement + text[fix.span.end :]

