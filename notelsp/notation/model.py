"""The notation as data: small frozen dataclasses made from the parse tree.

Every offset is a code-point offset into the whole document text
(``text[span.start:span.end]`` is what the writer typed), so the layers above
never re-read the text to find where something was.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal


@dataclass(frozen=True, slots=True)
class Span:
    """Half-open range ``[start, end)`` of code-point offsets into the document."""

    start: int
    end: int

    def shifted(self, delta: int) -> "Span":
        return Span(self.start + delta, self.end + delta)

    def __contains__(self, offset: object) -> bool:
        return isinstance(offset, int) and self.start <= offset <= self.end


# --- formulas -----------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class Atom:
    """One element symbol with its count, e.g. ``F3`` in ``ClF3``."""

    symbol: str
    count: int
    span: Span


@dataclass(frozen=True, slots=True)
class Group:
    """A parenthesised group with its count, e.g. ``(OH)2``; it attaches by its first atom."""

    parts: tuple["Atom | Group", ...]
    count: int
    span: Span


Part = Atom | Group


@dataclass(frozen=True, slots=True)
class Formula:
    """One species as written: ``SO4^2-``, ``[ICl4]-``, ``HOCl @O``."""

    text: str  # exactly as written (without the explicit-centre suffix)
    parts: tuple[Part, ...]
    charge: int
    span: Span
    centre: str | None = None  # explicit centre from ``@X``
    bracketed: bool = False

    def composition(self) -> dict[str, int]:
        """Element symbol -> total count, in order of first appearance."""
        counts: dict[str, int] = {}

        def add(parts: tuple[Part, ...], times: int) -> None:
            for part in parts:
                if isinstance(part, Atom):
                    counts[part.symbol] = counts.get(part.symbol, 0) + part.count * times
                else:
                    add(part.parts, part.count * times)

        add(self.parts, 1)
        return counts


# --- claims -------------------------------------------------------------------
# One class per kind of claim.  ``text`` is the claim as written, ``span`` its
# range; fixes replace exactly that span.


@dataclass(frozen=True, slots=True)
class Claim:
    text: str
    span: Span


@dataclass(frozen=True, slots=True)
class ShapeClaim(Claim):
    shape: str  # lowercase hyphenated VSEPR name: "t-shaped", "trigonal-pyramidal"


@dataclass(frozen=True, slots=True)
class ElectronGeometryClaim(Claim):
    geometry: str  # "tetrahedral", "trigonal-bipyramidal", ...


@dataclass(frozen=True, slots=True)
class HybridizationClaim(Claim):
    label: str | None  # "sp", "sp2", "sp3", "sp3d", "sp3d2", "sp3d3", "unhybridized"
    index: float | None = None  # fractional "sp^2.4" -> 2.4 (label None)


Site = Literal["axial", "equatorial", "apical", "basal", "cis", "trans", "fac", "mer"]


@dataclass(frozen=True, slots=True)
class PlacementClaim(Claim):
    subject: str  # element symbol, or "lone-pair"
    site: Site
    quantity: Literal["all", "one", "some"] | int = "all"  # "one F axial" -> "one"


@dataclass(frozen=True, slots=True)
class PolarityClaim(Claim):
    polar: bool


@dataclass(frozen=True, slots=True)
class AngleClaim(Claim):
    low: float  # degrees; a single value has low == high
    high: float
    atoms: tuple[str, str, str] | None = None  # ("H", "N", "H") for "H-N-H 107°"
    approximate: bool = False  # "~90°"


@dataclass(frozen=True, slots=True)
class AngleOrderClaim(Claim):
    left: tuple[str, str, str]
    relation: Literal["<", ">", "="]
    right: tuple[str, str, str]
    left_span: Span | None = None
    right_span: Span | None = None


@dataclass(frozen=True, slots=True)
class IndexClaim(Claim):
    value: float  # Coulson hybridization index i in sp^i


@dataclass(frozen=True, slots=True)
class SCharacterClaim(Claim):
    percent: float
    ligand: str | None = None  # "s-character 25% in C-F"


@dataclass(frozen=True, slots=True)
class LonePairClaim(Claim):
    count: int


@dataclass(frozen=True, slots=True)
class BondLengthClaim(Claim):
    bond: tuple[str, str]  # ("C", "C")
    relation: Literal["shorter", "longer", "equal"]  # first species relative to the second


@dataclass(frozen=True, slots=True)
class PointGroupClaim(Claim):
    symbol: str  # Schoenflies, normalised: "C2v", "D3h", "Td", "Cinfv"


@dataclass(frozen=True, slots=True)
class IsomerCountClaim(Claim):
    count: int


# --- annotations and notation errors ------------------------------------------


@dataclass(frozen=True, slots=True)
class NotationError:
    """A problem inside an annotation, with the exact range it concerns."""

    code: str  # kebab-case rule code, e.g. "unknown-claim", "unknown-element"
    message: str
    span: Span
    suggestion: str | None = None  # replacement text for ``span`` when one is obvious


@dataclass(frozen=True, slots=True)
class Annotation:
    """One annotated species: an inline ``{...}`` group or one line of a ``bonding`` block."""

    span: Span  # the whole group, braces included (block: the whole line)
    body: Span  # the text between the braces (block: the line without comment)
    formulas: tuple[Formula, ...]  # one, or two for "A vs B"
    claims: tuple[Claim, ...]
    errors: tuple[NotationError, ...] = ()
    form: Literal["inline", "block"] = "inline"

    @property
    def formula(self) -> Formula | None:
        return self.formulas[0] if self.formulas else None

    @property
    def is_comparison(self) -> bool:
        return len(self.formulas) == 2


@dataclass(frozen=True, slots=True)
class ScannedDocument:
    """Everything the scanner found in one document."""

    annotations: tuple[Annotation, ...]
    errors: tuple[NotationError, ...] = field(default=())  # errors outside any annotation
