"""Atom names in claims: claims about one atom (``C2 trigonal planar``), and angles and bonds
between named atoms or groups (``H-C1-H 109°``, ``O=C-O 123°``, ``H-C-OH``, ``C1-C2 1.50 Å``).

An atom's name is its element with its place among that element's atoms as written, C1, C2,
O1; an element that occurs once is named by its symbol (common practice, no source). The
bond orders written in a path are checked against RDKit's reading of the same bonds in SMILES.
"""

import pytest
from rdkit import Chem

from notelsp.notation import scan
from notelsp.notation.model import (
    AngleClaim,
    AngleOrderClaim,
    AxeClaim,
    BondLengthClaim,
    BondLengthValueClaim,
    ElectronGeometryClaim,
    HybridizationClaim,
    IndexClaim,
    LonePairClaim,
    PointGroupClaim,
    SCharacterClaim,
    ShapeClaim,
)
from notelsp.notation.transform import parse_body, parse_claim


def claim_of(text):
    claim, errors = parse_claim(text)
    assert errors == (), errors
    return claim


def error_of(text):
    claim, errors = parse_claim(text)
    assert claim is None
    (error,) = errors
    return error


@pytest.mark.parametrize(
    ("text", "kind", "atom", "rest"),
    [
        ("C2 trigonal planar", ShapeClaim, "C2", "trigonal planar"),
        ("C2 is sp2", HybridizationClaim, "C2", "sp2"),
        ("C1 sp3", HybridizationClaim, "C1", "sp3"),
        ("O2 electron geometry tetrahedral", ElectronGeometryClaim, "O2", "electron geometry tetrahedral"),
        ("N has one lone pair", LonePairClaim, "N", "one lone pair"),
        ("O1 2 lone pairs", LonePairClaim, "O1", "2 lone pairs"),
        ("N bent", ShapeClaim, "N", "bent"),
        ("Cl1 tetrahedral", ShapeClaim, "Cl1", "tetrahedral"),
        ("C2 i = 2", IndexClaim, "C2", "i = 2"),
        ("C1 s-character 25%", SCharacterClaim, "C1", "s-character 25%"),
        ("S1 AX4E", AxeClaim, "S1", "AX4E"),
        ("C10 is sp3", HybridizationClaim, "C10", "sp3"),
    ],
)
def test_claims_about_one_atom(text, kind, atom, rest):
    claim = claim_of(text)
    assert isinstance(claim, kind)
    assert claim.atom == atom and text[claim.atom_span.start : claim.atom_span.end] == atom
    # the claim proper keeps its own text and span, so a fix that replaces it keeps the atom's name
    assert claim.text == rest and text[claim.span.start : claim.span.end] == rest


@pytest.mark.parametrize("text", ["trigonal planar", "sp3", "2 lone pairs", "C2v", "C2", "F axial", "H-N-H 107°"])
def test_claims_without_a_name_are_about_the_centre_as_before(text):
    assert claim_of(text).atom is None


def test_an_atom_name_alone_is_the_point_group_it_spells():
    claim = claim_of("C2")  # C2 is a Schoenflies symbol; a claim about atom C2 names something about it
    assert isinstance(claim, PointGroupClaim) and claim.symbol == "C2"


def test_named_claims_in_an_annotation_are_placed_in_the_document():
    text = "The acid {CH3COOH: C2 trigonal planar, O1 is sp2} crystallised."
    (annotation,) = scan(text, "markdown").annotations
    shape, hybrid = annotation.claims
    assert (text[shape.atom_span.start : shape.atom_span.end], text[shape.span.start : shape.span.end]) == ("C2", "trigonal planar")
    assert (text[hybrid.atom_span.start : hybrid.atom_span.end], text[hybrid.span.start : hybrid.span.end]) == ("O1", "sp2")


