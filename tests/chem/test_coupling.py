"""The Muller-Pritchard relation against published one-bond 13C-1H couplings.

Couplings (Hz), from memory of standard tables (Muller and Pritchard, J. Chem.
Phys. 31, 768 (1959); Kalinowski, Berger and Braun, 13C NMR Spectroscopy).
"""

from __future__ import annotations

import pytest

from notelsp.chem import analyse
from notelsp.chem.coulson import s_character
from notelsp.chem.coupling import TOLERANCE_HZ, coupling_from_s_character, s_character_from_coupling
from notelsp.notation import parse_formula

# (formula, carbon hybrid index by the textbook label, published 1J(C,H) in Hz)
HYDROCARBONS = [
    ("CH4", 3.0, 125.0),
    ("C2H6", 3.0, 124.9),
    ("C2H4", 2.0, 156.2),
    ("C2H2", 1.0, 248.7),
    ("C6H6", 2.0, 158.4),  # benzene
]
# Carbons with electronegative substituents: the relation underestimates these
SUBSTITUTED = [("CH3Cl", 150.0), ("CH2Cl2", 178.0), ("CHCl3", 209.0), ("HCN", 269.0)]


@pytest.mark.parametrize("formula, index, published", HYDROCARBONS)
def test_relation_holds_for_hydrocarbons_within_the_tolerance(formula, index, published):
    assert abs(coupling_from_s_character(s_character(index)) - published) <= TOLERANCE_HZ


@pytest.mark.parametrize("formula, published", SUBSTITUTED)
def test_electronegative_substituents_raise_the_coupling_above_the_relation(formula, published):
    # sp3 or sp carbon: the relation's value from the label is below the published coupling
    index = 1.0 if formula == "HCN" else 3.0
    assert published > coupling_from_s_character(s_character(index))


@pytest.mark.parametrize("formula", ["CH4", "C2H6", "C2H4", "C2H2"])
def test_the_analysis_c_h_s_character_gives_the_published_coupling(formula):
    published = dict((f, j) for f, _, j in HYDROCARBONS)[formula]
    centre = next(c for c in analyse(parse_formula(formula)).centres if c.central == "C")
    bond = centre.coulson.bond("H")
    assert abs(coupling_from_s_character(bond.s_character) - published) <= TOLERANCE_HZ


def test_inverse():
    assert s_character_from_coupling(125.0) == pytest.approx(0.25)
