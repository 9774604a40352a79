"""Coulson's theorem against hand-checked arithmetic and G2 geometries."""

from __future__ import annotations

import math

import pytest

from notelsp.chem import analyse
from notelsp.chem.coulson import (
    angle_from_index,
    fractional_label,
    index_from_angle,
    index_from_s_character,
    s_character,
    solve_hybrids,
)


@pytest.mark.parametrize(
    "degrees, index, percent_s",
    [
        (180.0, 1.0, 50.0),  # sp: -1/cos 180 = 1 (hand-checked arithmetic)
        (120.0, 2.0, 100 / 3),  # sp2: -1/cos 120 = 2 (hand-checked arithmetic)
        (109.4712, 3.0, 25.0),  # sp3: cos = -1/3 (hand-checked arithmetic)
        (104.5, 3.994, 20.03),  # water: -1/cos 104.5 = 1/0.2504 (hand-checked arithmetic)
    ],
)
def test_equivalent_hybrids(degrees, index, percent_s):
    assert index_from_angle(degrees) == pytest.approx(index, abs=2e-3)
    assert 100 * s_character(index_from_angle(degrees)) == pytest.approx(percent_s, abs=0.02)
    assert angle_from_index(index) == pytest.approx(degrees, abs=0.01)


def test_ninety_degrees_is_pure_p():
    assert index_from_angle(90.0) is None and s_character(None) == 0.0 and angle_from_index(None) == 90.0
    assert index_from_s_character(0.25) == pytest.approx(3.0)
    assert fractional_label(2.3912) == "sp^2.39" and fractional_label(None) == "p (no s)"


def test_water_lone_pairs_take_the_s_the_bonds_leave():
    # H2O at 104.5 degrees: bonds about sp^4 (20 % s), lone pairs share 60 % (from memory, textbook value)
    result = solve_hybrids({"H": 2}, {("H", "H"): 104.5}, 2, "claimed")
    assert result.bond("H").s_character == pytest.approx(0.2003, abs=1e-3)
    assert result.lone_pair_s_character == pytest.approx(1 - 2 * 0.2003, abs=2e-3)
    assert result.per_lone_pair_s_character == pytest.approx(0.2997, abs=2e-3)


def test_non_equivalent_hybrids_satisfy_orthogonality():
    # AX2Y2 with X-A-X 112 and Y-A-Y 108: each condition 1 + sqrt(a b) cos = 0 (hand-checked arithmetic)
    result = solve_hybrids({"H": 2, "F": 2}, {("H", "H"): 112.0, ("F", "F"): 108.0}, 0, "claimed")
    h, f = result.bond("H").index, result.bond("F").index
    assert 1 + h * math.cos(math.radians(112.0)) == pytest.approx(0, abs=1e-9)
    assert 1 + f * math.cos(math.radians(108.0)) == pytest.approx(0, abs=1e-9)
    assert f > h  # the smaller angle has the p-richer hybrids


def test_g2_methyl_chloride_spends_the_whole_s_orbital():
    # CH3Cl in the ASE G2 set (Curtiss et al. 1997): H-C-H 110.0, Cl-C-H 108.9 (computed from coordinates)
    result = solve_hybrids({"H": 3, "Cl": 1}, {("H", "H"): 110.0, ("Cl", "H"): 108.9}, 0, "typical")
    total = 3 * result.bond("H").s_character + result.bond("Cl").s_character
    assert total == pytest.approx(1.0, abs=0.02) and result.consistent
    assert result.bond("Cl").s_character < 0.25 < result.bond("H").s_character  # Bent's rule


def test_analysis_uses_typical_angles_and_skips_hypervalent_centres(formula):
    nh3 = analyse(formula("NH3")).centres[0].coulson
    assert nh3.angle_source.startswith("typical")
    assert nh3.bond("H").index == pytest.approx(index_from_angle(106.3), rel=1e-6)
    assert analyse(formula("SF6")).centres[0].coulson is None
    xef2 = analyse(formula("BF3")).centres[0].coulson
    assert xef2.bond("F").index == pytest.approx(2.0) and xef2.angle_source == "predicted range midpoint"


def test_summary_gives_each_bond_hybrid_and_the_lone_pairs_share(formula):
    ch4 = analyse(formula("CH4")).centres[0].coulson.summary()
    assert "H sp^3.00 (25% s)" in ch4 and "lone pair" not in ch4  # 109.47° is exactly sp3 (hand-checked)
    h2o = analyse(formula("H2O")).centres[0].coulson.summary()
    assert "per lone pair" in h2o and "ASE G2" in h2o
    # CH2F2's G2 angles over-determine the indices; the fit still spends about one s orbital
    ch2f2 = analyse(formula("CH2F2")).centres[0].coulson
    assert ch2f2.consistent and "do not fit" not in ch2f2.summary()
