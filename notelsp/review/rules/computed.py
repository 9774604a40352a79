"""Rules that judge claims against a computed geometry, where the rules alone let them pass.

Only with computed results (``review_text(..., computed=...)``); without them
none of these says anything.  Where the rules and the calculation disagree the
message gives both, the severity is at most a warning and no fix rewrites the
claim: the writer decides.  Where they agree, the rules' own findings carry the
computed numbers (``implausible-angle``, ``angle-order-against-bent``, ...).
"""

from __future__ import annotations

from collections.abc import Iterator

from ...chem.ions import likely_ion
from ...notation.model import AngleClaim, AngleOrderClaim, PlacementClaim
from ..calculated import Calculation, angle_fits, degrees_text, energy_gaps_text, lowest_isomer, order_contradicts
from ..findings import Finding, Severity
from . import RuleContext, rule
from .angles import angle_window, bent_order
from .placement import _isomers, placement_holds
from ...chem.isomers import expected


def _ion_doubt(context: RuleContext) -> str | None:
    """Why the computed species may not be the one meant (a common ion written without its charge)."""
    formula = context.annotation.formula
    if formula is None:
        return None
    ion = likely_ion(formula.composition(), formula.charge)
    return f"{formula.text} is probably the {ion[1]} ion with its charge left out" if ion is not None else None


def _finding(context: RuleContext, message: str, severity: Severity = Severity.WARNING) -> Finding:
    doubt = _ion_doubt(context)
    if doubt is not None:
        return context.finding(f"{message} (uncertain: {doubt})", at_most=Severity.INFORMATION)
    return context.finding(message, at_most=severity)


@rule("angle-against-calculation", severity=Severity.WARNING, claims=(AngleClaim,))
def angle_against_calculation(context: RuleContext) -> Iterator[Finding]:
    """A claimed bond angle is further from the computed angle than the method's measured uncertainty.

    The rules' ranges cover a whole class of centres (every pyramidal centre
    with one lone pair, say), so a claim 10° off the real angle can lie inside
    them.  The computed geometry (GFN2-xTB, optimised from the predicted
    structure) is specific to the molecule; a claim further from it than the
    method's measured angle uncertainty (README, "Computed geometries")
    is reported with both the computed value and the rules' range.  No fix is
    offered: the rules would have let the claim pass.  Where the spin state
    was a choice between two close ones (CH2), this is information.
    """
    claim = context.claim
    if not isinstance(claim, AngleClaim):
        return
    found = context.calculation()
    if found is None:
        return
    values = found.angles(claim.atoms)
    if not values or angle_fits(claim.low, claim.high, claim.allowance, values, found.uncertainty):
        return
    window = angle_window(context, claim)
    if window is not None and not window.fits:
        return  # the rules flag it too: implausible-angle reports both
    rules_said = f"; the rules' range admits it ({window.said})" if window is not None else ""
    message = f"{found.name}: {claim.text} is off the {found.said(values)}{rules_said}"
    if found.assumed_spin:  # the claim may be about the other spin state
        yield _finding(context, f"{message} ({found.assumed_spin}; the other state differs)", Severity.INFORMATION)
        return
    yield _finding(context, message)


def _computed_pair(context: RuleContext,
                   claim: AngleOrderClaim) -> tuple[float, float, Calculation, Calculation] | None:
    """(left value, right value, how each was computed) for an angle order, or None.

    In ``A vs B`` the left angle is A's and the right one B's (or the other way round when
    only that matches the centres); otherwise both are the one species'.
    """
    first = context.calculation(0)
    second = context.calculation(1) if len(context.annotation.formulas) == 2 else first
    if first is None or second is None:
        return None
    for left_of, right_of in ((first, second), (second, first)):
        left, right = left_of.one_angle(claim.left), right_of.one_angle(claim.right)
        if left is not None and right is not None:
            return left, right, left_of, right_of
    return None


