"""The notation as data: small frozen dataclasses made from the parse tree.

Every offset is a code-point offset into the whole document text
(``text[span.start:span.end]`` is what the writer typed), so the layers above
never re-read the text to find where something was.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from functools import cache, cached_property
from typing import Any, Literal


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


@dataclass(frozen=True, slots=True)
class BondMark:
    """An explicit bond written between two atoms of a formula: ``=`` in CH2=CH2, ``≡`` or ``#`` in HC≡CH."""

    order: int  # 2 or 3 (a written single bond, "-", is 1)
    span: Span


Part = Atom | Group | BondMark


@dataclass(frozen=True, slots=True)
class Formula:
    """One species as written: ``SO4^2-``, ``[ICl4]-``, ``HOCl @O``."""

    text: str  # exactly as written (without the explicit-centre suffix)
    parts: tuple[Part, ...]
    charge: int
    span: Span
    centre: str | None = None  # explicit centre from ``@X``
    bracketed: bool = False
    smiles: str | None = None  # set when the species was given as SMILES (then ``parts`` is empty)

    @property
    def written(self) -> str:
        """The notation that reads back as this species: the text, with the SMILES marker or the named
        centre it was written with (``smiles "CO"`` is methanol, ``CO`` carbon monoxide).  What a
        species is computed as, and the key of its computed result."""
        if self.smiles is not None:
            return f'smiles "{self.smiles}"'
        return self.text if self.centre is None else f"{self.text} @{self.centre}"

    def composition(self) -> dict[str, int]:
        """Element symbol -> total count, in order of first appearance."""
        counts: dict[str, int] = {}

        def add(parts: tuple[Part, ...], times: int) -> None:
            for part in parts:
                if isinstance(part, Atom):
                    counts[part.symbol] = counts.get(part.symbol, 0) + part.count * times
                elif isinstance(part, Group):
                    add(part.parts, part.count * times)

        add(self.parts, 1)
        return counts


# --- claims -------------------------------------------------------------------
# One class per kind of claim.  ``text`` is the claim as written, ``span`` its
# range; fixes replace exactly that span.


@dataclass(frozen=True, slots=True)
class Claim:
    """What an annotation claims about its species (each kind a subclass), with its text and range."""

    text: str
    span: Span
    # The one atom the claim is about, named before it: "C2" in "C2 trigonal planar" (then
    # ``text``/``span`` cover "trigonal planar" only, so a fix keeps the name). None: the species'
    # centre, as in every claim without a name. A name is an element symbol, or the element with
    # its place among that element's atoms as written (C1, C2, O1); the chemistry resolves it.
    atom: str | None = field(default=None, kw_only=True)
    atom_span: Span | None = field(default=None, kw_only=True)


@dataclass(frozen=True, slots=True)
class ShapeClaim(Claim):
    """The molecular shape: ``T-shaped``, ``trigonal pyramidal``."""

    shape: str  # lowercase hyphenated VSEPR name: "t-shaped", "trigonal-pyramidal"


@dataclass(frozen=True, slots=True)
class ElectronGeometryClaim(Claim):
    """The arrangement of all electron domains: ``tetrahedral electron geometry``."""

    geometry: str  # "tetrahedral", "trigonal-bipyramidal", ...


@dataclass(frozen=True, slots=True)
class HybridizationClaim(Claim):
    """The centre's hybridization: ``sp3d``, ``sp^2.4``, ``unhybridized``."""

    label: str | None  # "sp", "sp2", "sp3", "sp3d", "sp3d2", "sp3d3", "unhybridized"
    index: float | None = None  # fractional "sp^2.4" -> 2.4 (label None)


Site = Literal["axial", "equatorial", "apical", "basal", "cis", "trans", "fac", "mer"]


@dataclass(frozen=True, slots=True)
class PlacementClaim(Claim):
    """Where ligands or lone pairs sit: ``F axial``, ``lone pairs equatorial``, ``one Cl apical``."""

    subject: str  # element symbol, or "lone-pair"
    site: Site
    quantity: Literal["all", "one", "some"] | int = "all"  # "one F axial" -> "one"


@dataclass(frozen=True, slots=True)
class PolarityClaim(Claim):
    """Polar or not: ``polar``, ``nonpolar``, ``zero dipole``."""

    polar: bool


