"""Which isomer an optimised structure ended as.

An optimisation may carry one isomer over into another (a Berry
pseudorotation in a trigonal bipyramid, a ligand sliding past a lone pair).
The optimised structure is compared with every starting structure of its
species: for each, the pattern of angles at the centre, with atoms of the
same label matched in the best way, and the closest start names the isomer
it now is.  Pure.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from itertools import permutations, product

import numpy as np

from .result import Vector

MAX_MATCHINGS = 5040  # 7! : the most a single centre's ligands of one label can need


def angle_matrix(positions: Sequence[Vector]) -> np.ndarray:
    """Angles (degrees) between every pair of ligands at the centre (positions[0])."""
    arms = np.array(positions[1:], dtype=float) - np.array(positions[0], dtype=float)
    lengths = np.linalg.norm(arms, axis=1)
    lengths[lengths == 0.0] = 1.0
    units = arms / lengths[:, None]
    return np.degrees(np.arccos(np.clip(units @ units.T, -1.0, 1.0)))


def mismatch(positions: Sequence[Vector], labels: Sequence[str], start_positions: Sequence[Vector],
             start_labels: Sequence[str]) -> float:
    """The least summed |angle difference| over matchings of same-label ligands; inf if the labels differ."""
    if sorted(labels) != sorted(start_labels):
        return math.inf
    ours, theirs = angle_matrix(positions), angle_matrix(start_positions)
    groups: dict[str, tuple[list[int], list[int]]] = {}
    for index, label in enumerate(labels):
        groups.setdefault(label, ([], []))[0].append(index)
    for index, label in enumerate(start_labels):
        groups[label][1].append(index)
    count = math.prod(math.factorial(len(ours_)) for ours_, _ in groups.values())
    if count > MAX_MATCHINGS:
        return math.inf
    upper = np.triu_indices(len(labels), 1)
    best = math.inf
    for choice in product(*(permutations(theirs_) for _, theirs_ in groups.values())):
        order = [0] * len(labels)
        for (ours_, _), chosen in zip(groups.values(), choice):
            for source, target in zip(ours_, chosen):
                order[source] = target
        cost = float(np.abs(ours[upper] - theirs[np.ix_(order, order)][upper]).sum())
        best = min(best, cost)
    return best


def closest_start(positions: Sequence[Vector], labels: Sequence[str],
                  starts: Sequence[tuple[Sequence[Vector], Sequence[str]]], own: int) -> int:
    """Index of the start the structure is now closest to (``own`` on a tie)."""
    costs = [mismatch(positions, labels, p, l) for p, l in starts]
    best = min(costs)
    return own if costs[own] <= best + 1e-6 else costs.index(best)
