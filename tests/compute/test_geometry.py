"""Starting structures built from the analysis (pure), and one optimisation in this process."""

from __future__ import annotations

import math

import numpy as np
import pytest

from notelsp.chem import analyse
from notelsp.chem.bondlength import predict_bond_length
from notelsp.compute.geometry import Skipped, Structure, optimise, start_structures
from notelsp.compute.method import Limits
from notelsp.notation import parse_formula


def starts(text: str, **kwargs):
    return start_structures(analyse(parse_formula(text)), **kwargs)


def test_ligands_sit_at_the_predicted_length_along_their_site_vectors():
    (nh3,) = starts("NH3")
    expected = predict_bond_length("N", "H", 1).angstrom
    assert nh3.symbols == ("N", "H", "H", "H") and nh3.positions[0] == (0.0, 0.0, 0.0)
    centre = analyse(parse_formula("NH3")).centres[0]
    vectors = [s.vector for s in centre.isomers[0].sites if s.symbol is not None]
    for position, vector in zip(nh3.positions[1:], vectors):
        assert math.dist(position, (0, 0, 0)) == pytest.approx(expected, abs=1e-5)
        assert np.allclose(np.array(position) / expected, vector, atol=1e-5)


def test_double_bonds_start_at_the_double_bond_length():
    (so2,) = starts("SO2")
    assert math.dist(so2.positions[1], so2.positions[0]) == pytest.approx(
        predict_bond_length("S", "O", 2).angstrom, abs=1e-5)


def test_every_isomer_of_a_mixed_halide_is_a_structure_and_mirror_images_count_once():
    pcl3f2 = starts("PCl3F2")
    assert len(pcl3f2) == 3  # F2 axial, one axial one equatorial, both equatorial (common practice, no source)
    centre = analyse(parse_formula("SF2Cl2")).centres[0]
    pairs = sum(1 for i, iso in enumerate(centre.isomers) if iso.enantiomer is not None and iso.enantiomer < i)
    assert len(starts("SF2Cl2")) == len(centre.isomers) - pairs


def test_spin_follows_the_electron_count():
    (no2,) = starts("NO2")
    (nh3,) = starts("NH3")
    (h3o,) = starts("H3O+")
    assert (no2.unpaired, nh3.unpaired, h3o.unpaired, h3o.charge) == (1, 0, 0, 1)
    assert "doublet" in no2.spin and "singlet" in nh3.spin


def test_methylene_takes_the_triplet_and_says_so():
    (ch2,) = starts("CH2")  # the analysis leaves CH2's spin open: two states (ASE G2 set has both)
    assert ch2.unpaired == 2 and "triplet assumed" in ch2.spin
    (singlet,) = starts("CH2", unpaired=0)
    assert singlet.unpaired == 0 and "requested" in singlet.spin


def test_what_cannot_be_built_is_skipped_with_a_reason():
    assert "groups (OH)" in starts("C(OH)4").reason
    assert "cannot have" in starts("NH3", unpaired=1).reason
    bounded = starts("SF6", limits=Limits(max_atoms=4))
    assert isinstance(bounded, Skipped) and "bounded to 4" in bounded.reason
    big = start_structures(analyse(parse_formula("C6H6")), Limits(max_atoms=8))  # a molecule past the bound
    assert isinstance(big, Skipped) and "12 atoms" in big.reason and "bounded to 8" in big.reason


def test_structure_survives_its_json_form():
    (pcl3f2,) = starts("PCl3F2")[:1]
    assert Structure.from_dict(pcl3f2.to_dict()) == pcl3f2


def test_optimised_water_bends_below_tetrahedral_and_reports_everything():
    (water,) = starts("H2O")
    result = optimise(water)
    assert result.failed is None and result.converged and result.usable
    (angle,) = result.angles
    assert angle.labels == ("H", "O", "H")
    # experiment 104.5° (CRC Handbook, from memory); the method's uncertainty is measured in test_accuracy
    assert 100 < angle.degrees < 109.47
    assert dict(result.versions).keys() == {"tblite", "ase"} and result.method == "GFN2-xTB"
    assert len(result.bonds) == 2 and result.energy_ev < 0


def test_a_calculation_the_library_refuses_is_a_failed_result_not_an_exception():
    (water,) = starts("H2O")
    impossible = Structure(**{**water.to_dict(), "unpaired": 1})  # 10 electrons, one unpaired
    result = optimise(impossible)
    assert result.failed and "GFN2-xTB failed" in result.failed and not result.usable and result.energy_ev is None


def test_a_step_bound_leaves_the_result_unconverged_and_unusable():
    (sf4,) = starts("SF4")[:1]
    result = optimise(sf4, Limits(max_steps=1))
    assert result.failed is None and not result.converged and not result.usable
    assert any("not converged" in note for note in result.notes)
