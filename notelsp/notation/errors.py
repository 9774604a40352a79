"""The codes a :class:`~notelsp.notation.model.NotationError` can carry, each with what it means.

The notation layer is the only producer of these codes; each is also a rule of
:mod:`notelsp.review.rules.notation` (which reports the errors and documents
them at length), so settings can disable one or change its severity.  Code
that makes a ``NotationError`` names its code through these constants, never
as a string literal.
"""

from __future__ import annotations

UNKNOWN_CLAIM = "unknown-claim"
UNKNOWN_ELEMENT = "unknown-element"
ANNOTATION_NOT_READ = "annotation-not-read"
MALFORMED_FORMULA = "malformed-formula"
MALFORMED_CLAIM = "malformed-claim"
IMPOSSIBLE_COUNT = "impossible-count"
FORMULA_TOO_LARGE = "formula-too-large"

# code -> one line on what it means (the rule's docstring says more)
NOTATION_ERROR_CODES: dict[str, str] = {
    UNKNOWN_CLAIM: "a claim whose words the notation does not know",
    UNKNOWN_ELEMENT: "an element symbol that names no element",
    ANNOTATION_NOT_READ: "a brace group meant as an annotation that does not read as one (case, LaTeX charge)",
    MALFORMED_FORMULA: "a formula that cannot be read (stray character, unclosed bracket, zero count)",
    MALFORMED_CLAIM: "a claim of known words in a form that is not (an angle without a value, an empty claim)",
    IMPOSSIBLE_COUNT: "a number no species can have (negative lone pairs, an angle above 180°)",
    FORMULA_TOO_LARGE: "a formula, SMILES or annotation beyond the bounds the tool analyses",
}
