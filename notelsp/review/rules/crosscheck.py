"""The codes of the optional PySCF cross-check's findings, registered as rules.

The cross-check (``notelsp.crosscheck.report``) makes these findings from a
calculation run outside the review, so the review never runs these checks
(``reported_outside=True``).  Registering them gives each code a title and an
explanation (hover, README, SARIF) and lets ``.notelsp.toml`` disable one or
set its severity, as for every other rule.

Each rule's severity is that of its finding where the calculation disagrees
with a claim (or cannot be trusted); a finding that only reports agreement or a
computed structure is at most information, whatever the severity is set to.
"""

from __future__ import annotations

from collections.abc import Iterator
from typing import TYPE_CHECKING

from ..findings import Finding, Severity
from . import RULES, RuleContext, _milder, rule

if TYPE_CHECKING:
    from ..settings import Settings

COMPUTED_STRUCTURE = "computed-structure"
COMPUTED_ISOMERS = "computed-isomers"
COMPUTED_ANGLE = "computed-angle"
COMPUTED_PLACEMENT = "computed-placement"
CROSS_CHECK_NOT_RUN = "cross-check-not-run"


def cross_check_severity(code: str, settings: Settings, at_most: Severity | None = None) -> Severity:
    """The severity of a cross-check finding of ``code`` under ``settings``, capped at ``at_most``."""
    severity = settings.severity_of(RULES[code])
    return severity if at_most is None else _milder(severity, at_most)


def _reported_by_the_cross_check(context: RuleContext) -> Iterator[Finding]:
    return iter(())


@rule(COMPUTED_STRUCTURE, severity=Severity.WARNING, reported_outside=True)
def computed_structure(context: RuleContext) -> Iterator[Finding]:
    """The cross-check's optimised structure of the species, or an optimisation that did not converge.

    Information: the bond lengths and angles of the lowest computed isomer,
    labelled with the level of theory.  A warning when an optimisation stopped
    at its step bound before converging, so its numbers are not a minimum.
    """
    return _reported_by_the_cross_check(context)


@rule(COMPUTED_ISOMERS, severity=Severity.WARNING, reported_outside=True)
def computed_isomers(context: RuleContext) -> Iterator[Finding]:
    """The computed energies of the isomers, against the order the rules expect.

    Each isomer the rules list is optimised and its electronic energy given in
    kJ/mol above the lowest.  Information when the lowest is the isomer the
    rules rank first (Bent's rule, lone pairs equatorial); a warning when
    another comes out lower.  The method's limits are stated with the report.
    """
    return _reported_by_the_cross_check(context)


@rule(COMPUTED_ANGLE, severity=Severity.WARNING, reported_outside=True)
def computed_angle(context: RuleContext) -> Iterator[Finding]:
    """A claimed bond angle beside the angle of the computed structure.

    Information when the claim agrees within the angle tolerance (or the
    level's own stated angle error, whichever is larger); a warning, with the
    miss in degrees and the rules' ranges, when it does not.
    """
    return _reported_by_the_cross_check(context)


@rule(COMPUTED_PLACEMENT, severity=Severity.WARNING, reported_outside=True)
def computed_placement(context: RuleContext) -> Iterator[Finding]:
    """A claimed placement (axial, cis, fac, ...) beside the lowest computed isomer.

    Information when the lowest-energy isomer has the claimed placement; a
    warning, with the energy gap, when the claimed placement lies above it.
    """
    return _reported_by_the_cross_check(context)


@rule(CROSS_CHECK_NOT_RUN, severity=Severity.INFORMATION, reported_outside=True)
def cross_check_not_run(context: RuleContext) -> Iterator[Finding]:
    """A cross-check that could not run or did not finish, with the reason.

    The species may be beyond the calculation's bounds (atoms, electrons), the
    calculation may have failed, been cancelled or run out of time.  Nothing is
    said about the claims: agreement is unknown.
    """
    return _reported_by_the_cross_check(context)
