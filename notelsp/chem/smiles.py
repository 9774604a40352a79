"""SMILES -> Molecule, read with RDKit (imported only when a SMILES is read).

Hydrogens become explicit atoms so that every centre sees its neighbours;
aromatic rings keep one Kekulé structure with their bonds marked delocalised.
Hypervalent main-group SMILES (``F[Cl](F)F``) fail RDKit's valence check; they
are read again without it, because our own electron count decides what such a
centre is.
"""

from __future__ import annotations

from .molecule import Molecule, MoleculeAtom, MoleculeBond, label_atoms, mark_delocalised_groups

_VALENCE_PROBLEMS = frozenset({"AtomValenceException"})
MAX_ATOMS = 1000  # hydrogens included: far beyond a molecule analysed centre by centre in a note, and still fast
_ORDERS = {1.0: 1, 2.0: 2, 3.0: 3}


def read_smiles(text: str) -> Molecule | str:
    """The molecule a SMILES string describes, or a sentence saying why it cannot be read."""
    smiles = text.strip()
    if not smiles:
        return "empty SMILES"
    if any(c.isspace() for c in smiles):
        return "a SMILES has no spaces: write one molecule without blanks"
    if "." in smiles:
        return "the SMILES has several disconnected parts ('.'): write one molecule per species"
    from rdkit import Chem, rdBase

    with rdBase.BlockLogs():
        mol = Chem.MolFromSmiles(smiles)
        if mol is None:
            mol = _read_without_valence_check(Chem, smiles)
            if isinstance(mol, str):
                return mol
        try:
            Chem.Kekulize(mol, clearAromaticFlags=False)
        except Exception as error:  # noqa: BLE001 - RDKit raises its own exception types
            return f"no Kekulé structure for the aromatic atoms of {smiles!r} ({_first_line(error)})"
        mol = Chem.AddHs(mol)
    if mol.GetNumAtoms() > MAX_ATOMS:
        return (f"the SMILES {smiles[:40]!r}{'...' if len(smiles) > 40 else ''} has {mol.GetNumAtoms()} atoms with "
                f"its hydrogens; centres are analysed for molecules of up to {MAX_ATOMS} atoms")
    return _molecule(mol, smiles)


def _read_without_valence_check(Chem, smiles: str):  # noqa: N803 - the RDKit module, passed in
    """Parse without sanitising; accept only problems of valence, which our own electron count judges."""
    mol = Chem.MolFromSmiles(smiles, sanitize=False)
    if mol is None:
        return f"not valid SMILES: {smiles!r} (check brackets, ring-closure digits and element symbols)"
    problems = Chem.DetectChemistryProblems(mol)
    others = [p for p in problems if p.GetType() not in _VALENCE_PROBLEMS]
    if any("Kekulize" in p.GetType() for p in others):
        return (f"the aromatic (lowercase) atoms of {smiles!r} have no Kekulé structure: check the ring and "
                "write a ring NH as [nH]")
    if others:
        return f"the SMILES {smiles!r} cannot be read: {_first_line(others[0].Message())}"
    mol.UpdatePropertyCache(strict=False)
    flags = Chem.SanitizeFlags.SANITIZE_ALL ^ Chem.SanitizeFlags.SANITIZE_PROPERTIES
    failed = Chem.SanitizeMol(mol, flags, catchErrors=True)
    if failed != Chem.SanitizeFlags.SANITIZE_NONE:
        return f"the SMILES {smiles!r} cannot be read (RDKit step {failed} failed)"
    return mol


def _first_line(message: object) -> str:
    return str(message).strip().splitlines()[0] if str(message).strip() else "no detail"


def _molecule(mol, smiles: str) -> Molecule | str:
    read = list(mol.GetAtoms())
    if any(atom.GetAtomicNum() == 0 for atom in read):
        return f"the SMILES {smiles!r} has a wildcard or dummy atom: no element to analyse"
    symbols = [atom.GetSymbol() for atom in read]
    labels = label_atoms(symbols)
    atoms = tuple(
        MoleculeAtom(symbol, label, atom.GetFormalCharge(), atom.GetNumRadicalElectrons())
        for symbol, label, atom in zip(symbols, labels, read, strict=True)
    )
    bonds = []
    for bond in mol.GetBonds():
        order = _ORDERS.get(bond.GetBondTypeAsDouble())
        if order is None:
            return f"the SMILES {smiles!r} has a bond of type {bond.GetBondType()} that has no order 1, 2 or 3"
        first, second = sorted((bond.GetBeginAtomIdx(), bond.GetEndAtomIdx()))
        bonds.append(MoleculeBond(first, second, order, delocalised=bond.GetIsAromatic()))
    return Molecule(atoms, mark_delocalised_groups(atoms, tuple(bonds)), smiles)
