"""Markdown structure: annotations in code, math, HTML and link destinations are skipped."""

import pytest

from notelsp.notation import scan


def groups(text):
    return [text[a.span.start : a.span.end] for a in scan(text, "markdown").annotations]


@pytest.mark.parametrize(
    "text",
    [
        "code span `{NH3: bent}` here",
        "double ``{NH3: bent}`` ticks",
        "```\n{NH3: bent}\n```",
        "```python\n{NH3: bent}\n```",
        "    {NH3: bent}",
        "inline math $x {NH3: bent}$ here",
        "$$\n{NH3: bent}\n$$",
        "<div>\n{NH3: bent}\n</div>",
        'inline html <span title="{NH3: bent}">x</span>',
        "[a link](http://example.org/{NH3:bent})",
        '[a link](http://example.org/ "{NH3: bent}")',
        "autolink <http://example.org/{NH3:bent}>",
        r"escaped \{NH3: bent}",
    ],
)
def test_skipped_regions(text):
    assert groups(text) == []


def test_annotations_in_prose_structures_are_found():
    text = (
        "# Heading {ClF3: t-shaped}\n\n"
        "> quoted {XeF4: square planar}\n> more\n\n"
        "- item {CH4: tetrahedral}\n  - nested {NH3: trigonal pyramidal}\n\n"
        "1. numbered {SF4: seesaw}\n\n"
        "| species | claim |\n|---|---|\n| {SF6} | {SF6: octahedral} |\n\n"
        "*emphasis {BF3: trigonal planar}* and [label {H2O: bent}](http://example.org)\n"
    )
    assert groups(text) == [
        "{ClF3: t-shaped}",
        "{XeF4: square planar}",
        "{CH4: tetrahedral}",
        "{NH3: trigonal pyramidal}",
        "{SF4: seesaw}",
        "{SF6}",
        "{SF6: octahedral}",
        "{BF3: trigonal planar}",
        "{H2O: bent}",
    ]


def test_text_after_a_code_span_on_the_same_line_is_scanned():
    text = "`{x}` then {NH3: bent} and `y` {H2O: bent}"
    assert groups(text) == ["{NH3: bent}", "{H2O: bent}"]


def test_table_cells_with_equal_text_map_to_their_own_cells():
    text = "| a | b |\n|---|---|\n| {SF6} | {SF6} |\n"
    first, second = scan(text, "markdown").annotations
    assert first.span.start < second.span.start
    assert text[second.span.start : second.span.end] == "{SF6}"
