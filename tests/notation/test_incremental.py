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
    "+++",
    "title: {H2O: bent}",
    "...",
    "!!! note",
    "??? tip \"About {SF6}\"",
    "    body {NH3: bent}",
    ":::{note}",
    ":::",
    "```{note}",
    "~~struck {SF4: seesaw}~~ and [[x|{H2O: bent}]]",
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
    at = data.draw(st.integers(min_value=0, max_value=len(lines)))
    removed = data.draw(st.integers(min_value=0, max_value=3))
    inserted = data.draw(st.lists(st.sampled_from(LINES), max_size=3))
    after = "\n".join(lines[:at] + inserted + lines[at + removed :]) + "\n"
    # The edit found by comparing the texts, and the edit named as the editor names it (by its range).
    prefix = sum(len(line) + 1 for line in lines[:at])
    suffix = sum(len(line) + 1 for line in lines[at + removed :])
    for known in (False, True):
        memory = BlockMemory()
        markdown_structure(before, memory)  # remembered: the next text is treated as an edit of it
        if known:
            memory.expect_edit(before, after, prefix, suffix)
        structure = markdown_structure(after, memory)
        assert (structure.segments, structure.bonding_lines) == _whole(after)


@settings(max_examples=60, deadline=None)
@given(documents, st.data())
def test_a_character_typed_inside_a_line_reparses_to_the_whole_text_result(lines, data):
    before = "\n".join(lines) + "\n"
    at = data.draw(st.integers(min_value=0, max_value=len(before)))
    typed = data.draw(st.sampled_from(["x", "`", "{", "}", "\n", "$", "<", "-", "#", " "]))
    after = before[:at] + typed + before[at:]
    for known in (False, True):  # found by comparing, and named by the edit's range
        memory = BlockMemory()
        markdown_structure(before, memory)
        if known:
            memory.expect_edit(before, after, at, len(before) - at)
        structure = markdown_structure(after, memory)
        assert (structure.segments, structure.bonding_lines) == _whole(after)


# --- chains of random edits, each compared with a whole parse ------------------------------

import random  # noqa: E402

from notelsp.notation.markdown import BlockMemory  # noqa: E402
from tests.reliability.scale import scaled, tried  # noqa: E402

# Lines that reach across blocks (reference definitions and the links that use them), added
# to the structural lines above (common practice, no source).
REACHING_LINES = [
    "[{H2O: bent}]: /url",
    "[lab]: </a b> 'title {NH3: bent}'",
    "see [a][{H2O: bent}] and [lab] {XeF4: square planar}",
    "[{H2O: bent}] alone",
    "$$ {SF6} $$",
    "text $$",
]
EDIT_COUNT = scaled(3_000, 100_000)
_TYPED = ["x", ":", "]", "[", "`", "{", "}", "\n", "\n\n", "$", "<", "-", "#", " ", ">", "|", "~~~", "```"]


def _random_edit(rng: random.Random, text: str) -> str:
    """One edit: typed characters, a deletion of characters or lines, or pasted lines."""
    position = rng.randint(0, len(text))
    kind = rng.randrange(6)
    if kind == 0:
        return text[:position] + rng.choice(_TYPED) + text[position:]
    if kind in (1, 2):  # deletions are as common as typing: they remove what later text relied on
        return text[:position] + text[position + rng.randint(1, 4 if kind == 1 else 40) :]
    line_start = text.rfind("\n", 0, position) + 1
    if kind == 3:
        pasted = "\n".join(rng.choice(LINES + REACHING_LINES) for _ in range(rng.randint(1, 4)))
        return text[:line_start] + pasted + "\n" + text[line_start:]
    if kind == 4:
        line_end = text.find("\n", position)
        return text[:line_start] + (text[line_end + 1 :] if line_end != -1 else "")
    # The ':' of a reference definition deleted (or typed back): the edit the links depend on.
    colon = text.find("]:")
    if colon != -1:
        return text[: colon + 1] + text[colon + 2 :]
    bracket = text.find("] ")
    return text if bracket == -1 else text[: bracket + 1] + ":" + text[bracket + 1 :]


def test_random_edit_chains_reparse_to_the_whole_text_result():
    """Edits applied one after another to open documents (the version before each is the one
    remembered), every result compared with a parse of the whole text."""
    rng = random.Random(20261203)
    done, differing = 0, []
    while done < EDIT_COUNT:
        memory = BlockMemory()  # one open document's
        text = "\n".join(rng.choice(LINES + REACHING_LINES) for _ in range(rng.randint(0, 40))) + "\n"
        markdown_structure(text, memory)
        for _ in range(25):
            before, text = text, _random_edit(rng, text)
            structure = markdown_structure(text, memory)
            done += 1
            if (structure.segments, structure.bonding_lines) != _whole(text):
                differing.append((before, text))
                memory = BlockMemory()
                markdown_structure(text, memory)
    tried("incremental re-parses compared with a whole parse (random edit chains)", done)
    assert not differing, f"{len(differing)} of {done} edits differ; the smallest:\n{min(differing, key=lambda p: len(p[1]))!r}"


def test_deleting_a_definitions_colon_shows_the_annotation_in_a_link_far_below():
    """The link below is re-read once the definition it used is gone (it is then plain text)."""
    before = "[{H2O: bent}]: /u\n\n" + "p\n\n" * 6 + "see [a][{H2O: bent}]\n"
    after = before.replace("]:", "]", 1)
    memory = BlockMemory()
    markdown_structure(before, memory)
    structure = markdown_structure(after, memory)
    assert (structure.segments, structure.bonding_lines) == _whole(after)
    assert [segment.text for segment in structure.segments] == ["[{H2O: bent}] /u", "see [a][{H2O: bent}]"]
