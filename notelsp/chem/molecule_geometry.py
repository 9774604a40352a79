"""A 3D model of a whole molecule, and the point group and polarity it has.

Two ways to a model:

- a molecule with one centre and five or more electron domains on it (SF4,
  ClF3, XeF4, PF5, SF6, XeF2, I3-) has its ligands placed on the VSEPR
  polyhedron, in the arrangement the isomer ranking expects, lone-pair sites
  left empty.  Force fields have few parameters for such centres and distance
  geometry has no notion of lone pairs, so embedding gives poor shapes there;
- every other molecule is embedded by RDKit's distance geometry (ETKDG, fixed
  seed) and cleaned up with a force field (MMFF94 where it has parameters for
  every atom, else UFF).  Molecules with freely rotating bonds get several
  embeddings and the lowest-energy minimum is kept, so that the model is the
  conformer chemists mean (anti butane, chair cyclohexane, staggered ethane).

Either way the model is one conformer, deterministic for a given molecule.
RDKit is imported only when a model is made.
"""

from __future__ import annotations

from functools import lru_cache

from .. import elements
from .bondlength import predict_bond_length
from .isomers import expected, isomers_for
from .model import LONE_PAIR, Ligand
from .molecule import Molecule
from .point_group import point_group
from .polarity import is_polar
from .vsepr import ELECTRON_GEOMETRY

Coordinates = tuple[tuple[float, float, float], ...]  # Å, one triple per atom in the molecule's order

EMBEDDING_SEED = 20240917  # any fixed seed: the same molecule always gets the same model
CONFORMERS_WHEN_FLEXIBLE = 12  # embeddings tried when a bond rotates freely; the lowest minimum is kept
FORCE_FIELD_STEPS = 2000  # enough for a 30-atom molecule to converge from an ETKDG start
PLACED_FROM_DOMAINS = 5  # a single centre with this many electron domains or more is placed, not embedded
_MODEL_CACHE = 512  # models kept (each is a few hundred floats)


@lru_cache(maxsize=_MODEL_CACHE)
def whole_molecule_symmetry(molecule: Molecule) -> tuple[str, bool] | str:
    """(point group, polar) of the whole molecule, or a sentence saying why there is none.

    The point group is that of one 3D model (``model_3d``): one conformer,
    the force-field minimum chemists usually mean (staggered ethane, anti
    butane).  Polar means the point group allows a permanent dipole (C1, Cs,
    Cn, Cnv, C∞v; common practice).

    The molecule graph carries no stereo configuration, so where the group
    depends on one (E or Z at a double bond, cis or trans across a ring, meso
    or not with two stereocentres) the answer is a sentence saying so, not
    the group of whichever stereoisomer the model happened to be.  A double
    bond inside a ring of up to eight atoms is taken as Z (the usual form).
    """
    model = model_3d(molecule)
    if isinstance(model, str):
        return model
    centre = _single_centre(molecule)
    if centre is None or _domains(molecule, centre) < PLACED_FROM_DOMAINS:
        open_stereo = _open_stereo(molecule)
        if open_stereo:
            return open_stereo
    group = point_group([atom.element for atom in molecule.atoms], model)
    return group, is_polar(group)


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
    centre = _single_centre(molecule)
    if centre is not None and _domains(molecule, centre) >= PLACED_FROM_DOMAINS:
        return _placed(molecule, centre)
    embedded = _embedded(molecule)
    if isinstance(embedded, str) and centre is not None:
        placed = _placed(molecule, centre)
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


def _domains(molecule: Molecule, centre: int) -> int:
    nonbonding = molecule.nonbonding_electrons(centre)
    if nonbonding is None or nonbonding < 0:
        return 0
    lone_pairs, odd = divmod(nonbonding, 2)
    return len(molecule.neighbours(centre)) + lone_pairs + odd


def _placed(molecule: Molecule, centre: int) -> Coordinates | str:
    """Ligands on the sites the expected isomer gives them; a lone pair's site stays empty.

    An odd electron takes a site of its own, as a lone pair does (its domain is smaller, but it is one).
    """
    centre_atom = molecule.atoms[centre]
    nonbonding = molecule.nonbonding_electrons(centre)
    if nonbonding is None:
        return f"{centre_atom.element} is outside the main group: no VSEPR polyhedron to place its ligands on"
    if nonbonding < 0:
        return f"{centre_atom.label} has more bonds than valence electrons: no electron count to place them by"
    lone_pairs, odd = divmod(nonbonding, 2)
    bonds = molecule.bonds_of(centre)
    geometry = ELECTRON_GEOMETRY.get(len(bonds) + lone_pairs + odd)
    if geometry is None:
        return f"{centre_atom.label} has {len(bonds) + lone_pairs + odd} electron domains: no VSEPR polyhedron for that"
    ligands = []
    for neighbour, order in bonds:
        symbol = molecule.atoms[neighbour].element
        ligands.append(Ligand(symbol, _site_label(symbol, order), order, elements.element(symbol).electronegativity))
    try:
        isomers = isomers_for(geometry, ligands, lone_pairs + odd,
                              centre_electronegativity=elements.element(centre_atom.element).electronegativity)
    except ValueError as error:
        return f"no arrangement of the ligands of {centre_atom.label} on the {geometry} polyhedron ({error})"
    sites = [site for site in expected(isomers)[0].sites if site.label != LONE_PAIR]
    coordinates: list[tuple[float, float, float]] = [(0.0, 0.0, 0.0)] * len(molecule.atoms)
    free = list(sites)
    for (neighbour, order), ligand in zip(bonds, ligands, strict=True):
        site = next(s for s in free if s.label == ligand.label)
        free.remove(site)
        length = predict_bond_length(centre_atom.element, ligand.symbol, order)
        if length is None:
            return f"no covalent radii for a {centre_atom.element}-{ligand.symbol} bond of order {order}"
        coordinates[neighbour] = tuple(length.angstrom * v for v in site.vector)  # type: ignore[assignment]
    return tuple(coordinates)


