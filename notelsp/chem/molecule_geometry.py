"""A 3D model of a whole molecule, and the point group and polarity it has.

Two ways to a model:

- a molecule with one centre and five or more electron domains on it (SF4,
  ClF3, XeF4, PF5, SF6, XeF2, I3-), a lone pair on it (NH3, H2O, CH2, NH2)
  or delocalised bonds round it (CO3 2-, NO3-, SO4 2-) has its ligands placed on the VSEPR polyhedron, in the arrangement
  the isomer ranking expects, lone-pair sites left empty.  Force fields have
  few parameters for hypervalent centres and distance geometry has no notion
  of lone pairs, so embedding gives poor shapes there (a linear carbene);
- every other molecule is embedded by RDKit's distance geometry (ETKDG, fixed
  seed) and cleaned up with a force field (MMFF94 where it has parameters for
  every atom, else UFF).  Molecules with rotating bonds or rings get several
  embeddings and the lowest-energy minimum is kept, so that the model is the
  conformer chemists mean (anti butane, chair cyclohexane, staggered ethane);
  end groups (CH3, OH, NH2) are also tried eclipsed and staggered, and among
  conformers within NEAR_DEGENERATE_KCAL of the lowest the most symmetric is
  kept.

Either way the model is one conformer, deterministic for a given molecule.
RDKit is imported only when a model is made, and numpy (through the point
group and the isomer ranking) only when one is asked for.
"""

from __future__ import annotations

import itertools
from functools import lru_cache

from .. import elements
from .bondlength import predict_bond_length
from .exceptions import KnownException, known_exception
from .model import LONE_PAIR, Ligand
from .molecule import Molecule
from .vsepr import ELECTRON_GEOMETRY

Coordinates = tuple[tuple[float, float, float], ...]  # Å, one triple per atom in the molecule's order

EMBEDDING_SEED = 20240917  # any fixed seed: the same molecule always gets the same model
CONFORMERS_WHEN_FLEXIBLE = 12  # embeddings tried when a bond rotates or a ring flexes; the lowest minimum is kept
FORCE_FIELD_STEPS = 2000  # enough for a 30-atom molecule to converge from an ETKDG start
# Conformers whose force-field energies differ by less than this are treated as equally likely and the
# more symmetric one is kept: force-field conformational energies are good to about 0.5 kcal/mol at best
# (from memory), and chemists draw the symmetric conformer when nothing separates them.
NEAR_DEGENERATE_KCAL = 0.3
TORSION_HOLD = 1.0e4  # kcal/mol/rad^2: holds an end group at its eclipsed or staggered setting while the rest relaxes
MAX_ROTORS_COMBINED = 3  # every eclipsed/staggered combination up to this many end groups; beyond, all one or all the other
CAGE_RING_SIZE = 8  # rings up to this size hold a cage corner's configuration (in/out isomers need larger ones)
MAX_STEREOISOMERS = 8  # stereoisomers modelled when the molecule leaves the choice open; more is too slow
PLACED_FROM_DOMAINS = 5  # a single centre with this many electron domains or more is placed, not embedded
_MODEL_CACHE = 512  # models kept (each is a few hundred floats)


@lru_cache(maxsize=_MODEL_CACHE)
def whole_molecule_symmetry(molecule: Molecule) -> tuple[str, bool] | str:
    """(point group, polar) of the whole molecule, or a sentence saying why there is none.

    The point group is that of one 3D model (``model_3d``): one conformer,
    the force-field minimum chemists usually mean (staggered ethane, anti
    butane).  Polar means the point group allows a permanent dipole (C1, Cs,
    Cn, Cnv, C∞v; common practice).

    The molecule graph carries no stereo configuration.  Where it could
    matter (a double bond that can be E or Z, two or more stereocentres) every
    stereoisomer that can be built is modelled: when they share one point
    group that is the answer (enantiomers always do; a bicyclic cage may have
    one buildable form only), otherwise the answer is a sentence giving each
    stereoisomer's group, not the group of whichever one a model happened to
    be.  A double bond inside a ring of up to eight atoms is taken as Z (the
    usual form) and not varied.
    """
    from .point_group import point_group
    from .polarity import is_polar

    model = model_3d(molecule)
    if isinstance(model, str):
        return model
    symbols = [atom.element for atom in molecule.atoms]
    centre = _single_centre(molecule)
    if centre is None or not _placed_not_embedded(molecule, centre):
        alternatives = _stereoisomer_groups(molecule)
        if isinstance(alternatives, str):
            return alternatives
        if alternatives is not None:
            groups = {group for group, _ in alternatives}
            if len(groups) == 1:
                group = groups.pop()
                return group, is_polar(group)
            return _depends_on_stereo(alternatives)
    group = point_group(symbols, model)
    return group, is_polar(group)


