"""VSEPR predictions against the standard VSEPR table (common practice, no source)."""

from __future__ import annotations

import pytest

from notelsp.chem import analyse
from notelsp.chem.vsepr import SHAPES, steric_number, vsepr

# formula, charge, lone pairs, steric number, electron geometry, shape, hybridization
TABLE = [
    ("BeCl2", 0, 0, 2, "linear", "linear", "sp"),
    ("CO2", 0, 0, 2, "linear", "linear", "sp"),
    ("BF3", 0, 0, 3, "trigonal-planar", "trigonal-planar", "sp2"),
    ("NO3", -1, 0, 3, "trigonal-planar", "trigonal-planar", "sp2"),
    ("CO3", -2, 0, 3, "trigonal-planar", "trigonal-planar", "sp2"),
    ("SO2", 0, 1, 3, "trigonal-planar", "bent", "sp2"),
    ("O3", 0, 1, 3, "trigonal-planar", "bent", "sp2"),
    ("CH4", 0, 0, 4, "tetrahedral", "tetrahedral", "sp3"),
    ("NH4", 1, 0, 4, "tetrahedral", "tetrahedral", "sp3"),
    ("SO4", -2, 0, 4, "tetrahedral", "tetrahedral", "sp3"),
    ("ClO4", -1, 0, 4, "tetrahedral", "tetrahedral", "sp3"),
    ("XeO4", 0, 0, 4, "tetrahedral", "tetrahedral", "sp3"),
    ("NH3", 0, 1, 4, "tetrahedral", "trigonal-pyramidal", "sp3"),
    ("XeO3", 0, 1, 4, "tetrahedral", "trigonal-pyramidal", "sp3"),
    ("H3O", 1, 1, 4, "tetrahedral", "trigonal-pyramidal", "sp3"),
    ("H2O", 0, 2, 4, "tetrahedral", "bent", "sp3"),
    ("PCl5", 0, 0, 5, "trigonal-bipyramidal", "trigonal-bipyramidal", "sp3d"),
    ("SF4", 0, 1, 5, "trigonal-bipyramidal", "seesaw", "sp3d"),
    ("XeO2F2", 0, 1, 5, "trigonal-bipyramidal", "seesaw", "sp3d"),
    ("ClF3", 0, 2, 5, "trigonal-bipyramidal", "t-shaped", "sp3d"),
    ("XeF2", 0, 3, 5, "trigonal-bipyramidal", "linear", "sp3d"),
    ("I3", -1, 3, 5, "trigonal-bipyramidal", "linear", "sp3d"),
    ("SF6", 0, 0, 6, "octahedral", "octahedral", "sp3d2"),
    ("PF6", -1, 0, 6, "octahedral", "octahedral", "sp3d2"),
    ("IF5", 0, 1, 6, "octahedral", "square-pyramidal", "sp3d2"),
    ("BrF5", 0, 1, 6, "octahedral", "square-pyramidal", "sp3d2"),
    ("XeF4", 0, 2, 6, "octahedral", "square-planar", "sp3d2"),
    ("ICl4", -1, 2, 6, "octahedral", "square-planar", "sp3d2"),
    ("IF7", 0, 0, 7, "pentagonal-bipyramidal", "pentagonal-bipyramidal", "sp3d3"),
    ("XeF5", -1, 2, 7, "pentagonal-bipyramidal", "pentagonal-planar", "sp3d3"),
]


@pytest.mark.parametrize("text, charge, lone_pairs, number, geometry, shape, label", TABLE)
def test_standard_table(formula, text, charge, lone_pairs, number, geometry, shape, label):
    analysis = analyse(formula(text, charge))
    assert analysis.outside_model is None
    centre = analysis.centres[0]
    assert (centre.lone_pairs, centre.steric_number, centre.electron_geometry, centre.shape, centre.hybridization) == (
        lone_pairs, number, geometry, shape, label)


def test_valence_electrons_include_the_charge(formula):
    sulfate = analyse(formula("SO4", -2)).centres[0]
    ammonium = analyse(formula("NH4", 1)).centres[0]
    assert sulfate.valence_electrons == 8 and ammonium.valence_electrons == 4


def test_radicals_count_a_half_domain(formula):
    no2 = analyse(formula("NO2")).centres[0]
    clo2 = analyse(formula("ClO2")).centres[0]
    assert (no2.odd_electrons, no2.lone_pairs, no2.steric_number, no2.shape) == (1, 0, 3, "bent")
    assert (clo2.odd_electrons, clo2.lone_pairs, clo2.steric_number, clo2.shape) == (1, 1, 4, "bent")
    # NO2 opens past 120 degrees; its anion, with a full lone pair, closes below
    assert no2.angle_range("O", "O")[0] >= 120
    assert analyse(formula("NO2", -1)).centres[0].angle_range("O", "O")[1] <= 120


def test_lone_pairs_close_the_angles(formula):
    assert analyse(formula("NH3")).centres[0].expected_direction("H", "H") == "smaller"
    assert analyse(formula("CH4")).centres[0].expected_direction("H", "H") == "ideal"
    sf4 = analyse(formula("SF4")).centres[0]
    assert {r.relation: r.direction for r in sf4.ranges_for("F", "F")}["axial-axial"] == "smaller"


def test_ideal_angles_of_the_polyhedra(formula):
    assert analyse(formula("PCl5")).centres[0].ideal_angles == (90.0, 120.0, 180.0)
    assert analyse(formula("SF6")).centres[0].ideal_angles == (90.0, 180.0)
    assert analyse(formula("CH4")).centres[0].ideal_angles == (109.47,)


def test_every_shape_of_the_table_has_angles():
    for (number, bonded), shape in SHAPES.items():
        lone_pairs = number - bonded
        result = vsepr(bonded, lone_pairs, 0)
        assert result is not None and result.shape == shape and result.site_angles
        assert all(a.low <= a.high for a in result.site_angles)
    assert steric_number(2, 0, 1) == 3
    assert vsepr(8, 0, 0) is None
