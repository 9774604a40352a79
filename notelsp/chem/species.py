"""Formula -> centres and ligands: which atom is central and what it bonds to.

The model treats one central atom (or two equal centres bonded to each other,
as in N2H4, C2F6, H2O2) with terminal ligands.  Anything else is returned as a
reason the model cannot treat it, never as a guess.
"""

from __future__ import annotations

from dataclasses import dataclass

from .. import elements
from ..notation.model import Atom, BondMark, Formula, Group
from .model import Conjugation, Ligand

HALOGENS = frozenset({"F", "Cl", "Br", "I", "At"})


@dataclass(frozen=True, slots=True)
class CentreModel:
    """One central atom with its ligands, as the electron count sees it."""

    central: str
    charge: int  # the charge carried by this centre (all of it for one centre)
    ligands: tuple[Ligand, ...]
    label: str = ""  # the atom's label in a molecule graph ("C2"); empty for a formula's centre
    bonds_known: bool = False  # the ligands come from a molecule graph: π systems beside the centre are known, not guessed
    conjugation: Conjugation | None = None  # a lone pair here conjugated with a π system (graph only)
    unpaired: int = 0  # unpaired electrons the molecule gives this atom (2 for a triplet carbene)


@dataclass(frozen=True, slots=True)
class SpeciesModel:
    """A species read as centres with their ligands, or why the model cannot read it."""

    centres: tuple[CentreModel, ...]
    outside_model: str | None = None


def _electronegativity(symbol: str) -> float | None:
    return elements.element(symbol).electronegativity


def terminal_bond_order(symbol: str) -> int:
    """Electrons a terminal atom takes from the centre: H and halogens 1, O/S 2, N 3."""
    if symbol == "H":
        return 1
    valence = elements.element(symbol).valence_electrons
    if valence is None:
        return 1
    return max(1, min(3, 8 - valence))


def _group_text(group: Group) -> str:
    def render(parts: tuple) -> str:
        out = []
        for part in parts:
            if isinstance(part, Atom):
                out.append(part.symbol + (str(part.count) if part.count > 1 else ""))
            elif isinstance(part, BondMark):
                out.append("-=≡"[part.order - 1])
            else:
                out.append("(" + render(part.parts) + ")" + (str(part.count) if part.count > 1 else ""))
        return "".join(out)

    return render(group.parts)


def _first_atom(group: Group) -> str:
    first = next(part for part in group.parts if not isinstance(part, BondMark))
    return first.symbol if isinstance(first, Atom) else _first_atom(first)


def _ligand(symbol: str, label: str | None = None, bond_order: int | None = None) -> Ligand:
    order = bond_order if bond_order is not None else terminal_bond_order(symbol)
    return Ligand(symbol, label or symbol, order, _electronegativity(symbol))


def _outside(reason: str) -> SpeciesModel:
    return SpeciesModel((), reason)


def build_species(formula: Formula) -> SpeciesModel:
    """Split the formula into centre(s) and ligands, or say why it cannot be."""
    atoms: dict[str, int] = {}
    groups: list[Ligand] = []
    for part in formula.parts:
        if isinstance(part, BondMark):
            return _outside("written bonds make a structural formula, which the single-centre model does not read")
        if isinstance(part, Atom):
            atoms[part.symbol] = atoms.get(part.symbol, 0) + part.count
        elif part.parts:
            # a parenthesised group attaches by its first atom, with one bond
            groups.extend([_ligand(_first_atom(part), _group_text(part), 1)] * part.count)
    unknown = [s for s in atoms if not elements.is_symbol(s)]
    if unknown:
        return _outside(f"unknown element {unknown[0]}")
    for symbol in formula.composition():
        if elements.is_symbol(symbol) and not elements.element(symbol).is_main_group:
            kind = "transition-metal" if elements.element(symbol).block == "d" else "f-block"
            return _outside(f"{symbol} is a {kind} element: VSEPR does not describe its bonding (d/f electrons)")
    candidates = _centre_candidates(formula, atoms)
    if not candidates:
        return _outside("no identifiable central atom")
    last_reason = "no identifiable central atom"
    for central in candidates:
        model = _try_centre(central, atoms, groups, formula.charge)
        if model.outside_model is None:
            return model
        last_reason = model.outside_model
        if formula.centre:
            break
    return _outside(last_reason)


