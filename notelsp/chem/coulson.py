"""Coulson's theorem: bond angles <-> hybridization indices and s-character.

For two orthogonal s-p hybrids sp^a and sp^b at angle theta,
1 + sqrt(a*b) cos(theta) = 0.  With equivalent hybrids that is i = -1/cos(theta);
with several kinds of bond the conditions are linear in log(i), so they are
solved together by least squares.  Each hybrid sp^i has s-character 1/(1+i);
the centre has one s orbital, so whatever the bonds leave goes to lone pairs.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

# Typical bond angles of well-known species, used when no angle is claimed.
# Source: ASE G2 set geometries (Curtiss et al., J. Chem. Phys. 106, 1063 (1997)),
# angles computed from the coordinates and rounded to 0.1 degree.
TYPICAL_ANGLES: Mapping[str, Mapping[tuple[str, str], float]] = {
    "H2O": {("H", "H"): 104.0},
    "NH3": {("H", "H"): 106.3},
    "CH4": {("H", "H"): 109.5},
    "PH3": {("H", "H"): 94.6},
    "H2S": {("H", "H"): 93.3},
    "SH2": {("H", "H"): 93.3},
    "OF2": {("F", "F"): 102.6},
    "F2O": {("F", "F"): 102.6},
    "NF3": {("F", "F"): 101.6},
    "PF3": {("F", "F"): 97.6},
    "SO2": {("O", "O"): 119.8},
    "NO2": {("O", "O"): 133.7},
    "O3": {("O", "O"): 116.3},
    "CH2F2": {("F", "F"): 108.9, ("F", "H"): 108.8, ("H", "H"): 112.8},
    "H2CF2": {("F", "F"): 108.9, ("F", "H"): 108.8, ("H", "H"): 112.8},
    "CH2Cl2": {("Cl", "Cl"): 113.0, ("Cl", "H"): 108.3, ("H", "H"): 110.8},
    "H2CCl2": {("Cl", "Cl"): 113.0, ("Cl", "H"): 108.3, ("H", "H"): 110.8},
    "CHF3": {("F", "F"): 108.5, ("F", "H"): 110.5},
    "HCF3": {("F", "F"): 108.5, ("F", "H"): 110.5},
    "CHCl3": {("Cl", "Cl"): 111.2, ("Cl", "H"): 107.6},
    "HCCl3": {("Cl", "Cl"): 111.2, ("Cl", "H"): 107.6},
    "CH3Cl": {("Cl", "H"): 108.9, ("H", "H"): 110.0},
    "H2CO": {("H", "H"): 115.7, ("H", "O"): 122.2},
    "COF2": {("F", "F"): 107.5, ("F", "O"): 126.2},
    "HOCl": {("Cl", "H"): 102.7},
    "H2O2": {("H", "O"): 98.6},
    "C2H4": {("H", "H"): 116.6, ("C", "H"): 121.7},
    "C2H6": {("H", "H"): 107.7, ("C", "H"): 111.2},
    "C2F4": {("F", "F"): 114.0, ("C", "F"): 123.0},
}


@dataclass(frozen=True, slots=True)
class BondHybrid:
    """Coulson's hybridization index and s-character of the hybrid towards one ligand."""

    ligand: str  # the ligand label
    index: float | None  # i in sp^i; None = pure p (angle at or below 90 degrees)
    s_character: float  # fraction 0..1

    @property
    def label(self) -> str:
        return fractional_label(self.index)


