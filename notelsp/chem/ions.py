"""Common polyatomic ions, for noticing a charge that was probably left out.

A neutral ``ClO4`` or ``SO4`` is either a short-lived radical or nothing at all,
while the ions are what notes usually mean.  The list is the ions every general
chemistry text names (common practice, no source); species that are common as
neutral molecules too (NO2, ClO2, OH) are left out, so they are never questioned.
"""

from __future__ import annotations

# (element -> count) as a sorted tuple -> (charge, name)
COMMON_IONS: dict[tuple[tuple[str, int], ...], tuple[int, str]] = {
    (("Cl", 1), ("O", 4)): (-1, "perchlorate"),
    (("Cl", 1), ("O", 3)): (-1, "chlorate"),
    (("Br", 1), ("O", 3)): (-1, "bromate"),
    (("I", 1), ("O", 3)): (-1, "iodate"),
    (("I", 1), ("O", 4)): (-1, "periodate"),
    (("N", 1), ("O", 3)): (-1, "nitrate"),
    (("C", 1), ("O", 3)): (-2, "carbonate"),
    (("O", 4), ("S", 1)): (-2, "sulfate"),
    (("O", 3), ("S", 1)): (-2, "sulfite"),
    (("O", 4), ("Se", 1)): (-2, "selenate"),
    (("O", 4), ("P", 1)): (-3, "phosphate"),
    (("As", 1), ("O", 4)): (-3, "arsenate"),
    (("H", 4), ("N", 1)): (1, "ammonium"),
    (("H", 3), ("O", 1)): (1, "hydronium"),
    (("B", 1), ("F", 4)): (-1, "tetrafluoroborate"),
    (("B", 1), ("H", 4)): (-1, "tetrahydroborate"),
    (("F", 6), ("P", 1)): (-1, "hexafluorophosphate"),
    (("F", 6), ("Si", 1)): (-2, "hexafluorosilicate"),
    (("Al", 1), ("Cl", 4)): (-1, "tetrachloroaluminate"),
    (("I", 3),): (-1, "triiodide"),
    (("N", 3),): (-1, "azide"),
}


def likely_ion(composition: dict[str, int], charge: int) -> tuple[int, str] | None:
    """(charge, name) of the common ion a neutral formula probably meant, else None."""
    if charge != 0:
        return None
    return COMMON_IONS.get(tuple(sorted(composition.items())))


def written_charge(charge: int) -> str:
    """A charge as the notation writes it after a formula: '-', '+', '^2-'."""
    sign = "+" if charge > 0 else "-"
    return sign if abs(charge) == 1 else f"^{abs(charge)}{sign}"
