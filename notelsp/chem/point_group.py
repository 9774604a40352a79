"""The point group of a set of atoms from their coordinates.

The symmetry operations are looked for among a small set of candidates that
is complete for every point group, then the group is named from what was
found:

- a twofold axis either passes through an atom, or through the midpoint of
  two like atoms it swaps, or is the normal of a planar molecule (then a
  principal axis of inertia);
- a mirror's normal is the difference of two like atoms it swaps, or the
  normal of a planar molecule;
- an axis of order three or more is unique unless the group is cubic, and a
  unique one is a principal axis of inertia; the cubic groups are told apart
  by their count of twofold axes (T 3, O 9, I 15), a C3 along a diagonal of
  three perpendicular twofold axes and their mirrors and inversion.

Two further checks keep a loose tolerance from granting too much: a
rotation by a small angle moves atoms near the axis by less than the
tolerance, so a Cn also needs every atom off the axis to go round a cycle of
n like atoms; and an axis of order three or more needs the two moments of
inertia about axes perpendicular to it to agree.

Coordinates from a force field or from experiment are never exactly
symmetric, so an operation counts when it moves every atom to within
``tolerance`` of a like atom.  The same distance test decides every element,
which is why the group is named here from counts of axes and mirrors with
loose angle comparisons, rather than by ``symmetry.schoenflies`` (which
compares exact matrices at 1e-6).
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from .. import elements
from .symmetry import INVERSION, reflection, rotation

# 0.3 Å: well under half of the shortest bond (X-H, about 1 Å), so the nearest
# like atom is the only candidate image, and well over the few hundredths of an
# ångström by which a force-field minimum or a measured structure misses exact
# symmetry (a methyl group a few degrees off staggered moves its H by ~0.1 Å).
TOLERANCE = 0.3
HIGHEST_AXIS_ORDER = 12  # C12 is far beyond any molecule a note names
_SAME_DIRECTION = math.cos(math.radians(6.0))  # axes closer than this are one axis (D12 axes are 15° apart)
_PERPENDICULAR = math.sin(math.radians(6.0))
_BATCH_ENTRIES = 200_000  # atom pairs compared per numpy step when many operations are tested at once
_PROFILE_STRIDE = 1e4  # Å; sets the distances to each element apart when they are sorted together
# Moments of inertia within this relative spread count as equal.  An axis of order three or more makes the
# two moments about perpendicular axes equal, and a cubic group all three; the test is loose because the
# distance test decides, and it only keeps a C4 out of a rectangle whose sides differ by less than the tolerance.
DEGENERATE_MOMENTS = 0.15

Points = Sequence[Sequence[float]]


def point_group(symbols: Sequence[str], coordinates: Points, tolerance: float = TOLERANCE) -> str:
    """The Schoenflies symbol ("C2v", "D3d", "C∞v", "Kh" for one atom) of atoms at these coordinates (Å).

    Raises ValueError when the symbols and coordinates differ in number,
    there are none, a coordinate is not a finite number or the tolerance is
    not positive.
    """
    if len(symbols) != len(coordinates) or not symbols:
        raise ValueError("one coordinate triple per atom, and at least one atom")
    points = np.asarray(coordinates, dtype=float)
    if points.shape != (len(symbols), 3) or not np.all(np.isfinite(points)):
        raise ValueError("coordinates must be finite (x, y, z) triples")
    if not tolerance > 0:
        raise ValueError("the tolerance must be a positive distance")
    return _Finder(symbols, points, tolerance).name()


class _Finder:
    def __init__(self, symbols: Sequence[str], points: np.ndarray, tolerance: float) -> None:
        weights = np.array([_weight(symbol) for symbol in symbols])
        self.points = points - weights @ points / weights.sum()
        self.tolerance = tolerance
        kinds: dict[str, int] = {}
        self.kinds = np.array([kinds.setdefault(symbol, len(kinds)) for symbol in symbols])
        self.unlike = self.kinds[:, None] != self.kinds[None, :]
        self.radii = np.linalg.norm(self.points, axis=1)
        self._pairs: tuple[np.ndarray, np.ndarray] | None = None
        lengths = self.radii**2
        self.barrier = np.where(self.unlike, np.inf, lengths[:, None] + lengths[None, :])
        centred = self.points
        inertia = np.sum(weights * self.radii**2) * np.eye(3) - (weights[:, None] * centred).T @ centred
        moments, axes = np.linalg.eigh(inertia)
        self.principal = axes.T  # rows are unit axes
        # every cubic group makes the inertia isotropic; a loose test, the operations decide
        self.moments = moments
        self.spherical = _equal_moments(moments[0], moments[2])

    # --- testing one operation -------------------------------------------------

    def permutation(self, matrix: np.ndarray) -> np.ndarray | None:
        """``p`` with ``matrix`` moving atom i to within the tolerance of the like atom p[i]; None if there is none."""
        moved = self.points @ matrix.T
        distances = np.linalg.norm(moved[:, None, :] - self.points[None, :, :], axis=2)
        distances[self.unlike] = np.inf
        nearest = np.argmin(distances, axis=1)
        if distances[np.arange(len(nearest)), nearest].max() > self.tolerance:
            return None
        return nearest if len(np.unique(nearest)) == len(nearest) else None

    def maps(self, matrix: np.ndarray) -> bool:
        """True when ``matrix`` moves every atom onto a distinct like atom within the tolerance."""
        return self.permutation(matrix) is not None

    def maps_each(self, matrices: np.ndarray) -> np.ndarray:
        """``maps`` for a stack of matrices at once (in slices that keep the distance arrays small)."""
        count = len(self.points)
        step = max(1, _BATCH_ENTRIES // (count * count))
        found = []
        for start in range(0, len(matrices), step):
            moved = np.einsum("kij,nj->kni", matrices[start:start + step], self.points)
            # |m - p|^2 = |p|^2 + |p'|^2 - 2 m.p (every operation here keeps lengths)
            squared = self.barrier - 2.0 * (moved @ self.points.T)
            nearest = np.argmin(squared, axis=2)
            close = np.take_along_axis(squared, nearest[:, :, None], axis=2)[:, :, 0].max(axis=1) <= self.tolerance**2
            distinct = np.all(np.diff(np.sort(nearest, axis=1), axis=1) > 0, axis=1)
            found.append(close & distinct)
        return np.concatenate(found) if found else np.zeros(0, dtype=bool)

    def rotation_order(self, axis: np.ndarray, highest: int = HIGHEST_AXIS_ORDER) -> int:
        """The highest n with a proper Cn about ``axis`` (1 when there is none).

        A rotation by a small angle moves an atom near the axis by less than
        the tolerance, so "within the tolerance" alone would grant a C12 to
        water.  A true Cn sends every atom off the axis round a cycle of n
        atoms, and that is required too.
        """
        off_axis = np.linalg.norm(self.points - np.outer(self.points @ axis, axis), axis=1) > self.tolerance / 2
        # the off-axis atoms of each element fall into cycles of n, so n divides their count
        common = math.gcd(*(int(n) for n in np.bincount(self.kinds[off_axis]))) if off_axis.any() else 0
        if np.any(off_axis & self.lonely):
            return 1
        for order in range(highest, 1, -1):
            if common % order:
                continue
            permutation = self.permutation(rotation(axis, 2 * math.pi / order))
            if permutation is not None and _cycles_of_length(permutation, order, off_axis):
                return order
        return 1

    # --- candidates ------------------------------------------------------------

    def _like_pairs(self) -> tuple[np.ndarray, np.ndarray]:
        """Index pairs of like atoms at the same distance from the centre: the only pairs an operation can swap."""
        if self._pairs is None:
            first, second = np.triu_indices(len(self.points), k=1)
            keep = ~self.unlike[first, second] & (np.abs(self.radii[first] - self.radii[second]) <= self.tolerance)
            first, second = first[keep], second[keep]
            # two atoms an operation swaps see the same distances to the atoms of each element, each
            # within twice the tolerance; comparing the sorted lists keeps that bound
            if len(first):
                separations = np.linalg.norm(self.points[:, None, :] - self.points[None, :, :], axis=2)
                profiles = np.sort(separations + _PROFILE_STRIDE * self.kinds[None, :], axis=1)
                alike = np.abs(profiles[first] - profiles[second]).max(axis=1) <= 2 * self.tolerance
                first, second = first[alike], second[alike]
            self._pairs = (first, second)
        return self._pairs

    def _directions(self, vectors: np.ndarray) -> list[np.ndarray]:
        """Unit directions of the vectors long enough to point somewhere, one per direction."""
        lengths = np.linalg.norm(vectors, axis=1)
        units = vectors[lengths > self.tolerance / 2] / lengths[lengths > self.tolerance / 2][:, None]
        return _distinct(list(units))

    @property
    def lonely(self) -> np.ndarray:
        """True for each atom that no operation can move (no like atom alike enough to swap with)."""
        first, second = self._like_pairs()
        partnered = np.zeros(len(self.points), dtype=bool)
        partnered[first] = partnered[second] = True
        return ~partnered

    def twofold_candidates(self) -> list[np.ndarray]:
        first, second = self._like_pairs()
        midpoints = (self.points[first] + self.points[second]) / 2
        return self._directions(np.vstack([self.principal * 10.0, self.points, midpoints]))

    def mirror_candidates(self) -> list[np.ndarray]:
        first, second = self._like_pairs()
        return self._directions(np.vstack([self.principal * 10.0, self.points[first] - self.points[second]]))

    # --- naming ----------------------------------------------------------------

    def name(self) -> str:
        if len(self.points) == 1:
            return "Kh"
        if self._linear():
            return "D∞h" if self.maps(INVERSION) else "C∞v"
        twofold = self._passing(self.twofold_candidates(), 1.0)
        mirrors = self._passing(self.mirror_candidates(), -1.0)
        inversion = self.maps(INVERSION)

        cubic = self._cubic(twofold, mirrors, inversion)
        if cubic:
            return cubic

        principal, order = None, 1
        for index, axis in enumerate(self.principal):
            others = [self.moments[k] for k in range(3) if k != index]
            found = self.rotation_order(axis, HIGHEST_AXIS_ORDER if _equal_moments(*others) else 2)
            if found > order:
                principal, order = axis, found
        if principal is None and twofold:
            principal, order = twofold[0], 2
        if principal is None:
            if mirrors:
                return "Cs"
            return "Ci" if inversion else "C1"

        perpendicular = [a for a in twofold if abs(float(a @ principal)) < _PERPENDICULAR]
        horizontal = any(abs(float(n @ principal)) > _SAME_DIRECTION for n in mirrors)
        vertical = any(abs(float(n @ principal)) < _PERPENDICULAR for n in mirrors)
        if order == 2 and len(twofold) >= 3:
            if inversion:
                return "D2h"
            return "D2d" if mirrors else "D2"
        if perpendicular:
            # a vertical mirror through a perpendicular C2 makes the horizontal one (their product),
            # which noise may have hidden from the distance test; one between the C2 axes is dihedral
            through_twofold = any(abs(float(n @ a)) < _PERPENDICULAR for n in mirrors for a in perpendicular)
            if horizontal or through_twofold:
                return f"D{order}h"
            return f"D{order}d" if vertical else f"D{order}"
        if horizontal:
            return f"C{order}h"
        if vertical:
            return f"C{order}v"
        if self.maps(reflection(principal) @ rotation(principal, math.pi / order)):
            return f"S{2 * order}"
        return f"C{order}"

    def _passing(self, directions: list[np.ndarray], sign: float) -> list[np.ndarray]:
        """The directions whose C2 (``sign`` 1) or mirror normal (``sign`` -1) is a symmetry operation."""
        if not directions:
            return []
        units = np.array(directions)
        # an atom with no like partner is fixed by every operation: on the axis, or in the plane
        lonely = self.points[self.lonely]
        along = np.abs(lonely @ units.T)  # (lonely atoms, directions)
        if sign > 0:
            away = np.sqrt(np.maximum(np.sum(lonely**2, axis=1)[:, None] - along**2, 0.0))
        else:
            away = along
        possible = np.all(away <= self.tolerance, axis=0)
        units = units[possible]
        directions = [d for d, ok in zip(directions, possible) if ok]
        if not directions:
            return []
        # C2 about u is 2uu' - 1; the mirror with normal u is its negative
        matrices = sign * (2.0 * units[:, :, None] * units[:, None, :] - np.eye(3))
        passed = self.maps_each(matrices)
        return [direction for direction, ok in zip(directions, passed) if ok]

    def _linear(self) -> bool:
        _, _, rows = np.linalg.svd(self.points)
        line = rows[0]
        off_line = self.points - np.outer(self.points @ line, line)
        # an infinite axis includes its C2, which brings an atom off the line by d back 2d from where it was
        return bool(np.linalg.norm(off_line, axis=1).max() <= self.tolerance / 2)

    def _cubic(self, twofold: list[np.ndarray], mirrors: list[np.ndarray], inversion: bool) -> str | None:
        if not self.spherical:
            return None
        if len(twofold) >= 15:
            return "Ih" if inversion else "I"
        frame = _perpendicular_triple(twofold)
        if frame is None:
            return None
        if len(twofold) >= 9 and any(self.maps(rotation(axis, math.pi / 2)) for axis in frame):
            return "Oh" if inversion else "O"
        diagonal = frame[0] + frame[1] + frame[2]
        if not self.maps(rotation(diagonal, 2 * math.pi / 3)):
            return None
        if inversion:
            return "Th"
        return "Td" if mirrors else "T"


def _equal_moments(first: float, second: float) -> bool:
    return abs(first - second) <= DEGENERATE_MOMENTS * max(abs(first), abs(second), 1e-9)


def _weight(symbol: str) -> float:
    # Any weight that depends on the element alone puts the centre on every symmetry element.
    try:
        return float(elements.element(symbol).number)
    except (KeyError, ValueError):
        return 1.0


def _cycles_of_length(permutation: np.ndarray, length: int, which: np.ndarray) -> bool:
    """True when each atom in ``which`` returns to itself after exactly ``length`` steps and no sooner."""
    image = np.arange(len(permutation))
    for step in range(1, length + 1):
        image = permutation[image]
        back = image == np.arange(len(permutation))
        if step < length and np.any(back & which):
            return False
    return bool(np.all(back[which]))


def _distinct(directions: list[np.ndarray]) -> list[np.ndarray]:
    """One direction per group of directions within a few degrees of each other (or opposite).

    Each group is led by its first member and reported as the sign-aligned
    mean of its members, which carries less noise than any one of them.  The
    groups are found at once rather than one by one: axes of a point group
    are at least 15° apart, so the few-degree groups never chain.
    """
    if not directions:
        return []
    stacked = np.array(directions)
    dots = stacked @ stacked.T
    leader = np.argmax(np.abs(dots) >= _SAME_DIRECTION, axis=1)  # the first direction close to each
    leader = leader[leader]  # a member whose first neighbour is itself led elsewhere joins that leader
    signs = np.sign(dots[np.arange(len(stacked)), leader])
    signs[signs == 0] = 1.0
    sums = np.zeros_like(stacked)
    np.add.at(sums, leader, stacked * signs[:, None])
    kept = np.unique(leader)
    means = sums[kept]
    return list(means / np.linalg.norm(means, axis=1)[:, None])


def _perpendicular_triple(axes: list[np.ndarray]) -> tuple[np.ndarray, np.ndarray, np.ndarray] | None:
    for i, a in enumerate(axes):
        for j in range(i + 1, len(axes)):
            b = axes[j]
            if abs(float(a @ b)) >= _PERPENDICULAR:
                continue
            for c in axes[j + 1:]:
                if abs(float(a @ c)) < _PERPENDICULAR and abs(float(b @ c)) < _PERPENDICULAR:
                    return a, b, c
    return None
