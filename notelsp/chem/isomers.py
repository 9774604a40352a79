"""Positional isomers of a centre: which ligand or lone pair sits on which site.

Every assignment of the ligands and lone pairs to the sites of the ideal
polyhedron is generated; two assignments are the same isomer when a rotation
of the polyhedron turns one into the other.  An isomer whose mirror image is
not in its own rotation orbit is chiral, and both enantiomers are listed
(``enantiomer`` points at the partner).  The count of isomers is therefore the
count of stereoisomers with each enantiomer counted separately.

The point group of an isomer is the subgroup of the polyhedron's full point
group that keeps every label in place, named from its elements.

Ranking uses a domain-repulsion score in the spirit of VSEPR: each domain has
a size (a lone pair largest, a multiple bond larger than a single bond, a
bond to a more electronegative ligand smaller, as Bent's rule and
apicophilicity describe), and close pairs of large domains cost most.  The
score reproduces the published preferences: lone pairs equatorial in a
trigonal bipyramid and trans in an octahedron, more electronegative ligands
axial, doubly bonded O equatorial.
"""

from __future__ import annotations

import math
from collections import Counter
from collections.abc import Sequence
from dataclasses import dataclass
from functools import lru_cache
from itertools import permutations
from typing import TYPE_CHECKING, Literal

from .model import LONE_PAIR, Ligand

if TYPE_CHECKING:  # numpy, the polyhedra and the point groups load on the first enumeration, not on import
    import numpy as np

    from .polyhedra import Polyhedron

# The electron geometries isomers are enumerated on, with the sites of each polyhedron
# (tests/chem/test_isomers.py checks the counts against the polyhedra themselves).
SITE_COUNTS = {
    "linear": 2,
    "trigonal-planar": 3,
    "tetrahedral": 4,
    "trigonal-bipyramidal": 5,
    "octahedral": 6,
    "pentagonal-bipyramidal": 7,
}
ELECTRON_GEOMETRIES = tuple(SITE_COUNTS)
# Above this many raw assignments of domains to sites the isomers are not enumerated; the review
# says so instead.  The work grows with the assignments.  Measured warm on a shared 2-core machine:
# 2,520 (five different ligands and a pair on a pentagonal bipyramid, IF2ClBrH(OH)(CH3)) take
# 35-45 ms, 5,040 (seven different, IFClBrH(OH)(CH3)(SH)) 75-80 ms.  2,520 keeps one species,
# and a two-species comparison, under the ~100 ms a keystroke can afford.
MAX_ARRANGEMENTS = 2_520

LONE_PAIR_SIZE = 1.6  # relative domain sizes; only their order and rough spacing matter
MULTIPLE_BOND_SIZE = {1: 1.0, 2: 1.35, 3: 1.5}
SIZE_PER_ELECTRONEGATIVITY = 0.1  # a bond domain shrinks as the ligand pulls its pair away
REPULSION_POWER = 6  # steep, so the closest contacts decide

Confidence = Literal["high", "medium", "low"]
Arrangement = tuple[str, ...]  # one label per site, in the polyhedron's site order


class IsomerLimitExceeded(ValueError):
    """The request would need more assignments than MAX_ARRANGEMENTS; the message says why."""


@dataclass(frozen=True, slots=True)
class SitePlacement:
    """One ligand or lone pair on one site of the polyhedron."""

    label: str  # the ligand as written ("F", "OH") or LONE_PAIR
    symbol: str | None  # attaching atom; None for a lone pair
    position: str  # "axial", "equatorial", "apical", "basal" or "vertex"
    vector: tuple[float, float, float]  # unit vector from the centre


@dataclass(frozen=True, slots=True)
class Isomer:
    """One arrangement of the ligands and lone pairs on the sites, with its symmetry and rank."""

    sites: tuple[SitePlacement, ...]
    point_group: str  # Schoenflies symbol of the labelled arrangement
    polar: bool
    dipole_debye: float  # bond-dipole estimate; 0 where the point group forbids a dipole
    chiral: bool  # has a non-superimposable mirror image
    name: str  # short description: "F axial", "cis", "fac", "lone pairs trans"
    rank: int  # 1 = the expected isomer; enantiomers share a rank
    reason: str  # why it ranks where it does
    confidence: Literal["high", "medium", "low"]
    enantiomer: int | None = None  # index of the mirror image in the same result, if chiral


