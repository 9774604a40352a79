"""Rules for problems in the notation itself (reported by the scanner).

One rule per code of :mod:`notelsp.notation.errors`; each reports the notation
errors of its code as they are.
"""

from __future__ import annotations

from collections.abc import Iterator

from ...notation.errors import (
    ANNOTATION_NOT_READ,
    FORMULA_TOO_LARGE,
    IMPOSSIBLE_COUNT,
    MALFORMED_CLAIM,
    MALFORMED_FORMULA,
    UNKNOWN_CLAIM,
    UNKNOWN_ELEMENT,
)
from ...notation.model import NotationError, Span
from ..findings import Finding, Fix, Severity
from . import DocumentContext, RuleContext, rule


def _errors_with_code(context: RuleContext) -> Iterator[Finding]:
    for error in context.annotation.errors:
        if error.code == context.rule.code:
            yield _as_finding(context, error)


def _as_finding(context: RuleContext, error: NotationError) -> Finding:
    fixes: tuple[Fix, ...] = ()
    if error.suggestion is not None:
        fixes = (Fix(f"Replace with '{error.suggestion}'", error.span, error.suggestion),)
    return context.finding(error.message, span=error.span, fixes=fixes)


@rule(UNKNOWN_CLAIM, severity=Severity.ERROR)
def unknown_claim(context: RuleContext) -> Iterator[Finding]:
    """A claim the notation does not know.

    Claims are chemistry's own words: shape names, hybridization labels,
    placements, polarity, angles and so on (see the README).  The closest known
    word is offered as a fix when there is one.
    """
    yield from _errors_with_code(context)


@rule(UNKNOWN_ELEMENT, severity=Severity.ERROR)
def unknown_element(context: RuleContext) -> Iterator[Finding]:
    """A formula names an element that does not exist.

    Symbols are case-sensitive: ``Cl`` is chlorine, ``CL`` is not a symbol.
    """
    yield from _errors_with_code(context)


@rule(ANNOTATION_NOT_READ, severity=Severity.WARNING)
def annotation_not_read(context: RuleContext) -> Iterator[Finding]:
    """A brace group clearly meant as an annotation is not read as one, so nothing in it is checked.

    Element symbols are case-sensitive and a charge is written ``^2-``: ``{CLF3}``,
    ``{sf4: linear}`` and ``{SO4^{2-}: octahedral}`` would otherwise be skipped without a
    word.  A group counts as meant only when the corrected text reads cleanly (with
    claims that read too, or a formula with a count); the fix writes the correction
    when there is exactly one.
    """
    yield from _errors_with_code(context)


@rule(MALFORMED_FORMULA, severity=Severity.ERROR)
def malformed_formula(context: RuleContext) -> Iterator[Finding]:
    """A formula that cannot be read: a stray character, an unclosed bracket, a zero count.

    The range points at the first character that does not fit.
    """
    yield from _errors_with_code(context)


@rule(MALFORMED_CLAIM, severity=Severity.ERROR)
def malformed_claim(context: RuleContext) -> Iterator[Finding]:
    """A claim whose words are known but whose form is not: an angle without a value, an empty claim.

    The message says what form was expected.
    """
    yield from _errors_with_code(context)


@rule(IMPOSSIBLE_COUNT, severity=Severity.ERROR)
def impossible_count(context: RuleContext) -> Iterator[Finding]:
    """A count no species can have: a negative number of lone pairs, an angle above 180 degrees.

    Such a number is a typing slip rather than a chemical claim.
    """
    yield from _errors_with_code(context)


@rule(FORMULA_TOO_LARGE, severity=Severity.ERROR)
def formula_too_large(context: RuleContext) -> Iterator[Finding]:
    """A formula beyond the bounds the tool analyses (counts, charge, nesting or length).

    The bounds keep every check fast; real molecular species fall well inside them.
    """
    yield from _errors_with_code(context)


MAX_REVIEWED_CHARS = 4_000_000  # ~4 MB: a review stays under a few seconds even of hostile text


def reviewed_length(text: str) -> int:
    """How much of ``text`` is reviewed at most: all of it, or up to the last line break within the limit."""
    if len(text) <= MAX_REVIEWED_CHARS:
        return len(text)
    line_break = text.rfind("\n", 0, MAX_REVIEWED_CHARS)
    return line_break + 1 if line_break > 0 else MAX_REVIEWED_CHARS


def _rest_of_line(text: str, start: int) -> Span:
    line_end = text.find("\n", start)
    return Span(start, len(text) if line_end == -1 else line_end)


@rule("note-too-large", severity=Severity.WARNING, whole_note=True)
def note_too_large(context: DocumentContext) -> Iterator[Finding]:
    """A note larger than the tool reviews: only its beginning was checked.

    Reviewing is linear in the text, but a file of several megabytes is an
    export or a data dump rather than a lab note, and reviewing all of it on
    every keystroke would stall the editor.  The first 4,000,000 characters (up
    to a line break) are reviewed; split the note to have the rest checked.
    """
    text = context.text
    limit = reviewed_length(text)
    if limit >= len(text):
        return
    yield context.finding(
        f"note of {len(text):,} characters: the first {limit:,} were reviewed, the remaining "
        f"{len(text) - limit:,} were not (limit {MAX_REVIEWED_CHARS:,})",
        _rest_of_line(text, limit),
    )


@rule("review-continues", severity=Severity.INFORMATION, whole_note=True)
def review_continues(context: DocumentContext) -> Iterator[Finding]:
    """The editor got this note's findings up to here first; the rest follows shortly.

    The language server answers each change within a fixed time.  When a
    review would take longer (a large note opened, or pasted in, for the
    first time) it stops at the start of a line, publishes the findings of
    everything above it with this mark on the first line left out, and reviews
    the rest in the background; the complete findings replace these when they
    are ready.  The command line always reviews the whole note.
    """
    text, reviewed = context.text, context.reviewed_chars
    limit = reviewed_length(text)
    if reviewed >= limit:
        return
    yield context.finding(
        f"review in progress: findings from this line on ({limit - reviewed:,} characters) follow when ready",
        _rest_of_line(text, reviewed),
    )
