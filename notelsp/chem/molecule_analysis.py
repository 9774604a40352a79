"""The analysis of a whole molecule graph: every centre's VSEPR, hybridization,
Coulson, Drago and Bent analysis, and what each terminal atom is bonded to.

Each centre's analysis names its ligands by element, as a formula's analysis
does, so a molecule with one centre gets exactly today's answer; which atom
each ligand is comes with the centre (``MoleculeCentre.neighbours``).  Isomers
are listed for a single-centre molecule only: they are a single-centre notion,
and enumerating them for every centre of a larger molecule would cost more
than the whole analysis.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from itertools import permutations

from .analysis import CentreAnalysis, analyse_centre
from .centres import centre_model
from .coulson import TYPICAL_ANGLES
from .model import Ligand
from .molecule import Molecule
from .species import CentreModel


# The angle inside a small ring, whatever the centre's domains: (low, high) degrees.  Three-membered rings are
# near-equilateral triangles, skewed by a long bond or a double bond (ASE G2 set, Curtiss et al. 1997:
# cyclopropane 60.0°, oxirane C-O-C 61.2°, thiirane C-S-C 48.1°, cyclopropene 51.2° at CH2 and 64.4° at CH);
# four-membered rings close to about 86-99° (G2: cyclobutane 87.9°, cyclobutene 85.9° and 94.1°, the folded
# four-ring of bicyclobutane 98.6°).
RING_ANGLES = {3: (46.0, 68.0), 4: (83.0, 101.0)}


@dataclass(frozen=True, slots=True)
class MoleculeCentre:
    """One atom with two or more neighbours and its analysis (or why there is none)."""

    label: str
    element: str
    neighbours: tuple[str, ...]  # atom labels, in the order of the analysis' ligands
    analysis: CentreAnalysis | None  # its ligands are named by element, as a formula's are
    outside_model: str | None = None
    small_rings: tuple[tuple[str, str, int], ...] = ()  # (neighbour, neighbour, ring size) for 3- and 4-membered rings

    def ligand_name(self, name: str) -> str:
        """The analysis' name for a neighbour given by atom label ("H2" -> "H"); other names pass unchanged."""
        if self.analysis is not None and name in self.neighbours:
            return self.analysis.ligands[self.neighbours.index(name)].label
        return name

    def angle_range(self, first: str, second: str) -> tuple[float, float] | None:
        """Expected (low, high) degrees for first-centre-second, by atom labels or element symbols."""
        if self.analysis is None:
            return None
        for a, b, size in self.small_rings:  # the ring, not the domains, sets this angle
            if {a, b} == {first, second}:
                return RING_ANGLES[size]
        return self.analysis.angle_range(self.ligand_name(first), self.ligand_name(second))


@dataclass(frozen=True, slots=True)
class TerminalAtom:
    """An atom with one neighbour (or none): no bond angle of its own."""

    label: str
    element: str
    charge: int
    neighbours: tuple[str, ...]


@dataclass(frozen=True)
class MoleculeAnalysis:
    molecule: Molecule
    centres: tuple[MoleculeCentre, ...]
    terminals: tuple[TerminalAtom, ...]
    outside_model: str | None = None  # why no centre could be analysed at all

    def centre(self, label: str) -> MoleculeCentre | None:
        for found in self.centres:
            if found.label == label:
                return found
        return None


