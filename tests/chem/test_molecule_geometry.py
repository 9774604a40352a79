"""3D models of whole molecules and their point groups.

The expected point groups and polarities are those of the usual structures in
textbooks (common practice, no source); every model's group is also compared
with pymatgen's PointGroupAnalyzer on the same coordinates, and every bond
length with the sum of RDKit's covalent radii.
"""

from __future__ import annotations

import numpy as np
import pytest
from pymatgen.core import Molecule as PymatgenMolecule
from pymatgen.symmetry.analyzer import PointGroupAnalyzer

from notelsp.chem.molecule import Molecule, MoleculeAtom, MoleculeBond
from notelsp.chem.molecule_geometry import model_3d, whole_molecule_symmetry
from notelsp.chem.smiles import read_smiles
from notelsp.chem.symmetry import normalised_symbol

# SMILES -> (point group, polar) of the usual structure (common practice, no source)
EXPECTED = {
    "C=C": ("D2h", False),  # ethylene
    "CC": ("D3d", False),  # ethane, staggered
    "c1ccccc1": ("D6h", False),  # benzene
    "CC(=O)O": ("Cs", True),  # acetic acid
    "FC(F)(F)C(F)(F)F": ("D3d", False),  # hexafluoroethane, staggered
    "N": ("C3v", True),  # ammonia
    "O": ("C2v", True),  # water
    "FS(F)(F)(F)(F)F": ("Oh", False),  # sulfur hexafluoride
    "F[Xe](F)(F)F": ("D4h", False),  # xenon tetrafluoride, square planar
    "FS(F)(F)F": ("C2v", True),  # sulfur tetrafluoride, seesaw
    "FCl(F)F": ("C2v", True),  # chlorine trifluoride, T-shaped
    "FP(F)(F)(F)F": ("D3h", False),  # phosphorus pentafluoride
    "O=C=O": ("D∞h", False),  # carbon dioxide
    "C#N": ("C∞v", True),  # hydrogen cyanide
    "C=C=C": ("D2d", False),  # allene
    "C": ("Td", False),  # methane
    "F[Xe]F": ("D∞h", False),  # xenon difluoride
    "I[I-]I": ("D∞h", False),  # triiodide
    "F[I](F)(F)(F)(F)(F)F": ("D5h", False),  # iodine heptafluoride, pentagonal bipyramid
    "CCCC": ("C2h", False),  # butane, anti (the lowest conformer)
    "C1CCCCC1": ("D3d", False),  # cyclohexane, chair
    "ClC(Cl)(Cl)Cl": ("Td", False),  # carbon tetrachloride
    "ClCCl": ("C2v", True),  # dichloromethane
    "O=S=O": ("C2v", True),  # sulfur dioxide
    "c1ccncc1": ("C2v", True),  # pyridine
    "C1=CC=CC=CC=C1": ("D2d", False),  # cyclooctatetraene, tub (ring double bonds Z)
    "CC(=O)F": ("Cs", True),  # acetyl fluoride (a flat methyl rotor in MMFF94: the symmetric setting is kept)
    "[CH2]": ("C2v", True),  # methylene, bent in both its singlet and triplet states
    "[NH2]": ("C2v", True),  # amidogen radical
    "OO": ("C2", True),  # hydrogen peroxide, skew
    "CC(C)=O": ("C2v", True),  # acetone
    "C12C3C4C1C5C2C3C45": ("Oh", False),  # cubane (its corners look like stereocentres but are fixed by the cage)
    "C1C2CC3CC1CC(C2)C3": ("Td", False),  # adamantane
    "C1CC2CCC1CC2": ("D3h", False),  # bicyclo[2.2.2]octane
    "c1ccc2ccccc2c1": ("D2h", False),  # naphthalene
    "S1SSSSSSS1": ("D4d", False),  # cyclooctasulfur, crown
    "C12(CC1)CC2": ("D2d", False),  # spiropentane
    "Oc1cc(O)cc(O)c1": ("C3h", False),  # phloroglucinol, hydroxyls all one way round
    "FS(F)(F)(F)(F)Cl": ("C4v", True),  # sulfur chloride pentafluoride
    "[O-]C(=O)[O-]": ("D3h", False),  # carbonate (delocalised: three equal C-O bonds)
    "[O-][N+](=O)[O-]": ("D3h", False),  # nitrate
    "[O-]S(=O)(=O)[O-]": ("Td", False),  # sulfate
    "O=[N+]([O-])F": ("C2v", True),  # nitryl fluoride
}


