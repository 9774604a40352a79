"""Starting structures from the analysis, and their GFN2-xTB optimisation.

A structure starts where the analysis puts it: the centre at the origin and
each ligand at its predicted bond length (``chem.bondlength``) along its
site's unit vector on the ideal polyhedron, one structure per isomer (one per
enantiomer pair: mirror images have the same energy and angles).  A species
read as a molecule of several centres (CH3COOH, C2H4, a SMILES) starts from
the molecule's 3D model (``chem.molecule_geometry.model_3d``), its atoms in the
molecule's order.  Building is pure; :func:`optimise` imports tblite and ASE,
and runs in a worker process.
"""

from __future__ import annotations

import math
import time
from dataclasses import asdict, dataclass
from typing import Any

from .. import elements
from ..chem.analysis import CentreAnalysis, SpeciesAnalysis
from ..chem.bondlength import predict_bond_length
from ..chem.model import LONE_PAIR
from ..chem.molecule import Molecule
from ..chem.molecule_geometry import model_3d
from ..chem.polyhedra import polyhedron
from .method import METHOD, Limits, versions
from .result import ComputedGeometry, Connection, Vector, geometry_from_dict

# A ligand farther from the centre than this many times its predicted bond length has left it.
DISSOCIATED_FACTOR = 1.6


@dataclass(frozen=True, slots=True)
class Structure:
    """One starting structure, ready to optimise (and the key of its cache entry)."""

    species: str
    charge: int
    isomer: str
    rank: int
    symbols: tuple[str, ...]  # centre first (a molecule: its atoms in order)
    labels: tuple[str, ...]  # one per ligand atom (a molecule: one per atom, C1, H1, ...)
    sites: tuple[str, ...]  # one per ligand atom (a molecule: none)
    positions: tuple[Vector, ...]
    predicted_lengths: tuple[float, ...]  # one per ligand atom (a molecule: per connection), angstrom
    unpaired: int
    spin: str  # the spin state and why
    connections: tuple[Connection, ...] = ()  # a molecule's bonds (first, second, order); () for one centre

    def to_dict(self) -> dict[str, Any]:
        return asdict(self)

    @classmethod
    def from_dict(cls, raw: dict[str, Any]) -> Structure:
        return cls(**{key: tuple(tuple(v) if isinstance(v, list) else v for v in value) if isinstance(value, list)
                      else value for key, value in raw.items()})


@dataclass(frozen=True, slots=True)
class Skipped:
    """Why a species gets no computed structure."""

    reason: str


