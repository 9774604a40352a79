"""Positional isomers: counts, point groups, chirality, names and ranking."""

import pytest

from notelsp.chem.isomers import (
    MAX_ARRANGEMENTS,
    IsomerLimitExceeded,
    diastereomer_count,
    expected,
    isomers_for,
)
from notelsp.chem.model import LONE_PAIR, Ligand
from notelsp.elements import element


def ligand(symbol: str, bond_order: int = 1, label: str | None = None) -> Ligand:
    return Ligand(symbol, label or symbol, bond_order, element(symbol).electronegativity)


def ligands(*symbols: str) -> list[Ligand]:
    return [ligand(s) for s in symbols]


def centre(symbol: str) -> float:
    return element(symbol).electronegativity  # Pauling, via mendeleev


# --- counts ---------------------------------------------------------------------
# (geometry, ligands, lone pairs, stereoisomers with enantiomers separate, without)
# all combinatorial facts derivable by hand (common practice, no source)
COUNTS = [
    ("octahedral", ("F",) * 4 + ("Cl",) * 2, 0, 2, 2),  # MA4B2: cis, trans
    ("octahedral", ("F",) * 3 + ("Cl",) * 3, 0, 2, 2),  # MA3B3: fac, mer
    ("octahedral", ("F", "F", "Cl", "Cl", "Br", "Br"), 0, 6, 5),  # MA2B2C2: 5 plus one mirror image
    ("octahedral", ("F", "Cl", "Br", "I", "H", "O"), 0, 30, 15),  # six different: 6!/24, all chiral
    ("octahedral", ("F",) * 5 + ("Cl",), 0, 1, 1),  # MA5B
    ("octahedral", ("F",) * 4, 2, 2, 2),  # AX4E2: lone pairs cis or trans
    ("trigonal-bipyramidal", ("F",) * 3 + ("Cl",) * 2, 0, 3, 3),  # MA3B2: 0, 1 or 2 B axial
    ("trigonal-bipyramidal", ("F",) * 4 + ("Cl",), 0, 2, 2),  # MA4B: B axial or equatorial
    ("trigonal-bipyramidal", ("F", "Cl", "Br", "I", "H"), 0, 20, 10),  # five different: 5!/6, all chiral
    ("trigonal-bipyramidal", ("F",) * 4, 1, 2, 2),  # AX4E: lone pair axial or equatorial
    ("trigonal-bipyramidal", ("F",) * 3, 2, 3, 3),  # AX3E2: lone pairs ax/ax, ax/eq, eq/eq
    ("tetrahedral", ("F", "Cl", "Br", "H"), 0, 2, 1),  # MABCD: a pair of enantiomers
    ("tetrahedral", ("F", "F", "Cl", "Cl"), 0, 1, 1),
    ("trigonal-planar", ("F", "Cl", "Br"), 0, 1, 1),
    ("linear", ("F", "Cl"), 0, 1, 1),
    ("pentagonal-bipyramidal", ("F",) * 6 + ("Cl",), 0, 2, 2),  # MA6B: B axial or equatorial
    ("pentagonal-bipyramidal", ("F",) * 5, 2, 4, 4),  # AX5E2: ax/ax, ax/eq, eq 72°, eq 144°
    ("pentagonal-bipyramidal", ("F",) * 5 + ("Cl",) * 2, 0, 4, 4),  # same sites, ligands for lone pairs
]


@pytest.mark.parametrize("geometry, symbols, lone_pairs, total, without_mirrors", COUNTS)
def test_isomer_counts(geometry, symbols, lone_pairs, total, without_mirrors):
    isomers = isomers_for(geometry, ligands(*symbols), lone_pairs)
    assert len(isomers) == total
    assert diastereomer_count(isomers) == without_mirrors


SEVEN_DIFFERENT = ("F", "Cl", "Br", "I", "H", "O", "N")


