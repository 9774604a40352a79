"""notelsp's own Markdown scanner finds the same annotations as the markdown-it-py reference.

The reference (tests/notation/reference_markdown.py) is markdown-it-py's
CommonMark parser with the GFM table and dollarmath extensions.  For every
document of tests/notation/markdown_corpus.py (hand-written cases and seeded
random documents) the annotations found by ``scan(text)`` must equal those found
where the reference structure says they may stand: same span, same body, same
form.  The few places where notelsp deliberately differs are listed in
``KNOWN_DIFFERENCES`` with the reason and notelsp's expected output.
"""

from __future__ import annotations

import random
from dataclasses import dataclass

import pytest

from notelsp.notation import scan
from notelsp.notation.markdown import BlockMemory
from notelsp.notation.scanner import scan_with_structure
from tests.reliability.scale import scaled, tried

from . import reference_markdown
from .markdown_corpus import HAND_WRITTEN, HAND_WRITTEN_EDITS, generated_documents

GENERATED_SEED = 20261202
GENERATED_COUNT = scaled(500, 10_000)
_SHOWN_DISAGREEMENTS = 5


def found(text: str, document) -> list[tuple[int, int, int, int, str]]:
    """(span start, span end, body start, body end, form) of each annotation.

    The one normalisation: on a bonding line with a tab before its body, the span's
    start is taken as the body's.  A tab that straddles a container's edge or the
    fence's indentation ('>\\tNH3: bent') is partly indentation, partly content:
    markdown-it keeps it in the content line, notelsp starts the line after it.
    The body and the span's end still count.
    """
    rows = []
    for a in document.annotations:
        start = a.span.start
        if a.form == "block":
            line_start = max(text.rfind("\n", 0, start), text.rfind("\r", 0, start)) + 1
            if "\t" in text[line_start : a.body.start]:
                start = a.body.start
        rows.append((start, a.span.end, a.body.start, a.body.end, a.form))
    return rows


def notelsp_found(text: str) -> list[tuple[int, int, int, int, str]]:
    return found(text, scan(text, "markdown"))


def reference_found(text: str) -> list[tuple[int, int, int, int, str]]:
    return found(text, scan_with_structure(text, reference_markdown.markdown_structure(text)))


def readable(text: str, annotations) -> list[tuple[str, str, str]]:
    """Annotations as (span text, body text, form): what a reader of a failure wants to see."""
    return [(text[start:end], text[body[0] : body[1]], form) for start, end, *body, form in annotations]


@dataclass(frozen=True, slots=True)
class KnownDifference:
    reason: str
    notelsp: tuple[tuple[str, str, str], ...]  # (span text, body text, form) that notelsp must find


