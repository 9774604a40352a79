"""Condensed structural formulas read into molecules, compared atom by atom with the
SMILES of the molecule chemists mean by them (read by RDKit, the field's
general-purpose toolkit).  Each formula-to-SMILES pairing is common practice, no source.
Formulas are read by the notation's own parser; texts it refuses (a bond with
no atom after it) are built directly, to show the reader still gives a reason."""

from __future__ import annotations

import re

import pytest

from notelsp.chem.condensed import CondensedReading, is_condensed, molecule_smiles, read_condensed
from notelsp.chem.molecule import Molecule
from notelsp.notation import parse_formula
from notelsp.notation.model import Atom, BondMark, Formula, Group, Span

Chem = pytest.importorskip("rdkit.Chem")

_TOKEN = re.compile(r"([A-Z][a-z]?)(\d*)|(\()|(\))(\d*)|([=≡#])")


def _with_bonds(text: str, charge: int) -> Formula:
    """A formula with written bonds, built directly (the same parts the notation gives: BondMark between atoms)."""
    stack: list[list] = [[]]
    opened: list[int] = []
    for match in _TOKEN.finditer(text):
        span = Span(match.start(), match.end())
        if match.group(1):
            stack[-1].append(Atom(match.group(1), int(match.group(2) or 1), span))
        elif match.group(3):
            stack.append([])
            opened.append(match.start())
        elif match.group(4):
            inner = stack.pop()
            stack[-1].append(Group(tuple(inner), int(match.group(5) or 1), Span(opened.pop(), match.end())))
        else:
            stack[-1].append(BondMark(2 if match.group(6) == "=" else 3, span))
    return Formula(text, tuple(stack[0]), charge, Span(0, len(text)))


def formula_of(text: str) -> Formula:
    """The formula as the notation reads it (written bonds included; charges as written, CNO-)."""
    return parse_formula(text)


@pytest.mark.parametrize("text", ["CH2=CHCl", "HC≡CH", "HC#CH", "CH2=C=CH2", "CH3C≡CH", "O=C=O"])
def test_direct_build_matches_the_notation(text):
    """The builder used below for texts the notation refuses gives the parts the notation gives."""
    def shape(parts):
        return [(type(p).__name__, getattr(p, "symbol", None), getattr(p, "count", None), getattr(p, "order", None))
                for p in parts]

    assert shape(_with_bonds(text, 0).parts) == shape(parse_formula(text).parts)


def rdkit_smiles(molecule: Molecule) -> str:
    """Our molecule as RDKit sees it: every atom (hydrogens included), formal charge, radical and bond order."""
    orders = {1: Chem.BondType.SINGLE, 2: Chem.BondType.DOUBLE, 3: Chem.BondType.TRIPLE}
    editable = Chem.RWMol()
    for atom in molecule.atoms:
        made = Chem.Atom(atom.element)
        made.SetFormalCharge(atom.charge)
        made.SetNumRadicalElectrons(atom.unpaired)
        made.SetNoImplicit(True)
        editable.AddAtom(made)
    for bond in molecule.bonds:
        editable.AddBond(bond.first, bond.second, orders[bond.order])
    mol = editable.GetMol()
    Chem.SanitizeMol(mol)
    return Chem.MolToSmiles(Chem.RemoveHs(mol))


def canonical(smiles: str) -> str:
    return Chem.MolToSmiles(Chem.MolFromSmiles(smiles))


def atom_count(smiles: str) -> int:
    return Chem.AddHs(Chem.MolFromSmiles(smiles)).GetNumAtoms()


