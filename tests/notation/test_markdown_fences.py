"""A code fence closes the same way on every path of the scanner, as markdown-it-py closes it.

The scanner reads a fence whole (unindented, at top level, LF line breaks) or line by line (in a
container, or in a note with CR line breaks).  Both follow one definition of a closing line: a run
at least as long as the opening one, then spaces and tabs only.  Other white space after the run
(a no-break space, a form feed) leaves the fence open, as in markdown-it-py (the reference of
tests/notation/test_markdown_reference.py), so an annotation after such a line is code.
"""

from __future__ import annotations

import pytest

from .test_markdown_reference import notelsp_found, reference_found

ANNOTATION = "{SF6: octahedral}"


def _cases():
    for after in ("\u00a0", "\x0c", " \t", ""):
        for name, fence in (("top level", "```\nx\n```{after}\n{a}\n```\n"),
                            ("block quote", "> ```\n> x\n> ```{after}\n> {a}\n> ```\n"),
                            ("list item", "- ~~~\n  x\n  ~~~{after}\n  {a}\n  ~~~\n")):
            text = fence.format(after=after, a=ANNOTATION)
            yield pytest.param(text, id=f"{name}-{after!r}")
            yield pytest.param(text.replace("\n", "\r\n"), id=f"{name}-{after!r}-crlf")


@pytest.mark.parametrize("text", list(_cases()))
def test_fence_closing_lines_match_the_reference(text):
    assert notelsp_found(text) == reference_found(text)


def test_the_cases_cover_an_open_and_a_closed_fence():
    open_fence = "```\nx\n```\u00a0\n" + ANNOTATION + "\n```\n"
    closed_fence = "```\nx\n``` \t\n" + ANNOTATION + "\n```\n"
    assert reference_found(open_fence) == [] and len(reference_found(closed_fence)) == 1