def isomers_for(
    electron_geometry: str,
    ligands: Sequence[Ligand],
    lone_pairs: int,
    *,
    centre_electronegativity: float | None = None,
) -> tuple[Isomer, ...]:
    """Every distinct isomer, the expected one first.

    Raises ValueError for an unknown geometry or a domain count that does not
    fill the polyhedron, and IsomerLimitExceeded (a ValueError) when the
    enumeration would exceed MAX_ARRANGEMENTS.
    """
    return _isomers(electron_geometry, tuple(ligands), lone_pairs, centre_electronegativity)


def refusal(electron_geometry: str, ligands: Sequence[Ligand], lone_pairs: int) -> str | None:
    """Why :func:`isomers_for` would refuse these arguments (its error's message), or None if it would not.

    Nothing is enumerated and numpy is not loaded: an analysis can say at once whether a centre's
    isomers will be listed, and enumerate them only when a claim needs them.
    """
    try:
        _check_request(electron_geometry, [ligand.label for ligand in ligands] + [LONE_PAIR] * lone_pairs)
    except ValueError as error:  # IsomerLimitExceeded included
        return str(error)
    return None


def _check_request(electron_geometry: str, labels: Sequence[str]) -> None:
    """Raise what :func:`isomers_for` raises before it enumerates anything."""
    if electron_geometry not in SITE_COUNTS:
        raise ValueError(f"no isomers for electron geometry {electron_geometry!r}")
    if len(labels) != SITE_COUNTS[electron_geometry]:
        raise ValueError(f"{electron_geometry} has {SITE_COUNTS[electron_geometry]} sites, not {len(labels)} domains")
    raw = _arrangement_count(labels)
    if raw > MAX_ARRANGEMENTS:
        raise IsomerLimitExceeded(f"{raw:,} site assignments exceed the limit of {MAX_ARRANGEMENTS:,}")


def diastereomer_count(isomers: Sequence[Isomer]) -> int:
    """Isomers counted with each enantiomer pair once."""
    return len(isomers) - sum(1 for index, isomer in enumerate(isomers) if isomer.enantiomer is not None and isomer.enantiomer < index)


def expected(isomers: Sequence[Isomer]) -> tuple[Isomer, ...]:
    """The rank-1 isomers (one, or an enantiomer pair, or a tie the ranking cannot split)."""
    return tuple(isomer for isomer in isomers if isomer.rank == 1)


# --- enumeration --------------------------------------------------------------


def _arrangement_count(labels: Sequence[str]) -> int:
    count = math.factorial(len(labels))
    for repeats in Counter(labels).values():
        count //= math.factorial(repeats)
    return count


def _image(arrangement: Arrangement, permutation: tuple[int, ...]) -> Arrangement:
    moved = [""] * len(arrangement)
    for source, target in enumerate(permutation):
        moved[target] = arrangement[source]
    return tuple(moved)


def _canonical(arrangement: Arrangement, shape: Polyhedron) -> Arrangement:
    return min(_image(arrangement, op.permutation) for op in shape.rotations)


def _orbits(labels: Sequence[str], shape: Polyhedron) -> list[Arrangement]:
    """One representative (the canonical form) per rotation orbit, in sorted order.

    Each orbit's images are computed once and marked seen, so the work is one
    image per arrangement rather than one per arrangement and rotation.
    """
    seen: set[Arrangement] = set()
    representatives = []
    for arrangement in permutations(labels):
        if arrangement in seen:
            continue
        orbit = {_image(arrangement, op.permutation) for op in shape.rotations}
        seen |= orbit
        representatives.append(min(orbit))
    return sorted(representatives)


def _point_group(arrangement: Arrangement, shape: Polyhedron) -> str:
    import numpy as np

    from .symmetry import schoenflies

    if shape.name == "linear":
        return "D∞h" if arrangement[0] == arrangement[1] else "C∞v"
    kept = [np.array(op.matrix) for op in shape.operations if _image(arrangement, op.permutation) == arrangement]
    symbol = schoenflies(kept)
    linear = _linear_symbol(arrangement, shape, symbol)
    return linear or symbol


