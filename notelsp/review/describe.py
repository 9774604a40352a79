"""Words for people: the Markdown shown in hover, by ``explain`` and in the README.

Pure text assembly from analyses, findings and rule docs; no chemistry is
decided here.
"""

from __future__ import annotations

from functools import lru_cache
from typing import TYPE_CHECKING

from ..notation.model import Annotation
from .document import DocumentReview
from .predictions import written_shape
from .rules import RULES
from .target import centre_label

if TYPE_CHECKING:  # read only; importing chem here would load it for every hover of a server just started
    from ..chem.analysis import CentreAnalysis, SpeciesAnalysis
    from ..chem.molecule_analysis import MoleculeAnalysis

# Where each rule is explained to people: the README's rule list (written by rules_markdown below).
# One base for every consumer (LSP codeDescription, SARIF helpUri), one anchor per rule.
PROJECT_URL = "https://github.com/notelsp/notelsp"
RULES_DOC_URL = f"{PROJECT_URL}/blob/main/README.md"

def _angles(values: tuple[float, ...]) -> str:
    return ", ".join(f"{value:g}°" for value in values) if values else "—"


def centre_markdown(centre: CentreAnalysis, name: str | None = None) -> str:
    """A compact description of one centre (``name``: how the heading names it, e.g. "C2, bonded to C1, O1")."""
    lines = [
        f"**Centre {name or centre.central}** — {centre.valence_electrons} valence electrons, "
        f"steric number {centre.steric_number} ({centre.bonded_atoms} bonded, "
        f"{centre.lone_pairs} lone pair{'s' if centre.lone_pairs != 1 else ''}"
        + (f", {centre.odd_electrons} odd electron" if centre.odd_electrons else "")
        + ")",
        f"- electron geometry: {written_shape(centre.electron_geometry)}",
        f"- shape: {written_shape(centre.shape)}",
        f"- hybridization: {centre.hybridization}" + _coulson_suffix(centre),
        f"- ideal angles: {_angles(centre.ideal_angles)}",
    ]
    lines.append(f"- Drago's rule: {centre.drago.summary()}")
    if centre.bent.summary():
        lines.append(f"- Bent's rule: {centre.bent.summary()}")
    isomers = centre.isomers
    if len(isomers) > 1:
        lines.append(f"- isomers ({len(isomers)}), expected first:")
        for isomer in isomers:
            polarity = "polar" if isomer.polar else "nonpolar"
            chiral = ", chiral" if isomer.chiral else ""
            lines.append(f"  {isomer.rank}. {isomer.name} — {isomer.point_group}, {polarity}{chiral} ({isomer.reason})")
    elif isomers:
        isomer = isomers[0]
        lines.append(f"- point group {isomer.point_group}, {'polar' if isomer.polar else 'nonpolar'}")
    for note in centre.notes:
        lines.append(f"- {note}")
    return "\n".join(lines)


def _coulson_suffix(centre: CentreAnalysis) -> str:
    coulson = centre.coulson
    text = coulson.summary() if coulson is not None else ""
    return f" ({text})" if text else ""


def species_markdown(analysis: SpeciesAnalysis, first: str | None = None) -> str:
    """Everything the analyser says about one species (``first``: the atom to describe first, by name)."""
    parts = [f"### {analysis.formula}" + (f" (charge {analysis.charge:+d})" if analysis.charge else "")]
    if analysis.outside_model:
        parts.append(f"Outside the model: {analysis.outside_model}")
    whole = analysis.molecule
    if whole is not None:
        parts.append(_molecule_line(whole))
        parts.extend(_molecule_centres(whole, first))
    else:
        # Symmetric two-centre molecules (N2H4, C2F6) have equal centres: describe each kind once.
        described: dict[str, int] = {}
        for centre in analysis.centres:
            text = centre_markdown(centre)
            described[text] = described.get(text, 0) + 1
        for text, count in described.items():
            parts.append(text if count == 1 else f"{text}\n\n(the same for each of the {count} equivalent centres)")
    if analysis.cautions:
        parts.append("\n".join(f"> ⚠ {c}" for c in analysis.cautions))
    return "\n\n".join(parts)


