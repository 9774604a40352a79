"""Known exceptions to plain VSEPR, each against a published geometry or a value marked "from memory".

Geometries named "G2" are ASE's G2 set (``ase.collections.g2``; Curtiss et al.,
J. Chem. Phys. 106, 1063 (1997), MP2(full)/6-31G(d)); angles are measured from
its coordinates here, not copied.
"""

from __future__ import annotations

import numpy as np
import pytest
from ase.collections import g2

from notelsp.chem import analyse
from notelsp.chem.exceptions import UNCERTAIN, USUAL
from notelsp.notation import parse_formula


def centre_of(text: str):
    analysis = analyse(parse_formula(text))
    assert analysis.outside_model is None, analysis.outside_model
    return analysis.centres[0]


def g2_angle(name: str) -> float:
    """The angle at atom 0 between atoms 1 and 2 of a G2 molecule (the centre comes first in these)."""
    atoms = g2[name]
    u, v = atoms.positions[1] - atoms.positions[0], atoms.positions[2] - atoms.positions[0]
    return float(np.degrees(np.arccos(np.dot(u, v) / np.linalg.norm(u) / np.linalg.norm(v))))


def window(centre) -> tuple[float, float]:
    (only,) = {(r.low, r.high) for r in centre.angle_ranges}
    return only


@pytest.mark.parametrize("formula, g2_name", [("CH2", "CH2_s1A1d"), ("CH2", "CH2_s3B1d"), ("SiH2", "SiH2_s1A1d")])
def test_divalent_group_14_windows_hold_the_g2_angles(formula, g2_name):
    centre = centre_of(formula)
    low, high = window(centre)
    assert low <= g2_angle(g2_name) <= high
    assert centre.shape == "bent"


def test_methylene_is_uncertain_because_of_its_two_spin_states():
    # G2: singlet 102.1°, triplet 131.6°: the formula alone does not decide the angle
    assert centre_of("CH2").confidence == UNCERTAIN


@pytest.mark.parametrize("formula, angle", [
    ("CF2", 104.9),   # from memory (microwave spectrum of CF2)
    ("SiF2", 100.8),  # from memory
    ("GeCl2", 100.0),  # about 100°, from memory
    ("SnCl2", 98.0),  # about 98°, gas-phase electron diffraction, from memory
    ("PbCl2", 98.0),  # about 98°, from memory
])
def test_heavier_and_halogenated_carbenes_close_well_below_120(formula, angle):
    centre = centre_of(formula)
    low, high = window(centre)
    assert low <= angle <= high < 120.0
    assert centre.confidence == USUAL


def test_methyl_radical_is_planar():
    atoms = g2["CH3"]  # G2: planar, H-C-H 120.0°
    centre = centre_of("CH3")
    assert centre.shape == "trigonal-planar"
    low, high = window(centre)
    assert low <= g2_angle("CH3") <= high
    normal = np.cross(atoms.positions[1] - atoms.positions[0], atoms.positions[2] - atoms.positions[0])
    assert abs(np.dot(normal / np.linalg.norm(normal), atoms.positions[3] - atoms.positions[0])) < 1e-3


@pytest.mark.parametrize("formula, angle", [
    ("SiH3", None),  # G2 SiH3, measured below
    ("CF3", 111.1),  # about 111°, from memory (ESR and ab initio structures of CF3)
])
def test_silyl_and_trifluoromethyl_radicals_are_pyramidal(formula, angle):
    centre = centre_of(formula)
    assert centre.shape == "trigonal-pyramidal"
    low, high = window(centre)
    assert low <= (angle if angle is not None else g2_angle("SiH3")) <= high


@pytest.mark.parametrize("formula", ["TeCl6^2-", "SbCl6^3-", "TeBr6^2-"])
def test_heavy_hexahalides_keep_an_inert_pair(formula):
    # regular octahedra in their salts' crystal structures (from memory)
    centre = centre_of(formula)
    assert centre.lone_pairs == 1
    assert centre.shape == "octahedral"
    assert {r.ideal for r in centre.angle_ranges} == {90.0, 180.0}


def test_xenon_hexafluoride_is_a_distorted_octahedron_of_uncertain_detail():
    # gas phase: distorted, fluxional octahedron, C3v (from memory)
    centre = centre_of("XeF6")
    assert centre.shape == "distorted-octahedral"
    assert centre.confidence == UNCERTAIN
    assert {"octahedral", "pentagonal-pyramidal"} <= set(centre.plausible_shapes)
    assert centre.isomers == () and centre.isomers_withheld


