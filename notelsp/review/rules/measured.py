"""Rules about measured quantities: bond lengths, C-H couplings, unpaired electrons, AXE classes."""

from __future__ import annotations

from collections.abc import Iterator
from typing import TYPE_CHECKING

from ... import elements
from ...chem.bondlength import predict_bond_length
from ...chem.coulson import s_character
from ...chem.coupling import (
    ELECTRONEGATIVE_SUBSTITUENTS,
    TOLERANCE_HZ,
    coupling_from_s_character,
    s_character_from_coupling,
)
from ...notation.model import (
    AxeClaim,
    BondLengthValueClaim,
    CouplingClaim,
    HybridizationClaim,
    IndexClaim,
    MagnetismClaim,
    SCharacterClaim,
    UnpairedElectronClaim,
)
from ..findings import Finding, Severity
from . import RuleContext, rule
from .angles import centre_named

if TYPE_CHECKING:
    from ...chem.analysis import CentreAnalysis, SpeciesAnalysis
    from ...chem.model import Ligand

_LABEL_INDEX = {"sp": 1.0, "sp2": 2.0, "sp3": 3.0}


def _bond_of(centre: CentreAnalysis, bond: tuple[str, str] | None) -> Ligand | None:
    """The centre's ligand a length claim is about, or None when the claim names no single bond of it."""
    if bond is None:
        kinds = {l.symbol for l in centre.ligands}
        wanted = next(iter(kinds)) if len(kinds) == 1 else None
    elif centre.central in bond:
        wanted = bond[1] if bond[0] == centre.central else bond[0]
    else:
        return None
    orders = {l.bond_order for l in centre.ligands if l.symbol == wanted}
    if len(orders) != 1:
        return None
    return next(l for l in centre.ligands if l.symbol == wanted)


@rule("implausible-bond-length", severity=Severity.WARNING, claims=(BondLengthValueClaim,), judges_geometry=True)
def implausible_bond_length(context: RuleContext) -> Iterator[Finding]:
    """A claimed bond length lies outside what covalent radii predict for that bond.

    The prediction adds Pyykkö's covalent radii for the bond order the
    electron count gives and subtracts a correction for the bond's polarity
    (Schomaker and Stevenson's, in Blom and Haaland's form); the window is the
    method's measured error against ASE's G2 geometries.  Bent's rule moves
    lengths within it: a bond to a centre carrying electronegative ligands is
    shorter.  A claim's own uncertainty, 1.391(3) Å or ± 0.01 Å, widens it.
    Bonds in delocalised groups (several equivalent multiply bonded atoms on a
    charged centre) fall between bond orders, so they are judged only loosely.
    """
    claim = context.claim
    if not isinstance(claim, BondLengthValueClaim):
        return
    centre = None
    for symbol in (claim.bond or (None,)):
        centre = centre_named(context.analysis, symbol)
        if centre is not None:
            break
    if centre is None:
        return
    ligand = _bond_of(centre, claim.bond)
    if ligand is None:
        return
    predicted = predict_bond_length(centre.central, ligand.symbol, ligand.bond_order)
    if predicted is None:
        return
    low, high = predicted.low, predicted.high
    equivalent = sum(1 for l in centre.ligands if l.symbol == ligand.symbol)
    delocalised = ligand.bond_order >= 2 and equivalent > 1 and centre.charge != 0
    if delocalised:  # a resonance hybrid: anywhere between the single and the written order
        single = predict_bond_length(centre.central, ligand.symbol, 1)
        high = max(high, single.high) if single else high
    if claim.angstrom + claim.allowance >= low and claim.angstrom - claim.allowance <= high:
        return
    named = claim.text if claim.bond else f"{centre.central}-{ligand.symbol} {claim.text}"
    yield context.finding(
        f"{context.species}: {named} is implausible; predicted {predicted.angstrom:.2f} Å "
        f"({low:.2f}-{high:.2f} Å, {predicted.reason})"
    )