def test_seven_different_ligands_are_refused_at_the_default_limit():
    # 7! = 5040 assignments of seven different ligands to seven sites (common practice, no source)
    assert MAX_ARRANGEMENTS < 5040
    with pytest.raises(IsomerLimitExceeded, match="5,040 site assignments exceed the limit"):
        isomers_for("pentagonal-bipyramidal", ligands(*SEVEN_DIFFERENT), 0)


def test_seven_different_ligands_are_counted_right_above_the_limit(monkeypatch):
    import notelsp.chem.isomers as module

    # 7!/|D5| = 5040/10 = 504 stereoisomers, all chiral (common practice, no source)
    monkeypatch.setattr(module, "MAX_ARRANGEMENTS", 5040)
    module._isomers.cache_clear()
    try:
        isomers = isomers_for("pentagonal-bipyramidal", ligands(*SEVEN_DIFFERENT), 0)
    finally:
        module._isomers.cache_clear()
    assert len(isomers) == 504
    assert diastereomer_count(isomers) == 252
    assert all(isomer.chiral for isomer in isomers)
    assert len({isomer.name for isomer in isomers}) == 504  # every isomer has a name of its own


def test_the_largest_accepted_enumeration_still_runs():
    # five different ligands and a pair: 7!/2! = 2520 assignments, 2520/10 = 252 isomers,
    # none with a mirror plane (common practice, no source)
    isomers = isomers_for("pentagonal-bipyramidal", ligands("F", "F", "Cl", "Br", "I", "H", "O"), 0)
    assert MAX_ARRANGEMENTS >= 2520
    assert len(isomers) == 252


def test_over_the_limit_is_refused_with_a_reason(monkeypatch):
    import notelsp.chem.isomers as module

    monkeypatch.setattr(module, "MAX_ARRANGEMENTS", 10)
    module._isomers.cache_clear()
    try:
        with pytest.raises(IsomerLimitExceeded, match="20 site assignments exceed the limit of 10"):
            module.isomers_for("octahedral", ligands("F", "F", "F", "Cl", "Cl", "Cl"), 0)  # 6!/(3!3!) = 20
    finally:
        module._isomers.cache_clear()


def test_domain_count_must_fill_the_polyhedron():
    with pytest.raises(ValueError):
        isomers_for("octahedral", ligands("F", "F"), 1)
    with pytest.raises(ValueError):
        isomers_for("cubic", ligands("F"), 0)


def test_site_counts_are_those_of_the_polyhedra():
    from notelsp.chem.isomers import SITE_COUNTS
    from notelsp.chem.polyhedra import polyhedron

    assert {name: len(polyhedron(name).sites) for name in SITE_COUNTS} == SITE_COUNTS


@pytest.mark.parametrize(("geometry", "symbols", "lone_pairs"), [
    ("octahedral", ("F", "F", "F", "F", "Cl", "Cl"), 0),  # accepted
    ("octahedral", ("F", "F"), 1),  # too few domains for the sites
    ("cubic", ("F",), 0),  # no such geometry
    ("square-pyramidal", ("F",) * 5, 0),  # a polyhedron, but not an electron geometry
    ("pentagonal-bipyramidal", SEVEN_DIFFERENT, 0),  # over the limit
])
def test_refusal_says_exactly_what_isomers_for_raises(geometry, symbols, lone_pairs):
    from notelsp.chem.isomers import refusal

    try:
        isomers_for(geometry, ligands(*symbols), lone_pairs)
    except ValueError as error:
        raised = str(error)
    else:
        raised = None
    assert refusal(geometry, ligands(*symbols), lone_pairs) == raised


def test_results_are_cached_by_arguments():
    first = isomers_for("octahedral", ligands("F", "F", "F", "F", "Cl", "Cl"), 0)
    again = isomers_for("octahedral", tuple(ligands("F", "F", "F", "F", "Cl", "Cl")), 0)
    assert first is again


