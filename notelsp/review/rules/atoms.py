"""Rules for a claim whose atom cannot be placed: a name that matches no atom of the
species, or a claim that could be about several unlike centres.

Which centre a claim is about is worked out once, in ``notelsp/review/target.py``;
these rules report when it cannot be, and the other rules then leave the claim alone.
"""

from __future__ import annotations

from collections.abc import Iterator

from ...notation.model import Claim, HybridizationClaim, LonePairClaim
from ..findings import Finding, Fix, Severity
from ..target import focus
from . import RuleContext, rule


@rule("unknown-atom", severity=Severity.WARNING, claims=(Claim,))
def unknown_atom(context: RuleContext) -> Iterator[Finding]:
    """A claim names an atom the species does not have, a terminal atom, or atoms not bonded as written.

    Atoms are named by element with their place among that element's atoms as
    written (``C1``, ``C2`` in CH3COOH; ``N`` where there is one N), as hover and
    ``notelsp explain`` show them.  A terminal atom (bonded to one other) has no
    bond angle or shape of its own.  An angle or bond whose atoms are not
    bonded that way (``H-N-O`` in HNO2, whose H is on O) is about no centre
    of the molecule.  The message lists the species' atoms or the centre's
    neighbours; the fix writes the one atom the name can mean, where there is one.
    """
    found = focus(context.analyses, context.claim)
    if found.problem is None or not found.unknown or found.terminal is not None:
        return
    claim = context.claim
    span = (claim.atom_span if claim is not None and claim.atom_span is not None else None)
    fixes: tuple[Fix, ...] = ()
    if found.suggestion is not None and span is not None:
        fixes = (Fix(f"Replace with '{found.suggestion}'", span, found.suggestion),)
    yield context.finding(found.problem, span=span, fixes=fixes)


@rule("centre-not-named", severity=Severity.INFORMATION, claims=(Claim,))
def centre_not_named(context: RuleContext) -> Iterator[Finding]:
    """A claim about a molecule with several unlike centres does not say which one.

    In CH3COOH the methyl carbon is tetrahedral and the carboxyl carbon trigonal
    planar, so "trigonal planar" alone is true of one and false of the other.
    The claim is not judged; name the atom (``C2 trigonal planar``,
    ``H-C1-H 109°``) and it is.
    """
    found = focus(context.analyses, context.claim)
    if found.problem is not None and not found.unknown and found.terminal is None:
        yield context.finding(found.problem)


_HYBRID_BY_DOMAINS = {2: "sp", 3: "sp2", 4: "sp3"}


@rule("terminal-atom", severity=Severity.WARNING, claims=(LonePairClaim, HybridizationClaim))
def terminal_atom(context: RuleContext) -> Iterator[Finding]:
    """A claim about a terminal atom's lone pairs or hybridization differs from its electron count.

    A terminal atom (bonded to one other) keeps the valence electrons its bond
    and charge leave: the N of a nitrile one lone pair, a carbonyl O two.  Its
    hybridization is a convention, read from its domains (the bond and its lone
    pairs: carbonyl O three, sp2; nitrile N two, sp); because the convention is
    not universal (a terminal halogen is often called unhybridized), a
    different label is only information.
    """
    found = focus(context.analyses, context.claim)
    analysis = context.analysis
    if found.terminal is None or analysis is None or analysis.molecule is None:  # only a molecule has terminal atoms
        return
    claim = context.claim
    molecule = analysis.molecule.molecule
    atom = molecule.atoms[found.terminal]
    nonbonding = molecule.nonbonding_electrons(found.terminal)
    if nonbonding is None:
        return
    lone_pairs = max(0, nonbonding - atom.unpaired) // 2
    where = f"{context.species} ({atom.label}, terminal)"
    if isinstance(claim, LonePairClaim):
        if claim.count != lone_pairs:
            plural = "s" if lone_pairs != 1 else ""
            yield context.finding(
                f"{where} is claimed to have {claim.count} lone pair{'s' if claim.count != 1 else ''}; its "
                f"electron count leaves {lone_pairs} lone pair{plural}",
                fixes=[context.replace_claim(f"{lone_pairs} lone pair{plural}")])
        return
    assert isinstance(claim, HybridizationClaim)  # the rule's other claim kind
    domains = 1 + lone_pairs + (1 if atom.unpaired else 0)
    label = _HYBRID_BY_DOMAINS.get(domains)
    if label is not None and claim.label is not None and claim.label != label:
        yield context.finding(
            f"{where} is claimed {claim.label}; by its {domains} domains (one bond, {lone_pairs} lone "
            f"pair{'s' if lone_pairs != 1 else ''}) the usual label is {label}, a convention for terminal atoms",
            at_most=Severity.INFORMATION)
