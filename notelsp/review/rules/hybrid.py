"""Rules checking Coulson hybridization indices and s-character against angles."""

from __future__ import annotations

import math
from collections.abc import Iterator
from typing import TYPE_CHECKING

from ...chem.coulson import index_from_angle, s_character
from ...notation.model import AngleClaim, HybridizationClaim, IndexClaim, SCharacterClaim
from ..findings import Finding, Severity
from . import RuleContext, rule
from .angles import _degrees, centre_named

if TYPE_CHECKING:
    from ...chem.analysis import CentreAnalysis


Window = tuple[float, float, str, "float | None"]


def _angle_window(context: RuleContext, centre: CentreAnalysis, ligand: str | None) -> tuple[Window | None, Window | None]:
    """(the L-X-L angle window the index should match, the rules' own window where that one is computed).

    The window (degrees) is a claimed angle's, else the computed angle ± the method's uncertainty, else
    the prediction's, with the one index a fix writes: the claimed angle's middle, the computed angle's
    index (Coulson's theorem for two equivalent hybrids), else the index the analysis shows.
    """
    tolerance = context.settings.angle_tolerance
    labels = {l.label for l in centre.ligands}
    if ligand is None:
        if len(labels) != 1:
            return None, None
        ligand = next(iter(labels))
    for claim in context.annotation.claims:
        if isinstance(claim, AngleClaim):
            atoms = claim.atoms
            if atoms is None and len(labels) == 1 or atoms and atoms[0] == atoms[2] == ligand and atoms[1] == centre.central:
                return (claim.low - tolerance, claim.high + tolerance, f"the claimed angle {claim.text}",
                        index_from_angle((claim.low + claim.high) / 2)), None
    rules = _predicted_window(context, centre, ligand)
    found = context.calculation()
    value = found.one_angle((ligand, centre.central, ligand)) if found is not None else None
    if found is None or value is None:
        return rules, None
    name = f"{ligand}-{centre.central}-{ligand}"
    return (value - found.uncertainty, value + found.uncertainty,
            f"the {name} angle {found.said([value])}", index_from_angle(value)), rules


def _predicted_window(context: RuleContext, centre: CentreAnalysis, ligand: str) -> Window | None:
    tolerance = context.settings.angle_tolerance
    ranges = centre.ranges_for(ligand, ligand)
    if len(ranges) != 1:
        return None  # several site relations (or no such pair): no single angle for the hybrid
    r = ranges[0]
    shown = centre.coulson.bond(ligand) if centre.coulson is not None else None
    expected = shown.index if shown is not None else index_from_angle((r.low + r.high) / 2)
    return (r.low - tolerance, r.high + tolerance,
            f"the predicted {ligand}-{centre.central}-{ligand} angle {_degrees(r.low)}-{_degrees(r.high)}°", expected)


def _index_bounds(low: float, high: float) -> tuple[float, float]:
    """Index range for an angle range: i = -1/cos(theta) falls as the angle opens; <= 90 degrees is pure p."""
    smallest = index_from_angle(min(high, 180.0)) or math.inf
    largest = index_from_angle(low) or math.inf
    return smallest, largest


def _hybrid_centre(context: RuleContext) -> CentreAnalysis | None:
    centre = centre_named(context.analysis, None)
    if centre is None or centre.steric_number > 4:
        return None  # Coulson's s-p relation does not describe hypervalent centres
    return centre


@rule("index-angle-mismatch", severity=Severity.WARNING, claims=(IndexClaim, HybridizationClaim), judges_geometry=True)
def index_angle_mismatch(context: RuleContext) -> Iterator[Finding]:
    """A claimed hybridization index does not fit the bond angle by Coulson's theorem.

    Two equivalent sp^i hybrids at angle theta are orthogonal when
    1 + i cos(theta) = 0, so i = -1/cos(theta): 180° gives sp, 120° sp2,
    109.47° sp3, 90° pure p.  The angle is the one claimed in the same
    annotation, else the computed angle (± the method's uncertainty) where
    there is one, else the predicted range.
    """
    claim = context.claim
    if isinstance(claim, IndexClaim):
        value = claim.value
    elif isinstance(claim, HybridizationClaim) and claim.index is not None:
        value = claim.index
    else:
        return
    centre = _hybrid_centre(context)
    if centre is None:
        return
    window, rules = _angle_window(context, centre, None)
    if window is None:
        return
    low, high, source, expected = window
    smallest, largest = _index_bounds(low, high)
    if smallest <= value <= largest:
        return
    expected_text = "pure p (no s)" if expected is None else f"sp^{expected:.2f}"
    if isinstance(claim, IndexClaim):
        fix = context.replace_claim(f"index {expected:.2f}") if expected is not None else None
    else:
        fix = context.replace_claim("unhybridized" if expected is None else f"sp^{expected:.2f}")
    message = (f"{context.species}: claimed index {value:g} does not fit {source}; "
               f"Coulson's theorem gives {expected_text}")
    if rules is not None and _index_bounds(rules[0], rules[1])[0] <= value <= _index_bounds(rules[0], rules[1])[1]:
        # the rules' window admits it, the calculation does not: both said, nothing rewritten
        yield context.finding(f"{message}; {rules[2]} would admit it", at_most=Severity.WARNING)
        return
    yield context.finding(message, fixes=[fix] if fix else [])


@rule("s-character-mismatch", severity=Severity.WARNING, claims=(SCharacterClaim,), judges_geometry=True)
def s_character_mismatch(context: RuleContext) -> Iterator[Finding]:
    """A claimed s-character of the bonds does not fit the bond angle by Coulson's theorem.

    An sp^i hybrid has s-character 1/(1+i): 50 % in sp, 33 % in sp2, 25 % in
    sp3, none in pure p.  Between two equivalent hybrids at angle theta that
    is cos(theta)/(cos(theta) - 1).  The angle is the one claimed in the same
    annotation, else the computed angle (± the method's uncertainty) where
    there is one, else the predicted range.
    """
    claim = context.claim
    if not isinstance(claim, SCharacterClaim):
        return
    centre = _hybrid_centre(context)
    if centre is None:
        return
    window, rules = _angle_window(context, centre, claim.ligand)
    if window is None:
        return
    low, high, source, index = window
    lowest_s, highest_s = _s_bounds(low, high)
    if lowest_s - 0.5 <= claim.percent <= highest_s + 0.5:
        return
    expected = 100 * s_character(index)
    scope = claim.text.split(" in ", 1)[1] if " in " in claim.text else None
    replacement = f"s-character {expected:.0f}%" + (f" in {scope}" if scope else "")
    message = (f"{context.species}: claimed s-character {claim.percent:g}% does not fit {source}; "
               f"Coulson's theorem gives {lowest_s:.0f}-{highest_s:.0f}%")
    if rules is not None:
        rules_low, rules_high = _s_bounds(rules[0], rules[1])
        if rules_low - 0.5 <= claim.percent <= rules_high + 0.5:
            # the rules' window admits it, the calculation does not: both said, nothing rewritten
            yield context.finding(f"{message}; {rules[2]} would admit it", at_most=Severity.WARNING)
            return
    yield context.finding(message, fixes=[context.replace_claim(replacement)])


def _s_bounds(low: float, high: float) -> tuple[float, float]:
    """Percent s-character range of two equivalent hybrids for an angle range."""
    smallest, largest = _index_bounds(low, high)
    return 100 * s_character(None if largest == math.inf else largest), 100 * s_character(smallest)