def start_structures(analysis: SpeciesAnalysis, limits: Limits = Limits(),
                     unpaired: int | None = None) -> tuple[Structure, ...] | Skipped:
    """One starting structure per isomer (one per enantiomer pair), in the analysis's rank order.

    ``unpaired`` overrides the spin state chosen (see :func:`spin_state`).
    """
    if analysis.outside_model:
        return Skipped(f"{analysis.formula}: {analysis.outside_model}")
    if analysis.molecule is not None and (len(analysis.centres) != 1 or
                                          any(l.label != l.symbol for l in analysis.centres[0].ligands)):
        return _molecule_structure(analysis, limits, unpaired)
    if len(analysis.centres) != 1:
        return Skipped(f"{analysis.formula}: only species with one central atom, or read as a molecule "
                       "(a condensed formula, SMILES), are computed")
    centre = analysis.centres[0]
    groups = sorted({l.label for l in centre.ligands if l.label != l.symbol})
    if groups:
        return Skipped(f"{analysis.formula}: ligands that are groups ({', '.join(groups)}) are not built yet; "
                       "only single-atom ligands are placed")
    atoms = 1 + len(centre.ligands)
    if atoms > limits.max_atoms:
        return Skipped(f"{analysis.formula} has {atoms} atoms; computed geometries are bounded to {limits.max_atoms}")
    lengths = {}
    for ligand in centre.ligands:
        predicted = predict_bond_length(centre.central, ligand.symbol, ligand.bond_order)
        if predicted is None:
            predicted = predict_bond_length(centre.central, ligand.symbol, 1)
        if predicted is None:
            return Skipped(f"{analysis.formula}: no covalent radii for a {centre.central}-{ligand.symbol} bond")
        lengths[ligand.label] = predicted.angstrom
    electrons = sum(elements.element(s).number for s in _symbols(centre)) - analysis.charge
    spin_unpaired, spin = spin_state(centre, electrons, unpaired)
    if spin_unpaired % 2 != electrons % 2:
        return Skipped(f"{analysis.formula}: {electrons} electrons cannot have {spin_unpaired} unpaired")
    arrangements = _arrangements(centre)
    if isinstance(arrangements, Skipped):
        return Skipped(f"{analysis.formula}: {arrangements.reason}")
    built = []
    for name, rank, placed in arrangements:
        ligands = [(label, symbol, position, vector) for label, symbol, position, vector in placed
                   if label != LONE_PAIR and symbol is not None]
        built.append(Structure(
            species=analysis.formula,
            charge=analysis.charge,
            isomer=name,
            rank=rank,
            symbols=(centre.central, *(symbol for _, symbol, _, _ in ligands)),
            labels=tuple(label for label, _, _, _ in ligands),
            sites=tuple(position for _, _, position, _ in ligands),
            positions=((0.0, 0.0, 0.0), *(tuple(round(lengths[label] * c, 6) for c in vector)
                                          for label, _, _, vector in ligands)),
            predicted_lengths=tuple(lengths[label] for label, _, _, _ in ligands),
            unpaired=spin_unpaired,
            spin=spin,
        ))
    return tuple(built[: limits.max_isomers])


def _molecule_structure(analysis: SpeciesAnalysis, limits: Limits,
                        unpaired: int | None) -> tuple[Structure, ...] | Skipped:
    """The one starting structure of a species read as a molecule: its 3D model."""
    molecule = analysis.molecule.molecule  # type: ignore[union-attr]
    atoms = len(molecule.atoms)
    if atoms > limits.max_atoms:
        return Skipped(f"{analysis.formula} has {atoms} atoms; computed geometries are bounded to {limits.max_atoms}")
    if atoms < 2:
        return Skipped(f"{analysis.formula}: a single atom has no geometry to compute")
    model = model_3d(molecule)
    if isinstance(model, str):
        return Skipped(f"{analysis.formula}: {model}")
    electrons = sum(elements.element(a.element).number for a in molecule.atoms) - analysis.charge
    spin_unpaired, spin = molecule_spin_state(molecule, electrons, unpaired)
    if spin_unpaired % 2 != electrons % 2:
        return Skipped(f"{analysis.formula}: {electrons} electrons cannot have {spin_unpaired} unpaired")
    positions = tuple(tuple(round(float(c), 6) for c in p) for p in model)
    connections = tuple((b.first, b.second, b.order) for b in molecule.bonds)
    return (Structure(
        species=analysis.formula,
        charge=analysis.charge,
        isomer="",
        rank=1,
        symbols=tuple(a.element for a in molecule.atoms),
        labels=tuple(a.label for a in molecule.atoms),
        sites=(),
        positions=positions,  # type: ignore[arg-type]
        predicted_lengths=tuple(math.dist(positions[i], positions[j]) for i, j, _ in connections),
        unpaired=spin_unpaired,
        spin=spin,
        connections=connections,
    ),)


def molecule_spin_state(molecule: Molecule, electrons: int, unpaired: int | None = None) -> tuple[int, str]:
    """(unpaired electrons, what was assumed and why) for a molecule: its atoms' radical electrons,
    else the parity of the electron count (singlet, doublet)."""
    names = {0: "singlet", 1: "doublet", 2: "triplet", 3: "quartet"}
    if unpaired is not None:
        return unpaired, f"{names.get(unpaired, f'{unpaired} unpaired electrons')} (requested)"
    on_atoms = [(a.label, a.unpaired) for a in molecule.atoms if a.unpaired]
    count = sum(n for _, n in on_atoms)
    if on_atoms and count % 2 == electrons % 2:
        where = ", ".join(f"{n} on {label}" for label, n in on_atoms)
        return count, f"{names.get(count, f'{count} unpaired electrons')}: the unpaired electrons of the atoms ({where})"
    if electrons % 2:
        return 1, "doublet: an odd electron count (a radical)"
    return 0, "singlet: an even electron count, closed shell"


