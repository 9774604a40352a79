"""Placement, polarity, point-group and isomer-count rules against the expected isomer.

Site preferences (lone pairs equatorial in a trigonal bipyramid, trans in an
octahedron; F axial in PCl3F2 and PCl2F3) are the textbook VSEPR and
apicophilicity results (from memory: electron-diffraction structures).
Point groups and polarities are those of the VSEPR shapes (common practice,
no source); isomer counts are counted by hand on the ideal polyhedron.
"""

from __future__ import annotations

import pytest

from .helpers import assert_clean, assert_flagged, with_code


@pytest.mark.parametrize(
    "formula, wrong, right",
    [
        ("ClF3", "lone pairs axial", "lone pairs equatorial"),
        ("SF4", "lone pair axial", "lone pair equatorial"),
        ("PCl3F2", "F equatorial", "F axial"),
        ("PCl2F3", "Cl axial", "Cl equatorial"),
        ("XeF4", "lone pairs cis", "lone pairs trans"),
        ("PCl2F3", "one F axial", "2 F axial"),
    ],
)
def test_misplaced_ligand(formula, wrong, right):
    note = f"In {{{formula}: {wrong}}} the sites are crowded."
    finding = assert_flagged(note, wrong, "misplaced-ligand", f"'{wrong}'", f"predicted {right}")
    assert finding.fixes[0].replacement == right
    assert_clean(f"In {{{formula}: {right}}} the sites are crowded.")


def test_placement_of_an_absent_ligand_is_not_judged():
    assert not with_code("{ClF3: Cl axial}", "misplaced-ligand")


@pytest.mark.parametrize(
    "formula, wrong, right, group",
    [
        ("SF2Cl2", "nonpolar", "polar", "C2v"),
        ("XeF4", "polar", "nonpolar", "D4h"),
        ("SF4", "nonpolar", "polar", "C2v"),
        ("PCl3F2", "polar", "nonpolar", "D3h"),
        ("NH3", "nonpolar", "polar", "C3v"),
    ],
)
def test_wrong_polarity(formula, wrong, right, group):
    note = f"{{{formula}: {wrong}}}"
    finding = assert_flagged(note, wrong, "wrong-polarity", f"claimed {wrong}", f"predicted {right}", group)
    assert finding.fixes[0].replacement == right
    assert_clean(f"{{{formula}: {right}}}")


@pytest.mark.parametrize(
    "formula, wrong, right",
    [
        ("SF4", "D2d", "C2v"),
        ("XeF4", "C4v", "D4h"),
        ("NH3", "point group D3h", "C3v"),
        ("CH2F2", "Td", "C2v"),
    ],
)
def test_wrong_point_group(formula, wrong, right):
    note = f"{{{formula}: {wrong}}}"
    claimed = wrong.split()[-1]
    finding = assert_flagged(note, wrong, "wrong-point-group", f"claimed {claimed}", f"predicted {right}")
    assert finding.fixes[0].replacement == right
    assert_clean(f"{{{formula}: {right}}}")


@pytest.mark.parametrize(
    "formula, wrong, right, count",
    [
        ("PCl3F2", "2 isomers", "3 isomers", 3),  # F2 axial-axial, axial-equatorial, equatorial-equatorial
        ("CH2F2", "2 isomers", "1 isomer", 1),  # every tetrahedral AX2Y2 is the same
        ("PF5", "two isomers", "1 isomer", 1),
        ("SF4", "1 isomer", "2 isomers", 2),  # lone pair axial or equatorial
    ],
)
def test_wrong_isomer_count(formula, wrong, right, count):
    note = f"{{{formula}: {wrong}}}"
    finding = assert_flagged(note, wrong, "wrong-isomer-count", f"claimed to have {wrong.split()[0].replace('two', '2')}",
                             f"predicted {count}")
    assert finding.fixes[0].replacement == right
    assert_clean(f"{{{formula}: {right}}}")


def test_isomer_count_mentions_mirror_images_when_there_are_enantiomers():
    # octahedral MA2B2C2: five arrangements, one a mirror-image pair, so 6 counted separately (from memory)
    note = "{SF2Cl2Br2: 5 isomers}"
    finding = assert_flagged(note, "5 isomers", "wrong-isomer-count", "claimed to have 5 isomers", "predicted 6",
                             "5 if mirror images are counted once")
    assert finding.fixes[0].replacement == "6 isomers"
    assert_clean("{SF2Cl2Br2: 6 isomers}")
