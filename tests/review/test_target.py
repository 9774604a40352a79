"""Claims about molecules of several centres land on the centre they name (review/target.py).

The chemistry of each molecule below is the organic chemist's usual picture (common
practice, no source): acetic acid's methyl C tetrahedral, its carboxyl C trigonal planar,
acetonitrile's nitrile C linear, ethane staggered (D3d), ethene D2h, acetic acid Cs.
"""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from .helpers import assert_clean, assert_flagged, review, with_code


@pytest.mark.parametrize("note", [
    "{CH3COOH: C2 trigonal planar, C1 tetrahedral, C2 sp2, C1 sp3}",
    "{CH3COOH: O=C-O 123°, H-C1-H 109°}",
    "{CH3CN: C2 linear, C2 sp, C1 tetrahedral, N has one lone pair, N sp}",
    '{smiles "CC(=O)O": C2 trigonal planar, O2 bent}',
    "{C2H6: tetrahedral, nonpolar, D3d}",  # two alike centres: a claim naming neither is about both
    "{C2H4: trigonal planar, sp2, D2h, nonpolar}",
    "{CH3COOH: Cs, polar}",
])
def test_true_claims_about_named_atoms_pass(note):
    assert_clean(note)


def test_a_wrong_claim_about_a_named_atom_is_judged_against_that_atom():
    note = "{CH3COOH: C1 trigonal planar}"
    finding = assert_flagged(note, "trigonal planar", "wrong-shape", "(C1)", "tetrahedral")
    assert finding.fixes and finding.fixes[0].replacement == "tetrahedral"  # the name before the claim stays


def test_an_angle_names_its_centre_by_its_neighbours():
    # O=C-O can only be the carboxyl carbon, whose O-C-O angle is near 120°, not 90°
    (finding,) = with_code("{CH3COOH: O=C-O 90°}", "implausible-angle")
    assert "(C2)" in finding.message
    assert finding.fixes == ()  # the claim's atom names were rewritten for the rules: no fix writes them back


def test_a_claim_that_could_mean_unlike_centres_is_not_judged():
    findings = review("{CH3COOH: tetrahedral}").findings
    assert [f.code for f in findings] == ["centre-not-named"]
    assert "C1 tetrahedral" in findings[0].message and "C2 trigonal planar" in findings[0].message


def test_an_unknown_atom_lists_the_atoms_and_a_unique_element_gets_its_name_as_fix():
    finding = assert_flagged("{CH3OH: O1 bent}", "O1", "unknown-atom", "C, H1, H2, H3, O, H4")
    assert [f.replacement for f in finding.fixes] == ["O"]
    assert with_code("{CH3COOH: C3 sp2}", "unknown-atom")[0].fixes == ()  # two carbons: no single guess


def test_a_terminal_atom_has_no_shape_but_has_lone_pairs():
    assert with_code("{CH3CN: N linear}", "unknown-atom")
    finding = assert_flagged("{CH3CN: N has 2 lone pairs}", "2 lone pairs", "terminal-atom", "1 lone pair")
    assert finding.fixes[0].replacement == "1 lone pair"


def test_whole_molecule_polarity_and_point_group_come_from_the_3d_model():
    assert_flagged("{C2H6: C3v}", "C3v", "wrong-point-group", "D3d")
    assert_flagged("{C2F6: polar}", "polar", "wrong-polarity", "nonpolar")
    assert_flagged("{CH3COOH: nonpolar}", "nonpolar", "wrong-polarity", "Cs")


def test_a_point_group_fixed_by_no_stereo_choice_is_information():
    (finding,) = with_code("{CHCl=CHCl: C2h}", "wrong-point-group")
    assert finding.severity.value == "information" and finding.fixes == ()
    assert "C2h" in finding.message and "C2v" in finding.message


def test_explain_json_describes_the_whole_molecule():
    result = subprocess.run([sys.executable, "-m", "notelsp", "explain", "--format", "json", "CH3COOH"],
                            capture_output=True, text=True, timeout=120, check=True)
    data = json.loads(result.stdout)
    molecule = data["molecule"]
    atoms = {a["label"]: a for a in molecule["atoms"]}
    assert atoms["C2"]["neighbours"] == ["C1", "O1", "O2"] and atoms["C2"]["shape"] == "trigonal-planar"
    assert atoms["C2"]["hybridization"] == "sp2" and atoms["C1"]["hybridization"] == "sp3"
    assert atoms["H1"]["steric_number"] is None and atoms["O1"]["lone_pairs"] == 2
    assert {"atoms": ["C2", "O1"], "order": 2, "delocalised": False} in molecule["bonds"]
    assert (molecule["point_group"], molecule["polar"]) == ("Cs", True)
    assert "shape" in data and "centres" in data  # today's top-level keys stay