def _linear_symbol(arrangement: Arrangement, shape: Polyhedron, symbol: str) -> str | None:
    """C∞v or D∞h when the atoms lie on one line and the lone pairs ring it evenly (XeF2, HF).

    Lone pairs spread evenly round the bond axis (three or more of them, so the
    labelled group has a C3 or higher axis along it) make the electron density
    cylindrical, so the molecule keeps the symmetry of its line of atoms.
    """
    ligand_sites = [i for i, label in enumerate(arrangement) if label != LONE_PAIR]
    if not ligand_sites or len(ligand_sites) > 2 or arrangement.count(LONE_PAIR) < 3:
        return None
    vectors = shape.vectors
    if len(ligand_sites) == 2 and float(vectors[ligand_sites[0]] @ vectors[ligand_sites[1]]) > -0.99:
        return None
    order = int("".join(ch for ch in symbol[1:] if ch.isdigit()) or 0)
    if order < 3:
        return None
    ends_alike = len(ligand_sites) == 2 and arrangement[ligand_sites[0]] == arrangement[ligand_sites[1]]
    return "D∞h" if ends_alike else "C∞v"


# --- ranking ------------------------------------------------------------------


def _domain_size(label: str, ligand: Ligand | None, reference: float) -> float:
    if label == LONE_PAIR or ligand is None:
        return LONE_PAIR_SIZE
    chi = ligand.electronegativity if ligand.electronegativity is not None else reference
    base = MULTIPLE_BOND_SIZE.get(ligand.bond_order, MULTIPLE_BOND_SIZE[3])
    return base * (1.0 - SIZE_PER_ELECTRONEGATIVITY * (chi - reference))


def _site_separations(vectors: np.ndarray) -> list[list[float]]:
    """Distance between sites i and j raised to REPULSION_POWER, computed once per enumeration."""
    import numpy as np

    count = len(vectors)
    return [[float(np.linalg.norm(vectors[i] - vectors[j])) ** REPULSION_POWER for j in range(count)] for i in range(count)]


def _repulsion(arrangement: Arrangement, separations: list[list[float]], sizes: dict[str, float]) -> float:
    total = 0.0
    for i in range(len(arrangement)):
        for j in range(i + 1, len(arrangement)):
            total += sizes[arrangement[i]] * sizes[arrangement[j]] / separations[i][j]
    return total


def _masked(arrangement: Arrangement, keep: set[str]) -> Arrangement:
    return tuple(label if label in keep else "*" for label in arrangement)


# --- naming -------------------------------------------------------------------

_WORDS = {1: "one", 2: "two", 3: "three", 4: "four", 5: "five", 6: "six", 7: "seven"}


def _positions(arrangement: Arrangement, shape: Polyhedron) -> tuple[str, ...]:
    """Site names; in an octahedron with one lone pair the ligands are apical or basal."""
    base = tuple(site.position for site in shape.sites)
    if shape.name != "octahedral" or arrangement.count(LONE_PAIR) != 1:
        return base
    vectors = shape.vectors
    pair = vectors[arrangement.index(LONE_PAIR)]
    names = []
    for label, vector in zip(arrangement, vectors):
        if label == LONE_PAIR:
            names.append("vertex")
        else:
            names.append("apical" if float(vector @ pair) < -0.5 else "basal")
    return tuple(names)


def _plural(label: str, count: int) -> str:
    if label == LONE_PAIR:
        return "lone pair" if count == 1 else "lone pairs"
    return label


def _describe_positions(label: str, found: list[str]) -> str:
    counts = Counter(found)
    noun = _plural(label, len(found))
    if len(counts) == 1:
        (where,) = counts
        if len(found) == 1:
            return f"{noun} {where}"
        prefix = "both" if len(found) == 2 else f"all {_WORDS.get(len(found), len(found))}"
        return f"{prefix} {noun} {where}"
    ordered = sorted(counts.items(), key=lambda item: (-item[1], item[0]))
    (first_where, first_count), rest = ordered[0], ordered[1:]
    head = f"{_WORDS.get(first_count, first_count)} {_plural(label, first_count)} {first_where}"
    return ", ".join([head] + [f"{_WORDS.get(n, n)} {where}" for where, n in rest])


