"""read_smiles against RDKit's own reading and facts of the trade.

RDKit (a general-purpose cheminformatics toolkit) is the reference for atom
counts, formulas, charges and radicals; the expected structures (benzene's
three double bonds, the equal bonds of carboxylate and nitro groups, the
shapes of hypervalent fluorides) are common practice, no source.
"""

from __future__ import annotations

import random

import pytest
from rdkit import Chem
from rdkit.Chem import rdMolDescriptors

from notelsp.chem.molecule import Molecule
from notelsp.chem.smiles import read_smiles

# SMILES RDKit reads with its full valence check: our reading must agree with it atom for atom
ORDINARY = [
    "C", "O", "N", "CCO", "CC(=O)O", "CC(=O)[O-]", "C[N+](=O)[O-]", "c1ccccc1", "c1ccncc1", "c1cc[nH]c1",
    "c1ccoc1", "c1ccsc1", "Nc1ccccc1", "CC(=O)N", "C=C", "C#C", "C=C=C", "CC#N", "[NH4+]", "[OH-]", "[CH3]",
    "[CH2]", "C[CH2]", "O=S(=O)(O)O", "FS(F)(F)(F)(F)F", "FP(F)(F)(F)F", "F[Xe]F", "CC(C)Cc1ccc(cc1)C(C)C(=O)O",
    "[2H]C([2H])([2H])[2H]", "C1CC1", "C1=CC1", "O=C1CCCCC1", "OC(=O)c1ccccc1O",
]

HYPERVALENT = {  # SMILES -> (centre, number of neighbours, lone pairs by our count); common practice, no source
    "F[S](F)(F)F": ("S", 4, 1),
    "F[Cl](F)F": ("Cl", 3, 2),
    "FCl(F)F": ("Cl", 3, 2),
    "F[Xe](F)(F)F": ("Xe", 4, 2),
    "FP(F)(F)(F)F": ("P", 5, 0),
    "F[Br](F)(F)(F)F": ("Br", 5, 1),
    "F[I](F)(F)(F)(F)(F)F": ("I", 7, 0),
    "F[Xe](F)(F)(F)(F)F": ("Xe", 6, 1),
}


def formula_of(molecule: Molecule) -> dict[str, int]:
    counts: dict[str, int] = {}
    for atom in molecule.atoms:
        counts[atom.element] = counts.get(atom.element, 0) + 1
    return counts


@pytest.mark.parametrize("smiles", ORDINARY)
def test_atoms_bonds_charges_and_radicals_agree_with_rdkit(smiles):
    molecule = read_smiles(smiles)
    assert isinstance(molecule, Molecule), molecule
    reference = Chem.AddHs(Chem.MolFromSmiles(smiles))
    assert [a.element for a in molecule.atoms] == [a.GetSymbol() for a in reference.GetAtoms()]
    assert [a.charge for a in molecule.atoms] == [a.GetFormalCharge() for a in reference.GetAtoms()]
    assert [a.unpaired for a in molecule.atoms] == [a.GetNumRadicalElectrons() for a in reference.GetAtoms()]
    assert len(molecule.bonds) == reference.GetNumBonds()
    assert molecule.charge == Chem.GetFormalCharge(reference)
    # every atom's valence (its Kekulé bond orders) is the one RDKit computes
    for index, atom in enumerate(reference.GetAtoms()):
        assert molecule.bond_order_sum(index) == atom.GetValence(Chem.ValenceType.EXPLICIT), (smiles, index)


@pytest.mark.parametrize("smiles", ORDINARY)
def test_formula_agrees_with_rdkit(smiles):
    molecule = read_smiles(smiles)
    reference = rdMolDescriptors.CalcMolFormula(Chem.MolFromSmiles(smiles))
    written = "".join(f"{element}{'' if n == 1 else n}" for element, n in _hill(formula_of(molecule)))
    charge = molecule.charge
    if charge:
        written += ("+" if charge > 0 else "-") + (str(abs(charge)) if abs(charge) > 1 else "")
    assert written == reference


def _hill(counts: dict[str, int]) -> list[tuple[str, int]]:
    if "C" in counts:
        first = [(e, counts[e]) for e in ("C", "H") if e in counts]
        return first + sorted((e, n) for e, n in counts.items() if e not in ("C", "H"))
    return sorted(counts.items())