@dataclass(frozen=True, slots=True)
class CoulsonAnalysis:
    """The hybrids of a centre from its angles (Coulson's orthogonality relation)."""

    bonds: tuple[BondHybrid, ...]  # one per distinct ligand label
    lone_pair_s_character: float  # s left to all non-bonding domains together (fraction)
    per_lone_pair_s_character: float | None  # per non-bonding domain; None without any
    angles_used: tuple[tuple[str, str, float], ...]  # (ligand, ligand, degrees)
    angle_source: str  # "claimed", "typical (ASE G2 set)" or "predicted range midpoint"
    consistent: bool  # the angles and s budget fit together (bond s <= 1)

    def summary(self) -> str:
        """One readable line: each bond's hybrid and s-character, the lone pairs' share, the angles' source."""
        bonds = ", ".join(f"{b.ligand} {b.label} ({100 * b.s_character:.0f}% s)" for b in self.bonds)
        parts = [f"Coulson: {bonds}" if bonds else "Coulson: no bond angle to use"]
        if self.per_lone_pair_s_character is not None:
            parts.append(f"{100 * self.per_lone_pair_s_character:.0f}% s per lone pair")
        parts.append(f"angles: {self.angle_source}")
        if not self.consistent:
            parts.append("the angles do not fit one s orbital's worth of s-character")
        return "; ".join(parts)

    def bond(self, ligand: str) -> BondHybrid | None:
        return next((b for b in self.bonds if b.ligand == ligand), None)


def index_from_angle(degrees: float) -> float | None:
    """Coulson index of two equivalent hybrids at this angle; None at or below 90 degrees (pure p)."""
    cosine = math.cos(math.radians(degrees))
    if cosine >= -1e-9:
        return None
    return -1.0 / cosine


def angle_from_index(index: float | None) -> float:
    """Angle between two equivalent sp^i hybrids."""
    if index is None:
        return 90.0
    return math.degrees(math.acos(-1.0 / index))


def s_character(index: float | None) -> float:
    """Fraction of s in an sp^i hybrid."""
    return 0.0 if index is None else 1.0 / (1.0 + index)


def index_from_s_character(fraction: float) -> float | None:
    return None if fraction <= 0 else 1.0 / fraction - 1.0


def fractional_label(index: float | None) -> str:
    """``sp^2.39`` style; pure p when there is no s."""
    return "p (no s)" if index is None else f"sp^{index:.2f}"


def solve_hybrids(
    bond_counts: Mapping[str, int],
    pair_angles: Mapping[tuple[str, str], float],
    nonbonding_domains: int,
    angle_source: str,
) -> CoulsonAnalysis:
    """Indices of each kind of bond hybrid from the angles between them.

    ``bond_counts`` maps ligand label -> number of such bonds, ``pair_angles``
    (label, label) -> degrees.  Pairs at or below 90 degrees mean pure p.
    """
    import numpy as np  # loaded here, on first use: most reviews never fit hybrids

    labels = list(bond_counts)
    pure_p = {a for (a, b), angle in pair_angles.items() if a == b and angle <= 90.0}
    rows, rhs = [], []
    for (a, b), angle in pair_angles.items():
        if a in pure_p or b in pure_p:
            continue
        cosine = math.cos(math.radians(angle))
        if cosine >= -1e-9:
            continue
        row = np.zeros(len(labels))
        row[labels.index(a)] += 1.0
        row[labels.index(b)] += 1.0
        rows.append(row)
        rhs.append(2.0 * math.log(-1.0 / cosine))  # log a + log b = 2 log(-1/cos)
    indices: dict[str, float | None] = {label: None for label in pure_p}
    solvable = [label for label in labels if label not in pure_p]
    if rows:
        matrix = np.array(rows)
        columns = [labels.index(label) for label in solvable]
        solution, *_ = np.linalg.lstsq(matrix[:, columns], np.array(rhs), rcond=None)
        for label, log_index in zip(solvable, solution):
            indices[label] = float(math.exp(log_index))
    bonds = tuple(BondHybrid(label, indices.get(label), s_character(indices.get(label))) for label in labels
                  if label in indices)
    bond_s = sum(s_character(indices[label]) * bond_counts[label] for label in labels if label in indices)
    left = 1.0 - bond_s
    # measured angles over-determine the indices and the theorem is approximate, so allow a few
    # percent either way (CH2F2's G2 angles give 102% s over the bonds)
    consistent = left >= -0.05 and (nonbonding_domains > 0 or abs(left) <= 0.05)
    per = max(left, 0.0) / nonbonding_domains if nonbonding_domains else None
    used = tuple((a, b, float(angle)) for (a, b), angle in pair_angles.items())
    return CoulsonAnalysis(bonds, max(left, 0.0), per, used, angle_source, consistent)
