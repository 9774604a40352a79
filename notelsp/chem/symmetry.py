"""Point-group operations as 3x3 matrices: building groups by closure, and
naming a finite group by its Schoenflies symbol from its own elements.

Nothing here knows about molecules; the polyhedra supply the generators and
the isomer enumerator the label-preserving subgroups.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence

import numpy as np

TOLERANCE = 1e-6
GROUP_SIZE_LIMIT = 240  # larger than any finite point group a polyhedron here needs (Oh = 48)

IDENTITY = np.eye(3)
INVERSION = -np.eye(3)


def unit(vector: Sequence[float]) -> np.ndarray:
    array = np.asarray(vector, dtype=float)
    return array / np.linalg.norm(array)


def rotation(axis: Sequence[float], angle: float) -> np.ndarray:
    """Proper rotation by ``angle`` radians about ``axis`` (Rodrigues' formula)."""
    x, y, z = unit(axis)
    c, s = math.cos(angle), math.sin(angle)
    t = 1.0 - c
    return np.array(
        [
            [c + x * x * t, x * y * t - z * s, x * z * t + y * s],
            [y * x * t + z * s, c + y * y * t, y * z * t - x * s],
            [z * x * t - y * s, z * y * t + x * s, c + z * z * t],
        ]
    )


def reflection(normal: Sequence[float]) -> np.ndarray:
    """Mirror in the plane through the origin with this normal."""
    n = unit(normal)
    return IDENTITY - 2.0 * np.outer(n, n)


def _key(matrix: np.ndarray) -> tuple[int, ...]:
    return tuple(int(v) for v in np.round(matrix * 1e5).ravel())


def close_group(generators: Iterable[np.ndarray]) -> tuple[np.ndarray, ...]:
    """Every product of the generators: the finite group they generate.

    Raises ValueError if the closure grows past GROUP_SIZE_LIMIT (the
    generators then do not describe a finite point group).
    """
    generators = [np.asarray(g, dtype=float) for g in generators]
    elements = {_key(IDENTITY): IDENTITY}
    frontier = [IDENTITY]
    while frontier:
        grown = []
        for element in frontier:
            for generator in generators:
                product = generator @ element
                key = _key(product)
                if key not in elements:
                    elements[key] = product
                    grown.append(product)
                    if len(elements) > GROUP_SIZE_LIMIT:
                        raise ValueError("generators do not close into a finite point group")
        frontier = grown
    return tuple(elements[k] for k in sorted(elements))


def site_permutation(matrix: np.ndarray, vectors: np.ndarray) -> tuple[int, ...] | None:
    """``p`` with ``matrix @ vectors[i] == vectors[p[i]]``; None if the sites are not mapped onto themselves."""
    moved = vectors @ matrix.T
    permutation = []
    for image in moved:
        distances = np.linalg.norm(vectors - image, axis=1)
        target = int(np.argmin(distances))
        if distances[target] > 1e-4:
            return None
        permutation.append(target)
    return tuple(permutation)


# --- naming -----------------------------------------------------------------


def _is_proper(matrix: np.ndarray) -> bool:
    return np.linalg.det(matrix) > 0


def _is_identity(matrix: np.ndarray) -> bool:
    return bool(np.allclose(matrix, IDENTITY, atol=TOLERANCE))


def _is_mirror(matrix: np.ndarray) -> bool:
    # a reflection has eigenvalues (-1, 1, 1): improper with trace 1
    return not _is_proper(matrix) and abs(np.trace(matrix) - 1.0) < 1e-5


def _element_order(matrix: np.ndarray) -> int:
    power = matrix
    for order in range(1, 121):
        if _is_identity(power):
            return order
        power = matrix @ power
    raise ValueError("operation of infinite order")


def _rotation_axis(matrix: np.ndarray) -> np.ndarray:
    values, vectors = np.linalg.eig(matrix)
    axis = np.real(vectors[:, int(np.argmin(np.abs(values - 1.0)))])
    axis = axis / np.linalg.norm(axis)
    # a canonical sign so that the same axis compares equal
    for component in axis:
        if abs(component) > 1e-6:
            return axis if component > 0 else -axis
    return axis


def _mirror_normal(matrix: np.ndarray) -> np.ndarray:
    return _rotation_axis(-matrix)


def _axes(operations: Sequence[np.ndarray]) -> list[tuple[np.ndarray, int]]:
    """Distinct proper rotation axes, each with its highest order."""
    axes: list[tuple[np.ndarray, int]] = []
    for matrix in operations:
        if not _is_proper(matrix) or _is_identity(matrix):
            continue
        axis, order = _rotation_axis(matrix), _element_order(matrix)
        for index, (known, known_order) in enumerate(axes):
            if abs(abs(float(known @ axis)) - 1.0) < 1e-6:
                axes[index] = (known, max(known_order, order))
                break
        else:
            axes.append((axis, order))
    return axes


def schoenflies(operations: Sequence[np.ndarray]) -> str:
    """The Schoenflies symbol of a finite point group given by all its elements."""
    operations = list(operations)
    improper = [m for m in operations if not _is_proper(m)]
    mirrors = [_mirror_normal(m) for m in improper if _is_mirror(m)]
    has_inversion = any(np.allclose(m, INVERSION, atol=TOLERANCE) for m in improper)
    axes = _axes(operations)

    if not axes:
        if mirrors:
            return "Cs"
        return "Ci" if has_inversion else "C1"

    high = [(a, n) for a, n in axes if n >= 3]
    if len(high) > 1:  # several axes of order >= 3: a cubic group
        top = max(n for _, n in high)
        if top == 5:
            return "Ih" if improper else "I"
        if top == 4:
            return "Oh" if improper else "O"
        if not improper:
            return "T"
        return "Th" if has_inversion else "Td"

    principal, n = max(axes, key=lambda item: item[1])
    if n == 2:
        # D2-type groups: prefer an axis that carries a perpendicular mirror
        for axis, _ in axes:
            if any(abs(abs(float(axis @ normal)) - 1.0) < 1e-6 for normal in mirrors):
                principal = axis
                break
    perpendicular_twofold = [a for a, order in axes if order >= 2 and abs(float(a @ principal)) < 1e-6]
    horizontal_mirror = any(abs(abs(float(principal @ normal)) - 1.0) < 1e-6 for normal in mirrors)
    vertical_mirror = any(abs(float(principal @ normal)) < 1e-6 for normal in mirrors)

    if perpendicular_twofold:
        if not improper:
            return f"D{n}"
        return f"D{n}h" if horizontal_mirror else f"D{n}d"
    if not improper:
        return f"C{n}"
    if horizontal_mirror:
        return f"C{n}h"
    if vertical_mirror:
        return f"C{n}v"
    return f"S{2 * n}"


def normalised_symbol(symbol: str) -> str:
    """A Schoenflies symbol in a comparable form: "C∞v", "C*v", "Cinfv" -> "Cinfv"; "c2V" -> "C2v"."""
    text = symbol.strip().replace("∞", "inf").replace("*", "inf")
    if not text:
        return text
    return text[0].upper() + text[1:].lower()