def test_benzene_keeps_one_kekule_structure_with_every_ring_bond_delocalised():
    benzene = read_smiles("c1ccccc1")
    ring = [b for b in benzene.bonds if benzene.atoms[b.first].element == benzene.atoms[b.second].element == "C"]
    assert len(ring) == 6 and all(b.delocalised for b in ring)
    assert sorted(b.order for b in ring) == [1, 1, 1, 2, 2, 2]
    assert all(benzene.bond_order_sum(i) == 4 for i, a in enumerate(benzene.atoms) if a.element == "C")
    assert not any(b.delocalised for b in benzene.bonds if "H" in (benzene.atoms[b.first].element,
                                                                     benzene.atoms[b.second].element))


@pytest.mark.parametrize("smiles, centre", [("CC(=O)[O-]", "C2"), ("C[N+](=O)[O-]", "N"),
                                            ("CS(=O)(=O)[O-]", "S")])
def test_groups_whose_resonance_forms_swap_bonds_are_delocalised(smiles, centre):
    molecule = read_smiles(smiles)
    index = molecule.index_of(centre)
    oxygens = [other for other in molecule.neighbours(index) if molecule.atoms[other].element == "O"]
    assert oxygens and all(molecule.bond_between(index, other).delocalised for other in oxygens)


@pytest.mark.parametrize("smiles", ["CC(=O)O", "CC(=O)OC", "C[N+](C)(C)[O-]", "O=S=O"])
def test_groups_with_one_resonance_form_are_not_marked(smiles):
    assert not any(b.delocalised for b in read_smiles(smiles).bonds)


@pytest.mark.parametrize("smiles, expected", sorted(HYPERVALENT.items()))
def test_hypervalent_main_group_smiles_are_read_and_counted_by_us(smiles, expected):
    element, neighbours, lone_pairs = expected
    molecule = read_smiles(smiles)
    assert isinstance(molecule, Molecule), molecule
    index = next(i for i, a in enumerate(molecule.atoms) if a.element == element)
    assert len(molecule.neighbours(index)) == neighbours
    assert not any(a.element == "H" for a in molecule.atoms)  # no hydrogens invented to fill a valence
    assert molecule.nonbonding_electrons(index) == 2 * lone_pairs


def test_bracket_atoms_without_a_hydrogen_count_have_none():
    # SMILES rule: a bracket atom carries exactly the hydrogens written in it (OpenSMILES specification)
    sulfur = read_smiles("[S]")
    assert [a.element for a in sulfur.atoms] == ["S"]
    methylene = read_smiles("[CH2]")
    assert [a.element for a in methylene.atoms] == ["C", "H", "H"]
    assert methylene.atoms[0].unpaired == 2


def test_labels_follow_the_smiles_order_with_hydrogens_after_the_heavy_atoms():
    acid = read_smiles("CC(=O)O")
    assert [a.label for a in acid.atoms] == ["C1", "C2", "O1", "O2", "H1", "H2", "H3", "H4"]
    assert [acid.atoms[i].label for i in acid.neighbours(acid.index_of("O2"))] == ["C2", "H4"]
    assert [a.label for a in read_smiles("CC#N").atoms][:3] == ["C1", "C2", "N"]


def test_the_text_is_kept_as_the_source():
    assert read_smiles("  CCO ").source == "CCO"


@pytest.mark.parametrize("text, says", [
    ("", "empty"),
    ("   ", "empty"),
    ("C(", "not valid SMILES"),
    ("C1CC", "not valid SMILES"),
    ("[Xx]", "not valid SMILES"),
    ("c1cccc1", "Kekul"),
    ("CC.O", "disconnected"),
    ("C C", "no spaces"),
    ("*C", "wildcard"),
    ("{SF4}", "not valid SMILES"),
])
def test_bad_input_gets_a_reason_not_an_exception(text, says):
    found = read_smiles(text)
    assert isinstance(found, str) and says in found


def test_random_text_from_the_smiles_alphabet_never_raises():
    alphabet = "CNOSPFIclnos[]()=#@+-123456789%HBrXe.:/\\*"
    generator = random.Random(16)
    for _ in range(2000):
        text = "".join(generator.choice(alphabet) for _ in range(generator.randint(1, 14)))
        found = read_smiles(text)
        assert isinstance(found, (str, Molecule))


def test_a_molecule_too_large_to_analyse_centre_by_centre_is_refused_with_the_count():
    from notelsp.chem.smiles import MAX_ATOMS

    chain = "C" * (MAX_ATOMS // 3 + 1)  # CnH2n+2: more than MAX_ATOMS atoms with hydrogens
    found = read_smiles(chain)
    assert isinstance(found, str) and f"up to {MAX_ATOMS} atoms" in found and "..." in found
    assert isinstance(read_smiles("C" * 100), Molecule)
