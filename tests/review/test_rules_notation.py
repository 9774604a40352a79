"""Notation rules: the scanner's errors become findings on exactly the text at fault.

The correct spellings are chemistry's own words and IUPAC element symbols
(common practice, no source).
"""

from __future__ import annotations

import pytest

from .helpers import assert_clean, assert_flagged, fixed, with_code


@pytest.mark.parametrize(
    "wrong, written, right",
    [
        ("{ClF3: t-shapd}", "t-shapd", "{ClF3: t-shaped}"),
        ("{NH3: trigonal pyramid}", "trigonal pyramid", "{NH3: trigonal pyramidal}"),
        ("{SF6: octahedrl}", "octahedrl", "{SF6: octahedral}"),
    ],
)
def test_unknown_claim_names_the_word_and_offers_the_closest(wrong, written, right):
    note = f"Today {wrong} was drawn."
    finding = assert_flagged(note, written, "unknown-claim", f"'{written}'")
    assert finding.fixes and finding.fixes[0].replacement in finding.message
    assert fixed(note, finding) == f"Today {right} was drawn."
    assert_clean(f"Today {right} was drawn.")


def test_unknown_element_points_at_the_symbol():
    note = "The fluoride {CLF3: t-shaped} fumes."
    finding = assert_flagged(note, "CL", "unknown-element", "'CL'", "'Cl'")
    assert finding.fixes[0].replacement == "Cl"
    assert_clean("The fluoride {ClF3: t-shaped} fumes.")


@pytest.mark.parametrize(
    "annotation, written, words",
    [
        ("{Cl(F3: t-shaped}", "(", "unclosed '('"),
        ("{ClF0: t-shaped}", "0", "count 0"),
    ],
)
def test_malformed_formula_points_at_the_first_character_that_does_not_fit(annotation, written, words):
    note = f"See {annotation} here."
    assert_flagged(note, written, "malformed-formula", words, after=note.index("{"))
    assert_clean("See {ClF3: t-shaped} here.")


def test_malformed_claim_says_what_form_was_expected():
    note = "Angles: {ClF3: angle} and {ClF3: F-Cl-F}."
    found = with_code(note, "malformed-claim")
    assert [note[f.span.start:f.span.end] for f in found] == ["angle", "F-Cl-F"]
    assert "'angle'" in found[0].message and "107°" in found[0].message  # shows the expected form
    assert "'F-Cl-F'" in found[1].message
    assert_clean("Angles: {ClF3: F-Cl-F 87.5°}.")  # ClF3 F(ax)-Cl-F(eq) 87.5° (from memory)


def test_empty_claim_between_separators_is_reported_where_it_is():
    note = "{ClF3: t-shaped,, polar}"
    (finding,) = with_code(note, "malformed-claim")
    between = note.index(",,") + 1
    assert (finding.span.start, finding.span.end) == (between, between)  # the empty range between the commas
    assert "empty claim" in finding.message


@pytest.mark.parametrize(
    "claim, written, words",
    [
        ("200°", "200", "200°"),
        ("-2 lone pairs", "-2", "'-2 lone pairs'"),
    ],
)
def test_impossible_count_is_a_typing_slip(claim, written, words):
    note = f"{{ClF3: {claim}}}"
    assert_flagged(note, written, "impossible-count", words)
    assert_clean("{ClF3: 2 lone pairs}")


def test_formula_too_large_names_the_bound():
    note = "{C999H4: tetrahedral}"
    assert_flagged(note, "999", "formula-too-large", "999", "99")
    assert_clean("{CH4: tetrahedral}")