# Case name -> why notelsp differs from the reference, and what notelsp must find instead.
# Each is a place where markdown-it-py 4.3 departs from CommonMark 0.31 (sections named), or,
# for the nesting cap and directive bodies, where notelsp reads on where the reference stops;
# what CommonMark says was worked out from the spec's rules and checked against the
# Python port of its reference implementation (commonmark 0.9).
_ONLY_PROSE = (("{SF6: octahedral}", "SF6: octahedral", "inline"),)  # markdown_corpus.PROSE
_IN_CODE: tuple[tuple[str, str, str], ...] = ()  # nothing found: the annotation stands in code or a destination
KNOWN_DIFFERENCES: dict[str, KnownDifference] = {
    "quote-continuation-indented-4-is-code": KnownDifference(
        "a '>' indented 4 columns does not continue a block quote (5.1): the line is indented "
        "code, not a bonding line; markdown-it continues the quote",
        _IN_CODE,
    ),
    "list-quote-fence-marker-indented-4-is-code": KnownDifference(
        "the same with tabs: inside the item the '>' stands at column 8, 4 past the content (2.2, 5.1)",
        _IN_CODE,
    ),
    "nested-quotes-spaces-then-tab-is-paragraph": KnownDifference(
        "after the third '>' (column 3) and its optional space, the spaces and the tab reach column 8: "
        "3 columns of indentation, a paragraph (2.2); markdown-it counts the tab from the wrong column",
        (("{NH3: bent}", "NH3: bent", "inline"),),
    ),
    "quote-list-lazy-line-indented-4-is-paragraph": KnownDifference(
        "the second line is too little indented for the list item and cannot start indented code "
        "(which cannot interrupt a paragraph): it is a lazy continuation line (5.1, 5.2); "
        "markdown-it makes it indented code",
        (("{NH3: bent}", "NH3: bent", "inline"),),
    ),
    "reference-definition-junk-after-title-next-line": KnownDifference(
        "an empty title '()' followed by other text is no title, and the definition ends after its "
        "destination (4.7, as example 210 for a title that is not empty): the destination is skipped; "
        "markdown-it-py 4.3 (rules_block/reference.py) tests the title's text for truth, so an empty "
        "title drops the whole definition",
        _IN_CODE,
    ),
    "nested-quotes-tab-is-indented-code": KnownDifference(
        "after '>>>' and the optional space, the tab runs from column 4 to 8: 4 columns, indented "
        "code (2.2, 5.1); markdown-it counts too few",
        _ONLY_PROSE,
    ),
    "quote-tab-nested-quotes-tab-is-indented-code": KnownDifference(
        "the same, with a tab after the first '>' as well",
        _ONLY_PROSE,
    ),
    "nested-quote-item-tab-fence": KnownDifference(
        "'-' and a tab put the item's content 2 columns in; the next line, after '>>' and the optional "
        "space, is indented 2: it goes on in the item, whose fence holds 'NH3: bent' (2.2, 5.2); "
        "markdown-it ends the item",
        (("NH3: bent", "NH3: bent", "block"),),
    ),
    "list-tab-lazy-line-is-paragraph": KnownDifference(
        "'1.', a tab and a space put the item's content at column 5; the next line, indented 4, is "
        "not in the item and cannot start a block: a lazy continuation line (5.2); markdown-it makes "
        "it indented code",
        (("{NH3: bent}", "NH3: bent", "inline"),),
    ),
    "nesting-beyond-markdown-it-cap": KnownDifference(
        "markdown-it stops reading a document nested deeper than its maxNesting (20 levels in the "
        "commonmark preset) and drops the rest; notelsp opens up to 32 block quotes and list items "
        "and reads deeper markers as text, so nothing is lost",
        (("{NH3: bent}", "NH3: bent", "inline"),),
    ),
    "directive-body-tab-after-indentation": KnownDifference(
        "MyST parses a directive's body as a document of its own, the fence's indentation (here 1 "
        "column) removed, so the tab left counts 4 columns from the body's start: indented code; "
        "notelsp counts columns from the line's start, as CommonMark does in a container (2.2): "
        "3 columns, a paragraph",
        (("{NH3: bent}", "NH3: bent", "inline"),),
    ),
    "list-item-line-is-not-a-table-header": KnownDifference(
        "'* ' opens a list item before any table is sought (GFM 0.29, 4.10 and 5.2), and the item's "
        "one header cell does not match two delimiter cells: a paragraph; markdown-it tries its "
        "table rule first and takes the marker for a cell",
        (("{NH3: bent}", "NH3: bent", "inline"),),
    ),
}


def _agreement_message(text: str, ours, theirs) -> str:
    return (
        f"document {text!r}\n"
        f"  notelsp:   {readable(text, ours)}\n"
        f"  reference: {readable(text, theirs)}"
    )


@pytest.mark.parametrize(
    "case", [case for case in HAND_WRITTEN if case.name not in KNOWN_DIFFERENCES], ids=lambda case: case.name
)
def test_hand_written_document_agrees_with_reference(case):
    tried("Markdown documents compared with markdown-it-py: hand-written")
    ours, theirs = notelsp_found(case.text), reference_found(case.text)
    assert ours == theirs, _agreement_message(case.text, ours, theirs)


