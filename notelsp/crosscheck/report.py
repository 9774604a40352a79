"""A cross-check's result beside the annotation's claims: findings and Markdown.

Pure: the CLI prints the Markdown, the server publishes the findings and
shows the Markdown.  Findings are information when the calculation agrees
with a claim and warnings when it does not, each labelled with the level of
theory ("computed (HF/6-31G*): ...").  Every code is a registered rule
(``review/rules/crosscheck.py``), so settings can disable it or set its
severity; a finding that only reports agreement stays at most information.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..chem import analyse
from ..notation.model import AngleClaim, Annotation, Claim, PlacementClaim, Span
from ..review.findings import Finding, Severity
from ..review.rules import RULES
from ..review.rules.crosscheck import (
    COMPUTED_ANGLE,
    COMPUTED_ISOMERS,
    COMPUTED_PLACEMENT,
    COMPUTED_STRUCTURE,
    CROSS_CHECK_NOT_RUN,
    cross_check_severity,
)
from ..review.settings import Settings
from .measure import BondAngle, angle_degrees, angles_between, bond_angles, bond_lengths
from .protocol import OptimisedIsomer
from .runner import CrossCheckResult


HARTREE_IN_KJ_PER_MOL = 2625.4996  # CODATA 2018



@dataclass(frozen=True, slots=True)
class IsomerEnergy:
    isomer: OptimisedIsomer
    relative_kj_per_mol: float  # above the lowest computed isomer


def energy_order(result: CrossCheckResult) -> tuple[IsomerEnergy, ...]:
    """The computed isomers, lowest energy first."""
    if not result.isomers:
        return ()
    lowest = min(i.energy_hartree for i in result.isomers)
    ordered = sorted(result.isomers, key=lambda i: i.energy_hartree)
    return tuple(IsomerEnergy(i, (i.energy_hartree - lowest) * HARTREE_IN_KJ_PER_MOL) for i in ordered)


def limits_note(result: CrossCheckResult) -> str:
    level = result.level
    basis = {
        "STO-3G": "a minimal basis (one function per occupied atomic orbital), so angles and energy gaps are rough",
        "3-21G": "a small split-valence basis without polarisation functions, so hypervalent centres are described crudely",
        "6-31G*": "a split-valence basis with d functions on the heavy atoms only, so hydrogen is described simply",
    }.get(level.basis, f"the {level.basis} basis")
    method = (
        "Hartree-Fock has no electron correlation (bonds come out slightly short, gaps can be off by several kJ/mol)"
        if level.is_hartree_fock
        else f"{level.method} is one density functional among many"
    )
    return (
        f"Limits of {level.label}: {basis}; {method}; one molecule in the gas phase at 0 K, no solvent, "
        "no counter-ions, no vibrational averaging; energies are electronic energies, not free energies."
    )


def _label(result: CrossCheckResult) -> str:
    return f"computed ({result.level.label})"


def _lowest(result: CrossCheckResult) -> OptimisedIsomer | None:
    order = energy_order(result)
    return order[0].isomer if order else None


def _angles(isomer: OptimisedIsomer) -> tuple[BondAngle, ...]:
    return bond_angles(isomer.symbols, isomer.positions, isomer.ligand_sites)


def _formula_span(annotation: Annotation) -> Span:
    return annotation.formula.span if annotation.formula else annotation.span


def _species(annotation: Annotation) -> str:
    return " vs ".join(f.text for f in annotation.formulas)


def _finding(code: str, severity: Severity, message: str, span: Span, annotation: Annotation, claim: Claim | None = None) -> Finding:
    return Finding(code, severity, message, span, _species(annotation), claim.text if claim else None)


def _range_text(values: tuple[float, ...]) -> str:
    low, high = min(values), max(values)
    return f"{low:.1f}°" if high - low < 0.05 else f"{low:.1f}-{high:.1f}°"


def _angle_values(isomer: OptimisedIsomer, claim: AngleClaim) -> tuple[str, tuple[float, ...]]:
    if claim.atoms is not None:
        return "-".join(claim.atoms), angles_between(_angles(isomer), claim.atoms)
    # an angle without atoms: the kind most often present (every X-A-X for AX_n)
    angles = _angles(isomer)
    kinds = sorted({a.atoms for a in angles}, key=lambda k: -sum(a.atoms == k for a in angles))
    if not kinds:
        return "", ()
    return "-".join(kinds[0]), tuple(a.degrees for a in angles if a.atoms == kinds[0])


def _angle_finding(result, annotation, claim: AngleClaim, isomer, tolerance: float) -> Finding | None:
    name, values = _angle_values(isomer, claim)
    if not values:
        return None
    claimed = f"{claim.low:g}°" if claim.low == claim.high else f"{claim.low:g}-{claim.high:g}°"
    # a claim near 180 is compared with the largest angle, one below with the nearest
    nearest = min(values, key=lambda v: min(abs(v - claim.low), abs(v - claim.high)))
    miss = max(claim.low - nearest, nearest - claim.high, 0.0)
    # a difference within the level's own stated error is agreement: the calculation cannot tell them apart
    stated = result.level.angle_error_deg
    tolerance = max(tolerance, stated or 0.0)
    agrees = miss <= tolerance
    verdict = f"agrees within {tolerance:g}°" if agrees else f"is {miss:.1f}° away"
    if stated is not None:
        verdict += f" (the level's stated angle error is {stated:g}°)"
    expected = rule_ranges(annotation, tuple(name.split("-"))) if name else ""
    rules = f" (rules expect {expected})" if expected else ""
    message = f"{_label(result)}: {name} {_range_text(values)}; the claimed {claimed} {verdict}{rules}"
    return _finding(COMPUTED_ANGLE, Severity.INFORMATION if agrees else Severity.WARNING, message, claim.span, annotation, claim)


def _placement_holds(isomer: OptimisedIsomer, claim: PlacementClaim) -> bool | None:
    """Whether the optimised isomer has the claimed placement; None when the claim cannot be read off atoms."""
    indices = [i for i, s in enumerate(isomer.symbols) if i > 0 and s == claim.subject]
    if not indices:
        return None
    if claim.site in ("axial", "equatorial", "apical", "basal"):
        on_site = [isomer.ligand_sites[i - 1] == claim.site for i in indices]
        if claim.quantity == "all":
            return all(on_site)
        if claim.quantity in ("one", "some"):
            return any(on_site) if claim.quantity == "some" else sum(on_site) == 1
        return sum(on_site) == claim.quantity
    centre = isomer.positions[0]
    pair_angles = [
        angle_degrees(isomer.positions[i], centre, isomer.positions[j]) for n, i in enumerate(indices) for j in indices[n + 1 :]
    ]
    if not pair_angles:
        return None
    trans_pairs = sum(a > 150 for a in pair_angles)
    if claim.site == "trans":
        return len(indices) == 2 and trans_pairs == 1
    if claim.site == "cis":
        return len(indices) == 2 and trans_pairs == 0
    if claim.site == "mer":
        return len(indices) == 3 and trans_pairs == 1
    if claim.site == "fac":
        return len(indices) == 3 and trans_pairs == 0
    return None


def _placement_finding(result, annotation, claim: PlacementClaim) -> Finding | None:
    if claim.subject == "lone-pair" or len(result.isomers) < 2:
        return None
    order = energy_order(result)
    holds = [(entry, _placement_holds(entry.isomer, claim)) for entry in order]
    if any(h is None for _, h in holds):
        return None
    lowest, lowest_holds = holds[0]
    if lowest_holds:
        rival = next((e for e, h in holds if not h), None)
        gap = f", {rival.relative_kj_per_mol:.1f} kJ/mol below {rival.isomer.isomer}" if rival else ""
        message = f"{_label(result)}: the lowest isomer is {lowest.isomer.isomer}{gap}; agrees with '{claim.text}'"
        return _finding(COMPUTED_PLACEMENT, Severity.INFORMATION, message, claim.span, annotation, claim)
    best_claimed = next((e for e, h in holds if h), None)
    gap = f"{best_claimed.relative_kj_per_mol:.1f} kJ/mol above" if best_claimed else "not among the computed isomers, below"
    message = (
        f"{_label(result)}: '{claim.text}' is {gap} the lowest isomer, {lowest.isomer.isomer}"
    )
    return _finding(COMPUTED_PLACEMENT, Severity.WARNING, message, claim.span, annotation, claim)


def _structure_message(result: CrossCheckResult, isomer: OptimisedIsomer) -> str:
    lengths: dict[tuple[str, str, str], list[float]] = {}
    for bond in bond_lengths(isomer.symbols, isomer.positions, isomer.ligand_sites):
        lengths.setdefault((*bond.atoms, bond.site), []).append(bond.angstrom)
    parts = []
    for (a, b, site), values in lengths.items():
        where = f" {site}" if site != "vertex" else ""
        parts.append(f"{a}-{b}{where} {sum(values) / len(values):.3f} Å")
    kinds: dict[tuple[str, str, str], list[float]] = {}
    for angle in _angles(isomer):
        kinds.setdefault(angle.atoms, []).append(angle.degrees)
    parts += [f"{'-'.join(k)} {_range_text(tuple(v))}" for k, v in kinds.items()]
    which = f" ({isomer.isomer})" if isomer.isomer else ""
    return f"{_label(result)}{which}: " + ", ".join(parts)


def cross_check_findings(
    result: CrossCheckResult, annotation: Annotation, angle_tolerance: float = 5.0, settings: Settings | None = None,
) -> tuple[Finding, ...]:
    """Findings for one annotation's species from its cross-check result, under ``settings``
    (default settings when None): disabled codes are left out, configured severities applied."""
    settings = settings or Settings()
    return tuple(
        finding._replace(severity=_configured(finding, settings))
        for finding in _natural_findings(result, annotation, angle_tolerance)
        if settings.enabled(finding.code)
    )


def _configured(finding: Finding, settings: Settings) -> Severity:
    """The configured severity of the finding's rule, capped at the finding's own where that is milder
    than the rule's (agreement is information however the disagreement is set)."""
    milder = finding.severity is not RULES[finding.code].severity
    return cross_check_severity(finding.code, settings, finding.severity if milder else None)


