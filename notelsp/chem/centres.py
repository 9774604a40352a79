"""Molecule graph -> one centre model per atom with two or more neighbours.

The graph shows what a formula could only guess: whether a lone pair on N, O
or S sits beside a π bond or inside an aromatic ring, where it conjugates and
leaves the centre planar and sp2 (amides, anilines, enols, esters, pyrrole- and
furan-type rings).
"""

from __future__ import annotations

from .. import elements
from .model import Conjugation, Ligand
from .molecule import Molecule
from .species import CentreModel

_CONJUGATING = frozenset({"N", "O", "S"})
_HETERO_PI = frozenset({"O", "S", "N"})  # partners of a carbonyl-like π bond


def centre_models(molecule: Molecule) -> tuple[CentreModel, ...]:
    """Every centre of the molecule, its ligands labelled with the neighbours' atom labels."""
    return tuple(centre_model(molecule, index) for index in molecule.centres)


def centre_model(molecule: Molecule, index: int) -> CentreModel:
    atom = molecule.atoms[index]
    ligands = tuple(
        Ligand(molecule.atoms[other].element, molecule.atoms[other].label, order,
               elements.element(molecule.atoms[other].element).electronegativity)
        for other, order in molecule.bonds_of(index)
    )
    return CentreModel(atom.element, atom.charge, ligands, label=atom.label, bonds_known=True,
                       conjugation=conjugation(molecule, index), unpaired=atom.unpaired)


_PERIOD_TWO = frozenset({"B", "C", "N", "O"})


def conjugation(molecule: Molecule, index: int) -> Conjugation | None:
    """The π system a lone pair on this N, O or S centre conjugates with, or None."""
    atom = molecule.atoms[index]
    if atom.element not in _CONJUGATING or atom.unpaired:
        return None
    bonds = molecule.bonds_of(index)
    nonbonding = molecule.nonbonding_electrons(index)
    # a centre with four domains, one or two of them lone pairs, and only σ bonds of its own
    if (len(bonds) < 2 or nonbonding is None or nonbonding < 2 or nonbonding % 2
            or len(bonds) + nonbonding // 2 != 4 or any(order != 1 for _, order in bonds)):
        return None
    name = atom.label
    outcome = (f"so {name} is planar and sp2" if len(bonds) == 3
               else f"so {name} is sp2, its bonds in the plane of the π system")
    if any(molecule.bond_between(index, other).delocalised for other, _ in bonds):
        return Conjugation(
            "aromatic ring",
            f"a lone pair on {name} is part of the aromatic ring's π system (pyrrole-, furan- or thiophene-type), "
            + outcome, True)
    found = [_pi_partner(molecule, index, other) for other, _ in bonds]
    found = [f for f in found if f is not None]
    if not found:
        return None
    _, kind, neighbour, partner, firmly = min(found)
    system = f"the aromatic ring at {neighbour}" if kind == "aryl" else f"the {neighbour}={partner} π bond"
    return Conjugation(_kind_name(kind, atom.element),
                       f"a lone pair on {name} is conjugated with {system}, {outcome}", firmly)


def _pi_partner(molecule: Molecule, centre: int, neighbour: int):
    """(rank, kind, neighbour label, partner label, firmly planar) for the best π bond of ``neighbour``, or None."""
    if not molecule.has_pi_bond(neighbour, besides=centre):
        return None
    best = None
    near = molecule.atoms[neighbour]
    if near.element not in _PERIOD_TWO:
        # S=O, P=O in a Lewis structure are polar σ bonds more than π bonds: no π system for a lone pair
        # (sulfuric and phosphoric acids' OH oxygens stay sp3, H-O-S about 108°; common practice, no source)
        return None
    for other, order in molecule.bonds_of(neighbour):
        if other == centre:
            continue
        bond = molecule.bond_between(neighbour, other)
        far = molecule.atoms[other]
        if bond.delocalised and _in_ring(bond, molecule):
            candidate = (2, "aryl", near.label, far.label, False)
        elif order >= 2 or bond.delocalised:
            if order == 3:
                continue  # beside a triple bond the lone pair stays mostly put (cyanamide is pyramidal)
            if near.element != "C":
                candidate = (0, "hetero", near.label, far.label, True)
            elif far.element in _HETERO_PI:
                candidate = (0, "carbonyl", near.label, far.label, True)
            else:
                candidate = (1, "alkene", near.label, far.label, False)
        else:
            continue
        if best is None or candidate < best:
            best = candidate
    return best


def _in_ring(bond, molecule: Molecule) -> bool:
    """An aromatic (delocalised) bond between two centres is a ring bond; a delocalised group's bonds end at terminal atoms."""
    return len(molecule.neighbours(bond.first)) >= 2 and len(molecule.neighbours(bond.second)) >= 2


def _kind_name(kind: str, element: str) -> str:
    names = {
        ("carbonyl", "N"): "amide-type", ("carbonyl", "O"): "ester- or acid-type",
        ("carbonyl", "S"): "thioester-type", ("alkene", "N"): "enamine-type",
        ("alkene", "O"): "enol- or vinyl-ether-type", ("alkene", "S"): "vinyl-sulfide-type",
        ("hetero", "N"): "beside a heteroatom π bond", ("hetero", "O"): "beside a heteroatom π bond",
        ("hetero", "S"): "beside a heteroatom π bond", ("aryl", "N"): "aniline-type", ("aryl", "O"): "phenol-type", ("aryl", "S"): "thiophenol-type",
    }
    return names[(kind, element)]
