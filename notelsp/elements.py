"""Element properties, read once per process from the database mendeleev ships.

mendeleev's own API loads pandas and SQLAlchemy (seconds of start-up), so its
SQLite file is read here with the standard library instead, without importing
the mendeleev package; mendeleev stays a dependency because it ships the data
(``tests/test_elements.py`` checks every value against mendeleev's own API).
The table is read lazily, under a lock, the first time anything asks; the
server may call :func:`preload` in a background thread right after it answers
``initialize``. The rows read are kept in the user's cache folder (``user_cache.py``)
as ``marshal`` data, headed by what they were read from (the database's path, size
and modification time, the columns); a later process whose database is the same
reads them back in well under a millisecond, without loading ``sqlite3`` (which,
with the ``datetime`` it imports, is a few percent of a one-note check). Everything in notelsp (the notation needs the symbols, the
chemistry the properties) asks this module, never mendeleev directly.
"""

from __future__ import annotations

import marshal
import math
import os
import sys
import threading
import zlib
from dataclasses import dataclass
from functools import cache
from pathlib import Path

from .user_cache import cache_folder, read_trusted, write_whole

DATA_PACKAGE = "mendeleev"
DATABASE_NAME = "elements.db"
# The columns of mendeleev's "elements" table that notelsp reads.
COLUMNS = (
    "symbol",
    "name",
    "atomic_number",
    "group_id",
    "period",
    "block",
    "en_pauling",
    "covalent_radius_pyykko",
    "covalent_radius_pyykko_double",
    "covalent_radius_pyykko_triple",
)


class ElementDataError(RuntimeError):
    """mendeleev's element database is missing or not laid out as expected."""


@dataclass(frozen=True, slots=True)
class Element:
    """One element's properties, as mendeleev's database gives them."""

    symbol: str
    name: str
    number: int
    group: int | None  # IUPAC group 1-18; None for lanthanides/actinides
    period: int
    block: str  # "s", "p", "d", "f"
    electronegativity: float | None  # Pauling scale; None where mendeleev has none
    covalent_radius_pm: float | None  # single-bond radius (Pyykko)
    double_bond_radius_pm: float | None
    triple_bond_radius_pm: float | None

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
    if value is None:
        return None
    number = float(value)  # type: ignore[arg-type]
    return None if math.isnan(number) else number


def database_path() -> Path:
    """mendeleev's SQLite file, found without importing mendeleev (its import alone takes a second)."""
    from importlib.util import find_spec

    spec = find_spec(DATA_PACKAGE)
    folders = list(spec.submodule_search_locations or ()) if spec is not None else []
    for folder in folders:
        candidate = Path(folder) / DATABASE_NAME
        if candidate.is_file():
            return candidate
    raise ElementDataError(
        f"element data not found: the {DATA_PACKAGE} package (a dependency of notelsp) "
        f"is not installed or has no {DATABASE_NAME}"
    )


CACHE_PREFIX = f"elements-py{sys.version_info[0]}{sys.version_info[1]}-"  # marshal's format is the interpreter's
CACHE_MAGIC = b"notelsp-elements-cache-1\0"


def _load() -> dict[str, Element]:
    path = database_path()
    folder, key = cache_folder(), _source_key(path)
    cached = folder / cache_file_name(path) if folder is not None and key is not None else None
    if cached is not None and key is not None:
        rows = _cached_rows(cached, key)
        if rows is not None:
            try:
                return _table_from_rows(rows)
            except (TypeError, ValueError):  # well-formed but not rows of ours: read the database instead
                pass
    rows = _database_rows(path)
    if cached is not None and key is not None:
        write_whole(cached, len(key).to_bytes(4, "little") + key + marshal.dumps(tuple(map(tuple, rows))))
    return _table_from_rows(rows)


def cache_file_name(path: Path) -> str:
    """One file per database: environments with a mendeleev each (two virtual environments) keep one each."""
    return f"{CACHE_PREFIX}{zlib.crc32(str(path).encode('utf-8', 'surrogateescape')):08x}.cache"


def _source_key(path: Path) -> bytes | None:
    """What rows read from ``path`` were read from: its resolved path, size and modification time, the columns."""
    try:
        source = os.stat(path)
    except OSError:
        return None
    identity = "\0".join((str(path.resolve()), str(source.st_size), str(source.st_mtime_ns), *COLUMNS))
    return CACHE_MAGIC + identity.encode("utf-8", "surrogateescape")


def _cached_rows(path: Path, key: bytes) -> list[tuple] | None:
    """The rows kept at ``path`` if they were read from the database ``key`` names and the file is the user's own."""
    data = read_trusted(path)
    if data is None:
        return None
    try:
        length = int.from_bytes(data[:4], "little")
        if data[4:4 + length] != key:
            return None
        rows = marshal.loads(data[4 + length:])
    except Exception:  # truncated or damaged: read the database instead
        return None
    if not (isinstance(rows, tuple) and rows and all(isinstance(row, tuple) and len(row) == len(COLUMNS)
                                                     for row in rows)):
        return None
    return list(rows)


def read_database(path: Path) -> dict[str, Element]:
    """Every element in a mendeleev-layout SQLite file, by symbol."""
    return _table_from_rows(_database_rows(path))


def _database_rows(path: Path) -> list[tuple]:
    """The ``COLUMNS`` of every row of a mendeleev-layout SQLite file, by atomic number."""
    import sqlite3

    # Read-only, through a URI so the path is taken literally; immutable: no locking, no journal.
    uri = f"{path.resolve().as_uri()}?mode=ro&immutable=1"
    try:
        connection = sqlite3.connect(uri, uri=True)
        try:
            present = {row[1] for row in connection.execute("PRAGMA table_info(elements)")}
            missing = [column for column in COLUMNS if column not in present]
            if missing:
                raise ElementDataError(
                    f"{path}: the elements table has no column {', '.join(missing)} "
                    f"(an unexpected {DATA_PACKAGE} version?)"
                )
            rows = connection.execute(
                f"SELECT {', '.join(COLUMNS)} FROM elements ORDER BY atomic_number"
            ).fetchall()
        finally:
            connection.close()
    except sqlite3.Error as error:
        raise ElementDataError(f"cannot read the element data in {path}: {error}") from None
    return rows


def _table_from_rows(rows: list[tuple]) -> dict[str, Element]:
    table: dict[str, Element] = {}
    for symbol, name, number, group, period, block, pauling, single, double, triple in rows:
        table[symbol] = Element(
            symbol=symbol,
            name=name,
            number=int(number),
            group=int(group) if group is not None else None,
            period=int(period),
            block=str(block),
            electronegativity=_number(pauling),
            covalent_radius_pm=_number(single),
            double_bond_radius_pm=_number(double),
            triple_bond_radius_pm=_number(triple),
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


@cache  # no argument: one entry, the table by lower-case name
def _by_lower_name() -> dict[str, Element]:
    return {candidate.name.lower(): candidate for candidate in table().values()}


def by_name(name: str) -> Element | None:
    """Look an element up by its English name, case-insensitively ("fluorine").

    Not memoised by ``name``: the words asked about come from the notes, so a cache keyed by them
    would grow with every word ever typed; the table by name is bounded by the elements.
    """
    return _by_lower_name().get(name.lower())
