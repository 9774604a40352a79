"""Rules for claims about where ligands sit, polarity, point group and isomer count.

Each compares the claim with the expected isomer(s) of the species' first
centre (``notelsp.chem.isomers``); nothing is said when the analysis is
outside the model, has no centres or no isomers.  When the isomers were not
enumerated (too many arrangements), ``isomers-not-enumerated`` says so and
names the claims left unchecked.
"""

from __future__ import annotations

from collections.abc import Callable, Hashable, Iterator, Sequence
from typing import TYPE_CHECKING

from ...chem.isomers import Isomer, diastereomer_count, expected
from ...chem.model import LONE_PAIR
from ...notation.model import Claim, IsomerCountClaim, PlacementClaim, PointGroupClaim, PolarityClaim
from ..calculated import energy_gaps_text, lowest_isomer
from ..findings import Finding, Severity
from . import RuleContext, rule
from .vsepr import two_atoms

if TYPE_CHECKING:
    from ...chem.analysis import SpeciesAnalysis

_POSITIONS = ("axial", "equatorial", "apical", "basal")
_NEEDS_ISOMERS: tuple[type[Claim], ...] = (PlacementClaim, PolarityClaim, PointGroupClaim, IsomerCountClaim)
_WORDS = {1: "one", 2: "two", 3: "three", 4: "four", 5: "five", 6: "six"}


def _isomers(context: RuleContext) -> tuple[Isomer, ...]:
    analysis = context.analysis
    if analysis is None or analysis.outside_model or not analysis.centres:
        return ()
    return analysis.centres[0].isomers


@rule("isomers-not-enumerated", severity=Severity.INFORMATION)
def isomers_not_enumerated(context: RuleContext) -> Iterator[Finding]:
    """The species has too many arrangements to list its isomers, so the claims that need them are not checked.

    Isomers are found by trying every assignment of ligands and lone pairs to
    the sites of the polyhedron, and the assignments grow factorially with the
    number of different ligands (seven different ligands on a pentagonal
    bipyramid: 5,040).  Above a fixed limit, given in the message, the
    enumeration is skipped to keep each check fast: placement, polarity,
    point-group and isomer-count claims about the species go unchecked, while
    shape, lone-pair, angle and hybridization claims are still checked.  A
    known exception to VSEPR without fixed sites (XeF6's fluxional octahedron,
    a bent alkaline-earth dihalide) has no isomers to list either; that is
    said only where a claim needing them goes unchecked.
    """
    for index, (formula, analysis) in enumerate(zip(context.annotation.formulas, context.analyses)):
        withheld = next((c.isomers_withheld for c in analysis.centres if c.isomers_withheld), None)
        if withheld is None:
            continue
        # the isomer rules judge the first species only, so only its claims go unchecked
        claims = context.annotation.claims if index == 0 else ()
        needs = _NEEDS_ISOMERS
        if _several_centres(analysis):
            # a molecule's polarity and point group come from its 3D model, not from isomers
            needs = (PlacementClaim, IsomerCountClaim)
            if not any(isinstance(claim, needs) for claim in claims):
                continue
        unchecked = [f"'{claim.text}'" for claim in claims if isinstance(claim, needs)]
        if not unchecked and any(c.exception is not None for c in analysis.centres):
            continue  # a known exception without fixed sites: only worth saying when a claim goes unchecked
        consequence = (f"not checked: {', '.join(unchecked)}" if unchecked
                       else "placement, polarity, point-group and isomer-count claims cannot be checked")
        yield context.finding(f"{formula.text}: positional isomers not listed ({withheld}); {consequence}", span=formula.span)


def _formula(context: RuleContext) -> str:
    formula = context.annotation.formula
    return formula.text if formula else ""


def _subject_indices(isomer: Isomer, subject: str) -> list[int]:
    if subject == LONE_PAIR:
        return [i for i, site in enumerate(isomer.sites) if site.label == LONE_PAIR]
    return [i for i, site in enumerate(isomer.sites) if site.symbol == subject and site.label != LONE_PAIR]


