"""Every centre of every molecule of ASE's G2 set, read as SMILES, against its geometry.

Source of every geometry: ASE G2 set (Curtiss et al., J. Chem. Phys. 106, 1063 (1997)),
``ase.collections.g2``: 162 entries, 148 of them molecules (the others are
single atoms).

How each molecule becomes SMILES (RDKit's bond perception, ``rdDetermineBonds``):

1. ``DetermineBonds(charge=0)`` with charged fragments allowed: connectivity
   from the coordinates, then bond orders; zwitterionic forms are kept
   (CH3NO2 as C[N+](=O)[O-], DMSO as C[S+](C)[O-]).
2. An odd-electron molecule has no closed-shell form of charge 0, so step 1
   fails; then again with charged fragments not allowed, which leaves the
   electrons that fit no bond as unpaired electrons on atoms.  That step
   spreads them too thinly (HCO comes out [CH][O]): two bonded atoms that both
   carry an unpaired electron are paired into one more bond order
   ([CH]=O), repeated until no such pair is left.
3. Where no bond orders can be assigned at all (hypervalent ClF3, NH2, PH2,
   NH), ``DetermineConnectivity`` and single bonds, each atom keeping its
   default valence minus its bonds as unpaired electrons, then step 2's
   pairing.

The SMILES is written without hydrogens (as a chemist writes it), read with
``read_smiles`` and analysed with ``analyse_molecule``.  Each centre is matched
to its G2 atom through an atom property that survives the writing, and its
shape is classified from the G2 coordinates (neighbour count and angles).
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass

import numpy as np
import pytest
from ase.collections import g2
from rdkit import Chem, rdBase
from rdkit.Chem import rdDetermineBonds

from notelsp.chem.molecule import Molecule
from notelsp.chem.molecule_analysis import MoleculeAnalysis, analyse_molecule
from notelsp.chem.smiles import read_smiles

G2_INDEX = "g2_index"
ORGANIC = frozenset({"C", "N", "O", "S"})

# (G2 name, G2 atom index) -> (shape in the G2 geometry, notelsp's shape, why they differ)
SHAPE_DIFFERENCES = {
    ("CH3CONH2", 2): (
        "trigonal-pyramidal", "trigonal-planar",
        "acetamide's N: conjugation with C=O makes an amide N planar in the usual description, and the measured "
        "amide is nearly planar (from memory); the G2 geometry (MP2/6-31G(d)) has a shallow pyramid, angle "
        "sum 354°, just below the 357° the classifier asks of a plane"),
    ("C2H5", 1): (
        "trigonal-planar", "trigonal-pyramidal",
        "the ethyl radical's CH2: a carbon radical with mixed ligands is predicted a shallow pyramid with low "
        "confidence (planar is named as plausible too: 'radical between planar and pyramidal'); G2 has it planar "
        "(angle sum 358.6°)"),
}

# (G2 name, G2 atom index) -> (RDKit's hybridization, notelsp's, why notelsp differs on purpose)
HYBRIDIZATION_DIFFERENCES = {
    ("SH2", 0): ("sp3", "unhybridized",
                 "Drago's rule: a period-3 group-16 centre with hydrogen ligands bonds through nearly pure p "
                 "orbitals (H-S-H 92° in G2)"),
    ("CH3", 0): ("sp3", "sp2",
                 "the methyl radical is planar (G2: H-C-H 120°), its odd electron in a pure p orbital"),
    ("CH2_s1A1d", 0): ("sp3", "sp2",
                       "singlet methylene: the lone pair and two bonds form a trigonal set, the p orbital empty"),
    ("CH2_s3B1d", 0): ("sp3", "sp2",
                       "triplet methylene is bent at 132° (G2): one electron in an sp2-like orbital, one in p"),
}


def xyz_block(atoms) -> str:
    lines = [str(len(atoms)), ""]
    lines += [f"{s} {x:.6f} {y:.6f} {z:.6f}" for s, (x, y, z) in zip(atoms.get_chemical_symbols(), atoms.positions,
                                                                      strict=True)]
    return "\n".join(lines)


def pair_unpaired_electrons(mol) -> None:
    """Two bonded atoms that both carry an unpaired electron share them as one more bond order."""
    raise_order = {Chem.BondType.SINGLE: Chem.BondType.DOUBLE, Chem.BondType.DOUBLE: Chem.BondType.TRIPLE}
    changed = True
    while changed:
        changed = False
        for bond in mol.GetBonds():
            first, second = bond.GetBeginAtom(), bond.GetEndAtom()
            if first.GetNumRadicalElectrons() and second.GetNumRadicalElectrons() and bond.GetBondType() in raise_order:
                bond.SetBondType(raise_order[bond.GetBondType()])
                for atom in (first, second):
                    atom.SetNumRadicalElectrons(atom.GetNumRadicalElectrons() - 1)
                changed = True


def perceive(atoms):
    """The RDKit molecule of a G2 geometry (steps 1-3 of the module docstring) and which step made it."""
    with rdBase.BlockLogs():
        for charged in (True, False):
            mol = Chem.MolFromXYZBlock(xyz_block(atoms))
            try:
                rdDetermineBonds.DetermineBonds(mol, charge=0, allowChargedFragments=charged)
            except (ValueError, RuntimeError):
                continue
            if not charged:
                pair_unpaired_electrons(mol)
            return mol, "bond orders" if charged else "bond orders, unpaired electrons"
        mol = Chem.MolFromXYZBlock(xyz_block(atoms))
        rdDetermineBonds.DetermineConnectivity(mol)
        table = Chem.GetPeriodicTable()
        for atom in mol.GetAtoms():
            atom.SetNoImplicit(True)
            atom.SetNumRadicalElectrons(max(0, table.GetDefaultValence(atom.GetAtomicNum()) - atom.GetDegree()))
        pair_unpaired_electrons(mol)
        return mol, "connectivity only"


def g2_shape(positions, centre: int, neighbours: list[int]) -> str:
    """The shape of a centre in the G2 geometry, from its neighbour count and bond angles."""
    angles = []
    for j, k in itertools.combinations(neighbours, 2):
        u, v = positions[j] - positions[centre], positions[k] - positions[centre]
        cosine = np.clip(np.dot(u, v) / np.linalg.norm(u) / np.linalg.norm(v), -1.0, 1.0)
        angles.append(float(np.degrees(np.arccos(cosine))))
    count = len(neighbours)
    if count == 2:
        return "linear" if angles[0] > 170 else "bent"
    if count == 3:
        if max(angles) > 160:
            return "t-shaped"
        return "trigonal-planar" if sum(angles) > 357 else "trigonal-pyramidal"
    if count == 4:
        wide = sum(a > 160 for a in angles)
        if wide >= 2:
            return "square-planar"
        return "seesaw" if max(angles) > 150 else "tetrahedral"
    return f"{count} neighbours"  # none in G2


@dataclass(frozen=True)
class Read:
    name: str
    smiles: str
    how: str
    molecule: Molecule | str
    analysis: MoleculeAnalysis | None
    g2_atoms: dict[str, int]  # notelsp label -> G2 atom index (heavy atoms)
    g2_neighbours: dict[int, list[int]]


def read_g2(name: str) -> Read:
    atoms = g2[name]
    mol, how = perceive(atoms)
    for atom in mol.GetAtoms():
        atom.SetIntProp(G2_INDEX, atom.GetIdx())
    heavy = Chem.RemoveHs(mol, sanitize=False)
    smiles = Chem.MolToSmiles(heavy)
    written = [int(i) for i in heavy.GetProp("_smilesAtomOutputOrder").strip("[],").split(",") if i]
    molecule = read_smiles(smiles)
    neighbours = {a.GetIdx(): [n.GetIdx() for n in a.GetNeighbors()] for a in mol.GetAtoms()}
    if isinstance(molecule, str):
        return Read(name, smiles, how, molecule, None, {}, neighbours)
    # read_smiles keeps the SMILES atom order, so its first atoms are the written heavy atoms in that order
    labels = {molecule.atoms[position].label: heavy.GetAtomWithIdx(index).GetIntProp(G2_INDEX)
              for position, index in enumerate(written)}
    return Read(name, smiles, how, molecule, analyse_molecule(molecule), labels, neighbours)


MOLECULES = sorted(name for name in g2.names if len(g2[name]) > 1)


@pytest.fixture(scope="module")
def readings() -> dict[str, Read]:
    return {name: read_g2(name) for name in MOLECULES}


def test_the_set_has_148_molecules():
    assert len(MOLECULES) == 148  # Curtiss et al. 1997: the G2/97 test set's 148 molecules


def test_every_molecule_is_read(readings):
    unread = {name: r.molecule for name, r in readings.items() if isinstance(r.molecule, str)}
    assert unread == {}
    for name, reading in readings.items():  # same atoms as the G2 entry, hydrogens included
        assert sorted(a.element for a in reading.molecule.atoms) == sorted(g2[name].get_chemical_symbols()), name


def centre_shapes(readings):
    for name, reading in readings.items():
        for found in reading.analysis.centres:
            index = reading.g2_atoms[found.label]
            neighbours = reading.g2_neighbours[index]
            shape = found.analysis.shape if found.analysis else f"outside the model: {found.outside_model}"
            yield name, index, found, g2_shape(g2[name].positions, index, neighbours), shape, len(neighbours)


def test_every_centre_has_its_g2_neighbours(readings):
    for name, index, found, _, _, count in centre_shapes(readings):
        assert len(found.neighbours) == count, (name, found.label)


def test_centre_shapes_match_the_g2_geometries(readings):
    rows = list(centre_shapes(readings))
    differences = {(name, index): (measured, predicted) for name, index, _, measured, predicted, _ in rows
                   if measured != predicted}
    assert differences == {key: value[:2] for key, value in SHAPE_DIFFERENCES.items()}
    right = len(rows) - len(differences)
    print(f"G2 centres: {right}/{len(rows)} shapes right ({right / len(rows):.1%})")
    assert right / len(rows) >= 0.97
    assert len(rows) > 250  # every centre counted, not a sample


def test_listed_differences_are_uncertain_or_named_as_plausible_where_the_model_knows_it(readings):
    # the ethyl radical's pyramid is predicted with low confidence and the planar form is named as plausible
    ethyl = readings["C2H5"]
    label = next(label for label, index in ethyl.g2_atoms.items() if index == 1)
    radical = ethyl.analysis.centre(label).analysis
    assert radical.confidence == "uncertain" and "trigonal-planar" in radical.plausible_shapes


def test_rdkit_hybridization_as_a_second_opinion_on_organic_centres(readings):
    differences = {}
    compared = 0
    for name, reading in readings.items():
        with rdBase.BlockLogs():
            reference = Chem.MolFromSmiles(reading.smiles)
        if reference is None:  # RDKit's valence check refuses hypervalent ClF3; no organic centre there
            assert name == "ClF3"
            continue
        reference = Chem.AddHs(reference)  # same atom order as read_smiles
        for found in reading.analysis.centres:
            if found.element not in ORGANIC or found.analysis is None:
                continue
            compared += 1
            theirs = str(reference.GetAtomWithIdx(reading.molecule.index_of(found.label)).GetHybridization()).lower()
            if theirs != found.analysis.hybridization:
                differences[(name, reading.g2_atoms[found.label])] = (theirs, found.analysis.hybridization)
    assert differences == {key: value[:2] for key, value in HYBRIDIZATION_DIFFERENCES.items()}
    assert compared > 200


@pytest.mark.parametrize("name, how", [("CH3NO2", "bond orders"), ("HCO", "bond orders, unpaired electrons"),
                                       ("ClF3", "connectivity only"), ("NH2", "connectivity only")])
def test_the_perception_step_each_kind_of_molecule_needs(readings, name, how):
    assert readings[name].how == how


@pytest.mark.parametrize("name, smiles", [
    ("HCO", "[CH]=O"), ("NO", "[N]=O"), ("CH3CO", "C[C]=O"), ("ClF3", "FCl(F)F"), ("C2H6SO", "C[S+](C)[O-]"),
    ("C6H6", "c1ccccc1"), ("C4H4NH", "c1cc[nH]c1"),
])
def test_perceived_structures_chemists_recognise(readings, name, smiles):
    # the Lewis structures expected for these G2 molecules (common practice, no source)
    assert readings[name].smiles == smiles


def test_small_ring_angles_fall_in_the_ring_range(readings):
    checked = 0
    for name, reading in readings.items():
        positions = g2[name].positions
        by_label = {label: index for label, index in reading.g2_atoms.items()}
        for found in reading.analysis.centres:
            for first, second, size in found.small_rings:
                centre = by_label[found.label]
                u = positions[by_label[first]] - positions[centre]
                v = positions[by_label[second]] - positions[centre]
                angle = float(np.degrees(np.arccos(np.dot(u, v) / np.linalg.norm(u) / np.linalg.norm(v))))
                low, high = found.angle_range(first, second)
                assert low <= angle <= high, (name, found.label, first, second, size, round(angle, 1))
                checked += 1
    assert checked >= 30  # cyclopropane, oxirane, aziridine, thiirane, cyclobutane, cyclobutene, bicyclobutane ...
