"""Rules about bond angles: ranges from VSEPR, orders and bond lengths from Bent's rule."""

from __future__ import annotations

import math
from collections.abc import Iterator
from dataclasses import dataclass
from typing import TYPE_CHECKING

from ...chem.bent import bond_length_trend
from ...chem.coulson import TYPICAL_ANGLES
from ...chem.isomers import expected
from ...notation.model import AngleClaim, AngleOrderClaim, BondLengthClaim
from ..calculated import angle_fits, nearest, order_contradicts
from ..findings import Finding, Severity
from ..predictions import written_shape
from . import RuleContext, rule

if TYPE_CHECKING:
    from ...chem.analysis import CentreAnalysis, PairRange, SpeciesAnalysis


def centre_named(analysis: SpeciesAnalysis | None, central: str | None) -> CentreAnalysis | None:
    """The centre with this symbol (the first centre when no symbol is given)."""
    if analysis is None or analysis.outside_model is not None or not analysis.centres:
        return None
    if central is None:
        return analysis.centres[0]
    return next((c for c in analysis.centres if c.central == central), None)


def _degrees(value: float) -> str:
    return f"{value:.1f}".rstrip("0").rstrip(".")


def _typical(formula: str, pair: tuple[str, str]) -> float | None:
    table = TYPICAL_ANGLES.get(formula, {})
    return next((v for k, v in table.items() if tuple(sorted(k)) == pair), None)


def _in_expected_isomer(centre: CentreAnalysis, ranges: tuple[PairRange, ...]) -> tuple[PairRange, ...]:
    """Keep the ranges whose ideal angle the expected isomer really has between these two ligands.

    Without this, F-P-F in PCl3F2 could be any of 90, 120 or 180 degrees; with both F axial it is 180.
    """
    best = expected(centre.isomers)
    if not best or not ranges:
        return ranges
    pair = ranges[0].ligands
    present: set[float] = set()
    for isomer in best:
        for i, first in enumerate(isomer.sites):
            for second in isomer.sites[i + 1:]:
                if tuple(sorted((first.label, second.label))) == pair:
                    cosine = sum(a * b for a, b in zip(first.vector, second.vector))
                    present.add(math.degrees(math.acos(max(-1.0, min(1.0, cosine)))))
    kept = tuple(r for r in ranges if any(abs(r.ideal - angle) < 1.0 for angle in present))
    return kept or ranges


@dataclass(frozen=True, slots=True)
class AngleWindow:
    """What the rules expect of a claimed angle: the ranges, whether the claim fits, and why."""

    fits: bool
    name: str  # "F-N-F"
    expected: str  # "96-109.5°" (with the site relation when several)
    reason: str  # the shape and the nearest range's reason
    estimate: float  # the one value the rules would write
    prefix: str  # "F-N-F " when the claim names atoms, else ""

    @property
    def said(self) -> str:
        return f"{self.name} is expected {self.expected} ({self.reason})"


def angle_window(context: RuleContext, claim: AngleClaim) -> AngleWindow | None:
    """The rules' judgement of an angle claim, None where they have no range for it."""
    centre = centre_named(context.analysis, claim.atoms[1] if claim.atoms else None)
    if centre is None:
        return None
    if claim.atoms:  # between two named ligands only the expected isomer's angles count
        ranges = _in_expected_isomer(centre, centre.ranges_for(claim.atoms[0], claim.atoms[2]))
    else:
        ranges = centre.angle_ranges
    if not ranges:
        return None
    tolerance = context.settings.angle_tolerance + claim.allowance  # the writer's own uncertainty widens it
    fits = any(claim.low <= r.high + tolerance and claim.high >= r.low - tolerance for r in ranges)
    middle = (claim.low + claim.high) / 2
    nearest_range = min(ranges, key=lambda r: min(abs(middle - r.low), abs(middle - r.high)))
    a, b = (claim.atoms[0], claim.atoms[2]) if claim.atoms else nearest_range.ligands
    name = f"{a}-{centre.central}-{b}"
    expected_text = "; ".join(f"{_degrees(r.low)}-{_degrees(r.high)}° ({r.relation})" if len(ranges) > 1
                              else f"{_degrees(r.low)}-{_degrees(r.high)}°" for r in ranges)
    value = _typical(context.species, nearest_range.ligands) or nearest_range.estimate
    return AngleWindow(fits, name, expected_text, f"{written_shape(centre.shape)}: {nearest_range.reason}", value,
                       f"{name} " if claim.atoms else "")


@rule("implausible-angle", severity=Severity.WARNING, claims=(AngleClaim,), judges_geometry=True)
def implausible_angle(context: RuleContext) -> Iterator[Finding]:
    """A claimed bond angle lies outside the range VSEPR and the bonding rules predict.

    The range starts from the ideal polyhedron angle and moves the way lone
    pairs (closing), an odd electron (opening less than a lone pair closes),
    multiple bonds, Bent's rule and Drago's rule push it; the setting
    ``angle_tolerance`` widens it on both sides, and so does the claim's own
    uncertainty (121.9(2)° counts three standard uncertainties, ± 0.5° as written).
    With a computed geometry the numbers follow the calculation: where it
    agrees the claim is off, the fix writes the computed value; where it
    finds the claim right, this is information only, saying both.
    """
    claim = context.claim
    if not isinstance(claim, AngleClaim):
        return
    window = angle_window(context, claim)
    if window is None or window.fits:
        return
    head = f"{context.species}: {claim.text} is implausible; {window.said}"
    found = context.calculation()
    # a computed spin state that was a choice (CH2's triplet) does not overrule the rules for a claim
    values = found.angles(claim.atoms) if found is not None and not found.assumed_spin else ()
    if found is None or not values:
        yield context.finding(head, fixes=[context.replace_claim(f"{window.prefix}~{_degrees(window.estimate)}°")])
        return
    middle = (claim.low + claim.high) / 2
    if angle_fits(claim.low, claim.high, claim.allowance, values, found.uncertainty):
        # rules and calculation disagree: say both, follow the calculation's numbers, rewrite nothing
        yield context.finding(f"{head}; but {found.said(values)} fits the claim", at_most=Severity.INFORMATION)
        return
    value = nearest(values, middle)
    yield context.finding(f"{head}; {found.said(values)}",
                          fixes=[context.replace_claim(f"{window.prefix}~{_degrees(value)}°")])


