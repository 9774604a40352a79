"""Bent's rule predictions.  Expected orders are the textbook statements of the
rule (from memory); measured checks are in test_g2.py."""

from __future__ import annotations

from notelsp.chem import analyse
from notelsp.chem.bent import bond_length_trend
from notelsp.chem.model import LONE_PAIR


def test_electronegative_pair_has_the_smaller_angle(formula):
    order = analyse(formula("CH2F2")).centres[0].bent.order_between(("F", "C", "F"), ("H", "C", "H"))
    assert order.larger == ("H", "C", "H") and order.confidence == "high"


def test_multiply_bonded_ligand_widens_its_angles(formula):
    bent = analyse(formula("POCl3")).centres[0].bent
    order = bent.order_between(("O", "P", "Cl"), ("Cl", "P", "Cl"))
    assert order.larger == ("Cl", "P", "O") and "O" in bent.s_rich


def test_steric_override_for_two_large_ligands_on_carbon(formula):
    bent = analyse(formula("CH2Cl2")).centres[0].bent
    order = bent.order_between(("Cl", "C", "Cl"), ("H", "C", "H"))
    assert order.steric_override and order.confidence == "low" and order.larger == ("Cl", "C", "Cl")
    assert any("steric" in note for note in bent.notes)


def test_trigonal_bipyramid_axial_preference(formula):
    pcl3f2 = analyse(formula("PCl3F2")).centres[0].bent
    assert pcl3f2.axial_preference == ("F", "Cl")
    sof4 = analyse(formula("SOF4")).centres[0].bent
    assert sof4.axial_preference[-1] == "O"
    sf4 = analyse(formula("SF4")).centres[0].bent
    assert sf4.axial_preference[-1] == LONE_PAIR


def test_bond_length_trends(formula):
    cf4, ch3f = (analyse(formula(t)).centres[0] for t in ("CF4", "CH3F"))
    trend = bond_length_trend(("C", cf4.ligands), ("C", ch3f.ligands), ("C", "F"))
    assert trend.relation == "shorter"  # C-F shorter in CF4 than CH3F (from memory: 1.32 vs 1.38 A)
    c2f6, c2h6 = (analyse(formula(t)).centres[0] for t in ("C2F6", "C2H6"))
    central = bond_length_trend(("C", c2f6.ligands), ("C", c2h6.ligands), ("C", "C"))
    # CF3 for CH3 lengthens C-C by 0.03-0.04 A: gas-phase electron diffraction,
    # Hilderbrandt, Andreassen & Bauer, J. Phys. Chem. 74, 1586 (1970)
    assert central.relation == "longer" and central.confidence == "low"
    assert "Bent's rule alone would make" in central.reason
    assert bond_length_trend(("C", c2h6.ligands), ("C", c2h6.ligands), ("C", "C")) is None


def test_summary_states_orders_and_the_steric_exception(formula):
    ch2f2 = analyse(formula("CH2F2")).centres[0].bent.summary()
    assert "F-C-F < H-C-H (high confidence)" in ch2f2
    ch2cl2 = analyse(formula("CH2Cl2")).centres[0].bent.summary()
    assert "H-C-H < Cl-C-Cl (steric exception, low confidence)" in ch2cl2
    assert "axial preference F > Cl" in analyse(formula("PCl3F2")).centres[0].bent.summary()
    assert "lone pair" in analyse(formula("NH3")).centres[0].bent.summary()
    assert analyse(formula("CH4")).centres[0].bent.summary() == ""  # nothing to predict: hover leaves it out