def _ring_spacing(indices: list[int], shape: Polyhedron) -> str | None:
    """For two equatorial sites of a pentagonal bipyramid: neighbours (72°) or not (144°)."""
    ring = [i for i in indices if shape.sites[i].position == "equatorial"]
    if shape.name != "pentagonal-bipyramidal" or len(ring) != 2:
        return None
    vectors = shape.vectors
    return "adjacent" if float(vectors[ring[0]] @ vectors[ring[1]]) > 0 else "apart"


def _describe_relation(label: str, indices: list[int], vectors: np.ndarray) -> str | None:
    trans_pairs = sum(
        1 for a in range(len(indices)) for b in range(a + 1, len(indices)) if float(vectors[indices[a]] @ vectors[indices[b]]) < -0.99
    )
    noun = _plural(label, len(indices))
    if len(indices) == 2:
        return f"{noun} {'trans' if trans_pairs else 'cis'}"
    if len(indices) == 3 and len(vectors) == 6:
        return f"{noun} {'mer' if trans_pairs else 'fac'}"
    return None


def _describe(arrangement: Arrangement, shape: Polyhedron, labels: list[str]) -> str:
    positions = _positions(arrangement, shape)
    parts = []
    for label in labels:
        indices = [i for i, here in enumerate(arrangement) if here == label]
        found = [positions[i] for i in indices]
        if any(p != "vertex" for p in found):
            spacing = _ring_spacing(indices, shape)
            parts.append(_describe_positions(label, found) + (f" ({spacing})" if spacing else ""))
        else:
            relation = _describe_relation(label, indices, shape.vectors)
            if relation:
                parts.append(relation)
    parts.extend(_single_trans_partners(arrangement, shape, labels))
    return ", ".join(parts)


def _single_trans_partners(arrangement: Arrangement, shape: Polyhedron, labels: list[str]) -> list[str]:
    """"F trans to Cl" for ligands that occur once, where the octahedron gives them a partner."""
    if shape.name != "octahedral":
        return []
    counts = Counter(arrangement)
    vectors = shape.vectors
    mentioned: set[str] = set()
    phrases = []
    for label in labels:
        if counts[label] != 1 or label in mentioned or label == LONE_PAIR:
            continue
        here = arrangement.index(label)
        opposite = next(i for i in range(len(vectors)) if float(vectors[i] @ vectors[here]) < -0.99)
        partner = arrangement[opposite]
        if partner == LONE_PAIR or counts[partner] != 1 or partner in mentioned:
            continue
        mentioned |= {label, partner}
        phrases.append(f"{label} trans to {partner}")
    return phrases


def _described_labels(arrangement: Arrangement, everything: bool) -> list[str]:
    """Lone pairs first, then ligands from the rarest; the commonest ligand is implied unless ``everything``."""
    counts = Counter(arrangement)
    ligand_labels = sorted((label for label in counts if label != LONE_PAIR), key=lambda label: (counts[label], label))
    if not everything and len(ligand_labels) > 0:
        ligand_labels = ligand_labels[:-1]
    return ([LONE_PAIR] if LONE_PAIR in counts else []) + ligand_labels


def _names(arrangements: list[Arrangement], mirrors: list[Arrangement], shape: Polyhedron) -> list[str]:
    """Short names where they tell the isomers apart (an enantiomer pair may share one), fuller ones where not."""
    pairs = [frozenset((a, m)) for a, m in zip(arrangements, mirrors)]

    def clashes(names: list[str]) -> list[list[int]]:
        """For each name, the other isomers (not its own enantiomer pair) that carry it too."""
        holders: dict[str, list[int]] = {}
        for index, name in enumerate(names):
            holders.setdefault(name, []).append(index)
        return [[i for i in holders[name] if pairs[i] != pairs[index]] for index, name in enumerate(names)]

    short = [_describe(a, shape, _described_labels(a, everything=False)) for a in arrangements]
    full = [_describe(a, shape, _described_labels(a, everything=True)) for a in arrangements]
    names = [full[i] if clashing else short[i] for i, clashing in enumerate(clashes(short))]
    names = [name or "single arrangement" for name in names]
    numbered = []
    for index, (name, clashing) in enumerate(zip(names, clashes(names))):
        same = sorted({min(pairs[i]) for i in clashing} | {min(pairs[index])})
        numbered.append(name if len(same) == 1 else f"{name} (arrangement {same.index(min(pairs[index])) + 1})")
    return numbered


