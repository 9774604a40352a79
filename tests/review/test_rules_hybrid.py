"""Coulson rules: a claimed index or s-character against the bond angle.

Coulson's relation i = -1/cos(theta) and s = 1/(1+i) are the theorem itself
(common practice, no source); measured angles are ASE G2 geometries
(Curtiss et al., J. Chem. Phys. 106, 1063 (1997)) read from the coordinates.
"""

from __future__ import annotations

import math

import pytest

from .helpers import assert_clean, assert_flagged, with_code

g2 = pytest.importorskip("ase.collections").g2


def g2_hoh() -> float:
    atoms = g2["H2O"]
    return float(atoms.get_angle(1, 0, 2))  # G2 lists O first, then the two H


def test_index_against_the_predicted_tetrahedral_angle():
    note = "{CH4: i = 2}"
    finding = assert_flagged(note, "i = 2", "index-angle-mismatch", "claimed index 2", "H-C-H", "sp^3.00")
    assert finding.fixes[0].replacement == "index 3.00"
    assert_clean("{CH4: i = 3}")


def test_fractional_hybrid_against_a_claimed_angle():
    angle = g2_hoh()
    coulson = -1 / math.cos(math.radians(angle))  # the index the measured angle implies
    note = f"{{H2O: H-O-H {angle:.1f}°, sp^2.5}}"
    finding = assert_flagged(note, "sp^2.5", "index-angle-mismatch", "claimed index 2.5",
                             f"the claimed angle H-O-H {angle:.1f}°", f"sp^{coulson:.2f}")
    assert finding.fixes[0].replacement == f"sp^{coulson:.2f}"
    assert_clean(f"{{H2O: H-O-H {angle:.1f}°, sp^{coulson:.1f}}}")


def test_index_near_ninety_degrees_for_a_drago_hydride():
    # PH3 bonds near 90° (G2: 94.6°), so an sp3-like index 3 does not fit
    assert_flagged("{PH3: i = 3}", "i = 3", "index-angle-mismatch", "claimed index 3", "H-P-H")


def test_hypervalent_centres_are_not_given_coulson_indices():
    assert not with_code("{SF6: i = 3}", "index-angle-mismatch")
    assert not with_code("{PCl5: s-character 10%}", "s-character-mismatch")


def test_s_character_against_the_predicted_angle():
    note = "{CH4: s-character 50%}"
    finding = assert_flagged(note, "s-character 50%", "s-character-mismatch", "claimed s-character 50%",
                             "H-C-H", "Coulson's theorem gives")
    assert finding.fixes[0].replacement == "s-character 25%"
    assert_clean("{CH4: s-character 25%}")


def test_s_character_of_one_kind_of_bond_keeps_its_scope_in_the_fix():
    note = "{CH2F2: s-character 40% in C-F}"
    finding = assert_flagged(note, "s-character 40% in C-F", "s-character-mismatch", "40%", "F-C-F")
    assert finding.fixes[0].replacement.endswith(" in C-F")
    atoms = g2["H2CF2"]
    symbols = atoms.get_chemical_symbols()
    fluorines = [i for i, symbol in enumerate(symbols) if symbol == "F"]
    cosine = math.cos(math.radians(atoms.get_angle(fluorines[0], symbols.index("C"), fluorines[1])))
    assert_clean(f"{{CH2F2: s-character {100 * cosine / (cosine - 1):.0f}% in C-F}}")  # from the G2 F-C-F angle


def test_s_character_against_a_claimed_angle():
    angle = g2_hoh()
    cosine = math.cos(math.radians(angle))
    percent = 100 * cosine / (cosine - 1)  # s-character of two equivalent hybrids at this angle
    assert_clean(f"{{H2O: H-O-H {angle:.1f}°, s-character {percent:.0f}%}}")
    note = f"{{H2O: H-O-H {angle:.1f}°, s-character 33%}}"
    assert_flagged(note, "s-character 33%", "s-character-mismatch", "33%", f"the claimed angle H-O-H {angle:.1f}°")
