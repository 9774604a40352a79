"""Level of theory and the bounds that keep a cross-check short."""

from __future__ import annotations

from dataclasses import dataclass

# HF/6-31G*: the smallest common basis with d functions on the heavy atoms, which a
# pyramidal centre needs: without them HF/3-21G opens NH3's H-N-H to 112° (106.7°
# measured).  tests/crosscheck/test_crosscheck_accuracy.py holds it against experiment.
DEFAULT_LEVEL_TEXT = "HF/6-31G*"

# Half-width, in degrees, within which a bond angle computed at each level stands for the
# measured one; a claim that close to the computed angle agrees with it.  HF/6-31G* is held
# to its value by tests/crosscheck/test_crosscheck_accuracy.py (largest error there about
# 1 degree); the smaller bases' values are what they miss by on water and ammonia
# (HF/3-21G: 112° for NH3; HF/STO-3G: about 100° for H2O; both measured while choosing).
ANGLE_ERROR_DEG = {"HF/6-31G*": 3.0, "HF/3-21G": 6.0, "HF/STO-3G": 5.0}
METHODS = ("HF", "B3LYP", "PBE0", "PBE")  # HF, or a density functional PySCF knows
BASES = ("STO-3G", "3-21G", "6-31G", "6-31G*", "DEF2-SVP")


@dataclass(frozen=True, slots=True)
class LevelOfTheory:
    method: str  # "HF" or a functional name
    basis: str

    @property
    def label(self) -> str:
        return f"{self.method}/{self.basis}"

    @property
    def is_hartree_fock(self) -> bool:
        return self.method == "HF"

    @property
    def angle_error_deg(self) -> float | None:
        """The level's stated bond-angle error (ANGLE_ERROR_DEG); None where none is stated."""
        return ANGLE_ERROR_DEG.get(self.label)


@dataclass(frozen=True, slots=True)
class Limits:
    max_atoms: int = 8
    wall_time_s: float = 300.0  # the whole cross-check of one species, every isomer included (d functions cost)
    max_steps: int = 60  # optimisation steps per isomer
    max_isomers: int = 4


def parse_level(text: str) -> LevelOfTheory:
    """``"HF/STO-3G"`` -> LevelOfTheory; ValueError naming the accepted choices otherwise."""
    method, sep, basis = text.strip().partition("/")
    method, basis = method.strip().upper(), basis.strip().upper()
    if not sep or method not in METHODS or basis not in BASES:
        raise ValueError(
            f"level of theory {text!r} is not one of METHOD/BASIS with METHOD in {', '.join(METHODS)} "
            f"and BASIS in {', '.join(BASES)}"
        )
    return LevelOfTheory(method, basis)


DEFAULT_LEVEL = parse_level(DEFAULT_LEVEL_TEXT)
