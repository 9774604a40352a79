"""Molecules whose claims were once judged against the wrong structure, each now judged right.

Every answer below is the organic chemist's usual picture of the molecule (common practice,
no source): acetic acid's methyl C tetrahedral and carboxyl C trigonal planar, its OH oxygen
bent with two lone pairs; nitrous acid HO-N=O (N bent, one lone pair; the H on O);
hydroxylamine's N pyramidal with one lone pair; formic acid's C trigonal planar; isocyanic
acid H-N=C=O (H on N, N bent); fulminate C≡N+-O- (N the centre, linear); an amide N planar;
allene's central C linear and sp; ethene D2h and nonpolar, ethane staggered D3d, benzene D6h,
acetic acid Cs and polar, hexafluoroethane nonpolar.

The trust property: true claims give no warning or error, and a fix offered for a false
claim writes the right claim, which then passes.
"""

from __future__ import annotations

import pytest

from notelsp.review.findings import Severity

from .helpers import fixed, review, with_code

# formula -> claims true of it (common practice, no source)
TRUE_CLAIMS = {
    "CH3COOH": "C1 tetrahedral, C1 sp3, C2 trigonal planar, C2 sp2, O2 bent, O2 has 2 lone pairs, "
               "O1 has 2 lone pairs, H-C1-H 109°, O=C-O 123°, Cs, polar",
    "CH3CO2H": "C1 tetrahedral, C1 sp3, C2 trigonal planar, C2 sp2, O2 bent, O2 has 2 lone pairs, Cs, polar",
    "HCOOCH3": "C1 trigonal planar, C1 sp2, O2 bent, O2 has 2 lone pairs, C2 tetrahedral, C2 sp3, polar",
    "HNO2": "N bent, N has 1 lone pair, N sp2, O2 bent, H-O-N 102°, O-N-O 111°, polar",
    "NH2OH": "N trigonal pyramidal, N has 1 lone pair, N sp3, O bent, O has 2 lone pairs, H-N-H 107°, polar",
    "HC(O)OH": "C trigonal planar, C sp2, C has 0 lone pairs, O2 bent, O=C-O 125°, polar, diamagnetic",
    "HNCO": "N bent, N has 1 lone pair, N sp2, H-N-C 124°, C linear, C sp, polar",
    "CNO-": "N linear, N sp, N has 0 lone pairs, C has 1 lone pair, C-N-O 180°, polar",
    "NH2(COCH3)": "N trigonal planar, N sp2, C1 trigonal planar, C1 sp2, C2 tetrahedral, polar",
    "C(CH2)2": "C1 linear, C1 sp, C1 has 0 lone pairs, C2 trigonal planar, C2 sp2, D2d, nonpolar",
    "CH2=C=CH2": "C2 linear, C2 sp, C1 trigonal planar, C1 sp2, C=C=C 180°, D2d, nonpolar",
    "CH2=CH2": "trigonal planar, sp2, H-C-H 117°, D2h, nonpolar",
    "HC≡CH": "linear, sp, H-C-C 180°, D∞h, nonpolar",
    "C2H4": "trigonal planar, sp2, D2h, nonpolar",
    "C2H6": "tetrahedral, sp3, H-C-H 109.5°, D3d, nonpolar",
    'smiles "c1ccccc1"': "trigonal planar, sp2, C-C-C 120°, D6h, nonpolar",
    "C2F6": "tetrahedral, sp3, F-C-F 109°, D3d, nonpolar",
}

# (formula, a false claim, the right claim a fix writes) - the false claims are the answers the
# composition model once gave (issue: "Molecules, not formulas"); the right ones common practice, no source
FALSE_CLAIMS = [
    ("CH3COOH", "O2 tetrahedral", "O2 bent"),
    ("CH3COOH", "O2 has 0 lone pairs", "O2 has 2 lone pairs"),
    ("CH3COOH", "C2 tetrahedral", "C2 trigonal planar"),
    ("CH3COOH", "C2 sp3", "C2 sp2"),
    ("CH3COOH", "C1 trigonal planar", "C1 tetrahedral"),
    ("CH3CO2H", "O2 tetrahedral", "O2 bent"),
    ("CH3CO2H", "O2 has 0 lone pairs", "O2 has 2 lone pairs"),
    ("CH3CO2H", "C2 tetrahedral", "C2 trigonal planar"),
    ("HCOOCH3", "O2 tetrahedral", "O2 bent"),
    ("HCOOCH3", "O2 has 0 lone pairs", "O2 has 2 lone pairs"),
    ("HCOOCH3", "C1 tetrahedral", "C1 trigonal planar"),
    ("HCOOCH3", "C2 trigonal planar", "C2 tetrahedral"),
    ("HNO2", "N trigonal planar", "N bent"),
    ("HNO2", "N has 0 lone pairs", "N has 1 lone pair"),
    ("HNO2", "N sp3", "N sp2"),
    ("NH2OH", "N tetrahedral", "N trigonal pyramidal"),
    ("NH2OH", "N has 0 lone pairs", "N has 1 lone pair"),
    ("HC(O)OH", "C trigonal pyramidal", "C trigonal planar"),
    ("HC(O)OH", "C sp3", "C sp2"),
    ("HC(O)OH", "C has 1 lone pair", "C has 0 lone pairs"),  # once read as a radical, pyramidal carbon
    ("HNCO", "N linear", "N bent"),
    ("HNCO", "N sp", "N sp2"),
    ("CNO-", "N bent", "N linear"),
    ("CNO-", "N sp2", "N sp"),
    ("NH2(COCH3)", "N trigonal pyramidal", "N trigonal planar"),
    ("NH2(COCH3)", "N sp3", "N sp2"),  # once accepted as the steric number's label though the N is held planar
    ("C(CH2)2", "C1 bent", "C1 linear"),
    ("C(CH2)2", "C1 sp2", "C1 sp"),
    ("CH2=C=CH2", "C2 bent", "C2 linear"),
    ("CH2=C=CH2", "C2 sp2", "C2 sp"),
    ("CH2=CH2", "tetrahedral", "trigonal planar"),
    ("CH2=CH2", "sp3", "sp2"),
    ("CH2=CH2", "C2v", "D2h"),
    ("CH2=CH2", "polar", "nonpolar"),
    ("HC≡CH", "bent", "linear"),
    ("HC≡CH", "sp2", "sp"),
    ("HC≡CH", "C2v", "D∞h"),
    ("C2H4", "C2v", "D2h"),
    ("C2H4", "polar", "nonpolar"),
    ("C2H6", "C3v", "D3d"),
    ("C2H6", "polar", "nonpolar"),
    ('smiles "c1ccccc1"', "C6v", "D6h"),
    ('smiles "c1ccccc1"', "polar", "nonpolar"),
    ("CH3COOH", "C2v", "Cs"),
    ("CH3COOH", "nonpolar", "polar"),
    ("C2F6", "polar", "nonpolar"),
]