def _natural_findings(result: CrossCheckResult, annotation: Annotation, angle_tolerance: float) -> tuple[Finding, ...]:
    span = _formula_span(annotation)
    if result.status != "done" and not result.isomers:
        return (_finding(CROSS_CHECK_NOT_RUN, Severity.INFORMATION, f"cross-check of {result.species} not run: {result.message}", span, annotation),)
    findings = []
    lowest = _lowest(result)
    assert lowest is not None
    findings.append(_finding(COMPUTED_STRUCTURE, Severity.INFORMATION, _structure_message(result, lowest), span, annotation))
    if len(result.isomers) > 1:
        order = energy_order(result)
        listed = ", ".join(f"{e.isomer.isomer} {e.relative_kj_per_mol:+.1f}" for e in order)
        expected = next((i for i in result.isomers if i.rank == 1), None)
        agree = expected is not None and expected is lowest
        verdict = "as the rules expect" if agree else f"the rules expected {expected.isomer if expected else '?'} lowest"
        severity = Severity.INFORMATION if agree else Severity.WARNING
        findings.append(_finding(COMPUTED_ISOMERS, severity, f"{_label(result)}: isomer energies (kJ/mol) {listed}; {verdict}", span, annotation))
    unconverged = [i for i in result.isomers if not i.converged]
    if unconverged:
        names = ", ".join(i.isomer or i.species for i in unconverged)
        findings.append(_finding(COMPUTED_STRUCTURE, Severity.WARNING, f"{_label(result)}: optimisation of {names} did not converge within the step bound", span, annotation))
    if result.status != "done":
        findings.append(_finding(CROSS_CHECK_NOT_RUN, Severity.INFORMATION, f"cross-check of {result.species} incomplete: {result.message}", span, annotation))
    for claim in annotation.claims:
        if isinstance(claim, AngleClaim):
            found = _angle_finding(result, annotation, claim, lowest, angle_tolerance)
        elif isinstance(claim, PlacementClaim):
            found = _placement_finding(result, annotation, claim)
        else:
            found = None
        if found is not None:
            findings.append(found)
    return tuple(findings)


