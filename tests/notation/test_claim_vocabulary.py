"""The claim words read off the grammar's terminals: every spelling is one the grammar reads.

The expansion of a terminal's pattern is checked against Python's own ``re`` (a
general-purpose regular-expression engine): every spelling it lists matches the
pattern.  The words are chemistry's usual ones (common practice, no source).
"""

from __future__ import annotations

import re

import pytest

from notelsp.notation.claim_vocabulary import (
    HYBRID_LABELS,
    canonical_shape,
    claim_words,
    shape_names,
    site_words,
    spellings,
    terminal_spellings,
)
from notelsp.notation.grammar import parser
from notelsp.notation.model import HybridizationClaim, PlacementClaim, ShapeClaim
from notelsp.notation.transform import parse_claim


def _pattern(name: str):
    (terminal,) = [t for t in parser().terminals if t.name == name]
    return terminal.pattern


@pytest.mark.parametrize("name", ["SHAPE", "SITE", "POLARITY", "HYBRIDIZED", "LONE_PAIRS", "EGEOM", "UNPAIRED"])
def test_every_spelling_of_a_word_terminal_matches_its_pattern(name):
    pattern = _pattern(name)
    found = terminal_spellings(name)
    assert found
    for spelling in found:
        assert re.fullmatch(pattern.value, spelling, re.IGNORECASE), (name, spelling)


def test_an_expansion_lists_every_choice_and_reads_separators_as_one_space():
    assert set(spellings(r"(?:saw[ -]?horse|see[ -]+saw)(?![A-Za-z])", "i")) == {"sawhorse", "saw horse", "see saw"}
    assert spellings(r"hybridi[sz]ed") == ("hybridised", "hybridized")


def test_every_shape_the_grammar_names_reads_as_that_shape():
    for spelling in terminal_spellings("SHAPE"):
        claim, errors = parse_claim(spelling)
        assert not errors and isinstance(claim, ShapeClaim) and claim.shape == canonical_shape(spelling), spelling
    assert {"t-shaped", "seesaw", "square-planar", "distorted-octahedral"} <= set(shape_names())
    assert "angular" not in shape_names() and "see-saw" not in shape_names()  # spellings of bent and seesaw


def test_sites_and_labels_read_as_their_claims():
    assert site_words() == ("axial", "equatorial", "apical", "basal", "cis", "trans", "fac", "mer")
    for site in site_words():
        claim, errors = parse_claim(f"F {site}")
        assert not errors and isinstance(claim, PlacementClaim) and claim.site == site
    for label in HYBRID_LABELS:
        claim, errors = parse_claim(label)
        assert not errors and isinstance(claim, HybridizationClaim) and claim.label == label


def test_the_claim_words_are_the_words_of_the_claim_terminals():
    words = claim_words()
    for word in ("trigonal", "pyramidal", "seesaw", "equatorial", "lone", "pairs", "hybridised", "nonpolar",
                 "paramagnetic", "unpaired", "angstrom", "hz", "is", "has", "degrees"):
        assert word in words, word
    # symbols and names are not claim words: a misspelt word is never "corrected" to one
    assert not {"cl", "name", "c2v", "ax"} & words


def test_every_count_word_of_the_grammar_has_a_meaning():
    """A word added to QWORD must be given its number in the transformer, or placements fail on it."""
    from notelsp.notation.model import UnpairedElectronClaim

    numbers = {"no": 0, "a": 1, "an": 1, "one": 1, "single": 1, "two": 2, "three": 3, "four": 4, "five": 5, "six": 6}
    for word in terminal_spellings("QWORD"):
        placement, errors = parse_claim(f"{word} F axial")
        if word in ("both", "all"):
            assert not errors and placement.quantity == "all", word
            continue
        counted, errors = parse_claim(f"{word} unpaired electrons")
        assert not errors and isinstance(counted, UnpairedElectronClaim) and counted.count == numbers[word], word
