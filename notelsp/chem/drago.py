"""Drago's rule: heavier group 15/16 centres with lone pairs and electropositive
ligands bond through nearly pure p orbitals (angles near 90 degrees) and keep
an s-rich lone pair; they are best called unhybridized.

The s-p energy gap grows down a group while the bonds weaken, so mixing s into
the bonds stops paying; ligands of electronegativity >= 2.5 withdraw charge,
contract the centre's orbitals and bring hybridization back.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from .model import Ligand

LIGAND_EN_LIMIT = 2.5  # Pauling


@dataclass(frozen=True, slots=True)
class Condition:
    name: str
    holds: bool
    why: str


@dataclass(frozen=True, slots=True)
class DragoAnalysis:
    applies: bool
    conditions: tuple[Condition, ...]

    @property
    def failed(self) -> tuple[Condition, ...]:
        return tuple(c for c in self.conditions if not c.holds)


def drago(central: str, period: int, group: int | None, lone_pairs: int, ligands: Sequence[Ligand]) -> DragoAnalysis:
    """Check each of Drago's conditions for this centre."""
    conditions = (
        Condition(
            "period 3 or below",
            period >= 3,
            f"{central} is in period {period}"
            + ("" if period >= 3 else ": its 2s and 2p are close in energy and mix readily"),
        ),
        Condition(
            "group 15 or 16",
            group in (15, 16),
            f"{central} is in group {group}",
        ),
        Condition(
            "at least one lone pair",
            lone_pairs >= 1,
            f"{central} has {lone_pairs} lone pair{'s' if lone_pairs != 1 else ''}",
        ),
        _ligand_condition(ligands),
    )
    return DragoAnalysis(all(c.holds for c in conditions), conditions)


def _ligand_condition(ligands: Sequence[Ligand]) -> Condition:
    strong = sorted({l.label for l in ligands if l.electronegativity is None or l.electronegativity >= LIGAND_EN_LIMIT})
    if not strong:
        return Condition("ligands electronegativity < 2.5", True,
                         "all ligands are electropositive enough (Pauling EN < 2.5)")
    return Condition(
        "ligands electronegativity < 2.5",
        False,
        f"{', '.join(strong)} (Pauling EN >= 2.5) withdraw charge: the centre contracts and hybridizes",
    )
