"""Angle rules: ranges (implausible-angle), Bent's orders and bond lengths.

Measured angles come from the ASE G2 set geometries (``ase.collections.g2``;
Curtiss et al., J. Chem. Phys. 106, 1063 (1997)), computed here from the
coordinates.
"""

from __future__ import annotations

from itertools import combinations

import pytest

from .helpers import assert_clean, assert_flagged, with_code

g2 = pytest.importorskip("ase.collections").g2


def g2_angle(name: str, centre: str, ends: tuple[str, str]) -> float:
    """The first angle ends[0]-centre-ends[1] in G2 molecule ``name`` (degrees)."""
    atoms = g2[name]
    symbols = atoms.get_chemical_symbols()
    middle = symbols.index(centre)
    for i, j in combinations([k for k in range(len(symbols)) if k != middle], 2):
        if sorted((symbols[i], symbols[j])) == sorted(ends):
            return float(atoms.get_angle(i, middle, j))
    raise LookupError((name, centre, ends))


@pytest.mark.parametrize(
    "formula, g2_name, centre, ligand",
    [("NH3", "NH3", "N", "H"), ("H2O", "H2O", "O", "H"), ("PH3", "PH3", "P", "H"), ("CH4", "CH4", "C", "H"),
     ("NF3", "NF3", "N", "F"), ("SO2", "SO2", "S", "O")],
)
def test_measured_angle_passes_and_a_far_one_is_flagged(formula, g2_name, centre, ligand):
    measured = g2_angle(g2_name, centre, (ligand, ligand))
    name = f"{ligand}-{centre}-{ligand}"
    assert_clean(f"{{{formula}: {name} {measured:.1f}°}}")
    wrong = f"{name} {measured + 25:.0f}°"
    note = f"{{{formula}: {wrong}}}"
    finding = assert_flagged(note, wrong, "implausible-angle", wrong, f"{name} is expected")
    (fix,) = finding.fixes
    assert fix.replacement.startswith(f"{name} ~")


def test_nh3_at_120_degrees_is_implausible():
    note = "Ammonia {NH3: H-N-H 120°} is flat?"
    finding = assert_flagged(note, "H-N-H 120°", "implausible-angle", "H-N-H 120°", "trigonal pyramidal", "lone pairs")
    expected = g2_angle("NH3", "N", ("H", "H"))
    assert finding.fixes[0].replacement == f"H-N-H ~{expected:.1f}°"  # the fix suggests the G2 angle


def test_angle_without_atoms_uses_the_only_kind_of_angle():
    assert_flagged("{NH3: ~90°}", "~90°", "implausible-angle", "~90°", "H-N-H is expected")
    assert_clean("{NH3: angle 107°}")  # 106.7° in NH3 (CRC Handbook, from memory)


def test_angle_between_trigonal_bipyramid_sites_follows_the_expected_isomer():
    # PCl3F2: both F axial (from memory: electron diffraction), so F-P-F is the 180° axis
    note = "{PCl3F2: F-P-F 120°}"
    assert_flagged(note, "F-P-F 120°", "implausible-angle", "F-P-F is expected", "axis")
    assert_clean("{PCl3F2: F-P-F 180°, Cl-P-Cl 120°, Cl-P-F 90°}")


def test_angle_tolerance_setting_widens_the_range():
    from notelsp.review.document import review_text
    from notelsp.review.settings import Settings

    note = "{CH4: H-C-H 117°}"  # 7.5° beyond the 108.5-110.5° tetrahedral range
    assert with_code(note, "implausible-angle")
    assert not review_text(note, "markdown", Settings(angle_tolerance=10.0)).findings


def test_ch2f2_angle_order_follows_experiment():
    ffc, hch = g2_angle("H2CF2", "C", ("F", "F")), g2_angle("H2CF2", "C", ("H", "H"))
    assert ffc < hch  # the measured order the rule must agree with
    assert_clean("{CH2F2: F-C-F < H-C-H}")
    assert_clean("{CH2F2: H-C-H > F-C-F}")
    note = "{CH2F2: F-C-F > H-C-H}"
    finding = assert_flagged(note, "F-C-F > H-C-H", "angle-order-against-bent",
                             "claimed F-C-F > H-C-H", "predicted F-C-F < H-C-H")
    assert "low confidence" not in finding.message
    assert finding.fixes[0].replacement == "F-C-F < H-C-H"


def test_ch2cl2_steric_exception_is_a_low_confidence_warning():
    clccl, hch = g2_angle("H2CCl2", "C", ("Cl", "Cl")), g2_angle("H2CCl2", "C", ("H", "H"))
    assert clccl > hch  # measured: the large Cl atoms push apart, against Bent's electronic order
    assert_clean("{CH2Cl2: Cl-C-Cl > H-C-H}")
    note = "{CH2Cl2: Cl-C-Cl < H-C-H}"
    finding = assert_flagged(note, "Cl-C-Cl < H-C-H", "angle-order-against-bent",
                             "claimed Cl-C-Cl < H-C-H", "predicted Cl-C-Cl > H-C-H", "low confidence", "steric")
    assert finding.severity.value == "warning"  # at most a warning, never an error


def test_angle_order_on_mixed_centre_with_multiple_bond():
    # POCl3: the doubly bonded O takes s-rich hybrids, so Cl-P-O > Cl-P-Cl (from memory: 114.7° vs 103.7°)
    assert_clean("{POCl3: Cl-P-O > Cl-P-Cl}")
    assert_flagged("{POCl3: Cl-P-O < Cl-P-Cl}", "Cl-P-O < Cl-P-Cl", "angle-order-against-bent",
                   "predicted Cl-P-O > Cl-P-Cl")


def test_angle_order_between_different_centres_is_not_judged():
    assert not with_code("{C2H6: H-C-H < H-N-H}", "angle-order-against-bent")


@pytest.mark.parametrize(
    "comparison, bond, right, wrong",
    [
        ("CF4 vs CH3F", "C-F", "shorter", "longer"),  # 1.32 vs 1.38 Å (from memory)
        ("CH3F vs CF4", "C-F", "longer", "shorter"),
    ],
)
def test_bond_length_against_bent(comparison, bond, right, wrong):
    note = f"{{{comparison}: {bond} {wrong}}}"
    first = comparison.split()[0]
    finding = assert_flagged(note, f"{bond} {wrong}", "bond-length-against-bent",
                             f"{bond} is claimed {wrong} in {first}", f"predicted {right} (Bent's rule")
    assert finding.fixes[0].replacement == f"{bond} {right}"
    assert_clean(f"{{{comparison}: {bond} {right}}}")


def test_central_bond_of_a_perfluorinated_molecule_is_the_steric_exception():
    # CF3 for CH3 lengthens C-C by 0.03-0.04 A: gas-phase electron diffraction,
    # Hilderbrandt, Andreassen & Bauer, J. Phys. Chem. 74, 1586 (1970)
    finding = assert_flagged("{C2F6 vs C2H6: C-C shorter}", "C-C shorter", "bond-length-against-bent",
                             "predicted longer", "low confidence")
    assert finding.severity.value == "warning"
    assert finding.fixes[0].replacement == "C-C longer"
    assert_clean("{C2F6 vs C2H6: C-C longer}")


def test_bond_length_claim_without_comparison_is_not_judged():
    assert not with_code("{CF4: C-F shorter}", "bond-length-against-bent")
    assert not with_code("{CH4 vs SiH4: C-F shorter}", "bond-length-against-bent")  # no such bond in either
