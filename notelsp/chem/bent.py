"""Bent's rule: a centre directs p-rich hybrids toward more electronegative
ligands and keeps s character for electropositive ligands, lone pairs and
multiply bonded atoms.

Consequences: the angle between two electronegative ligands is the smaller
one; in a trigonal bipyramid electronegative ligands go axial (p-rich sites)
and lone pairs and doubly bonded atoms equatorial; a bond whose neighbours are
electronegative gets s-richer and shorter.  Large ligands on a small centre can
crowd each other enough to override the electronic order (CH2Cl2).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from itertools import combinations, combinations_with_replacement
from typing import Literal

from .. import elements
from .model import LONE_PAIR, Ligand

Confidence = Literal["high", "medium", "low"]


@dataclass(frozen=True, slots=True)
class AngleOrder:
    """Bent's rule's prediction that one angle at the centre is larger than another."""

    larger: tuple[str, str, str]  # ("H", "C", "H")
    smaller: tuple[str, str, str]
    confidence: Confidence
    reason: str
    steric_override: bool = False


@dataclass(frozen=True, slots=True)
class BentAnalysis:
    """What Bent's rule says about a centre: angle orders, axial preference, s-rich sites."""

    angle_orders: tuple[AngleOrder, ...]
    axial_preference: tuple[str, ...]  # most axial-loving first (trigonal bipyramids only)
    s_rich: tuple[str, ...]  # what takes s-rich hybrids: lone pairs, multiply bonded ligands
    notes: tuple[str, ...]

    def summary(self) -> str:
        """One readable line of what the rule predicts here; empty when it predicts nothing."""
        parts = []
        for order in self.angle_orders[:3]:
            larger, smaller = "-".join(order.larger), "-".join(order.smaller)
            kind = "steric exception, low confidence" if order.steric_override else f"{order.confidence} confidence"
            parts.append(f"{smaller} < {larger} ({kind})")
        if len(self.angle_orders) > 3:
            parts.append(f"{len(self.angle_orders) - 3} more angle orders")
        ligands = [label for label in self.axial_preference if label != LONE_PAIR]
        if len(ligands) > 1:
            parts.append("axial preference " + " > ".join(ligands))
        rich = [("lone pair" if label == LONE_PAIR else f"={label}") for label in self.s_rich]
        if rich and (parts or self.axial_preference):
            parts.append("s-rich hybrids to " + ", ".join(rich))
        elif rich:
            parts.append(f"the {' and '.join(rich)} keep{'s' if len(rich) == 1 else ''} the s-richer hybrids")
        return "; ".join(parts)

    def order_between(self, first: tuple[str, str, str], second: tuple[str, str, str]) -> AngleOrder | None:
        """The predicted order of these two angles (either way round), if there is one."""
        wanted = {_pair(first), _pair(second)}
        for order in self.angle_orders:
            if {_pair(order.larger), _pair(order.smaller)} == wanted and _pair(first) != _pair(second):
                return order
        return None


def _pair(angle: tuple[str, str, str]) -> tuple[str, str]:
    return tuple(sorted((angle[0], angle[2])))  # type: ignore[return-value]


def s_demand(ligand: Ligand) -> float:
    """Higher = wants more s from the centre: electropositive or multiply bonded."""
    en = ligand.electronegativity if ligand.electronegativity is not None else 2.5
    return -en + (2.5 if ligand.bond_order >= 2 else 0.0)  # a multiple bond outweighs ~1.5 EN units


def _is_large(ligand: Ligand) -> bool:
    return elements.element(ligand.symbol).period >= 3 or ligand.label != ligand.symbol


def bent(central: str, ligands: Sequence[Ligand], lone_pairs: int, steric_number: int) -> BentAnalysis:
    by_label = {l.label: l for l in ligands}
    counts = {label: sum(1 for l in ligands if l.label == label) for label in by_label}
    s_rich = tuple([LONE_PAIR] * (1 if lone_pairs else 0) + sorted(l for l, lig in by_label.items() if lig.bond_order >= 2))
    notes: list[str] = []
    orders: tuple[AngleOrder, ...] = ()
    if len(by_label) > 1 and steric_number <= 4:
        orders = _angle_orders(central, by_label, counts, lone_pairs)
        if any(o.steric_override for o in orders):
            notes.append("large ligands on a small centre crowd each other: steric repulsion overrides Bent's order (lower confidence)")
    axial: tuple[str, ...] = ()
    if steric_number == 5:
        ranked = sorted(by_label, key=lambda label: s_demand(by_label[label]))
        axial = tuple(ranked) + ((LONE_PAIR,) if lone_pairs else ())
        notes.append("axial sites use p-rich hybrids: the most electronegative ligands prefer them; "
                     "lone pairs and multiply bonded atoms prefer equatorial sites")
    return BentAnalysis(orders, axial, s_rich, tuple(notes))