@dataclass(frozen=True, slots=True)
class AngleClaim(Claim):
    """A bond angle or range: ``90°``, ``~107°``, ``H-N-H 107°``, ``121.9(2)°``."""

    low: float  # degrees; a single value has low == high
    high: float
    # ("H", "N", "H") for "H-N-H 107°"; each is an element symbol, an atom's name ("C1") or a
    # group's formula ("OH" in "H-C-OH"), as written
    atoms: tuple[str, str, str] | None = None
    approximate: bool = False  # "~90°"
    allowance: float = 0.0  # degrees the writer's own uncertainty allows on each side (see Measured)
    orders: tuple[int, int] = (1, 1)  # the two bonds as written: (2, 1) for "O=C-O"


# A measurement's stated uncertainty becomes an allowance on each side of the value: a
# standard uncertainty in parentheses, 121.9(2), counts three times (the crystallographer's
# usual bound for a real difference, common practice, no source); an interval, 117.4 ± 0.2, as stated.
ESD_COVERAGE = 3.0


@dataclass(frozen=True, slots=True)
class BondLengthValueClaim(Claim):
    """A bond length: ``C-F 1.39 Å``, ``bond length 139 pm``."""

    angstrom: float  # the claimed length in ångström (pm and nm converted)
    bond: tuple[str, str] | None = None  # ("C", "F") for "C-F 1.39 Å", ("C1", "C2") for "C1-C2 1.50 Å"; None: "bond length 1.39 Å"
    allowance: float = 0.0  # ångström allowed on each side by the claim's own uncertainty
    approximate: bool = False
    order: int = 1  # as written: 2 for "C=O 1.21 Å"


@dataclass(frozen=True, slots=True)
class CouplingClaim(Claim):
    """A coupling constant: ``1J(C,H) 125 Hz``."""

    bonds: int  # n in nJ: how many bonds apart the coupled nuclei are
    nuclei: tuple[str, str]  # element symbols, as written ("C", "H")
    hertz: float
    allowance: float = 0.0


@dataclass(frozen=True, slots=True)
class UnpairedElectronClaim(Claim):
    """How many unpaired electrons: ``2 unpaired electrons``."""

    count: int


@dataclass(frozen=True, slots=True)
class MagnetismClaim(Claim):
    """``paramagnetic`` or ``diamagnetic``."""

    paramagnetic: bool


@dataclass(frozen=True, slots=True)
class AxeClaim(Claim):
    """The VSEPR class: ``AX3E2``."""

    bonded: int  # X count
    lone_pairs: int  # E count


@dataclass(frozen=True, slots=True)
class AngleOrderClaim(Claim):
    """Two angles compared: ``H-N-H < H-C-H``."""

    left: tuple[str, str, str]
    relation: Literal["<", ">", "="]
    right: tuple[str, str, str]
    left_span: Span | None = None
    right_span: Span | None = None
    left_orders: tuple[int, int] = (1, 1)  # bonds as written, as in AngleClaim.orders
    right_orders: tuple[int, int] = (1, 1)


@dataclass(frozen=True, slots=True)
class IndexClaim(Claim):
    """Coulson's hybridization index: ``index 2.4``."""

    value: float  # Coulson hybridization index i in sp^i


@dataclass(frozen=True, slots=True)
class SCharacterClaim(Claim):
    """The s character of a bond hybrid: ``25% s character``, ``s-character 25% in C-F``."""

    percent: float
    ligand: str | None = None  # "s-character 25% in C-F"


@dataclass(frozen=True, slots=True)
class LonePairClaim(Claim):
    """How many lone pairs the centre has: ``2 lone pairs``."""

    count: int


@dataclass(frozen=True, slots=True)
class BondLengthClaim(Claim):
    """One bond compared between this species and another: ``C=C shorter``."""

    bond: tuple[str, str]  # ("C", "C"); atom names ("C1") or groups as in AngleClaim.atoms
    relation: Literal["shorter", "longer", "equal"]  # first species relative to the second
    order: int = 1  # as written: 2 for "C=C shorter"


