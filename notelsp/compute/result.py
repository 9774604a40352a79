"""What a calculation returns, as frozen values, and their JSON form.

The JSON form is the only thing that crosses a process boundary or touches
the disk; :func:`geometry_from_dict` rebuilds a value from it and refuses
(``BadResult``) anything that is not exactly that shape: types, counts,
finite numbers of sane size, short strings.  A worker's answer and a cache
file are read through it alike.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

Vector = tuple[float, float, float]

EV_PER_KJ_MOL = 0.010364269656262174  # 1 kJ/mol in eV (CODATA 2018 via 1 eV = 96.485 kJ/mol)

MAX_ATOMS = 64  # above Limits.max_atoms, so a bound change does not make every entry unreadable
MAX_TEXT = 400
MAX_COORDINATE = 1000.0  # angstrom
MAX_ENERGY_EV = 1e7  # the heaviest single-centre species are ~1e5 eV in size
MAX_SECONDS = 1e6


class BadResult(ValueError):
    """A stored or reported result that is not a usable computed geometry."""


@dataclass(frozen=True, slots=True)
class Angle:
    """The bond angle first-centre-second; atoms by index into ``symbols`` (the centre is 0 for one centre)."""

    first: int
    second: int
    # (A, X, B): for one centre the ligands as written and the centre's symbol;
    # for a molecule the atom labels (H1, C1, O2), the centre in the middle
    labels: tuple[str, str, str]
    degrees: float
    centre: int = 0  # index into symbols of the middle atom


@dataclass(frozen=True, slots=True)
class Bond:
    """One computed bond to a centre and its length."""

    atom: int  # index into symbols
    label: str  # the ligand as written (a molecule: the atom label)
    angstrom: float  # its distance from the centre (a molecule: from the atom ``centre``)
    centre: int = 0


# A bond of a molecule: (first atom, second atom, bond order), atoms by index into ``symbols``.
Connection = tuple[int, int, int]


@dataclass(frozen=True, slots=True)
class ComputedGeometry:
    """One optimised structure: one isomer of one species at one spin state."""

    species: str  # the formula as written
    charge: int
    isomer: str  # the analysis's name of the isomer, "" when the species has one
    rank: int  # the analysis's rank (1 = the isomer the rules expect)
    method: str
    versions: tuple[tuple[str, str], ...]  # (package, version) of what computed it
    symbols: tuple[str, ...]  # centre first (a molecule: its atoms in the molecule's order)
    # one centre: the ligand of each of symbols[1:] as written ("F", "O");
    # a molecule: the label of every atom of symbols ("C1", "H1", ...)
    labels: tuple[str, ...]
    sites: tuple[str, ...]  # the site each ligand started on ("axial", "vertex", ...); () for a molecule
    unpaired: int  # unpaired electrons of the spin state computed
    spin: str  # which spin state, and why that one
    start: tuple[Vector, ...]  # angstrom: the structure built from the analysis
    positions: tuple[Vector, ...]  # angstrom: the optimised structure (the start if it failed early)
    energy_ev: float | None
    converged: bool
    steps: int
    angles: tuple[Angle, ...]  # every bond angle at the centre
    bonds: tuple[Bond, ...]  # every bond to the centre
    largest_angle_change_deg: float  # how far any angle moved from the start (information)
    wall_time_s: float
    failed: str | None = None  # why this structure has no usable result; None when it has one
    notes: tuple[str, ...] = ()
    # the other isomer this one turned into during the optimisation (identity.closest_start); derived, not stored
    became: str | None = None
    # a molecule's bonds; () for a single centre, whose bonds all go from atom 0
    connections: tuple[Connection, ...] = ()

    @property
    def is_molecule(self) -> bool:
        return bool(self.connections)

    @property
    def usable(self) -> bool:
        """Converged, not failed, and still the isomer it started as."""
        return self.failed is None and self.converged and not self.rearranged

    @property
    def rearranged(self) -> bool:
        return self.became is not None

    def angles_between(self, a: str, b: str) -> tuple[float, ...]:
        """Every computed a-centre-b angle (ligand labels, either order), smallest first."""
        return tuple(sorted(angle.degrees for angle in self.angles
                            if {angle.labels[0], angle.labels[2]} == {a, b} and
                            (a != b or angle.labels[0] == angle.labels[2] == a)))

    def angles_at(self, centre: str, a: str, b: str, any_end: bool = False) -> tuple[tuple[float, ...], ...]:
        """A molecule's a-centre-b angles at the atom labelled ``centre``, grouped by equivalent pairs.

        ``a`` and ``b`` are atom labels (H1) or element symbols (H: any neighbour of that element);
        with ``any_end`` every angle at the centre.
        Two pairs are equivalent when their ends match in element, bond order to the centre and the
        elements bonded to them (the three H-C1-H of a methyl group); each group lists its angles.
        """
        groups: dict[tuple, list[float]] = {}
        for angle in self.angles:
            if angle.labels[1] != centre:
                continue
            ends = ((angle.first, angle.labels[0]), (angle.second, angle.labels[2]))
            if not any_end and not (self._names(ends[0], a) and self._names(ends[1], b)
                    or self._names(ends[0], b) and self._names(ends[1], a)):
                continue
            kind = tuple(sorted(self._environment(angle.centre, index) for index, _ in ends))
            groups.setdefault(kind, []).append(angle.degrees)
        return tuple(tuple(values) for values in groups.values())

    def _names(self, end: tuple[int, str], name: str) -> bool:
        return end[1] == name or self.symbols[end[0]] == name

    def _environment(self, centre: int, atom: int) -> tuple:
        order = next((o for i, j, o in self.connections if {i, j} == {centre, atom}), 0)
        around = sorted(self.symbols[j if i == atom else i] for i, j, _ in self.connections if atom in (i, j))
        return (self.symbols[atom], order, tuple(around))


@dataclass(frozen=True, slots=True)
class ComputedSpecies:
    """Every computed structure of a species, lowest energy first; failed ones last."""

    species: str
    charge: int
    method: str
    versions: tuple[tuple[str, str], ...]
    structures: tuple[ComputedGeometry, ...]
    skipped: str | None = None  # why nothing was computed (a group ligand, several centres, ...)
    notes: tuple[str, ...] = ()
    cached: int = 0  # structures that came from the disk cache
    # A species built as a molecule of several centres: the point group of the 3D model its calculation
    # started from (chem.molecule_geometry.whole_molecule_symmetry, the same answer the rules-only
    # path finds), or why that has none.  Kept with the species so that a later run reads it instead
    # of embedding the molecule again; both None for any other species.
    model_point_group: str | None = None
    model_unavailable: str | None = None

    @property
    def angle_uncertainty_deg(self) -> float:
        """The method's measured half-width for bond angles (see method.ANGLE_UNCERTAINTY_DEG)."""
        from .method import ANGLE_UNCERTAINTY_DEG, METHOD

        return ANGLE_UNCERTAINTY_DEG if self.method == METHOD else float("inf")

    @property
    def lowest(self) -> ComputedGeometry | None:
        """The usable structure of lowest energy, None when none is usable."""
        usable = [s for s in self.structures if s.usable]
        return usable[0] if usable else None

    @property
    def failed(self) -> str | None:
        """Why the species has no usable structure at all; None when it has one."""
        if self.skipped:
            return self.skipped
        if self.lowest is None:
            reasons = [f"{s.isomer or s.species}: {s.failed or _unusable_reason(s)}" for s in self.structures]
            return "; ".join(reasons) or "nothing was computed"
        return None

    def relative_energies_kj_mol(self) -> tuple[tuple[str, float], ...]:
        """(isomer, energy above the lowest usable structure) for every usable structure."""
        usable = [s for s in self.structures if s.usable and s.energy_ev is not None]
        if not usable:
            return ()
        base = usable[0].energy_ev
        return tuple((s.isomer, (s.energy_ev - base) / EV_PER_KJ_MOL) for s in usable)  # type: ignore[operator]


