"""Ideal polyhedra: site counts, angles and the order of each full point group.

Angles and group orders are geometric facts of the ideal solids
(common practice, no source).
"""

import math

import numpy as np
import pytest

from notelsp.chem.polyhedra import POLYHEDRA, polyhedron

# name -> (sites, order of the full point group, order of its rotation subgroup)
EXPECTED = {
    "linear": (2, 16, 8),  # the finite part of D∞h kept for permuting two sites
    "trigonal-planar": (3, 12, 6),  # D3h, D3
    "tetrahedral": (4, 24, 12),  # Td, T
    "trigonal-bipyramidal": (5, 12, 6),  # D3h, D3
    "square-pyramidal": (5, 8, 4),  # C4v, C4
    "octahedral": (6, 48, 24),  # Oh, O
    "pentagonal-bipyramidal": (7, 20, 10),  # D5h, D5
}


def angle(u, v) -> float:
    return math.degrees(math.acos(max(-1.0, min(1.0, float(np.dot(u, v))))))


@pytest.mark.parametrize("name", POLYHEDRA)
def test_sizes_and_group_orders(name):
    shape = polyhedron(name)
    sites, full, rotations = EXPECTED[name]
    assert len(shape.sites) == sites
    assert len(shape.operations) == full
    assert len(shape.rotations) == rotations


@pytest.mark.parametrize("name", POLYHEDRA)
def test_sites_are_unit_vectors_and_operations_permute_them(name):
    shape = polyhedron(name)
    vectors = shape.vectors
    assert np.allclose(np.linalg.norm(vectors, axis=1), 1.0)
    for op in shape.operations:
        matrix = np.array(op.matrix)
        assert np.allclose(matrix @ matrix.T, np.eye(3), atol=1e-9)
        assert sorted(op.permutation) == list(range(len(vectors)))
        assert np.allclose(vectors @ matrix.T, vectors[list(op.permutation)], atol=1e-9)
        assert op.proper == (np.linalg.det(matrix) > 0)


@pytest.mark.parametrize("name", POLYHEDRA)
def test_operations_are_distinct_on_sites_or_matrices(name):
    shape = polyhedron(name)
    keys = {tuple(round(v, 6) for row in op.matrix for v in row) for op in shape.operations}
    assert len(keys) == len(shape.operations)


def test_trigonal_bipyramid_angles_and_names():
    shape = polyhedron("trigonal-bipyramidal")
    axial = [s.vector for s in shape.sites if s.position == "axial"]
    equatorial = [s.vector for s in shape.sites if s.position == "equatorial"]
    assert len(axial) == 2 and len(equatorial) == 3
    assert angle(axial[0], axial[1]) == pytest.approx(180)
    assert all(angle(a, e) == pytest.approx(90) for a in axial for e in equatorial)
    assert angle(equatorial[0], equatorial[1]) == pytest.approx(120)


def test_tetrahedral_angle():
    shape = polyhedron("tetrahedral")
    v = shape.vectors
    assert angle(v[0], v[1]) == pytest.approx(math.degrees(math.acos(-1 / 3)))  # 109.47°


def test_square_pyramid_and_pentagonal_bipyramid():
    square = polyhedron("square-pyramidal")
    assert [s.position for s in square.sites].count("apical") == 1
    apical = square.sites[0].vector
    assert all(angle(apical, s.vector) == pytest.approx(90) for s in square.sites[1:])
    pentagonal = polyhedron("pentagonal-bipyramidal")
    ring = [s.vector for s in pentagonal.sites if s.position == "equatorial"]
    assert len(ring) == 5
    assert sorted(round(angle(ring[0], v)) for v in ring[1:]) == [72, 72, 144, 144]


def test_rotation_group_is_transitive_on_equivalent_sites():
    # every octahedron vertex can be rotated onto every other
    shape = polyhedron("octahedral")
    assert {op.permutation[0] for op in shape.rotations} == set(range(6))
    # but no rotation takes an axial site of a trigonal bipyramid to an equatorial one
    tbp = polyhedron("trigonal-bipyramidal")
    assert {op.permutation[0] for op in tbp.operations} == {0, 1}


def test_unknown_polyhedron_is_refused():
    with pytest.raises(ValueError):
        polyhedron("cubic")
