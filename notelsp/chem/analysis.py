"""The analysis of one species: each centre's electron count, VSEPR shape,
expected angles, Coulson indices, Drago's and Bent's rules and isomers."""

from __future__ import annotations

import threading
from dataclasses import dataclass
from itertools import combinations_with_replacement
from typing import TYPE_CHECKING

from .. import elements
from ..notation.model import Formula
from . import isomers as isomer_module
from .bent import BentAnalysis, bent
from .coulson import TYPICAL_ANGLES, CoulsonAnalysis
from .drago import DragoAnalysis, drago
from .exceptions import USUAL, KnownException, known_exception
from .hazards import cautions as hazard_cautions
from .model import Ligand
from .on_demand import CoulsonRequest, IsomerRequest, OnDemand
from .condensed import is_condensed, read_condensed
from .species import CentreModel, build_species
from .vsepr import SiteAngle, vsepr

if TYPE_CHECKING:
    from .molecule import Molecule  # a condensed formula's or a SMILES's graph: loaded only for those
    from .molecule_analysis import MoleculeAnalysis


@dataclass(frozen=True, slots=True)
class PairRange:
    """Where the angle between two ligands (by label) is expected."""

    ligands: tuple[str, str]  # sorted labels
    relation: str  # site relation ("any", "axial-equatorial", "cis", ...)
    ideal: float
    low: float
    high: float
    direction: str  # "smaller", "larger" or "ideal" relative to the ideal angle
    reason: str
    estimate: float  # a single expected value (used by Coulson when nothing better is known)


@dataclass(frozen=True, slots=True)
class CentreAnalysis:
    """Everything worked out for one central atom: counts, geometry, hybridization, rules."""

    central: str
    charge: int
    valence_electrons: int  # the centre's valence electrons after its charge (S in SO4^2-: 8)
    steric_number: int
    bonded_atoms: int
    lone_pairs: int
    odd_electrons: int
    ligands: tuple[Ligand, ...]
    electron_geometry: str
    shape: str
    hybridization: str  # textbook label, "unhybridized" for Drago species
    ideal_angles: tuple[float, ...]
    angle_ranges: tuple[PairRange, ...]
    drago: DragoAnalysis
    bent: BentAnalysis
    on_demand: OnDemand  # the isomers and the Coulson analysis, computed on first use (the properties below)
    notes: tuple[str, ...]
    isomers_withheld: str | None = None  # why no isomers were listed (too many arrangements); None when they were
    exception: KnownException | None = None  # where plain VSEPR is known to fail for this kind of centre

    @property
    def isomers(self) -> tuple[isomer_module.Isomer, ...]:
        """Every isomer, the expected one first; none when ``isomers_withheld`` says why."""
        return self.on_demand.isomers()

    @property
    def coulson(self) -> CoulsonAnalysis | None:
        """Coulson's indices of the bond hybrids; None for hypervalent centres (beyond s-p hybrids)."""
        return self.on_demand.coulson()

    @property
    def confidence(self) -> str:
        """"firm" for plain VSEPR, else the exception's "usual" or "uncertain"."""
        return self.exception.confidence if self.exception else "firm"

    @property
    def plausible_shapes(self) -> tuple[str, ...]:
        """Shapes a claim may name without being flagged: the prediction and what the exception allows."""
        return (self.shape, *(self.exception.also_plausible if self.exception else ()))

    def ranges_for(self, a: str, b: str) -> tuple[PairRange, ...]:
        """Every expected range for the angle a-centre-b (labels or element symbols)."""
        wanted = tuple(sorted((self._label(a), self._label(b))))
        return tuple(r for r in self.angle_ranges if r.ligands == wanted)

    def angle_range(self, a: str, b: str) -> tuple[float, float] | None:
        """The (low, high) degrees of the first expected range for a-centre-b, None if no such pair."""
        found = self.ranges_for(a, b)
        return (found[0].low, found[0].high) if found else None

    def expected_direction(self, a: str, b: str) -> str | None:
        found = self.ranges_for(a, b)
        return found[0].direction if found else None

    def _label(self, name: str) -> str:
        labels = {l.label for l in self.ligands}
        if name in labels:
            return name
        by_symbol = sorted({l.label for l in self.ligands if l.symbol == name})
        return by_symbol[0] if len(by_symbol) == 1 else name


