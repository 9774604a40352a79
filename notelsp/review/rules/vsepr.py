"""Rules comparing shape, electron geometry, hybridization and lone-pair claims with VSEPR."""

from __future__ import annotations

from collections.abc import Iterator
from typing import TYPE_CHECKING

from ...notation.model import ElectronGeometryClaim, HybridizationClaim, LonePairClaim, ShapeClaim
from ...chem.ions import likely_ion, written_charge
from ...chem.diatomic import Diatomic, diatomic
from ...chem.vsepr import HYBRIDIZATION, SHAPES
from ..predictions import written_shape
from ..findings import Finding, Fix, Severity
from . import RuleContext, rule

if TYPE_CHECKING:
    from ...chem.analysis import CentreAnalysis
    from ...chem.exceptions import KnownException


def two_atoms(context: RuleContext) -> Diatomic | None:
    """The species when it is two atoms (no centre, yet a shape, point group and polarity), else None."""
    formula = context.annotation.formula
    analysis = context.analysis
    if formula is None or analysis is None or analysis.outside_model is None or formula.smiles is not None:
        return None
    return diatomic(formula.composition())


def first_centre(context: RuleContext) -> CentreAnalysis | None:
    """The analysed centre the claims speak about, or None when the model cannot say."""
    analysis = context.analysis
    if analysis is None or analysis.outside_model is not None or not analysis.centres:
        return None
    return analysis.centres[0]




def _domains(centre: CentreAnalysis) -> str:
    odd = f", {centre.odd_electrons} odd electron" if centre.odd_electrons else ""
    return (f"{centre.bonded_atoms} bonded atoms, {centre.lone_pairs} lone "
            f"pair{'s' if centre.lone_pairs != 1 else ''}{odd}: steric number {centre.steric_number}")


@rule("wrong-shape", severity=Severity.ERROR, claims=(ShapeClaim,), judges_geometry=True)
def wrong_shape(context: RuleContext) -> Iterator[Finding]:
    """The claimed molecular shape differs from the VSEPR prediction.

    VSEPR counts the electron domains around the central atom (bonded atoms
    plus lone pairs), places them as far apart as possible, and names the
    shape by the atoms only: four domains with one lone pair make a trigonal
    pyramid, five with two lone pairs a T.
    """
    centre = first_centre(context)
    claim = context.claim
    two = two_atoms(context)
    if two is not None and isinstance(claim, ShapeClaim) and claim.shape != two.shape:
        yield context.finding(f"{context.species} is claimed {written_shape(claim.shape)}; two atoms "
                              "always lie on a line: linear", fixes=[context.replace_claim("linear")])
    if centre is None or not isinstance(claim, ShapeClaim) or claim.shape in centre.plausible_shapes:
        return
    source = f"expected as a {centre.exception.name}:" if centre.exception else "VSEPR predicts"
    yield context.finding(
        f"{context.species} is claimed {written_shape(claim.shape)}; {source} {written_shape(centre.shape)} ({_domains(centre)})",
        fixes=[context.replace_claim(written_shape(centre.shape))],  # written as the README writes shapes
    )


@rule("wrong-electron-geometry", severity=Severity.ERROR, claims=(ElectronGeometryClaim,), judges_geometry=True)
def wrong_electron_geometry(context: RuleContext) -> Iterator[Finding]:
    """The claimed electron-domain geometry differs from the VSEPR prediction.

    The electron geometry counts lone pairs as well as bonds (H2O: tetrahedral
    electron geometry, bent shape); it depends only on the steric number.
    """
    centre = first_centre(context)
    claim = context.claim
    if centre is None or not isinstance(claim, ElectronGeometryClaim) or claim.geometry == centre.electron_geometry:
        return
    yield context.finding(
        f"{context.species} is claimed to have {written_shape(claim.geometry)} electron geometry; "
        f"VSEPR predicts {written_shape(centre.electron_geometry)} ({_domains(centre)})",
        fixes=[context.replace_claim(f"electron geometry {written_shape(centre.electron_geometry)}")],
    )