def _claimed_s_character(context: RuleContext) -> tuple[float, str] | None:
    """The C-H s-character another claim of the annotation states (fraction, as written), if any."""
    for claim in context.annotation.claims:
        if isinstance(claim, SCharacterClaim) and claim.ligand in (None, "H"):
            return claim.percent / 100.0, claim.text
        if isinstance(claim, IndexClaim):
            return s_character(claim.value), claim.text
        if isinstance(claim, HybridizationClaim):
            index = claim.index if claim.index is not None else _LABEL_INDEX.get(claim.label or "")
            if index is not None:
                return s_character(index), claim.text
    return None


@rule("coupling-against-s-character", severity=Severity.WARNING, claims=(CouplingClaim,), judges_geometry=True)
def coupling_against_s_character(context: RuleContext) -> Iterator[Finding]:
    """A claimed one-bond C-H coupling does not fit the s-character of the C-H bond.

    Muller and Pritchard found 1J(C,H) ≈ 500 Hz × the s-character of the
    carbon hybrid (sp3 125 Hz, sp2 about 167 Hz, sp 250 Hz).  The coupling is
    compared with the s-character claimed in the same annotation (a
    hybridization label, an index or a percentage), else with the one the
    analysis gives the C-H bonds.  Electronegative substituents on the carbon
    raise the coupling beyond the relation (chloroform about 209 Hz), so
    there a mismatch is information only.  Other couplings are not checked.
    """
    claim = context.claim
    if not isinstance(claim, CouplingClaim) or claim.bonds != 1 or sorted(claim.nuclei) != ["C", "H"]:
        return
    implied = s_character_from_coupling(claim.hertz)
    stated = _claimed_s_character(context)
    tolerance = TOLERANCE_HZ + claim.allowance
    if stated is not None:
        fraction, written = stated
        if abs(coupling_from_s_character(fraction) - claim.hertz) <= tolerance:
            return
        yield context.finding(
            f"{context.species}: {claim.text} implies {100 * implied:.0f}% s in "
            f"the C-H bond (Muller-Pritchard, J ≈ 500 Hz × s), but '{written}' gives {100 * fraction:.0f}% "
            f"(expected about {coupling_from_s_character(fraction):.0f} Hz)"
        )
        return
    centre = centre_named(context.analysis, "C")
    bond = centre.coulson.bond("H") if centre is not None and centre.coulson is not None else None
    if centre is None or bond is None:
        return
    expected = coupling_from_s_character(bond.s_character)
    if abs(expected - claim.hertz) <= tolerance:
        return
    substituents = sorted({l.symbol for l in centre.ligands} & ELECTRONEGATIVE_SUBSTITUENTS)
    caveat = (f"; with {', '.join(substituents)} on the carbon the relation underestimates the coupling, "
              "so this is a rough guide only" if substituents else "")
    finding = context.finding(
        f"{context.species}: {claim.text} does not fit the C-H bond's {100 * bond.s_character:.0f}% s "
        f"({bond.label}); Muller-Pritchard gives about {expected:.0f} Hz{caveat}"
    )
    if substituents:
        finding = finding._replace(severity=Severity.INFORMATION)
    yield finding


def _electron_count(analysis: SpeciesAnalysis) -> int | None:
    """Valence electrons of the whole species (after its charge), None outside the main group."""
    total = 0
    for symbol, count in analysis_composition(analysis).items():
        valence = elements.element(symbol).valence_electrons
        if valence is None:
            return None
        total += valence * count
    return total - analysis.charge


def analysis_composition(analysis: SpeciesAnalysis) -> dict[str, int]:
    """Element counts of the analysed species (its centres' view is partial for groups, so re-derive)."""
    from ...notation import parse_formula

    return parse_formula(analysis.formula).composition()