# (condensed formula as chemists write it, SMILES of the molecule meant): common practice, no source
CONDENSED = [
    ("CH3COOH", "CC(=O)O"),
    ("CH3CO2H", "CC(=O)O"),
    ("CH3CH2OH", "CCO"),
    ("CH3OCH3", "COC"),
    ("(CH3)2CO", "CC(C)=O"),
    ("CH3CHO", "CC=O"),
    ("CH3CN", "CC#N"),
    ("CH3NO2", "C[N+](=O)[O-]"),
    ("HCOOCH3", "COC=O"),
    ("NH2OH", "NO"),
    ("HNO2", "ON=O"),
    ("HOCl", "OCl"),
    ("HNCO", "N=C=O"),
    ("CF3CH2OH", "OCC(F)(F)F"),
    ("(CH3)3N", "CN(C)C"),
    ("CH3C(O)NH2", "CC(N)=O"),
    ("C6H5NH2", "Nc1ccccc1"),
    ("CH2=CHCl", "C=CCl"),
    ("H2C=CH2", "C=C"),
    ("HC≡CH", "C#C"),
    ("HC#CH", "C#C"),
    ("CH2=C=CH2", "C=C=C"),
    ("HC(O)OH", "OC=O"),
    ("NH2(COCH3)", "CC(N)=O"),
    ("C2H4", "C=C"),
    ("C2H6", "CC"),
    ("C2F6", "FC(F)(F)C(F)(F)F"),
    ("N2H4", "NN"),
    ("H2O2", "OO"),
    ("CNO-", "[C-]#[N+][O-]"),
    ("C(CH2)2", "C=C=C"),
    ("CH3COCH3", "CC(C)=O"),
    ("CH3CH2CH3", "CCC"),
    ("CH3CH2CH2OH", "CCCO"),
    ("(CH3)2CHOH", "CC(C)O"),
    ("(CH3)3COH", "CC(C)(C)O"),
    ("CH3CH(OH)CH3", "CC(C)O"),
    ("CH3COCl", "CC(Cl)=O"),
    ("CH3CONH2", "CC(N)=O"),
    ("HCONH2", "NC=O"),
    ("CH3COOCH2CH3", "CCOC(C)=O"),
    ("CH3CO2CH3", "COC(C)=O"),
    ("CH3CH2OC(O)CH3", "CCOC(C)=O"),
    ("(CH3CO)2O", "CC(=O)OC(C)=O"),
    ("CH3CH2NH2", "CCN"),
    ("(CH3)2NH", "CNC"),
    ("CH3NHCH3", "CNC"),
    ("H2NCH2COOH", "NCC(=O)O"),
    ("CH3CH(NH2)COOH", "CC(N)C(=O)O"),
    ("NH2CONH2", "NC(N)=O"),
    ("(NH2)2CO", "NC(N)=O"),
    ("CH3SH", "CS"),
    ("CH3SCH3", "CSC"),
    ("(CH3)2SO", "CS(C)=O"),
    ("CH3SO2CH3", "CS(C)(=O)=O"),
    ("HOCH2CH2OH", "OCCO"),
    ("ClCH2CH2Cl", "ClCCCl"),
    ("CHCl3", "ClC(Cl)Cl"),
    ("CCl3CHO", "O=CC(Cl)(Cl)Cl"),
    ("CH3CH2Br", "CCBr"),
    ("CH3CH=CH2", "C=CC"),
    ("CH2=CHCH=CH2", "C=CC=C"),
    ("CH2=CHCN", "C=CC#N"),
    ("CH2=CHCOOH", "C=CC(=O)O"),
    ("(CH3)2C=CH2", "C=C(C)C"),
    ("CF2=CF2", "FC(F)=C(F)F"),
    ("CH3C≡CH", "CC#C"),
    ("HC≡CCH2OH", "C#CCO"),
    ("CH2=O", "C=O"),
    ("O=C=O", "O=C=O"),
    ("C6H6", "c1ccccc1"),
    ("C6H5OH", "Oc1ccccc1"),
    ("C6H5CH3", "Cc1ccccc1"),
    ("C6H5COOH", "OC(=O)c1ccccc1"),
    ("C6H5CHO", "O=Cc1ccccc1"),
    ("C6H5NO2", "O=[N+]([O-])c1ccccc1"),
    ("C6H5Cl", "Clc1ccccc1"),
    ("C6H5OCH3", "COc1ccccc1"),
    ("C6H5CN", "N#Cc1ccccc1"),
    ("CH3OH", "CO"),
    ("CH3NH2", "CN"),
    ("C2H5OH", "CCO"),
    ("CH3CH2CH2CH2OH", "CCCCO"),
    ("CH3(CH2)4CH3", "CCCCCC"),
    ("CH3CH2OCH2CH3", "CCOCC"),
    ("CH3COCH2CH3", "CCC(C)=O"),
    ("CH3CH2COOH", "CCC(=O)O"),
    ("HOOCCOOH", "OC(=O)C(=O)O"),
    ("HOOCCH2COOH", "OC(=O)CC(=O)O"),
    ("OHCCHO", "O=CC=O"),
    ("NCCH2CN", "N#CCC#N"),
    ("NH2CN", "NC#N"),
    ("HOCN", "OC#N"),
    ("CH3NCO", "CN=C=O"),
    ("CH3ONO", "CON=O"),
    ("CH3NC", "C[N+]#[C-]"),
    ("OCS", "O=C=S"),
    ("HCOOH", "OC=O"),
    ("HCO2H", "OC=O"),
    ("H2CO", "C=O"),
    ("H2CO3", "OC(=O)O"),
    ("HNO3", "O=[N+]([O-])O"),
    ("CH3COO-", "CC(=O)[O-]"),
    ("HCO2-", "O=C[O-]"),
    ("CH3NH3+", "C[NH3+]"),
    ("CH3O-", "C[O-]"),
    ("OCN-", "[O-]C#N"),
    ("CH3-CO-CH3", "CC(C)=O"),
    ("CH3-CO-OH", "CC(=O)O"),
    ("CH3-CO-NH2", "CC(N)=O"),
    ("HO-CH2-CH2-OH", "OCCO"),
    ("CH3-(CH2)4-CH3", "CCCCCC"),
    ("CH3CH2-O-CO-CH3", "CCOC(C)=O"),
    ("H2C=CH-CH=CH2", "C=CC=C"),
    ("CH3C(=O)OH", "CC(=O)O"),
    ("CH2OHCH2OH", "OCCO"),
    ("CH3CHOHCH3", "CC(C)O"),
    ("CH3CHNH2COOH", "CC(N)C(=O)O"),
    ("CH3CONHCH3", "CNC(C)=O"),
    ("CH3COSH", "CC(=O)S"),
    ("CH3CHBrCH2Br", "CC(Br)CBr"),
    ("CH3OSO3H", "COS(=O)(=O)O"),
]