def _molecule(smiles: str) -> Molecule:
    read = read_smiles(smiles)
    assert not isinstance(read, str), read
    return read


def _pymatgen(molecule: Molecule, coordinates) -> str:
    symbols = [atom.element for atom in molecule.atoms]
    return PointGroupAnalyzer(PymatgenMolecule(symbols, np.array(coordinates))).sch_symbol


@pytest.mark.parametrize("smiles", sorted(EXPECTED))
def test_whole_molecule_point_group_and_polarity(smiles):
    molecule = _molecule(smiles)
    group, polar = EXPECTED[smiles]
    assert whole_molecule_symmetry(molecule) == (group, polar)


@pytest.mark.parametrize("smiles", sorted(EXPECTED))
def test_model_group_agrees_with_pymatgen(smiles):
    molecule = _molecule(smiles)
    coordinates = model_3d(molecule)
    assert not isinstance(coordinates, str), coordinates
    group, _ = whole_molecule_symmetry(molecule)
    assert normalised_symbol(group) == normalised_symbol(_pymatgen(molecule, coordinates))


@pytest.mark.parametrize("smiles", sorted(EXPECTED))
def test_bonds_are_as_long_as_covalent_radii_say(smiles):
    from rdkit import Chem

    table = Chem.GetPeriodicTable()
    molecule = _molecule(smiles)
    coordinates = np.array(model_3d(molecule))
    for bond in molecule.bonds:
        a, b = molecule.atoms[bond.first].element, molecule.atoms[bond.second].element
        length = float(np.linalg.norm(coordinates[bond.first] - coordinates[bond.second]))
        # single-bond radii: multiple bonds are shorter, by up to about 0.35 Å for a triple bond
        single = table.GetRcovalent(a) + table.GetRcovalent(b)
        assert single - 0.45 < length < single + 0.35, (a, b, length, single)
    # nothing overlaps: unbonded atoms are farther apart than bonded ones could be
    bonded = {(bond.first, bond.second) for bond in molecule.bonds}
    for i in range(len(coordinates)):
        for j in range(i + 1, len(coordinates)):
            if (i, j) not in bonded:
                assert np.linalg.norm(coordinates[i] - coordinates[j]) > 0.9


def test_models_are_deterministic():
    for smiles in ("CC(=O)O", "CCCC", "FS(F)(F)F"):
        molecule = _molecule(smiles)
        first = model_3d.__wrapped__(molecule)
        second = model_3d.__wrapped__(molecule)
        assert first == second


def test_hypervalent_centres_are_placed_with_lone_pairs_where_vsepr_puts_them():
    # ClF3: two lone pairs equatorial leave a T, two F-Cl-F angles of 90° and one of 180°
    molecule = _molecule("FCl(F)F")
    coordinates = np.array(model_3d(molecule))
    chlorine = next(i for i, atom in enumerate(molecule.atoms) if atom.element == "Cl")
    bonds = [coordinates[i] - coordinates[chlorine] for i in molecule.neighbours(chlorine)]
    angles = sorted(
        round(float(np.degrees(np.arccos(np.dot(u, v) / np.linalg.norm(u) / np.linalg.norm(v)))))
        for k, u in enumerate(bonds) for v in bonds[k + 1:]
    )
    assert angles == [90, 90, 180]


def test_reasons_instead_of_models():
    assert isinstance(model_3d(Molecule((), ())), str)
    two_parts = Molecule(
        (MoleculeAtom("Na", "Na", 1), MoleculeAtom("Cl", "Cl", -1)),
        (),
    )
    assert "separate parts" in model_3d(two_parts)
    assert isinstance(whole_molecule_symmetry(two_parts), str)