def _depends_on_stereo(alternatives: list[tuple[str, str]]) -> str:
    from .polarity import is_polar

    by_group: dict[str, list[str]] = {}
    for group, description in alternatives:
        by_group.setdefault(group, []).append(description)
    parts = [f"{group} ({'polar' if is_polar(group) else 'nonpolar'}) as {' or '.join(names)}"
             for group, names in by_group.items()]
    return ("the point group depends on the stereoisomer, which the molecule as written does not fix: "
            + "; ".join(parts))


@lru_cache(maxsize=_MODEL_CACHE)
def model_3d(molecule: Molecule) -> Coordinates | str:
    """A 3D model (Å) of the molecule, or a sentence saying why none can be made."""
    count = len(molecule.atoms)
    if count == 0:
        return "the molecule has no atoms"
    if count == 1:
        return ((0.0, 0.0, 0.0),)
    if not _connected(molecule):
        return "the molecule falls into separate parts: no single 3D model (write one species at a time)"
    for index in molecule.centres:
        atom = molecule.atoms[index]
        nonbonding = molecule.nonbonding_electrons(index)
        if nonbonding is None:
            return (f"{atom.label} is a centre outside the main group: force fields and VSEPR give no "
                    "trustworthy 3D shape for it, so no model is made")
        if nonbonding < 0:
            return (f"{atom.label} has more bonds than valence electrons (multicentre bonding?): "
                    "no electron count to build a model from")
    centre = _single_centre(molecule)
    if centre is not None:
        exception = _centre_exception(molecule, centre)
        if exception is not None and exception.lone_pair_sites is None:
            return (f"{molecule.atoms[centre].label} is outside plain VSEPR ({exception.name}): "
                    f"{exception.reason}; no 3D model is made, so no point group is claimed")
        if exception is not None or _placed_not_embedded(molecule, centre):
            placed = _placed(molecule, centre, exception)
            if not isinstance(placed, str):
                return placed
            embedded = _embedded(molecule)
            return embedded if not isinstance(embedded, str) else placed
    embedded = _embedded(molecule)
    if isinstance(embedded, str) and centre is not None:
        placed = _placed(molecule, centre, None)
        return placed if not isinstance(placed, str) else embedded
    return embedded


# --- placing ligands on a polyhedron -------------------------------------------


def _single_centre(molecule: Molecule) -> int | None:
    """The one atom every other atom is bonded to (and only to), if there is one."""
    count = len(molecule.atoms)
    for index in range(count):
        if len(molecule.neighbours(index)) == count - 1 and len(molecule.bonds) == count - 1:
            return index
    return None


def _placed_not_embedded(molecule: Molecule, centre: int) -> bool:
    """Five or more domains, a lone pair (or two unpaired electrons) on the centre, or delocalised bonds.

    Force fields know lone pairs only through atom types, and a carbene or a
    radical such as NH2 comes out linear from them; VSEPR places it bent.  A
    centre with one odd electron only (CH3, NO2) is embedded: its lone
    electron matters less than the force field's planar or bent atom type.
    """
    nonbonding = molecule.nonbonding_electrons(centre)
    if _domains(molecule, centre) >= PLACED_FROM_DOMAINS or (nonbonding is not None and nonbonding >= 2):
        return True
    # a delocalised set (carbonate, nitrate, sulfate): the force field sees one Kekulé structure
    return any(_delocalised(molecule, centre, neighbour) for neighbour in molecule.neighbours(centre))


def _delocalised(molecule: Molecule, first: int, second: int) -> bool:
    bond = molecule.bond_between(first, second)
    return bond is not None and bond.delocalised


def _domains(molecule: Molecule, centre: int) -> int:
    nonbonding = molecule.nonbonding_electrons(centre)
    if nonbonding is None or nonbonding < 0:
        return 0
    lone_pairs, odd = divmod(nonbonding, 2)
    return len(molecule.neighbours(centre)) + lone_pairs + odd


