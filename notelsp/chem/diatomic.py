"""Two-atom species: no centre and no bond angle, but a shape, a point group and a polarity.

Any two points lie on a line, so a diatomic is linear; two like atoms are D∞h
(nonpolar), two unlike atoms C∞v, polar because their electronegativities differ
(common practice, no source; CO's dipole is small, 0.11 D, but not zero, from memory).
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True, slots=True)
class Diatomic:
    """The symmetry and polarity of a two-atom molecule."""

    atoms: tuple[str, str]
    point_group: str
    polar: bool
    shape: str = "linear"


def diatomic(composition: dict[str, int]) -> Diatomic | None:
    """The two-atom species a composition describes, or None when it has more or fewer atoms."""
    atoms = tuple(symbol for symbol, count in composition.items() for _ in range(count))
    if len(atoms) != 2:
        return None
    first, second = atoms
    if first == second:
        return Diatomic((first, second), "D∞h", False)
    return Diatomic((first, second), "C∞v", True)