@pytest.mark.parametrize(
    ("smiles", "alternatives"),
    [
        # 2-butene: E is C2h and nonpolar, Z is C2v and polar
        ("CC=CC", {"C2h (nonpolar) as C2=C3 E", "C2v (polar) as C2=C3 Z"}),
        # 1,2-dichloroethene, the same
        ("ClC=CCl", {"C2h (nonpolar) as C1=C2 E", "C2v (polar) as C1=C2 Z"}),
        # 2,3-dibromobutane: meso (R,S) has a centre of inversion in its anti conformer, (R,R) and (S,S) a C2
        ("CC(Br)C(Br)C", {"Ci (nonpolar) as C2 S, C3 R", "C2 (polar) as C2 R, C3 R or C2 S, C3 S"}),
        # 1,4-dimethylcyclohexane: cis (one methyl axial) Cs, trans (both equatorial) C2h
        ("CC1CCC(C)CC1", {"Cs (polar) as C2 s, C5 s", "C2h (nonpolar) as C2 r, C5 r"}),
        # decalin: cis C2, trans C2h
        ("C1CCC2CCCCC2C1", {"C2 (polar) as C4 s, C9 s", "C2h (nonpolar) as C4 r, C9 r"}),
    ],
)
def test_stereo_the_molecule_does_not_fix_is_said_not_guessed(smiles, alternatives):
    # the molecule graph has no stereo configuration; each stereoisomer's group (common practice,
    # no source) is listed with its CIP descriptors instead of one being chosen
    answer = whole_molecule_symmetry(_molecule(smiles))
    assert isinstance(answer, str)
    assert set(answer.split(": ", 1)[1].split("; ")) == alternatives


def test_stereoisomers_that_share_a_group_give_it():
    # bicyclo[1.1.0]butane: its bridgeheads look like stereocentres, but only the cis-fused form
    # can be built, and it is C2v (common practice, no source; pymatgen agrees on the G2 geometry)
    assert whole_molecule_symmetry(_molecule("C1C2CC12")) == ("C2v", True)


def test_one_stereocentre_leaves_the_group_alone():
    # enantiomers share their point group (C1), so one stereocentre decides nothing
    assert whole_molecule_symmetry(_molecule("CC(Cl)CC")) == ("C1", True)


@pytest.mark.xfail(strict=True, reason="MMFF94 and UFF both put anti hydrazine (C2h) about 2 kcal/mol below gauche")
def test_hydrazine_is_gauche():
    # hydrazine is gauche, C2 and polar (common practice, no source); the force fields disagree
    assert whole_molecule_symmetry(_molecule("NN")) == ("C2", True)


@pytest.mark.parametrize(
    ("smiles", "words"),
    [
        ("Cl[Pt](Cl)([NH3])[NH3]", "outside the main group"),  # square planar, which no force field here knows
        ("F[Xe](F)(F)(F)(F)F", "outside plain VSEPR"),  # XeF6: fluxional, C3v in the gas phase
        ("F[Ba]F", "outside plain VSEPR"),  # bent in the gas phase, against VSEPR
        ("[CH5+]", "more bonds than valence electrons"),  # three-centre bonding the graph cannot hold
    ],
)
def test_no_model_where_none_would_be_trusted(smiles, words):
    molecule = _molecule(smiles)
    assert words in model_3d(molecule)
    assert words in whole_molecule_symmetry(molecule)


@pytest.mark.parametrize(
    ("smiles", "group"),
    [
        ("[SiH3]", "C3v"),  # silyl radical: pyramidal, unlike methyl (common practice, no source)
        ("Cl[Sn]Cl", "C2v"),  # tin(II) chloride: bent, an inert pair
    ],
)
def test_known_exceptions_to_vsepr_decide_the_placement(smiles, group):
    molecule = _molecule(smiles)
    assert whole_molecule_symmetry(molecule)[0] == group
    assert normalised_symbol(group) == normalised_symbol(_pymatgen(molecule, model_3d(molecule)))


def test_one_atom_and_one_bond():
    neon = Molecule((MoleculeAtom("Ne", "Ne"),), ())
    assert whole_molecule_symmetry(neon) == ("Kh", False)
    fluorine = Molecule((MoleculeAtom("F", "F1"), MoleculeAtom("F", "F2")), (MoleculeBond(0, 1, 1),))
    coordinates = model_3d(fluorine)
    assert whole_molecule_symmetry(fluorine) == ("D∞h", False)
    assert normalised_symbol(_pymatgen(fluorine, coordinates)) == "Dinfh"


