"""What a review returns: findings with their fixes, in document offsets."""

from __future__ import annotations

from enum import Enum
from typing import NamedTuple

from ..notation.model import Span


class Severity(str, Enum):
    ERROR = "error"
    WARNING = "warning"
    INFORMATION = "information"
    HINT = "hint"


# Fix and Finding are named tuples, not dataclasses: a review places every finding of every
# annotation that moved, thousands in a large note, and a tuple is several times cheaper to make.
class Fix(NamedTuple):
    """Replace ``span`` of the document with ``replacement``."""

    title: str
    span: Span
    replacement: str


class Finding(NamedTuple):
    code: str  # the rule's stable kebab-case code
    severity: Severity
    message: str  # one line: the claim and the prediction
    span: Span
    formula: str  # the species as written ("" for errors outside any species)
    claim: str | None = None  # the claim as written, if the finding is about one
    fixes: tuple[Fix, ...] = ()

    def shifted(self, delta: int) -> "Finding":
        """The same finding ``delta`` characters further on, its fixes with it."""
        span = self.span
        moved = Span(span.start + delta, span.end + delta)
        fixes = self.fixes
        if fixes:  # a fix usually replaces just what the finding points at: the same Span, moved once
            fixes = tuple([
                Fix(fix.title, moved if fix.span is span else Span(fix.span.start + delta, fix.span.end + delta), fix.replacement)
                for fix in fixes
            ])
        return Finding(self.code, self.severity, self.message, moved, self.formula, self.claim, fixes)
