"""Reading computed geometries for the rules: angles, orders, indices and isomer energies.

Pure: the computed results (``notelsp.compute.ComputedSpecies``) reach the rules
as an input through ``RuleContext.computed``; nothing here computes or imports
the compute package.  A claim judged against a calculation is compared with the
computed value ± the method's measured uncertainty (``angle_uncertainty_deg``).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # types only: nothing here imports the compute package
    from ..chem.isomers import Isomer
    from ..compute.result import ComputedGeometry, ComputedSpecies

# Two computed angles closer than this count as one value (equivalent bonds differ by rounding and
# by the optimiser's residual forces; 0.5 degrees is far below the method's uncertainty).
SAME_ANGLE_DEG = 0.5


def degrees_text(value: float) -> str:
    return f"{value:.1f}".rstrip("0").rstrip(".")


@dataclass(frozen=True, slots=True)
class Calculation:
    """The usable lowest structure of one computed species, with the method's uncertainty.

    For a species computed as a molecule, ``at`` is the label of the centre a claim is about
    (``C2``, see target.py); its angles are the ones at that atom.
    """

    species: ComputedSpecies
    geometry: ComputedGeometry  # its structure of lowest energy
    at: str | None = None

    @property
    def method(self) -> str:
        return self.species.method

    @property
    def uncertainty(self) -> float:
        return self.species.angle_uncertainty_deg

    @property
    def centre(self) -> str:
        """The element of the centre the angles are at."""
        if self.geometry.is_molecule:
            index = self.geometry.labels.index(self.at) if self.at in self.geometry.labels else None
            return self.geometry.symbols[index] if index is not None else ""
        return self.geometry.symbols[0]

    @property
    def name(self) -> str:
        """The species as the messages name it: "CH3COOH (C2)" for a centre of a molecule."""
        if self.geometry.is_molecule and self.at is not None:
            return f"{self.species.species} ({self.at})"
        return self.species.species

    def angles(self, atoms: tuple[str, str, str] | None) -> tuple[float, ...]:
        """The computed angles a claim names (every angle at the centre when it names no atoms),
        smallest first, equal ones once; () when the named centre is not the computed one.

        In a molecule, the angles of equivalent pairs (the three H-C1-H of a methyl group) count
        as one value, their mean; ends named by element match any neighbour of that element.
        """
        if self.geometry.is_molecule:
            if self.at is None or not self.centre or (atoms is not None and atoms[1] not in (self.centre, self.at)):
                return ()
            groups = self.geometry.angles_at(self.at, *((atoms[0], atoms[2]) if atoms is not None else ("", "")),
                                             any_end=atoms is None)
            values = sorted(sum(group) / len(group) for group in groups)
        elif atoms is None:
            values = sorted(angle.degrees for angle in self.geometry.angles)
        elif atoms[1] != self.centre:
            return ()
        else:
            values = list(self.geometry.angles_between(atoms[0], atoms[2]))
        distinct: list[float] = []
        for value in values:
            if not distinct or value - distinct[-1] > SAME_ANGLE_DEG:
                distinct.append(value)
        return tuple(distinct)

    def one_angle(self, atoms: tuple[str, str, str]) -> float | None:
        """The computed angle when all such angles are one value; None when none or several."""
        values = self.angles(atoms)
        return values[0] if len(values) == 1 else None

    def said(self, values: Sequence[float]) -> str:
        shown = " or ".join(f"{degrees_text(v)}°" for v in values)
        return f"computed ({self.method}) {shown} ± {degrees_text(self.uncertainty)}°"

    @property
    def assumed_spin(self) -> str | None:
        """"triplet assumed" where the spin state was a choice between two close ones (CH2), else None."""
        head = self.geometry.spin.partition(":")[0].strip()
        return head if "assumed" in head else None


def calculation(computed: ComputedSpecies | None, at: str | None = None) -> Calculation | None:
    """The calculation of a species when it has a usable structure; else None.

    ``at``: for a species computed as a molecule, the label of the centre a claim is about;
    without it a molecule's angles are not read (the claim was not placed on a centre).
    """
    if computed is None:
        return None
    lowest = computed.lowest
    return None if lowest is None else Calculation(computed, lowest, at)


def angle_fits(low: float, high: float, allowance: float, values: Sequence[float], uncertainty: float) -> bool:
    """Whether a claimed angle (low-high, ± the writer's allowance) meets any computed value ± uncertainty."""
    return any(low - allowance - uncertainty <= v <= high + allowance + uncertainty for v in values)


def nearest(values: Sequence[float], to: float) -> float:
    return min(values, key=lambda v: abs(v - to))


def computed_relation(difference: float, uncertainty: float) -> tuple[str, bool]:
    """The order of two computed angles ("<", ">" or "=") and whether it is beyond the uncertainty.

    Within the uncertainty the sign is still the calculation's best answer, but not a firm one.
    """
    if abs(difference) < SAME_ANGLE_DEG:
        return "=", False
    return (">" if difference > 0 else "<"), abs(difference) > uncertainty


def order_contradicts(claimed: str, difference: float, uncertainty: float) -> tuple[bool, bool]:
    """(whether the computed difference left − right contradicts the claimed relation, firmly)."""
    if claimed == "=":
        return abs(difference) > uncertainty, abs(difference) > uncertainty
    if claimed == "<":
        return difference > SAME_ANGLE_DEG, difference > uncertainty
    return difference < -SAME_ANGLE_DEG, -difference > uncertainty


def energy_gaps_text(computed: ComputedSpecies | None) -> str | None:
    """"computed (GFN2-xTB): both F axial lowest, one F axial, one equatorial +19.7 kJ/mol" for
    a species with more than one usable isomer; None otherwise."""
    if computed is None:
        return None
    gaps = computed.relative_energies_kj_mol()
    if len(gaps) < 2:
        return None
    parts = [f"{gaps[0][0]} lowest"] + [f"{name} +{gap:.1f} kJ/mol" for name, gap in gaps[1:]]
    return f"computed ({computed.method}): " + "; ".join(parts)


def lowest_isomer(computed: ComputedSpecies | None, isomers: Sequence[Isomer]) -> Isomer | None:
    """The analysis's isomer the calculation found lowest in energy (matched by name), if any."""
    found = calculation(computed)
    if found is None or not found.geometry.isomer:
        return None
    return next((isomer for isomer in isomers if isomer.name == found.geometry.isomer), None)