# (formula, a false claim about where an atom is) - no single right claim to write, so no fix
MISPLACED_ATOMS = [
    ("HNO2", "H-N-O 120°"),  # the H is on O, not N
    ("HNCO", "H-O-C 110°"),  # isocyanic acid, not cyanic acid: O is terminal
    ("HNCO", "H-C-O 180°"),  # C is bonded to N and O only
    ("CNO-", "C-O-N 180°"),  # N is the centre; O is terminal
    ("NH2OH", "O-N-O 107°"),  # one O
]


def _warnings_and_errors(note: str) -> list[tuple[str, str]]:
    return [(f.code, f.message) for f in review(note).findings if f.severity in (Severity.WARNING, Severity.ERROR)]


@pytest.mark.parametrize("formula", sorted(TRUE_CLAIMS))
def test_true_claims_give_no_warning_or_error(formula):
    assert _warnings_and_errors(f"{{{formula}: {TRUE_CLAIMS[formula]}}}") == []


@pytest.mark.parametrize("formula", sorted(TRUE_CLAIMS))
def test_each_true_claim_alone_passes(formula):
    # one claim per annotation too: a claim that names no atom is read the same alone as in a list
    for claim in TRUE_CLAIMS[formula].split(", "):
        assert _warnings_and_errors(f"{{{formula}: {claim}}}") == [], claim


@pytest.mark.parametrize("formula, claim, right", FALSE_CLAIMS)
def test_a_false_claim_is_flagged_and_its_fix_writes_the_right_claim(formula, claim, right):
    note = f"{{{formula}: {claim}}}"
    flagged = [f for f in review(note).findings if f.severity in (Severity.WARNING, Severity.ERROR)]
    assert len(flagged) == 1, [(f.code, f.message) for f in review(note).findings]
    finding = flagged[0]
    assert finding.fixes, (finding.code, finding.message)
    for which in range(len(finding.fixes)):
        repaired = fixed(note, finding, which)
        assert repaired == f"{{{formula}: {right}}}"  # never rewritten into another wrong claim
        assert _warnings_and_errors(repaired) == []


@pytest.mark.parametrize("formula, claim", MISPLACED_ATOMS)
def test_an_atom_placed_where_the_molecule_has_none_is_named_and_not_rewritten(formula, claim):
    note = f"{{{formula}: {claim}}}"
    (finding,) = with_code(note, "unknown-atom")
    assert finding.fixes == ()
    assert [f.code for f in review(note).findings] == ["unknown-atom"]  # the claim is judged against no centre


def test_formic_acid_is_no_radical():
    # 18 valence electrons, all paired (common practice, no source); once read as a radical carbon
    finding = with_code("{HC(O)OH: paramagnetic}", "wrong-unpaired-electrons")
    assert len(finding) == 1


@pytest.mark.parametrize("formula, atom, neighbours", [
    ("HNO2", "O2", {"H", "N"}),  # H on O: HO-N=O
    ("HNCO", "N", {"H", "C"}),  # H on N: H-N=C=O
    ("CNO-", "N", {"C", "O"}),  # N between C and O
    ("C(CH2)2", "C1", {"C2", "C3"}),  # the allene's central carbon
])
def test_the_molecule_is_the_one_chemists_mean(formula, atom, neighbours):
    from notelsp.chem.analysis import analyse
    from notelsp.notation.transform import parse_formula

    molecule = analyse(parse_formula(formula)).molecule.molecule
    index = molecule.index_of(atom)
    assert {molecule.atoms[j].label for j in molecule.neighbours(index)} == neighbours