@dataclass(frozen=True, slots=True)
class SpeciesAnalysis:
    """Everything worked out for one species: its centres, or why it is outside the model."""

    formula: str
    charge: int
    centres: tuple[CentreAnalysis, ...]
    outside_model: str | None
    cautions: tuple[str, ...]
    # The whole molecule, when the species was read as a graph (a condensed formula, SMILES, or a
    # symmetric two-centre formula); then ``centres`` are its centres' analyses in atom order.
    molecule: MoleculeAnalysis | None = None

    @property
    def centre(self) -> CentreAnalysis | None:
        return self.centres[0] if self.centres else None


_cache: dict[tuple[str, str | None, int, bool], SpeciesAnalysis] = {}
_cache_lock = threading.Lock()
_CACHE_LIMIT = 20_000


def analyse(formula: Formula) -> SpeciesAnalysis:
    """Analyse one species (cached by its text, explicit centre and charge)."""
    key = (formula.text, formula.centre, formula.charge, formula.smiles is not None)  # CO and smiles "CO" differ
    found = _cache.get(key)
    if found is None:
        found = _analyse(formula)
        with _cache_lock:
            while len(_cache) >= _CACHE_LIMIT:  # the oldest goes: memory stays level, with no refill wave
                del _cache[next(iter(_cache))]
            _cache[key] = found
    return found


def _analyse(formula: Formula) -> SpeciesAnalysis:
    if formula.smiles is not None:
        from .smiles import read_smiles  # RDKit, loaded only when a note gives SMILES

        read = read_smiles(formula.smiles)
        if isinstance(read, str):
            return SpeciesAnalysis(formula.text, formula.charge, (), f"SMILES not read: {read}", ())
        return _molecule_species(formula, read)
    caution = _cautions(formula.text, formula.composition())
    condensed = read_condensed(formula) if is_condensed(formula) else None
    if condensed is not None and condensed.molecule is not None:
        return _molecule_species(formula, condensed.molecule)
    model = build_species(formula)
    if condensed is not None and (condensed.ambiguous or model.outside_model is not None):
        # unread as a structure: the single-centre model may still read it (TeFClBrIH(OH)^-), never an ambiguity
        return SpeciesAnalysis(formula.text, formula.charge, (), condensed.reason or "not read", caution)
    if model.outside_model is not None:
        return SpeciesAnalysis(formula.text, formula.charge, (), model.outside_model, caution)
    if len(model.centres) > 1:
        # two equal centres (C2H4, N2H6, H2O2): the molecule's own graph, so its point group is the whole one's
        reading = read_condensed(formula)
        if reading.molecule is not None:
            return _molecule_species(formula, reading.molecule)
    centres = []
    for centre in model.centres:
        analysed = analyse_centre(centre, formula.text)
        if isinstance(analysed, str):
            return SpeciesAnalysis(formula.text, formula.charge, (), analysed, caution)
        centres.append(analysed)
    return SpeciesAnalysis(formula.text, formula.charge, tuple(centres), None, caution)


def _cautions(text: str, composition: dict[str, int]) -> tuple[str, ...]:
    return hazard_cautions(text, {s: n for s, n in composition.items() if elements.is_symbol(s)})


def _molecule_species(formula: Formula, molecule: Molecule) -> SpeciesAnalysis:
    """A species read as a molecule graph: every centre analysed."""
    from .molecule_analysis import analyse_molecule  # it builds on analyse_centre below

    whole = analyse_molecule(molecule)
    composition: dict[str, int] = {}
    for atom in molecule.atoms:
        composition[atom.element] = composition.get(atom.element, 0) + 1
    centres = tuple(c.analysis for c in whole.centres if c.analysis is not None)
    return SpeciesAnalysis(formula.text, molecule.charge, centres, whole.outside_model,
                           _cautions(formula.text, composition), whole)