_BOND_MARK = {1: "-", 2: "=", 3: "≡"}


def _molecule_line(whole: MoleculeAnalysis) -> str:
    """The molecule's atoms by name and its bonds, as claims name them."""
    atoms = whole.molecule.atoms
    bonds = ", ".join(f"{atoms[b.first].label}{_BOND_MARK.get(b.order, '-')}{atoms[b.second].label}"
                      + (" (delocalised)" if b.delocalised else "")
                      for b in whole.molecule.bonds if "H" not in (atoms[b.first].element, atoms[b.second].element))
    names = " ".join(a.label + (f"({a.charge:+d})" if a.charge else "") for a in atoms)
    return f"Atoms: {names}" + (f"  \nBonds between heavy atoms: {bonds}" if bonds else "")


def _molecule_centres(whole: MoleculeAnalysis, first: str | None) -> list[str]:
    """Each centre of a molecule, the named one first; alike centres (a ring's CH) described once."""
    centres = sorted(whole.centres, key=lambda c: c.label != first)
    blocks: dict[str, list[str]] = {}
    for centre in centres:
        if centre.analysis is None:
            blocks.setdefault(f"**Centre {centre.label}**: outside the model: {centre.outside_model}", [])
            continue
        body = centre_markdown(centre.analysis, "\0")
        blocks.setdefault(body, []).append(f"{centre.label} (bonded to {', '.join(centre.neighbours)})")
    return [body.replace("\0", "; ".join(names)) if names else body for body, names in blocks.items()]


def hover_markdown(review: DocumentReview, annotation: Annotation, offset: int) -> str:
    """Hover text for a position inside an annotation (a centre named by a claim there comes first)."""
    claim = next((c for c in annotation.claims if c.span.start <= offset <= c.span.end
                  or (c.atom_span is not None and c.atom_span.start <= offset <= c.atom_span.end)), None)
    analyses = review.analyses_of(annotation)
    named = claim.atom if claim is not None else None
    if named is None and analyses:  # an angle or a bond names its centre inside the claim (H-C1-H, O=C-O)
        named = centre_label(analyses[0], claim)
    parts = [species_markdown(a, named) for a in analyses]
    findings = review.findings_in(annotation.span)
    if findings:
        parts.append("---")
        for finding in findings:
            rule = RULES.get(finding.code)
            parts.append(f"**{finding.code}** ({finding.severity.value}): {finding.message}")
            if rule and rule.doc:
                parts.append(rule.doc)
    return "\n\n".join(parts)


def rule_doc_anchor(code: str) -> str | None:
    """The anchor of the rule's heading in the README, as GitHub makes it from ``rules_markdown``'s heading.

    The heading "`wrong-shape` (error)" becomes "wrong-shape-error": lower case, spaces to
    hyphens, punctuation other than hyphens dropped.  None for a code that is not a rule.
    """
    rule = RULES.get(code)
    return None if rule is None else f"{rule.code}-{rule.severity.value}"


@lru_cache(maxsize=256)  # asked once per diagnostic; there are a few dozen codes (capped all the same)
def rule_doc_url(code: str) -> str | None:
    """The address of the rule's explanation (base URL + ``#`` + anchor), None for a code that is not a rule."""
    anchor = rule_doc_anchor(code)
    return None if anchor is None else f"{RULES_DOC_URL}#{anchor}"


def rules_markdown() -> str:
    """The rule list for the README: code, default severity, title and explanation."""
    parts = []
    for rule in RULES.values():
        parts.append(f"#### `{rule.code}` ({rule.severity.value})\n\n{rule.title}" + (f"\n\n{rule.doc}" if rule.doc else ""))
    return "\n\n".join(parts)