def _symbols(centre: CentreAnalysis) -> list[str]:
    return [centre.central, *(l.symbol for l in centre.ligands)]


def spin_state(centre: CentreAnalysis, electrons: int, unpaired: int | None = None) -> tuple[int, str]:
    """(unpaired electrons, what was assumed and why).

    The parity of the electron count decides, lowest spin first (singlet, doublet); where the
    analysis knows of two spin states close together (CH2), the ground state is taken and the
    result says so.
    """
    names = {0: "singlet", 1: "doublet", 2: "triplet", 3: "quartet"}
    if unpaired is not None:
        return unpaired, f"{names.get(unpaired, f'{unpaired} unpaired electrons')} (requested)"
    exception = centre.exception
    if exception is not None and "two spin states" in exception.name:
        return 2, ("triplet assumed: the ground state of CH2 (the singlet lies about 38 kJ/mol above it, "
                   "Jensen and Bunker, J. Chem. Phys. 89, 1327 (1988), from memory); the analysis leaves "
                   "this species' spin state open")
    if electrons % 2:
        return 1, "doublet: an odd electron count (a radical)"
    return 0, "singlet: an even electron count, closed shell"


Placement = tuple[str, str | None, str, Vector]


def _arrangements(centre: CentreAnalysis) -> list[tuple[str, int, list[Placement]]] | Skipped:
    if centre.isomers:
        several = len(centre.isomers) > 1
        chosen = []
        for index, isomer in enumerate(centre.isomers):
            if isomer.enantiomer is not None and isomer.enantiomer < index:
                continue  # the mirror image of one already listed
            chosen.append((isomer.name if several else "", isomer.rank,
                           [(s.label, s.symbol, s.position, s.vector) for s in isomer.sites]))
        return chosen
    labels = {l.label for l in centre.ligands}
    if len(labels) != 1:
        return Skipped(f"the analysis lists no isomers ({centre.isomers_withheld or 'none found'}), "
                       "so there is no arrangement of the different ligands to start from")
    # One kind of ligand: any placement is the species; the optimiser finds the angles.
    sites = polyhedron(centre.electron_geometry).sites
    if len(sites) < len(centre.ligands):
        return Skipped(f"{len(centre.ligands)} ligands do not fit a {centre.electron_geometry} arrangement")
    ligand = centre.ligands[0]
    return [("", 1, [(ligand.label, ligand.symbol, site.position, site.vector)
                     for site in sites[: len(centre.ligands)]])]


def failure(structure: Structure, reason: str) -> ComputedGeometry:
    """A result for ``structure`` that says why it has none."""
    return geometry_from_dict({
        "species": structure.species, "charge": structure.charge, "isomer": structure.isomer,
        "rank": structure.rank, "method": METHOD, "versions": [list(v) for v in versions()],
        "symbols": list(structure.symbols), "labels": list(structure.labels), "sites": list(structure.sites),
        "unpaired": structure.unpaired, "spin": structure.spin,
        "start": [list(p) for p in structure.positions], "positions": [list(p) for p in structure.positions],
        "energy_ev": None, "converged": False, "steps": 0, "wall_time_s": 0.0, "failed": reason, "notes": [],
        "connections": [list(c) for c in structure.connections],
    })


# --- optimisation (in a worker process) -------------------------------------------


class OutOfTime(Exception):
    """The wall-time bound of one structure was reached."""


