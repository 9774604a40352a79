"""Completion words: taken from the notation, every one of them readable by the parser."""

from notelsp.notation.model import ShapeClaim
from notelsp.notation.transform import parse_body
from notelsp.review.vocabulary import claim_phrases, claim_words, place_in_annotation, word_start, words_for


def test_claim_words_are_the_notations_phrases():
    assert [w.label for w in claim_words() if w.kind == "shape"] + [w.label for w in claim_words() if w.kind != "shape"] \
        == [w.label for w in claim_words()]
    assert {w.label for w in claim_words()} == set(claim_phrases())


def test_completion_offers_every_vsepr_shape_label_and_site():
    # the AXnEm shape names, hybridization labels and placement sites of standard VSEPR (from memory)
    assert set(claim_phrases()) == {
        "linear", "bent", "trigonal planar", "trigonal pyramidal", "tetrahedral", "seesaw", "T-shaped",
        "trigonal bipyramidal", "square pyramidal", "square planar", "octahedral", "pentagonal bipyramidal",
        "pentagonal planar", "pentagonal pyramidal", "sp", "sp2", "sp3", "sp3d", "sp3d2", "sp3d3", "unhybridized",
        "polar", "nonpolar", "axial", "equatorial", "apical", "basal", "cis", "trans", "fac", "mer",
    }
    assert claim_phrases()[:2] == ("linear", "bent")  # by steric number: two domains first


def test_shape_words_parse_as_shape_claims_and_the_rest_do_not():
    for word in claim_words():
        claims = parse_body(f"ClF3: {word.label}").claims
        is_shape = len(claims) == 1 and isinstance(claims[0], ShapeClaim)
        assert is_shape == (word.kind == "shape"), word


def test_every_word_has_a_description():
    assert all(w.detail for w in claim_words())
    # VSEPR name for AX3E2, standard VSEPR (from memory)
    assert "lone pairs" in {w.label: w.detail for w in claim_words()}["T-shaped"]


def test_cursor_place_inside_and_outside_an_annotation():
    text = "See {ClF3: t} and {Xe"
    assert place_in_annotation(text, text.index("t}") + 1) == "claim"
    assert place_in_annotation(text, text.index("Cl") + 1) == "formula"
    assert place_in_annotation(text, text.index("and")) is None
    assert place_in_annotation(text, len(text)) == "formula"


def test_formula_words_are_element_symbols_in_atomic_number_order():
    symbols = [w.label for w in words_for("formula")]
    # periodic table order (IUPAC), from memory
    assert symbols[:3] == ["H", "He", "Li"]
    assert all(w.kind == "element" for w in words_for("formula"))


def test_completion_replaces_the_whole_claim_typed_so_far():
    text = "{ClF3: polar, trigonal pl"
    assert text[word_start(text, len(text), "claim"):] == "trigonal pl"
    text = "{XeF4:"
    assert word_start(text, len(text), "claim") == len(text)


def test_completion_replaces_only_the_element_symbol_being_typed():
    for typed, symbol in (("{ClF", "F"), ("{Cl", "Cl"), ("{ClF3", ""), ("{C", "C"), ("{", "")):
        assert typed[word_start(typed, len(typed), "formula"):] == symbol, typed
