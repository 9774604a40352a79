"""Bond lengths from covalent radii, with an electronegativity correction.

r(A-B) = r_A(n) + r_B(n) - c |chi_A - chi_B|^k

- r(n): Pyykkö's covalent radii for bond order n (single: Pyykkö and Atsumi,
  Chem. Eur. J. 15, 186 (2009); double: ibid. 15, 12770 (2009); triple:
  Pyykkö, Riedel and Patzschke, Chem. Eur. J. 11, 3511 (2005)), as mendeleev
  carries them;
- the correction for a polar bond: Schomaker and Stevenson, J. Am. Chem. Soc.
  63, 37 (1941), c = 0.09 Å, k = 1, in the form Blom and Haaland, J. Mol.
  Struct. 128, 21 (1985) refitted, c = 0.085 Å, k = 1.4 (constants from memory).

Pyykkö's radii were themselves fitted to polar as well as non-polar bonds, and
his hydrogen radius comes from hydrides, so X-H bonds are left uncorrected; the
tests measure the error of each form against ASE's G2 geometries and the one
used here is the better of them (see ``CORRECTION``).  Bent's rule gives the trend on top: a
bond to a centre whose other ligands are more electronegative is shorter.
"""

from __future__ import annotations

from dataclasses import dataclass

from .. import elements

# (c in ångström, exponent k) of the electronegativity correction, one entry per published form
CORRECTIONS = {
    "none": (0.0, 1.0),
    "schomaker-stevenson": (0.09, 1.0),
    "blom-haaland": (0.085, 1.4),
}
CORRECTION = "blom-haaland"
# Half-width of the judged window around a prediction, in ångström: at least the 95th-percentile
# error of the prediction against ASE's G2 geometries (tests/chem/test_bondlength.py measures it).
WINDOW = 0.15


@dataclass(frozen=True, slots=True)
class BondLength:
    """A predicted bond length and how it was estimated."""

    atoms: tuple[str, str]
    order: int
    angstrom: float  # the prediction
    low: float
    high: float
    reason: str


def radius_pm(symbol: str, order: int) -> float | None:
    """Pyykkö's covalent radius of ``symbol`` for a bond of this order (pm), None where it has none."""
    atom = elements.element(symbol)
    return {1: atom.covalent_radius_pm, 2: atom.double_bond_radius_pm, 3: atom.triple_bond_radius_pm}.get(order)


def predict_bond_length(a: str, b: str, order: int = 1, correction: str = CORRECTION) -> BondLength | None:
    """The expected A-B length for this bond order, or None without radii for both atoms."""
    first, second = radius_pm(a, order), radius_pm(b, order)
    if first is None or second is None:
        return None
    c, k = CORRECTIONS[correction]
    chi_a, chi_b = elements.element(a).electronegativity, elements.element(b).electronegativity
    # Pyykkö's hydrogen radius comes from hydrides, so an X-H bond's polarity is already in it
    polar = chi_a is not None and chi_b is not None and "H" not in (a, b)
    shortening = c * abs(chi_a - chi_b) ** k if polar else 0.0
    length = (first + second) / 100.0 - shortening
    kind = {1: "single", 2: "double", 3: "triple"}.get(order, f"order-{order}")
    reason = (f"covalent radii for a {kind} bond ({first:g} + {second:g} pm, Pyykkö)"
              + (f" less {shortening:.3f} Å for the bond's polarity" if shortening else ""))
    return BondLength((a, b), order, length, length - WINDOW, length + WINDOW, reason)
