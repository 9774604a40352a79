"""The molecule as a graph: atoms with formal charges and unpaired electrons,
bonds with orders.  Every reader (today's formulas, condensed structural
formulas, SMILES) builds one of these, and every centre's analysis reads it.

Atoms are named the way a chemist reads them back: the element with its place
among that element's atoms as written (``C1``, ``C2``), or the bare symbol when
the element occurs once (``N`` in CH3CN).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from functools import cached_property

from .. import elements

@dataclass(frozen=True, slots=True)
class MoleculeAtom:
    """One atom of a molecule graph: element, label, formal charge and radical electrons."""

    element: str
    label: str  # "C2", or "N" when the element occurs once
    charge: int = 0  # formal charge
    unpaired: int = 0  # radical electrons


@dataclass(frozen=True, slots=True)
class MoleculeBond:
    """One bond of a molecule graph, its order and whether it is delocalised."""

    first: int  # atom indices, first < second
    second: int
    order: int  # 1, 2 or 3; an aromatic or delocalised bond carries one Kekulé order here
    delocalised: bool = False  # part of an aromatic ring or a delocalised group (carboxylate, nitro)


@dataclass(frozen=True)
class Molecule:
    """A molecule as a graph of atoms and bonds, and the text it was read from."""

    atoms: tuple[MoleculeAtom, ...]
    bonds: tuple[MoleculeBond, ...]
    source: str = ""  # the text it was read from

    @property
    def charge(self) -> int:
        return sum(atom.charge for atom in self.atoms)

    @cached_property
    def _adjacency(self) -> tuple[tuple[tuple[int, int], ...], ...]:
        around: list[list[tuple[int, int]]] = [[] for _ in self.atoms]
        for bond in self.bonds:
            around[bond.first].append((bond.second, bond.order))
            around[bond.second].append((bond.first, bond.order))
        return tuple(tuple(a) for a in around)

    @cached_property
    def _bond_lookup(self) -> dict[tuple[int, int], MoleculeBond]:
        return {(bond.first, bond.second): bond for bond in self.bonds}

    def bond_between(self, first: int, second: int) -> MoleculeBond | None:
        return self._bond_lookup.get((min(first, second), max(first, second)))

    @cached_property
    def _delocalised_atoms(self) -> frozenset[int]:
        return frozenset(i for bond in self.bonds if bond.delocalised for i in (bond.first, bond.second))

    def has_delocalised_bond(self, index: int) -> bool:
        return index in self._delocalised_atoms

    def has_pi_bond(self, index: int, *, besides: int | None = None) -> bool:
        """Whether atom ``index`` takes part in a double, triple or delocalised bond (not counting one to ``besides``)."""
        for other, order in self._adjacency[index]:
            if other == besides:
                continue
            if order >= 2 or self._bond_lookup[(min(index, other), max(index, other))].delocalised:
                return True
        return False

    @cached_property
    def _neighbour_lists(self) -> tuple[tuple[int, ...], ...]:
        return tuple(tuple(other for other, _ in around) for around in self._adjacency)

    def neighbours(self, index: int) -> tuple[int, ...]:
        return self._neighbour_lists[index]

    def bonds_of(self, index: int) -> tuple[tuple[int, int], ...]:
        """(neighbour index, bond order) for every bond of atom ``index``."""
        return self._adjacency[index]

    def bond_order_sum(self, index: int) -> int:
        return sum(order for _, order in self._adjacency[index])

    def nonbonding_electrons(self, index: int) -> int | None:
        """Valence electrons left on the atom after its charge and bonds; None outside the main group."""
        atom = self.atoms[index]
        valence = elements.element(atom.element).valence_electrons
        if valence is None:
            return None
        return valence - atom.charge - self.bond_order_sum(index)

    def ring_size(self, centre: int, first: int, second: int, *, largest: int = 8) -> int | None:
        """The smallest ring through first-centre-second (atoms counted), or None if there is none up to ``largest``."""
        frontier, seen, steps = [first], {first, centre}, 0
        while frontier and steps + 2 < largest:
            steps += 1
            following = []
            for atom in frontier:
                for other, _ in self._adjacency[atom]:
                    if other == second:
                        return steps + 2
                    if other not in seen:
                        seen.add(other)
                        following.append(other)
            frontier = following
        return None

    def index_of(self, label: str) -> int | None:
        for index, atom in enumerate(self.atoms):
            if atom.label == label:
                return index
        return None

    @property
    def terminals(self) -> tuple[int, ...]:
        """Every atom with fewer than two neighbours: no bond angle of its own."""
        return tuple(i for i in range(len(self.atoms)) if len(self._adjacency[i]) < 2)

    @property
    def centres(self) -> tuple[int, ...]:
        """Every atom with two or more neighbours: each has a shape and bond angles."""
        return tuple(i for i in range(len(self.atoms)) if len(self._adjacency[i]) >= 2)


def label_atoms(symbols: list[str] | tuple[str, ...]) -> tuple[str, ...]:
    """Labels in the order written: an element that occurs once keeps its bare symbol."""
    totals: dict[str, int] = {}
    for symbol in symbols:
        totals[symbol] = totals.get(symbol, 0) + 1
    seen: dict[str, int] = {}
    labels = []
    for symbol in symbols:
        seen[symbol] = seen.get(symbol, 0) + 1
        labels.append(symbol if totals[symbol] == 1 else f"{symbol}{seen[symbol]}")
    return tuple(labels)


def mark_delocalised_groups(atoms: tuple[MoleculeAtom, ...], bonds: tuple[MoleculeBond, ...]) -> tuple[MoleculeBond, ...]:
    """Mark the bonds of groups whose Kekulé form hides equal bonds (carboxylate, nitro, sulfonate ...).

    An atom with a double bond to a terminal atom and a single bond to a
    terminal anion of the same element has two resonance forms that swap them,
    so all those bonds are the same: delocalised.
    """
    terminal_count = [0] * len(atoms)
    for bond in bonds:
        terminal_count[bond.first] += 1
        terminal_count[bond.second] += 1
    around: dict[int, list[tuple[int, int]]] = {}
    for position, bond in enumerate(bonds):
        around.setdefault(bond.first, []).append((position, bond.second))
        around.setdefault(bond.second, []).append((position, bond.first))
    marked = set()
    for centre, partners in around.items():
        terminal = [(p, other) for p, other in partners if terminal_count[other] == 1]
        for element in {atoms[other].element for _, other in terminal}:
            same = [(p, other) for p, other in terminal if atoms[other].element == element]
            doubly = [p for p, other in same if bonds[p].order == 2 and atoms[other].charge == 0]
            anionic = [p for p, other in same if bonds[p].order == 1 and atoms[other].charge == -1]
            if doubly and anionic:
                marked.update(doubly + anionic)
    if not marked:
        return bonds
    return tuple(replace(bond, delocalised=True) if position in marked else bond
                 for position, bond in enumerate(bonds))
