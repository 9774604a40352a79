"""Render a set of reviewed files for the terminal, as JSON or as SARIF 2.1.0.

These are translators at the edge: they read findings and never decide any.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..review.document import DocumentReview
from ..notation.model import Span


@dataclass(frozen=True)
class ReviewedFile:
    path: str  # as the user named it (relative paths stay relative)
    review: DocumentReview

    def location(self, span: Span) -> tuple[int, int, int, int]:
        """1-based (line, column, end_line, end_column) in code points; end is exclusive."""
        index = self.review.line_index
        line, column = index.line_col(span.start)
        end_line, end_column = index.line_col(span.end)
        return line + 1, column + 1, end_line + 1, end_column + 1

    def cautions(self) -> list[tuple[str, str]]:
        """(formula, caution) for every hazardous species in the file, once each."""
        seen: dict[tuple[str, str], None] = {}
        for annotation in self.review.annotations:
            for analysis in self.review.analyses_of(annotation):
                for caution in getattr(analysis, "cautions", ()):
                    seen.setdefault((analysis.formula, caution), None)
        return list(seen)