@rule("wrong-unpaired-electrons", severity=Severity.WARNING, claims=(UnpairedElectronClaim, MagnetismClaim))
def wrong_unpaired_electrons(context: RuleContext) -> Iterator[Finding]:
    """A claimed number of unpaired electrons, or para-/diamagnetism, does not fit the electron count.

    An odd number of valence electrons leaves at least one unpaired (a
    radical: paramagnetic).  An even number is usually all paired
    (diamagnetic); the exceptions are triplet ground states such as O2 and
    CH2, which the electron count alone cannot see, so an even-count claim of
    unpaired electrons is flagged only as a warning and never rewritten.
    """
    claim = context.claim
    analysis = context.analysis
    if analysis is None or analysis.outside_model is not None or not analysis.centres:
        return
    count = _electron_count(analysis)
    if count is None:
        return
    odd = count % 2 == 1
    if isinstance(claim, UnpairedElectronClaim):
        if odd and claim.count % 2 == 1 or not odd and claim.count == 0:
            return
        if not odd and context.exception is not None and context.exception.confidence == "uncertain":
            return  # e.g. CH2: the spin state is open
        expected = "an odd number (usually 1)" if odd else "none (usually)"
        fixes = [context.replace_claim("1 unpaired electron")] if odd and claim.count == 0 else []
        yield context.finding(
            f"{analysis.formula}: claimed {claim.text}; {count} valence electrons leave {expected} unpaired",
            fixes=fixes,
        )
    elif isinstance(claim, MagnetismClaim):
        if claim.paramagnetic == odd or (claim.paramagnetic and context.exception is not None):
            return
        if claim.paramagnetic:
            message = (f"{analysis.formula}: claimed paramagnetic; {count} valence electrons pair up in the usual "
                       "structure (a triplet ground state, as in O2, would be the exception)")
            fixes = []
        else:
            message = f"{analysis.formula}: claimed diamagnetic; {count} valence electrons leave one unpaired (a radical)"
            fixes = [context.replace_claim("paramagnetic")]
        yield context.finding(message, fixes=fixes)


@rule("wrong-axe-class", severity=Severity.ERROR, claims=(AxeClaim,))
def wrong_axe_class(context: RuleContext) -> Iterator[Finding]:
    """The claimed AXE class does not fit the electron count of the centre.

    In AXnEm, n counts the atoms bonded to the centre A and m its lone pairs;
    a radical's odd electron may be written as an E or left out.
    """
    claim = context.claim
    centre = centre_named(context.analysis, None)
    if not isinstance(claim, AxeClaim) or centre is None:
        return
    allowed = {centre.lone_pairs, centre.lone_pairs + 1} if centre.odd_electrons else {centre.lone_pairs}
    if claim.bonded == centre.bonded_atoms and claim.lone_pairs in allowed:
        return
    written = f"AX{centre.bonded_atoms}" + (f"E{centre.lone_pairs}" if centre.lone_pairs > 1 else
                                           "E" if centre.lone_pairs == 1 else "")
    yield context.finding(
        f"{context.species}: claimed {claim.text}; {centre.central} has {centre.bonded_atoms} bonded "
        f"atoms and {centre.lone_pairs} lone pair{'s' if centre.lone_pairs != 1 else ''}: {written}",
        fixes=[context.replace_claim(written)],
    )


@rule("outer-d-convention", severity=Severity.HINT, claims=(HybridizationClaim,))
def outer_d_convention(context: RuleContext) -> Iterator[Finding]:
    """A dsp3 or d2sp3 label: outer d orbitals are a bookkeeping convention for main-group centres.

    The labels sp3d/dsp3 and sp3d2/d2sp3 count five and six electron domains.
    Main-group d orbitals lie too high to take part much; the bonding of
    hypervalent molecules is better described by three-centre four-electron
    bonds.  The label is accepted as the steric number's name.
    """
    claim = context.claim
    if not isinstance(claim, HybridizationClaim) or not claim.text.lower().lstrip().startswith("d"):
        return
    yield context.finding(
        f"'{claim.text}' is read as {claim.label}: outer-d participation is bookkeeping for main-group centres "
        "(three-centre four-electron bonds describe them better)"
    )
