"""The whole molecule's point group, for every molecule of ASE's G2 set, read the way a note gives it.

Source of every geometry: ASE G2 set (Curtiss et al., J. Chem. Phys. 106, 1063 (1997)),
``ase.collections.g2``: its 148 molecules, radicals included.

Each molecule's bonds are perceived from its G2 coordinates by RDKit's
``rdDetermineBonds`` (``perceive`` in test_g2_molecules.py, radicals
included), written as SMILES and then handed to notelsp as a note writes it:
``analyse(parse_formula('smiles "..."'))``.  The point group notelsp reports
for the whole molecule is the one ``explain --format json`` shows under
``molecule``: the expected isomer's for one centre (lone pairs count), the 3D
model's (``whole_molecule_symmetry``) for several.  It is held against
pymatgen's ``PointGroupAnalyzer`` on the G2 coordinates themselves.
"""

from __future__ import annotations

import pytest
from ase.collections import g2
from pymatgen.core import Molecule as PymatgenMolecule
from pymatgen.symmetry.analyzer import PointGroupAnalyzer
from rdkit import Chem

from notelsp.chem.analysis import analyse
from notelsp.chem.report import molecule_to_dict
from notelsp.chem.symmetry import normalised_symbol
from notelsp.notation.transform import parse_formula
from tests.chem.test_g2_molecules import MOLECULES, perceive

FLOOR = 0.95  # issue 16: at least 95 % of the G2 point groups right

# G2 name -> (notelsp's point group, pymatgen's on the G2 coordinates, why they differ)
EXPECTED_DIFFERENCES = {
    "COF2": ("C2v", "Cs", "pymatgen's miss: the G2 coordinates are exactly C2v (see test_point_group.py)"),
    "C4H4NH": ("C2v", "Cs", "pymatgen's miss: the G2 coordinates of pyrrole are exactly C2v"),
    "C2H6CHOH": ("Cs", "C1", "isopropanol: MMFF94 puts the anti OH (Cs) 0.2 kcal/mol above gauche, within "
                 "NEAR_DEGENERATE_KCAL, so the symmetric conformer is kept; G2's MP2 minimum is gauche"),
    "CH3CONH2": ("Cs", "C1", "acetamide: the model has the planar amide chemists draw; G2's MP2 NH2 is a "
                 "shallow pyramid"),
    "N2H4": ("C2h", "C2", "hydrazine: the force field puts anti lowest; it is gauche (test_molecule_geometry.py)"),
    "CH3CH2SH": ("C1", "Cs", "ethanethiol: MMFF94's lowest conformer is gauche; G2 is the anti conformer"),
    "CH3CH2NH2": ("C1", "Cs", "ethylamine: MMFF94 puts gauche 0.4 kcal/mol below anti; G2 is the anti conformer"),
    "C3H7": ("C2v", "Cs", "isopropyl radical: the model's radical carbon is planar; G2's (MP2) is a shallow "
             "pyramid, angle sum 356.8°"),
    "H2COH": ("Cs", "C1", "hydroxymethyl radical: the model's CH2 carbon is planar; G2's (MP2) is pyramidal, "
              "angle sum 349.7°"),
}
# differences where the G2 coordinates are exactly as symmetric as notelsp says and pymatgen's
# default tolerance misses it; they count as right
PYMATGEN_MISSES = {"COF2", "C4H4NH"}


def note_smiles(name: str) -> str:
    """The G2 molecule as the SMILES a chemist would write (hydrogens implicit)."""
    mol, _ = perceive(g2[name])
    return Chem.MolToSmiles(Chem.RemoveHs(mol, sanitize=False))


def notelsp_point_group(smiles: str) -> tuple[str | None, str | None, object]:
    formula = parse_formula(f'smiles "{smiles}"')
    analysis = analyse(formula)
    whole = molecule_to_dict(analysis, formula)
    if whole is None:
        return None, analysis.outside_model or "no molecule", analysis
    return whole["point_group"], whole.get("point_group_note"), analysis


def pymatgen_point_group(name: str) -> str:
    atoms = g2[name]
    return PointGroupAnalyzer(PymatgenMolecule(atoms.get_chemical_symbols(), atoms.positions)).sch_symbol


@pytest.fixture(scope="module")
def compared() -> dict[str, tuple[str, str | None, str | None, str, object]]:
    rows = {}
    for name in MOLECULES:
        smiles = note_smiles(name)
        ours, note, analysis = notelsp_point_group(smiles)
        rows[name] = (smiles, ours, note, pymatgen_point_group(name), analysis)
    return rows


def test_all_148_molecules_are_compared(compared):
    assert len(compared) == 148  # Curtiss et al. 1997: the G2/97 test set's 148 molecules


def test_every_molecule_is_read(compared):
    unread = {name: row[0] for name, row in compared.items() if row[4].molecule is None}
    assert unread == {}
    for name, row in compared.items():  # the molecule read has the G2 entry's atoms, hydrogens included
        assert sorted(a.element for a in row[4].molecule.molecule.atoms) == sorted(g2[name].get_chemical_symbols())


def test_only_diatomics_are_outside_the_model(compared):
    # A diatomic has no atom bonded to two others, so no centre: its claims are not judged (an
    # information finding says so).  Every other G2 molecule is analysed.
    outside = {name for name, row in compared.items() if row[4].outside_model is not None}
    assert outside == {name for name in MOLECULES if len(g2[name]) == 2}
    assert len(outside) == 28  # H2, N2, CO, HF, LiF, NO, OH, ... (counted from the set)
    for name in outside:
        assert "no bond angle" in compared[name][4].outside_model, name


def test_whole_molecule_point_groups_match_pymatgen_on_g2(compared):
    differing = {}
    for name, (smiles, ours, note, theirs, _) in compared.items():
        if ours is None or normalised_symbol(ours) != normalised_symbol(theirs):
            differing[name] = (ours if ours is not None else f"none: {note}", theirs)
    assert differing == {name: (ours, theirs) for name, (ours, theirs, _) in EXPECTED_DIFFERENCES.items()}
    right = len(compared) - len(differing) + len(PYMATGEN_MISSES)
    print(f"G2 whole molecules: {right}/{len(compared)} point groups right ({right / len(compared):.1%})")
    assert right / len(compared) >= FLOOR


@pytest.mark.parametrize("name, group", [("C2H3", "Cs"), ("CH3CO", "Cs")])
def test_radicals_bent_at_the_odd_electron(compared, name, group):
    # the vinyl and acetyl radicals are bent at the carbon that carries the odd electron (three domains);
    # a force field without radical types once made them linear (C2v, C3v)
    assert compared[name][1] == group == pymatgen_point_group(name)