@rule("wrong-hybridization", severity=Severity.ERROR, claims=(HybridizationClaim,), judges_geometry=True)
def wrong_hybridization(context: RuleContext) -> Iterator[Finding]:
    """The claimed hybridization label differs from the one the steric number implies.

    The textbook label follows the steric number (2 sp, 3 sp2, 4 sp3, 5 sp3d,
    6 sp3d2, 7 sp3d3).  Drago's rule overrides it: a period-3-or-lower group 15
    or 16 centre with a lone pair and electropositive ligands (PH3, H2S) bonds
    with nearly pure p orbitals and is best called unhybridized.
    """
    centre = first_centre(context)
    claim = context.claim
    if centre is None or not isinstance(claim, HybridizationClaim) or claim.label is None:
        return
    if claim.label == centre.hybridization:
        return
    exception = centre.exception
    if exception is not None and ((claim.label == HYBRIDIZATION.get(centre.steric_number)
                                   and _plain_shape_allowed(centre, exception))
                                  or claim.label in exception.also_hybridization):
        return  # the textbook label stays acceptable bookkeeping where the exception changes the bonding
    formula = context.species
    if centre.drago.applies:
        message = (f"{formula} is claimed {claim.label}; Drago's rule predicts nearly unhybridized "
                   f"(pure p bonds near 90°, s-rich lone pair)")
    elif claim.label == "unhybridized":
        failed = "; ".join(c.why for c in centre.drago.failed)
        message = f"{formula} is claimed unhybridized; Drago's rule does not apply ({failed}): predicted {centre.hybridization}"
    else:
        message = f"{formula} is claimed {claim.label}; steric number {centre.steric_number} predicts {centre.hybridization}"
    yield context.finding(message, fixes=[context.replace_claim(centre.hybridization)])


def _plain_shape_allowed(centre: CentreAnalysis, exception: KnownException) -> bool:
    """Whether the exception still allows the shape plain VSEPR gives; where it does not (an amide N
    held planar by conjugation), the steric number's label names that ruled-out shape (sp3)."""
    plain = SHAPES.get((centre.steric_number, centre.bonded_atoms))
    return plain is None or plain in (exception.shape, *exception.also_plausible)


@rule("wrong-lone-pairs", severity=Severity.ERROR, claims=(LonePairClaim,))
def wrong_lone_pairs(context: RuleContext) -> Iterator[Finding]:
    """The claimed number of lone pairs on the central atom differs from the electron count.

    Lone pairs = (valence electrons of the centre - charge - electrons used in
    bonds) / 2; halogens and H use one electron of the centre, terminal O and S
    two, terminal N three.
    """
    centre = first_centre(context)
    claim = context.claim
    if centre is None or not isinstance(claim, LonePairClaim) or claim.count == centre.lone_pairs:
        return
    used = sum(l.bond_order for l in centre.ligands)
    yield context.finding(
        f"{context.species} is claimed to have {claim.count} lone pair{'s' if claim.count != 1 else ''} on "
        f"{centre.central}; the electron count gives {centre.lone_pairs} ({centre.valence_electrons} valence electrons, "
        f"{used} used in bonds)",
        fixes=[context.replace_claim(f"{centre.lone_pairs} lone pair{'s' if centre.lone_pairs != 1 else ''}")],
    )


@rule("outside-model", severity=Severity.INFORMATION)
def outside_model(context: RuleContext) -> Iterator[Finding]:
    """The species is outside what the bonding model can treat; its claims are not checked.

    Transition-metal and f-block centres, diatomics, chains without one
    identifiable centre and steric numbers beyond 7 are reported rather than
    answered wrongly.  Writing ``@X`` after the formula chooses the centre.
    """
    for formula, analysis in zip(context.annotation.formulas, context.analyses):
        if analysis.outside_model is not None and likely_ion(formula.composition(), formula.charge) is None:
            checked = ("claims not checked, except its shape, polarity and point group"
                       if diatomic(formula.composition()) is not None else "claims not checked")
            yield context.finding(f"{analysis.formula}: outside the bonding model ({analysis.outside_model}); {checked}")


@rule("charge-missing", severity=Severity.INFORMATION)
def charge_missing(context: RuleContext) -> Iterator[Finding]:
    """A neutral formula that is usually an ion: its charge was probably left out.

    A neutral ClO4, NO3 or SO4 is a short-lived radical or no stable species
    at all, while perchlorate, nitrate and sulfate are what notes usually
    mean.  The fix adds the ion's charge; write the neutral species on purpose
    and this stays information only, and the geometry claims about it are
    judged as uncertain.
    """
    for formula in context.annotation.formulas:
        ion = likely_ion(formula.composition(), formula.charge)
        if ion is None:
            continue
        charge, name = ion
        ionic = f"{formula.text}{written_charge(charge)}"
        yield context.finding(
            f"{formula.text} as written is neutral; did you mean {name}, {ionic}?",
            span=formula.span,
            fixes=[Fix(f"Add the charge: {ionic}", formula.span, ionic)],
        )
