"""What chemists measure, as the notation reads it (spellings are common practice, no source)."""

from __future__ import annotations

import pytest

from notelsp.notation.model import (
    AngleClaim,
    AxeClaim,
    BondLengthValueClaim,
    CouplingClaim,
    ElectronGeometryClaim,
    HybridizationClaim,
    MagnetismClaim,
    ShapeClaim,
    UnpairedElectronClaim,
)
from notelsp.notation.transform import parse_body, split_claims


def claims(body: str):
    parsed = parse_body(body)
    assert not parsed.errors, parsed.errors
    return parsed.claims


@pytest.mark.parametrize("written, atoms", [("H–N–H 107°", ("H", "N", "H")), ("H—N—H 107°", ("H", "N", "H")),
                                            ("H−N−H 107°", ("H", "N", "H"))])
def test_dashes_and_the_minus_sign_join_atoms(written, atoms):
    (claim,) = claims(f"NH3: {written}")
    assert isinstance(claim, AngleClaim) and claim.atoms == atoms


@pytest.mark.parametrize("written, value, allowance", [
    ("121.9(2)°", 121.9, 0.6),      # three standard uncertainties of 0.2°
    ("1.5(12)°", 1.5, 3.6),
    ("117.4 ± 0.2°", 117.4, 0.2),
    ("117.4 +/- 0.5°", 117.4, 0.5),
    ("107°", 107.0, 0.0),
])
def test_uncertainties(written, value, allowance):
    (claim,) = claims(f"NH3: {written}")
    assert claim.low == value and claim.allowance == pytest.approx(allowance)


@pytest.mark.parametrize("written, angstrom, bond, allowance", [
    ("C-F 1.39 Å", 1.39, ("C", "F"), 0.0),
    ("C–F 139 pm", 1.39, ("C", "F"), 0.0),
    ("bond length 0.139 nm", 1.39, None, 0.0),
    ("1.391(3) Å", 1.391, None, 0.009),
    ("C-F = 1.39 A", 1.39, ("C", "F"), 0.0),
])
def test_bond_lengths(written, angstrom, bond, allowance):
    (claim,) = claims(f"CF4: {written}")
    assert isinstance(claim, BondLengthValueClaim)
    assert claim.angstrom == pytest.approx(angstrom) and claim.bond == bond
    assert claim.allowance == pytest.approx(allowance)


@pytest.mark.parametrize("written", ["1J(C,H) 125 Hz", "¹J(¹³C,¹H) = 125 Hz", "1JCH 125 Hz", "1J(C-H) 125 Hz"])
def test_couplings_stay_one_claim_despite_their_comma(written):
    (claim,) = claims(f"CH4: {written}, sp3")[:1]
    assert isinstance(claim, CouplingClaim)
    assert claim.bonds == 1 and claim.nuclei == ("C", "H") and claim.hertz == 125.0


def test_split_claims_respects_parentheses():
    assert split_claims(" 1J(C,H) 125 Hz, sp3; bent") == [" 1J(C,H) 125 Hz", " sp3", " bent"]


def test_unpaired_electrons_magnetism_and_axe():
    unpaired, magnetism, axe = claims("NO2: 1 unpaired electron, paramagnetic, AX2E")
    assert isinstance(unpaired, UnpairedElectronClaim) and unpaired.count == 1
    assert isinstance(magnetism, MagnetismClaim) and magnetism.paramagnetic
    assert isinstance(axe, AxeClaim) and (axe.bonded, axe.lone_pairs) == (2, 1)
    (axe,) = claims("ClF3: AX3E2")
    assert (axe.bonded, axe.lone_pairs) == (3, 2)


@pytest.mark.parametrize("written, kind, value", [
    ("dsp3", HybridizationClaim, "sp3d"), ("d2sp3", HybridizationClaim, "sp3d2"),
    ("sawhorse", ShapeClaim, "seesaw"), ("distorted octahedral", ShapeClaim, "distorted-octahedral"),
    ("tetrahedral electron geometry", ElectronGeometryClaim, "tetrahedral"),
])
def test_common_spellings(written, kind, value):
    (claim,) = claims(f"SF4: {written}")
    assert isinstance(claim, kind)
    assert value in (getattr(claim, "label", None), getattr(claim, "shape", None), getattr(claim, "geometry", None))
