"""isomers-not-enumerated: a species with too many arrangements gets a diagnostic, and the claims that
need its isomers are reported unchecked instead of judged against nothing.

Electron counts and shapes are the textbook VSEPR results (common practice, no source); the
arrangement counts are multinomial coefficients counted by hand (7! = 5040 for seven different
ligands on seven sites).
"""

from __future__ import annotations

import json

import pytest

import notelsp.chem.analysis as analysis
import notelsp.chem.isomers as isomers
from notelsp.review.rules import RULES
from tests.cli.conftest import run_notelsp

from .helpers import assert_flagged, review, span_of, with_code

CODE = "isomers-not-enumerated"
SEVEN_DIFFERENT = "IFClBrH(OH)(CH3)(SH)"  # I, seven single bonds, no lone pair: 5040 arrangements
ISOMER_CODES = {"misplaced-ligand", "wrong-polarity", "wrong-point-group", "wrong-isomer-count"}


def _forget_every_cached_result() -> None:
    """Isomers and species analyses are cached per process; a changed limit must not leak (reviews
    here keep nothing: they are made without an analysis host's memory)."""
    isomers._isomers.cache_clear()
    analysis._cache.clear()


@pytest.fixture
def limit_of_ten(monkeypatch):
    """The limit lowered so that an everyday species (SF2Cl2: 5!/(2!2!) = 30 arrangements) exceeds it."""
    _forget_every_cached_result()
    monkeypatch.setattr(isomers, "MAX_ARRANGEMENTS", 10)
    yield
    monkeypatch.undo()
    _forget_every_cached_result()


def test_seven_different_ligands_get_the_diagnostic_on_the_formula():
    note = f"Made {{{SEVEN_DIFFERENT}: pentagonal bipyramidal, F axial, polar, C1, 504 isomers}} today."
    finding = assert_flagged(note, SEVEN_DIFFERENT, CODE, "positional isomers not listed",
                             "5,040 site assignments exceed the limit", "not checked: 'F axial', 'polar', 'C1', '504 isomers'")
    assert "\n" not in finding.message
    codes = {f.code for f in review(note).findings}
    assert codes == {CODE}  # the shape is right and still checked; nothing is judged against missing isomers


def test_claims_that_need_no_isomers_are_still_checked():
    note = f"{{{SEVEN_DIFFERENT}: octahedral}}"
    assert sorted(f.code for f in review(note).findings) == [CODE, "wrong-shape"]


def test_without_isomer_claims_the_message_says_what_cannot_be_checked():
    assert_flagged(f"{{{SEVEN_DIFFERENT}}}", SEVEN_DIFFERENT, CODE,
                   "placement, polarity, point-group and isomer-count claims cannot be checked")


def test_a_species_inside_the_limit_gets_no_diagnostic():
    # five different ligands and a pair: 7!/2! = 2520 arrangements, the largest enumeration accepted
    assert not with_code("{IF2ClBrH(OH)(CH3): pentagonal bipyramidal, polar}", CODE)


def test_in_a_comparison_the_range_is_the_species_refused():
    note = "{SF4 vs TeFClBrIH(OH)^-: polar}"  # Te(-) with six single bonds and one lone pair: 7! = 5040
    finding = assert_flagged(note, "TeFClBrIH(OH)^-", CODE, "cannot be checked")
    assert "'polar'" not in finding.message  # the isomer rules judge the first species (SF4), which was checked


def test_a_bonding_block_line_gets_the_diagnostic():
    note = f"Notes\n\n```bonding\nSF4: seesaw\n{SEVEN_DIFFERENT}: polar\n```\n"
    finding = assert_flagged(note, SEVEN_DIFFERENT, CODE, "not checked: 'polar'")
    line = span_of(note, f"{SEVEN_DIFFERENT}: polar")
    assert line.start <= finding.span.start and finding.span.end <= line.end


def test_lowered_limit_turns_misleading_findings_into_unchecked_claims(limit_of_ten):
    note = "{SF2Cl2: nonpolar, Cl axial, D3h, 7 isomers}"
    found = review(note).findings
    assert {f.code for f in found} == {CODE}, [(f.code, f.message) for f in found]
    (finding,) = found
    assert finding.span == span_of(note, "SF2Cl2")
    annotation = review(note).annotations[0]
    assert annotation.span.start <= finding.span.start and finding.span.end <= annotation.span.end
    assert "30 site assignments exceed the limit of 10" in finding.message
    assert "not checked: 'nonpolar', 'Cl axial', 'D3h', '7 isomers'" in finding.message


def test_at_the_real_limit_the_same_claims_are_judged():
    """The control for the test above: with the isomers listed, these claims are wrong (SF2Cl2 is a
    seesaw with F axial, polar C2v; five diastereomers of which one is a mirror pair, 6 in all)."""
    _forget_every_cached_result()
    codes = {f.code for f in review("{SF2Cl2: nonpolar, Cl axial, D3h, 7 isomers}").findings}
    assert codes == ISOMER_CODES


def test_the_rule_is_registered_with_a_title_and_an_explanation():
    registered = RULES[CODE]
    assert registered.severity.value == "information"
    assert registered.claims == ()  # once per annotation
    assert "isomers" in registered.title and "factorial" in registered.doc


def test_check_reports_it_without_a_traceback(tmp_path):
    (tmp_path / "exotic.md").write_text(f"# Run 9\n\nThe mixed iodane {{{SEVEN_DIFFERENT}: F axial}} was proposed.\n",
                                        encoding="utf-8")
    result = run_notelsp("check", str(tmp_path), "--format", "json")
    assert "Traceback" not in result.stderr and "internal error" not in result.stderr, result.stderr
    assert result.returncode == 0, result.stderr  # information only: not an error
    findings = [f for entry in json.loads(result.stdout)["files"] for f in entry["findings"]]
    assert [f["code"] for f in findings] == [CODE]


def test_rules_lists_it():
    result = run_notelsp("rules")
    assert result.returncode == 0, result.stderr
    assert CODE in result.stdout and RULES[CODE].title in result.stdout


def test_explain_says_the_isomers_were_not_listed():
    text = run_notelsp("explain", SEVEN_DIFFERENT)
    assert text.returncode == 0 and "Traceback" not in text.stderr, text.stderr
    assert "positional isomers not listed (5,040 site assignments" in text.stdout
    data = json.loads(run_notelsp("explain", SEVEN_DIFFERENT, "--format", "json").stdout)
    assert data["isomers"] == [] and data["shape"] == "pentagonal-bipyramidal"