def _unusable_reason(structure: ComputedGeometry) -> str:
    if not structure.converged:
        return f"not converged in {structure.steps} steps"
    return f"turned into another isomer ({structure.became}) while it was optimised"


def ordered(structures: list[ComputedGeometry]) -> tuple[ComputedGeometry, ...]:
    """Usable structures by energy, then the rest in the analysis's rank order."""
    return tuple(sorted(structures, key=lambda s: (not s.usable, s.energy_ev if s.usable else 0.0, s.rank)))


# --- JSON form ------------------------------------------------------------------


def geometry_to_dict(geometry: ComputedGeometry) -> dict[str, Any]:
    return {
        "species": geometry.species,
        "charge": geometry.charge,
        "isomer": geometry.isomer,
        "rank": geometry.rank,
        "method": geometry.method,
        "versions": [list(v) for v in geometry.versions],
        "symbols": list(geometry.symbols),
        "labels": list(geometry.labels),
        "sites": list(geometry.sites),
        "unpaired": geometry.unpaired,
        "spin": geometry.spin,
        "start": [list(p) for p in geometry.start],
        "positions": [list(p) for p in geometry.positions],
        "energy_ev": geometry.energy_ev,
        "converged": geometry.converged,
        "steps": geometry.steps,
        "wall_time_s": geometry.wall_time_s,
        "failed": geometry.failed,
        "notes": list(geometry.notes),
        "connections": [list(c) for c in geometry.connections],
    }


