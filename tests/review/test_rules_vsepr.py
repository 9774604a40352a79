"""VSEPR rules: shape, electron geometry, hybridization label, lone pairs, outside the model.

Expected shapes, geometries and labels are the standard VSEPR table
(common practice, no source); Drago's examples are textbook ones (from memory).
"""

from __future__ import annotations

import pytest

from .helpers import assert_clean, assert_flagged, review, with_code


@pytest.mark.parametrize(
    "formula, wrong, right",
    [
        ("ClF3", "trigonal planar", "T-shaped"),
        ("SF4", "tetrahedral", "seesaw"),
        ("NH3", "trigonal planar", "trigonal pyramidal"),
        ("XeF4", "tetrahedral", "square planar"),
        ("H2O", "linear", "bent"),
        ("BrF5", "trigonal bipyramidal", "square pyramidal"),
        ("XeF2", "bent", "linear"),
        ("IF7", "octahedral", "pentagonal bipyramidal"),
    ],
)
def test_wrong_shape(formula, wrong, right):
    note = f"We drew {{{formula}: {wrong}}} on the board."
    finding = assert_flagged(note, wrong, "wrong-shape", f"claimed {wrong}", f"VSEPR predicts {right}", "steric number")
    assert finding.fixes[0].span == finding.span
    assert_clean(f"We drew {{{formula}: {right}}} on the board.")


def test_wrong_electron_geometry():
    note = "{H2O: electron geometry trigonal planar}"
    assert_flagged(note, "electron geometry trigonal planar", "wrong-electron-geometry",
                   "trigonal planar electron geometry", "VSEPR predicts tetrahedral")
    assert_clean("{H2O: electron geometry tetrahedral, bent}")


@pytest.mark.parametrize(
    "formula, wrong, right",
    [
        ("CH4", "sp2", "sp3"),
        ("BF3", "sp3", "sp2"),
        ("CO2", "sp2", "sp"),
        ("PCl5", "sp3", "sp3d"),
        ("SF6", "sp3d", "sp3d2"),
        ("IF7", "sp3d2", "sp3d3"),
    ],
)
def test_wrong_hybridization_by_steric_number(formula, wrong, right):
    note = f"{{{formula}: {wrong}}}"
    assert_flagged(note, wrong, "wrong-hybridization", f"claimed {wrong}", f"predicts {right}")
    assert_clean(f"{{{formula}: {right}}}")


@pytest.mark.parametrize("formula", ["PH3", "AsH3", "H2S", "H2Se"])
def test_drago_species_claimed_sp3(formula):
    note = f"{{{formula}: sp3}}"
    finding = assert_flagged(note, "sp3", "wrong-hybridization", "claimed sp3", "Drago's rule", "unhybridized")
    assert finding.fixes[0].replacement == "unhybridized"
    assert_clean(f"{{{formula}: unhybridized}}")


@pytest.mark.parametrize(
    "formula, failed, right",
    [
        ("NH3", "period 2", "sp3"),
        ("PF3", "withdraw charge", "sp3"),
        ("SiH4", "group 14", "sp3"),
    ],
)
def test_unhybridized_claim_where_drago_fails_says_which_condition(formula, failed, right):
    note = f"{{{formula}: unhybridized}}"
    assert_flagged(note, "unhybridized", "wrong-hybridization", "claimed unhybridized", failed, f"predicted {right}")
    assert_clean(f"{{{formula}: {right}}}")


@pytest.mark.parametrize(
    "formula, wrong, right",
    [
        ("NH3", "2 lone pairs", "1 lone pair"),
        ("ClF3", "one lone pair", "2 lone pairs"),
        ("XeF4", "no lone pairs", "2 lone pairs"),
        ("SO4^2-", "1 lone pair", "0 lone pairs"),  # charge counted: S has 8 electrons, all in bonds
    ],
)
def test_wrong_lone_pairs(formula, wrong, right):
    note = f"{{{formula}: {wrong}}}"
    count = right.split()[0]
    finding = assert_flagged(note, wrong, "wrong-lone-pairs", "lone pair", f"the electron count gives {count}",
                             "valence electrons")
    assert finding.fixes[0].replacement == right
    assert_clean(f"{{{formula}: {right}}}")


@pytest.mark.parametrize(
    "annotation, words",
    [
        ("{Fe(CO)5: trigonal bipyramidal}", "transition-metal"),
        ("{He}", "fewer than two atoms"),
        ("{H2: linear}", "central atom"),
    ],
)
def test_outside_model_is_information_on_the_whole_annotation_and_checks_nothing(annotation, words):
    note = f"Compare {annotation} later."
    assert_flagged(note, annotation, "outside-model", "outside the bonding model", words, "claims not checked")
    assert len(review(note).findings) == 1  # the claims themselves are not judged


def test_main_group_species_are_inside_the_model():
    assert not with_code("{ClF3: t-shaped} {PCl5} {NH4+: tetrahedral}", "outside-model")