# --- assembly -----------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class _Candidate:
    """An arrangement being ranked, with its repulsion energy and its mirror image."""

    arrangement: Arrangement
    energy: float
    mirror: Arrangement


@lru_cache(maxsize=4096)
def _isomers(
    electron_geometry: str,
    ligands: tuple[Ligand, ...],
    lone_pairs: int,
    centre_electronegativity: float | None,
) -> tuple[Isomer, ...]:
    from .polarity import dipole_estimate, is_polar
    from .polyhedra import polyhedron

    labels = [ligand.label for ligand in ligands] + [LONE_PAIR] * lone_pairs
    _check_request(electron_geometry, labels)
    shape = polyhedron(electron_geometry)

    by_label: dict[str, Ligand] = {}
    for ligand in ligands:
        by_label.setdefault(ligand.label, ligand)
    known = [l.electronegativity for l in ligands if l.electronegativity is not None]
    reference = centre_electronegativity if centre_electronegativity is not None else (sum(known) / len(known) if known else 0.0)
    sizes = {label: _domain_size(label, by_label.get(label), reference) for label in set(labels)}
    separations = _site_separations(shape.vectors)
    mirror_op = shape.improper[0].permutation

    candidates = [
        _Candidate(a, _repulsion(a, separations, sizes), _canonical(_image(a, mirror_op), shape)) for a in _orbits(labels, shape)
    ]
    # enantiomers have equal energy by symmetry; rounding makes that exact
    levels = sorted({round(c.energy, 9) for c in candidates})
    candidates.sort(key=lambda c: (round(c.energy, 9), min(c.arrangement, c.mirror), c.arrangement))
    arrangements = [c.arrangement for c in candidates]
    names = _names(arrangements, [c.mirror for c in candidates], shape)
    chiral_names = _enantiomer_names(candidates, names)
    index_of = {c.arrangement: i for i, c in enumerate(candidates)}

    multiple = {label for label, ligand in by_label.items() if ligand.bond_order > 1}
    isomers = []
    for index, candidate in enumerate(candidates):
        rank = levels.index(round(candidate.energy, 9)) + 1
        reason, confidence = _judgement(index, candidates, chiral_names, shape, multiple, by_label)
        point_group = _point_group(candidate.arrangement, shape)
        polar = is_polar(point_group)
        positions = _positions(candidate.arrangement, shape)
        sites = tuple(
            SitePlacement(
                label,
                None if label == LONE_PAIR else by_label[label].symbol,
                positions[i],
                shape.sites[i].vector,
            )
            for i, label in enumerate(candidate.arrangement)
        )
        dipole = 0.0
        if polar:
            dipole = dipole_estimate(
                [site.vector for site in sites],
                [None if site.label == LONE_PAIR else by_label[site.label].electronegativity for site in sites],
                [site.label == LONE_PAIR for site in sites],
                centre_electronegativity,
            )
        chiral = candidate.mirror != candidate.arrangement
        isomers.append(
            Isomer(
                sites=sites,
                point_group=point_group,
                polar=polar,
                dipole_debye=round(dipole, 2),
                chiral=chiral,
                name=chiral_names[index],
                rank=rank,
                reason=reason,
                confidence=confidence,
                enantiomer=index_of[candidate.mirror] if chiral else None,
            )
        )
    return tuple(isomers)


