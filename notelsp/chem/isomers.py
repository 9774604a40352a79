"""Positional isomers of a centre: which ligand or lone pair sits on which site.

(Work in progress: the enumerator lands with the isomer work; until then no
isomers are reported.  The dataclasses below are the agreed shape.)
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

from .model import Ligand


@dataclass(frozen=True, slots=True)
class SitePlacement:
    label: str  # the ligand as written ("F", "OH") or LONE_PAIR
    symbol: str | None  # attaching atom; None for a lone pair
    position: str  # "axial", "equatorial", "apical", "basal" or "vertex"
    vector: tuple[float, float, float]  # unit vector from the centre


@dataclass(frozen=True, slots=True)
class Isomer:
    sites: tuple[SitePlacement, ...]
    point_group: str  # Schoenflies symbol of the labelled arrangement
    polar: bool
    dipole_debye: float  # bond-dipole estimate; 0 where the point group forbids a dipole
    chiral: bool  # has a non-superimposable mirror image
    name: str  # short description: "F axial", "cis", "fac", "lone pairs trans"
    rank: int  # 1 = the expected isomer
    reason: str  # why it ranks where it does
    confidence: Literal["high", "medium", "low"]


def isomers_for(electron_geometry: str, ligands: Sequence[Ligand], lone_pairs: int) -> tuple[Isomer, ...]:
    """Every distinct isomer, the expected one first (not yet implemented: returns none)."""
    return ()
