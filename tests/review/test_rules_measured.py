"""Rules about measured quantities. Chemistry sources are in tests/chem/test_bondlength.py
and tests/chem/test_coupling.py; electron counts are common practice, no source."""

from __future__ import annotations

import pytest

from notelsp.review.findings import Severity

from .helpers import review, with_code


@pytest.mark.parametrize("note", [
    "{CH4: C-H 1.087 Å, 1J(C,H) 125 Hz, sp3, AX4, diamagnetic}",  # CRC length, Muller-Pritchard
    "{CF4: C-F 131.9 pm}", "{SO4^2-: S-O 1.47 Å}", "{NO2: paramagnetic, 1 unpaired electron, AX2E}",
    "{ClF3: AX3E2}", "{NH3: H-N-H 115 ± 3°}", "{C2H2: 1J(C,H) 249 Hz}", "{CH2: 2 unpaired electrons}",
])
def test_right_measurements_pass(note):
    assert not [f for f in review(note).findings if f.severity in (Severity.ERROR, Severity.WARNING)]


def test_a_bond_length_far_outside_the_window_is_flagged_without_a_rewrite():
    (finding,) = with_code("{CH4: C-H 1.50 Å}", "implausible-bond-length")
    assert finding.severity is Severity.WARNING and finding.fixes == ()
    assert "1.07" in finding.message


def test_a_claims_own_uncertainty_widens_the_angle_window():
    assert not with_code("{NH3: H-N-H 114.8 ± 0.5°}", "implausible-angle")
    assert with_code("{NH3: H-N-H 117 ± 0.5°}", "implausible-angle")
    assert not with_code("{NH3: H-N-H 115.0(2)°}", "implausible-angle")  # 115.0 - 3 x 0.2 is inside 114.5


def test_coupling_against_the_analysis_and_against_a_claimed_label():
    (finding,) = with_code("{CH4: 1J(C,H) 160 Hz}", "coupling-against-s-character")
    assert "125 Hz" in finding.message
    (finding,) = with_code("{CH4: sp3, 1J(C,H) 160 Hz}", "coupling-against-s-character")
    assert "'sp3' gives 25%" in finding.message


def test_coupling_with_electronegative_substituents_is_information_only():
    (finding,) = with_code("{CHCl3: 1J(C,H) 209 Hz}", "coupling-against-s-character")
    assert finding.severity is Severity.INFORMATION


def test_unpaired_electrons_follow_the_electron_count():
    (finding,) = with_code("{NO2: diamagnetic}", "wrong-unpaired-electrons")
    assert [fix.replacement for fix in finding.fixes] == ["paramagnetic"]
    (finding,) = with_code("{H2O: 2 unpaired electrons}", "wrong-unpaired-electrons")
    assert finding.fixes == ()  # triplets exist: never rewritten


def test_axe_class_is_fixed_from_the_electron_count():
    (finding,) = with_code("{ClF3: AX3E}", "wrong-axe-class")
    assert [fix.replacement for fix in finding.fixes] == ["AX3E2"]


def test_d_first_labels_are_accepted_with_a_hint():
    found = review("{PF6-: d2sp3}").findings
    assert [(f.code, f.severity) for f in found] == [("outer-d-convention", Severity.HINT)]


def test_coulson_fix_writes_the_index_the_analysis_shows():
    # explain NH3 shows H sp^3.56 (22% s) from the G2 angle; the fixes write the same numbers
    (finding,) = with_code("{NH3: i = 2}", "index-angle-mismatch")
    assert [fix.replacement for fix in finding.fixes] == ["index 3.56"]
    (finding,) = with_code("{NH3: s-character 40%}", "s-character-mismatch")
    assert [fix.replacement for fix in finding.fixes] == ["s-character 22%"]
