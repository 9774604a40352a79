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
    """One condition of Drago's rule, whether it holds, and why."""

    name: str
    holds: bool
    why: str
    brief: str = ""  # a few words for the one-line summary ("P is in period 3", "has a lone pair")


@dataclass(frozen=True, slots=True)
class DragoAnalysis:
    """Whether Drago's rule applies to a centre, condition by condition."""

    applies: bool
    conditions: tuple[Condition, ...]

    @property
    def failed(self) -> tuple[Condition, ...]:
        return tuple(c for c in self.conditions if not c.holds)

    def summary(self) -> str:
        """One readable line: whether the rule applies, and the conditions that decide it."""
        def brief(condition: Condition) -> str:
            return condition.brief or condition.why

        if self.applies:
            return ("applies: " + ", ".join(brief(c) for c in self.conditions)
                    + " → nearly pure p bonding, angles near 90°")
        return "does not apply: " + "; ".join(brief(c) for c in self.failed) + "; the centre hybridizes"


def drago(central: str, period: int, group: int | None, lone_pairs: int, ligands: Sequence[Ligand]) -> DragoAnalysis:
    """Check each of Drago's conditions for this centre."""
    conditions = (
        Condition(
            "period 3 or below",
            period >= 3,
            f"{central} is in period {period}"
            + ("" if period >= 3 else ": its 2s and 2p are close in energy and mix readily"),
            f"{central} is in period {period}" + ("" if period >= 3 else " (2s and 2p mix readily)"),
        ),
        Condition(
            "group 15 or 16",
            group in (15, 16),
            f"{central} is in group {group}",
            f"group {group}" if group in (15, 16) else f"{central} is in group {group}",
        ),
        Condition(
            "at least one lone pair",
            lone_pairs >= 1,
            f"{central} has {lone_pairs} lone pair{'s' if lone_pairs != 1 else ''}",
            _lone_pair_brief(central, lone_pairs),
        ),
        _ligand_condition(ligands),
    )
    return DragoAnalysis(all(c.holds for c in conditions), conditions)


def _lone_pair_brief(central: str, lone_pairs: int) -> str:
    if lone_pairs == 0:
        return f"{central} has no lone pair"
    return "has a lone pair" if lone_pairs == 1 else f"has {lone_pairs} lone pairs"


def _ligand_condition(ligands: Sequence[Ligand]) -> Condition:
    strong = {l.label: l.electronegativity for l in ligands
              if l.electronegativity is None or l.electronegativity >= LIGAND_EN_LIMIT}
    if not strong:
        return Condition("ligands electronegativity < 2.5", True,
                         "all ligands are electropositive enough (Pauling EN < 2.5)",
                         f"all ligands below {LIGAND_EN_LIMIT:g}")
    names = sorted(strong)
    valued = ", ".join(label if strong[label] is None else f"{label} ({strong[label]:.2f})" for label in names)
    return Condition(
        "ligands electronegativity < 2.5",
        False,
        f"{', '.join(names)} (Pauling EN >= 2.5) withdraw charge: the centre contracts and hybridizes",
        f"{valued} {'withdraws' if len(names) == 1 else 'withdraw'} charge",
    )
