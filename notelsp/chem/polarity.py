"""Polarity: which point groups allow a permanent dipole, and a rough
bond-dipole estimate of its size."""

from __future__ import annotations

import re
from collections.abc import Sequence

import numpy as np

from .symmetry import normalised_symbol

# A dipole must lie on every symmetry element at once: only groups with no
# inversion, no improper axis and at most one rotation axis (with mirrors
# containing it) leave such a direction.
_POLAR = re.compile(r"^(C1|Cs|C\d+|C\d+v|Cinfv)$")

DEBYE_PER_ELECTRONEGATIVITY = 1.0  # bond dipole per unit Pauling difference; rough rule of thumb
LONE_PAIR_DEBYE = 1.0  # contribution of one lone pair along its direction; rough rule of thumb


def is_polar(point_group: str) -> bool:
    """True when the point group allows a permanent dipole (C1, Cs, Cn, Cnv, C∞v)."""
    return bool(_POLAR.match(normalised_symbol(point_group)))


def dipole_estimate(
    directions: Sequence[Sequence[float]],
    electronegativities: Sequence[float | None],
    lone_pair: Sequence[bool],
    centre_electronegativity: float | None,
) -> float:
    """Magnitude in debye of the sum of bond dipoles and lone-pair contributions.

    Each bond contributes (χ ligand − χ centre) along its direction; a lone
    pair contributes LONE_PAIR_DEBYE along its own.  Without a centre
    electronegativity the ligands' mean stands in, so that only the
    differences between ligands count.  A missing ligand value counts as no
    difference.
    """
    known = [x for x, lp in zip(electronegativities, lone_pair) if not lp and x is not None]
    reference = centre_electronegativity
    if reference is None:
        reference = sum(known) / len(known) if known else 0.0
    total = np.zeros(3)
    for direction, chi, is_lone_pair in zip(directions, electronegativities, lone_pair):
        vector = np.asarray(direction, dtype=float)
        if is_lone_pair:
            total += LONE_PAIR_DEBYE * vector
        elif chi is not None:
            total += DEBYE_PER_ELECTRONEGATIVITY * (chi - reference) * vector
    return float(np.linalg.norm(total))
