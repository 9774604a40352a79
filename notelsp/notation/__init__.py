"""The notation: find annotations in a document and read what they say.

``scan(text, kind)`` finds every annotation (Markdown structure is respected
for ``kind="markdown"``); ``parse_formula(text)`` reads one formula.
"""

from .model import Annotation, Formula, NotationError, ScannedDocument, Span
from .scanner import scan
from .transform import NotationSyntaxError, parse_body, parse_formula

__all__ = [
    "Annotation",
    "Formula",
    "NotationError",
    "NotationSyntaxError",
    "ScannedDocument",
    "Span",
    "parse_body",
    "parse_formula",
    "scan",
]
