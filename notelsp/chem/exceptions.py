"""Known exceptions to plain VSEPR: where the domain count alone gives the wrong shape.

Each exception names the species it covers, what is observed instead, why, and
how sure the model is:

- ``usual``: most species of the kind behave this way (the prediction is made,
  but a contrary claim is at most a warning);
- ``uncertain``: the kind has members on both sides (or the state matters), so a
  contrary claim is information only, never an error and never rewritten.

Nothing here is fitted to a note: the conditions are chemical (group, period,
ligands), and every value quoted has its source beside it.
"""

from __future__ import annotations

from dataclasses import dataclass

from .. import elements
from .model import Conjugation, Ligand
from .vsepr import TETRAHEDRAL_ANGLE, SiteAngle

USUAL, UNCERTAIN = "usual", "uncertain"
HEAVY_HALOGENS = frozenset({"Cl", "Br", "I"})
HALOGENS = frozenset({"F", "Cl", "Br", "I"})


@dataclass(frozen=True, slots=True)
class KnownException:
    """What is observed instead of the plain VSEPR answer, and why."""

    name: str  # the kind of exception, e.g. "divalent group-14 centre"
    shape: str  # predicted molecular shape (machine spelling, as vsepr.SHAPES)
    electron_geometry: str  # the polyhedron the isomers are placed on
    hybridization: str
    site_angles: tuple[SiteAngle, ...]
    confidence: str  # USUAL or UNCERTAIN
    reason: str  # one sentence: why this kind differs from plain VSEPR
    source: str  # where the observation comes from
    also_plausible: tuple[str, ...] = ()  # other shapes a claim may name without being flagged
    lone_pair_sites: int | None = 0  # lone pairs (and odd electrons) placed as isomer sites; None: isomers not listed
    also_hybridization: tuple[str, ...] = ()  # other hybridization labels a claim may name without being flagged


def known_exception(central: str, ligands: tuple[Ligand, ...], lone_pairs: int, odd: int,
                    charge: int, *, conjugation: Conjugation | None = None,
                    bonds_known: bool = False) -> KnownException | None:
    """The exception this centre falls under, or None where plain VSEPR holds.

    ``bonds_known``: the ligands come from a molecule graph, so ``conjugation``
    says for certain whether a lone pair sits beside a π system; without a
    graph that is only guessed from the written groups.
    """
    atom = elements.element(central)
    bonded = len(ligands)
    symbols = {l.symbol for l in ligands}
    if conjugation is not None and not odd and lone_pairs and bonded + lone_pairs == 4:
        return _conjugated_lone_pair(atom, bonded, conjugation)
    for check in (_divalent_group_14, _planar_radical_or_not, _inert_pair, _bent_dihalide, _silyl_centre,
                  *(() if bonds_known else (_conjugation_possible,))):
        found = check(atom, ligands, symbols, bonded, lone_pairs, odd, charge)
        if found is not None:
            return found
    return None


def _divalent_group_14(atom, ligands, symbols, bonded, lone_pairs, odd, charge):
    if atom.group != 14 or bonded != 2 or lone_pairs != 1 or odd or any(l.bond_order != 1 for l in ligands):
        return None
    reason = ("the lone pair of a divalent group-14 centre keeps most of the s orbital, so the bonds use p-rich "
              "hybrids and the angle closes well below 120°, more so down the group")
    if atom.symbol == "C" and symbols == {"H"}:
        return KnownException(
            "methylene (two spin states)", "bent", "trigonal-planar", "sp2",
            (SiteAngle("any", 120.0, 100.0, 134.0, "smaller",
                       "triplet ground state near 132°, low-lying singlet near 102°"),),
            UNCERTAIN,
            "CH2 has a triplet ground state (H-C-H about 132°) and a singlet close above it (about 102°); "
            "the formula does not say which one is meant",
            "ASE G2 set (Curtiss et al. 1997): CH2 singlet 102.1°, triplet 131.6°", lone_pair_sites=1)
    if atom.period == 2:
        window = SiteAngle("any", 120.0, 100.0, 112.0, "smaller", reason)
        hybrid = "sp2"
    else:
        window = SiteAngle("any", 120.0, 88.0, 104.0, "smaller", reason)
        hybrid = "unhybridized"
    return KnownException(
        "divalent group-14 centre (singlet carbene or heavier analogue)", "bent", "trigonal-planar", hybrid,
        (window,), USUAL, reason,
        "ASE G2 set (Curtiss et al. 1997): SiH2 singlet 92.5°; CF2 104.9°, SiF2 100.8°, GeCl2 ~100°, "
        "SnCl2 ~98°, PbCl2 ~98° (from memory)",
        lone_pair_sites=1)