def _text(value: Any, what: str) -> str:
    if not isinstance(value, str) or len(value) > MAX_TEXT:
        raise BadResult(f"{what} is not a short string")
    return value


def _integer(value: Any, what: str, low: int, high: int) -> int:
    if not isinstance(value, int) or isinstance(value, bool) or not low <= value <= high:
        raise BadResult(f"{what} is not an integer from {low} to {high}")
    return value


def _number(value: Any, what: str, bound: float) -> float:
    if not isinstance(value, (int, float)) or isinstance(value, bool) or not math.isfinite(value) or abs(value) > bound:
        raise BadResult(f"{what} is not a finite number within {bound:g}")
    return float(value)


def _list(value: Any, what: str, length: int | None = None, most: int = MAX_ATOMS) -> list:
    if not isinstance(value, list) or len(value) > most or (length is not None and len(value) != length):
        raise BadResult(f"{what} is not a list of {length if length is not None else f'at most {most}'} items")
    return value


def _positions(value: Any, what: str, count: int) -> tuple[Vector, ...]:
    return tuple(tuple(_number(c, "a coordinate", MAX_COORDINATE) for c in _list(p, "a position", 3))  # type: ignore[misc]
                 for p in _list(value, what, count))


def geometry_from_dict(raw: Any) -> ComputedGeometry:
    """The geometry ``raw`` describes, if every field has its type, count and a sane value; else BadResult.

    Angles and bond lengths are not read: they are measured again from the positions, so a
    stored value can never disagree with its own structure.
    """
    if not isinstance(raw, dict):
        raise BadResult("the result is not an object")
    symbols = tuple(_text(s, "an atom symbol") for s in _list(raw.get("symbols"), "symbols"))
    if len(symbols) < 2:
        raise BadResult("fewer than two atoms")
    # absent in results from before molecules were computed: those are all single centres
    connections = tuple(_connection(c, len(symbols)) for c in _list(raw.get("connections", []), "connections",
                                                                     most=4 * MAX_ATOMS))
    molecule = bool(connections)
    ligands = len(symbols) - 1
    versions = tuple(tuple(_text(t, "a version") for t in _list(v, "a version pair", 2))
                     for v in _list(raw.get("versions"), "versions", most=8))
    energy = raw.get("energy_ev")
    failed = raw.get("failed")
    converged = raw.get("converged")
    if not isinstance(converged, bool):
        raise BadResult("converged is not true or false")
    start = _positions(raw.get("start"), "the start", len(symbols))
    positions = _positions(raw.get("positions"), "the positions", len(symbols))
    labels = tuple(_text(s, "a ligand label") for s in _list(raw.get("labels"), "labels",
                                                             len(symbols) if molecule else ligands))
    return ComputedGeometry(
        species=_text(raw.get("species"), "the species"),
        charge=_integer(raw.get("charge"), "the charge", -20, 20),
        isomer=_text(raw.get("isomer"), "the isomer"),
        rank=_integer(raw.get("rank"), "the rank", 1, 100_000),
        method=_text(raw.get("method"), "the method"),
        versions=versions,  # type: ignore[arg-type]
        symbols=symbols,
        labels=labels,
        sites=tuple(_text(s, "a site") for s in _list(raw.get("sites"), "sites", 0 if molecule else ligands)),
        unpaired=_integer(raw.get("unpaired"), "the unpaired electrons", 0, 20),
        spin=_text(raw.get("spin"), "the spin state"),
        start=start,
        positions=positions,
        energy_ev=None if energy is None else _number(energy, "the energy", MAX_ENERGY_EV),
        converged=converged,
        steps=_integer(raw.get("steps"), "the step count", 0, 1_000_000),
        angles=(measure_molecule_angles(labels, connections, positions) if molecule
                else measure_angles(symbols[0], labels, positions)),
        bonds=(measure_molecule_bonds(labels, connections, positions) if molecule
               else measure_bonds(labels, positions)),
        largest_angle_change_deg=(largest_molecule_angle_change(labels, connections, start, positions) if molecule
                                  else largest_angle_change(start, positions)),
        wall_time_s=_number(raw.get("wall_time_s"), "the wall time", MAX_SECONDS),
        failed=None if failed is None else _text(failed, "the failure"),
        notes=tuple(_text(n, "a note") for n in _list(raw.get("notes"), "notes", most=16)),
        connections=connections,
    )


