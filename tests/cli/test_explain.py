"""`notelsp explain` for one species."""

import json

from .conftest import run_notelsp

REQUIRED_KEYS = {
    "formula", "central", "charge", "valence_electrons", "steric_number", "bonded_atoms",
    "lone_pairs", "electron_geometry", "shape", "hybridization", "ideal_angles", "drago",
    "isomers", "cautions",
}


def test_explain_json_has_every_documented_key():
    result = run_notelsp("explain", "ClF3", "--format", "json")
    assert result.returncode == 0, result.stderr
    data = json.loads(result.stdout)
    assert REQUIRED_KEYS <= set(data)
    # ClF3: 7 + 3 valence electrons, 3 bonds and 2 lone pairs (common practice, no source)
    assert data["central"] == "Cl" and data["steric_number"] == 5 and data["lone_pairs"] == 2
    assert data["shape"] == "t-shaped" and data["electron_geometry"] == "trigonal-bipyramidal"
    assert data["hybridization"] == "sp3d"


def test_explain_text_names_the_shape():
    result = run_notelsp("explain", "SO4^2-")
    assert result.returncode == 0, result.stderr
    assert "tetrahedral" in result.stdout


def test_explain_rejects_an_unreadable_formula_cleanly():
    result = run_notelsp("explain", "Qq7")
    assert result.returncode == 2
    assert "cannot read the formula" in result.stderr and "Traceback" not in result.stderr