def _ligands(molecule: Molecule, centre: int) -> tuple[list[Ligand], dict[str, list[int]]]:
    """The centre's ligands, and the Kekulé orders of its delocalised bonds to each element.

    Delocalised bonds to one element are one kind of ligand (carbonate's three O).
    """
    shared: dict[str, list[int]] = {}
    for neighbour, order in molecule.bonds_of(centre):
        if _delocalised(molecule, centre, neighbour):
            shared.setdefault(molecule.atoms[neighbour].element, []).append(order)
    ligands = []
    for neighbour, order in molecule.bonds_of(centre):
        symbol = molecule.atoms[neighbour].element
        electronegativity = elements.element(symbol).electronegativity
        if _delocalised(molecule, centre, neighbour):
            ligands.append(Ligand(symbol, symbol + "~", max(shared[symbol]), electronegativity))
        else:
            ligands.append(Ligand(symbol, _site_label(symbol, order), order, electronegativity))
    return ligands, shared


def _centre_exception(molecule: Molecule, centre: int) -> KnownException | None:
    """Where plain VSEPR is known to fail for this centre (a carbene, a pyramidal radical, XeF6)."""
    nonbonding = molecule.nonbonding_electrons(centre)
    if nonbonding is None or nonbonding < 0:
        return None
    lone_pairs, odd = divmod(nonbonding, 2)
    atom = molecule.atoms[centre]
    ligands, _ = _ligands(molecule, centre)
    return known_exception(atom.element, tuple(ligands), lone_pairs, odd, atom.charge, bonds_known=True)


def _placed(molecule: Molecule, centre: int, exception: KnownException | None) -> Coordinates | str:
    """Ligands on the sites the expected isomer gives them; a lone pair's site stays empty.

    An odd electron takes a site of its own, as a lone pair does (its domain
    is smaller, but it is one).  A known exception to VSEPR (a planar or a
    pyramidal radical, a carbene) decides the polyhedron and the lone-pair
    sites instead.
    """
    from .isomers import expected, isomers_for

    centre_atom = molecule.atoms[centre]
    nonbonding = molecule.nonbonding_electrons(centre)
    if nonbonding is None:
        return f"{centre_atom.element} is outside the main group: no VSEPR polyhedron to place its ligands on"
    if nonbonding < 0:
        return f"{centre_atom.label} has more bonds than valence electrons: no electron count to place them by"
    bonds = molecule.bonds_of(centre)
    if exception is not None and exception.lone_pair_sites is not None:
        geometry, empty_sites = exception.electron_geometry, exception.lone_pair_sites
    else:
        lone_pairs, odd = divmod(nonbonding, 2)
        empty_sites = lone_pairs + odd
        geometry = ELECTRON_GEOMETRY.get(len(bonds) + empty_sites)
        if geometry is None:
            return f"{centre_atom.label} has {len(bonds) + empty_sites} electron domains: no VSEPR polyhedron for that"
    ligands, shared = _ligands(molecule, centre)
    try:
        isomers = isomers_for(geometry, ligands, empty_sites,
                              centre_electronegativity=elements.element(centre_atom.element).electronegativity)
    except ValueError as error:
        return f"no arrangement of the ligands of {centre_atom.label} on the {geometry} polyhedron ({error})"
    free = [site for site in expected(isomers)[0].sites if site.label != LONE_PAIR]
    coordinates: list[tuple[float, float, float]] = [(0.0, 0.0, 0.0)] * len(molecule.atoms)
    for (neighbour, order), ligand in zip(bonds, ligands, strict=True):
        site = next(s for s in free if s.label == ligand.label)
        free.remove(site)
        orders = shared[ligand.symbol] if _delocalised(molecule, centre, neighbour) else [order]
        lengths = [predict_bond_length(centre_atom.element, ligand.symbol, each) for each in orders]
        if any(length is None for length in lengths):
            return f"no covalent radii for a {centre_atom.element}-{ligand.symbol} bond of order {order}"
        distance = sum(length.angstrom for length in lengths if length is not None) / len(lengths)
        coordinates[neighbour] = tuple(distance * v for v in site.vector)  # type: ignore[assignment]
    return tuple(coordinates)


