"""Angle claims about a centre of a molecule, judged against the computed molecule (real GFN2-xTB runs).

The molecules are computed here with the project's pool (no disk cache).  The computed
angles are first held against ASE's G2 set (``ase.collections.g2``, MP2(full)/6-31G(d),
Curtiss et al., J. Chem. Phys. 106, 1063 (1997)) for the same angle, so the claims
below are placed relative to a checked value.
"""

from __future__ import annotations

import pytest
from ase.collections import g2

from notelsp.compute import ANGLE_UNCERTAINTY_DEG, GeometryPool
from notelsp.review.document import review_text
from notelsp.review.findings import Severity

G2_SOURCE = "ASE G2 set (Curtiss et al., J. Chem. Phys. 106, 1063 (1997))"


def _g2_angle(name: str, centre_element: str, ends: tuple[str, str], centre_bonded_to: str | None = None) -> float:
    """The G2 angle ends[0]-centre-ends[1] (by element), averaged over the equivalent choices."""
    atoms = g2[name]
    symbols = atoms.get_chemical_symbols()
    from ase.data import covalent_radii

    def bonded(i, j):
        return atoms.get_distance(i, j) < 1.25 * (covalent_radii[atoms.numbers[i]] + covalent_radii[atoms.numbers[j]])

    values = []
    for c in range(len(atoms)):
        if symbols[c] != centre_element:
            continue
        if centre_bonded_to is not None and not any(symbols[j] == centre_bonded_to and bonded(c, j)
                                                    for j in range(len(atoms)) if j != c):
            continue
        around = [j for j in range(len(atoms)) if j != c and bonded(c, j)]
        for i, a in enumerate(around):
            for b in around[i + 1:]:
                if sorted((symbols[a], symbols[b])) == sorted(ends):
                    values.append(float(atoms.get_angle(a, c, b)))
    return sum(values) / len(values)


@pytest.fixture(scope="module")
def computed(tmp_path_factory):
    with pytest.MonkeyPatch.context() as patch:
        patch.delenv("NOTELSP_CACHE_DIR", raising=False)
        patch.setenv("XDG_CACHE_HOME", str(tmp_path_factory.mktemp("xdg-cache")))
        with GeometryPool() as pool:
            names = ["C2H4", "CH3OH", "CH3COOH"]
            return dict(zip(names, pool.compute(names)))


def _review(text: str, computed: dict):
    return review_text(text, computed=computed).findings


def _from_calculation(findings):
    return [f for f in findings if f.code == "angle-against-calculation"]


# (claim about a centre, G2 molecule, centre element, ends, the centre's other neighbour to tell it apart)
CHECKED = [
    ("{C2H4: H-C1-H %s°}", "C2H4", "C", ("H", "H"), None),
    ("{CH3OH: C-O-H %s°}", "CH3OH", "O", ("C", "H"), None),
    ("{CH3COOH: H-C1-H %s°}", "CH3COOH", "C", ("H", "H"), "H"),
    ("{CH3COOH: O-C2-O %s°}", "CH3COOH", "C", ("O", "O"), None),
]


@pytest.mark.parametrize("template, name, centre, ends, beside", CHECKED)
def test_a_claim_at_the_g2_angle_passes_the_calculation(computed, template, name, centre, ends, beside):
    reference = _g2_angle(name, centre, ends, beside)
    findings = _review(template % f"{reference:.1f}", computed)
    assert _from_calculation(findings) == [], (G2_SOURCE, reference, findings)


@pytest.mark.parametrize("template, name, centre, ends, beside", CHECKED[:3])
def test_a_claim_ten_degrees_off_is_flagged_with_the_centre_named(computed, template, name, centre, ends, beside):
    reference = _g2_angle(name, centre, ends, beside)
    assert 10.0 > ANGLE_UNCERTAINTY_DEG
    # inside the rules' window for the centre (they let it pass alone), 10 degrees from the G2 angle
    for off in (reference + 10.0, reference - 10.0):
        text = template % f"{off:.1f}"
        if any(f.code == "implausible-angle" for f in review_text(text).findings):
            continue
        (finding,) = _from_calculation(_review(text, computed))
        assert finding.severity == Severity.WARNING and finding.fixes == ()
        label = text[text.index("-") + 1:].split("-")[0]
        assert f"{name} ({label})" in finding.message
        assert "computed (GFN2-xTB)" in finding.message
        return
    pytest.fail("both claims 10° off were flagged by the rules already")


# Point groups of the conformers chemists mean (common practice, no source): ethene is planar D2h,
# methanol (staggered) and acetic acid (planar heavy-atom frame) have one mirror plane, Cs.
MODEL_GROUPS = {"C2H4": ("D2h", False), "CH3OH": ("Cs", True), "CH3COOH": ("Cs", True)}


@pytest.mark.parametrize("name", sorted(MODEL_GROUPS))
def test_a_computed_molecule_keeps_the_point_group_of_the_model_it_started_from(name, computed):
    group, polar = MODEL_GROUPS[name]
    assert computed[name].model_point_group == group and computed[name].model_unavailable is None
    from notelsp.chem.polarity import is_polar

    assert is_polar(group) is polar


@pytest.mark.parametrize("name", sorted(MODEL_GROUPS))
def test_polarity_is_judged_from_the_kept_model_without_embedding_again(name, computed, monkeypatch):
    _, polar = MODEL_GROUPS[name]
    wrong = "nonpolar" if polar else "polar"
    text = f"{{{name}: {wrong}}} and {{{name}: {'polar' if polar else 'nonpolar'}}}"
    rules_only = [(f.code, f.message) for f in _review(text, {})]
    from notelsp.chem import molecule_geometry

    def no_second_model(molecule):
        raise AssertionError("the review embedded the molecule again")

    monkeypatch.setattr(molecule_geometry, "whole_molecule_symmetry", no_second_model)
    with_model = [(f.code, f.message) for f in _review(text, {name: computed[name]})
                  if f.code == "wrong-polarity"]
    assert [m for m in rules_only if m[0] == "wrong-polarity"] == with_model
    assert len(with_model) == 1 and wrong in with_model[0][1]
