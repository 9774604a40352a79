"""Which atom is central and what it bonds to.  Expected structures are the
usual textbook connectivities (common practice, no source)."""

from __future__ import annotations

import pytest

from notelsp.chem import analyse
from notelsp.chem.species import build_species


@pytest.mark.parametrize(
    "text, charge, central, ligands",
    [
        ("HOCl", 0, "O", ["Cl", "H"]),
        ("XeO2F2", 0, "Xe", ["F", "F", "O", "O"]),
        ("SOF4", 0, "S", ["F", "F", "F", "F", "O"]),
        ("POCl3", 0, "P", ["Cl", "Cl", "Cl", "O"]),
        ("SO4", -2, "S", ["O", "O", "O", "O"]),
        ("ClO4", -1, "Cl", ["O", "O", "O", "O"]),
        ("H2SO4", 0, "S", ["O", "O", "OH", "OH"]),
        ("H3PO4", 0, "P", ["O", "OH", "OH", "OH"]),
        ("HClO4", 0, "Cl", ["O", "O", "O", "OH"]),
        ("CH3OH", 0, "C", ["H", "H", "H", "OH"]),
        ("Cl2O", 0, "O", ["Cl", "Cl"]),
        ("N2O", 0, "N", ["N", "O"]),
        ("I3", -1, "I", ["I", "I"]),
        ("ClF3", 0, "Cl", ["F", "F", "F"]),
        ("Si(CH3)4", 0, "Si", ["CH3", "CH3", "CH3", "CH3"]),
        ("B(OH)3", 0, "B", ["OH", "OH", "OH"]),
    ],
)
def test_central_atom_and_ligands(formula, text, charge, central, ligands):
    model = build_species(formula(text, charge))
    assert model.outside_model is None
    (centre,) = model.centres
    assert centre.central == central
    assert sorted(l.label for l in centre.ligands) == ligands


@pytest.mark.parametrize(
    "text, central, partner_order, others",
    [
        ("N2H4", "N", 1, ["H", "H"]),
        ("H2O2", "O", 1, ["H"]),
        ("C2F6", "C", 1, ["F", "F", "F"]),
        ("C2H6", "C", 1, ["H", "H", "H"]),
        ("C2H4", "C", 2, ["H", "H"]),
        ("C2H2", "C", 3, ["H"]),
    ],
)
def test_symmetric_two_centre_molecules(formula, text, central, partner_order, others):
    model = build_species(formula(text))
    assert len(model.centres) == 2 and model.centres[0] == model.centres[1]
    centre = model.centres[0]
    partner = [l for l in centre.ligands if l.symbol == central]
    assert centre.central == central and len(partner) == 1 and partner[0].bond_order == partner_order
    assert sorted(l.label for l in centre.ligands if l.symbol != central) == others


def test_explicit_centre_is_used(formula):
    model = build_species(formula("HOCl", centre="O"))
    assert model.centres[0].central == "O"


def test_ligand_bond_orders_follow_the_electron_count(formula):
    (centre,) = build_species(formula("SOF4")).centres
    orders = {l.label: l.bond_order for l in centre.ligands}
    assert orders == {"O": 2, "F": 1}
    (hcn,) = build_species(formula("HCN")).centres
    assert {l.label: l.bond_order for l in hcn.ligands} == {"H": 1, "N": 3}


@pytest.mark.parametrize(
    "text, words",
    [
        ("Fe(CO)5", "transition-metal"),
        ("PtCl4", "transition-metal"),
        ("CeF4", "f-block"),
        ("HF", "fewer than two"),
        ("N2", "diatomic"),
        ("C3H8", "more than one centre"),  # a molecular formula names no structure
        ("C2H6O", "names no structure"),
    ],
)
def test_outside_the_model_is_explained_not_answered(formula, text, words):
    analysis = analyse(formula(text))
    assert analysis.centres == () and words in analysis.outside_model


def test_analysis_is_cached_by_text_centre_and_charge(formula):
    first = analyse(formula("NO2", 0))
    assert analyse(formula("NO2", 0)) is first
    anion = analyse(formula("NO2", -1))
    assert anion is not first and anion.centres[0].odd_electrons == 0 and anion.centres[0].lone_pairs == 1