def _site_label(symbol: str, order: int) -> str:
    # ligands alike in element and bond order share a label, so the ranking treats them as one kind
    return symbol + {1: "", 2: "=", 3: "≡"}.get(order, f"({order})")


# --- embedding with RDKit --------------------------------------------------------


def _embedded(molecule: Molecule) -> Coordinates | str:
    from rdkit import Chem, rdBase

    with rdBase.BlockLogs():
        mol = _rdkit_molecule(molecule, Chem)
        if isinstance(mol, str):
            return mol
        try:
            return _embed(mol, [atom.element for atom in molecule.atoms])
        except Exception as error:  # noqa: BLE001 - RDKit raises its own exception types
            return f"RDKit could not build a 3D model ({_first_line(error)})"


def _first_line(message: object) -> str:
    text = str(message).strip()
    return text.splitlines()[0] if text else "no detail"


def _embed(mol, symbols: list[str]) -> Coordinates | str:
    """The chosen conformer of an RDKit molecule (its stereo tags, if any, kept)."""
    from rdkit import Chem
    from rdkit.Chem import rdDistGeom, rdForceFieldHelpers, rdMolDescriptors

    from .point_group import point_group

    params = rdDistGeom.ETKDGv3()
    params.randomSeed = EMBEDDING_SEED
    params.numThreads = 1  # the same answer on every machine
    # rings flex too (a single embedding of cis-1,4-dimethylcyclohexane can stop in a twist boat), so a
    # molecule with a ring or a rotatable bond gets several starts
    flexible = rdMolDescriptors.CalcNumRotatableBonds(mol) > 0 or mol.GetRingInfo().NumRings() > 0
    attempts = CONFORMERS_WHEN_FLEXIBLE if flexible else 1
    conformers = list(rdDistGeom.EmbedMultipleConfs(mol, attempts, params))
    if not conformers:
        params.useRandomCoords = True  # distance geometry from random starts succeeds more often on strained cages
        conformers = list(rdDistGeom.EmbedMultipleConfs(mol, attempts, params))
    if not conformers:
        return "RDKit could not embed the molecule in 3D (its distance bounds cannot all be met)"
    field = _ForceField.for_molecule(mol, rdForceFieldHelpers)
    if field is None:  # no force field knows these atoms: the embedding alone is the model
        return _as_coordinates(mol.GetConformer(conformers[0]).GetPositions())
    candidates = [(field.minimise(mol, cid), cid) for cid in conformers]
    lowest = min(candidates)[1]
    candidates += [(field.minimise(mol, cid, torsions), cid) for cid, torsions in _rotor_settings(mol, lowest, Chem)]
    extended = _extended(mol, lowest, Chem)
    if extended is not None:
        candidates.append((field.minimise(mol, extended), extended))
    floor = min(energy for energy, _ in candidates)
    near = [(energy, cid) for energy, cid in candidates if energy <= floor + NEAR_DEGENERATE_KCAL]
    ranked = [(-_group_order(point_group(symbols, mol.GetConformer(cid).GetPositions())), round(energy, 6), cid)
              for energy, cid in near]
    best = min(ranked)[2]
    return _as_coordinates(mol.GetConformer(best).GetPositions())


def _as_coordinates(positions) -> Coordinates:
    return tuple((float(x), float(y), float(z)) for x, y, z in positions)


class _ForceField:
    """MMFF94 where it has parameters for every atom, else UFF; energies in kcal/mol."""

    def __init__(self, helpers, properties) -> None:
        self.helpers = helpers
        self.properties = properties  # MMFF's atom typing; None for UFF

    @classmethod
    def for_molecule(cls, mol, helpers) -> _ForceField | None:
        if helpers.MMFFHasAllMoleculeParams(mol):
            properties = helpers.MMFFGetMoleculeProperties(mol)
            if not _radical_typed_linear(mol, properties):
                return cls(helpers, properties)
        if helpers.UFFHasAllMoleculeParams(mol):
            return cls(helpers, None)
        return None

    def _field(self, mol, cid: int):
        if self.properties is not None:
            return self.helpers.MMFFGetMoleculeForceField(mol, self.properties, confId=cid)
        return self.helpers.UFFGetMoleculeForceField(mol, confId=cid)

    def minimise(self, mol, cid: int, torsions: tuple[tuple[int, int, int, int, float], ...] = ()) -> float:
        """Minimise conformer ``cid`` in place, holding these dihedrals; its energy without the holds."""
        field = self._field(mol, cid)
        for a, b, c, d, degrees in torsions:
            add = field.MMFFAddTorsionConstraint if self.properties is not None else field.UFFAddTorsionConstraint
            add(a, b, c, d, False, degrees, degrees, TORSION_HOLD)
        field.Initialize()
        field.Minimize(maxIts=FORCE_FIELD_STEPS)
        return float(self._field(mol, cid).CalcEnergy())