# Formulas the single-centre model keeps read the same way here too (common practice, no source).
SINGLE_CENTRE = [
    ("HOCl", "OCl"),
    ("HClO", "OCl"),
    ("Cl2O", "ClOCl"),
    ("NOCl", "O=NCl"),
    ("ClO-", "[O-]Cl"),
    ("ClO2-", "[O-]Cl=O"),
    ("ClO4-", "[O-]Cl(=O)(=O)=O"),
    ("HClO4", "OCl(=O)(=O)=O"),
    ("HClO3", "OCl(=O)=O"),
    ("SO2", "O=S=O"),
    ("SO3", "O=S(=O)=O"),
    ("SO4^2-", "O=S(=O)([O-])[O-]"),
    ("H2SO4", "O=S(=O)(O)O"),
    ("H3PO4", "O=P(O)(O)O"),
    ("POCl3", "O=P(Cl)(Cl)Cl"),
    ("SOF4", "O=S(F)(F)(F)F"),
    ("SF4", "FS(F)(F)F"),
    ("SF6", "FS(F)(F)(F)(F)F"),
    ("PCl5", "ClP(Cl)(Cl)(Cl)Cl"),
    ("NO3-", "O=[N+]([O-])[O-]"),
    ("CO3^2-", "O=C([O-])[O-]"),
    ("BF4-", "F[B-](F)(F)F"),
    ("NH4+", "[NH4+]"),
    ("HCN", "C#N"),
    ("CO2", "O=C=O"),
    ("N2O", "N#[N+][O-]"),
    ("Si(CH3)4", "C[Si](C)(C)C"),
    ("B(OH)3", "OB(O)O"),
    ("CH2Cl2", "ClCCl"),
    ("H2S", "S"),
]


@pytest.mark.parametrize("text, smiles", CONDENSED + SINGLE_CENTRE)
def test_condensed_formula_reads_as_the_molecule_chemists_mean(text, smiles):
    reading = read_condensed(formula_of(text))
    assert reading.reason is None and reading.molecule is not None, reading.reason
    molecule = reading.molecule
    assert rdkit_smiles(molecule) == canonical(smiles)
    assert len(molecule.atoms) == atom_count(smiles)  # hydrogens are atoms of the graph too


def test_table_is_large_enough():
    assert len(CONDENSED) >= 60
    assert len({text for text, _ in CONDENSED}) == len(CONDENSED)


def _written_symbols(text: str) -> list[str]:
    """Element symbols in the order written, counts and groups expanded (independent of the notation parser)."""
    def expand(part: str) -> list[str]:
        out: list[str] = []
        for match in re.finditer(r"([A-Z][a-z]?)(\d*)|\(([^()]*)\)(\d*)", part):
            if match.group(1):
                out += [match.group(1)] * int(match.group(2) or 1)
            else:
                out += expand(match.group(3)) * int(match.group(4) or 1)
        return out

    return expand(text)