def _enantiomer_names(candidates: list[_Candidate], names: list[str]) -> list[str]:
    named = list(names)
    seen: dict[frozenset[Arrangement], int] = {}
    for index, candidate in enumerate(candidates):
        if candidate.mirror == candidate.arrangement:
            continue
        pair = frozenset((candidate.arrangement, candidate.mirror))
        seen[pair] = seen.get(pair, 0) + 1
        named[index] = f"{names[index]} (enantiomer {seen[pair]})"
    return named


def _judgement(
    index: int,
    candidates: list[_Candidate],
    names: list[str],
    shape: Polyhedron,
    multiple: set[str],
    by_label: dict[str, Ligand],
) -> tuple[str, Confidence]:
    """Why this isomer ranks where it does, and how sure the ranking is."""
    me = candidates[index]
    if len(candidates) == 1:
        return "the only arrangement", "high"
    best_energy = round(candidates[0].energy, 9)
    my_energy = round(me.energy, 9)
    if my_energy == best_energy:
        rivals = [c for c in candidates if round(c.energy, 9) != best_energy]
        ties = [i for i, c in enumerate(candidates) if round(c.energy, 9) == best_energy and c.arrangement not in (me.arrangement, me.mirror)]
        if ties:
            return f"no preference found between this and '{names[ties[0]]}'", "low"
        if not rivals:
            return "the only arrangement apart from its mirror image", "high"
        factor, spread = _factor(me, rivals[0], shape, multiple, by_label)
        return f"expected: {_favoured(factor, shape)}", _confidence(factor, spread, shape)
    factor, spread = _factor(candidates[0], me, shape, multiple, by_label)
    return f"less favoured than '{names[0]}': {_disfavoured(factor, shape)}", _confidence(factor, spread, shape)


def _factor(
    better: _Candidate, worse: _Candidate, shape: Polyhedron, multiple: set[str], by_label: dict[str, Ligand]
) -> tuple[str, float]:
    """What separates two isomers: lone pairs, multiple bonds, or ligand electronegativity (with its spread)."""
    if _canonical(_masked(better.arrangement, {LONE_PAIR}), shape) != _canonical(_masked(worse.arrangement, {LONE_PAIR}), shape):
        return "lone-pair", 0.0
    keep = {LONE_PAIR} | multiple
    if multiple and _canonical(_masked(better.arrangement, keep), shape) != _canonical(_masked(worse.arrangement, keep), shape):
        return "multiple-bond", 0.0
    moved = {label for label in by_label if label not in keep}
    values = [by_label[label].electronegativity for label in moved if by_label[label].electronegativity is not None]
    return "electronegativity", (max(values) - min(values)) if len(values) > 1 else 0.0


def _favoured(factor: str, shape: Polyhedron) -> str:
    if factor == "lone-pair":
        return "lone pairs take the sites with the fewest close neighbours (lone-pair repulsion is strongest)"
    if factor == "multiple-bond":
        return "the multiply bonded ligand takes the roomiest site (a multiple bond's domain is larger)"
    if shape.name == "trigonal-bipyramidal":
        return "the more electronegative ligands take the axial sites (Bent's rule: apicophilicity)"
    if shape.name == "pentagonal-bipyramidal":
        return "the larger, less electronegative bond domains take the roomier axial sites"
    return "the larger, less electronegative bond domains keep furthest apart"


def _disfavoured(factor: str, shape: Polyhedron) -> str:
    if factor == "lone-pair":
        return "a lone pair has more close neighbours (lone-pair repulsion is strongest)"
    if factor == "multiple-bond":
        return "the multiply bonded ligand sits on a more crowded site"
    if shape.name == "trigonal-bipyramidal":
        return "a less electronegative ligand takes an axial site (Bent's rule: apicophilicity)"
    if shape.name == "pentagonal-bipyramidal":
        return "a larger, less electronegative bond domain sits on a crowded equatorial site"
    return "larger, less electronegative bond domains sit closer together"


def _confidence(factor: str, spread: float, shape: Polyhedron) -> Confidence:
    if factor in ("lone-pair", "multiple-bond"):
        return "high"
    if shape.name == "trigonal-bipyramidal":  # apicophilicity is well established only here
        return "high" if spread >= 0.5 else "medium"
    return "medium" if spread >= 0.5 else "low"