def _centre_candidates(formula: Formula, atoms: dict[str, int]) -> list[str]:
    if formula.centre:
        return [formula.centre] if formula.centre in atoms else []
    heavy = [s for s in atoms if s != "H"]
    if len(heavy) > 1:
        # a halogen written more than once beside another element is terminal (Cl2O, SF... )
        heavy = [s for s in heavy if not (s in HALOGENS and atoms[s] > 1)] or heavy
    return sorted(heavy, key=lambda s: (_electronegativity(s) or 0.0, heavy.index(s)))


def _try_centre(central: str, atoms: dict[str, int], groups: list[Ligand], charge: int) -> SpeciesModel:
    others = dict(atoms)
    others[central] -= 1
    partners = others.pop(central)
    hydrogens = others.pop("H", 0) if central != "H" else 0
    rest = {s: n for s, n in others.items() if n}
    if partners == 1 and all(n % 2 == 0 for n in rest.values()) and hydrogens % 2 == 0 and not groups:
        return _two_centres(central, rest, hydrogens, charge)
    valence = elements.element(central).valence_electrons
    if valence is None:
        return _outside(f"{central} has no main-group valence shell")
    ligands = [_ligand(central)] * partners + [_ligand(s) for s, n in rest.items() for _ in range(n)] + groups
    hydroxyl = _ligand("O", "OH", 1)
    # Hydrogens sit on the centre unless the count does not allow it (oxoacids,
    # alcohols) or the centre is a halogen: then each goes onto an oxygen as OH.
    oxygens = [i for i, lig in enumerate(ligands) if lig.symbol == "O" and lig.label == "O"]
    on_centre = hydrogens
    while on_centre and oxygens and (central in HALOGENS or _left(valence, charge, ligands, on_centre) < 0):
        ligands[oxygens.pop(0)] = hydroxyl
        on_centre -= 1
    ligands = [_ligand("H")] * on_centre + ligands
    if len(ligands) < 2:
        return _outside(f"{central} bonds to fewer than two atoms here: no bond angle to predict")
    if _left(valence, charge, ligands, 0) < 0:
        return _outside(f"{central} has too few electrons for these ligands: more than one centre is needed (write @X to choose one)")
    return SpeciesModel((CentreModel(central, charge, tuple(ligands)),))


def _left(valence: int, charge: int, ligands: list[Ligand], extra_hydrogens: int) -> int:
    return valence - charge - sum(l.bond_order for l in ligands) - extra_hydrogens


def _two_centres(central: str, rest: dict[str, int], hydrogens: int, charge: int) -> SpeciesModel:
    """Two equal centres bonded to each other, each with half of the other atoms."""
    valence = elements.element(central).valence_electrons
    if valence is None:
        return _outside(f"{central} has no main-group valence shell")
    half = [_ligand("H")] * (hydrogens // 2) + [_ligand(s) for s, n in rest.items() for _ in range(n // 2)]
    if not half:
        return _outside(f"{central}2 is diatomic: no central atom and no bond angle")
    if charge % 2:
        return _outside("an odd charge cannot be shared by two equal centres")
    used = sum(l.bond_order for l in half)
    # the bond between the centres completes the octet (C2H6 single, C2H4 double, C2H2 triple)
    order = max(1, min(3, 8 - valence + charge // 2 - used))
    centre = CentreModel(central, charge // 2, (*half, _ligand(central, central, order)))
    if valence - charge // 2 - used - order < 0:
        return _outside(f"{central} has too few electrons for these ligands")
    return SpeciesModel((centre, centre))
