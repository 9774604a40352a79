"""Naming the isomer an optimised structure ended as (pure)."""

from __future__ import annotations

import numpy as np

from notelsp.chem import analyse
from notelsp.compute.geometry import start_structures
from notelsp.compute.identity import closest_start, mismatch
from notelsp.notation import parse_formula


def rotated(positions, axis=(1.0, 2.0, 3.0), angle=0.7):
    """The same structure turned about an axis (Rodrigues' formula, common practice, no source)."""
    k = np.array(axis) / np.linalg.norm(axis)
    cross = np.array([[0, -k[2], k[1]], [k[2], 0, -k[0]], [-k[1], k[0], 0]])
    matrix = np.eye(3) + np.sin(angle) * cross + (1 - np.cos(angle)) * cross @ cross
    return [tuple(matrix @ np.array(p)) for p in positions]


def test_every_start_is_closest_to_itself_even_turned_and_with_its_atoms_listed_in_another_order():
    starts = start_structures(analyse(parse_formula("PCl2F3")))
    pairs = [(s.positions, s.labels) for s in starts]
    for index, start in enumerate(starts):
        order = [0, *reversed(range(1, len(start.positions)))]
        positions = rotated([start.positions[i] for i in order])
        labels = [start.labels[i - 1] for i in order[1:]]
        assert closest_start(positions, labels, pairs, own=(index + 1) % len(starts)) == index


def test_a_structure_that_moved_to_another_isomers_angles_is_named_as_that_isomer():
    # one Cl axial, one equatorial in PCl2F3; placed as "both Cl equatorial" it is that isomer
    starts = start_structures(analyse(parse_formula("PCl2F3")))
    by_name = {s.isomer: i for i, s in enumerate(starts)}
    target = starts[by_name["both Cl equatorial"]]
    pairs = [(s.positions, s.labels) for s in starts]
    found = closest_start(target.positions, target.labels, pairs, own=by_name["one Cl axial, one equatorial"])
    assert found == by_name["both Cl equatorial"]


def test_different_atoms_never_match():
    (nh3,) = start_structures(analyse(parse_formula("NH3")))
    (nf3,) = start_structures(analyse(parse_formula("NF3")))
    assert mismatch(nh3.positions, nh3.labels, nf3.positions, nf3.labels) == float("inf")
