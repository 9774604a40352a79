"""Starting structures from the analyser's polyhedra.

Bond lengths start at the sum of Pyykko single-bond radii (Pyykko & Atsumi,
Chem. Eur. J. 2009, read through notelsp.elements from mendeleev).
"""

import math

from notelsp import elements
from notelsp.crosscheck.measure import angle_degrees
from notelsp.crosscheck.start import StartingGeometry, Unsupported, bond_length_guess, starting_geometries
from notelsp.notation import parse_formula


def _only(text: str) -> StartingGeometry:
    built = starting_geometries(parse_formula(text))
    assert not isinstance(built, Unsupported), built
    return built[0]


def test_bonds_start_at_the_sum_of_covalent_radii():
    water = _only("H2O")
    assert water.symbols == ("O", "H", "H")
    expected = (elements.element("O").covalent_radius_pm + elements.element("H").covalent_radius_pm) / 100
    assert bond_length_guess("O", "H") == expected
    for position in water.positions[1:]:
        assert math.isclose(math.dist(position, water.positions[0]), expected, rel_tol=1e-5)


def test_water_starts_at_the_tetrahedral_angle():
    # ideal tetrahedron: arccos(-1/3) = 109.47 degrees (geometry, common practice, no source)
    water = _only("H2O")
    assert math.isclose(angle_degrees(water.positions[1], water.positions[0], water.positions[2]), 109.47, abs_tol=0.01)


def test_each_isomer_of_a_mixed_halide_is_a_start_expected_first():
    starts = starting_geometries(parse_formula("PF4Cl"))
    assert not isinstance(starts, Unsupported)
    assert [g.rank for g in starts] == sorted(g.rank for g in starts)
    assert len({g.isomer for g in starts}) == len(starts) == 2
    for start in starts:
        assert sorted(start.symbols) == sorted(["P", "F", "F", "F", "F", "Cl"])
        chlorine = start.symbols.index("Cl")
        assert start.ligand_sites[chlorine - 1] in start.isomer  # "Cl axial" / "Cl equatorial"


def test_atom_bound_is_explained():
    built = starting_geometries(parse_formula("SF6"), max_atoms=4)
    assert isinstance(built, Unsupported)
    assert "7 atoms" in built.reason and "bounded to 4" in built.reason


def test_species_the_builder_cannot_make_are_explained():
    # CH3OH is read as a molecule of two centres now; a group ligand on one centre is S(OH)2
    for text, words in (("S(OH)2", "single-atom ligands"), ("CH3OH", "one central atom"), ("N2H4", "one central atom")):
        built = starting_geometries(parse_formula(text))
        assert isinstance(built, Unsupported) and words in built.reason
