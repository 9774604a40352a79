"""Formulas: grammar, Unicode, charges, groups, bounds and exact spans."""

import molmass
import pytest

from notelsp.notation import NotationSyntaxError, parse_formula
from notelsp.notation.model import Atom, Group
from notelsp.notation.transform import parse_formulas

# (our notation, the same species in molmass's syntax).  Reference counts come
# from molmass (test-only reference: molmass.Formula(...).composition(); its
# 'e-' entry is minus the charge).
MOLMASS_CASES = [
    ("ClF3", "ClF3"),
    ("PCl3F2", "PCl3F2"),
    ("PCl2(CH3)3", "PCl2(CH3)3"),
    ("Si(OH)4", "Si(OH)4"),
    ("NH4+", "[NH4]+"),
    ("SO4^2-", "SO4_2-"),
    ("SO4 2-", "SO4_2-"),
    ("SO₄²⁻", "SO4_2-"),
    ("[ICl4]-", "[ICl4]-"),
    ("N2H4", "N2H4"),
    ("C2F6", "C2F6"),
    ("Al2(SO4)3", "Al2(SO4)3"),
    ("[PCl4]+", "[PCl4]+"),
    ("Ca(NO3)2", "Ca(NO3)2"),
]


@pytest.mark.parametrize(("written", "molmass_form"), MOLMASS_CASES)
def test_element_counts_match_molmass(written, molmass_form):
    formula = parse_formula(written)
    reference = {symbol: item.count for symbol, item in molmass.Formula(molmass_form).composition().items()}
    electrons = reference.pop("e-", 0)
    assert formula.composition() == reference
    assert formula.charge == -electrons


def test_composition_keeps_order_of_first_appearance():
    assert list(parse_formula("PCl2(CH3)3").composition()) == ["P", "Cl", "C", "H"]


@pytest.mark.parametrize(
    ("written", "charge"),
    [("NH4+", 1), ("SO4^2-", -2), ("SO4 2-", -2), ("[ICl4]-", -1), ("NH₄⁺", 1), ("SO₄²⁻", -2), ("SO4^-2", -2), ("PO4 3−", -3), ("H2O", 0)],
)
def test_charges(written, charge):
    assert parse_formula(written).charge == charge


def test_spans_are_exact():
    text = "PCl2(CH3)3"
    formula = parse_formula(text)
    assert text[formula.span.start : formula.span.end] == text
    p, cl, group = formula.parts
    assert isinstance(p, Atom) and text[p.span.start : p.span.end] == "P"
    assert text[cl.span.start : cl.span.end] == "Cl2"
    assert isinstance(group, Group) and text[group.span.start : group.span.end] == "(CH3)3"
    assert group.count == 3


def test_bracketed_ion_and_explicit_centre():
    (formula,), errors = parse_formulas("HOCl @O")
    assert not errors
    assert formula.text == "HOCl" and formula.centre == "O"
    assert parse_formula("[ICl4]-").bracketed


def test_comparison_gives_two_formulas():
    formulas, errors = parse_formulas("C2H6 vs C2H4")
    assert not errors
    assert [f.text for f in formulas] == ["C2H6", "C2H4"]


def _only_error(text):
    formulas, errors = parse_formulas(text)
    assert formulas == ()
    assert len(errors) == 1
    return errors[0]


@pytest.mark.parametrize(
    ("text", "code", "at"),
    [
        ("ClF3x", "malformed-formula", "x"),
        ("PCl2(CH3", "malformed-formula", "("),
        ("Cl0F", "malformed-formula", "0"),
        ("Xq3", "unknown-element", "Xq"),
        ("CL3", "unknown-element", "CL"),
        ("C100H4", "formula-too-large", "100"),
        ("Fe^9+", "formula-too-large", "^9+"),
        ("Cl F3", "malformed-formula", " "),
        ("HOCl @N", "malformed-formula", "N"),
    ],
)
def test_errors_point_at_the_exact_characters(text, code, at):
    error = _only_error(text)
    assert error.code == code
    assert text[error.span.start : error.span.end] == at


def test_case_slip_suggests_the_symbol():
    error = _only_error("CL3")
    assert error.suggestion == "Cl"
    assert error.message == "unknown element 'CL'; did you mean 'Cl'?"


def test_nesting_bound():
    assert _only_error("A(((((H)2)2)2)2)2".replace("A", "C")).code == "formula-too-large"
    assert parse_formula("C((((H)2)2)2)2").composition() == {"C": 1, "H": 16}


def test_length_bound_without_parsing_megabytes():
    _, errors = parse_formulas("C" * 1_000_000)
    assert errors[0].code == "formula-too-large"
    _, errors = parse_formulas("CH2" * 30)
    assert errors[0].code == "formula-too-large"


def test_parse_formula_raises_with_error():
    with pytest.raises(NotationSyntaxError) as caught:
        parse_formula("ClF3x")
    assert caught.value.error.code == "malformed-formula"
    with pytest.raises(NotationSyntaxError):
        parse_formula("N2 vs O2")
