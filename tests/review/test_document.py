"""The review driver: positions, Markdown structure, settings, cautions, and never raising.

Species and claims here are chosen to be odd rather than right; nothing about
their chemistry is asserted except where a source is named.
"""

from __future__ import annotations

import random
import re

import pytest

from notelsp.review.document import kind_of_path, review_text
from notelsp.review.findings import Finding, Severity
from notelsp.review.rules import RULES
from notelsp.review.settings import Settings

from .helpers import review, span_of


def test_findings_come_in_document_order_with_document_offsets():
    note = "{ClF3: bent} then {SF4: linear} then {ClF3: bent}"
    found = review(note).findings
    assert [f.code for f in found] == ["wrong-shape"] * 3
    assert [note[f.span.start:f.span.end] for f in found] == ["bent", "linear", "bent"]
    starts = [f.span.start for f in found]
    assert starts == sorted(starts) and len(set(starts)) == 3  # the same annotation twice, each in its place
    assert found[2].fixes[0].span == found[2].span


def test_moving_an_annotation_moves_its_findings():
    first = review("{NH3: planar}").findings  # "planar" is not a shape name: unknown-claim
    later = review("Some words first. {NH3: planar}").findings
    assert [f.code for f in first] == [f.code for f in later]
    assert [f.span.shifted(len("Some words first. ")) for f in first] == [f.span for f in later]


