"""Findings and Markdown from a result, without running a calculation.

The optimised structures here are stand-ins built from reference geometries
(ASE's G2 set for water, Curtiss et al. J. Chem. Phys. 1997) and a
hand-made trigonal bipyramid (angles 90/120/180, common practice, no source);
the energies are invented inputs for the ordering logic, not results.
"""

import math

from ase.build import molecule

from notelsp.crosscheck.levels import parse_level
from notelsp.crosscheck.protocol import OptimisedIsomer
from notelsp.crosscheck.report import cross_check_findings, cross_check_markdown, energy_order, HARTREE_IN_KJ_PER_MOL
from notelsp.crosscheck.runner import CrossCheckResult
from notelsp.notation import scan
from notelsp.review.findings import Severity

LEVEL = parse_level("HF/STO-3G")


def water_result() -> CrossCheckResult:
    mol = molecule("H2O")
    order = sorted(range(3), key=lambda i: mol.get_chemical_symbols()[i] != "O")
    symbols = tuple(mol.get_chemical_symbols()[i] for i in order)
    positions = tuple(tuple(float(c) for c in mol.positions[i]) for i in order)
    isomer = OptimisedIsomer("H2O", "", 1, LEVEL.label, symbols, positions, ("vertex", "vertex"), -75.0, True, 4)
    return CrossCheckResult("H2O", LEVEL, "done", (isomer,))


def tbp(label: str, rank: int, chlorine_site: str, energy: float) -> OptimisedIsomer:
    axial = [(0.0, 0.0, 1.6), (0.0, 0.0, -1.6)]
    equatorial = [(1.6 * math.cos(a), 1.6 * math.sin(a), 0.0) for a in (0, 2 * math.pi / 3, 4 * math.pi / 3)]
    positions = [(0.0, 0.0, 0.0), *axial, *equatorial]
    sites = ["axial", "axial", "equatorial", "equatorial", "equatorial"]
    symbols = ["P", "F", "F", "F", "F", "F"]
    symbols[1 if chlorine_site == "axial" else 3] = "Cl"
    return OptimisedIsomer("PF4Cl", label, rank, LEVEL.label, tuple(symbols), tuple(positions), tuple(sites), energy, True, 9)


def annotation_of(text: str):
    (annotation,) = scan(text, "markdown").annotations
    return annotation


def test_angle_claim_far_from_the_computed_angle_is_a_warning():
    note = annotation_of("{H2O: H-O-H 120°}")
    findings = cross_check_findings(water_result(), note)
    angle = [f for f in findings if f.code == "computed-angle"]
    assert len(angle) == 1 and angle[0].severity is Severity.WARNING
    assert angle[0].message.startswith("computed (HF/STO-3G): H-O-H 104.0°")
    assert angle[0].span == note.claims[0].span


def test_angle_claim_close_to_the_computed_angle_is_information():
    findings = cross_check_findings(water_result(), annotation_of("{H2O: H-O-H 104.5°}"))
    (angle,) = [f for f in findings if f.code == "computed-angle"]
    assert angle.severity is Severity.INFORMATION and "agrees within 5°" in angle.message
    structure = [f for f in findings if f.code == "computed-structure"]
    assert structure and "O-H 0.969 Å" in structure[0].message


def test_isomer_order_and_placement_claims():
    gap = 0.005  # hartree, an invented input
    result = CrossCheckResult(
        "PF4Cl", LEVEL, "done",
        (tbp("Cl equatorial", 1, "equatorial", -1183.0), tbp("Cl axial", 2, "axial", -1183.0 + gap)),
    )
    ordered = energy_order(result)
    assert [e.isomer.isomer for e in ordered] == ["Cl equatorial", "Cl axial"]
    assert math.isclose(ordered[1].relative_kj_per_mol, gap * HARTREE_IN_KJ_PER_MOL)
    wrong = cross_check_findings(result, annotation_of("{PF4Cl: Cl axial}"))
    (placement,) = [f for f in wrong if f.code == "computed-placement"]
    assert placement.severity is Severity.WARNING and "13.1 kJ/mol above the lowest isomer, Cl equatorial" in placement.message
    right = cross_check_findings(result, annotation_of("{PF4Cl: Cl equatorial}"))
    (placement,) = [f for f in right if f.code == "computed-placement"]
    assert placement.severity is Severity.INFORMATION
    (order,) = [f for f in right if f.code == "computed-isomers"]
    assert "as the rules expect" in order.message