@pytest.mark.parametrize("text", ["CH3COOH", "HCOOCH3", "(CH3)2CO", "CH3C(O)NH2", "NH2(COCH3)", "CF3CH2OH",
                                  "C2H5OH", "HC≡CH", "C6H5NH2"])
def test_atoms_come_in_written_order_with_their_labels(text):
    molecule = read_condensed(formula_of(text)).molecule
    symbols = _written_symbols(text)
    assert [atom.element for atom in molecule.atoms] == symbols
    # labels: element with its place among that element's atoms; a unique element is bare (common practice, no source)
    for index, atom in enumerate(molecule.atoms):
        same = [k for k, s in enumerate(symbols) if s == atom.element]
        expected = atom.element if len(same) == 1 else f"{atom.element}{same.index(index) + 1}"
        assert atom.label == expected


def test_acetic_acid_bonds_by_label():
    molecule = read_condensed(formula_of("CH3COOH")).molecule
    bonds = {frozenset((molecule.atoms[b.first].label, molecule.atoms[b.second].label)): b.order
             for b in molecule.bonds}
    # the carbonyl O is the one written first after the carboxyl C, the hydroxyl O carries H4
    assert bonds[frozenset(("C2", "O1"))] == 2
    assert bonds[frozenset(("C2", "O2"))] == 1
    assert bonds[frozenset(("O2", "H4"))] == 1
    assert bonds[frozenset(("C1", "C2"))] == 1


@pytest.mark.parametrize("text, group", [("CH3COO-", ("C2", "O1", "O2")), ("CH3NO2", ("N", "O1", "O2"))])
def test_carboxylate_and_nitro_are_delocalised(text, group):
    molecule = read_condensed(formula_of(text)).molecule
    centre, *oxygens = (molecule.index_of(label) for label in group)
    flags = [b.delocalised for b in molecule.bonds if {b.first, b.second} in ({centre, o} for o in oxygens)]
    assert flags == [True, True]
    assert not any(b.delocalised for b in molecule.bonds if centre not in (b.first, b.second))


def test_benzene_ring_bonds_are_delocalised():
    molecule = read_condensed(formula_of("C6H5NH2")).molecule
    ring = [b for b in molecule.bonds if molecule.atoms[b.first].element == molecule.atoms[b.second].element == "C"]
    assert len(ring) == 6 and all(b.delocalised for b in ring)
    assert sorted(b.order for b in ring) == [1, 1, 1, 2, 2, 2]


# Texts with more than one reasonable reading: every reading listed (common practice, no source).
AMBIGUOUS = [
    ("C2H4Cl2", {"ClCCCl", "CC(Cl)Cl"}),
    ("C2H2Cl2", {"ClC=CCl", "C=C(Cl)Cl"}),
    ("C2H3F3", {"CC(F)(F)F", "FCC(F)F"}),
    ("C2H4Br2", {"BrCCBr", "CC(Br)Br"}),
    ("CH3C6H4CH3", {"Cc1ccccc1C", "Cc1cccc(C)c1", "Cc1ccc(C)cc1"}),
    ("ClC6H4Cl", {"Clc1ccccc1Cl", "Clc1cccc(Cl)c1", "Clc1ccc(Cl)cc1"}),
    ("HOOCC6H4COOH", {"OC(=O)c1ccccc1C(=O)O", "OC(=O)c1cccc(C(=O)O)c1", "OC(=O)c1ccc(C(=O)O)cc1"}),
]


@pytest.mark.parametrize("text, meanings", AMBIGUOUS)
def test_ambiguous_text_lists_every_reading(text, meanings):
    reading = read_condensed(formula_of(text))
    assert reading.molecule is None and reading.ambiguous
    assert {rdkit_smiles(m) for m in reading.readings} == {canonical(s) for s in meanings}
    assert "SMILES" in reading.reason and "bonds" in reading.reason
    # the message shows each reading as SMILES that RDKit reads as that reading
    shown = re.findall(r'smiles "([^"]*)"', reading.reason)
    assert {canonical(s) for s in shown} == {canonical(s) for s in meanings}


