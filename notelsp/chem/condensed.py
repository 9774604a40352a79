"""Condensed structural formulas as chemists write them in prose -> the molecule graph.

``read_condensed(formula)`` reads ``CH3COOH``, ``(CH3)2CO``, ``CH2=CHCl`` and the
like with the conventions chemists use:

- the backbone is read left to right: each atom bonds to the backbone atom
  before it;
- H and halogens written after an atom are its substituents; written before the
  first atom (``HCOOH``, ``ClCH2CH2Cl``) they belong to that first atom, except
  a halogen followed by O2, O3, O4 (``ClO2-``, ``HClO4``), which carries them;
- a parenthesised group is a branch on the atom before it, joined by its first
  atom (``CH3C(O)NH2``, ``NH2(COCH3)``); groups written first are branches of
  the first atom, joined by their last backbone atom (``(CH3)2CO``,
  ``(CH3CO)2O``); a repeated group may also be a repeated chain unit
  (``CH3(CH2)4CH3``);
- ``HOOC``, ``HO2C``, ``OHC`` and ``O2N`` written first are read right to left,
  as the carboxyl, formyl or nitro group on the atom after them;
- an atom written after a backbone atom continues the backbone, except that an
  O or S, or an N written with its hydrogens, may instead be a terminal atom on
  it (the O of ``CHO`` and ``COOH``, the OH of ``CH3CHOHCH3``, the NH2 of
  ``CH3CHNH2COOH``);
- ``O2``/``S2`` after an atom are terminal atoms on it (``NO2``, ``CO2H``; the
  last may carry the rest, ``CO2CH3``); ``X2`` otherwise is two bonded atoms
  sharing the substituents written after them (``C2H5OH``, ``N2H4``);
  ``C6H5`` is phenyl, ``C6H6`` benzene, and ``C6H4`` between two groups a
  benzene ring whose ortho, meta and para readings are all listed; longer runs
  (``C3H7``) are not read;
- written bonds (``=``, ``≡``, ``#``: ``BondMark`` parts) are kept; every other
  bond order is completed from valence: octets, with expanded valences of
  period-3 and heavier atoms allowed, and formal charges where no neutral
  structure exists (nitro N+ O-, CNO-); the charge written on the formula must
  be the sum of the formal charges.

Every way of reading the text under these conventions is built and judged by
(unpaired electrons, carbocations, formal charges, expanded valences, departures
from the default reading), fewest first; an unpaired electron is allowed only
when the electron count is odd.  When more than one different molecule is best,
the reading lists them all and asks for explicit bonds or SMILES; when none
works, it says why.  Nothing here raises for bad input.

Which formulas are condensed (``is_condensed``): the existing single-centre
model (``species.py``) keeps AXn species, ions, oxoacids of period-3 and heavier
atoms and the symmetric two-centre molecules (SF4, PCl3F2, SO4^2-, H2SO4, C2H6).
A formula is read here instead when

1. it writes a bond (``=``, ``≡``, ``#``); or
2. a hydrogen written after the first non-hydrogen atom is followed by another
   non-hydrogen, non-halogen atom or a group (CH3OH, NH2OH, CH3CN, C6H5NH2),
   or a hydrogen is written after a later such atom (HCO2H): the hydrogens
   then sit on the atom before them, so the order is the connectivity; or
3. a non-hydrogen element is written at two separate places, groups included
   (HCOOCH3, CH3OCH3, (CH3)2CO, HC(O)OH); or
4. three or more non-hydrogen, non-halogen atoms are written one after another,
   each once (HNCO, HOCN, CNO-, OCS): a chain in written order, not a centre
   with ligands; or
5. it is an oxoacid written H_m X O_n where the single-centre model keeps a
   hydrogen on X but the octet rule puts every hydrogen on oxygen (HNO2 is
   HO-N=O; HNO3, H2SO4 and H2CO3 stay, the two agree there); or
6. it writes a benzene ring (C6H5, C6H6).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import lru_cache
from typing import TYPE_CHECKING, Iterator

from .. import elements
from ..notation.model import Atom, BondMark, Formula, Group, Span
from .species import build_species

if TYPE_CHECKING:
    from .molecule import Molecule

SUBSTITUENTS = frozenset({"H", "F", "Cl", "Br", "I", "At"})  # written after an atom, they sit on it
HALOGENS = frozenset({"F", "Cl", "Br", "I", "At"})
# Written in a chain without parentheses, only O and S (and N written with its hydrogens, CH3CHNH2COOH) may
# be terminal atoms (the O of CHO, COOH, COCl); any other atom continues the backbone, as the text's order
# says (CNO- is C-N-O).
TERMINAL_WITHOUT_PARENTHESES = frozenset({"O", "S", "Se"})
MAX_ATOMS = 120  # beyond this a condensed formula is unreadable prose anyway; SMILES is the way
MAX_CANDIDATES = 1024  # readings built before giving up (each is judged by its bond orders)
_MAX_RESONANCE = 64  # equally good bond-order assignments kept to find delocalised bonds
_SUGGESTION = 'write the bonds (e.g. CH2=CHCl) or give the molecule as SMILES (smiles "C=CCl")'


@dataclass(frozen=True)
class CondensedReading:
    """What a condensed formula says: one molecule, every reasonable reading, or why it cannot be read."""

    molecule: Molecule | None = None  # set when exactly one reading is best
    readings: tuple[Molecule, ...] = ()  # every equally good reading when there is more than one
    reason: str | None = None  # why there is no single molecule (ambiguity or unreadable text)

    @property
    def ambiguous(self) -> bool:
        return len(self.readings) > 1


# --- valence states -------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class _State:
    """One way an atom may be bonded: its total bond order, charge and unpaired electrons."""

    valence: int  # sum of bond orders
    charge: int
    unpaired: int = 0
    expanded: bool = False
    sextet: bool = False  # a carbocation: six electrons where an octet was possible


# Non-metals and metalloids: the atoms whose bonds in a condensed formula are covalent
COVALENT = frozenset({"B", "C", "N", "O", "F", "Si", "P", "S", "Cl", "Ge", "As", "Se", "Br", "Sb", "Te", "I", "At"})


@lru_cache(maxsize=256)
def _states(symbol: str) -> tuple[_State, ...]:
    """The bonding states an atom may take: its usual valence first, then charged, expanded and radical ones."""
    if symbol == "H":
        return (_State(1, 0),)
    if symbol not in COVALENT:
        return ()
    element = elements.element(symbol)
    electrons = element.valence_electrons
    if electrons is None or electrons >= 8 or not element.is_main_group:
        return ()
    usual = electrons if electrons <= 4 else 8 - electrons
    states = [_State(usual, 0)]
    if electrons >= 5:  # onium (N+, O+) and anion (N-, O-) forms
        states += [_State(usual + 1, +1), _State(usual - 1, -1)]
    elif electrons == 4:  # carbanion and carbocation
        states += [_State(usual - 1, -1), _State(usual - 1, +1, sextet=True)]
    elif electrons == 3:  # borate-like
        states += [_State(usual + 1, -1)]
    if element.period >= 3 and electrons >= 5:
        states += [_State(v, 0, expanded=True) for v in range(usual + 2, electrons + 1, 2)]
    if usual >= 2:
        states.append(_State(usual - 1, 0, unpaired=1))
    return tuple(s for s in states if s.valence >= 1 or symbol in HALOGENS)


# --- the written formula as items ----------------------------------------------------


@dataclass(frozen=True, slots=True)
class _Item:
    """One token of a condensed formula (an atom, a count, a group or a bond mark)."""

    kind: str  # "heavy", "sub", "group", "bond"
    symbol: str = ""
    count: int = 1
    parts: tuple = ()
    order: int = 0


def _items(parts: tuple) -> list[_Item]:
    items = []
    for part in parts:
        if isinstance(part, BondMark):
            items.append(_Item("bond", order=part.order))
        elif isinstance(part, Group):
            items.append(_Item("group", count=part.count, parts=part.parts))
        elif isinstance(part, Atom):
            kind = "sub" if part.symbol in SUBSTITUENTS else "heavy"
            items.append(_Item(kind, part.symbol, part.count))
    for index, item in enumerate(items[:-1]):
        following = items[index + 1]
        if item.kind == "sub" and item.symbol in HALOGENS and item.count == 1 \
                and following.kind == "heavy" and following.symbol == "O" and following.count >= 2:
            # a halogen's oxo-acid or -anion (ClO2-, HClO4, BrO3-): the halogen carries the oxygens
            items[index] = _Item("heavy", item.symbol, 1)
    if not any(item.kind in ("heavy", "group") for item in items):
        # only H and halogens (HF, ClF3, Br2): the first non-hydrogen atom is the backbone
        for index, item in enumerate(items):
            if item.kind == "sub" and (item.symbol != "H" or index == len(items) - 1):
                items[index] = _Item("heavy", item.symbol, item.count)
                break
    return items


# --- building every reading -------------------------------------------------------------


@dataclass
class _Build:
    """The molecule graph as it is assembled from the tokens."""

    symbols: list[str] = field(default_factory=list)
    edges: dict[tuple[int, int], int | None] = field(default_factory=dict)  # None: order from valence
    aromatic: set[tuple[int, int]] = field(default_factory=set)
    cost: int = 0  # departures from the default reading

    degrees: list[int] = field(default_factory=list)

    def copy(self) -> "_Build":
        return _Build(list(self.symbols), dict(self.edges), set(self.aromatic), self.cost, list(self.degrees))

    def add(self, symbol: str) -> int:
        self.symbols.append(symbol)
        self.degrees.append(0)
        return len(self.symbols) - 1

    def bond(self, a: int, b: int, order: int | None = None) -> bool:
        """Join two atoms; False (a dead reading) when they are joined already or one has no room left."""
        key = (a, b) if a < b else (b, a)
        if a == b or key in self.edges:
            return False
        for atom in (a, b):
            self.degrees[atom] += 1
            if self.degrees[atom] > _most_bonds(self.symbols[atom]):
                return False
        if order is None and "H" in (self.symbols[a], self.symbols[b]):
            order = 1
        self.edges[key] = order
        return True


@dataclass(frozen=True, slots=True)
class _Level:
    """Where the reading of one level (the formula, or one group) stands."""

    backbone: int | None = None  # the atom the next written atom bonds to
    anchor: int | None = None  # the last written non-substituent atom (H and halogens go on it)
    anchor_pendant: bool = False  # the anchor is a terminal atom on the backbone
    pending: int | None = None  # order of a written bond waiting for its next atom
    held: tuple[tuple[int, int | None], ...] = ()  # written before the first atom: (atom, bond order)
    first: int | None = None


class _Unreadable(Exception):
    """A reason the text cannot be read at all (not one failed alternative)."""


def _read_level(items: list[_Item], build: _Build, attach: int | None,
                attach_order: int | None) -> Iterator[tuple[_Build, int, int]]:
    """Every reading of one level; yields (build, first atom, last backbone atom)."""
    if items and items[0].kind == "bond":
        if attach is None:
            raise _Unreadable("a written bond with no atom before it")
        attach_order, items = items[0].order, items[1:]
    if not items:
        raise _Unreadable("empty parentheses")

    def place_first(b: _Build, atom: int, level: _Level) -> _Level | None:
        if attach is not None and not b.bond(attach, atom, attach_order):
            return None
        for held, order in level.held:
            if not b.bond(atom, held, order):
                return None
        return _Level(atom, atom, False, None, (), atom)

    def step(i: int, b: _Build, lv: _Level) -> Iterator[tuple[_Build, int, int]]:
        if len(b.symbols) > MAX_ATOMS:
            raise _Unreadable(f"more than {MAX_ATOMS} atoms")
        if i == len(items):
            if lv.pending is not None:
                raise _Unreadable("a written bond with no atom after it")
            if lv.first is None:
                raise _Unreadable("no atom for the written hydrogens, halogens or groups to sit on")
            yield b, lv.first, lv.backbone
            return
        item = items[i]
        if item.kind == "bond":
            if lv.anchor is None:
                raise _Unreadable("a written bond with no atom before it")
            if lv.pending is not None:
                raise _Unreadable("two written bonds in a row")
            # the next atom bonds to the backbone atom: after a terminal atom that is the atom it sits on
            # (CH3-CO-CH3 is acetone)
            yield from step(i + 1, b, _Level(lv.backbone, lv.anchor, lv.anchor_pendant, item.order, lv.held, lv.first))
        elif item.kind == "sub":
            yield from substituent(i, item, b, lv)
        elif item.kind == "group":
            yield from group(i, item, b, lv)
        else:
            yield from heavy(i, item, b, lv)

    def substituent(i: int, item: _Item, b: _Build, lv: _Level) -> Iterator[tuple[_Build, int, int]]:
        if lv.pending is not None:
            raise _Unreadable(f"a written bond to {item.symbol}, which takes only single bonds here")
        if lv.anchor is None:
            b = b.copy()
            held = tuple((b.add(item.symbol), 1) for _ in range(item.count))
            yield from step(i + 1, b, _Level(held=lv.held + held))
            return
        targets = [(lv.anchor, 0)] + ([(lv.backbone, 1)] if lv.anchor_pendant else [])
        for target, cost in targets:
            nb = b.copy()
            nb.cost += cost
            if all(nb.bond(target, nb.add(item.symbol)) for _ in range(item.count)):
                yield from step(i + 1, nb, lv)

    def group(i: int, item: _Item, b: _Build, lv: _Level) -> Iterator[tuple[_Build, int, int]]:
        inner = _items(item.parts)
        order = lv.pending
        if lv.backbone is None:  # written first: branches of the first atom, joined by their last atom ((CH3CO)2O)
            yield from copies(inner, item.count, b, None, None, lambda nb, ends: step(
                i + 1, nb, _Level(held=lv.held + tuple((e, order) for e in ends))), by_end=True)
            return
        after = _Level(lv.backbone, lv.backbone, False, None, lv.held, lv.first)
        yield from copies(inner, item.count, b, lv.backbone, order, lambda nb, firsts: step(i + 1, nb, after))
        if item.count > 1:  # a repeated chain unit, CH3(CH2)4CH3
            yield from chain(inner, item.count, b, lv, i, order)

    def copies(inner, count, b, attach_to, order, then, by_end=False) -> Iterator[tuple[_Build, int, int]]:
        def one(k: int, nb: _Build, joins: tuple[int, ...]):
            if k == count:
                yield from then(nb, joins)
                return
            for built, first, end in _read_level(inner, nb.copy(), attach_to, order):
                yield from one(k + 1, built, joins + (end if by_end else first,))
        yield from one(0, b, ())

    def chain(inner, count, b, lv: _Level, i: int, order) -> Iterator[tuple[_Build, int, int]]:
        def one(k: int, nb: _Build, last: int):
            if k == count:
                nb.cost += 1
                yield from step(i + 1, nb, _Level(last, last, False, None, lv.held, lv.first))
                return
            for built, _, end in _read_level(inner, nb.copy(), last, order if k == 0 else None):
                yield from one(k + 1, built, end)
        yield from one(0, b, lv.backbone)

    def heavy(i: int, item: _Item, b: _Build, lv: _Level) -> Iterator[tuple[_Build, int, int]]:
        symbol, count = item.symbol, item.count
        if count == 1:
            nb = b.copy()
            atom = nb.add(symbol)
            if lv.backbone is None:
                level = place_first(nb, atom, lv)
                if level is not None:
                    yield from step(i + 1, nb, level)
                return
            if not nb.bond(lv.backbone, atom, lv.pending):
                return
            yield from step(i + 1, nb, _Level(atom, atom, False, None, lv.held, lv.first))
            following = items[i + 1] if i + 1 < len(items) else None
            carries_hydrogen = following is not None and following.kind == "sub" and following.symbol == "H"
            if symbol not in TERMINAL_WITHOUT_PARENTHESES and not (symbol == "N" and carries_hydrogen):
                return
            pendant = nb.copy()
            pendant.cost += 1
            yield from step(i + 1, pendant, _Level(lv.backbone, atom, True, None, lv.held, lv.first))
            return
        if symbol == "C" and count == 6:
            yield from ring(i, b, lv)
            return
        # O2 or S2 after an atom are two terminal atoms on it (NO2, CO2H), never a peroxide
        terminal_only = symbol in TERMINAL_WITHOUT_PARENTHESES and lv.backbone is not None
        if lv.backbone is not None:
            yield from terminals(i, item, b, lv, 0 if terminal_only else 1)
        if count == 2 and not terminal_only:
            yield from pair(i, item, b, lv, 0)
        elif lv.backbone is None:
            raise _Unreadable(f"{symbol}{count}: how {count} {symbol} atoms are joined is not written "
                              f"(write the chain out, e.g. CH3CH2CH2, or give SMILES)")

    def terminals(i: int, item: _Item, b: _Build, lv: _Level, cost: int) -> Iterator[tuple[_Build, int, int]]:
        """Xn after an atom: n terminal atoms on it (NO2, SO3); the last may continue the backbone (CO2CH3)."""
        nb = b.copy()
        nb.cost += cost
        atoms = [nb.add(item.symbol) for _ in range(item.count)]
        if not all(nb.bond(lv.backbone, a, lv.pending if k == 0 else None) for k, a in enumerate(atoms)):
            return
        last = atoms[-1]
        yield from step(i + 1, nb, _Level(lv.backbone, last, True, None, lv.held, lv.first))
        onward = nb.copy()
        onward.cost += 1
        yield from step(i + 1, onward, _Level(last, last, False, None, lv.held, lv.first))

    def pair(i: int, item: _Item, b: _Build, lv: _Level, cost: int) -> Iterator[tuple[_Build, int, int]]:
        """X2: two bonded atoms sharing the substituents written after them (and before, when first)."""
        j = i + 1
        subs: list[tuple[str, int]] = []
        while j < len(items) and items[j].kind == "sub":
            subs.append((items[j].symbol, items[j].count))
            j += 1
        nb = b.copy()
        nb.cost += cost
        a, z = nb.add(item.symbol), nb.add(item.symbol)
        nb.bond(a, z)
        shared: list[int] = []
        if lv.backbone is not None:
            if not nb.bond(lv.backbone, a, lv.pending):
                return
            first = lv.first
        else:
            if attach is not None and not nb.bond(attach, a, attach_order):
                return
            # hydrogens and halogens written before the pair are shared too (H2O2); groups sit on the first atom
            shared = [h for h, order in lv.held if order == 1 and nb.symbols[h] in SUBSTITUENTS]
            if not all(nb.bond(a, h, order) for h, order in lv.held if h not in shared):
                return
            first = a
        pool = [nb.add(s) for s, n in subs for _ in range(n)] + shared
        seen: set[tuple[str, ...]] = set()
        for on_first in _splits(pool, nb.symbols):
            key = tuple(sorted(nb.symbols[h] for h in on_first))
            if key in seen:
                continue
            seen.add(key)
            split = nb.copy()
            if not all(split.bond(a if h in on_first else z, h) for h in pool):
                continue
            yield from step(j, split, _Level(z, z, False, None, (), first))

    def ring(i: int, b: _Build, lv: _Level) -> Iterator[tuple[_Build, int, int]]:
        """C6H6 benzene, C6H5 phenyl, and C6H4 between two groups (ortho, meta or para: each a reading)."""
        following = items[i + 1] if i + 1 < len(items) else None
        hydrogens = following.count if following is not None and following.kind == "sub" and following.symbol == "H" else 0
        joined_before = lv.backbone is not None or bool(lv.held) or attach is not None
        between = hydrogens == 4 and joined_before and i + 2 < len(items)
        if hydrogens not in (5, 6) and not between:
            raise _Unreadable("C6 is read as phenyl (C6H5), benzene (C6H6) or a benzene ring between two groups "
                              "(CH3C6H4CH3): for other rings or chains give SMILES")
        for exit_place in (1, 2, 3) if between else (0,):  # ortho, meta, para
            nb = b.copy()
            ring_atoms = [nb.add("C") for _ in range(6)]
            for k in range(6):
                a, c = ring_atoms[k], ring_atoms[(k + 1) % 6]
                nb.bond(a, c, 2 if k % 2 == 0 else 1)
                nb.aromatic.add((min(a, c), max(a, c)))
            ipso = ring_atoms[0]
            if between:
                bearing_h = [ring_atoms[k] for k in range(6) if k not in (0, exit_place)]
            else:
                bearing_h = ring_atoms[6 - hydrogens:]  # phenyl: all but the ring atom that joins
            for atom in bearing_h:
                nb.bond(atom, nb.add("H"))
            if lv.backbone is None:
                level = place_first(nb, ipso, lv)
                if level is None:
                    continue
            else:
                if not nb.bond(lv.backbone, ipso, lv.pending):
                    continue
                level = _Level(ipso, ipso, False, None, lv.held, lv.first)
            if between:
                exit_atom = ring_atoms[exit_place]
                level = _Level(exit_atom, exit_atom, False, None, level.held, level.first)
            yield from step(i + 2, nb, level)

    start, level = _written_backwards(items, build)
    yield from step(start, build, level)


# Groups chemists write in front of the atom they sit on, read right to left: HOOC-, HO2C-, OHC-, O2N-.
_BACKWARDS = {
    (("sub", "H", 1), ("heavy", "O", 1), ("heavy", "O", 1)): ((0, 1),),  # H on the first O
    (("sub", "H", 1), ("heavy", "O", 2)): ((0, 1),),
    (("heavy", "O", 1), ("sub", "H", 1)): (),
    (("heavy", "O", 2),): (),
}
_BACKWARDS_ATOM = {"HOOC": "C", "HO2C": "C", "OHC": "C", "O2N": "N"}


def _written_backwards(items: list[_Item], build: _Build) -> tuple[int, _Level]:
    """Where reading starts: after a group written in front of its atom (held for that atom), or at the start."""
    for pattern, inner_bonds in _BACKWARDS.items():
        n = len(pattern)
        if len(items) <= n or items[n].kind != "heavy" or items[n].count != 1:
            continue
        if tuple((it.kind, it.symbol, it.count) for it in items[:n]) != pattern:
            continue
        text = "".join(sym + (str(cnt) if cnt > 1 else "") for _, sym, cnt in pattern) + items[n].symbol
        if _BACKWARDS_ATOM.get(text) != items[n].symbol:
            continue
        atoms = [build.add(it.symbol) for it in items[:n] for _ in range(it.count)]
        for a, c in inner_bonds:
            build.bond(atoms[a], atoms[c])
        bonded = {atoms[a] for pair in inner_bonds for a in pair if build.symbols[atoms[a]] == "H"}
        held = tuple((atom, 1 if build.symbols[atom] == "H" else None) for atom in atoms if atom not in bonded)
        return n, _Level(held=held)
    return 0, _Level()


def _splits(pool: list[int], symbols: list[str]) -> Iterator[set[int]]:
    """Every way to choose which of the pooled substituents sit on the first of two atoms (by element counts)."""
    by_symbol: dict[str, list[int]] = {}
    for atom in pool:
        by_symbol.setdefault(symbols[atom], []).append(atom)
    kinds = list(by_symbol.items())

    def choose(k: int, chosen: set[int]) -> Iterator[set[int]]:
        if k == len(kinds):
            yield chosen
            return
        atoms = kinds[k][1]
        for n in range(len(atoms) + 1):
            yield from choose(k + 1, chosen | set(atoms[:n]))

    yield from choose(0, set())


def _oxoacid(items: list[_Item]) -> _Build | None:
    """H_m X O_n with the hydrogens on oxygens (HNO2 as HO-N=O), the reading of an oxoacid."""
    if len(items) != 3 or items[0].kind != "sub" or items[2].kind != "heavy":
        return None
    hydrogens, centre, oxygens = items
    if centre.kind == "sub" and centre.symbol not in HALOGENS:
        return None
    if hydrogens.symbol != "H" or centre.count != 1 or oxygens.symbol != "O" or hydrogens.count > oxygens.count:
        return None
    b = _Build(cost=1)
    hs = [b.add("H") for _ in range(hydrogens.count)]
    x = b.add(centre.symbol)
    os_ = [b.add("O") for _ in range(oxygens.count)]
    joined = all(b.bond(x, o) for o in os_) and all(b.bond(o, h) for h, o in zip(hs, os_[len(os_) - len(hs):]))
    return b if joined else None


# --- bond orders from valence -----------------------------------------------------------


@dataclass(frozen=True)
class _Solved:
    """One assignment of bond orders and atom states, with the score that ranks it."""

    score: tuple[int, int, int, int, int]  # unpaired, sextets, formal charges, expanded valences, departures
    orders: dict[tuple[int, int], int]
    states: tuple[_State, ...]
    delocalised: frozenset[tuple[int, int]]


def _solve(build: _Build, charge: int) -> _Solved | None:
    """The best bond orders and atom states for one reading, or None when no assignment closes every valence."""
    symbols = build.symbols
    options = [_states(s) for s in symbols]
    electrons = sum(elements.element(s).valence_electrons or 0 for s in symbols) - charge
    if electrons % 2 == 0:
        # an even count pairs every electron: an unpaired one would only hide a misread formula (C2H6O)
        options = [tuple(state for state in o if not state.unpaired) for o in options]
    if any(not o for o in options):
        return None
    most = [max(s.valence for s in o) for o in options]
    base = [0] * len(symbols)
    free: list[tuple[int, int]] = []
    for (a, c), order in build.edges.items():
        if order is None:
            free.append((a, c))
            base[a] += 1
            base[c] += 1
        else:
            base[a] += order
            base[c] += order
    if any(base[k] > most[k] for k in range(len(symbols))):
        return None
    electronegativity = [_electronegativity(s) for s in symbols]
    by_valence = [{} for _ in symbols]
    for k, opts in enumerate(options):
        for s in opts:
            by_valence[k].setdefault(s.valence, []).append(s)

    best: list = [None, []]  # score, [(orders, states)]
    sums = list(base)
    chosen = [1] * len(free)

    def finish() -> None:
        picked = _pick_states(by_valence, sums, charge, electronegativity)
        if picked is None:
            return
        score, states = picked
        full = (score[0], score[1], score[2], score[3], build.cost)
        if best[0] is None or full < best[0]:
            best[0], best[1] = full, []
        if full == best[0] and len(best[1]) < _MAX_RESONANCE:
            best[1].append((score[4], tuple(chosen), states))

    # an atom whose last undecided bond is settled must have a valence it can take: checked there, the
    # search stays near-linear on chains instead of trying every order of every bond
    last_edge = {}
    for k, (a, c) in enumerate(free):
        last_edge[a] = k
        last_edge[c] = k
    settled: list[list[int]] = [[] for _ in free]
    for atom, k in last_edge.items():
        settled[k].append(atom)
    allowed = [set(v) for v in by_valence]
    if any(base[k] not in allowed[k] for k in range(len(symbols)) if k not in last_edge):
        return None

    def assign(k: int) -> None:
        if k == len(free):
            finish()
            return
        a, c = free[k]
        for extra in (0, 1, 2):
            if sums[a] + extra > most[a] or sums[c] + extra > most[c]:
                break
            sums[a] += extra
            sums[c] += extra
            chosen[k] = 1 + extra
            if all(sums[atom] in allowed[atom] for atom in settled[k]):
                assign(k + 1)
            sums[a] -= extra
            sums[c] -= extra
        chosen[k] = 1

    assign(0)
    if best[0] is None:
        return None
    # equally good structures are resonance forms: the bonds they differ in are delocalised, and the one
    # shown puts negative charge on the more electronegative atoms (N≡N+-O-, not N-=N+=O)
    _, first_orders, states = min(best[1], key=lambda form: form[0])
    varying = {free[k] for k in range(len(free)) if len({orders[k] for _, orders, _ in best[1]}) > 1}
    orders = {edge: (order if order is not None else 0) for edge, order in build.edges.items()}
    for k, edge in enumerate(free):
        orders[edge] = first_orders[k]
    return _Solved(best[0], orders, states, frozenset(varying | build.aromatic))


@lru_cache(maxsize=256)
def _most_bonds(symbol: str) -> int:
    return max((state.valence for state in _states(symbol)), default=0)


@lru_cache(maxsize=256)
def _electronegativity(symbol: str) -> float:
    return elements.element(symbol).electronegativity or 2.0


def _pick_states(by_valence: list[dict], sums: list[int], charge: int, electronegativity: list[float]):
    """The least costly states whose valences match ``sums`` and whose charges add up to ``charge``."""
    # states are kept as (state, earlier) chains: appending to a tuple per atom would cost n² here
    table: dict[int, tuple[tuple, tuple | None]] = {0: ((0, 0, 0, 0, 0.0), None)}
    for k, total in enumerate(sums):
        candidates = by_valence[k].get(total)
        if not candidates:
            return None
        if len(candidates) == 1 and not candidates[0].charge and not candidates[0].unpaired \
                and not candidates[0].expanded:
            only = candidates[0]
            table = {q: (score, (only, chain)) for q, (score, chain) in table.items()}
            continue
        nxt: dict[int, tuple[tuple, tuple | None]] = {}
        for q, (score, chain) in table.items():
            for s in candidates:
                cost = (score[0] + s.unpaired, score[1] + int(s.sextet), score[2] + abs(s.charge),
                        score[3] + int(s.expanded), score[4] + s.charge * electronegativity[k])
                key = q + s.charge
                if key not in nxt or cost < nxt[key][0]:
                    nxt[key] = (cost, (s, chain))
        table = nxt
    found = table.get(charge)
    if found is None:
        return None
    score, chain = found
    states: list[_State] = []
    while chain is not None:
        states.append(chain[0])
        chain = chain[1]
    return score, tuple(reversed(states))


# --- the molecule and its identity ---------------------------------------------------------


def _molecule(build: _Build, solved: _Solved, source: str) -> Molecule:
    from .molecule import Molecule, MoleculeAtom, MoleculeBond, label_atoms  # only a formula read as condensed

    labels = label_atoms(build.symbols)
    atoms = tuple(MoleculeAtom(symbol, label, state.charge, state.unpaired)
                  for symbol, label, state in zip(build.symbols, labels, solved.states))
    bonds = tuple(MoleculeBond(a, c, solved.orders[(a, c)], (a, c) in solved.delocalised)
                  for a, c in sorted(solved.orders))
    return Molecule(atoms, bonds, source)


def _identity(molecule: Molecule) -> tuple:
    """A label for the molecule that does not depend on atom order (a few rounds of neighbourhood refinement)."""
    colours = [f"{a.element}{a.charge:+d}{a.unpaired}" for a in molecule.atoms]
    for _ in range(min(len(colours), 6)):
        colours = [colours[k] + "(" + ",".join(sorted(f"{order}{colours[n]}" for n, order in molecule.bonds_of(k))) + ")"
                   for k in range(len(colours))]
        colours = [str(hash(c)) for c in colours]
    return tuple(sorted(colours))


# --- a SMILES text for messages ------------------------------------------------------------

_ORGANIC = {"B": (3,), "C": (4,), "N": (3, 5), "O": (2,), "P": (3, 5), "S": (2, 4, 6),
            "F": (1,), "Cl": (1,), "Br": (1,), "I": (1,)}


def molecule_smiles(molecule: Molecule) -> str:
    """A SMILES text of the molecule (hydrogens folded into their atoms), to show a reading to the writer."""
    heavy = [k for k, a in enumerate(molecule.atoms) if a.element != "H"] or list(range(len(molecule.atoms)))
    heavy_set = set(heavy)
    bond_text = {1: "", 2: "=", 3: "#"}

    def token(k: int) -> str:
        atom = molecule.atoms[k]
        valence = sum(order for n, order in molecule.bonds_of(k) if n in heavy_set)
        h = sum(1 for n in molecule.neighbours(k) if n not in heavy_set)
        normal = _ORGANIC.get(atom.element)
        if normal and atom.charge == 0 and not atom.unpaired:
            if next((v - valence for v in normal if v >= valence), None) == h:
                return atom.element
        text = atom.element + ("H" if h else "") + (str(h) if h > 1 else "")
        if atom.charge:
            text += ("+" if atom.charge > 0 else "-") + (str(abs(atom.charge)) if abs(atom.charge) > 1 else "")
        return f"[{text}]"

    parent: dict[int, int | None] = {}
    closures: dict[tuple[int, int], int] = {}

    def walk(k: int, up: int | None) -> None:
        parent[k] = up
        for n, _ in molecule.bonds_of(k):
            if n not in heavy_set or n == up:
                continue
            if n in parent:
                closures.setdefault((min(k, n), max(k, n)), len(closures) + 1)
            else:
                walk(n, k)

    def write(k: int) -> str:
        out = token(k)
        for n, order in molecule.bonds_of(k):
            mark = closures.get((min(k, n), max(k, n)))
            if mark is not None and n in heavy_set:
                out += f"{bond_text[order]}{mark}"
        children = [(n, order) for n, order in molecule.bonds_of(k)
                    if n in heavy_set and parent.get(n) == k and (min(k, n), max(k, n)) not in closures]
        for index, (n, order) in enumerate(children):
            piece = bond_text[order] + write(n)
            out += piece if index == len(children) - 1 else f"({piece})"
        return out

    def heavy_degree(k: int) -> int:
        return sum(1 for n in molecule.neighbours(k) if n in heavy_set)

    texts = []
    # start each piece at an end atom where there is one: ClCCCl reads better than C(CCl)Cl
    for start in sorted(heavy, key=lambda k: heavy_degree(k) > 1):
        if start not in parent:
            walk(start, None)
            texts.append(write(start))
    return ".".join(texts)


# --- reading and dispatch ----------------------------------------------------------------


def _unreadable(reason: str) -> CondensedReading:
    return CondensedReading(reason=reason)


def _all_symbols(parts: tuple) -> Iterator[str]:
    for part in parts:
        if isinstance(part, Atom):
            yield part.symbol
        elif isinstance(part, Group):
            yield from _all_symbols(part.parts)


def read_condensed(formula: Formula) -> CondensedReading:
    """Read a condensed structural formula into one molecule, every reasonable reading, or a reason."""
    if formula.smiles is not None:
        return _unreadable("given as SMILES, not as a condensed formula")
    if not formula.parts:
        return _unreadable("nothing written")
    return _read_cached(_written(formula.parts), formula.charge, formula.text)


def _written(parts: tuple) -> tuple:
    """The parts without their positions: what the reading depends on (a species moved in a note reads the same)."""
    out = []
    for part in parts:
        if isinstance(part, Atom):
            out.append(("atom", part.symbol, part.count))
        elif isinstance(part, Group):
            out.append(("group", _written(part.parts), part.count))
        else:
            out.append(("bond", part.order))
    return tuple(out)


def _unwritten(written: tuple) -> tuple:
    """Parts again from ``_written`` (positions are not read here, so all are zero)."""
    nowhere = Span(0, 0)
    parts = []
    for entry in written:
        if entry[0] == "atom":
            parts.append(Atom(entry[1], entry[2], nowhere))
        elif entry[0] == "group":
            parts.append(Group(_unwritten(entry[1]), entry[2], nowhere))
        else:
            parts.append(BondMark(entry[1], nowhere))
    return tuple(parts)


@lru_cache(maxsize=2048)
def _read_cached(written: tuple, charge: int, text: str) -> CondensedReading:
    formula = Formula(text, _unwritten(written), charge, Span(0, len(text)))
    for symbol in _all_symbols(formula.parts):
        if not elements.is_symbol(symbol):
            return _unreadable(f"unknown element {symbol}")
        if symbol != "H" and not _states(symbol):
            return _unreadable(f"{symbol} has no covalent valence this reader knows (main-group elements only)")
    items = _items(formula.parts)
    candidates: list[_Build] = []
    oxoacid = _oxoacid(items)
    if oxoacid is not None:
        candidates.append(oxoacid)
        if items[1].symbol in HALOGENS:
            # a halogen's oxoacid has every hydrogen on oxygen (HClO3 is HO-ClO2); nothing else to weigh
            return _best_of(candidates, formula)
    try:
        for build, _, _ in _read_level(items, _Build(), None, None):
            candidates.append(build)
            if len(candidates) > MAX_CANDIDATES:
                return _unreadable(f"too many ways to read {formula.text}: {_SUGGESTION}")
    except _Unreadable as error:
        if oxoacid is None:
            return _unreadable(f"{formula.text}: {error}")
    except RecursionError:
        return _unreadable(f"{formula.text} is nested too deeply to read")
    return _best_of(candidates, formula)


def _best_of(candidates: list[_Build], formula: Formula) -> CondensedReading:
    """The best-judged readings: one molecule, every equally good one, or why none works."""
    cheapest: dict[frozenset, _Build] = {}
    for build in candidates:
        key = frozenset(build.edges.items())
        if key not in cheapest or build.cost < cheapest[key].cost:
            cheapest[key] = build
    best_score = None
    best: list[tuple[_Build, _Solved]] = []
    for build in cheapest.values():
        solved = _solve(build, formula.charge)
        if solved is None:
            continue
        if best_score is None or solved.score < best_score:
            best_score, best = solved.score, []
        if solved.score == best_score:
            best.append((build, solved))
    if not best:
        charge = f" with charge {formula.charge:+d}" if formula.charge else ""
        return _unreadable(f"{formula.text}{charge}: no reading gives every atom a usual valence "
                           f"(check the formula and its charge; a molecular formula such as C2H6O names no "
                           f"structure: write it out, e.g. CH3CH2OH, or give SMILES)")
    distinct: dict[tuple, Molecule] = {}
    for build, solved in best:
        molecule = _molecule(build, solved, formula.text)
        if len(best) == 1:
            return CondensedReading(molecule=molecule)
        distinct.setdefault(_identity(molecule), molecule)
    readings = tuple(distinct.values())
    if len(readings) == 1:
        return CondensedReading(molecule=readings[0])
    listed = " or ".join(f'smiles "{molecule_smiles(m)}"' for m in readings)
    return CondensedReading(readings=readings, reason=(
        f"{formula.text} can be read {len(readings)} ways: {listed}; write the one meant as SMILES "
        f"or write its bonds (e.g. CH2=CHCl)"))


def _has_bond(parts: tuple) -> bool:
    return any(isinstance(p, BondMark) or (isinstance(p, Group) and _has_bond(p.parts)) for p in parts)


def is_condensed(formula: Formula) -> bool:
    """True when the formula is a condensed structure for ``read_condensed`` (the rule is in the module docstring)."""
    if formula.smiles is not None or not formula.parts:
        return False
    if _has_bond(formula.parts):
        return True
    parts = formula.parts  # no written bonds from here on
    # 2. hydrogens after the first non-hydrogen atom, followed by another backbone atom or a group, or
    #    hydrogens after any later one (HCO2H)
    heavy_seen = 0
    hydrogen_after = False
    for part in parts:
        if isinstance(part, Atom) and part.symbol == "H":
            if heavy_seen >= 2:
                return True
            hydrogen_after = hydrogen_after or heavy_seen > 0
        elif isinstance(part, Group) or part.symbol not in HALOGENS:
            if hydrogen_after:
                return True
            heavy_seen += 1
    # 3. an element written at two separate places (COOH's OO, two atoms side by side, is one place)
    places = [(part, {part.symbol} if isinstance(part, Atom) else set(_all_symbols(part.parts)) - {"H"})
              for part in parts if isinstance(part, Group) or part.symbol != "H"]
    for k, (part, symbols) in enumerate(places):
        for m in range(k + 1, len(places)):
            other, other_symbols = places[m]
            side_by_side = m == k + 1 and isinstance(part, Atom) and isinstance(other, Atom)
            if symbols & other_symbols and not side_by_side:
                return True
    # 4. three non-hydrogen, non-halogen atoms in a row, each written once
    run = 0
    for part in parts:
        if isinstance(part, Atom) and part.symbol not in SUBSTITUENTS and part.count == 1:
            run += 1
            if run >= 3:
                return True
        elif isinstance(part, Atom) and part.symbol == "H":
            continue
        else:
            run = 0
    # 5. an oxoacid whose hydrogens the octet rule puts on oxygen where the single-centre model keeps one on X
    if _oxoacid(_items(formula.parts)) is not None and _hydrogen_moves_to_oxygen(formula):
        return True
    # 6. a benzene ring
    for k, part in enumerate(parts[:-1]):
        following = parts[k + 1]
        if isinstance(part, Atom) and part.symbol == "C" and part.count == 6 \
                and isinstance(following, Atom) and following.symbol == "H" and following.count in (5, 6):
            return True
    return False


def _hydrogen_moves_to_oxygen(formula: Formula) -> bool:
    """H_m X O_n: the single-centre model keeps a hydrogen on X, the octet reading has none there (HNO2)."""
    model = build_species(formula)
    if model.outside_model is not None or len(model.centres) != 1:
        return False
    if not any(ligand.symbol == "H" for ligand in model.centres[0].ligands):
        return False
    reading = read_condensed(formula)
    if reading.molecule is None:
        return False
    molecule = reading.molecule
    centre = next((k for k, atom in enumerate(molecule.atoms) if atom.element not in ("H", "O")), None)
    return centre is not None and all(molecule.atoms[n].element != "H" for n in molecule.neighbours(centre))