def analyse_centre(centre: CentreModel, formula_text: str, *, with_isomers: bool = True) -> CentreAnalysis | str:
    """One centre's analysis, or why it cannot be made; ``with_isomers=False`` (a centre of a larger molecule) lists none."""
    atom = elements.element(centre.central)
    valence = atom.valence_electrons
    if valence is None:
        return f"{centre.central} has no main-group valence shell"
    available = valence - centre.charge
    nonbonding = available - sum(l.bond_order for l in centre.ligands)
    if nonbonding < 0:
        return f"{centre.central} has too few electrons for these ligands"
    lone_pairs, odd = divmod(nonbonding, 2)
    bonded = len(centre.ligands)
    drago_result = drago(centre.central, atom.period, atom.group, lone_pairs, centre.ligands)
    multiple = any(l.bond_order >= 2 for l in centre.ligands)
    result = vsepr(bonded, lone_pairs, odd, drago=drago_result.applies, multiple_bonds=multiple)
    if result is None:
        return (f"{centre.central} with {bonded} bonded atoms and {lone_pairs} lone pairs has steric number "
                f"{bonded + lone_pairs + (1 if odd else 0)}, outside the VSEPR range 2-7")
    bent_result = bent(centre.central, centre.ligands, lone_pairs, result.steric_number)
    exception = known_exception(centre.central, centre.ligands, lone_pairs, odd, centre.charge,
                                conjugation=centre.conjugation, bonds_known=centre.bonds_known)
    shape, geometry, hybridization = result.shape, result.electron_geometry, result.hybridization
    site_angles, isomer_sites = result.site_angles, lone_pairs + (1 if odd else 0)
    if exception is not None:
        shape, geometry, hybridization = exception.shape, exception.electron_geometry, exception.hybridization
        site_angles, isomer_sites = exception.site_angles, exception.lone_pair_sites
    elif drago_result.applies:
        hybridization = "unhybridized"
    ranges = _pair_ranges(centre.ligands, site_angles, bent_result)
    coulson_request = _coulson_request(centre, formula_text, ranges, lone_pairs + odd, result.steric_number)
    if not with_isomers:  # positional isomers are a single-centre notion; a larger molecule's are not enumerated
        isomer_request, withheld = None, "isomers are listed for single-centre species only"
    elif isomer_sites is None:
        isomer_request, withheld = None, f"the {exception.name} has no fixed arrangement of sites"
    else:
        isomer_request, withheld = _isomer_request(geometry, centre.ligands, isomer_sites, atom.electronegativity)
    isomer_note = ((f"positional isomers not listed ({withheld}); "
                    "placement, polarity, point-group and isomer-count claims are not checked",)
                   if withheld and with_isomers else ())
    exception_note = ((f"{'usually' if exception.confidence == USUAL else 'uncertain'}: {exception.name}: "
                       f"{exception.reason} ({exception.source})",) if exception else ())
    return CentreAnalysis(
        central=centre.central,
        charge=centre.charge,
        valence_electrons=available,
        steric_number=result.steric_number,
        bonded_atoms=bonded,
        lone_pairs=lone_pairs,
        odd_electrons=odd,
        ligands=centre.ligands,
        electron_geometry=geometry,
        shape=shape,
        hybridization=hybridization,
        ideal_angles=tuple(sorted({a.ideal for a in site_angles})),
        angle_ranges=ranges,
        drago=drago_result,
        bent=bent_result,
        on_demand=OnDemand(isomer_request, coulson_request),
        notes=(exception_note + _notes(centre, atom, lone_pairs, odd, result.steric_number, drago_result)
               + bent_result.notes + isomer_note),
        isomers_withheld=withheld,
        exception=exception,
    )


def _isomer_request(electron_geometry: str, ligands: tuple[Ligand, ...], lone_pair_sites: int,
                    centre_electronegativity: float | None) -> tuple[IsomerRequest | None, str | None]:
    """What the centre's isomers are enumerated from (on first use), or none and the reason they are not listed.

    An odd electron occupies a site of its own (counted in ``lone_pair_sites``), so it is placed like a lone pair.
    """
    refused = isomer_module.refusal(electron_geometry, ligands, lone_pair_sites)  # e.g. the count and the limit
    if refused is not None:
        return None, refused
    return IsomerRequest(electron_geometry, ligands, lone_pair_sites, centre_electronegativity), None


def _label_pairs(ligands: tuple[Ligand, ...]) -> list[tuple[str, str]]:
    counts: dict[str, int] = {}
    for ligand in ligands:
        counts[ligand.label] = counts.get(ligand.label, 0) + 1
    return [p for p in combinations_with_replacement(sorted(counts), 2) if p[0] != p[1] or counts[p[0]] >= 2]


