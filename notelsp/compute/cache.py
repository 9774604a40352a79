"""Computed structures on disk: one small JSON file per structure, method and versions.

Lives in ``$NOTELSP_CACHE_DIR/computed``, else ``$XDG_CACHE_HOME/notelsp/computed``,
else ``~/.cache/notelsp/computed``.  Safe to delete at any time.  The key is a
hash of everything the result depends on: the species as written, its charge,
the isomer's arrangement (labels, sites and starting positions), the spin
state, the method and the package versions, so an upgrade of tblite or ASE
simply misses.

The folder is outside our control, so an entry is read only if it is a
regular file of plausible size (checked before and after a non-blocking open;
symlinks are not followed), parsed as JSON only (never pickle, never
executed) after its nesting depth is checked, and used only if it passes the
result schema (``result.geometry_from_dict``) and describes exactly the
structure asked for; anything else is treated as absent and recomputed.
Writers write a temporary file and rename it into place, so concurrent
writers and readers never see half an entry.  Past ``MAX_TOTAL_BYTES`` the
oldest entries are removed (the species index's small files,
``species_cache.py``, live in the same folder and are counted and removed
alike).
"""

from __future__ import annotations

import hashlib
import json
import os
import tempfile
from pathlib import Path
from typing import TYPE_CHECKING, Any

from ..notefiles import bounded_json, read_cache_entry
from ..user_cache import cache_entries, remove_quietly
from .method import METHOD, versions
from .result import BadResult, ComputedGeometry, geometry_from_dict, geometry_to_dict

if TYPE_CHECKING:  # building structures needs the chemistry; reading entries does not
    from .geometry import Structure

FORMAT = 2  # bump when an entry changes shape or meaning (2: molecules, with their bonds)
MAX_ENTRY_BYTES = 64 * 1024  # a structure of 40 atoms is about 8 kB
MAX_NESTING = 6  # entry -> geometry -> positions -> one position: 4 levels are used
MAX_TOTAL_BYTES = 50 * 1024 * 1024
EVICT_TO = 0.8  # of MAX_TOTAL_BYTES, so eviction does not run on every store
EVICT_EVERY = 32  # stores between size checks in one process

_stores = 0


def cache_root() -> Path:
    override = os.environ.get("NOTELSP_CACHE_DIR")
    if override:
        return Path(override) / "computed"
    xdg = os.environ.get("XDG_CACHE_HOME")
    base = Path(xdg) if xdg else Path.home() / ".cache"
    return base / "notelsp" / "computed"


def entry_key(structure: Structure) -> list[Any]:
    """Everything a computed structure depends on, as JSON."""
    return _key(structure, structure.positions)


def geometry_key(geometry: ComputedGeometry) -> list[Any]:
    """The key of the structure a result was computed from (its start): the key it is stored under."""
    return _key(geometry, geometry.start)


def _key(of: Structure | ComputedGeometry, start: tuple) -> list[Any]:
    return [FORMAT, METHOD, [list(v) for v in versions()], of.species, of.charge, of.isomer,
            list(of.symbols), list(of.labels), list(of.sites),
            [[round(c, 6) for c in p] for p in start], of.unpaired,
            [list(c) for c in of.connections]]


def key_digest(key: list[Any]) -> str:
    return hashlib.sha256(json.dumps(key).encode()).hexdigest()[:32]


def entry_file(digest: str) -> Path:
    return cache_root() / f"{digest}.json"


def entry_path(structure: Structure) -> Path:
    return entry_file(key_digest(entry_key(structure)))


def parse_entry(data: bytes, structure: Structure) -> ComputedGeometry:
    """The entry's geometry if it is well formed and is the result for ``structure``; BadResult otherwise."""
    try:
        payload = bounded_json(data, MAX_NESTING)
    except ValueError as error:
        raise BadResult(str(error)) from error
    if not isinstance(payload, dict) or payload.get("key") != entry_key(structure):
        raise BadResult("not an entry for this structure, method and versions")
    found = geometry_from_dict(payload.get("geometry"))
    expected = (structure.species, structure.charge, structure.isomer, structure.symbols, structure.labels,
                structure.sites, structure.unpaired, METHOD, versions(), structure.connections)
    if (found.species, found.charge, found.isomer, found.symbols, found.labels, found.sites, found.unpaired,
            found.method, found.versions, found.connections) != expected:
        raise BadResult("the stored structure is not the one asked for")
    if found.failed is not None:
        raise BadResult("a failure is never stored")
    return found


def load(structure: Structure) -> ComputedGeometry | None:
    """The stored result for ``structure``, or None when absent or unusable (then it is recomputed)."""
    path = entry_path(structure)
    data = read_cache_entry(path, MAX_ENTRY_BYTES)
    if data is None:
        return None
    try:
        return parse_entry(data, structure)
    except BadResult:
        return None


def store(geometry: ComputedGeometry) -> None:
    """Keep a result that did not fail (failures depend on load and bounds, so they are recomputed).

    A cache that cannot be written is not an error.
    """
    global _stores
    if geometry.failed is not None:
        return
    key = geometry_key(geometry)
    path = entry_file(key_digest(key))
    if not write_entry(path, {"key": key, "geometry": geometry_to_dict(geometry)}):
        return
    _stores += 1
    if _stores % EVICT_EVERY == 1:
        evict()


def write_entry(path: Path, payload: dict[str, Any]) -> bool:
    """Write ``payload`` as JSON at ``path`` whole or not at all (a ``.entry-`` temporary file, which
    :func:`evict` clears when a writer died, renamed into place); False when it cannot be written."""
    try:
        text = json.dumps(payload, allow_nan=False)
        path.parent.mkdir(parents=True, exist_ok=True)
        descriptor, temporary = tempfile.mkstemp(dir=path.parent, prefix=".entry-", suffix=".tmp")
        try:
            with os.fdopen(descriptor, "w", encoding="utf-8") as handle:
                handle.write(text)
            os.replace(temporary, path)
        except BaseException:
            remove_quietly(Path(temporary))
            raise
    except (OSError, ValueError):
        return False
    return True


def evict(limit: int = MAX_TOTAL_BYTES) -> int:
    """Remove the oldest entries while the folder holds more than ``limit`` bytes; the count removed."""
    entries = [(status.st_mtime, status.st_size, path)
               for status, path in cache_entries(cache_root(), lambda name: name.endswith(".json"))]
    total = sum(size for _, size, _ in entries)
    if total <= limit:
        return 0
    removed = 0
    for _, size, path in sorted(entries):
        if total <= limit * EVICT_TO:
            break
        if remove_quietly(Path(path)):
            total -= size
            removed += 1
    return removed


