import pytest

from notelsp.crosscheck.levels import DEFAULT_LEVEL, LevelOfTheory, parse_level


def test_default_level_is_hartree_fock_with_polarisation_functions_and_a_stated_error():
    assert DEFAULT_LEVEL == LevelOfTheory("HF", "6-31G*")
    assert DEFAULT_LEVEL.label == "HF/6-31G*"
    assert DEFAULT_LEVEL.is_hartree_fock
    assert DEFAULT_LEVEL.angle_error_deg is not None  # held against experiment in test_crosscheck_accuracy.py


def test_level_text_is_case_insensitive():
    assert parse_level(" hf / sto-3g ") == LevelOfTheory("HF", "STO-3G")
    assert not parse_level("B3LYP/6-31G*").is_hartree_fock


@pytest.mark.parametrize("text", ["HF", "MP2/STO-3G", "HF/cc-pVQZ", ""])
def test_unknown_levels_are_refused_with_the_choices(text):
    with pytest.raises(ValueError, match="METHOD/BASIS"):
        parse_level(text)