# --- the G2 set: whole-molecule symmetry from the graph alone -------------------------------
# Source of the coordinates: ASE G2 set (Curtiss et al., J. Chem. Phys. 106, 1063 (1997)).
# Each closed-shell G2 molecule's bonds are perceived from its coordinates by RDKit
# (rdDetermineBonds), written as SMILES and read back; our model of that graph is then held
# against pymatgen's point group of the G2 coordinates themselves.

G2_FLOOR = 0.95
# G2 name -> (ours, pymatgen's on G2, why)
G2_DIFFERENCES = {
    "COF2": ("C2v", "Cs", "pymatgen's miss: the G2 coordinates are exactly C2v (see test_point_group.py)"),
    "C4H4NH": ("C2v", "Cs", "pymatgen's miss: the G2 coordinates of pyrrole are exactly C2v"),
    "C2H6CHOH": ("Cs", "C1", "isopropanol: MMFF94 puts the anti OH (Cs) 0.2 kcal/mol above gauche, within "
                 "NEAR_DEGENERATE_KCAL, so the symmetric conformer is kept; G2's MP2 minimum is gauche"),
    "CH3CONH2": ("Cs", "C1", "acetamide: our model has the planar amide chemists draw; G2's MP2 NH2 is slightly pyramidal"),
    "N2H4": ("C2h", "C2", "hydrazine: both force fields put anti lowest; it is gauche (see test_hydrazine_is_gauche)"),
    "CH3CH2SH": ("C1", "Cs", "ethanethiol: MMFF94's lowest conformer is gauche; G2 is the anti conformer"),
    "CH3CH2NH2": ("C1", "Cs", "ethylamine: MMFF94 puts gauche 0.4 kcal/mol below anti; G2 is the anti conformer"),
}
G2_PYMATGEN_MISSES = {"COF2", "C4H4NH"}


def _g2_graph(name: str) -> Molecule | None:
    """The G2 molecule as a graph (RDKit's bond perception); None for radicals and what it cannot perceive."""
    from ase.collections import g2
    from rdkit import Chem, rdBase
    from rdkit.Chem import rdDetermineBonds

    atoms = g2[name]
    if len(atoms) < 2 or sum(atoms.get_atomic_numbers()) % 2:
        return None  # radicals: the perception, told the charge is 0, makes charged atoms of them
    block = f"{len(atoms)}\n\n" + "".join(
        f"{symbol} {x:.6f} {y:.6f} {z:.6f}\n" for symbol, (x, y, z) in zip(atoms.get_chemical_symbols(), atoms.positions)
    )
    with rdBase.BlockLogs():
        mol = Chem.MolFromXYZBlock(block)
        try:
            rdDetermineBonds.DetermineBonds(mol, charge=0)
        except (ValueError, RuntimeError):
            return None  # ionic and hypervalent molecules (LiF, ClF3) get no valences at charge 0
        read = read_smiles(Chem.MolToSmiles(mol))
    return None if isinstance(read, str) else read


def test_g2_whole_molecules_against_pymatgen():
    from ase.collections import g2

    compared, right, differing = 0, 0, {}
    for name in g2.names:
        molecule = _g2_graph(name)
        if molecule is None:
            continue
        atoms = g2[name]
        theirs = PointGroupAnalyzer(PymatgenMolecule(atoms.get_chemical_symbols(), atoms.positions)).sch_symbol
        answer = whole_molecule_symmetry(molecule)
        ours = answer if isinstance(answer, str) else answer[0]
        compared += 1
        if normalised_symbol(ours) == normalised_symbol(theirs):
            right += 1
        else:
            differing[name] = (ours, theirs)
            right += name in G2_PYMATGEN_MISSES
    assert compared >= 110
    assert differing == {name: (ours, theirs) for name, (ours, theirs, _) in G2_DIFFERENCES.items()}
    assert right / compared >= G2_FLOOR
