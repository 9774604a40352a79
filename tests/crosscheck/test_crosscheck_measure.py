import math

from notelsp.crosscheck.measure import angles_between, bond_angles, bond_lengths

# A square-planar AX2Y2 frame built by hand: angles 90 and 180 (geometry, common practice, no source).
SYMBOLS = ("Pt", "Cl", "Cl", "N", "N")
POSITIONS = ((0.0, 0.0, 0.0), (2.3, 0.0, 0.0), (0.0, 2.3, 0.0), (-2.0, 0.0, 0.0), (0.0, -2.0, 0.0))
SITES = ("vertex",) * 4


def test_bond_lengths_from_the_centre():
    lengths = bond_lengths(SYMBOLS, POSITIONS, SITES)
    assert [(b.atoms, round(b.angstrom, 6)) for b in lengths] == [
        (("Pt", "Cl"), 2.3), (("Pt", "Cl"), 2.3), (("Pt", "N"), 2.0), (("Pt", "N"), 2.0)
    ]


def test_angles_by_kind_in_either_order():
    angles = bond_angles(SYMBOLS, POSITIONS, SITES)
    assert len(angles) == 6
    assert [round(a) for a in angles_between(angles, ("Cl", "Pt", "Cl"))] == [90]
    assert sorted(round(a) for a in angles_between(angles, ("N", "Pt", "Cl"))) == [90, 90, 180, 180]
    assert angles_between(angles, ("Cl", "Pt", "N")) == angles_between(angles, ("N", "Pt", "Cl"))
    assert all(math.isfinite(a.degrees) for a in angles)