def _trans_pairs(isomer: Isomer, indices: Sequence[int]) -> int:
    import numpy as np  # loaded with the isomers themselves, never for a review without isomer claims

    vectors = [np.array(isomer.sites[i].vector) for i in indices]
    return sum(1 for a in range(len(vectors)) for b in range(a + 1, len(vectors)) if float(vectors[a] @ vectors[b]) < -0.99)


def placement_holds(isomer: Isomer, claim: PlacementClaim) -> bool | None:
    """Whether the isomer fits the claim; None when the claim cannot apply (subject absent, wrong count)."""
    indices = _subject_indices(isomer, claim.subject)
    if not indices:
        return None
    if claim.site in _POSITIONS:
        if not any(site.position == claim.site for site in isomer.sites):
            return None  # the polyhedron has no such site ("equatorial" in an octahedron)
        here = sum(1 for i in indices if isomer.sites[i].position == claim.site)
        quantity = claim.quantity
        if quantity == "all":
            return here == len(indices)
        if quantity == "one":
            return here == 1
        if quantity == "some":
            return here >= 1
        return here == quantity
    if len(indices) < 2:
        return None
    trans = _trans_pairs(isomer, indices)
    if claim.site == "trans":
        return trans > 0
    if claim.site == "cis":
        return trans == 0
    if len(indices) != 3 or len(isomer.sites) != 6:
        return None
    return (trans == 0) if claim.site == "fac" else (trans == 1)


def _noun(subject: str, count: int) -> str:
    if subject == LONE_PAIR:
        return "lone pair" if count == 1 else "lone pairs"
    return subject


def placement_text(isomer: Isomer, claim: PlacementClaim) -> str | None:
    """How the expected isomer places the claim's subject, in the claim's own terms ("F axial", "one F axial")."""
    indices = _subject_indices(isomer, claim.subject)
    if not indices:
        return None
    if claim.site in _POSITIONS:
        positions = [isomer.sites[i].position for i in indices]
        counts = {p: positions.count(p) for p in _POSITIONS if p in positions}
        if not counts:
            return None  # only unnamed vertices: nothing to say in the claim's terms
        if len(counts) == 1:
            (where,) = counts
            return f"{_noun(claim.subject, len(indices))} {where}"
        # split over two kinds of site: state the one the claim named if present, else the commonest
        where = claim.site if claim.site in counts else max(counts, key=counts.__getitem__)
        n = counts[where]
        quantity = "one" if n == 1 else str(n)
        return f"{quantity} {_noun(claim.subject, n)} {where}"
    trans = _trans_pairs(isomer, indices)
    if claim.site in ("fac", "mer") and len(indices) == 3 and len(isomer.sites) == 6:
        return f"{_noun(claim.subject, 3)} {'mer' if trans else 'fac'}"
    if len(indices) >= 2:
        return f"{_noun(claim.subject, len(indices))} {'trans' if trans else 'cis'}"
    return None


