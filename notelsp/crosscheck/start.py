"""Starting geometries: the analyser's ideal polyhedron, bonds at covalent radii.

Each isomer the analyser lists becomes one starting structure: the centre at
the origin and each ligand atom along its site's unit vector at the sum of the
two Pyykko single-bond radii.  Pure: no I/O.
"""

from __future__ import annotations

from dataclasses import dataclass

from .. import elements
from ..chem import analyse
from ..chem.model import LONE_PAIR
from ..notation.model import Formula

Vector = tuple[float, float, float]


@dataclass(frozen=True, slots=True)
class StartingGeometry:
    species: str  # the formula as written
    isomer: str  # the isomer's short name ("F axial"), "" when there is only one
    rank: int  # the analyser's rank: 1 = the isomer the rules expect
    symbols: tuple[str, ...]  # centre first
    positions: tuple[Vector, ...]  # angstrom
    ligand_sites: tuple[str, ...]  # "axial", "equatorial", ... for each ligand atom (symbols[1:])
    charge: int
    spin: int  # unpaired electrons (2S)


@dataclass(frozen=True, slots=True)
class Unsupported:
    reason: str


def bond_length_guess(a: str, b: str) -> float:
    """Sum of single-bond covalent radii in angstrom (Pyykko, via notelsp.elements)."""
    radii = [elements.element(s).covalent_radius_pm or 150.0 for s in (a, b)]
    return sum(radii) / 100.0


def starting_geometries(formula: Formula, max_atoms: int = 8) -> tuple[StartingGeometry, ...] | Unsupported:
    """One starting structure per isomer of the formula's single centre, expected isomer first."""
    atom_count = sum(formula.composition().values())
    if atom_count > max_atoms:
        return Unsupported(
            f"{formula.text} has {atom_count} atoms; the cross-check is bounded to {max_atoms} "
            "(raise the bound only if you can wait for it)"
        )
    placements = _placements_from_analysis(formula)
    if isinstance(placements, Unsupported):
        return placements
    central, charge, spin, isomers = placements
    built = []
    for name, rank, sites in isomers:
        symbols, positions, site_names = [central], [(0.0, 0.0, 0.0)], []
        for label, symbol, position, vector in sites:
            if label == LONE_PAIR or symbol is None:
                continue
            if label != symbol:
                return Unsupported(f"{formula.text}: the cross-check builds single-atom ligands only, not {label}")
            length = bond_length_guess(central, symbol)
            symbols.append(symbol)
            positions.append(tuple(round(length * c, 6) for c in vector))
            site_names.append(position)
        built.append(StartingGeometry(formula.text, name, rank, tuple(symbols), tuple(positions), tuple(site_names), charge, spin))
    return tuple(sorted(built, key=lambda g: g.rank))


# --- where the sites come from ------------------------------------------------

Placement = tuple[str, str | None, str, Vector]  # label, symbol, position, vector


def _placements_from_analysis(formula: Formula):
    analysis = analyse(formula)
    if analysis.outside_model:
        return Unsupported(f"{formula.text}: {analysis.outside_model}")
    if len(analysis.centres) != 1:
        return Unsupported(f"{formula.text}: the cross-check builds species with one central atom only")
    centre = analysis.centres[0]
    if not centre.isomers:
        return Unsupported(f"{formula.text}: the analysis lists no arrangement of the ligands to start from")
    several = len(centre.isomers) > 1
    listed = [
        (iso.name if several else "", iso.rank, [(s.label, s.symbol, s.position, s.vector) for s in iso.sites])
        for iso in centre.isomers
    ]
    return centre.central, formula.charge, centre.odd_electrons, listed
