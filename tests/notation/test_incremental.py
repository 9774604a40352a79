"""Re-parsing only around an edit gives exactly what a parse of the whole text gives."""

from hypothesis import given, settings
from hypothesis import strategies as st

from notelsp.notation.markdown import markdown_structure
from notelsp.notation.markdown_blocks import parse_blocks

# Lines that open, continue and close the Markdown structures that matter here
# (common practice, no source).
LINES = [
    "",
    "",
    "plain prose {NH3: trigonal pyramidal} here",
    "more prose `{SF4: linear}` and {H2O: bent}",
    "# Heading {ClF3: t-shaped}",
    "Setext title {BF3}",
    "===",
    "---",
    "- item {CH4: tetrahedral}",
    "  continued {XeF4: square planar}",
    "    indented {SF6}",
    "1. numbered {SF4: seesaw}",
    "> quoted {XeF4: square planar}",
    "```bonding",
    "```",
    "~~~",
    "PCl3F2: F equatorial",
    "$$",
    "<div>",
    "</div>",
    "<!-- {H2O: bent}",
    "-->",
    "| a | {SF6} |",
    "|---|---|",
    "$x {NH3: bent}$ math",
    "[label {H2O: bent}](http://example.org/{x})",
    "- ```bonding",
    "  ```",
    "  SF4: seesaw",
    "* > {H2O: bent}",
    "<pre>",
    "</pre>",
    "\t{NH3: bent}",
    "   ```",
]

documents = st.lists(st.sampled_from(LINES), min_size=0, max_size=40)


def _whole(text):
    blocks = parse_blocks(text).blocks
    return (
        tuple(s for b in blocks for s in b.segments),
        tuple(span for b in blocks for span in b.bonding),
    )


@settings(max_examples=150, deadline=None)
@given(documents, st.data())
def test_an_edit_reparses_to_the_whole_text_result(lines, data):
    before = "\n".join(lines) + "\n"
    markdown_structure(before)  # remembered: the next text is treated as an edit of it
    at = data.draw(st.integers(min_value=0, max_value=len(lines)))
    removed = data.draw(st.integers(min_value=0, max_value=3))
    inserted = data.draw(st.lists(st.sampled_from(LINES), max_size=3))
    after = "\n".join(lines[:at] + inserted + lines[at + removed :]) + "\n"
    structure = markdown_structure(after)
    assert (structure.segments, structure.bonding_lines) == _whole(after)


@settings(max_examples=60, deadline=None)
@given(documents, st.data())
def test_a_character_typed_inside_a_line_reparses_to_the_whole_text_result(lines, data):
    before = "\n".join(lines) + "\n"
    markdown_structure(before)
    at = data.draw(st.integers(min_value=0, max_value=len(before)))
    typed = data.draw(st.sampled_from(["x", "`", "{", "}", "\n", "$", "<", "-", "#", " "]))
    after = before[:at] + typed + before[at:]
    structure = markdown_structure(after)
    assert (structure.segments, structure.bonding_lines) == _whole(after)
