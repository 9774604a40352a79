"""Level of theory and the bounds that keep a cross-check short."""

from __future__ import annotations

from dataclasses import dataclass

# HF/3-21G: a split-valence basis that still finishes an 8-atom optimisation
# in well under a minute on two cores, and unlike STO-3G orders the PF4Cl
# isomers correctly (measured while building this module).
DEFAULT_LEVEL_TEXT = "HF/3-21G"
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


@dataclass(frozen=True, slots=True)
class Limits:
    max_atoms: int = 8
    wall_time_s: float = 120.0  # the whole cross-check of one species, every isomer included
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