@rule("misplaced-ligand", severity=Severity.WARNING, claims=(PlacementClaim,), judges_geometry=True)
def misplaced_ligand(context: RuleContext) -> Iterator[Finding]:
    """A ligand or lone pair is claimed on a site the expected isomer does not put it on.

    In a trigonal bipyramid lone pairs and multiply bonded atoms take the
    roomier equatorial sites and the more electronegative ligands the axial
    ones (Bent's rule, apicophilicity); in an octahedron two lone pairs sit
    trans.  The expected isomer is the one these preferences rank first.
    With computed isomers the energy gaps are shown beside; where the
    isomer computed lowest places it as claimed, this is information only.
    """
    claim = context.claim
    assert isinstance(claim, PlacementClaim)
    isomers = _isomers(context)
    best = expected(isomers)
    if not best:
        return
    verdicts = [placement_holds(isomer, claim) for isomer in best]
    if any(v is None for v in verdicts) or any(verdicts):
        return
    replacement = placement_text(best[0], claim)
    predicted = replacement or best[0].name
    message = f"{_formula(context)} is claimed '{claim.text}'; predicted {predicted} ({best[0].name}, {best[0].reason})"
    computed = context.computed_of(0)
    gaps = energy_gaps_text(computed)
    if gaps is not None:
        message = f"{message}; {gaps}"
        lowest = lowest_isomer(computed, isomers)
        if lowest is not None and placement_holds(lowest, claim):
            # the calculation's lowest isomer is as claimed: both said, nothing rewritten
            yield context.finding(message, at_most=Severity.INFORMATION)
            return
    yield context.finding(message, fixes=[context.replace_claim(replacement)] if replacement else [])


def _several_centres(analysis: SpeciesAnalysis) -> bool:
    whole = analysis.molecule
    return whole is not None and len(whole.centres) > 1


def _whole_molecule(context: RuleContext) -> tuple[str, bool, str] | str | None:
    """(point group, polar) of a species read as a molecule of several centres, from its 3D model, or
    why there is none; None for a single-centre species (judged by its isomers)."""
    analysis = context.analysis
    two = two_atoms(context)
    if two is not None:
        return two.point_group, two.polar, "of any two-atom molecule of this kind"
    whole = analysis.molecule if analysis is not None and analysis.outside_model is None else None
    if whole is None or len(whole.centres) <= 1:
        return None
    computed = context.computed_of(0)
    if computed is not None and computed.model_unavailable is not None:
        return computed.model_unavailable
    if computed is not None and computed.model_point_group is not None:
        # the model the calculation started from, kept with its result: no second embedding
        from ...chem.polarity import is_polar

        found: tuple[str, bool] | str = (computed.model_point_group, is_polar(computed.model_point_group))
    else:
        from ...chem.molecule_geometry import whole_molecule_symmetry  # RDKit's embedding, only when asked

        found = whole_molecule_symmetry(whole.molecule)
    return found if isinstance(found, str) else (*found, "of the whole molecule, from one 3D model of it")


def _judge_whole_molecule(context: RuleContext, whole: tuple[str, bool, str] | str, claimed: str, agrees: bool,
                          predicted: str) -> Iterator[Finding]:
    if isinstance(whole, str):
        yield context.finding(f"{_formula(context)} is claimed {claimed}; not checked: {whole}",
                              at_most=Severity.INFORMATION)
    elif not agrees:
        yield context.finding(
            f"{_formula(context)} is claimed {claimed}; predicted {predicted} (point group {whole[0]} {whole[2]})",
            fixes=[context.replace_claim(predicted)])


def _polarity_word(polar: bool) -> str:
    return "polar" if polar else "nonpolar"


def _agreed_expected(context: RuleContext, attribute: Callable[[Isomer], Hashable]) -> Isomer | None:
    """The expected isomer when every equally expected one has the same ``attribute``; else None
    (the claim cannot be judged against isomers that disagree)."""
    best = expected(_isomers(context))
    if not best or len({attribute(isomer) for isomer in best}) != 1:
        return None
    return best[0]