def _planar_radical_or_not(atom, ligands, symbols, bonded, lone_pairs, odd, charge):
    if bonded != 3 or lone_pairs or odd != 1 or atom.group not in (13, 14, 15):
        return None
    if atom.period == 2 and symbols == {"H"}:
        return KnownException(
            "planar radical", "trigonal-planar", "trigonal-planar", "sp2",
            (SiteAngle("any", 120.0, 118.0, 120.5, "ideal",
                       "the odd electron sits in an unhybridized p orbital, the three bonds in a plane"),),
            USUAL,
            "with hydrogen ligands the odd electron gains nothing from s character, so it stays in a pure p "
            "orbital and the radical is planar (CH3)",
            "ASE G2 set (Curtiss et al. 1997): CH3 planar, H-C-H 120.0°")
    pyramid = SiteAngle("any", TETRAHEDRAL_ANGLE, 107.0, 115.0, "ideal",
                        "the odd electron takes an s-rich hybrid, so the bonds bend away from it")
    if atom.period >= 3 or symbols <= HALOGENS | {"O"} and "H" not in symbols:
        why = ("electronegative ligands draw p character into their bonds (Bent's rule), leaving s character "
               "to the odd electron, which then points out of the plane: a pyramid (CF3)"
               if atom.period == 2 else
               "a heavier centre keeps its s orbital for the odd electron: a pyramid (SiH3)")
        confidence = USUAL if atom.group == 14 and (atom.period >= 3 or symbols <= {"F"}) else UNCERTAIN
        return KnownException(
            "pyramidal radical", "trigonal-pyramidal", "tetrahedral", "sp3", (pyramid,), confidence, why,
            "ASE G2 set (Curtiss et al. 1997): SiH3 111.2°; CF3 about 111° (from memory)",
            also_plausible=() if confidence == USUAL else ("trigonal-planar",), lone_pair_sites=1)
    return KnownException(
        "radical between planar and pyramidal", "trigonal-pyramidal", "tetrahedral", "sp3",
        (SiteAngle("any", TETRAHEDRAL_ANGLE, 107.0, 120.0, "larger",
                   "between the planar methyl radical and the pyramidal trifluoromethyl radical"),),
        UNCERTAIN,
        "a carbon-centred radical is planar with hydrogen ligands and pyramidal with fluorine ones; "
        "mixed or larger ligands fall in between, often with a shallow, fast-inverting pyramid",
        "ASE G2 set (Curtiss et al. 1997): CH3 120.0°, SiH3 111.2°",
        also_plausible=("trigonal-planar",), lone_pair_sites=1)


def _inert_pair(atom, ligands, symbols, bonded, lone_pairs, odd, charge):
    if bonded != 6 or lone_pairs != 1 or odd:
        return None
    if atom.period >= 4 and symbols <= HEAVY_HALOGENS:
        octahedron = (SiteAngle("cis", 90.0, 88.0, 92.0, "ideal", "a regular octahedron: the lone pair stays in the s orbital"),
                      SiteAngle("trans", 180.0, 177.0, 180.0, "ideal", "a regular octahedron: the lone pair stays in the s orbital"))
        return KnownException(
            "stereochemically inactive lone pair", "octahedral", "octahedral", "sp3d2", octahedron, USUAL,
            "six large ligands around a heavy centre leave no room for the lone pair, which stays in the "
            "spherical s orbital (an inert pair): the six bonds form a regular octahedron (TeCl6²⁻, SbCl6³⁻)",
            "crystal structures of TeCl6²⁻ and SbCl6³⁻ salts: regular octahedra (from memory)",
            also_plausible=("distorted-octahedral",))
    return KnownException(
        "distorted octahedron (weakly active lone pair)", "distorted-octahedral", "octahedral", "sp3d3",
        (SiteAngle("cis", 90.0, 75.0, 100.0, "ideal", "a distorted, fluxional octahedron"),
         SiteAngle("trans", 180.0, 150.0, 180.0, "smaller", "a distorted, fluxional octahedron")),
        UNCERTAIN,
        "with six ligands the lone pair is only partly active: XeF6 is a distorted octahedron that changes "
        "shape quickly (C3v in the gas phase), not the pentagonal pyramid of plain VSEPR",
        "gas-phase electron diffraction of XeF6: distorted, fluxional octahedron (from memory)",
        also_plausible=("octahedral", "pentagonal-pyramidal"), lone_pair_sites=None)


def _bent_dihalide(atom, ligands, symbols, bonded, lone_pairs, odd, charge):
    if atom.group != 2 or atom.period < 4 or bonded != 2 or lone_pairs or odd or charge:
        return None
    bent_first = atom.symbol in ("Sr", "Ba", "Ra") or symbols == {"F"}
    return KnownException(
        "gas-phase bent alkaline-earth dihalide", "bent" if bent_first else "linear", "linear", "sp",
        (SiteAngle("any", 180.0, 95.0, 180.0, "smaller",
                   "a shallow bending potential: bent for Sr and Ba, quasi-linear for the heavier Ca halides"),),
        UNCERTAIN,
        "heavy alkaline-earth dihalides are bent in the gas phase (polarisation of the metal's core and its "
        "d orbitals), against plain VSEPR's linear answer; the angle is soft and depends on the halide",
        "gas-phase electron diffraction and matrix-isolation studies of CaF2, SrF2, BaF2 (from memory)",
        also_plausible=("linear", "bent"), lone_pair_sites=None)


