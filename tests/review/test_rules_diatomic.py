"""Two-atom species: linear, D∞h and nonpolar when the atoms are alike, C∞v and polar when not
(common practice, no source); their other claims stay unchecked, and the outside-model note says which."""

from __future__ import annotations

import pytest

from .helpers import assert_flagged, review, with_code


@pytest.mark.parametrize("note", [
    "{HF: polar, linear, C∞v}", "{N2: nonpolar, D∞h}", "{Cl2: linear, nonpolar}", "{CO: polar}", "{NO+: C∞v}",
])
def test_true_claims_about_two_atoms_pass(note):
    assert [f.code for f in review(note).findings] == ["outside-model"]
    assert "except its shape, polarity and point group" in review(note).findings[0].message


def test_false_claims_about_two_atoms_are_flagged_with_the_fix():
    finding = assert_flagged("{CO: bent}", "bent", "wrong-shape", "linear")
    assert finding.fixes[0].replacement == "linear"
    assert assert_flagged("{N2: polar}", "polar", "wrong-polarity", "D∞h").fixes[0].replacement == "nonpolar"
    assert assert_flagged("{HCl: D∞h}", "D∞h", "wrong-point-group", "C∞v").fixes[0].replacement == "C∞v"


def test_a_species_of_more_atoms_without_a_centre_is_not_taken_for_two():
    # C3H8 is refused as a molecular formula; nothing about it is judged
    assert not with_code("{C3H8: polar}", "wrong-polarity")