def test_edits_reuse_nothing_they_should_not():
    """A sequence of edits (each review reusing what the last left at its place) gives, at every step,
    exactly the review of the same text computed from scratch."""
    from notelsp.review.host import AnalysisHost

    host = AnalysisHost()  # one memory across the edits, as an editor's session has
    rng = random.Random(3)
    pieces = ["{ClF3: bent}", "{SF4: seesaw}", "{XeF4: tetrahedral}", " text ", "\n", "\n\n", "# {PCl5: linear}\n",
              "```bonding\nSF6: octahedral\nNH3: planar\n```\n", "`{ClF3: bent}`", "| {SF4: bent} | b |\n|---|---|\n"]
    text = "".join(rng.choices(pieces, k=60))
    for _ in range(40):
        at, cut = rng.randrange(len(text) + 1), rng.randint(0, 12)
        text = text[:at] + rng.choice(pieces) + text[at + cut:]
        incremental = [(f.code, f.span, f.fixes) for f in host.review_text(text).findings]
        fresh = [(f.code, f.span, f.fixes) for f in review_text(text).findings]  # no memory: from scratch
        assert incremental == fresh
        host.review_text(text[: len(text) // 2])  # a different text in between, as another open note would be


def test_markdown_structure_is_respected_and_text_files_are_read_whole():
    note = "{ClF3: t-shaped}\n```\n{ClF3: bent}\n```\n`{ClF3: bent}` and $ {ClF3: bent} $ then {ClF3: bent}\n"
    markdown = review_text(note, "markdown")
    assert [f.span.start for f in markdown.findings] == [note.rindex("bent")]
    text = review_text(note, "text")
    assert len(text.findings) > len(markdown.findings)
    assert kind_of_path("lab/week1.txt") == "text" and kind_of_path("lab/week1.md") == "markdown"


def test_settings_disable_a_rule_and_override_a_severity():
    note = "{ClF3: bent, nonpolar}"
    default = {f.code: f.severity for f in review_text(note).findings}
    assert default == {"wrong-shape": Severity.ERROR, "wrong-polarity": Severity.WARNING}
    quiet = review_text(note, "markdown", Settings(disabled=frozenset({"wrong-polarity"})))
    assert [f.code for f in quiet.findings] == ["wrong-shape"]
    softer = review_text(note, "markdown", Settings(severities=(("wrong-shape", Severity.HINT),)))
    assert {f.code: f.severity for f in softer.findings}["wrong-shape"] is Severity.HINT


def test_annotation_at_and_findings_in():
    note = "Hello {ClF3: bent} and {SF4: seesaw}."
    result = review(note)
    inside = note.index("ClF3")
    annotation = result.annotation_at(inside)
    assert annotation is not None and annotation.span == span_of(note, "{ClF3: bent}")
    assert result.annotation_at(0) is None
    assert [f.code for f in result.findings_in(annotation.span)] == ["wrong-shape"]
    assert result.findings_in(span_of(note, "{SF4: seesaw}")) == ()


def test_hazardous_species_carry_the_caution_that_predictions_are_not_safety_data():
    # ClF3 is a violently reactive oxidiser, PH3 toxic (CRC Handbook hazard notes, from memory)
    result = review("{ClF3: t-shaped} and {PH3: unhybridized} and {CH4: tetrahedral}")
    cautions = [c for a in result.annotations for analysis in result.analyses_of(a) for c in analysis.cautions]
    assert len(cautions) == 2 and all("not safety data" in c for c in cautions)


# textbook claims, each right (standard VSEPR tables and point groups, from memory)
RIGHT_CLAIMS = [
    "{XeOF4: square pyramidal, O apical}", "{BrF3: t-shaped, polar, C2v}", "{IF5: square pyramidal, C4v, polar}",
    "{XeF2: linear, nonpolar, D∞h, 3 lone pairs}", "{SF4: seesaw, polar, C2v, one lone pair}",
    "{PCl5: D3h, nonpolar}", "{CH2ClF: polar, Cs}", "{CHFClBr: 2 isomers, C1}", "{SO2: bent, polar, sp2}",
    "{NO2: bent, polar}", "{NH4+: tetrahedral, sp3}", "{CO3^2-: trigonal planar, D3h}", "{I3-: linear}",
    "{ICl4-: square planar, nonpolar}", "{XeO3: trigonal pyramidal}", "{POCl3: tetrahedral, C3v}",
    "{SF6: Oh, nonpolar}", "{BF3: D3h, nonpolar, sp2}", "{CH4: Td}", "{H2S: H-S-H 92°, unhybridized}",
]


@pytest.mark.parametrize("annotation", RIGHT_CLAIMS)
def test_right_textbook_claims_are_not_flagged(annotation):
    assert not review(f"Known: {annotation}.").findings


# --- odd but valid annotations never make a rule raise ---------------------------

ODD_SPECIES = [
    # ions
    "NH4+", "SO4^2-", "[ICl4]-", "H3O+", "NO2+", "NO2-", "NO3-", "CO3^2-", "ClO4-", "I3-", "BF4-", "PF6-",
    "SiF6^2-", "XeF5+", "CH3+", "CH3-", "OH-",
    # radicals
    "CH3", "NO2", "ClO2", "NO", "OH",
    # two-centre and chain molecules
    "N2H4", "H2O2", "C2H6", "C2H4", "C2H2", "C2F6", "HOCl @O", "CH3OH", "B2H6",
    # outside the model
    "Fe(CO)5", "[Co(NH3)6]3+", "UF6", "He", "H2", "O2", "NaCl",
    # the edges of VSEPR
    "IF7", "XeF6", "BeCl2", "BH3", "SnCl2", "Si(OH)4", "PCl2(CH3)3",
]

CLAIM_SETS = [
    "",
    ": linear, sp, polar, 0 lone pairs, angle 180°, D∞h, 1 isomer",
    ": square planar, electron geometry octahedral, sp3d2, nonpolar, D4h, 3 isomers, F axial, lone pairs trans, one Cl equatorial, Cl fac",
    ": {x}-{x}-{x} 95°, F-{x}-F < H-{x}-H, H-{x}-H = F-{x}-F, s-character 25%, i = 3, sp^2.5, s-character 30% in {x}-F, unhybridized",
]


def _first_symbol(formula: str) -> str:
    return re.search(r"[A-Z][a-z]?", formula).group(0)


@pytest.mark.parametrize("species", ODD_SPECIES)
def test_rules_never_raise_on_odd_species(species):
    x = _first_symbol(species)
    for claims in CLAIM_SETS:
        written = claims.format(x=x)
        note = (f"Odd: {{{species}{written}}} and {{{species} vs CH3F: C-F longer}} and {{CH4 vs {species}{written}}}.\n"
                f"```bonding\n{species}{written or ': bent'}\n```\n")
        result = review(note)  # must not raise
        assert len(result.annotations) == 4, note  # all were read as annotations, so the rules did run
        for finding in result.findings:
            assert isinstance(finding, Finding) and finding.code in RULES
            assert 0 <= finding.span.start <= finding.span.end <= len(note)
            assert finding.message and "\n" not in finding.message
            for fix in finding.fixes:
                assert 0 <= fix.span.start <= fix.span.end <= len(note)
