"""Cautions for toxic or reactive species: predictions are not safety data."""

from __future__ import annotations

from collections.abc import Mapping

SAFETY_CAUTION = "predictions are not safety data; follow the safety data sheet, local rules and licensed practice"

# Elements whose compounds are treated as toxic (common practice, no source).
TOXIC_ELEMENTS = frozenset({"As", "Se", "Te", "Be", "Tl", "Hg", "Cd", "Pb", "Sb", "Os"})

# Species known to be toxic, corrosive, explosive or strongly oxidising (from memory).
HAZARDOUS_SPECIES = frozenset({
    "F2", "Cl2", "Br2", "HF", "HCN", "PH3", "AsH3", "H2S", "SH2", "H2Se", "COCl2", "NO2", "NO", "ClO2",
    "O3", "N2H4", "CO", "SF4", "ClF3", "ClF5", "BrF3", "BrF5", "IF5", "IF7", "XeF2", "XeF4", "XeF6",
    "XeO3", "XeO4", "OF2", "F2O", "NF3", "PCl3", "PCl5", "POCl3", "SOCl2", "SO2Cl2", "BCl3", "BF3",
    "SiCl4", "AlCl3", "NCl3", "Cl2O", "HOCl", "ClO4-", "HClO4", "N3-", "HN3", "H2O2", "O2F2", "SO2",
    "NH3", "CS2", "S2Cl2", "B2H6", "SiH4", "GeH4", "SbH3", "PF5", "SF2Cl2", "ClNO", "N2O4",
})


INERT_FLUORIDES = frozenset({"SF6"})  # kinetically inert, though an asphyxiant (from memory)


def cautions(formula_text: str, composition: Mapping[str, int]) -> tuple[str, ...]:
    """The caution to attach to this species, if it is hazardous."""
    plain = formula_text.replace("[", "").replace("]", "").replace("^", "").replace(" ", "")
    if plain in HAZARDOUS_SPECIES or formula_text in HAZARDOUS_SPECIES or TOXIC_ELEMENTS & set(composition):
        return (f"{formula_text} is hazardous (toxic or reactive): {SAFETY_CAUTION}",)
    if plain in INERT_FLUORIDES:
        return ()
    if "F" in composition and any(s in composition for s in ("Cl", "Br", "I", "Xe", "Kr", "O", "N", "S")) and len(composition) == 2:
        # binary fluorides of halogens, noble gases, O, N, S are strong fluorinating agents
        return (f"{formula_text} is likely a reactive fluorinating agent: {SAFETY_CAUTION}",)
    return ()
