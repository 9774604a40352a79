"""The top-ranked isomer is the lowest in energy at HF/6-31G*.

PySCF restricted Hartree-Fock single points at the ideal polyhedron
geometry, bonds at the sum of covalent radii (notelsp.elements: Pyykkö single
and double-bond radii via mendeleev).  Mirror images have equal energies, so
one of each enantiomer pair is computed.  The gaps are printed (see them with
``pytest -rA``) and recorded as test properties.
"""

import numpy as np
import pytest

pyscf = pytest.importorskip("pyscf")
from pyscf import gto, scf  # noqa: E402

from notelsp.chem.isomers import isomers_for  # noqa: E402
from notelsp.chem.model import LONE_PAIR, Ligand  # noqa: E402
from notelsp.elements import element  # noqa: E402

HARTREE_KCAL = 627.5095  # kcal/mol per hartree (CODATA)

# (name, centre, ligand symbols ("=" marks a double bond), lone pairs, geometry)
SPECIES = [
    ("PCl4F", "P", ("F", "Cl", "Cl", "Cl", "Cl"), 0, "trigonal-bipyramidal"),
    ("PCl3F2", "P", ("F", "F", "Cl", "Cl", "Cl"), 0, "trigonal-bipyramidal"),
    ("PCl2F3", "P", ("F", "F", "F", "Cl", "Cl"), 0, "trigonal-bipyramidal"),
    ("SF2Cl2", "S", ("F", "F", "Cl", "Cl"), 1, "trigonal-bipyramidal"),
    ("SOF4", "S", ("O=", "F", "F", "F", "F"), 0, "trigonal-bipyramidal"),
]


def make_ligand(text: str) -> Ligand:
    symbol = text.rstrip("=")
    return Ligand(symbol, symbol, 2 if text.endswith("=") else 1, element(symbol).electronegativity)


def bond_length(centre: str, ligand: Ligand) -> float:
    a, b = element(centre), element(ligand.symbol)
    if ligand.bond_order == 2:
        return (a.double_bond_radius_pm + b.double_bond_radius_pm) / 100.0
    return (a.covalent_radius_pm + b.covalent_radius_pm) / 100.0


def hf_energy(centre: str, isomer, by_symbol: dict[str, Ligand]) -> float:
    atoms = [(centre, (0.0, 0.0, 0.0))]
    for site in isomer.sites:
        if site.label != LONE_PAIR:
            position = np.array(site.vector) * bond_length(centre, by_symbol[site.symbol])
            atoms.append((site.symbol, tuple(position)))
    mol = gto.M(atom=atoms, basis="6-31g*", unit="Angstrom", verbose=0)
    mf = scf.RHF(mol)
    mf.conv_tol = 1e-8
    energy = mf.kernel()
    assert mf.converged
    return float(energy)


@pytest.mark.slow
@pytest.mark.parametrize("name, centre, symbols, lone_pairs, geometry", SPECIES, ids=[s[0] for s in SPECIES])
def test_top_ranked_isomer_is_lowest_in_energy(name, centre, symbols, lone_pairs, geometry, record_property):
    ligands = [make_ligand(s) for s in symbols]
    by_symbol = {ligand.symbol: ligand for ligand in ligands}
    isomers = isomers_for(geometry, ligands, lone_pairs, centre_electronegativity=element(centre).electronegativity)
    assert len(isomers) >= 2
    distinct = [isomer for index, isomer in enumerate(isomers) if isomer.enantiomer is None or isomer.enantiomer > index]
    energies = {isomer.name: hf_energy(centre, isomer, by_symbol) for isomer in distinct}
    best = distinct[0].name
    gaps = {other: (energy - energies[best]) * HARTREE_KCAL for other, energy in energies.items() if other != best}
    for other, gap in gaps.items():
        print(f"{name}: '{other}' lies {gap:+.1f} kcal/mol above '{best}' (HF/6-31G*)")
        record_property(f"{name}: {other}", round(gap, 2))
    assert all(gap > 0 for gap in gaps.values()), gaps
