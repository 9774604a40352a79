"""VSEPR: electron count -> steric number, electron geometry, shape, angles.

Angle ranges are the model's expectation for each kind of ligand pair: the
ideal polyhedron angle moved in the direction lone pairs, an odd electron,
multiple bonds and Drago's rule push it.  The settings' tolerance is added by
the rules, not here.
"""

from __future__ import annotations

from dataclasses import dataclass

ELECTRON_GEOMETRY = {
    2: "linear",
    3: "trigonal-planar",
    4: "tetrahedral",
    5: "trigonal-bipyramidal",
    6: "octahedral",
    7: "pentagonal-bipyramidal",
}

HYBRIDIZATION = {2: "sp", 3: "sp2", 4: "sp3", 5: "sp3d", 6: "sp3d2", 7: "sp3d3"}

# (steric number, bonded atoms) -> molecular shape
SHAPES = {
    (2, 2): "linear",
    (3, 3): "trigonal-planar",
    (3, 2): "bent",
    (4, 4): "tetrahedral",
    (4, 3): "trigonal-pyramidal",
    (4, 2): "bent",
    (5, 5): "trigonal-bipyramidal",
    (5, 4): "seesaw",
    (5, 3): "t-shaped",
    (5, 2): "linear",
    (6, 6): "octahedral",
    (6, 5): "square-pyramidal",
    (6, 4): "square-planar",
    (6, 3): "t-shaped",
    (6, 2): "linear",
    (7, 7): "pentagonal-bipyramidal",
    (7, 6): "pentagonal-pyramidal",
    (7, 5): "pentagonal-planar",
}

TETRAHEDRAL_ANGLE = 109.47


@dataclass(frozen=True, slots=True)
class SiteAngle:
    """One kind of angle in a shape: which sites, its ideal value, where it is expected."""

    relation: str  # "any", "axial-axial", "axial-equatorial", "equatorial-equatorial", "cis", "trans", ...
    ideal: float
    low: float
    high: float
    direction: str  # "smaller", "larger" or "ideal": expected deviation from the ideal
    reason: str


@dataclass(frozen=True, slots=True)
class VseprResult:
    """Steric number, electron-domain geometry, shape, textbook hybridization and site angles of one centre."""

    steric_number: int
    electron_geometry: str
    shape: str
    hybridization: str
    site_angles: tuple[SiteAngle, ...]


def steric_number(bonded_atoms: int, lone_pairs: int, odd_electrons: int) -> int:
    """Bonding domains plus lone pairs; an odd electron occupies a (half) domain of its own."""
    return bonded_atoms + lone_pairs + (1 if odd_electrons else 0)


def vsepr(bonded_atoms: int, lone_pairs: int, odd_electrons: int, *, drago: bool = False,
          multiple_bonds: bool = False) -> VseprResult | None:
    """The VSEPR description, or None outside steric numbers 2-7."""
    number = steric_number(bonded_atoms, lone_pairs, odd_electrons)
    shape = SHAPES.get((number, bonded_atoms))
    if shape is None:
        return None
    angles = _site_angles(number, shape, lone_pairs, odd_electrons, drago, multiple_bonds)
    return VseprResult(number, ELECTRON_GEOMETRY[number], shape, HYBRIDIZATION[number], angles)


