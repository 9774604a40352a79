"""SMILES species: ``{smiles "CC(=O)O": C2 trigonal planar}``.

The SMILES between the quotes is kept verbatim; RDKit (a general-purpose toolkit, and the
reader the chemistry uses) must read back the same molecule from what the notation kept,
however many of Markdown's and the notation's own characters the SMILES holds.
"""

import pytest
from rdkit import Chem

from notelsp.notation import NotationSyntaxError, parse_formula, scan
from notelsp.notation.model import ShapeClaim
from notelsp.notation.transform import parse_body

# SMILES chosen for the characters they hold: [ ] = # @ : ( ) digits, charges, / and \
SMILES = [
    "CC(=O)O",  # acetic acid
    "C#N",  # hydrogen cyanide
    "C[N+](C)(C)C",  # tetramethylammonium: [N+](C) reads as a Markdown link
    "c1ccccc1",  # benzene, aromatic
    "C1=CC=CC=C1",  # benzene, Kekulé
    "N[C@@H](C)C(=O)O",  # L-alanine
    "F/C=C/F",  # trans-1,2-difluoroethene
    "F/C=C\\F",  # cis-1,2-difluoroethene
    "[NH4+]",
    "O=C([O-])[O-]",  # carbonate
    "c1cc:cc1",  # written aromatic bond ':' (RDKit reads it as cyclopentadienyl-like ring; only the text matters)
]


def _canonical(smiles):
    molecule = Chem.MolFromSmiles(smiles, sanitize=False)
    assert molecule is not None, smiles
    return Chem.MolToSmiles(molecule)


@pytest.mark.parametrize("smiles", SMILES)
def test_smiles_is_kept_verbatim(smiles):
    parsed = parse_body(f'smiles "{smiles}": tetrahedral')
    assert parsed.errors == ()
    (formula,) = parsed.formulas
    assert formula.smiles == smiles and formula.text == smiles
    assert formula.parts == () and formula.charge == 0
    assert _canonical(formula.smiles) == _canonical(smiles)
    assert [claim.text for claim in parsed.claims] == ["tetrahedral"]


@pytest.mark.parametrize("smiles", SMILES)
def test_the_scanner_reads_smiles_annotations_in_markdown(smiles):
    text = f'We made it again {{smiles "{smiles}": bent}} on Tuesday, see [the log](run7.md).'
    (annotation,) = scan(text, "markdown").annotations
    assert annotation.formula.smiles == smiles
    assert text[annotation.formula.span.start : annotation.formula.span.end] == smiles
    (claim,) = annotation.claims
    assert isinstance(claim, ShapeClaim) and text[claim.span.start : claim.span.end] == "bent"


def test_a_colon_inside_the_quotes_is_not_the_separator():
    parsed = parse_body('smiles "c1cc:cc1": C1 sp2')
    assert parsed.formulas[0].smiles == "c1cc:cc1"
    assert parsed.has_colon and [(c.atom, c.text) for c in parsed.claims] == [("C1", "sp2")]


@pytest.mark.parametrize("marker", ["smiles", "SMILES", "Smiles"])
def test_the_marker_is_case_insensitive(marker):
    assert parse_formula(f'{marker} "CCO"').smiles == "CCO"


def test_smiles_on_either_side_of_vs():
    parsed = parse_body('smiles "CCO" vs CH3OCH3: C-O shorter')
    assert parsed.errors == ()
    assert [f.smiles for f in parsed.formulas] == ["CCO", None]
    parsed = parse_body('C2H6 vs smiles "C=C": C-C longer')
    assert [f.smiles for f in parsed.formulas] == [None, "C=C"]


def test_smiles_in_a_bonding_block_keeps_its_hash():
    text = '```bonding\nsmiles "C#N": C sp, linear   # hydrogen cyanide\n```\n'
    (annotation,) = scan(text, "markdown").annotations
    assert annotation.formula.smiles == "C#N"
    assert [c.text for c in annotation.claims] == ["sp", "linear"]


@pytest.mark.parametrize(
    ("body", "message", "at"),
    [
        ('smiles "CCO: bent', "no closing '\"'", '"'),
        ('smiles "CCO', "no closing '\"'", '"'),
        ('smiles "": bent', "empty SMILES", '""'),
        ('smiles "C C": bent', "space inside SMILES", " "),
        ("smiles CCO: bent", 'write the SMILES in double quotes: smiles "CCO"', "CCO"),
    ],
)
def test_malformed_smiles_species_are_refused_clearly(body, message, at):
    parsed = parse_body(body)
    assert parsed.formulas == ()
    (error,) = parsed.errors
    assert error.code == "malformed-formula" and message in error.message
    assert body[error.span.start : error.span.end] == at


def test_an_unclosed_smiles_in_prose_is_still_reported():
    text = 'The nitrile {smiles "CC#N} boiled at 82 °C.'
    (annotation,) = scan(text, "markdown").annotations
    assert annotation.errors and "no closing" in annotation.errors[0].message


def test_an_unquoted_smiles_with_claims_is_reported_with_the_quotes_as_its_fix():
    text = "Dried {smiles CC#N: C1 sp3} over sieves; {smiles and frowns} is prose."
    (annotation,) = scan(text, "markdown").annotations
    (error,) = annotation.errors
    assert text[error.span.start : error.span.end] == "CC#N" and error.suggestion == '"CC#N"'


def test_parse_formula_refuses_an_unclosed_smiles():
    with pytest.raises(NotationSyntaxError):
        parse_formula('smiles "CCO')


def test_an_overlong_smiles_is_refused():
    parsed = parse_body('smiles "' + "C" * 300 + '"')
    assert parsed.errors and parsed.errors[0].code == "formula-too-large"