# --- chirality and enantiomers ---------------------------------------------------


def test_enantiomers_point_at_each_other_and_share_a_rank():
    isomers = isomers_for("octahedral", ligands("F", "F", "Cl", "Cl", "Br", "Br"), 0)
    chiral = [i for i, isomer in enumerate(isomers) if isomer.chiral]
    assert len(chiral) == 2  # the all-cis arrangement (common practice, no source)
    a, b = chiral
    assert isomers[a].enantiomer == b and isomers[b].enantiomer == a
    assert isomers[a].rank == isomers[b].rank
    assert isomers[a].point_group == "C1"
    assert "enantiomer" in isomers[a].name


# --- point groups and polarity ---------------------------------------------------
# Point groups of the VSEPR arrangements with lone pairs counted as domains
# (common practice, no source).
POINT_GROUPS = [
    ("SF4", "trigonal-bipyramidal", ("F",) * 4, 1, "C2v", True),
    ("ClF3", "trigonal-bipyramidal", ("F",) * 3, 2, "C2v", True),
    ("XeF2", "trigonal-bipyramidal", ("F",) * 2, 3, "D∞h", False),
    ("XeF4", "octahedral", ("F",) * 4, 2, "D4h", False),
    ("BrF5", "octahedral", ("F",) * 5, 1, "C4v", True),
    ("NH3", "tetrahedral", ("H",) * 3, 1, "C3v", True),
    ("H2O", "tetrahedral", ("H",) * 2, 2, "C2v", True),
    ("HF", "tetrahedral", ("F",), 3, "C∞v", True),
    ("CH4", "tetrahedral", ("H",) * 4, 0, "Td", False),
    ("CH2F2", "tetrahedral", ("H", "H", "F", "F"), 0, "C2v", True),
    ("BF3", "trigonal-planar", ("F",) * 3, 0, "D3h", False),
    ("CO2", "linear", ("O",) * 2, 0, "D∞h", False),
    ("PCl3F2", "trigonal-bipyramidal", ("F", "F", "Cl", "Cl", "Cl"), 0, "D3h", False),
    ("SF6", "octahedral", ("F",) * 6, 0, "Oh", False),
    ("XeF5-", "pentagonal-bipyramidal", ("F",) * 5, 2, "D5h", False),
    ("IF7", "pentagonal-bipyramidal", ("F",) * 7, 0, "D5h", False),
]
CENTRES = {"SF4": "S", "ClF3": "Cl", "XeF2": "Xe", "XeF4": "Xe", "BrF5": "Br", "NH3": "N", "H2O": "O", "HF": "F",
           "CH4": "C", "CH2F2": "C", "BF3": "B", "CO2": "C", "PCl3F2": "P", "SF6": "S", "XeF5-": "Xe", "IF7": "I"}


@pytest.mark.parametrize("species, geometry, symbols, lone_pairs, group, polar", POINT_GROUPS)
def test_expected_point_group_and_polarity(species, geometry, symbols, lone_pairs, group, polar):
    chi = element(CENTRES[species]).electronegativity if species != "HF" else element("H").electronegativity
    best = isomers_for(geometry, ligands(*symbols), lone_pairs, centre_electronegativity=chi)[0]
    assert best.rank == 1
    assert best.point_group == group
    assert best.polar is polar
    if not polar:
        assert best.dipole_debye == 0.0
    else:
        assert best.dipole_debye >= 0.0


def test_dipole_grows_with_the_electronegativity_difference():
    # CH3F-like tetrahedral CH3X: F pulls more than Cl (Pauling values via mendeleev)
    f = isomers_for("tetrahedral", ligands("H", "H", "H", "F"), 0, centre_electronegativity=centre("C"))[0]
    cl = isomers_for("tetrahedral", ligands("H", "H", "H", "Cl"), 0, centre_electronegativity=centre("C"))[0]
    assert f.point_group == cl.point_group == "C3v"
    assert f.dipole_debye > cl.dipole_debye > 0