@dataclass(frozen=True, slots=True)
class PointGroupClaim(Claim):
    """The point group, in Schoenflies notation: ``C2v``, ``D3h``."""

    symbol: str  # Schoenflies, normalised: "C2v", "D3h", "Td", "Cinfv"


@dataclass(frozen=True, slots=True)
class IsomerCountClaim(Claim):
    """How many isomers there are: ``2 isomers``."""

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
class ParsedBody:
    """What one annotation body says, with spans relative to the body."""

    formulas: tuple[Formula, ...]
    claims: tuple[Claim, ...]
    errors: tuple[NotationError, ...]
    has_colon: bool



_POSITIONED_TYPES = ("Span", "Part", "Atom", "Group", "Formula", "Claim", "NotationError")


@cache
def _fields_of(cls: type) -> tuple[tuple[str, bool], ...]:
    """(name, may hold a Span) for each field of ``cls``, decided once per class."""
    return tuple(
        (field.name, any(kind in str(field.type) for kind in _POSITIONED_TYPES)) for field in dataclasses.fields(cls)
    )


def shifted(value: Any, delta: int) -> Any:
    """A copy of ``value`` (a model dataclass or a tuple of them) with every Span moved by ``delta``."""
    if delta == 0 or value is None:
        return value
    if type(value) is Span:
        return Span(value.start + delta, value.end + delta)
    if type(value) is tuple:
        return tuple([shifted(item, delta) for item in value])
    # Frozen slotted dataclasses: copying field by field is several times faster than dataclasses.replace.
    cls = type(value)
    copy = object.__new__(cls)
    for name, positioned in _fields_of(cls):
        item = getattr(value, name)
        object.__setattr__(copy, name, shifted(item, delta) if positioned else item)
    return copy


@dataclass(frozen=True)  # not slotted: the placed parts below are computed on first use
class Annotation:
    """One annotated species: an inline ``{...}`` group or one line of a ``bonding`` block.

    The parse is kept position-free (``parsed``, relative to the body) and
    placed in the document only when asked: a review needs no placed parse,
    so an edit that moves most annotations costs almost nothing here.
    """

    span: Span  # the whole group, braces included (block: the whole line)
    body: Span  # the text between the braces (block: the line without comment)
    parsed: ParsedBody  # what the body says, with spans relative to ``body.start``
    form: Literal["inline", "block"] = "inline"

    @cached_property
    def formulas(self) -> tuple[Formula, ...]:  # one, or two for "A vs B"
        return shifted(self.parsed.formulas, self.body.start)

    @cached_property
    def claims(self) -> tuple[Claim, ...]:
        return shifted(self.parsed.claims, self.body.start)

    @cached_property
    def errors(self) -> tuple[NotationError, ...]:
        return shifted(self.parsed.errors, self.body.start)

    @property
    def formula(self) -> Formula | None:
        return self.formulas[0] if self.formulas else None

    @property
    def is_comparison(self) -> bool:
        return len(self.parsed.formulas) == 2


# One annotation as the scanner finds it: (start, end, body start, body end, parse, form).
# Plain offsets are cheap to make for every annotation of a large note; an
# :class:`Annotation` is made from them only for the consumers that ask for one.
Found = tuple[int, int, int, int, ParsedBody, str]


def annotation_of(found: Found) -> Annotation:
    start, end, body_start, body_end, parsed, form = found
    return Annotation(Span(start, end), Span(body_start, body_end), parsed, form)


@dataclass(frozen=True)
class ScannedDocument:
    """Everything the scanner found in one document, in document order.

    Notation errors belong to their annotation.  A review reads ``found``; an
    :class:`Annotation` is made on first use (one at a time through
    :meth:`annotation`, or all of them through ``annotations``), once.
    """

    found: tuple[Found, ...]

    @cached_property
    def _made(self) -> dict[int, Annotation]:
        return {}

    def annotation(self, index: int) -> Annotation:
        """The annotation ``found[index]`` (its placed parse made with it on first use)."""
        made = self._made.get(index)
        if made is None:
            made = self._made[index] = annotation_of(self.found[index])
        return made

    @cached_property
    def annotations(self) -> tuple[Annotation, ...]:
        return tuple(map(self.annotation, range(len(self.found))))

    @cached_property
    def starts(self) -> list[int]:
        return [found[0] for found in self.found]
