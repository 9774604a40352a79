"""Naming finite point groups from their elements.

Each group is generated from its textbook generators and must receive its
Schoenflies symbol back (common practice, no source).
"""

import math

import numpy as np
import pytest

from notelsp.chem.polarity import is_polar
from notelsp.chem.symmetry import (
    INVERSION,
    close_group,
    normalised_symbol,
    reflection,
    rotation,
    schoenflies,
)

Z, X = (0, 0, 1), (1, 0, 0)


def c(n, axis=Z):
    return rotation(axis, 2 * math.pi / n)


def s(n, axis=Z):
    return reflection(axis) @ rotation(axis, 2 * math.pi / n)


SIGMA_H = reflection(Z)
SIGMA_V = reflection((0, 1, 0))  # contains z and x
C2_X = rotation(X, math.pi)

CASES = {
    "C1": [np.eye(3)],
    "Cs": [SIGMA_H],
    "Ci": [INVERSION],
    "C2": [c(2)],
    "C3": [c(3)],
    "C2v": [c(2), SIGMA_V],
    "C3v": [c(3), SIGMA_V],
    "C4v": [c(4), SIGMA_V],
    "C5v": [c(5), SIGMA_V],
    "C2h": [c(2), SIGMA_H],
    "C3h": [c(3), SIGMA_H],
    "S4": [s(4)],
    "S6": [s(6)],
    "D2": [c(2), C2_X],
    "D3": [c(3), C2_X],
    "D2h": [c(2), C2_X, SIGMA_H],
    "D3h": [c(3), C2_X, SIGMA_H],
    "D4h": [c(4), C2_X, SIGMA_H],
    "D5h": [c(5), C2_X, SIGMA_H],
    "D2d": [s(4), C2_X],
    "D3d": [c(3), C2_X, INVERSION],
    "T": [c(2), c(3, (1, 1, 1))],
    "Td": [c(2), c(3, (1, 1, 1)), reflection((1, -1, 0))],
    "Th": [c(2), c(3, (1, 1, 1)), INVERSION],
    "O": [c(4), c(3, (1, 1, 1))],
    "Oh": [c(4), c(3, (1, 1, 1)), INVERSION],
}

ORDERS = {"C1": 1, "Cs": 2, "Ci": 2, "C2v": 4, "D2d": 8, "D3h": 12, "Td": 24, "Th": 24, "O": 24, "Oh": 48, "D5h": 20}


@pytest.mark.parametrize("symbol", sorted(CASES))
def test_group_named_from_its_elements(symbol):
    group = close_group(CASES[symbol])
    assert schoenflies(group) == symbol
    if symbol in ORDERS:
        assert len(group) == ORDERS[symbol]


@pytest.mark.parametrize("symbol", sorted(CASES))
def test_name_does_not_depend_on_orientation(symbol):
    turn = rotation((0.3, -0.5, 0.8), 0.7)
    group = close_group([turn @ g @ turn.T for g in CASES[symbol]])
    assert schoenflies(group) == symbol


def test_closure_refuses_an_infinite_group():
    with pytest.raises(ValueError):
        close_group([rotation(Z, 1.0)])  # an irrational turn never closes


@pytest.mark.parametrize(
    "symbol, polar",
    [("C1", True), ("Cs", True), ("C2", True), ("C2v", True), ("C3v", True), ("C∞v", True), ("Cinfv", True),
     ("Ci", False), ("C2h", False), ("D3h", False), ("D2d", False), ("S4", False), ("Td", False), ("Oh", False),
     ("D∞h", False)],
)
def test_polarity_from_point_group(symbol, polar):
    # a permanent dipole needs a direction every operation leaves fixed (common practice, no source)
    assert is_polar(symbol) is polar


def test_normalised_symbols_compare_across_notations():
    assert normalised_symbol("C*v") == normalised_symbol("C∞v") == normalised_symbol("Cinfv") == "Cinfv"
    assert normalised_symbol("c2V") == "C2v"
    assert normalised_symbol("D3h") == "D3h"
