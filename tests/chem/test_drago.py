"""Drago's rule classification (textbook examples, from memory)."""

from __future__ import annotations

import pytest

from notelsp.chem import analyse


@pytest.mark.parametrize("text", ["PH3", "AsH3", "SbH3", "H2S", "H2Se", "H2Te"])
def test_heavy_hydrides_are_unhybridized(formula, text):
    centre = analyse(formula(text)).centres[0]
    assert centre.drago.applies and centre.hybridization == "unhybridized"
    assert centre.angle_range("H", "H") == (89.0, 96.0)


@pytest.mark.parametrize(
    "text, failed, words",
    [
        ("NH3", "period 3 or below", "period 2"),
        ("H2O", "period 3 or below", "period 2"),
        ("PF3", "ligands electronegativity < 2.5", "withdraw charge"),
        ("PCl3", "ligands electronegativity < 2.5", "Cl"),
        ("SiH4", "group 15 or 16", "group 14"),
        ("P(CH3)3", "ligands electronegativity < 2.5", "CH3"),
        ("PH4", "at least one lone pair", "0 lone pairs"),
    ],
)
def test_each_failed_condition_says_why(formula, text, failed, words):
    charge = 1 if text == "PH4" else 0
    drago = analyse(formula(text, charge)).centres[0].drago
    assert not drago.applies
    condition = next(c for c in drago.failed if c.name == failed)
    assert words in condition.why
    assert all(c.holds for c in drago.conditions if c.name != failed) or text == "SiH4"  # SiH4 has no lone pair either


def test_summary_is_one_line_naming_the_deciding_conditions(formula):
    # the conditions are the textbook statement of Drago's rule (from memory)
    ph3 = analyse(formula("PH3")).centres[0].drago.summary()
    assert ph3.startswith("applies: ") and "period 3" in ph3 and "group 15" in ph3 and "near 90°" in ph3
    pf3 = analyse(formula("PF3")).centres[0].drago.summary()
    assert pf3.startswith("does not apply: ") and "F (3.98)" in pf3 and "hybridizes" in pf3  # Pauling EN of F
    nh3 = analyse(formula("NH3")).centres[0].drago.summary()
    assert "period 2" in nh3 and "F" not in nh3
    assert all("\n" not in s for s in (ph3, pf3, nh3))
