"""`notelsp explain` takes any species an annotation takes: SMILES, condensed formulas, written bonds.

Expected structures are the usual textbook ones (common practice, no source): SF4 a seesaw
(one lone pair on S, C2v, polar), ClF3 T-shaped, acetic acid's carboxyl C trigonal planar
and sp2 beside a tetrahedral methyl C (the molecule Cs, polar), ethene D2h and nonpolar.
"""

import json

from .conftest import run_notelsp


def _json(*species: str) -> dict:
    result = run_notelsp("explain", *species, "--format", "json")
    assert result.returncode == 0, result.stderr
    return json.loads(result.stdout)


def _atom(data: dict, label: str) -> dict:
    return next(atom for atom in data["molecule"]["atoms"] if atom["label"] == label)


def test_explain_reads_a_hypervalent_smiles():
    data = _json('smiles "F[S](F)(F)F"')
    assert data["outside_model"] is None
    assert data["central"] == "S" and data["steric_number"] == 5 and data["lone_pairs"] == 1
    assert data["shape"] == "seesaw" and data["hybridization"] == "sp3d"
    sulfur = _atom(data, "S")
    assert sorted(sulfur["neighbours"]) == ["F1", "F2", "F3", "F4"] and sulfur["shape"] == "seesaw"
    assert data["molecule"]["point_group"] == "C2v" and data["molecule"]["polar"] is True


def test_explain_text_of_a_smiles_names_the_atoms_and_the_shape():
    result = run_notelsp("explain", 'smiles "F[S](F)(F)F"')
    assert result.returncode == 0, result.stderr
    assert "seesaw" in result.stdout and "F1" in result.stdout and "Traceback" not in result.stderr


def test_explain_reads_hypervalent_chlorine_in_smiles():
    data = _json('smiles "F[Cl](F)F"')
    assert data["central"] == "Cl" and data["shape"] == "t-shaped" and data["lone_pairs"] == 2


def test_explain_reads_a_condensed_formula_as_a_molecule():
    data = _json("CH3COOH")
    assert data["outside_model"] is None
    assert [c["central"] for c in data["centres"]] == ["C", "C", "O"]  # methyl C, carboxyl C, OH oxygen
    methyl, carboxyl, hydroxyl = _atom(data, "C1"), _atom(data, "C2"), _atom(data, "O2")
    assert (methyl["shape"], methyl["hybridization"]) == ("tetrahedral", "sp3")
    assert (carboxyl["shape"], carboxyl["hybridization"]) == ("trigonal-planar", "sp2")
    assert sorted(carboxyl["neighbours"]) == ["C1", "O1", "O2"]
    assert hydroxyl["shape"] == "bent" and hydroxyl["lone_pairs"] == 2
    assert _atom(data, "O1")["steric_number"] is None  # the carbonyl O is terminal
    orders = {tuple(sorted(b["atoms"])): b["order"] for b in data["molecule"]["bonds"]}
    assert orders[("C2", "O1")] == 2 and orders[("C2", "O2")] == 1 and orders[("C1", "C2")] == 1
    assert data["molecule"]["point_group"] == "Cs" and data["molecule"]["polar"] is True


def test_explain_text_of_a_condensed_formula_lists_every_centre():
    result = run_notelsp("explain", "CH3COOH")
    assert result.returncode == 0, result.stderr
    for centre in ("Centre C1", "Centre C2", "Centre O2"):
        assert centre in result.stdout


def test_explain_reads_written_bonds():
    data = _json("CH2=CH2")
    assert _atom(data, "C1")["shape"] == "trigonal-planar"
    assert data["molecule"]["point_group"] == "D2h" and data["molecule"]["polar"] is False


def test_explain_says_why_a_smiles_is_not_read():
    result = run_notelsp("explain", 'smiles "C1CC"')  # an unclosed ring
    assert result.returncode == 0 and "Traceback" not in result.stderr
    assert "SMILES not read" in result.stdout


def test_explain_rejects_an_unquoted_smiles_cleanly():
    result = run_notelsp("explain", "smiles CCO")
    assert result.returncode == 2
    assert 'smiles "CCO"' in result.stderr and "Traceback" not in result.stderr
