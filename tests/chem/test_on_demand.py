"""A centre's isomers and Coulson analysis are worked out on first use, and are the same as if made at once."""

from __future__ import annotations

import pickle
import subprocess
import sys
import textwrap

from notelsp.chem import analysis
from notelsp.chem.coulson import solve_hybrids
from notelsp.chem.isomers import isomers_for


# Packages a review of shape claims has no use for: numpy (isomers, Coulson), RDKit (SMILES), the
# geometry calculation (tblite, ASE) and the language server (pygls, lsprotocol).
NOT_ON_THE_RULES_PATH = ("numpy", "rdkit", "tblite", "ase", "pygls", "lsprotocol")


def test_a_review_without_isomer_or_hybrid_claims_loads_none_of_the_heavy_packages():
    # a fresh process: numpy alone is the costliest import of a command-line start (common practice, no source)
    script = textwrap.dedent(f"""
        import sys
        from notelsp.review.document import review_text
        review = review_text("{{ClF3: T-shaped}}, {{SF4: seesaw}} and {{NH3: trigonal planar}}.", "markdown")
        assert [finding.code for finding in review.findings] == ["wrong-shape"]  # NH3 is pyramidal
        print(sorted(name for name in {NOT_ON_THE_RULES_PATH!r} if name in sys.modules))
    """)
    done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, check=True)
    assert done.stdout.strip() == "[]"


def test_isomers_are_those_enumerated_directly_and_made_once(formula):
    centre = analysis._analyse(formula("SF2Cl2")).centres[0]  # uncached: a fresh analysis
    assert centre.on_demand._isomers_kept is None  # nothing enumerated yet
    direct = isomers_for(centre.electron_geometry, centre.ligands, centre.lone_pairs,
                         centre_electronegativity=centre.on_demand.isomer_request.centre_electronegativity)
    assert centre.isomers == direct
    assert centre.isomers is centre.isomers


def test_coulson_is_the_fit_of_the_same_angles_and_made_once(formula):
    centre = analysis._analyse(formula("H2O")).centres[0]
    request = centre.on_demand.coulson_request
    assert centre.on_demand._coulson_kept is None
    # H2O's G2 angle, 104.0 degrees, is what the analysis fits (ASE G2 set, Curtiss et al. 1997)
    assert dict(request.pair_angles) == {("H", "H"): 104.0}
    assert centre.coulson == solve_hybrids({"H": 2}, {("H", "H"): 104.0}, 2, request.angle_source)
    assert centre.coulson is centre.coulson


def test_hypervalent_centres_have_no_coulson_analysis_and_withheld_isomers_none(formula):
    assert analysis._analyse(formula("SF6")).centres[0].coulson is None  # beyond s-p hybrids
    seven = analysis._analyse(formula("IFClBrH(OH)(CH3)(SH)")).centres[0]  # 7! = 5040 arrangements
    assert seven.isomers == () and seven.isomers_withheld is not None


def test_analyses_compare_and_hash_alike_whether_or_not_their_parts_were_computed(formula):
    first, second = analysis._analyse(formula("PCl3F2")), analysis._analyse(formula("PCl3F2"))
    _ = first.centres[0].isomers, first.centres[0].coulson  # computed in one only
    assert first == second and hash(first) == hash(second)
    assert analysis._analyse(formula("PCl2F3")) != first


def test_an_analysis_survives_pickling_with_or_without_its_computed_parts(formula):
    fresh = analysis._analyse(formula("SF4"))
    copied = pickle.loads(pickle.dumps(fresh))
    assert copied == fresh and copied.centres[0].on_demand._isomers_kept is None
    _ = fresh.centres[0].isomers
    again = pickle.loads(pickle.dumps(fresh))
    assert again.centres[0].isomers == fresh.centres[0].isomers