# MMFF94 atom types of linear (sp) carbon and nitrogen
_MMFF_LINEAR_TYPES = frozenset({4, 42})


def _radical_typed_linear(mol, properties) -> bool:
    """Whether MMFF94 types a bent radical atom as linear.

    MMFF has no radical types: the vinyl radical's CH and the acetyl
    radical's C=O carbon (two neighbours, one double bond, an odd electron)
    get the sp type and come out linear, where they are bent (three domains).
    UFF follows RDKit's hybridization, which counts the odd electron.
    """
    for atom in mol.GetAtoms():
        if (atom.GetNumRadicalElectrons() and properties.GetMMFFAtomType(atom.GetIdx()) in _MMFF_LINEAR_TYPES
                and str(atom.GetHybridization()) != "SP"):
            return True
    return False


def _rotor_settings(mol, start: int, Chem) -> list[tuple[int, tuple[tuple[int, int, int, int, float], ...]]]:  # noqa: N803
    """Copies of conformer ``start`` with each end group turned to eclipse (0°) or stagger (180°) its neighbour.

    An end group (CH3, CF3, OH, NH2) on a bond whose rotation a force field
    finds nearly flat can stop at any angle; a molecule drawn by a chemist
    has it eclipsed or staggered, and only these settings can keep a mirror.
    """
    from rdkit.Chem import rdMolTransforms

    rotors = []
    for atom in mol.GetAtoms():
        inner = [n for n in atom.GetNeighbors() if n.GetDegree() > 1]
        ends = [n for n in atom.GetNeighbors() if n.GetDegree() == 1]
        if len(inner) != 1 or not ends:
            continue
        partner = inner[0]
        bond = mol.GetBondBetweenAtoms(atom.GetIdx(), partner.GetIdx())
        others = [n.GetIdx() for n in partner.GetNeighbors() if n.GetIdx() != atom.GetIdx()]
        if bond.GetBondType() != Chem.BondType.SINGLE or not others:
            continue
        rotors.append((min(others), partner.GetIdx(), atom.GetIdx(), ends[0].GetIdx()))
    if not rotors:
        return []
    if len(rotors) <= MAX_ROTORS_COMBINED:
        settings = list(itertools.product((0.0, 180.0), repeat=len(rotors)))
    else:
        settings = [(0.0,) * len(rotors), (180.0,) * len(rotors)]
    made = []
    for angles in settings:
        conformer = Chem.Conformer(mol.GetConformer(start))
        cid = mol.AddConformer(conformer, assignId=True)
        placed = mol.GetConformer(cid)
        for (z, y, x, t), degrees in zip(rotors, angles, strict=True):
            rdMolTransforms.SetDihedralDeg(placed, z, y, x, t, degrees)
        made.append((cid, tuple((t, x, y, z, degrees) for (z, y, x, t), degrees in zip(rotors, angles, strict=True))))
    return made


def _extended(mol, start: int, Chem) -> int | None:  # noqa: N803 - the RDKit module, passed in
    """A copy of conformer ``start`` with every open-chain bond between heavy atoms turned anti (180°).

    A dozen random embeddings rarely find the all-anti zigzag of a long chain
    (hexadecane has 13 such bonds), though it is the lowest conformer and the
    one chemists draw; this one start gives it its chance.
    """
    from rdkit.Chem import rdMolTransforms

    def heaviest_other(atom, besides: int) -> int | None:
        others = [n for n in atom.GetNeighbors() if n.GetIdx() != besides]
        if not others:
            return None
        return min(others, key=lambda n: (-n.GetAtomicNum(), n.GetIdx())).GetIdx()

    turns = []
    for bond in mol.GetBonds():
        first, second = bond.GetBeginAtom(), bond.GetEndAtom()
        if bond.IsInRing() or bond.GetBondType() != Chem.BondType.SINGLE:
            continue
        if first.GetAtomicNum() == 1 or second.GetAtomicNum() == 1:
            continue
        before, after = heaviest_other(first, second.GetIdx()), heaviest_other(second, first.GetIdx())
        if before is None or after is None or mol.GetAtomWithIdx(before).GetAtomicNum() == 1 \
                or mol.GetAtomWithIdx(after).GetAtomicNum() == 1:
            continue  # an end group: the rotor settings try it
        turns.append((before, first.GetIdx(), second.GetIdx(), after))
    if not turns:
        return None
    cid = mol.AddConformer(Chem.Conformer(mol.GetConformer(start)), assignId=True)
    conformer = mol.GetConformer(cid)
    for a, b, c, d in turns:
        rdMolTransforms.SetDihedralDeg(conformer, a, b, c, d, 180.0)
    return cid