# --- ranking ---------------------------------------------------------------------


def names_and_ranks(isomers):
    return [(isomer.name, isomer.rank) for isomer in isomers]


def test_lone_pair_equatorial_in_a_trigonal_bipyramid():
    # SF4: the lone pair is equatorial (VSEPR, Gillespie-Nyholm; from memory)
    isomers = isomers_for("trigonal-bipyramidal", ligands("F", "F", "F", "F"), 1, centre_electronegativity=centre("S"))
    best = isomers[0]
    assert best.name == "lone pair equatorial"
    assert best.confidence == "high"
    assert [s.position for s in best.sites if s.label == LONE_PAIR] == ["equatorial"]
    assert isomers[1].name == "lone pair axial" and isomers[1].rank == 2


def test_two_lone_pairs_trans_in_an_octahedron():
    # XeF4 is square planar: lone pairs trans (from memory)
    isomers = isomers_for("octahedral", ligands("F", "F", "F", "F"), 2, centre_electronegativity=centre("Xe"))
    assert names_and_ranks(isomers) == [("lone pairs trans", 1), ("lone pairs cis", 2)]


def test_electronegative_ligands_axial():
    # PCl3F2: both F axial; PCl2F3: two F axial, Cl equatorial (Bent's rule; gas-phase structures, from memory)
    pcl3f2 = isomers_for("trigonal-bipyramidal", ligands("F", "F", "Cl", "Cl", "Cl"), 0, centre_electronegativity=centre("P"))
    assert pcl3f2[0].name == "both F axial" and pcl3f2[0].confidence == "high"
    assert "Bent" in pcl3f2[0].reason
    pcl2f3 = isomers_for("trigonal-bipyramidal", ligands("F", "F", "F", "Cl", "Cl"), 0, centre_electronegativity=centre("P"))
    assert pcl2f3[0].name == "both Cl equatorial"
    assert [s.position for s in pcl2f3[0].sites if s.symbol == "F"].count("axial") == 2


def test_methyl_like_carbon_equatorial():
    # CH3PF4: the carbon ligand is equatorial (from memory)
    isomers = isomers_for("trigonal-bipyramidal", [ligand("C", label="CH3")] + ligands("F", "F", "F", "F"), 0,
                          centre_electronegativity=centre("P"))
    assert isomers[0].name == "CH3 equatorial"


def test_doubly_bonded_oxygen_equatorial():
    # SOF4: O equatorial (from memory)
    isomers = isomers_for("trigonal-bipyramidal", [ligand("O", 2)] + ligands("F", "F", "F", "F"), 0,
                          centre_electronegativity=centre("S"))
    assert isomers[0].name == "O equatorial" and isomers[0].confidence == "high"
    assert "multiply bonded" in isomers[0].reason


def test_oxygen_trans_to_the_lone_pair_in_a_square_pyramid():
    # XeOF4: O apical, opposite the lone pair (from memory)
    isomers = isomers_for("octahedral", [ligand("O", 2)] + ligands("F", "F", "F", "F"), 1,
                          centre_electronegativity=centre("Xe"))
    assert isomers[0].name == "O apical"
    assert isomers[0].point_group == "C4v"


def test_lone_pairs_of_xef5_minus_axial():
    # XeF5-: pentagonal planar, lone pairs axial (from memory)
    isomers = isomers_for("pentagonal-bipyramidal", ligands(*("F",) * 5), 2, centre_electronegativity=centre("Xe"))
    assert isomers[0].name == "both lone pairs axial"
    assert {isomer.name for isomer in isomers} == {
        "both lone pairs axial",
        "one lone pair axial, one equatorial",
        "both lone pairs equatorial (adjacent)",
        "both lone pairs equatorial (apart)",
    }