def _site_angles(number: int, shape: str, lone_pairs: int, odd: int, drago: bool, multiple: bool) -> tuple[SiteAngle, ...]:
    lp = "lone pairs repel bonding pairs more strongly and close the angle"
    if shape == "linear":
        return (SiteAngle("trans" if number > 2 else "any", 180.0, 178.0, 180.0, "ideal",
                          "lone pairs (if any) sit symmetrically around the axis"),)
    if drago and shape in ("bent", "trigonal-pyramidal"):
        return (SiteAngle("any", 90.0, 89.0, 96.0, "smaller",
                          "Drago's rule: bonds use nearly pure p orbitals, so the angle is near 90 degrees"),)
    if shape == "bent" and number == 3:
        if odd and not lone_pairs:
            return (SiteAngle("any", 120.0, 120.0, 140.0, "larger",
                              "a single odd electron repels less than a bonding pair, so the angle opens past 120 degrees"),)
        return (SiteAngle("any", 120.0, 110.0, 120.0, "smaller", lp),)
    if shape == "bent" and number == 4:
        if odd:
            return (SiteAngle("any", TETRAHEDRAL_ANGLE, 105.0, 120.0, "larger",
                              "one lone pair and one odd electron: the half-filled domain repels less, multiple bonds open the angle"),)
        return (SiteAngle("any", TETRAHEDRAL_ANGLE, 96.0, 109.5 + (6.0 if multiple else 2.0), "smaller", lp),)
    if shape == "trigonal-pyramidal":
        high = 112.0 if multiple else 109.5
        return (SiteAngle("any", TETRAHEDRAL_ANGLE, 96.0 if not odd else 100.0, high, "smaller",
                          lp if not odd else "an odd electron repels less than a lone pair: a flatter pyramid"),)
    if shape == "trigonal-planar":
        return (SiteAngle("any", 120.0, 118.0, 122.0, "ideal", "three equal domains in a plane"),)
    if shape == "tetrahedral":
        return (SiteAngle("any", TETRAHEDRAL_ANGLE, 108.5, 110.5, "ideal", "four equal domains"),)
    if shape == "trigonal-bipyramidal":
        return (
            SiteAngle("axial-axial", 180.0, 177.0, 180.0, "ideal", "the axis of the bipyramid"),
            SiteAngle("axial-equatorial", 90.0, 88.0, 92.0, "ideal", "axial bonds are perpendicular to the equator"),
            SiteAngle("equatorial-equatorial", 120.0, 117.0, 123.0, "ideal", "three equatorial bonds in a plane"),
        )
    if shape == "seesaw":
        return (
            SiteAngle("axial-axial", 180.0, 165.0, 180.0, "smaller", "the equatorial lone pair bends the axial bonds away from it"),
            SiteAngle("axial-equatorial", 90.0, 80.0, 90.0, "smaller", lp),
            SiteAngle("equatorial-equatorial", 120.0, 95.0, 120.0, "smaller", "the equatorial lone pair squeezes the two equatorial bonds"),
        )
    if shape == "t-shaped":
        return (
            SiteAngle("axial-axial" if number == 5 else "trans", 180.0, 160.0, 180.0, "smaller",
                      "the lone pairs bend the long arm of the T away from them"),
            SiteAngle("axial-equatorial" if number == 5 else "cis", 90.0, 80.0, 90.0, "smaller", lp),
        )
    if shape == "square-planar":
        return (
            SiteAngle("cis", 90.0, 89.0, 90.0, "ideal", "the lone pairs sit trans, above and below the plane"),
            SiteAngle("trans", 180.0, 178.0, 180.0, "ideal", "the lone pairs sit trans, above and below the plane"),
        )
    if shape == "square-pyramidal":
        return (
            SiteAngle("apical-basal", 90.0, 75.0, 90.0, "smaller", "the lone pair below the base pushes the basal bonds up"),
            SiteAngle("cis", 90.0, 84.0, 90.0, "smaller", "basal bonds bend up, slightly closing the cis angle"),
            SiteAngle("trans", 180.0, 150.0, 180.0, "smaller", "basal bonds bend up, away from the lone pair"),
        )
    if shape == "octahedral":
        return (
            SiteAngle("cis", 90.0, 88.0, 92.0, "ideal", "six equal domains"),
            SiteAngle("trans", 180.0, 177.0, 180.0, "ideal", "six equal domains"),
        )
    if shape == "pentagonal-bipyramidal":
        return (
            SiteAngle("axial-axial", 180.0, 175.0, 180.0, "ideal", "the axis of the bipyramid"),
            SiteAngle("axial-equatorial", 90.0, 85.0, 95.0, "ideal", "axial bonds are perpendicular to the pentagon"),
            SiteAngle("equatorial-adjacent", 72.0, 68.0, 76.0, "ideal", "neighbours in the pentagon (the ring is often puckered)"),
            SiteAngle("equatorial-opposite", 144.0, 138.0, 150.0, "ideal", "non-neighbours in the pentagon"),
        )
    if shape == "pentagonal-pyramidal":
        return (
            SiteAngle("apical-basal", 90.0, 75.0, 90.0, "smaller", "the lone pair below the base pushes the basal bonds up"),
            SiteAngle("equatorial-adjacent", 72.0, 68.0, 76.0, "ideal", "neighbours in the pentagon"),
            SiteAngle("equatorial-opposite", 144.0, 135.0, 150.0, "smaller", "basal bonds bend up, away from the lone pair"),
        )
    if shape == "pentagonal-planar":
        return (
            SiteAngle("equatorial-adjacent", 72.0, 71.0, 73.0, "ideal", "the two lone pairs sit above and below the plane"),
            SiteAngle("equatorial-opposite", 144.0, 142.0, 146.0, "ideal", "the two lone pairs sit above and below the plane"),
        )
    return ()


def ideal_angles(result: VseprResult) -> tuple[float, ...]:
    """The distinct ideal angles between bonds in the shape."""
    return tuple(sorted({round(angle.ideal, 2) for angle in result.site_angles}))