def _group_order(symbol: str) -> int:
    """How many operations the point group has (linear groups count as the largest)."""
    fixed = {"C1": 1, "Cs": 2, "Ci": 2, "T": 12, "Td": 24, "Th": 24, "O": 24, "Oh": 48, "I": 60, "Ih": 120, "Kh": 10_000}
    if symbol in fixed:
        return fixed[symbol]
    if "∞" in symbol:
        return 1_000
    kind, rest = symbol[0], symbol[1:]
    digits = "".join(ch for ch in rest if ch.isdigit())
    n = int(digits) if digits else 1
    suffix = rest[len(digits):]
    if kind == "S":
        return n
    if kind == "C":
        return n * (2 if suffix in ("v", "h") else 1)
    return 2 * n * (2 if suffix in ("h", "d") else 1)  # D groups


def _rdkit_molecule(molecule: Molecule, Chem):  # noqa: N803 - the RDKit module, passed in
    """Our molecule as an RDKit one: charges, radicals and Kekulé orders as given, no valence check."""
    kinds = {1: Chem.BondType.SINGLE, 2: Chem.BondType.DOUBLE, 3: Chem.BondType.TRIPLE}
    editable = Chem.RWMol()
    for atom in molecule.atoms:
        try:
            made = Chem.Atom(atom.element)
        except RuntimeError:
            return f"RDKit does not know the element {atom.element!r}"
        made.SetFormalCharge(atom.charge)
        made.SetNumRadicalElectrons(atom.unpaired)
        made.SetNoImplicit(True)  # every hydrogen is an atom of the molecule already
        editable.AddAtom(made)
    for bond in molecule.bonds:
        kind = kinds.get(bond.order)
        if kind is None:
            return f"a bond of order {bond.order} between {molecule.atoms[bond.first].label} and {molecule.atoms[bond.second].label}"
        editable.AddBond(bond.first, bond.second, kind)
    mol = editable.GetMol()
    mol.UpdatePropertyCache(strict=False)
    # no valence check (hypervalent centres are ours to judge), and neither radicals nor functional
    # groups rewritten: the molecule stays as it was read
    flags = Chem.SanitizeFlags
    steps = flags.SANITIZE_ALL ^ flags.SANITIZE_PROPERTIES ^ flags.SANITIZE_FINDRADICALS ^ flags.SANITIZE_CLEANUP
    failed = Chem.SanitizeMol(mol, steps, catchErrors=True)
    if failed != flags.SANITIZE_NONE:
        Chem.FastFindRings(mol)  # embedding needs ring information even when aromaticity could not be set
    return mol