@pytest.mark.parametrize("formula, shape", [("SrF2", "bent"), ("BaF2", "bent"), ("CaF2", "bent"), ("CaCl2", "linear")])
def test_heavy_alkaline_earth_dihalides_are_soft_and_often_bent(formula, shape):
    # gas phase: SrF2 and BaF2 bent, CaF2 bent, CaCl2 quasi-linear (from memory)
    centre = centre_of(formula)
    assert centre.shape == shape
    assert centre.confidence == UNCERTAIN
    assert {"linear", "bent"} <= set(centre.plausible_shapes)


def test_light_alkaline_earth_dihalides_stay_linear():
    # BeCl2 and MgF2 are linear in the gas phase (common practice, no source)
    for formula in ("BeCl2", "MgF2"):
        centre = centre_of(formula)
        assert centre.shape == "linear" and centre.exception is None


def test_trisilylamine_is_planar_at_nitrogen():
    # gas-phase electron diffraction: planar NSi3 (from memory)
    centre = centre_of("N(SiH3)3")
    assert centre.shape == "trigonal-planar" and centre.hybridization == "sp2"
    assert centre.lone_pairs == 1


def test_trimethylamine_stays_pyramidal():
    # N(CH3)3 is pyramidal, C-N-C about 110.9° (from memory): no exception for carbon ligands
    centre = centre_of("N(CH3)3")
    assert centre.shape == "trigonal-pyramidal" and centre.exception is None


@pytest.mark.parametrize("formula, shape, also", [
    ("NH2(COCH3)", "trigonal-planar", ()),  # amide N planar (common practice, no source)
    ("NH2(C6H5)", "trigonal-planar", ("trigonal-pyramidal",)),  # aniline N nearly planar, slightly pyramidal
    ("OH(C6H5)", "bent", ()),  # phenol O: still bent, its lone pair in the ring's π system
])
def test_a_lone_pair_beside_a_pi_system_read_from_the_graph_is_conjugated(formula, shape, also):
    # read as a molecule, the N or O is the first centre and its neighbour's π bond is known, not guessed
    centre = centre_of(formula)
    assert centre.confidence == USUAL and centre.hybridization == "sp2"
    assert centre.plausible_shapes == (shape, *also)


@pytest.mark.parametrize("formula", ["NH3", "H2O", "PH3", "ClF3", "SF4", "XeF4", "CH4", "IF7"])
def test_plain_vsepr_species_have_no_exception(formula):
    assert centre_of(formula).exception is None


def _ligand(symbol: str, label: str, order: int = 1):
    from notelsp import elements
    from notelsp.chem.model import Ligand

    return Ligand(symbol, label, order, elements.element(symbol).electronegativity)


def test_a_graph_conjugated_lone_pair_is_planar_and_sp2():
    # amide N (common practice, no source): the graph says its lone pair is beside C=O
    from notelsp.chem.exceptions import known_exception
    from notelsp.chem.model import Conjugation

    amide = Conjugation("amide-type", "a lone pair on N is conjugated with the C2=O π bond, so N is planar and sp2", True)
    ligands = (_ligand("C", "C2"), _ligand("H", "H1"), _ligand("H", "H2"))
    found = known_exception("N", ligands, 1, 0, 0, conjugation=amide, bonds_known=True)
    assert (found.shape, found.electron_geometry, found.hybridization) == ("trigonal-planar", "trigonal-planar", "sp2")
    assert found.confidence == USUAL and found.also_plausible == () and "C2=O" in found.reason
    shallow = Conjugation("aniline-type", "a lone pair on N is conjugated with the aromatic ring", False)
    assert known_exception("N", ligands, 1, 0, 0, conjugation=shallow, bonds_known=True).also_plausible == (
        "trigonal-pyramidal",)


def test_with_a_graph_the_written_group_guess_is_not_made():
    from notelsp.chem.exceptions import known_exception

    ligands = (_ligand("C", "COCH3"), _ligand("H", "H"), _ligand("H", "H"))
    guessed = known_exception("N", ligands, 1, 0, 0)
    assert guessed is not None and guessed.confidence == UNCERTAIN  # formula text: a π system may be there
    assert known_exception("N", ligands, 1, 0, 0, bonds_known=True) is None  # graph: it is known not to be