@pytest.mark.parametrize("name", sorted(KNOWN_DIFFERENCES))
def test_known_difference_from_reference(name):
    tried("Markdown documents compared with markdown-it-py: known differences")
    (case,) = [case for case in HAND_WRITTEN if case.name == name]
    expected = KNOWN_DIFFERENCES[name]
    ours, theirs = notelsp_found(case.text), reference_found(case.text)
    assert tuple(readable(case.text, ours)) == expected.notelsp, _agreement_message(case.text, ours, theirs)
    assert ours != theirs, f"{name}: the reference now agrees; drop it from KNOWN_DIFFERENCES"


def _shrunk(text: str, disagrees) -> str:
    """A smaller document that still disagrees: drop lines, then characters, while it does."""
    newline = "\r\n" if "\r\n" in text else "\r" if "\r" in text and "\n" not in text else "\n"
    lines = text.split(newline)
    index = 0
    while index < len(lines):
        candidate = lines[:index] + lines[index + 1 :]
        if disagrees(newline.join(candidate)):
            lines = candidate
        else:
            index += 1
    text = newline.join(lines)
    for width in (16, 4, 1):
        index = 0
        while index < len(text):
            candidate = text[:index] + text[index + width :]
            if candidate and disagrees(candidate):
                text = candidate
            else:
                index += width
    return text


def _disagrees(text: str) -> bool:
    return notelsp_found(text) != reference_found(text)


@pytest.mark.parametrize("seed,count", [(GENERATED_SEED, GENERATED_COUNT)], ids=lambda value: str(value))
def test_generated_documents_agree_with_reference(seed, count):
    disagreeing = [text for text in generated_documents(seed, count) if _disagrees(text)]
    tried("Markdown documents compared with markdown-it-py: generated", count)
    print(f"\n{count} generated Markdown documents (seed {seed}), {len(disagreeing)} disagreeing")
    if disagreeing:
        shown = sorted({_shrunk(text, _disagrees) for text in disagreeing[:20]}, key=len)[:_SHOWN_DISAGREEMENTS]
        details = "\n".join(_agreement_message(text, notelsp_found(text), reference_found(text)) for text in shown)
        pytest.fail(f"{len(disagreeing)} of {count} generated documents disagree; smallest reproductions:\n{details}")


_EDIT_CHARACTERS = "`$~>-{}\n \\|<[]("  # the characters that open or close structure (common practice, no source)


def _incremental_found(before: str, after: str) -> list[tuple[int, int, int, int, str]]:
    """What notelsp finds in ``after`` when it was scanning ``before`` just now (an edit)."""
    memory = BlockMemory()
    scan(before, "markdown", memory)
    return found(after, scan(after, "markdown", memory))


def _edited(rng: random.Random, text: str, other: str) -> str:
    """``text`` after one edit a writer might make: a character typed or deleted, a block pasted or cut."""
    position = rng.randint(0, len(text))
    kind = rng.randrange(4)
    if kind == 0:
        return text[:position] + rng.choice(_EDIT_CHARACTERS) + text[position:]
    if kind == 1:
        return text[:position] + text[position + rng.randint(1, 3) :]
    line_start = text.rfind("\n", 0, position) + 1
    if kind == 2:
        return text[:line_start] + other + "\n" + text[line_start:]
    line_end = text.find("\n", position)
    return text[:line_start] + (text[line_end + 1 :] if line_end != -1 else "")


