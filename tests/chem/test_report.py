"""The JSON form of an analysis, and hazard cautions."""

from __future__ import annotations

import json

from notelsp.chem import analyse
from notelsp.chem.hazards import SAFETY_CAUTION
from notelsp.chem.report import analysis_to_dict

REQUIRED = {"formula", "central", "charge", "valence_electrons", "steric_number", "bonded_atoms", "lone_pairs",
            "electron_geometry", "shape", "hybridization", "ideal_angles", "drago", "isomers", "cautions",
            "coulson", "bent", "centres"}


def test_dict_has_the_contract_keys_and_is_json(formula):
    data = analysis_to_dict(analyse(formula("ClF3")))
    assert REQUIRED <= set(data)
    assert data["shape"] == "t-shaped" and data["lone_pairs"] == 2 and data["steric_number"] == 5
    assert json.loads(json.dumps(data)) == data


def test_two_centres_and_coulson_are_reported(formula):
    data = analysis_to_dict(analyse(formula("N2H4")))
    assert len(data["centres"]) == 2 and data["coulson"]["bonds"]
    assert data["drago"]["applies"] is False and len(data["drago"]["conditions"]) == 4
    json.dumps(data)


def test_outside_model_still_has_every_key(formula):
    data = analysis_to_dict(analyse(formula("Fe(CO)5")))
    assert REQUIRED <= set(data) and data["outside_model"] and data["shape"] is None
    json.dumps(data)


def test_hazardous_species_carry_the_caution(formula):
    for text in ("ClF3", "PH3", "AsH3", "NO2"):  # toxic or reactive (from memory)
        assert any(SAFETY_CAUTION in c for c in analyse(formula(text)).cautions), text
    assert analyse(formula("CH4")).cautions == ()
