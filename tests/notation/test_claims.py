"""Claims: every kind, its common spellings, its normalised value, and its errors."""

import pytest

from notelsp.notation.model import (
    AngleClaim,
    AngleOrderClaim,
    BondLengthClaim,
    ElectronGeometryClaim,
    HybridizationClaim,
    IndexClaim,
    IsomerCountClaim,
    LonePairClaim,
    PlacementClaim,
    PointGroupClaim,
    PolarityClaim,
    SCharacterClaim,
    ShapeClaim,
)
from notelsp.notation.transform import parse_claim


def claim_of(text):
    claim, errors = parse_claim(text)
    assert errors == (), errors
    assert claim.text == text.strip()
    return claim


def error_of(text):
    claim, errors = parse_claim(text)
    assert claim is None
    assert len(errors) == 1
    return errors[0]


@pytest.mark.parametrize(
    ("text", "shape"),
    [
        ("linear", "linear"), ("bent", "bent"), ("angular", "bent"), ("V-shaped", "bent"),
        ("trigonal planar", "trigonal-planar"), ("trigonal-pyramidal", "trigonal-pyramidal"),
        ("Tetrahedral", "tetrahedral"), ("seesaw", "seesaw"), ("see-saw", "seesaw"),
        ("T-shaped", "t-shaped"), ("trigonal bipyramidal", "trigonal-bipyramidal"),
        ("square pyramidal", "square-pyramidal"), ("square planar", "square-planar"),
        ("octahedral", "octahedral"), ("pentagonal bipyramidal", "pentagonal-bipyramidal"),
        ("pentagonal planar", "pentagonal-planar"), ("pentagonal pyramidal", "pentagonal-pyramidal"),
    ],
)
def test_shapes(text, shape):
    assert claim_of(text) == ShapeClaim(text, claim_of(text).span, shape)


@pytest.mark.parametrize("lead", ["electron geometry", "electron-domain geometry", "electron pair geometry"])
def test_electron_geometry(lead):
    claim = claim_of(f"{lead} trigonal bipyramidal")
    assert isinstance(claim, ElectronGeometryClaim) and claim.geometry == "trigonal-bipyramidal"


@pytest.mark.parametrize(
    ("text", "label", "index"),
    [
        ("sp", "sp", None), ("sp2", "sp2", None), ("sp²", "sp2", None), ("sp3", "sp3", None),
        ("sp³", "sp3", None), ("sp3d", "sp3d", None), ("sp³d", "sp3d", None), ("sp3d2", "sp3d2", None),
        ("sp³d²", "sp3d2", None), ("sp3d3", "sp3d3", None), ("sp^2.4", None, 2.4), ("sp2.4", None, 2.4),
        ("unhybridized", "unhybridized", None), ("no hybridization", "unhybridized", None),
        ("pure p", "unhybridized", None), ("sp3 hybridized", "sp3", None), ("sp3-hybridised", "sp3", None),
    ],
)
def test_hybridization(text, label, index):
    claim = claim_of(text)
    assert isinstance(claim, HybridizationClaim)
    assert (claim.label, claim.index) == (label, index)


def test_unknown_hybridization_label():
    error = error_of("sp3d4")  # "sp4" is a Coulson index (sp^4), see below
    assert error.code == "unknown-claim"


@pytest.mark.parametrize(
    ("text", "subject", "site", "quantity"),
    [
        ("F axial", "F", "axial", "all"),
        ("one F equatorial", "F", "equatorial", "one"),
        ("both F axial", "F", "axial", "all"),
        ("two Cl axial", "Cl", "axial", 2),
        ("lone pair equatorial", "lone-pair", "equatorial", "all"),
        ("lone pairs equatorial", "lone-pair", "equatorial", "all"),
        ("both lone pairs equatorial", "lone-pair", "equatorial", "all"),
        ("Cl trans", "Cl", "trans", "all"),
        ("lone pairs trans", "lone-pair", "trans", "all"),
        ("F cis", "F", "cis", "all"),
        ("Cl fac", "Cl", "fac", "all"),
        ("Cl mer", "Cl", "mer", "all"),
        ("F apical", "F", "apical", "all"),
        ("F basal", "F", "basal", "all"),
        ("fluorine equatorial", "F", "equatorial", "all"),
        ("Cs axial", "Cs", "axial", "all"),
    ],
)
def test_placements(text, subject, site, quantity):
    claim = claim_of(text)
    assert isinstance(claim, PlacementClaim)
    assert (claim.subject, claim.site, claim.quantity) == (subject, site, quantity)


def test_misspelt_element_name_suggests_the_name():
    error = error_of("flourine axial")
    assert error.code == "unknown-element" and error.suggestion == "fluorine"


@pytest.mark.parametrize(
    ("text", "polar"),
    [("polar", True), ("nonpolar", False), ("non-polar", False), ("zero dipole", False), ("no dipole", False), ("dipole", True)],
)
def test_polarity(text, polar):
    assert claim_of(text) == PolarityClaim(text, claim_of(text).span, polar)