def bent_order(context: RuleContext, claim: AngleOrderClaim) -> tuple[str, str] | None:
    """(the relation Bent's rule predicts for the claim's left and right angles, a note), None where it
    makes no firm prediction (several species, different centres, low confidence)."""
    if len(context.analyses) != 1 or claim.left[1] != claim.right[1]:
        return None
    centre = centre_named(context.analysis, claim.left[1])
    if centre is None:
        return None
    order = centre.bent.order_between(claim.left, claim.right)
    if order is None or (order.confidence == "low" and not order.steric_override):
        return None
    left_larger = sorted((claim.left[0], claim.left[2])) == sorted((order.larger[0], order.larger[2]))
    note = f" (low confidence: {order.reason})" if order.steric_override else ""
    return (">" if left_larger else "<"), note


@rule("angle-order-against-bent", severity=Severity.WARNING, claims=(AngleOrderClaim,), judges_geometry=True)
def angle_order_against_bent(context: RuleContext) -> Iterator[Finding]:
    """A claimed order of two bond angles contradicts Bent's rule (or its steric exception).

    Bent's rule: the centre gives p-rich hybrids to electronegative ligands,
    so the angle between them is the smaller one (F-C-F < H-C-H in CH2F2);
    multiply bonded atoms take s-rich hybrids and widen their angles.  Two
    large ligands on a small centre can push apart against the electronic
    order (Cl-C-Cl > H-C-H in CH2Cl2); such predictions carry lower confidence.
    With a computed geometry the angles are shown; where they side with the
    claim, this is information only.
    """
    claim = context.claim
    if not isinstance(claim, AngleOrderClaim):
        return
    predicted_note = bent_order(context, claim)
    if predicted_note is None:
        return
    predicted, note = predicted_note
    if claim.relation == predicted:
        return
    left, right = "-".join(claim.left), "-".join(claim.right)
    head = f"{context.species}: claimed {left} {claim.relation} {right}; predicted {left} {predicted} {right}{note}"
    found = context.calculation()
    pair = (found.one_angle(claim.left), found.one_angle(claim.right)) if found is not None else (None, None)
    if found is None or pair[0] is None or pair[1] is None:
        yield context.finding(head, fixes=[context.replace_claim(f"{left} {predicted} {right}")])
        return
    said = (f"computed ({found.method}) {left} {_degrees(pair[0])}°, {right} {_degrees(pair[1])}° "
            f"± {_degrees(found.uncertainty)}°")
    against, _ = order_contradicts(claim.relation, pair[0] - pair[1], found.uncertainty)
    if not against:  # the calculation sides with the claim: both said, nothing rewritten
        firmly = abs(pair[0] - pair[1]) > found.uncertainty
        sides = "agrees with the claim" if firmly else "leans toward the claim, by less than the method's uncertainty"
        yield context.finding(f"{head}; but {said} {sides}", at_most=Severity.INFORMATION)
        return
    yield context.finding(f"{head}; {said}", fixes=[context.replace_claim(f"{left} {predicted} {right}")])


@rule("bond-length-against-bent", severity=Severity.WARNING, claims=(BondLengthClaim,))
def bond_length_against_bent(context: RuleContext) -> Iterator[Finding]:
    """A claimed bond-length comparison between two species contradicts Bent's rule.

    Electronegative neighbours draw p character into their own bonds, leaving
    the remaining bond's hybrid s-richer, hence shorter: C-F is shorter in CF4
    than in CH3F.  The bond between two fluorinated centres is the known
    exception: repulsion between the ends lengthens it (C-C in C2F6 is longer
    than in C2H6), so that prediction carries low confidence.  Checked only in
    comparisons (``A vs B``).
    """
    claim = context.claim
    if not isinstance(claim, BondLengthClaim) or len(context.analyses) != 2:
        return
    centres = []
    for analysis in context.analyses:
        centre = next((c for c in (analysis.centres if analysis.outside_model is None else ())
                       if c.central in claim.bond), None)
        if centre is None:
            return
        centres.append(centre)
    trend = bond_length_trend((centres[0].central, centres[0].ligands), (centres[1].central, centres[1].ligands),
                              claim.bond)
    if trend is None or trend.relation == claim.relation:
        return
    first, second = (a.formula for a in context.analyses)
    bond = "-".join(claim.bond)
    yield context.finding(
        f"{first} vs {second}: {bond} is claimed {claim.relation} in {first}; predicted {trend.relation} ({trend.reason})",
        fixes=[context.replace_claim(f"{bond} {trend.relation}")],
    )