@pytest.mark.parametrize("seed,count", [(GENERATED_SEED + 1, GENERATED_COUNT // 2)], ids=lambda value: str(value))
def test_generated_edits_agree_with_reference(seed, count):
    """The same after an edit, when notelsp re-parses only around it (the document before was scanned)."""
    rng = random.Random(seed)
    documents = list(generated_documents(seed, count + 1))
    disagreeing = []
    for before, other in zip(documents, documents[1:]):
        after = _edited(rng, before, other)
        if _incremental_found(before, after) != reference_found(after):
            disagreeing.append((before, after))
    tried("Markdown documents compared with markdown-it-py: edited and re-parsed", count)
    print(f"\n{count} edited Markdown documents (seed {seed}), {len(disagreeing)} disagreeing")
    if disagreeing:
        details = "\n".join(
            f"edited from {before!r}\n"
            + _agreement_message(after, _incremental_found(before, after), reference_found(after))
            for before, after in sorted(disagreeing, key=lambda pair: len(pair[0]))[:_SHOWN_DISAGREEMENTS]
        )
        pytest.fail(f"{len(disagreeing)} of {count} edited documents disagree:\n{details}")


@pytest.mark.parametrize("name,before,after", HAND_WRITTEN_EDITS, ids=[name for name, _, _ in HAND_WRITTEN_EDITS])
def test_hand_written_edit_agrees_with_reference(name, before, after):
    tried("Markdown documents compared with markdown-it-py: hand-written edits")
    ours, theirs = _incremental_found(before, after), reference_found(after)
    assert ours == theirs, f"edited from {before!r}\n" + _agreement_message(after, ours, theirs)


def test_corpus_is_large_enough():
    """The corpus keeps at least the size asked of it: 80 hand-written cases, 300 generated in CI."""
    print(f"\n{len(HAND_WRITTEN)} hand-written Markdown documents, {GENERATED_COUNT} generated")
    assert len(HAND_WRITTEN) >= 80
    assert GENERATED_COUNT >= 300


def _written(text: str) -> list[tuple[str, str]]:
    """Each annotation's body as written, and its form.  The body, not the whole span: a tab
    before a bonding line's body is partly indentation, and where such a line starts is
    normalised away as in ``found``."""
    return [(text[a.body.start : a.body.end], a.form) for a in scan(text, "markdown").annotations]


@pytest.mark.parametrize("seed,count", [(GENERATED_SEED + 2, GENERATED_COUNT // 2)], ids=lambda value: str(value))
def test_whole_blocks_agree_with_the_line_by_line_reading(seed, count):
    """With LF breaks the top level is read a whole block at a time; with CRLF breaks (the same
    document) every line is read alone.  Both readings find the same annotations, in the
    careful documents and in the awkward ones too (not compared with markdown-it-py, which
    misreads some of them, but notelsp must agree with itself)."""
    documents = [case.text for case in HAND_WRITTEN] + list(generated_documents(seed, count))
    documents += list(generated_documents(seed, count, awkward=True))
    differing, compared = [], 0
    for text in documents:
        if "\r" in text:
            continue  # some documents are written with CR breaks already
        compared += 1
        if _written(text) != [(body.replace("\r\n", "\n"), form) for body, form in _written(text.replace("\n", "\r\n"))]:
            differing.append(text)
    tried("Markdown documents read both ways (whole blocks, line by line)", compared)
    assert compared > count // 2
    assert not differing, f"{len(differing)} of {compared} differ; the smallest:\n{min(differing, key=len)!r}"


@pytest.mark.parametrize("depth", [5, 20, 31, 32, 33, 60])
@pytest.mark.parametrize("marker", ["> ", "- ", "1. "])
def test_deep_nesting_agrees_with_an_uncapped_reference(marker, depth):
    """Nested up to notelsp's cap (32 containers) and past it, annotations in prose are found
    where markdown-it-py finds them once its own cap (maxNesting) is raised past the depth:
    past the cap notelsp reads the markers as text, and loses nothing."""
    tried("Markdown documents compared with markdown-it-py: deep nesting")
    under = "> " if marker == "> " else " " * len(marker)
    text = marker * depth + "a {NH3: bent}\n" + under * depth + "b {H2O: bent}\n\n" + under * depth + "c {SF6}\n"
    md = reference_markdown._markdown()
    capped = md.options["maxNesting"]
    md.options["maxNesting"] = 4 * depth + 10
    try:
        theirs = reference_found(text)
    finally:
        md.options["maxNesting"] = capped
    ours = notelsp_found(text)
    assert ours == theirs, _agreement_message(text, ours, theirs)
    assert len(ours) == 3