def _connection(value: Any, atoms: int) -> Connection:
    first, second, order = (_integer(v, "a bond's atom or order", 0, atoms - 1 if k < 2 else 3)
                            for k, v in enumerate(_list(value, "a bond", 3)))
    if first == second or order < 1:
        raise BadResult("a bond joins an atom to itself or has no order")
    return first, second, order


# --- measuring --------------------------------------------------------------------


def _angle(u: Vector, v: Vector) -> float:
    nu, nv = math.hypot(*u), math.hypot(*v)
    if nu == 0.0 or nv == 0.0:
        return 0.0
    cosine = sum(a * b for a, b in zip(u, v)) / (nu * nv)
    return math.degrees(math.acos(max(-1.0, min(1.0, cosine))))


def _from_centre(positions: tuple[Vector, ...]) -> list[Vector]:
    centre = positions[0]
    return [tuple(p[k] - centre[k] for k in range(3)) for p in positions[1:]]  # type: ignore[misc]


def measure_angles(centre: str, labels: tuple[str, ...], positions: tuple[Vector, ...]) -> tuple[Angle, ...]:
    arms = _from_centre(positions)
    return tuple(Angle(i + 1, j + 1, (labels[i], centre, labels[j]), _angle(arms[i], arms[j]))
                 for i in range(len(arms)) for j in range(i + 1, len(arms)))


def measure_bonds(labels: tuple[str, ...], positions: tuple[Vector, ...]) -> tuple[Bond, ...]:
    return tuple(Bond(i + 1, labels[i], math.hypot(*arm)) for i, arm in enumerate(_from_centre(positions)))


def largest_angle_change(start: tuple[Vector, ...], end: tuple[Vector, ...]) -> float:
    before, after = _from_centre(start), _from_centre(end)
    changes = [abs(_angle(before[i], before[j]) - _angle(after[i], after[j]))
               for i in range(len(before)) for j in range(i + 1, len(before))]
    return max(changes, default=0.0)


def _neighbours(connections: tuple[Connection, ...], count: int) -> list[list[int]]:
    around: list[list[int]] = [[] for _ in range(count)]
    for first, second, _ in connections:
        around[first].append(second)
        around[second].append(first)
    return around


def _arm(positions: tuple[Vector, ...], centre: int, atom: int) -> Vector:
    return tuple(positions[atom][k] - positions[centre][k] for k in range(3))  # type: ignore[return-value]


def measure_molecule_angles(labels: tuple[str, ...], connections: tuple[Connection, ...],
                            positions: tuple[Vector, ...]) -> tuple[Angle, ...]:
    """Every bond angle at every atom of a molecule with two or more neighbours, keyed by atom labels."""
    found = []
    for centre, around in enumerate(_neighbours(connections, len(positions))):
        for i, first in enumerate(around):
            for second in around[i + 1:]:
                found.append(Angle(first, second, (labels[first], labels[centre], labels[second]),
                                   _angle(_arm(positions, centre, first), _arm(positions, centre, second)), centre))
    return tuple(found)


def measure_molecule_bonds(labels: tuple[str, ...], connections: tuple[Connection, ...],
                           positions: tuple[Vector, ...]) -> tuple[Bond, ...]:
    return tuple(Bond(second, labels[second], math.hypot(*_arm(positions, first, second)), first)
                 for first, second, _ in connections)


def largest_molecule_angle_change(labels: tuple[str, ...], connections: tuple[Connection, ...],
                                  start: tuple[Vector, ...], end: tuple[Vector, ...]) -> float:
    before = measure_molecule_angles(labels, connections, start)
    after = measure_molecule_angles(labels, connections, end)
    return max((abs(a.degrees - b.degrees) for a, b in zip(before, after)), default=0.0)