def test_names_of_octahedral_isomers():
    cis_trans = isomers_for("octahedral", ligands("F", "F", "F", "F", "Cl", "Cl"), 0)
    assert {i.name for i in cis_trans} == {"Cl cis", "Cl trans"}
    fac_mer = isomers_for("octahedral", ligands("F", "F", "F", "Cl", "Cl", "Cl"), 0)
    assert {i.name for i in fac_mer} == {"Cl fac", "Cl mer"}


def test_names_are_unique_up_to_enantiomers():
    for geometry, symbols, lone_pairs, *_ in COUNTS:
        isomers = isomers_for(geometry, ligands(*symbols), lone_pairs)
        assert len({i.name for i in isomers}) == len(isomers)


def test_ranks_are_sorted_and_expected_is_rank_one():
    for geometry, symbols, lone_pairs, *_ in COUNTS:
        isomers = isomers_for(geometry, ligands(*symbols), lone_pairs)
        ranks = [i.rank for i in isomers]
        assert ranks == sorted(ranks) and ranks[0] == 1
        assert expected(isomers) and all(i.rank == 1 for i in expected(isomers))
        assert all(i.reason and i.confidence in ("high", "medium", "low") for i in isomers)


def test_sites_carry_labels_symbols_and_vectors():
    isomers = isomers_for("trigonal-bipyramidal", [ligand("O", label="OH")] + ligands("F", "F", "F"), 1)
    for isomer in isomers:
        labels = sorted(s.label for s in isomer.sites)
        assert labels == sorted(["OH", "F", "F", "F", LONE_PAIR])
        for site in isomer.sites:
            assert site.symbol == (None if site.label == LONE_PAIR else ("O" if site.label == "OH" else "F"))
            assert abs(sum(v * v for v in site.vector) - 1.0) < 1e-9


# --- through the analysis -------------------------------------------------------


def test_analysis_ranks_isomers_with_the_centre_electronegativity(formula):
    from notelsp.chem import analyse

    centre_ = analyse(formula("PCl3F2")).centres[0]
    direct = isomers_for("trigonal-bipyramidal", centre_.ligands, 0, centre_electronegativity=centre("P"))
    assert centre_.isomers == direct


def test_analysis_places_an_odd_electron_on_a_site_of_its_own(formula):
    from notelsp.chem import analyse

    no2 = analyse(formula("NO2")).centres[0]  # bent radical, C2v (from memory)
    assert [i.point_group for i in expected(no2.isomers)] == ["C2v"]
    assert not any("isomers" in note for note in no2.notes)


def test_analysis_turns_isomer_failures_into_a_note(formula, monkeypatch):
    from notelsp.chem import analysis

    def refuse(*args, **kwargs):
        return "too many"

    # the analysis asks whether the enumeration would be refused; it enumerates only on first use
    monkeypatch.setattr(analysis.isomer_module, "refusal", refuse)
    centre_ = analysis._analyse(formula("SF4")).centres[0]  # uncached: the real analysis
    assert centre_.isomers == () and centre_.isomers_withheld == "too many"
    assert any(note.startswith("positional isomers not listed (too many)") for note in centre_.notes)


def test_analysis_of_seven_different_ligands_withholds_the_isomers(formula):
    from notelsp.chem import analysis

    # I with seven single bonds: steric number 7, no lone pair (common practice, no source)
    centre_ = analysis._analyse(formula("IFClBrH(OH)(CH3)(SH)")).centres[0]
    assert centre_.electron_geometry == "pentagonal-bipyramidal" and centre_.lone_pairs == 0
    assert centre_.isomers == ()
    assert centre_.isomers_withheld == f"5,040 site assignments exceed the limit of {MAX_ARRANGEMENTS:,}"
    assert centre_.shape == "pentagonal-bipyramidal"  # the rest of the analysis is still made


def test_analysis_lists_isomers_when_they_are_available(formula):
    from notelsp.chem import analysis

    assert analysis._analyse(formula("SF4")).centres[0].isomers_withheld is None
