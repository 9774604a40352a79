"""Where the model is unsure it says so: capped severity, the reason, no rewriting fix.

The chemistry behind each case is in tests/chem/test_exceptions.py with its source.
"""

from __future__ import annotations

import pytest

from notelsp.review.document import review_text
from notelsp.review.findings import Severity
from notelsp.review.settings import settings_from_mapping

from .helpers import review, with_code


@pytest.mark.parametrize("note, code", [
    ("{XeF6: square planar}", "wrong-shape"),          # distorted octahedron, detail uncertain
    ("{CH2: H-C-H 150°}", "implausible-angle"),        # triplet ~132°, singlet ~102°: beyond both still unsure
    ("{CCl3: T-shaped}", "wrong-shape"),               # between planar and pyramidal radicals
])
def test_an_uncertain_prediction_gives_information_without_a_fix(note, code):
    (finding,) = with_code(note, code)
    assert finding.severity is Severity.INFORMATION
    assert finding.fixes == ()
    assert "uncertain:" in finding.message


def test_a_claim_that_could_mean_several_unlike_centres_is_information_without_a_fix():
    # the amide's N and carbonyl C are trigonal planar, its methyl C tetrahedral (common practice, no source)
    (finding,) = with_code("{NH2(COCH3): tetrahedral}", "centre-not-named")
    assert finding.severity is Severity.INFORMATION and finding.fixes == ()
    assert "N trigonal planar" in finding.message and "tetrahedral" in finding.message
    assert [f.code for f in review("{NH2(COCH3): tetrahedral}").findings] == ["centre-not-named"]


@pytest.mark.parametrize("note", [
    "{XeF6: octahedral}", "{XeF6: pentagonal pyramidal}", "{BaF2: linear}", "{BaF2: bent}", "{CaF2: linear}",
    "{NH2(COCH3): N trigonal planar, N sp2}", "{NH2(C6H5): N sp2}", "{NH2(C6H5): N trigonal pyramidal}",
    "{SnCl2: sp2}", "{SnCl2: unhybridized}",
])
def test_what_the_exception_allows_is_not_flagged(note):
    assert not [f for f in review(note).findings if f.code != "isomers-not-enumerated"]


@pytest.mark.parametrize("note, code", [
    ("{CH3: trigonal pyramidal}", "wrong-shape"),  # planar as a rule (G2), but only "usually"
    ("{NH2(COCH3): N trigonal pyramidal}", "wrong-shape"),  # the amide N's lone pair is conjugated: planar, usually
    ("{SnCl2: Cl-Sn-Cl 119°}", "implausible-angle"),
])
def test_a_usual_exception_is_at_most_a_warning_and_says_usually(note, code):
    (finding,) = with_code(note, code)
    assert finding.severity in (Severity.WARNING, Severity.INFORMATION, Severity.HINT)
    assert "usually so" in finding.message


def test_plain_vsepr_keeps_its_error_and_fix():
    (finding,) = with_code("{NH3: trigonal planar}", "wrong-shape")
    assert finding.severity is Severity.ERROR
    assert [fix.replacement for fix in finding.fixes] == ["trigonal pyramidal"]


def test_a_rule_set_milder_than_the_cap_stays_milder():
    settings, problems = settings_from_mapping({"severity": {"wrong-shape": "hint"}})
    assert not problems
    (finding,) = [f for f in review_text("{XeF6: square planar}", "markdown", settings).findings
                  if f.code == "wrong-shape"]
    assert finding.severity is Severity.HINT


@pytest.mark.parametrize("note, ion", [("{ClO4: tetrahedral}", "ClO4-"), ("{SO4}", "SO4^2-"), ("{NH4: tetrahedral}", "NH4+")])
def test_a_probably_forgotten_charge_is_named_with_a_fix(note, ion):
    # perchlorate, sulfate, ammonium: common ions (common practice, no source)
    found = review(note).findings
    (missing,) = [f for f in found if f.code == "charge-missing"]
    assert [fix.replacement for fix in missing.fixes] == [ion]
    assert not [f for f in found if f.code == "outside-model"]
    assert all(f.severity is Severity.INFORMATION for f in found)


def test_real_neutral_radicals_are_not_questioned():
    assert not with_code("{NO2: bent}", "charge-missing")
    assert not with_code("{ClO2: bent}", "charge-missing")


def test_unknown_claim_suggestions_read_as_claims():
    from notelsp.notation.transform import parse_body, parse_claim

    (error,) = parse_body("H2O: 120° and 90°").errors
    assert error.suggestion is None  # nothing close reads as a claim
    (error,) = parse_body("H2O: trigonal planr").errors
    claim, errors = parse_claim(error.suggestion)
    assert claim is not None and not errors


@pytest.mark.parametrize("note, fixed", [
    ("{CLF3}", "ClF3"), ("{sf4: seesaw}", "SF4: seesaw"), ("{SO4^{2-}: tetrahedral}", "SO4^2-: tetrahedral"),
    ("{nh3: trigonal pyramidal}", "NH3: trigonal pyramidal"), ("{co2: linear}", "CO2: linear"),
])
def test_a_brace_group_clearly_meant_as_an_annotation_is_named(note, fixed):
    (finding,) = with_code(note, "annotation-not-read")
    assert [fix.replacement for fix in finding.fixes] == [fixed]


@pytest.mark.parametrize("note", [
    "{a, b}", "{#id .class}", "{x: 1}", "{no}", "{c: polar}", "$x^{2}$", "\\frac{a}{b}", "{\"k\": 1}", "{If you}",
])
def test_other_braces_stay_unread_and_unremarked(note):
    assert not review(f"Text {note} here.").findings
