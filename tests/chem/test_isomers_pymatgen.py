"""Point groups of every isomer against pymatgen's PointGroupAnalyzer.

Each isomer is built as a pymatgen Molecule: the centre at the origin, each
ligand's attaching atom along its site vector at the sum of covalent radii
(notelsp.elements, Pyykkö radii via mendeleev), and each lone pair as a
helium dummy atom so that the analyser sees the same labelled arrangement.
None of these species has three or more lone pairs on a line of atoms, the one
case where notelsp reports the cylindrical group (D∞h, C∞v) of the atoms
instead, so the two must agree exactly.
"""

import numpy as np
import pytest

pymatgen_core = pytest.importorskip("pymatgen.core")
analyzer = pytest.importorskip("pymatgen.symmetry.analyzer")

from notelsp.chem.isomers import isomers_for  # noqa: E402
from notelsp.chem.model import LONE_PAIR, Ligand  # noqa: E402
from notelsp.chem.symmetry import normalised_symbol  # noqa: E402
from notelsp.elements import element  # noqa: E402

DUMMY = "He"  # stands for a lone pair; no species below contains helium
# pymatgen's default eigen_tolerance (0.01) takes two accidentally close
# moments of inertia of these ideal models (e.g. cis-SF2Cl2Br2 with Cl trans)
# for a degenerate pair and then misses their C2 axis; a tighter value does not.
EIGEN_TOLERANCE = 0.001

# (centre, geometry, ligand symbols (a suffix "=" marks a double bond), lone pairs)
SPECIES = [
    ("Be", "linear", ("F", "Cl"), 0),
    ("C", "linear", ("O=", "S="), 0),
    ("B", "trigonal-planar", ("F", "F", "Cl"), 0),
    ("B", "trigonal-planar", ("F", "Cl", "Br"), 0),
    ("C", "trigonal-planar", ("O=", "F", "Cl"), 0),
    ("C", "tetrahedral", ("H", "H", "F", "F"), 0),
    ("C", "tetrahedral", ("H", "F", "Cl", "Br"), 0),
    ("N", "tetrahedral", ("H", "F", "F"), 1),
    ("P", "trigonal-bipyramidal", ("F", "F", "Cl", "Cl", "Cl"), 0),
    ("P", "trigonal-bipyramidal", ("F", "F", "F", "Cl", "Cl"), 0),
    ("P", "trigonal-bipyramidal", ("F", "Cl", "Br", "I", "H"), 0),
    ("S", "trigonal-bipyramidal", ("O=", "F", "F", "F", "F"), 0),
    ("S", "trigonal-bipyramidal", ("F", "F", "Cl", "Cl"), 1),
    ("Br", "trigonal-bipyramidal", ("F", "F", "Cl"), 2),
    ("Br", "octahedral", ("F", "F", "F", "F", "Cl"), 1),
    ("S", "octahedral", ("F", "F", "F", "F", "Cl", "Cl"), 0),
    ("S", "octahedral", ("F", "F", "F", "Cl", "Cl", "Cl"), 0),
    ("S", "octahedral", ("F", "F", "Cl", "Cl", "Br", "Br"), 0),
    ("Xe", "octahedral", ("F", "F", "Cl", "Cl"), 2),
    ("I", "pentagonal-bipyramidal", ("F", "F", "F", "F", "F", "Cl", "Cl"), 0),
    ("I", "pentagonal-bipyramidal", ("F", "F", "F", "F", "F", "F", "Cl"), 0),
    ("Xe", "pentagonal-bipyramidal", ("F", "F", "F", "F", "Cl"), 2),
]


def make_ligand(text: str) -> Ligand:
    symbol = text.rstrip("=")
    return Ligand(symbol, symbol, 2 if text.endswith("=") else 1, element(symbol).electronegativity)


def bond_length(centre: str, ligand: str) -> float:
    return (element(centre).covalent_radius_pm + element(ligand).covalent_radius_pm) / 100.0


def molecule(centre: str, isomer) -> "pymatgen_core.Molecule":
    species, coordinates = [centre], [(0.0, 0.0, 0.0)]
    for site in isomer.sites:
        if site.label == LONE_PAIR:
            species.append(DUMMY)
            coordinates.append(tuple(np.array(site.vector) * 1.0))
        else:
            species.append(site.symbol)
            coordinates.append(tuple(np.array(site.vector) * bond_length(centre, site.symbol)))
    return pymatgen_core.Molecule(species, coordinates)


@pytest.mark.filterwarnings("ignore:No Pauling electronegativity")
@pytest.mark.parametrize("centre, geometry, symbols, lone_pairs", SPECIES, ids=lambda v: str(v))
def test_every_isomer_matches_pymatgen(centre, geometry, symbols, lone_pairs):
    isomers = isomers_for(
        geometry, [make_ligand(s) for s in symbols], lone_pairs,
        centre_electronegativity=element(centre).electronegativity,
    )
    assert isomers
    for isomer in isomers:
        found = analyzer.PointGroupAnalyzer(molecule(centre, isomer), eigen_tolerance=EIGEN_TOLERANCE).sch_symbol
        assert normalised_symbol(isomer.point_group) == normalised_symbol(found), isomer.name


def test_species_cover_every_electron_geometry():
    assert {geometry for _, geometry, _, _ in SPECIES} == {
        "linear", "trigonal-planar", "tetrahedral", "trigonal-bipyramidal", "octahedral", "pentagonal-bipyramidal",
    }
    assert len(SPECIES) >= 15