# (angle as written, atoms, SMILES fragment whose bonds 0-1 and 1-2 are the written ones)
ANGLES = [
    ("H-C1-H 109°", ("H", "C1", "H"), "[H]C[H]"),
    ("O=C-O 123°", ("O", "C", "O"), "O=CO"),
    ("H-C-OH 109°", ("H", "C", "OH"), "[H]CO"),
    ("N≡C-C 180°", ("N", "C", "C"), "N#CC"),
    ("C1-C2=O1 124°", ("C1", "C2", "O1"), "CC=O"),
]
_ORDERS = {Chem.BondType.SINGLE: 1, Chem.BondType.DOUBLE: 2, Chem.BondType.TRIPLE: 3}


@pytest.mark.parametrize(("text", "atoms", "smiles"), ANGLES)
def test_angles_between_named_atoms_and_groups(text, atoms, smiles):
    claim = claim_of(text)
    assert isinstance(claim, AngleClaim) and claim.atoms == atoms and claim.atom is None
    molecule = Chem.MolFromSmiles(smiles, sanitize=False)
    expected = tuple(_ORDERS[molecule.GetBondBetweenAtoms(a, b).GetBondType()] for a, b in ((0, 1), (1, 2)))
    assert claim.orders == expected


def test_angles_with_element_symbols_read_as_before():
    claim = claim_of("H-N-H 107°")
    assert claim.atoms == ("H", "N", "H") and claim.orders == (1, 1) and claim.low == 107


@pytest.mark.parametrize(
    ("text", "bond", "order", "angstrom"),
    [("C1-C2 1.50 Å", ("C1", "C2"), 1, 1.50), ("C=O 1.21 Å", ("C", "O"), 2, 1.21), ("C≡N 116 pm", ("C", "N"), 3, 1.16),
     ("C-OH 1.36 Å", ("C", "OH"), 1, 1.36), ("C-F 1.39 Å", ("C", "F"), 1, 1.39)],
)
def test_measured_bonds_between_named_atoms(text, bond, order, angstrom):
    claim = claim_of(text)
    assert isinstance(claim, BondLengthValueClaim)
    assert claim.bond == bond and claim.order == order and claim.angstrom == pytest.approx(angstrom)


def test_an_equals_sign_before_a_number_is_still_equals():
    claim = claim_of("C-C = 1.54 Å")
    assert isinstance(claim, BondLengthValueClaim) and claim.bond == ("C", "C") and claim.order == 1
    order = claim_of("H-N-H = H-P-H")
    assert isinstance(order, AngleOrderClaim) and order.relation == "="


def test_compared_bonds_and_angle_orders_name_atoms():
    claim = claim_of("C1=C2 shorter")
    assert isinstance(claim, BondLengthClaim) and claim.bond == ("C1", "C2") and claim.order == 2
    order = claim_of("O=C-O > H-C1-H")
    assert isinstance(order, AngleOrderClaim)
    assert order.left == ("O", "C", "O") and order.left_orders == (2, 1) and order.right == ("H", "C1", "H")
    assert claim_of("s-character 33% in C1-H").ligand == "H"


@pytest.mark.parametrize(
    ("text", "code", "at", "suggestion"),
    [
        ("C0 sp3", "malformed-claim", "C0", "C1"),
        ("C2v trigonal planar", "malformed-claim", "C2v", None),
        ("Xx1 bent", "unknown-element", "Xx1", None),
        ("Q bent", "unknown-element", "Q", None),
        ("H-C-OX 109°", "unknown-element", "X", None),
        ("C1-Q2 1.5 Å", "unknown-element", "Q2", None),
    ],
)
def test_unreadable_atom_names_are_refused_at_the_name(text, code, at, suggestion):
    error = error_of(text)
    assert error.code == code and text[error.span.start : error.span.end] == at
    assert error.suggestion == suggestion


def test_a_named_atom_with_an_unreadable_claim_is_refused():
    error = error_of("C2 wobbly")
    assert error.code == "unknown-claim"


def test_whole_annotation_with_names_and_smiles():
    parsed = parse_body('smiles "CC(=O)O": C2 trigonal planar, O=C-O 122°, C1-C2 1.50 Å, O2 has 2 lone pairs')
    assert parsed.errors == ()
    assert [claim.atom for claim in parsed.claims] == ["C2", None, None, "O2"]