@rule("wrong-polarity", severity=Severity.WARNING, claims=(PolarityClaim,), judges_geometry=True)
def wrong_polarity(context: RuleContext) -> Iterator[Finding]:
    """The claimed polarity differs from that of the expected isomer.

    A molecule can have a permanent dipole only if its point group leaves a
    direction unmoved: C1, Cs, Cn and Cnv (and C∞v).  Any inversion centre,
    horizontal mirror or second rotation axis cancels the bond dipoles.
    """
    claim = context.claim
    assert isinstance(claim, PolarityClaim)
    whole = _whole_molecule(context)
    if whole is not None:
        polar = not isinstance(whole, str) and whole[1]
        yield from _judge_whole_molecule(context, whole, _polarity_word(claim.polar), polar == claim.polar,
                                         _polarity_word(polar))
        return
    isomer = _agreed_expected(context, lambda isomer: isomer.polar)
    if isomer is None or isomer.polar == claim.polar:
        return
    size = f", about {isomer.dipole_debye:.1f} D" if isomer.polar else ""
    yield context.finding(
        f"{_formula(context)} is claimed {_polarity_word(claim.polar)}; predicted {_polarity_word(isomer.polar)} "
        f"(point group {isomer.point_group} of the {isomer.name} isomer{size})",
        fixes=[context.replace_claim(_polarity_word(isomer.polar))],
    )


@rule("wrong-point-group", severity=Severity.WARNING, claims=(PointGroupClaim,), judges_geometry=True)
def wrong_point_group(context: RuleContext) -> Iterator[Finding]:
    """The claimed point group differs from that of the expected isomer.

    The point group counts lone pairs as well as atoms: it is the symmetry of
    the whole electron-domain arrangement, as VSEPR predicts it (e.g. C2v for
    SF4, not the D2d a bare tetrahedron of atoms might suggest).
    """
    from ...chem.symmetry import normalised_symbol  # with numpy, as the isomers were

    claim = context.claim
    assert isinstance(claim, PointGroupClaim)
    whole = _whole_molecule(context)
    if whole is not None:
        group = "" if isinstance(whole, str) else whole[0]
        yield from _judge_whole_molecule(context, whole, claim.text,
                                         normalised_symbol(group or "C1") == normalised_symbol(claim.symbol), group)
        return
    isomer = _agreed_expected(context, lambda isomer: isomer.point_group)
    if isomer is None or normalised_symbol(isomer.point_group) == normalised_symbol(claim.symbol):
        return
    yield context.finding(
        f"{_formula(context)} is claimed {claim.symbol}; predicted {isomer.point_group} (the {isomer.name} isomer)",
        fixes=[context.replace_claim(isomer.point_group)],
    )


@rule("wrong-isomer-count", severity=Severity.WARNING, claims=(IsomerCountClaim,), judges_geometry=True)
def wrong_isomer_count(context: RuleContext) -> Iterator[Finding]:
    """The claimed number of positional isomers differs from the count of distinct arrangements.

    Isomers are counted as stereoisomers of the ideal polyhedron, each
    enantiomer counted separately (octahedral MA2B2C2 has 6: five
    arrangements, one of them a mirror-image pair).  Lone pairs count as
    sites, so SF4 has its lone pair either axial or equatorial.
    """
    claim = context.claim
    assert isinstance(claim, IsomerCountClaim)
    isomers = _isomers(context)
    if not isomers or claim.count == len(isomers):
        return
    without_mirrors = diastereomer_count(isomers)
    mirrors = "" if without_mirrors == len(isomers) else f"; {without_mirrors} if mirror images are counted once"
    yield context.finding(
        f"{_formula(context)} is claimed to have {claim.count} isomer{'s' if claim.count != 1 else ''}; predicted {len(isomers)}, "
        f"counting each enantiomer separately{mirrors}",
        fixes=[context.replace_claim(_count_text(context, len(isomers)))],
    )


def _count_text(context: RuleContext, count: int) -> str:
    """The claim text with its number replaced, so the fix keeps the writer's wording."""
    claim = context.claim
    assert isinstance(claim, IsomerCountClaim)
    text = claim.text
    for written in (str(claim.count), _WORDS.get(claim.count, "")):
        if written and written in text:
            text = text.replace(written, str(count), 1)
            break
    else:
        return f"{count} isomer{'s' if count != 1 else ''}"
    # keep the noun's number in step with the new count ("two isomers" -> "1 isomer")
    if count == 1:
        return text.replace("isomers", "isomer")
    return text if "isomers" in text else text.replace("isomer", "isomers")