@rule("angle-order-against-calculation", severity=Severity.WARNING, claims=(AngleOrderClaim,))
def angle_order_against_calculation(context: RuleContext) -> Iterator[Finding]:
    """A claimed order of two bond angles, in one species or across two (NF3 vs NH3), contradicts the computed angles.

    Trends between molecules (F-N-F in NF3 below H-N-H in NH3) lie beyond the
    rules; the computed geometries decide them.  A computed difference larger
    than the method's angle uncertainty makes a warning; a smaller one
    contradicting the claim is information (the calculation's best answer,
    not a firm one).  Where Bent's rule sides with the claim the message
    says so; no fix is offered.
    """
    claim = context.claim
    if not isinstance(claim, AngleOrderClaim):
        return
    pair = _computed_pair(context, claim)
    if pair is None:
        return
    left_value, right_value, left_of, right_of = pair
    uncertainty = max(left_of.uncertainty, right_of.uncertainty)
    against, firmly = order_contradicts(claim.relation, left_value - right_value, uncertainty)
    if not against:
        return
    bent = bent_order(context, claim)
    if bent is not None and bent[0] != claim.relation:
        return  # Bent's rule flags it too: angle-order-against-bent reports both
    left, right = "-".join(claim.left), "-".join(claim.right)
    where_left = f" in {left_of.name}" if left_of is not right_of else ""
    where_right = f" in {right_of.name}" if left_of is not right_of else ""
    said = (f"computed ({left_of.method}) {left} {degrees_text(left_value)}°{where_left}, "
            f"{right} {degrees_text(right_value)}°{where_right} ± {degrees_text(uncertainty)}°")
    species = " vs ".join(f.text for f in context.annotation.formulas)
    message = f"{species}: claimed {left} {claim.relation} {right}; {said}"
    if not firmly:
        message += " (the difference is within the method's uncertainty)"
    if bent is not None:
        message += "; Bent's rule predicts as claimed"
    assumed = [c.assumed_spin for c in (left_of, right_of) if c.assumed_spin]
    if assumed:  # the claim may be about the other spin state
        message += f" ({assumed[0]}; the other state differs)"
    yield _finding(context, message, Severity.WARNING if firmly and not assumed else Severity.INFORMATION)


@rule("placement-against-calculation", severity=Severity.INFORMATION, claims=(PlacementClaim,))
def placement_against_calculation(context: RuleContext) -> Iterator[Finding]:
    """The isomer the calculation finds lowest in energy does not place the ligand as claimed, though the rules' expected one does.

    Each candidate isomer is optimised and ordered by its computed energy;
    the gaps are shown beside the rules' ranking.  Semi-empirical energy gaps
    between isomers are not measured against reference data here, so this is
    information, never a warning, and no fix is offered.
    """
    claim = context.claim
    if not isinstance(claim, PlacementClaim):
        return
    computed = context.computed_of(0)
    isomers = _isomers(context)
    lowest = lowest_isomer(computed, isomers)
    if lowest is None or placement_holds(lowest, claim) is not False:
        return
    best = expected(isomers)
    if best and not any(placement_holds(isomer, claim) for isomer in best):
        return  # the rules flag it too: misplaced-ligand reports both
    gaps = energy_gaps_text(computed)
    yield _finding(context, f"{context.species} is claimed '{claim.text}'; {gaps}; "
                            f"the rules rank {best[0].name if best else 'no isomer'} first", Severity.INFORMATION)


@rule("calculation-failed", severity=Severity.INFORMATION)
def calculation_failed(context: RuleContext) -> Iterator[Finding]:
    """The geometry of a species could not be computed, so its claims are judged by the rules alone.

    A calculation fails when the optimisation does not converge within its
    step or time bound, the electronic structure does not converge, a worker
    runs out of memory, or the structure turns into another isomer; the
    reason is given.  Species the calculation does not treat (group
    ligands on a single-centre formula, a molecule with no 3D model) are
    not reported.
    """
    for index, formula in enumerate(context.annotation.formulas):
        computed = context.computed_of(index)
        if computed is None or computed.skipped is not None or computed.failed is None:
            continue
        yield context.finding(f"{formula.text}: no computed geometry ({computed.method}): {computed.failed}",
                              span=formula.span)