def _silyl_centre(atom, ligands, symbols, bonded, lone_pairs, odd, charge):
    silyl = sum(1 for l in ligands if l.symbol == "Si")
    if atom.symbol == "N" and bonded == 3 and lone_pairs == 1 and not odd and silyl >= 2:
        return KnownException(
            "planar silylamine", "trigonal-planar", "trigonal-planar", "sp2",
            (SiteAngle("any", 120.0, 116.0, 121.0, "ideal", "the N lone pair delocalises towards silicon"),),
            USUAL,
            "silicon takes part of the nitrogen lone pair (into Si-H/Si-C σ* orbitals), so the nitrogen of a "
            "silylamine is planar, not pyramidal (N(SiH3)3)",
            "gas-phase electron diffraction of trisilylamine: planar NSi3 (from memory)")
    if atom.symbol == "O" and bonded == 2 and lone_pairs == 2 and not odd and silyl == 2:
        return KnownException(
            "wide-angled siloxane oxygen", "bent", "tetrahedral", "sp",
            (SiteAngle("any", TETRAHEDRAL_ANGLE, 135.0, 160.0, "larger",
                       "the O lone pairs delocalise towards silicon and open the angle"),),
            UNCERTAIN,
            "an oxygen between two silicon atoms opens far beyond the tetrahedral angle (disiloxane about 144°) "
            "and bends easily; its hybridization is nearer sp than sp3",
            "gas-phase electron diffraction of disiloxane: Si-O-Si about 144° (from memory)",
            also_plausible=("linear",), lone_pair_sites=None)
    return None


def _conjugation_possible(atom, ligands, symbols, bonded, lone_pairs, odd, charge):
    if atom.symbol not in ("N", "O", "S") or not lone_pairs or odd:
        return None
    if not any(_may_be_pi_system(l) for l in ligands):
        return None
    from .vsepr import vsepr  # the plain answer stays the prediction; only the confidence changes

    plain = vsepr(bonded, lone_pairs, odd)
    if plain is None:
        return None
    planar = "trigonal-planar" if bonded == 3 else "bent"
    return KnownException(
        "lone pair next to a possible π system", plain.shape, plain.electron_geometry, plain.hybridization,
        tuple(SiteAngle(a.relation, a.ideal, a.low, max(a.high, 122.0), a.direction, a.reason) for a in plain.site_angles),
        UNCERTAIN,
        "a lone pair next to a π bond or an aromatic ring (amide, aniline, ester, enol) delocalises into it and "
        "makes the centre planar and sp2; the written group does not show whether it is such a system",
        "common practice, no source",
        also_plausible=(planar,), lone_pair_sites=None, also_hybridization=("sp2",))


def _conjugated_lone_pair(atom, bonded: int, conjugation: Conjugation) -> KnownException:
    """A lone pair the molecule graph shows beside a π system: it moves into a p orbital, the centre turns sp2."""
    if bonded == 3:
        shape = "trigonal-planar"
        window = SiteAngle("any", 120.0, 114.0, 126.0, "ideal",
                           "the lone pair sits in a p orbital conjugated with the π system; the bonds lie in a plane")
        pyramid_too = not conjugation.firmly_planar
        also = ("trigonal-pyramidal",) if pyramid_too else ()
        sites = 0
    else:  # two neighbours: one lone pair in the p orbital, the other in the plane
        shape = "bent"
        window = SiteAngle("any", 120.0, 104.0, 125.0, "smaller",
                           "one lone pair conjugated in a p orbital, the other in the plane of the bonds")
        pyramid_too, also, sites = True, (), 1
    return KnownException(
        f"lone pair conjugated with a π system ({conjugation.kind})", shape, "trigonal-planar", "sp2", (window,),
        USUAL,
        conjugation.reason + ("; the centre may stay slightly pyramidal" if bonded == 3 and pyramid_too else ""),
        "common practice, no source",
        also_plausible=also, lone_pair_sites=sites, also_hybridization=("sp3",) if pyramid_too else ())


def _may_be_pi_system(ligand: Ligand) -> bool:
    """A written group that may carry a π bond next to the centre (COCH3, C6H5, CN, NO2, CHO ...)."""
    label = ligand.label
    if label == ligand.symbol or ligand.symbol not in ("C", "N", "S", "P", "B"):
        return False
    rest = label[len(ligand.symbol):]
    return any(mark in rest for mark in ("O", "N", "S")) or label.startswith(("C6", "C5", "C4", "C2H3", "CH=", "C="))