def _stereoisomer_groups(molecule: Molecule) -> list[tuple[str, str]] | str | None:
    """(point group, description) of each stereoisomer that can be built; None when no stereo choice is
    open; a sentence when there are too many stereoisomers to model."""
    from rdkit import Chem, rdBase
    from rdkit.Chem.EnumerateStereoisomers import EnumerateStereoisomers, StereoEnumerationOptions

    from .point_group import point_group

    with rdBase.BlockLogs():
        mol = _rdkit_molecule(molecule, Chem)
        if isinstance(mol, str):
            return None
        ring_info = mol.GetRingInfo()
        open_bonds, open_atoms = [], []
        for item in Chem.FindPotentialStereo(mol):
            if item.type == Chem.StereoType.Atom_Tetrahedral:
                if not _cage_vertex(molecule, item.centeredOn):
                    open_atoms.append(item.centeredOn)
            elif item.type == Chem.StereoType.Bond_Double:
                index = item.centeredOn
                if ring_info.NumBondRings(index) and ring_info.MinBondRingSize(index) <= 8:
                    continue  # Z in a ring of up to eight, as chemists mean unless they say otherwise
                open_bonds.append(index)
        if not open_bonds and len(open_atoms) < 2:
            return None  # at most one stereocentre: enantiomers share their point group
        if 2 ** (len(open_bonds) + len(open_atoms)) > MAX_STEREOISOMERS:
            return (f"the point group depends on the stereoisomer, which the molecule as written does not fix "
                    f"({len(open_bonds)} double bonds and {len(open_atoms)} stereocentres left open: too many "
                    "stereoisomers to model each)")
        options = StereoEnumerationOptions(onlyUnassigned=True, unique=True, maxIsomers=MAX_STEREOISOMERS)
        symbols = [atom.element for atom in molecule.atoms]
        found = []
        for isomer in EnumerateStereoisomers(mol, options=options):
            try:
                coordinates = _embed(isomer, symbols)
            except Exception as error:  # noqa: BLE001 - RDKit raises its own exception types
                return f"the point group depends on the stereoisomer, and one could not be modelled ({_first_line(error)})"
            if isinstance(coordinates, str):
                continue  # a form that cannot be built (a trans-fused small bicycle)
            found.append((point_group(symbols, coordinates), _describe_stereo(isomer, molecule, open_bonds, open_atoms)))
    return found or None


def _cage_vertex(molecule: Molecule, index: int) -> bool:
    """True when every two of the atom's ring neighbours close a ring of at most CAGE_RING_SIZE through it.

    Such an atom (a corner of cubane, a bridgehead of adamantane or of
    bicyclo[1.1.0]butane) cannot be inverted without its substituent pointing
    into the cage, so its configuration is fixed by the rest of the cage.  A
    ring-fusion atom of decalin is not one: two of its neighbours are joined
    only round the ten-membered rim, and cis- and trans-decalin both exist.
    """
    neighbours = molecule.neighbours(index)
    reach = {n: _distances_avoiding(molecule, n, index) for n in neighbours}
    in_rings = [n for n in neighbours if any(m != n and m in reach[n] for m in neighbours)]
    if len(in_rings) < 3:
        return False
    return all(
        reach[a].get(b, CAGE_RING_SIZE) + 2 <= CAGE_RING_SIZE
        for position, a in enumerate(in_rings) for b in in_rings[position + 1:]
    )


def _distances_avoiding(molecule: Molecule, start: int, avoided: int) -> dict[int, int]:
    """Bonds from ``start`` to every atom it reaches without passing through ``avoided``."""
    distances = {start: 0}
    frontier = [start]
    while frontier:
        grown = []
        for atom in frontier:
            for neighbour in molecule.neighbours(atom):
                if neighbour != avoided and neighbour not in distances:
                    distances[neighbour] = distances[atom] + 1
                    grown.append(neighbour)
        frontier = grown
    return distances


def _describe_stereo(isomer, molecule: Molecule, bonds: list[int], atoms: list[int]) -> str:
    """"C2=C3 E", "C2 R, C3 S", "C2 r, C5 r": the CIP descriptors of one stereoisomer ("?" where CIP gives none)."""
    from rdkit.Chem import rdCIPLabeler

    rdCIPLabeler.AssignCIPLabels(isomer)
    labels = [atom.label for atom in molecule.atoms]
    words = []
    for index in bonds:
        bond = isomer.GetBondWithIdx(index)
        letter = bond.GetProp("_CIPCode") if bond.HasProp("_CIPCode") else "?"
        words.append(f"{labels[bond.GetBeginAtomIdx()]}={labels[bond.GetEndAtomIdx()]} {letter}")
    for index in atoms:
        atom = isomer.GetAtomWithIdx(index)
        words.append(f"{labels[index]} {atom.GetProp('_CIPCode') if atom.HasProp('_CIPCode') else '?'}")
    return ", ".join(words)


def _connected(molecule: Molecule) -> bool:
    seen = {0}
    frontier = [0]
    while frontier:
        index = frontier.pop()
        for neighbour in molecule.neighbours(index):
            if neighbour not in seen:
                seen.add(neighbour)
                frontier.append(neighbour)
    return len(seen) == len(molecule.atoms)
