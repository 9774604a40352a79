"""Bond lengths and angles about the centre of an optimised structure. Pure."""

from __future__ import annotations

import math
from dataclasses import dataclass

Vector = tuple[float, float, float]


@dataclass(frozen=True, slots=True)
class BondLength:
    atoms: tuple[str, str]  # centre first: ("P", "F")
    site: str  # the ligand's starting site ("axial", "equatorial", "vertex")
    angstrom: float


@dataclass(frozen=True, slots=True)
class BondAngle:
    atoms: tuple[str, str, str]  # ligand, centre, ligand: ("H", "O", "H")
    sites: tuple[str, str]  # the two ligands' starting sites
    degrees: float


def _sub(a: Vector, b: Vector) -> Vector:
    return (a[0] - b[0], a[1] - b[1], a[2] - b[2])


def _norm(v: Vector) -> float:
    return math.sqrt(v[0] ** 2 + v[1] ** 2 + v[2] ** 2)


def angle_degrees(a: Vector, centre: Vector, b: Vector) -> float:
    u, v = _sub(a, centre), _sub(b, centre)
    cosine = (u[0] * v[0] + u[1] * v[1] + u[2] * v[2]) / (_norm(u) * _norm(v))
    return math.degrees(math.acos(max(-1.0, min(1.0, cosine))))


def bond_lengths(symbols: tuple[str, ...], positions: tuple[Vector, ...], sites: tuple[str, ...]) -> tuple[BondLength, ...]:
    """Centre (atom 0) to each ligand atom."""
    centre = positions[0]
    return tuple(
        BondLength((symbols[0], symbols[i]), sites[i - 1], _norm(_sub(positions[i], centre))) for i in range(1, len(symbols))
    )


def bond_angles(symbols: tuple[str, ...], positions: tuple[Vector, ...], sites: tuple[str, ...]) -> tuple[BondAngle, ...]:
    """Every ligand-centre-ligand angle (atom 0 is the centre)."""
    angles = []
    for i in range(1, len(symbols)):
        for j in range(i + 1, len(symbols)):
            pair = tuple(sorted((symbols[i], symbols[j])))
            angles.append(
                BondAngle(
                    (pair[0], symbols[0], pair[1]),
                    (sites[i - 1], sites[j - 1]),
                    angle_degrees(positions[i], positions[0], positions[j]),
                )
            )
    return tuple(angles)


def angles_between(angles: tuple[BondAngle, ...], atoms: tuple[str, str, str]) -> tuple[float, ...]:
    """The computed angles of the kind X-A-Y named by ``atoms`` (either order of the ends)."""
    wanted = (min(atoms[0], atoms[2]), atoms[1], max(atoms[0], atoms[2]))
    return tuple(a.degrees for a in angles if a.atoms == wanted)
