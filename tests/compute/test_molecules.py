"""Species read as molecules of several centres: built from their 3D model, optimised, angles by atom label.

Held against ASE's G2 set (``ase.collections.g2``; MP2(full)/6-31G(d) geometries,
Curtiss et al., J. Chem. Phys. 106, 1063 (1997)): every bond angle at every centre
of the computed molecule lies within the method's measured angle uncertainty of the
G2 angle at the same atoms.
"""

from __future__ import annotations

import itertools
import json

import pytest
from ase.collections import g2
from ase.data import covalent_radii

from notelsp.chem import analyse
from notelsp.compute import ANGLE_UNCERTAINTY_DEG
from notelsp.compute.cache import FORMAT, entry_key
from notelsp.compute.geometry import Skipped, Structure, start_structures
from notelsp.compute.result import geometry_from_dict, geometry_to_dict
from notelsp.notation import parse_formula

G2_SOURCE = "ASE G2 set (Curtiss et al., J. Chem. Phys. 106, 1063 (1997))"
# the notation's formula for each G2 molecule used here
MOLECULES = {"CH3COOH": "CH3COOH", "CH3OH": "CH3OH", "C2H4": "C2H4"}


def start(text: str, **options):
    return start_structures(analyse(parse_formula(text)), **options)


def test_a_molecule_starts_from_its_3d_model_with_every_atom_labelled():
    (acid,) = start("CH3COOH")
    molecule = analyse(parse_formula("CH3COOH")).molecule.molecule
    assert acid.labels == tuple(a.label for a in molecule.atoms)
    assert acid.symbols == tuple(a.element for a in molecule.atoms)
    assert acid.connections == tuple((b.first, b.second, b.order) for b in molecule.bonds)
    assert acid.sites == () and len(acid.positions) == len(acid.symbols) == 8
    assert acid.charge == 0 and acid.unpaired == 0 and acid.spin.startswith("singlet")
    assert Structure.from_dict(json.loads(json.dumps(acid.to_dict()))) == acid


def test_a_molecule_radical_is_a_doublet_and_an_ion_keeps_its_charge():
    (ethyl,) = start("CH3CH2")  # 17 electrons, the odd one on the CH2 carbon
    assert ethyl.unpaired == 1 and ethyl.spin.startswith("doublet")
    (acetate,) = start('smiles "CC(=O)[O-]"')
    assert acetate.charge == -1 and acetate.unpaired == 0


def test_a_molecule_past_the_atom_bound_is_skipped_with_the_reason():
    from notelsp.compute import Limits

    skipped = start("CH3COOH", limits=Limits(max_atoms=6))
    assert isinstance(skipped, Skipped) and "8 atoms" in skipped.reason


def test_molecule_results_survive_their_json_form_and_old_cache_keys_do_not_match():
    (acid,) = start("CH3COOH")
    assert FORMAT >= 2 and entry_key(acid)[0] == FORMAT  # entries written before molecules are never read
    raw = {"species": "CH3COOH", "charge": 0, "isomer": "", "rank": 1, "method": "GFN2-xTB",
           "versions": [["tblite", "x"]], "symbols": list(acid.symbols), "labels": list(acid.labels), "sites": [],
           "unpaired": 0, "spin": acid.spin, "start": [list(p) for p in acid.positions],
           "positions": [list(p) for p in acid.positions], "energy_ev": -1.0, "converged": True, "steps": 1,
           "wall_time_s": 0.1, "failed": None, "notes": [], "connections": [list(c) for c in acid.connections]}
    geometry = geometry_from_dict(raw)
    assert geometry_from_dict(geometry_to_dict(geometry)) == geometry
    # the three H-C1-H angles of the methyl group form one group of equivalent pairs
    (methyl,) = geometry.angles_at("C1", "H", "H")
    assert len(methyl) == 3


def _bonds(symbols, positions) -> set[frozenset[int]]:
    from ase.data import atomic_numbers

    return {frozenset((i, j)) for i, j in itertools.combinations(range(len(symbols)), 2)
            if sum((positions[i][k] - positions[j][k]) ** 2 for k in range(3)) ** 0.5
            < 1.25 * (covalent_radii[atomic_numbers[symbols[i]]] + covalent_radii[atomic_numbers[symbols[j]]])}


def _matching(geometry, reference) -> dict[int, int]:
    """Our atom index -> the G2 atom it is (same element, same bonds); the mapping with the least angle error."""
    ours = {frozenset((i, j)) for i, j, _ in geometry.connections}
    theirs = _bonds(reference.get_chemical_symbols(), reference.get_positions())
    symbols = reference.get_chemical_symbols()
    by_element: dict[str, tuple[list[int], list[int]]] = {}
    for index, symbol in enumerate(geometry.symbols):
        by_element.setdefault(symbol, ([], []))[0].append(index)
    for index, symbol in enumerate(symbols):
        by_element[symbol][1].append(index)
    best, best_error = None, float("inf")
    for choice in itertools.product(*(itertools.permutations(t) for _, t in by_element.values())):
        mapping = {o: t for (own, _), chosen in zip(by_element.values(), choice) for o, t in zip(own, chosen)}
        if {frozenset(mapping[i] for i in bond) for bond in ours} != theirs:
            continue
        error = sum(abs(a.degrees - reference.get_angle(mapping[a.first], mapping[a.centre], mapping[a.second]))
                    for a in geometry.angles)
        if error < best_error:
            best, best_error = mapping, error
    assert best is not None, "the computed molecule's bonds are not the G2 molecule's"
    return best


@pytest.fixture(scope="module")
def molecules(pool):
    return dict(zip(MOLECULES, pool.compute(list(MOLECULES.values()))))


@pytest.mark.parametrize("name", MOLECULES)
def test_every_angle_at_every_centre_agrees_with_g2(molecules, name):
    result = molecules[name]
    assert result.failed is None, result.failed
    geometry = result.lowest
    assert geometry.is_molecule and not geometry.sites
    reference = g2[name]
    mapping = _matching(geometry, reference)
    centres = {geometry.labels[a.centre] for a in geometry.angles}
    bonded = [sum(index in (i, j) for i, j, _ in geometry.connections) for index in range(len(geometry.symbols))]
    assert centres == {label for label, count in zip(geometry.labels, bonded) if count >= 2}
    print(f"\n{name}: GFN2-xTB vs {G2_SOURCE}")
    for angle in geometry.angles:
        reference_angle = reference.get_angle(mapping[angle.first], mapping[angle.centre], mapping[angle.second])
        print(f"  {'-'.join(angle.labels):12s} G2 {reference_angle:6.1f}°, computed {angle.degrees:6.1f}°")
        assert angle.degrees == pytest.approx(reference_angle, abs=ANGLE_UNCERTAINTY_DEG), angle.labels
        assert angle.labels[1] == geometry.labels[angle.centre]