def test_markdown_sets_computed_beside_rules_and_claims_and_states_limits():
    text = cross_check_markdown(water_result(), annotation_of("{H2O: H-O-H 120°}"))
    assert "### Cross-check of H2O (HF/STO-3G)" in text
    assert "| H-O-H | 104.0° |" in text and "H-O-H 120°" in text
    assert "minimal basis" in text and "no electron correlation" in text and "no solvent" in text


def test_hazardous_species_carry_the_caution():
    mol = molecule("PH3")
    symbols = tuple(mol.get_chemical_symbols())
    order = sorted(range(4), key=lambda i: symbols[i] != "P")
    isomer = OptimisedIsomer(
        "PH3", "", 1, LEVEL.label, tuple(symbols[i] for i in order),
        tuple(tuple(float(c) for c in mol.positions[i]) for i in order), ("vertex",) * 3, -338.0, True, 5,
    )
    text = cross_check_markdown(CrossCheckResult("PH3", LEVEL, "done", (isomer,)), annotation_of("{PH3: sp3}"))
    assert "not safety data" in text


def test_a_check_that_could_not_run_says_why():
    result = CrossCheckResult("SF6", LEVEL, "unsupported", (), "SF6 has 7 atoms; the cross-check is bounded to 4")
    (finding,) = cross_check_findings(result, annotation_of("{SF6: octahedral}"))
    assert finding.code == "cross-check-not-run" and "bounded to 4" in finding.message


def test_every_code_the_cross_check_reports_is_a_rule_the_settings_accept():
    from notelsp.review.rules import RULES
    from notelsp.review.settings import settings_from_toml

    result = CrossCheckResult(
        "PF4Cl", LEVEL, "done",
        (tbp("Cl equatorial", 1, "equatorial", -1183.0), tbp("Cl axial", 2, "axial", -1183.005)),
    )
    findings = cross_check_findings(result, annotation_of("{PF4Cl: Cl axial, F-P-F 100°}"))
    findings += cross_check_findings(CrossCheckResult("SF6", LEVEL, "unsupported", (), "too large"),
                                     annotation_of("{SF6: octahedral}"))
    codes = sorted({f.code for f in findings})
    assert codes == ["computed-angle", "computed-isomers", "computed-placement", "computed-structure",
                     "cross-check-not-run"]
    for code in codes:
        assert RULES[code].reported_outside and RULES[code].title
    listed = ", ".join(f'"{code}"' for code in codes)
    severities = "\n".join(f'"{code}" = "hint"' for code in codes)
    _, problems = settings_from_toml(f"[review]\ndisabled = [{listed}]\n[review.severity]\n{severities}\n")
    assert problems == []


def test_settings_disable_a_cross_check_code_and_set_its_severity():
    from notelsp.review.settings import settings_from_toml

    settings, problems = settings_from_toml('[review]\ndisabled = ["computed-structure"]\n'
                                            '[review.severity]\n"computed-angle" = "error"\n')
    assert problems == []
    wrong = cross_check_findings(water_result(), annotation_of("{H2O: H-O-H 120°}"), settings=settings)
    assert "computed-structure" not in {f.code for f in wrong}
    (angle,) = [f for f in wrong if f.code == "computed-angle"]
    assert angle.severity is Severity.ERROR
    # agreement stays information whatever the disagreement is set to
    right = cross_check_findings(water_result(), annotation_of("{H2O: H-O-H 104.5°}"), settings=settings)
    (angle,) = [f for f in right if f.code == "computed-angle"]
    assert angle.severity is Severity.INFORMATION


def test_the_review_never_runs_the_cross_check_rules():
    from notelsp.review.document import review_text

    assert not any(f.code == "computed-angle" for f in review_text("{H2O: H-O-H 120°}").findings)