def optimise(structure: Structure, limits: Limits = Limits()) -> ComputedGeometry:
    """The GFN2-xTB minimum near ``structure``; a failure is a result with ``failed`` set, never an exception."""
    started = time.monotonic()
    state: dict[str, Any] = {"positions": structure.positions, "energy": None, "steps": 0, "converged": False}
    failed: str | None = None
    notes: list[str] = []
    try:
        _run(structure, limits, started, state)
    except OutOfTime:
        failed = f"ran out of time (wall-time bound {limits.wall_time_s:g} s for one structure)"
    except MemoryError:
        failed = f"ran out of memory (bound {limits.memory_bytes >> 20} MB per worker)"
    except Exception as error:  # an SCF that does not converge, an input tblite refuses: a reason, not a crash
        failed = f"{METHOD} failed: {type(error).__name__}: {str(error)[:300]}"
    if failed is None and not state["converged"]:
        notes.append(f"not converged within {limits.max_steps} steps (fmax {limits.fmax_ev_per_a} eV/Å)")
    if failed is None:
        failed = _dissociated(structure, state["positions"])
    raw = {
        "species": structure.species, "charge": structure.charge, "isomer": structure.isomer,
        "rank": structure.rank, "method": METHOD, "versions": [list(v) for v in versions()],
        "symbols": list(structure.symbols), "labels": list(structure.labels), "sites": list(structure.sites),
        "unpaired": structure.unpaired, "spin": structure.spin,
        "start": [list(p) for p in structure.positions],
        "positions": [[float(c) for c in p] for p in state["positions"]],
        "energy_ev": state["energy"] if failed is None else None,
        "converged": bool(state["converged"]) and failed is None,
        "steps": state["steps"], "wall_time_s": time.monotonic() - started,
        "failed": failed, "notes": notes,
        "connections": [list(c) for c in structure.connections],
    }
    # Through the same check a cache entry gets: a NaN from the library becomes a failure too.
    try:
        return geometry_from_dict(raw)
    except ValueError as error:
        raw.update(positions=raw["start"], energy_ev=None, converged=False,
                   failed=f"{METHOD} gave an unusable result ({error})")
        return geometry_from_dict(raw)


def _run(structure: Structure, limits: Limits, started: float, state: dict[str, Any]) -> None:
    from ase import Atoms
    from ase.optimize import BFGS
    from tblite.ase import TBLite

    atoms = Atoms(symbols=list(structure.symbols), positions=[list(p) for p in structure.positions])
    atoms.calc = TBLite(method=METHOD, charge=structure.charge, multiplicity=structure.unpaired + 1, verbosity=0)
    optimiser = BFGS(atoms, logfile=None, maxstep=limits.max_step_a)
    for converged in optimiser.irun(fmax=limits.fmax_ev_per_a, steps=limits.max_steps):
        state["positions"] = tuple(tuple(float(c) for c in p) for p in atoms.get_positions())
        state["energy"] = float(atoms.get_potential_energy())
        state["steps"] = optimiser.nsteps
        state["converged"] = bool(converged)
        if converged:
            break
        if time.monotonic() - started > limits.wall_time_s:
            raise OutOfTime


def _dissociated(structure: Structure, positions: tuple[Vector, ...]) -> str | None:
    if structure.connections:
        for (first, second, _), start in zip(structure.connections, structure.predicted_lengths):
            distance = math.dist(positions[first], positions[second])
            if distance > DISSOCIATED_FACTOR * start:
                return (f"the {structure.labels[first]}-{structure.labels[second]} bond broke: {distance:.2f} Å "
                        f"against {start:.2f} Å at the start; the molecule as built does not hold together "
                        f"at {METHOD}")
        return None
    centre = positions[0]
    for index, predicted in enumerate(structure.predicted_lengths, start=1):
        distance = math.dist(positions[index], centre)
        if distance > DISSOCIATED_FACTOR * predicted:
            return (f"{structure.labels[index - 1]} (atom {index}) left the centre: {distance:.2f} Å against "
                    f"{predicted:.2f} Å predicted; the species as built does not hold together at {METHOD}")
    return None
