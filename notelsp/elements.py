"""Element properties, read from mendeleev once per process.

mendeleev's table takes a second or two to load (pandas + SQLite), so it is
read lazily, under a lock, the first time anything asks; the server may call
:func:`preload` in a background thread right after it answers ``initialize``.
Everything in notelsp (the notation needs the symbols, the chemistry the
properties) asks this module, never mendeleev directly.
"""

from __future__ import annotations

import math
import threading
from dataclasses import dataclass
from functools import cache


@dataclass(frozen=True, slots=True)
class Element:
    symbol: str
    name: str
    number: int
    group: int | None  # IUPAC group 1-18; None for lanthanides/actinides
    period: int
    block: str  # "s", "p", "d", "f"
    electronegativity: float | None  # Pauling scale; None where mendeleev has none
    covalent_radius_pm: float | None  # single-bond radius (Pyykko)
    double_bond_radius_pm: float | None

    @property
    def is_main_group(self) -> bool:
        return self.block in ("s", "p") or self.number in (1, 2)

    @property
    def valence_electrons(self) -> int | None:
        """Valence-shell electrons of a main-group atom; None outside the s and p blocks."""
        if self.number == 2:
            return 2
        if not self.is_main_group or self.group is None:
            return None
        return self.group if self.group <= 2 else self.group - 10


_lock = threading.Lock()
_table: dict[str, Element] | None = None


def _number(value: object) -> float | None:
    try:
        number = float(value)  # type: ignore[arg-type]
    except (TypeError, ValueError):
        return None
    return None if math.isnan(number) else number


def _load() -> dict[str, Element]:
    from mendeleev.fetch import fetch_table  # heavy import, kept off the start-up path

    frame = fetch_table("elements")
    table: dict[str, Element] = {}
    for row in frame.itertuples(index=False):
        group = _number(row.group_id)
        table[row.symbol] = Element(
            symbol=row.symbol,
            name=row.name,
            number=int(row.atomic_number),
            group=int(group) if group is not None else None,
            period=int(row.period),
            block=str(row.block),
            electronegativity=_number(row.en_pauling),
            covalent_radius_pm=_number(row.covalent_radius_pyykko),
            double_bond_radius_pm=_number(row.covalent_radius_pyykko_double),
        )
    return table


def table() -> dict[str, Element]:
    """All elements by symbol (loaded on first call, then shared)."""
    global _table
    if _table is None:
        with _lock:
            if _table is None:
                _table = _load()
    return _table


def preload() -> None:
    table()


def is_symbol(text: str) -> bool:
    return text in table()


def element(symbol: str) -> Element:
    """The element with this symbol; KeyError for anything else."""
    return table()[symbol]


@cache
def by_name(name: str) -> Element | None:
    """Look an element up by its English name, case-insensitively ("fluorine")."""
    wanted = name.lower()
    for candidate in table().values():
        if candidate.name.lower() == wanted:
            return candidate
    return None
