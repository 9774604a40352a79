"""Words an editor can offer inside an annotation, and where the cursor is.

The words themselves come from the grammar (``notelsp.notation.claim_vocabulary``
reads them off its terminals): the shapes the VSEPR model predicts, in the order
of their steric number, the textbook hybridization labels and the placement
sites; the one spelling offered for "no hybrid" and for each polarity is chosen
here.  Each is sorted into shapes and other claims by parsing it with the
grammar, so completion never offers a word the parser would reject.  Only the
one-line descriptions live here (standard VSEPR geometry, from memory).
Element symbols come from ``notelsp.elements``.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cache
from typing import Literal

from .. import elements
from ..chem.vsepr import SHAPES
from ..notation.claim_vocabulary import HYBRID_LABELS, shape_names, site_words
from ..notation.model import ShapeClaim
from ..notation.transform import parse_claim

DETAILS: dict[str, str] = {
    "linear": "two domains (or 2 bonds + 3 lone pairs) in a line, 180°",
    "bent": "two bonds with one or two lone pairs, angle below 120° or 109.5°",
    "trigonal planar": "three bonds in a plane at 120°, no lone pair",
    "trigonal pyramidal": "three bonds and one lone pair, a flattened tetrahedron",
    "T-shaped": "three bonds and two equatorial lone pairs, near 90°",
    "tetrahedral": "four bonds at 109.5°, no lone pair",
    "seesaw": "four bonds and one equatorial lone pair in a trigonal bipyramid",
    "square planar": "four bonds in a plane at 90°, two trans lone pairs",
    "trigonal bipyramidal": "five bonds: three equatorial at 120°, two axial",
    "square pyramidal": "five bonds and one lone pair in an octahedron",
    "octahedral": "six bonds at 90°",
    "pentagonal bipyramidal": "seven bonds: five equatorial at 72°, two axial",
    "pentagonal planar": "five bonds in a plane at 72°, two axial lone pairs",
    "pentagonal pyramidal": "six bonds (five in a plane, one axial) and one axial lone pair",
    "sp": "hybridization label: two sp hybrids",
    "sp2": "hybridization label: three sp2 hybrids",
    "sp3": "hybridization label: four sp3 hybrids",
    "sp3d": "hybridization label for five electron domains",
    "sp3d2": "hybridization label for six electron domains",
    "sp3d3": "hybridization label for seven electron domains",
    "unhybridized": "bonds from nearly pure p orbitals (Drago's rule)",
    "polar": "the species has a dipole moment",
    "nonpolar": "the bond dipoles cancel",
    "axial": "placement: along the axis of a bipyramid (after a symbol: 'F axial')",
    "equatorial": "placement: in the equatorial plane (after a symbol: 'F equatorial')",
    "apical": "placement: the apex of a square pyramid",
    "basal": "placement: the base of a square pyramid",
    "cis": "placement: neighbouring positions",
    "trans": "placement: opposite positions",
    "fac": "placement: three ligands on one face of an octahedron",
    "mer": "placement: three ligands on a meridian of an octahedron",
}
NO_DETAIL = "a claim word of the notation"
# The spelling offered where the grammar reads several (unhybridised, no hybridization, pure p; apolar, ...).
OFFERED_SPELLINGS = ("unhybridized", "polar", "nonpolar")


def _shown(shape: str) -> str:
    """A canonical shape name as written in prose: 'trigonal planar', 'T-shaped' (a letter's shape)."""
    first, *rest = shape.split("-")
    return f"{first.upper()}-{' '.join(rest)}" if len(first) == 1 else " ".join([first, *rest])


@cache
def claim_phrases() -> tuple[str, ...]:
    """Whole claims as commonly written, the words completion offers."""
    predicted = sorted(SHAPES, key=lambda key: (key[0], key[1]))  # (steric number, bonded atoms)
    order = {shape: index for index, shape in reversed(list(enumerate(SHAPES[key] for key in predicted)))}
    shapes = sorted((name for name in shape_names() if name in order), key=order.__getitem__)
    return (*map(_shown, shapes), *HYBRID_LABELS, *OFFERED_SPELLINGS, *site_words())


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


def word_start(text: str, offset: int, place: CursorPlace) -> int:
    """Where the text a completion replaces begins: the whole claim typed so far
    (claim words can be several words, "trigonal pl|"), or the element symbol."""
    start = offset
    if place == "claim":
        while start > 0 and text[start - 1] not in "{:,;\n\r":
            start -= 1
        while start < offset and text[start] in " \t":
            start += 1
        return start
    # an element symbol is a capital and at most one small letter: "ClF|" replaces "F"
    if offset >= 1 and text[offset - 1].isupper():
        return offset - 1
    if offset >= 2 and text[offset - 2].isupper() and text[offset - 1].islower():
        return offset - 2
    return offset


def _is_shape(phrase: str) -> bool:
    claim, _ = parse_claim(phrase)
    return isinstance(claim, ShapeClaim)


@cache
def claim_words() -> tuple[Word, ...]:
    """The notation's claim phrases, shapes first (parsed once per process)."""
    words = [Word(p, DETAILS.get(p, NO_DETAIL), "shape" if _is_shape(p) else "claim") for p in claim_phrases()]
    return tuple(sorted(words, key=lambda w: w.kind != "shape"))


def words_for(place: CursorPlace) -> tuple[Word, ...]:
    if place == "formula":
        return tuple(Word(e.symbol, e.name, "element") for e in sorted(elements.table().values(), key=lambda e: e.number))
    return claim_words()