def _angle_orders(central: str, by_label: dict[str, Ligand], counts: dict[str, int],
                  lone_pairs: int) -> tuple[AngleOrder, ...]:
    pairs = [p for p in combinations_with_replacement(sorted(by_label), 2) if p[0] != p[1] or counts[p[0]] >= 2]
    small_centre = elements.element(central).period == 2
    orders = []
    for first, second in combinations(pairs, 2):
        score_first = sum(s_demand(by_label[x]) for x in first)
        score_second = sum(s_demand(by_label[x]) for x in second)
        if abs(score_first - score_second) < 1e-6:
            continue
        larger, smaller = (first, second) if score_first > score_second else (second, first)
        gap = abs(score_first - score_second)
        confidence: Confidence = "high" if gap >= 2.0 else "medium" if gap >= 0.8 else "low"
        if lone_pairs and confidence != "low":
            # the s-rich lone pairs dominate the centre's hybrids; ligand orders are less sure
            confidence = "medium" if confidence == "high" else "low"
        if any(by_label[x].label != by_label[x].symbol for x in (*larger, *smaller)):
            confidence = "low"  # a group's own lone pairs and conformation blur the order (CH3OH)
        reason = (f"Bent's rule: the {smaller[0]}-{central}-{smaller[1]} angle involves more p-rich hybrids "
                  f"(more electronegative ligands) than {larger[0]}-{central}-{larger[1]}")
        override = _steric_override(smaller, larger, by_label, small_centre)
        if override:
            larger, smaller = smaller, larger
            confidence = "low"
            reason = (f"steric crowding: the large {larger[0]} ligands on small {central} push apart, "
                      f"so {larger[0]}-{central}-{larger[1]} opens beyond {smaller[0]}-{central}-{smaller[1]} "
                      "against Bent's electronic order")
        orders.append(AngleOrder((larger[0], central, larger[1]), (smaller[0], central, smaller[1]), confidence,
                                 reason, override))
    return tuple(orders)


def _steric_override(electronic_smaller: tuple[str, str], electronic_larger: tuple[str, str],
                     by_label: dict[str, Ligand], small_centre: bool) -> bool:
    """Two large ligands on a period-2 centre, compared with angles that involve only H and them."""
    a, b = electronic_smaller
    if not small_centre or a != b or not _is_large(by_label[a]):
        return False
    return all(x == "H" or x == a for x in electronic_larger)


@dataclass(frozen=True, slots=True)
class BondLengthTrend:
    """Bent's rule's prediction for the same bond in two species."""

    relation: Literal["shorter", "longer"]  # the bond in the first species relative to the second
    reason: str
    confidence: Confidence


def bond_length_trend(first: tuple[str, Sequence[Ligand]], second: tuple[str, Sequence[Ligand]],
                      bond: tuple[str, str]) -> BondLengthTrend | None:
    """Bent's prediction for the same bond in two species (centre, ligands) — None if no clear trend."""
    neighbours = []
    for central, ligands in (first, second):
        other = _partner(central, bond)
        if other is None:
            return None
        rest = list(ligands)
        match = next((l for l in rest if l.symbol == other), None)
        if match is None:
            return None
        rest.remove(match)
        if not rest:
            return None
        neighbours.append(sum((l.electronegativity or 2.5) for l in rest) / len(rest))
    gap = neighbours[0] - neighbours[1]
    if abs(gap) < 0.3:
        return None
    relation: Literal["shorter", "longer"] = "shorter" if gap > 0 else "longer"
    if bond[0] == bond[1]:
        # The bond between the two centres of a symmetric molecule: the electronic
        # argument says shorter, but the crowded, mutually repelling CX3 ends win.
        # CF3 for CH3 lengthens the C-C bond by 0.03-0.04 A (gas-phase electron
        # diffraction, Hilderbrandt, Andreassen & Bauer, J. Phys. Chem. 74, 1586 (1970)).
        overridden: Literal["shorter", "longer"] = "longer" if relation == "shorter" else "shorter"
        reason = (f"Bent's rule alone would make the {bond[0]}-{bond[1]} hybrids s-richer and the bond {relation}, "
                  "but repulsion between the electronegative ends wins: measured central bonds lengthen "
                  "when H is replaced by F (steric and electrostatic override, low confidence)")
        return BondLengthTrend(overridden, reason, "low")
    reason = ("Bent's rule: more electronegative neighbours draw p character, leaving the "
              f"{bond[0]}-{bond[1]} hybrid s-richer and the bond shorter in the species with them")
    return BondLengthTrend(relation, reason, "high" if abs(gap) >= 1.0 else "medium")


def _partner(central: str, bond: tuple[str, str]) -> str | None:
    if bond[0] == central:
        return bond[1]
    if bond[1] == central:
        return bond[0]
    return None
