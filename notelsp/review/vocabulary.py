"""Words an editor can offer inside an annotation, and where the cursor is.

The shape descriptions are standard VSEPR geometry (from memory); the other
claim words follow the README's notation section.  Element symbols come
from ``notelsp.elements``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

from .. import elements

SHAPES: tuple[tuple[str, str], ...] = (
    ("linear", "two domains (or 2 bonds + 3 lone pairs) in a line, 180°"),
    ("bent", "two bonds with one or two lone pairs, angle below 120° or 109.5°"),
    ("trigonal planar", "three bonds in a plane at 120°, no lone pair"),
    ("trigonal pyramidal", "three bonds and one lone pair, a flattened tetrahedron"),
    ("t-shaped", "three bonds and two equatorial lone pairs, near 90°"),
    ("tetrahedral", "four bonds at 109.5°, no lone pair"),
    ("see-saw", "four bonds and one equatorial lone pair in a trigonal bipyramid"),
    ("square planar", "four bonds in a plane at 90°, two trans lone pairs"),
    ("trigonal bipyramidal", "five bonds: three equatorial at 120°, two axial"),
    ("square pyramidal", "five bonds and one lone pair in an octahedron"),
    ("octahedral", "six bonds at 90°"),
    ("pentagonal bipyramidal", "seven bonds: five equatorial at 72°, two axial"),
)

CLAIM_WORDS: tuple[tuple[str, str], ...] = (
    ("sp", "hybridization label: two sp hybrids"),
    ("sp2", "hybridization label: three sp2 hybrids"),
    ("sp3", "hybridization label: four sp3 hybrids"),
    ("sp3d", "hybridization label for five electron domains"),
    ("sp3d2", "hybridization label for six electron domains"),
    ("unhybridized", "bonds from nearly pure p orbitals (Drago's rule)"),
    ("polar", "the species has a dipole moment"),
    ("nonpolar", "the bond dipoles cancel"),
    ("axial", "placement: along the axis of a trigonal bipyramid"),
    ("equatorial", "placement: in the equatorial plane"),
    ("cis", "placement: neighbouring positions"),
    ("trans", "placement: opposite positions"),
    ("lone pairs", "placement or count of lone pairs"),
)


@dataclass(frozen=True, slots=True)
class Word:
    label: str
    detail: str
    kind: Literal["element", "shape", "claim"]


CursorPlace = Literal["formula", "claim"]


def place_in_annotation(text: str, offset: int) -> CursorPlace | None:
    """Whether the cursor is in an unfinished ``{`` group's formula, its claims, or outside one."""
    line_start = max(text.rfind("\n", 0, offset), text.rfind("\r", 0, offset)) + 1
    before = text[line_start:offset]
    opened = before.rfind("{")
    if opened < 0 or "}" in before[opened:]:
        return None
    return "claim" if ":" in before[opened:] else "formula"


def words_for(place: CursorPlace) -> tuple[Word, ...]:
    if place == "formula":
        return tuple(Word(e.symbol, e.name, "element") for e in sorted(elements.table().values(), key=lambda e: e.number))
    return tuple(Word(n, d, "shape") for n, d in SHAPES) + tuple(Word(n, d, "claim") for n, d in CLAIM_WORDS)
