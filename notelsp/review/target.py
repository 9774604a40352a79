"""Which centre a claim is about: the one place a claim's atom names are resolved.

A species read as a molecule (a condensed formula, SMILES) has a centre at every
atom with two or more neighbours.  A claim names its atom (``C2 trigonal
planar``), or the middle atom of an angle (``H-C1-H 109°``), or an atom of a
bond (``C1-C2 1.50 Å``); a claim that names none is about the species' centre
when there is one, or when all its centres are alike (the two N of N2H4).
The rules then see the species focused on that centre, with atom names
turned into the names the centre's analysis uses (``H-C1-H`` -> ``H-C-H``),
so every rule reads one centre as it always has.

Whole-molecule claims (polarity, point group, isomer count, magnetism,
unpaired electrons) are not focused.  A name that matches no atom, or a claim
that could be about several unlike centres, is not judged: the reason (with
the molecule's atoms) becomes a finding of its own.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from typing import TYPE_CHECKING

from ..notation.model import (
    AngleClaim,
    AngleOrderClaim,
    BondLengthClaim,
    BondLengthValueClaim,
    Claim,
    CouplingClaim,
    HybridizationClaim,
    IsomerCountClaim,
    LonePairClaim,
    MagnetismClaim,
    PointGroupClaim,
    PolarityClaim,
    UnpairedElectronClaim,
)
from .predictions import written_shape

if TYPE_CHECKING:
    from ..chem.analysis import CentreAnalysis, SpeciesAnalysis
    from ..chem.molecule_analysis import MoleculeAnalysis, MoleculeCentre

TARGET_RULES = frozenset({"unknown-atom", "centre-not-named", "terminal-atom"})  # the rules that report a claim with no centre
TERMINAL_CLAIMS = (LonePairClaim, HybridizationClaim)
WHOLE_MOLECULE = (PolarityClaim, PointGroupClaim, IsomerCountClaim, MagnetismClaim, UnpairedElectronClaim)


@dataclass(frozen=True, slots=True)
class Focus:
    """A claim narrowed to the one centre it is about, or why it cannot be."""

    analyses: tuple[SpeciesAnalysis, ...]  # the first species narrowed to the claim's centre
    claim: Claim | None  # with atom names turned into the centre's ligand names
    problem: str | None = None  # why the claim cannot be placed on one centre
    unknown: bool = False  # the problem is a name that matches no atom (not several alike candidates)
    suggestion: str | None = None  # the name the writer probably meant, where one is clear
    translated: bool = False  # atom names in the claim were rewritten for the rules
    terminal: int | None = None  # a lone-pair or hybridization claim about this terminal atom (molecule index)
    centre: str | None = None  # the label of the molecule's centre the claim is about ("C2")


def focus(analyses: tuple[SpeciesAnalysis, ...], claim: Claim | None) -> Focus:
    """The analyses and claim the rules should judge, or the problem that stops them."""
    found = _focus(analyses, claim)
    if found.problem is None and not found.translated and _writes_bond_orders(claim):
        # the rules write angles and bonds with single dashes: a fix would drop the writer's = and ≡
        return dataclasses.replace(found, translated=True)
    return found


def centre_label(analysis: SpeciesAnalysis | None, claim: Claim | None) -> str | None:
    """The label of the one centre of a molecule a claim is about (``C2`` for ``O=C-O`` in CH3COOH), or
    None: a whole-molecule claim, a species read by the single-centre model, or a claim not placed."""
    if analysis is None or claim is None or isinstance(claim, WHOLE_MOLECULE):
        return None
    molecule = analysis.molecule
    if molecule is None or analysis.outside_model is not None:
        return None
    name, others = _names(claim)
    if name is None:
        return None
    found = _resolve(analysis, molecule, name, others[:2])
    return None if isinstance(found, Focus) else found.label


def _writes_bond_orders(claim: Claim | None) -> bool:
    if isinstance(claim, AngleClaim):
        orders: tuple[int, ...] = claim.orders
    elif isinstance(claim, AngleOrderClaim):
        orders = (*claim.left_orders, *claim.right_orders)
    elif isinstance(claim, (BondLengthValueClaim, BondLengthClaim)):
        orders = (claim.order,)
    else:  # no other claim writes bonds
        return False
    return any(order != 1 for order in orders)


def _focus(analyses: tuple[SpeciesAnalysis, ...], claim: Claim | None) -> Focus:
    unchanged = Focus(analyses, claim)
    if claim is None or len(analyses) != 1 or isinstance(claim, WHOLE_MOLECULE):
        return unchanged
    analysis = analyses[0]
    if analysis is None or analysis.outside_model is not None or not analysis.centres:
        return unchanged
    name, others = _names(claim)
    molecule = analysis.molecule
    if molecule is None:
        return _formula_focus(analysis, claim, name, unchanged)
    two_centres = isinstance(claim, AngleOrderClaim) and claim.right[1] != claim.left[1]
    found = _resolve(analysis, molecule, name, others[:2] if two_centres else others)
    if isinstance(found, Focus):
        if found.unknown and name is not None and isinstance(claim, TERMINAL_CLAIMS):
            index = molecule.molecule.index_of(name)
            if index is not None and index in molecule.molecule.terminals:
                # a terminal atom has lone pairs and, by convention, a hybridization: the terminal-atom rule judges them
                return Focus(analyses, claim, f"{name} is a terminal atom", terminal=index)
        return found
    if two_centres and isinstance(claim, AngleOrderClaim):
        other = _resolve(analysis, molecule, claim.right[1], others[2:])
        if isinstance(other, Focus):
            return other
        if other.label != found.label:
            return Focus(analyses, claim, f"the claim compares angles at two centres, {found.label} and "
                         f"{other.label}: Bent's rule orders angles at one centre, so it is not checked")
    centre = found.analysis
    assert centre is not None  # _resolve gives only centres the model analysed
    ligand_names = tuple(_ligand_name(found, other) for other in others)
    several = len(molecule.centres) > 1  # then messages name the atom: "CH3COOH (C1) is claimed ..."
    narrowed = dataclasses.replace(analysis, centres=(centre,),
                                   formula=f"{analysis.formula} ({found.label})" if several else analysis.formula)
    new_claim = _renamed(claim, centre.central, ligand_names)
    # a fix replaces the claim's text; where atom names inside it were rewritten, it would lose them
    # (a named atom before the claim is outside the claim's span, so it stays)
    renamed_inside = claim.atom is None and new_claim != claim
    return Focus((narrowed,), new_claim, translated=renamed_inside, centre=found.label)


def _names(claim: Claim) -> tuple[str | None, tuple[str, ...]]:
    """(the centre's name, the other atom names) a claim gives; None when it names no centre."""
    if isinstance(claim, AngleClaim) and claim.atoms:
        return claim.atoms[1], (claim.atoms[0], claim.atoms[2])
    if isinstance(claim, AngleOrderClaim):
        return claim.left[1], (claim.left[0], claim.left[2], claim.right[0], claim.right[2])
    if isinstance(claim, (BondLengthValueClaim, BondLengthClaim)) and claim.bond:
        return claim.bond[0], (claim.bond[1],)
    if isinstance(claim, CouplingClaim):
        return claim.nuclei[0], ()
    return claim.atom, ()


def _formula_focus(analysis: SpeciesAnalysis, claim: Claim, name: str | None, unchanged: Focus) -> Focus:
    """A species read by the single-centre model: a name must be its centre's element."""
    if claim.atom is None or claim.atom in {c.central for c in analysis.centres}:
        return unchanged
    central = analysis.centres[0].central
    return Focus((analysis,), claim, f"{analysis.formula} is read with one centre, {central}: "
                 f"'{claim.atom}' names no centre of it", unknown=True, suggestion=central)


def _resolve(analysis: SpeciesAnalysis, molecule: MoleculeAnalysis, name: str | None,
             others: tuple[str, ...] = ()) -> MoleculeCentre | Focus:
    """The MoleculeCentre a name means, or a Focus that says why there is none.

    ``others``: the atoms the claim puts around it (the ends of an angle, the other end of a bond);
    of several centres of one element, only those bonded to them are meant (O=C-O in CH3COOH is C2).
    """
    usable = [c for c in molecule.centres if c.analysis is not None]
    if name is None:
        candidates = usable
    elif any(c.label == name for c in molecule.centres):
        candidates = [c for c in molecule.centres if c.label == name]
    else:
        candidates = [c for c in usable if c.element == name]
    if name is not None and not candidates:
        return _unknown(analysis, molecule, name)
    if len(candidates) > 1 and others:
        candidates = [c for c in candidates if _bonded_to_each(c, others)] or candidates
    usable_candidates = [c for c in candidates if c.analysis is not None]
    if not usable_candidates:
        reason = candidates[0].outside_model if candidates else analysis.outside_model
        return Focus((analysis,), None, f"{candidates[0].label} is outside the model: {reason}")
    if others and not any(_bonded_to_each(c, others) for c in usable_candidates):
        # H-N-O in HNO2 (the H is on O): judging N's angles would answer about an atom the claim did not mean
        listed = "; ".join(f"{c.label} is bonded to {', '.join(c.neighbours)}" for c in usable_candidates)
        return Focus((analysis,), None, f"{analysis.formula} has no {name} bonded to {' and '.join(others)} "
                     f"as the claim writes it ({listed})", unknown=True)
    kinds = {_kind(c.analysis) for c in usable_candidates if c.analysis is not None}
    if len(kinds) > 1:
        listed = ", ".join(f"{c.label} {written_shape(c.analysis.shape)}" for c in usable_candidates
                           if c.analysis is not None)
        example = usable_candidates[0].label
        return Focus((analysis,), None, f"{analysis.formula} has several unlike centres ({listed}): "
                     f"name the atom the claim is about, e.g. '{example} ...'")
    return usable_candidates[0]


def _unknown(analysis: SpeciesAnalysis, molecule: MoleculeAnalysis, name: str) -> Focus:
    terminal = next((t for t in molecule.terminals if t.label == name), None)
    atoms = ", ".join(a.label for a in molecule.molecule.atoms)
    if terminal is not None:
        bonded = ", ".join(terminal.neighbours) or "nothing"
        return Focus((analysis,), None, f"{name} is a terminal atom of {analysis.formula} (bonded to {bonded}): "
                     "it has no bond angle or shape of its own", unknown=True)
    element = name.rstrip("0123456789")
    same = [a.label for a in molecule.molecule.atoms if a.element == element]
    suggestion = same[0] if len(same) == 1 else None
    return Focus((analysis,), None, f"no atom of {analysis.formula} is named {name}; its atoms are {atoms}",
                 unknown=True, suggestion=suggestion)


def _bonded_to(centre: MoleculeCentre, others: tuple[str, ...]) -> bool:
    """Whether the centre has a distinct neighbour for each name (atom label, element or group)."""
    if centre.analysis is None:
        return False
    free = list(zip(centre.neighbours, (l.symbol for l in centre.analysis.ligands)))
    for other in others:
        element = _ligand_name(centre, other)
        match = next((pair for pair in free if pair[0] == other), None) \
            or next((pair for pair in free if pair[1] == element), None)
        if match is None:
            return False
        free.remove(match)
    return True


def _bonded_to_each(centre: MoleculeCentre, others: tuple[str, ...]) -> bool:
    """``_bonded_to`` for each pair of names in turn (an angle order names two angles at one centre)."""
    return all(_bonded_to(centre, others[i:i + 2]) for i in range(0, len(others), 2))


def _kind(centre: CentreAnalysis) -> tuple:
    """What makes two centres alike for a claim that names neither."""
    return (centre.central, centre.shape, centre.hybridization, centre.lone_pairs,
            tuple(sorted((l.symbol, l.bond_order) for l in centre.ligands)))


def _ligand_name(centre: MoleculeCentre, name: str) -> str:
    """The centre's ligand name for an atom name ("H2" -> "H") or a group ("OH" -> "O")."""
    known = centre.ligand_name(name)
    if known != name or (centre.analysis is not None and name in {l.label for l in centre.analysis.ligands}):
        return known
    letters = name[:2] if len(name) > 1 and name[1].islower() else name[:1]
    return letters or name


def _renamed(claim: Claim, central: str, others: tuple[str, ...]) -> Claim:
    if isinstance(claim, AngleClaim) and claim.atoms:
        return dataclasses.replace(claim, atoms=(others[0], central, others[1]))
    if isinstance(claim, AngleOrderClaim):
        return dataclasses.replace(claim, left=(others[0], central, others[1]),
                                   right=(others[2], claim.right[1] if claim.right[1] != claim.left[1] else central,
                                          others[3]))
    if isinstance(claim, (BondLengthValueClaim, BondLengthClaim)) and claim.bond:
        return dataclasses.replace(claim, bond=(central, others[0]))
    if claim.atom is not None:
        return dataclasses.replace(claim, atom=central)
    return claim
