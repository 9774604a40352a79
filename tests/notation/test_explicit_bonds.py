"""Explicit bonds in formulas: CH2=CH2, HC≡CH, H3C-CH3 (BondMark parts), and what they must not break.

Each formula is paired with the SMILES of the molecule chemists mean by it (the pairing is
common practice, no source). RDKit, a general-purpose toolkit, reads the SMILES: the formula's
composition must be the molecule's, and each written bond must have the order RDKit gives the
bond between the heavy atoms on either side of it.
"""

import pytest
from rdkit import Chem

from notelsp.notation import NotationSyntaxError, parse_formula, scan
from notelsp.notation.model import Atom, BondMark, Group
from notelsp.notation.transform import parse_body, parse_formulas

# (formula as written, SMILES of the intended molecule, heavy-atom indices in the SMILES joined by each written bond)
BONDED = [
    ("CH2=CH2", "C=C", [(0, 1)]),
    ("H2C=CH2", "C=C", [(0, 1)]),
    ("HC≡CH", "C#C", [(0, 1)]),
    ("HC#CH", "C#C", [(0, 1)]),
    ("CH2=C=CH2", "C=C=C", [(0, 1), (1, 2)]),
    ("CH2=CHCl", "C=CCl", [(0, 1)]),
    ("H3C-CH3", "CC", [(0, 1)]),
    ("N≡N", "N#N", [(0, 1)]),
    ("O=C=O", "O=C=O", [(0, 1), (1, 2)]),
    ("HC≡N", "C#N", [(0, 1)]),
]

_RDKIT_ORDERS = {Chem.BondType.SINGLE: 1, Chem.BondType.DOUBLE: 2, Chem.BondType.TRIPLE: 3}


def _bond_marks(parts):
    for part in parts:
        if isinstance(part, BondMark):
            yield part
        elif isinstance(part, Group):
            yield from _bond_marks(part.parts)


@pytest.mark.parametrize(("written", "smiles", "bonds"), BONDED)
def test_composition_matches_the_molecule(written, smiles, bonds):
    molecule = Chem.AddHs(Chem.MolFromSmiles(smiles))
    reference: dict[str, int] = {}
    for atom in molecule.GetAtoms():
        reference[atom.GetSymbol()] = reference.get(atom.GetSymbol(), 0) + 1
    assert parse_formula(written).composition() == reference


@pytest.mark.parametrize(("written", "smiles", "bonds"), BONDED)
def test_each_written_bond_has_the_molecule_bond_order(written, smiles, bonds):
    molecule = Chem.MolFromSmiles(smiles)
    marks = list(_bond_marks(parse_formula(written).parts))
    expected = [_RDKIT_ORDERS[molecule.GetBondBetweenAtoms(a, b).GetBondType()] for a, b in bonds]
    assert [mark.order for mark in marks] == expected


def test_bond_spans_are_exact_and_parts_keep_their_order():
    text = "CH2=CHCl"
    formula = parse_formula(text)
    assert [type(part).__name__ for part in formula.parts] == ["Atom", "Atom", "BondMark", "Atom", "Atom", "Atom"]
    mark = formula.parts[2]
    assert text[mark.span.start : mark.span.end] == "="
    assert formula.text == text and formula.charge == 0


def test_a_bond_may_open_a_group_as_chemists_write_carbonyls():
    formula = parse_formula("CH3C(=O)CH3")
    group = next(part for part in formula.parts if isinstance(part, Group))
    assert isinstance(group.parts[0], BondMark) and group.parts[0].order == 2
    assert formula.composition() == {"C": 3, "H": 6, "O": 1}


@pytest.mark.parametrize(
    ("written", "message"),
    [
        ("=CH2", "no atom before it"),
        ("CH2=", "no atom after it"),
        ("CH2==CH2", "two bonds in a row"),
        ("CH2=≡CH2", "two bonds in a row"),
        ("C(CH2=)2", "no atom after it"),
    ],
)
def test_misplaced_bonds_are_refused_with_their_place(written, message):
    with pytest.raises(NotationSyntaxError) as raised:
        parse_formula(written)
    error = raised.value.error
    assert error.code == "malformed-formula" and message in error.message
    assert written[error.span.start : error.span.end] in "=≡"


def test_a_space_around_a_bond_is_refused():
    with pytest.raises(NotationSyntaxError) as raised:
        parse_formula("CH2 = CH2")
    assert raised.value.error.code == "malformed-formula"


@pytest.mark.parametrize(("written", "charge"), [("OH-", -1), ("CH3-", -1), ("NH2-", -1), ("SO4^2-", -2), ("PO4 3−", -3)])
def test_a_hyphen_with_nothing_after_it_stays_a_charge(written, charge):
    formula = parse_formula(written)
    assert formula.charge == charge
    assert not list(_bond_marks(formula.parts))


def test_bonds_in_a_comparison_and_before_the_claims():
    parsed = parse_body("CH2=CH2 vs HC≡CH: C-H shorter, angle = 120")
    assert [formula.text for formula in parsed.formulas] == ["CH2=CH2", "HC≡CH"]
    assert parsed.errors == ()
    assert len(parsed.claims) == 2  # the claims' '=' is 'equals', never a bond of the formula


def test_centre_of_a_bonded_formula():
    formula = parse_formula("CH2=CHCl @Cl")
    assert formula.centre == "Cl" and formula.text == "CH2=CHCl"


@pytest.mark.parametrize("text", ["Ethene {CH2=CH2: trigonal planar} and", "{HC≡CH: linear}", "{H2C=CH2}", "x {CH2=C=CH2} y"])
def test_the_scanner_finds_annotations_with_bonds(text):
    found = scan(text, "markdown").annotations
    assert len(found) == 1
    formula = found[0].formula
    assert formula is not None and any(isinstance(part, BondMark) for part in formula.parts)


def test_hash_bond_in_a_bonding_block_is_not_a_comment():
    text = "```bonding\nHC#CH: linear  # acetylene\n# a whole-line comment\nH2O: bent #no space before\n```\n"
    annotations = scan(text, "markdown").annotations
    assert [a.formula.text for a in annotations] == ["HC#CH", "H2O"]
    assert [c.text for c in annotations[0].claims] == ["linear"]
    assert annotations[1].errors == ()  # "bent #no..." : the '#' after a space starts the comment


def test_existing_formulas_parse_as_before():
    formulas, errors = parse_formulas("PCl2(CH3)3")
    assert errors == ()
    assert all(isinstance(part, (Atom, Group)) for part in formulas[0].parts)
