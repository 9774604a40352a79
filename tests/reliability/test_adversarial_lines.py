"""Work per request stays bounded on text built to make a Markdown scanner slow.

Each note repeats one construct that a naive scanner would re-read from every
opener to the end of the line (brackets, backticks, raw-HTML openers, link
destinations, dollars) or that opens a block whose end is looked for further
down (fences, display math, definitions, tables, nested lists).  The scanner
must stay about linear: each note is reviewed under a hang guard far below
what a quadratic pass over it would need (no timing is asserted: a
pathological case simply never finishes), and the review is the same twice
and keeps every finding inside the note (common practice, no source).
"""

from __future__ import annotations

import pytest

from notelsp.review.document import review_text

from .afresh import clear_memoised_parses
from .scale import scaled, tried

SIZE = scaled(200_000, 1_000_000)  # characters per note

CONSTRUCTS = {
    "unmatched brackets": lambda n: "[" * (n // 2) + "]" * (n // 2),
    "open brackets": lambda n: "[a " * (n // 3),
    "link openings": lambda n: "[a](" * (n // 4),
    "image openings": lambda n: "![a " * (n // 4),
    "backtick runs of many widths": lambda n: "".join("`" * (i % 40 + 1) + "a" for i in range(n // 20)),
    "unclosed comments": lambda n: "<!-- " * (n // 5),
    "unclosed processing instructions": lambda n: "<? " * (n // 3),
    "tag openers": lambda n: "<a " * (n // 3),
    "escaped dollars": lambda n: "$\\$" * (n // 3),
    "fence lines": lambda n: "```\n" * (n // 4),
    "display-math lines": lambda n: "$$\n" * (n // 3),
    "definitions": lambda n: "[a]: /u\n" * (n // 8),
    "table rows": lambda n: "| a | b |\n|---|---|\n" + "| {H2O: bent} | x |\n" * (n // 20),
    "nested list items": lambda n: "".join(" " * (2 * i % 80) + "- a\n" for i in range(n // 40)),
    "quoted lines": lambda n: "> a\n" * (n // 4),
}


@pytest.mark.timeout(120)
@pytest.mark.parametrize("construct", sorted(CONSTRUCTS))
def test_a_note_of_one_repeated_construct_is_reviewed(construct):
    text = CONSTRUCTS[construct](SIZE) + " {H2O: bent}\n"
    first = review_text(text)
    clear_memoised_parses()
    again = review_text(text)
    tried("adversarial notes reviewed (one construct repeated)")
    assert [(f.code, f.span) for f in first.findings] == [(f.code, f.span) for f in again.findings]
    assert [a.span for a in first.annotations] == [a.span for a in again.annotations]
    assert all(0 <= f.span.start <= f.span.end <= len(text) for f in first.findings)