@pytest.mark.parametrize(
    "formula, words",
    [
        (_with_bonds("CH2=", 0), "no atom after"),
        (_with_bonds("=CH2", 0), "no atom before"),
        (_with_bonds("CH2==CH2", 0), "two written bonds"),
        (_with_bonds("CH3C=H", 0), "single bonds"),
        (parse_formula("C3H7OH"), "not written"),
        (parse_formula("C6H4Cl2"), "SMILES"),
        (parse_formula("(CH3)2"), "no atom"),
        (parse_formula("CH3C"), "usual valence"),
        (parse_formula("CH3COOH^3+"), "charge"),
        (parse_formula("CH3COONa"), "Na"),
        (parse_formula("Fe(CH3)2"), "Fe"),
        (Formula("Xx", (Atom("Xx", 1, Span(0, 2)),), 0, Span(0, 2)), "unknown element"),
        (Formula("", (), 0, Span(0, 0)), "nothing written"),
        (Formula("CCO", (), 0, Span(0, 3), smiles="CCO"), "SMILES"),
    ],
)
def test_unreadable_text_gives_a_reason(formula, words):
    reading = read_condensed(formula)
    assert reading.molecule is None and not reading.readings
    assert words in reading.reason


def test_reading_never_raises_on_odd_formulas():
    odd = [_with_bonds(text, 0) for text in ("((CH3))", "C(=O)", "()", "C#", "H", "H2", "F2", "ClF3", "CH3(CH2)0CH3",
                                             "HOO", "HO2", "H2OO", "HFO2", "HHe", "OO")]
    for formula in odd:
        assert isinstance(read_condensed(formula), CondensedReading)
        assert is_condensed(formula) in (True, False)


# Which formulas leave the single-centre model (the rule is in the module docstring).
@pytest.mark.parametrize(
    "text",
    ["CH3COOH", "CH3CO2H", "CH3CH2OH", "CH3OCH3", "(CH3)2CO", "CH3CHO", "CH3CN", "CH3NO2", "HCOOCH3", "NH2OH",
     "HNO2", "HNCO", "CF3CH2OH", "CH3C(O)NH2", "C6H5NH2", "CH2=CHCl", "HC≡CH", "HC(O)OH", "NH2(COCH3)", "CNO-",
     "C6H6", "HOCN", "OCS", "CH3OH", "HCO2H", "HClO", "C(CH2)2", "CH3C6H4CH3"],
)
def test_condensed_structures_are_dispatched_here(text):
    assert is_condensed(formula_of(text))


@pytest.mark.parametrize(
    "text",
    ["SF4", "ClF3", "XeF4", "PCl3F2", "SO4^2-", "ClO4-", "H2SO4", "HClO4", "HNO3", "H3PO4", "H2CO3", "XeO2F2",
     "SOF4", "POCl3", "Cl2O", "N2O", "I3-", "Si(CH3)4", "B(OH)3", "NH3", "H2O", "CH4", "CH2Cl2", "CHCl3", "HOCl",
     "NOCl", "HCN", "CO2", "N2H4", "C2H6", "C2F6", "BF4-", "NH4+"],
)
def test_formulas_of_the_single_centre_model_stay_there(text):
    assert not is_condensed(formula_of(text))


@pytest.mark.parametrize("text", ["CH3COOH", "C6H5NH2", "CH3NO2", "(CH3CO)2O", "CNO-"])
def test_shown_smiles_is_the_molecule(text):
    molecule = read_condensed(formula_of(text)).molecule
    assert canonical(molecule_smiles(molecule)) == rdkit_smiles(molecule)


def test_every_reading_of_generated_texts_is_a_closed_valence_structure():
    """Texts put together from formula pieces: never an exception, and every molecule read balances its
    electrons (formal charges add up to the written charge, no atom short of electrons)."""
    import random

    pieces = ["C", "H", "H2", "H3", "O", "O2", "N", "Cl", "F3", "(CH3)", "(O)", "=", "-", "#", "C6H5", "S",
              "COOH", "CHO", "CN", "NO2", "OH", "CH2", "(CH3)2", "Br", "P", "B"]
    generator = random.Random(16)
    read = 0
    for _ in range(400):
        text = "".join(generator.choice(pieces) for _ in range(generator.randint(1, 7)))
        try:
            formula = parse_formula(text)
        except Exception:
            continue  # the notation refuses it: nothing reaches the reader
        assert is_condensed(formula) in (True, False)
        reading = read_condensed(formula)
        assert isinstance(reading, CondensedReading)
        for molecule in (reading.molecule,) if reading.molecule else reading.readings:
            read += 1
            assert molecule.charge == formula.charge
            assert all(molecule.nonbonding_electrons(k) >= 0 for k in range(len(molecule.atoms)))
            assert len(molecule.atoms) == sum(formula.composition().values())
        if reading.molecule is None:
            assert reading.reason
    assert read > 50