def _pair_ranges(ligands: tuple[Ligand, ...], site_angles: tuple[SiteAngle, ...], bent_result: BentAnalysis) -> tuple[PairRange, ...]:
    pairs = _label_pairs(ligands)
    mixed = len({l.label for l in ligands}) > 1
    single_relation = len(site_angles) == 1
    out = []
    if mixed and single_relation:
        site = site_angles[0]
        rank = _bent_rank(pairs, bent_result)
        top, bottom = max(rank.values()), min(rank.values())
        for pair in pairs:
            if site.ideal >= 179:
                low, high, direction = site.low, site.high, site.direction
            elif site.direction != "ideal":  # lone pairs or an odd electron already set the direction
                low, high, direction = site.low - 6.0, site.high + 6.0, site.direction
            elif rank[pair] == top and top != bottom:
                low, high, direction = site.ideal - 3.0, site.ideal + 15.0, "larger"
            elif rank[pair] == bottom and top != bottom:
                low, high, direction = site.ideal - 15.0, site.ideal + 3.0, "smaller"
            else:
                low, high, direction = site.ideal - 8.0, site.ideal + 8.0, "ideal"
            reason = site.reason + ("; Bent's rule orders the mixed-ligand angles" if direction != site.direction else "")
            out.append(PairRange(pair, site.relation, site.ideal, low, high, direction, reason, _estimate(site.ideal, low, high, direction)))
        return tuple(out)
    widen = 5.0 if mixed else 0.0
    for pair in pairs:
        for site in site_angles:
            low, high = site.low - widen, min(180.0, site.high + widen)
            out.append(PairRange(pair, site.relation, site.ideal, low, high, site.direction, site.reason,
                                 _estimate(site.ideal, site.low, site.high, site.direction)))
    return tuple(out)


def _estimate(ideal: float, low: float, high: float, direction: str) -> float:
    """One expected value: a modest step from the ideal in the expected direction, inside the range."""
    if direction == "ideal" and low <= ideal <= high:
        return ideal
    if direction in ("larger", "smaller") and low <= ideal <= high:
        step = 3.0 if direction == "larger" else -3.0
        return min(max(ideal + step, low), high)
    return (low + high) / 2


def _bent_rank(pairs: list[tuple[str, str]], bent_result: BentAnalysis) -> dict[tuple[str, str], int]:
    rank = {pair: 0 for pair in pairs}
    for order in bent_result.angle_orders:
        larger = tuple(sorted((order.larger[0], order.larger[2])))
        smaller = tuple(sorted((order.smaller[0], order.smaller[2])))
        if larger in rank and smaller in rank:
            rank[larger] += 1
            rank[smaller] -= 1
    return rank


def _coulson_request(centre: CentreModel, formula_text: str, ranges: tuple[PairRange, ...], nonbonding: int,
                     steric_number: int) -> CoulsonRequest | None:
    if steric_number > 4:
        return None  # s and p alone cannot describe five or more domains
    counts: dict[str, int] = {}
    for ligand in centre.ligands:
        counts[ligand.label] = counts.get(ligand.label, 0) + 1
    typical = TYPICAL_ANGLES.get(formula_text)
    if typical and all(tuple(sorted(p)) in {tuple(sorted(k)) for k in typical} for p in _label_pairs(centre.ligands)):
        angles = {tuple(sorted(k)): v for k, v in typical.items() if set(k) <= set(counts)}
        source = "typical (ASE G2 set, Curtiss et al. 1997)"
    else:
        angles = {}
        for r in ranges:
            angles.setdefault(r.ligands, r.estimate)
        source = "predicted range midpoint"
    return CoulsonRequest(tuple(counts.items()), tuple(angles.items()), nonbonding, source)


def _notes(centre: CentreModel, atom: elements.Element, lone_pairs: int, odd: int, steric_number: int,
           drago_result: DragoAnalysis) -> tuple[str, ...]:
    notes = []
    if odd:
        notes.append(f"{centre.central} carries an odd electron (a radical): it counts as a half domain")
    if drago_result.applies:
        notes.append("Drago's rule: the lone pair is s-rich and held low, so it is a weaker donor (base) "
                     "than in the period-2 analogue")
    elif lone_pairs and steric_number == 4 and atom.period == 2:
        notes.append(f"the lone pair{'s' if lone_pairs > 1 else ''} on {centre.central} can donate: a Lewis base")
    electrons_around = 2 * sum(l.bond_order for l in centre.ligands) + 2 * lone_pairs + odd
    if atom.group in (2, 13) and electrons_around < 8 and not lone_pairs:
        notes.append(f"{centre.central} has fewer than eight electrons: an empty orbital makes it a Lewis acid")
    if steric_number >= 5:
        notes.append("more than four domains: textbook sp3d/sp3d2 labels are a bookkeeping convention; "
                     "the bonding is better described with three-centre four-electron bonds")
    return tuple(notes)