def analyse_molecule(molecule: Molecule) -> MoleculeAnalysis:
    """Analyse every centre of the molecule; a centre the model cannot treat says why, the others still count."""
    indices = molecule.centres
    single = len(indices) == 1
    seen: dict[CentreModel, CentreAnalysis | str] = {}  # equal centres (CH3 groups, ring CH) are analysed once
    centres = []
    for index in indices:
        model = centre_model(molecule, index)
        # ligands named as a formula names them (by element), hydrogens first as a formula's model puts them; in a
        # larger molecule in a fixed order, so equal centres share one analysis; ``neighbours`` says which atom is which
        pairs = zip(model.ligands, molecule.neighbours(index), strict=True)
        if single:
            ordered = sorted(pairs, key=lambda pair: (pair[0].symbol != "H", pair[1]))
        else:
            ordered = sorted(pairs, key=lambda pair: (pair[0].symbol != "H", pair[0].symbol, -pair[0].bond_order, pair[1]))
        neighbours = tuple(ligand.label for ligand, _ in ordered)
        key = CentreModel(model.central, model.charge,
                          tuple(Ligand(l.symbol, l.symbol, l.bond_order, l.electronegativity) for l, _ in ordered),
                          bonds_known=True, conjugation=model.conjugation, unpaired=model.unpaired)
        analysed = seen.get(key)
        if analysed is None:
            if single:
                analysed = analyse_centre(key, _formula_text(key.central, key.ligands))
            else:
                analysed = analyse_centre(key, "", with_isomers=False)
            seen[key] = analysed
        if isinstance(analysed, str):
            centres.append(MoleculeCentre(model.label, model.central, neighbours, None, analysed))
            continue
        rings = _small_rings(molecule, index)
        extra = _graph_notes(molecule, index, model) + tuple(
            f"{a}-{model.label}-{b} lies in a {size}-membered ring: the ring holds this angle near "
            f"{'60' if size == 3 else '90'}°, far below the VSEPR ideal (ring strain)" for a, b, size in rings)
        if extra:
            analysed = replace(analysed, notes=analysed.notes + extra)
        centres.append(MoleculeCentre(model.label, model.central, neighbours, analysed, small_rings=rings))
    terminals = tuple(
        TerminalAtom(molecule.atoms[i].label, molecule.atoms[i].element, molecule.atoms[i].charge,
                     tuple(molecule.atoms[j].label for j in molecule.neighbours(i)))
        for i in molecule.terminals
    )
    outside = None
    if not indices:
        outside = "no atom bonds to two others: there is no bond angle to predict"
    elif all(c.analysis is None for c in centres):
        outside = centres[0].outside_model
    return MoleculeAnalysis(molecule, tuple(centres), terminals, outside)


def _small_rings(molecule: Molecule, index: int) -> tuple[tuple[str, str, int], ...]:
    found = []
    around = [other for other in molecule.neighbours(index) if len(molecule.neighbours(other)) >= 2]  # ring atoms only
    for position, first in enumerate(around):
        for second in around[position + 1:]:
            size = molecule.ring_size(index, first, second, largest=4)
            if size is not None:
                found.append((molecule.atoms[first].label, molecule.atoms[second].label, size))
    return tuple(found)


def _graph_notes(molecule: Molecule, index: int, model: CentreModel) -> tuple[str, ...]:
    if not model.unpaired and not molecule.has_delocalised_bond(index):
        return ()
    notes = []
    label = model.label
    delocalised = [molecule.atoms[other].label for other, _ in molecule.bonds_of(index)
                   if molecule.bond_between(index, other).delocalised]
    ring = [name for name in delocalised if len(molecule.neighbours(molecule.index_of(name))) >= 2]
    if ring:
        notes.append(f"{label} is in an aromatic ring: its bonds to {', '.join(ring)} are delocalised "
                     "(between single and double; the Kekulé orders shown are one resonance form)")
    group = [name for name in delocalised if name not in ring]
    if len(group) >= 2:
        notes.append(f"delocalised group: the bonds from {label} to {', '.join(group)} are equal by resonance "
                     "(the formal charge is shared between them)")
    if model.unpaired >= 2:
        notes.append(f"{label} carries {model.unpaired} unpaired electrons (a high-spin state); the count above "
                     "pairs them, so the shape holds but the angle of the high-spin state is wider "
                     "(CH2: triplet 131.6°, singlet 102.1°, ASE G2 set, Curtiss et al. 1997)")
    return tuple(notes)


def _formula_text(central: str, ligands: tuple[Ligand, ...]) -> str:
    """The centre's formula as a chemist writes it, in a spelling Coulson's typical angles know when there is one."""
    counts: dict[str, int] = {}
    for ligand in ligands:
        counts[ligand.symbol] = counts.get(ligand.symbol, 0) + 1
    parts = [symbol + (str(n) if n > 1 else "") for symbol, n in counts.items()]
    if len(parts) <= 3:
        for order in permutations(parts):
            for text in (central + "".join(order), "".join(order) + central):
                if text in TYPICAL_ANGLES:
                    return text
    return central + "".join(sorted(parts))
