"""What a review returns: findings with their fixes, in document offsets."""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum

from ..notation.model import Span


class Severity(str, Enum):
    ERROR = "error"
    WARNING = "warning"
    INFORMATION = "information"
    HINT = "hint"


@dataclass(frozen=True, slots=True)
class Fix:
    """Replace ``span`` of the document with ``replacement``."""

    title: str
    span: Span
    replacement: str


@dataclass(frozen=True, slots=True)
class Finding:
    code: str  # the rule's stable kebab-case code
    severity: Severity
    message: str  # one line: the claim and the prediction
    span: Span
    formula: str  # the species as written ("" for errors outside any species)
    claim: str | None = None  # the claim as written, if the finding is about one
    fixes: tuple[Fix, ...] = ()