@pytest.mark.parametrize(
    ("text", "low", "high", "atoms", "approximate"),
    [
        ("angle 107°", 107, 107, None, False),
        ("H-N-H 107°", 107, 107, ("H", "N", "H"), False),
        ("H-N-H = 107°", 107, 107, ("H", "N", "H"), False),
        ("~90°", 90, 90, None, True),
        ("≈90°", 90, 90, None, True),
        ("104-106°", 104, 106, None, False),
        ("104–106°", 104, 106, None, False),
        ("107 deg", 107, 107, None, False),
        ("107 degrees", 107, 107, None, False),
        ("F-S-F 101.5°", 101.5, 101.5, ("F", "S", "F"), False),
    ],
)
def test_angles(text, low, high, atoms, approximate):
    claim = claim_of(text)
    assert isinstance(claim, AngleClaim)
    assert (claim.low, claim.high, claim.atoms, claim.approximate) == (low, high, atoms, approximate)


@pytest.mark.parametrize("relation", ["<", ">", "="])
def test_angle_order(relation):
    text = f"F-C-F {relation} H-C-H"
    claim = claim_of(text)
    assert isinstance(claim, AngleOrderClaim)
    assert (claim.left, claim.relation, claim.right) == (("F", "C", "F"), relation, ("H", "C", "H"))
    assert text[claim.left_span.start : claim.left_span.end] == "F-C-F"
    assert text[claim.right_span.start : claim.right_span.end] == "H-C-H"


@pytest.mark.parametrize("text", ["i = 1.41", "i=1.41", "index 1.41"])
def test_index(text):
    assert claim_of(text) == IndexClaim(text, claim_of(text).span, 1.41)


@pytest.mark.parametrize("text", ["s-character 25%", "25% s", "s character 25 %", "s-character = 25%"])
def test_s_character(text):
    claim = claim_of(text)
    assert isinstance(claim, SCharacterClaim) and claim.percent == 25


def test_s_character_with_bond():
    assert claim_of("s-character 25% in C-F").ligand == "F"


@pytest.mark.parametrize(
    ("text", "count"),
    [("2 lone pairs", 2), ("one lone pair", 1), ("no lone pairs", 0), ("lone pairs: 2", 2), ("a lone pair", 1)],
)
def test_lone_pairs(text, count):
    assert claim_of(text) == LonePairClaim(text, claim_of(text).span, count)


@pytest.mark.parametrize(("text", "relation"), [("C-C shorter", "shorter"), ("C-C longer", "longer"), ("C-C equal", "equal")])
def test_bond_length(text, relation):
    claim = claim_of(text)
    assert isinstance(claim, BondLengthClaim) and (claim.bond, claim.relation) == (("C", "C"), relation)


@pytest.mark.parametrize(
    ("text", "symbol"),
    [("C2v", "C2v"), ("D3h", "D3h"), ("Td", "Td"), ("Oh", "Oh"), ("C∞v", "Cinfv"), ("Cinfv", "Cinfv"),
     ("D∞h", "Dinfh"), ("point group C2v", "C2v"), ("Cs", "Cs")],
)
def test_point_groups(text, symbol):
    assert claim_of(text) == PointGroupClaim(text, claim_of(text).span, symbol)


@pytest.mark.parametrize(("text", "count"), [("2 isomers", 2), ("one isomer", 1), ("three isomers", 3)])
def test_isomer_count(text, count):
    assert claim_of(text) == IsomerCountClaim(text, claim_of(text).span, count)


@pytest.mark.parametrize(
    ("text", "at"),
    [("-1 lone pairs", "-1"), ("lone pairs: -1", "1"), ("angle 200°", "200"), ("0°", "0"), ("angle -5°", "5"),
     ("no isomers", "no isomers"), ("s-character 120%", "120")],
)
def test_impossible_counts(text, at):
    error = error_of(text)
    assert error.code == "impossible-count"
    assert text[error.span.start : error.span.end] == at


@pytest.mark.parametrize(
    ("text", "suggestion"),
    [("tetrahedrel", "tetrahedral"), ("trigonal planer", "trigonal planar"), ("F axail", "F axial"), ("nonpolr", "nonpolar")],
)
def test_unknown_words_suggest_the_closest(text, suggestion):
    error = error_of(text)
    assert error.code == "unknown-claim"
    assert error.suggestion == suggestion
    assert error.message == f"unknown claim '{text}'; did you mean '{suggestion}'?"


def test_unknown_claim_without_a_close_word():
    error = error_of("wibble")
    assert (error.code, error.message, error.suggestion) == ("unknown-claim", "unknown claim 'wibble'", None)


@pytest.mark.parametrize("text", ["angle", "i =", "point group", "lone pairs"])
def test_known_words_in_a_wrong_form_are_malformed(text):
    assert error_of(text).code == "malformed-claim"


def test_offsets_are_shifted_and_trimmed():
    claim, _ = parse_claim("  bent ", 10)
    assert claim.span.start == 12 and claim.span.end == 16


@pytest.mark.parametrize(("text", "index"), [("sp^4", 4.0), ("sp4", 4.0), ("sp^2.4", 2.4), ("sp12", 12.0)])
def test_whole_number_coulson_index_is_a_fractional_hybridization(text, index):
    from notelsp.notation.transform import parse_claim
    from notelsp.notation.model import HybridizationClaim

    claim, errors = parse_claim(text)
    assert not errors
    assert isinstance(claim, HybridizationClaim) and claim.label is None and claim.index == index
