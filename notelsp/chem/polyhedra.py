"""Ideal coordination polyhedra: unit site vectors, site names and the
generators of each polyhedron's full point group.

The groups themselves are built by closure (``symmetry.close_group``) and
every operation is kept with the permutation of sites it causes, which is all
the isomer enumerator needs.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from .symmetry import INVERSION, close_group, reflection, rotation, site_permutation

Vector = tuple[float, float, float]


@dataclass(frozen=True, slots=True)
class Site:
    """One vertex of a VSEPR polyhedron: the kind of site and its direction."""

    position: str  # "axial", "equatorial", "apical", "basal" or "vertex"
    vector: Vector  # unit vector from the centre


@dataclass(frozen=True, slots=True)
class Operation:
    """One symmetry operation of a polyhedron: its matrix and the permutation of the sites."""

    matrix: tuple[Vector, Vector, Vector]
    permutation: tuple[int, ...]  # site i goes to site permutation[i]
    proper: bool  # a rotation (det +1) rather than a reflection / improper rotation


@dataclass(frozen=True, slots=True)
class Polyhedron:
    """The sites of one electron-domain geometry and its full point group."""

    name: str
    sites: tuple[Site, ...]
    operations: tuple[Operation, ...]  # the full point group of the bare polyhedron

    @property
    def vectors(self) -> np.ndarray:
        return np.array([site.vector for site in self.sites])

    @property
    def rotations(self) -> tuple[Operation, ...]:
        return tuple(op for op in self.operations if op.proper)

    @property
    def improper(self) -> tuple[Operation, ...]:
        return tuple(op for op in self.operations if not op.proper)


def _ring(count: int, position: str) -> list[Site]:
    """``count`` sites evenly round the equator, the first along +x."""
    return [
        Site(position, (math.cos(2 * math.pi * k / count), math.sin(2 * math.pi * k / count), 0.0))
        for k in range(count)
    ]


def _axial(position: str) -> list[Site]:
    return [Site(position, (0.0, 0.0, 1.0)), Site(position, (0.0, 0.0, -1.0))]


def _prismatic(count: int) -> list[np.ndarray]:
    """Generators of D(count)h about z: Cn, a C2 through the first ring site, the horizontal mirror."""
    return [rotation((0, 0, 1), 2 * math.pi / count), rotation((1, 0, 0), math.pi), reflection((0, 0, 1))]


def _layout(name: str) -> tuple[list[Site], list[np.ndarray]]:
    if name == "linear":
        # D∞h itself is infinite; its finite part that permutes the two sites suffices
        return _axial("vertex"), [rotation((1, 0, 0), math.pi), rotation((0, 0, 1), math.pi / 2), INVERSION]
    if name == "trigonal-planar":
        return _ring(3, "vertex"), _prismatic(3)
    if name == "tetrahedral":
        s = 1 / math.sqrt(3)
        sites = [Site("vertex", (s * a, s * b, s * c)) for a, b, c in ((1, 1, 1), (1, -1, -1), (-1, 1, -1), (-1, -1, 1))]
        return sites, [rotation((1, 1, 1), 2 * math.pi / 3), rotation((0, 0, 1), math.pi), reflection((1, -1, 0))]
    if name == "trigonal-bipyramidal":
        return _axial("axial") + _ring(3, "equatorial"), _prismatic(3)
    if name == "square-pyramidal":
        sites = [Site("apical", (0.0, 0.0, 1.0))] + _ring(4, "basal")
        return sites, [rotation((0, 0, 1), math.pi / 2), reflection((0, 1, 0))]
    if name == "octahedral":
        sites = _axial("vertex") + _ring(4, "vertex")
        return sites, [rotation((0, 0, 1), math.pi / 2), rotation((1, 1, 1), 2 * math.pi / 3), INVERSION]
    if name == "pentagonal-bipyramidal":
        return _axial("axial") + _ring(5, "equatorial"), _prismatic(5)
    raise ValueError(f"no polyhedron named {name!r}")


POLYHEDRA = (
    "linear",
    "trigonal-planar",
    "tetrahedral",
    "trigonal-bipyramidal",
    "square-pyramidal",
    "octahedral",
    "pentagonal-bipyramidal",
)


def _clean(value: float) -> float:
    rounded = round(value, 12)
    return 0.0 if rounded == 0 else rounded


@lru_cache(maxsize=len(POLYHEDRA))  # one entry per named polyhedron
def polyhedron(name: str) -> Polyhedron:
    """The ideal polyhedron ``name`` (one of POLYHEDRA) with its symmetry operations."""
    sites, generators = _layout(name)
    vectors = np.array([site.vector for site in sites])
    operations = []
    for matrix in close_group(generators):
        permutation = site_permutation(matrix, vectors)
        if permutation is None:
            raise AssertionError(f"a generator of {name} does not map its sites onto themselves")
        rows = tuple(tuple(_clean(v) for v in row) for row in matrix)
        operations.append(Operation(rows, permutation, bool(np.linalg.det(matrix) > 0)))  # type: ignore[arg-type]
    clean_sites = tuple(Site(s.position, tuple(_clean(v) for v in s.vector)) for s in sites)  # type: ignore[misc]
    return Polyhedron(name, clean_sites, tuple(operations))