def _site_label(symbol: str, order: int) -> str:
    # ligands alike in element and bond order share a label, so the ranking treats them as one kind
    return symbol + {1: "", 2: "=", 3: "≡"}.get(order, f"({order})")


# --- embedding with RDKit --------------------------------------------------------


def _embedded(molecule: Molecule) -> Coordinates | str:
    from rdkit import Chem, rdBase
    from rdkit.Chem import rdDistGeom, rdForceFieldHelpers, rdMolDescriptors

    with rdBase.BlockLogs():
        mol = _rdkit_molecule(molecule, Chem)
        if isinstance(mol, str):
            return mol
        flexible = rdMolDescriptors.CalcNumRotatableBonds(mol) > 0
        params = rdDistGeom.ETKDGv3()
        params.randomSeed = EMBEDDING_SEED
        params.numThreads = 1  # the same answer on every machine
        attempts = CONFORMERS_WHEN_FLEXIBLE if flexible else 1
        conformers = list(rdDistGeom.EmbedMultipleConfs(mol, attempts, params))
        if not conformers:
            params.useRandomCoords = True  # distance geometry from random starts succeeds more often on strained cages
            conformers = list(rdDistGeom.EmbedMultipleConfs(mol, attempts, params))
        if not conformers:
            return "RDKit could not embed the molecule in 3D (its distance bounds cannot all be met)"
        energies = _minimised(mol, Chem, rdForceFieldHelpers)
        if energies is not None:
            best = min(range(len(conformers)), key=lambda i: (round(energies[i], 6), i))
        else:
            best = 0  # no force field knows these atoms: the embedding alone is the model
        positions = mol.GetConformer(conformers[best]).GetPositions()
    return tuple((float(x), float(y), float(z)) for x, y, z in positions)


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


def _open_stereo(molecule: Molecule) -> str | None:
    """Why the point group depends on a stereo configuration the molecule does not fix; None when it does not."""
    from rdkit import Chem, rdBase

    with rdBase.BlockLogs():
        mol = _rdkit_molecule(molecule, Chem)
        if isinstance(mol, str):
            return None
        found = Chem.FindPotentialStereo(mol)
        ring_info = mol.GetRingInfo()
    labels = [atom.label for atom in molecule.atoms]
    for item in found:
        if item.type != Chem.StereoType.Bond_Double:
            continue
        bond = mol.GetBondWithIdx(item.centeredOn)
        if ring_info.NumBondRings(bond.GetIdx()) and ring_info.MinBondRingSize(bond.GetIdx()) <= 8:
            continue  # Z in a ring of up to eight, as chemists mean unless they say otherwise
        first, second = labels[bond.GetBeginAtomIdx()], labels[bond.GetEndAtomIdx()]
        return (f"the point group depends on whether {first}={second} is E or Z, which the molecule as "
                "written does not say")
    centres = [labels[item.centeredOn] for item in found if item.type == Chem.StereoType.Atom_Tetrahedral]
    if len(centres) >= 2:
        return (f"the point group depends on the relative configuration of {', '.join(centres)} "
                "(cis/trans or meso), which the molecule as written does not say")
    return None


def _minimised(mol, Chem, rdForceFieldHelpers) -> list[float] | None:  # noqa: N803 - RDKit modules, passed in
    """Each conformer's force-field energy after minimising it in place; None when no force field applies."""
    if rdForceFieldHelpers.MMFFHasAllMoleculeParams(mol):
        results = rdForceFieldHelpers.MMFFOptimizeMoleculeConfs(mol, numThreads=1, maxIters=FORCE_FIELD_STEPS)
    elif rdForceFieldHelpers.UFFHasAllMoleculeParams(mol):
        results = rdForceFieldHelpers.UFFOptimizeMoleculeConfs(mol, numThreads=1, maxIters=FORCE_FIELD_STEPS)
    else:
        return None
    return [energy for _, energy in results]


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