def cross_check_markdown(
    result: CrossCheckResult, annotation: Annotation, angle_tolerance: float = 5.0, settings: Settings | None = None,
) -> str:
    """A short Markdown report: findings, the isomer table, computed angles beside
    the rules' ranges and the claims, the method's limits and any hazard caution."""
    lines = [f"### Cross-check of {result.species} ({result.level.label})", ""]
    for finding in cross_check_findings(result, annotation, angle_tolerance, settings):
        marker = "⚠" if finding.severity in (Severity.ERROR, Severity.WARNING) else "ℹ"
        lines.append(f"- {marker} {finding.message}")
    if len(result.isomers) > 1:
        lines += ["", "| isomer | rule rank | ΔE (kJ/mol) | converged |", "|---|---|---|---|"]
        for entry in energy_order(result):
            iso = entry.isomer
            lines.append(f"| {iso.isomer} | {iso.rank} | {entry.relative_kj_per_mol:.1f} | {'yes' if iso.converged else 'no'} |")
    lowest = _lowest(result)
    if lowest is not None:
        claimed = {tuple(c.atoms): c for c in annotation.claims if isinstance(c, AngleClaim) and c.atoms}
        lines += ["", "| angle | computed | rules expect | claimed |", "|---|---|---|---|"]
        kinds: dict[tuple[str, str, str], list[float]] = {}
        for angle in _angles(lowest):
            kinds.setdefault(angle.atoms, []).append(angle.degrees)
        for kind, values in kinds.items():
            claim = claimed.get(kind) or claimed.get(kind[::-1])
            lines.append(
                f"| {'-'.join(kind)} | {_range_text(tuple(values))} | {rule_ranges(annotation, kind)} | {claim.text if claim else ''} |"
            )
    lines += ["", f"_{limits_note(result)}_"]
    analysis = _analysis_of(annotation)
    if analysis is not None and analysis.cautions:
        lines += [""] + [f"**Caution:** {caution}" for caution in analysis.cautions]
    return "\n".join(lines)


def _analysis_of(annotation: Annotation):
    return analyse(annotation.formula) if annotation.formula is not None else None


def rule_ranges(annotation: Annotation, atoms: tuple[str, str, str]) -> str:
    """What the rules expect for the angle kind ``atoms`` ("100-107°, 120°"), "" when nothing."""
    analysis = _analysis_of(annotation)
    if analysis is None or analysis.centre is None:
        return ""
    found = analysis.centre.ranges_for(atoms[0], atoms[2])
    texts = []
    for expected in found:
        text = f"{expected.low:g}°" if expected.low == expected.high else f"{expected.low:g}-{expected.high:g}°"
        if text not in texts:
            texts.append(text)
    return ", ".join(texts)
