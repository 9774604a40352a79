"""Optimised structures on disk, keyed by species, isomer and level of theory.

Lives in ``$NOTELSP_CACHE_DIR``, else ``$XDG_CACHE_HOME/notelsp``, else
``~/.cache/notelsp`` (under a ``crosscheck`` folder).  One small JSON file per
result, written atomically so two processes never see half a file.

The folder is outside our control (another user's files, a stale format, a
hostile checkout), so an entry is read only if it is a regular file of a
plausible size, and used only if it passes :func:`checked_isomer`; anything
else is treated as absent and recomputed.
"""

from __future__ import annotations

import hashlib
import json
import math
import os
import tempfile
from pathlib import Path
from typing import Any

from ..notefiles import bounded_json, read_cache_entry
from .protocol import OptimisedIsomer, isomer_to_dict
from .start import StartingGeometry

FORMAT = 1  # bump when the stored result changes shape or meaning
MAX_ENTRY_BYTES = 64 * 1024  # a result of a dozen atoms is under 2 kB
MAX_NESTING = 6  # payload -> isomer -> positions -> one position: 4 levels are used
MAX_ATOMS = 64  # far above the cross-check's own bound (Limits.max_atoms)
MAX_TEXT = 200  # species, isomer, level names and site names
MAX_COORDINATE = 1000.0  # angstrom; an optimised molecule is a few angstrom across
MIN_BOND = 0.1  # angstrom; ligands closer to the centre than this make no bond angle
MAX_ENERGY = 1e7  # hartree, in size; the heaviest atoms are ~1e4


class BadEntry(ValueError):
    """A stored (or reported) result that is not a usable optimised structure."""


def cache_root() -> Path:
    override = os.environ.get("NOTELSP_CACHE_DIR")
    if override:
        return Path(override)
    xdg = os.environ.get("XDG_CACHE_HOME")
    base = Path(xdg) if xdg else Path.home() / ".cache"
    return base / "notelsp"


def cache_path(species: str, isomer: str, level: str) -> Path:
    key = json.dumps([FORMAT, species, isomer, level])
    digest = hashlib.sha256(key.encode()).hexdigest()[:24]
    return cache_root() / "crosscheck" / f"{digest}.json"


def _text(value: Any, what: str) -> str:
    if not isinstance(value, str) or len(value) > MAX_TEXT:
        raise BadEntry(f"{what} is not a short string")
    return value


def _integer(value: Any, what: str, low: int, high: int) -> int:
    if not isinstance(value, int) or isinstance(value, bool) or not low <= value <= high:
        raise BadEntry(f"{what} is not an integer from {low} to {high}")
    return value


def _number(value: Any, what: str, bound: float) -> float:
    if not isinstance(value, (int, float)) or isinstance(value, bool) or not math.isfinite(value) or abs(value) > bound:
        raise BadEntry(f"{what} is not a finite number within {bound:g}")
    return float(value)


def _list(value: Any, what: str, length: int | None = None) -> list:
    if not isinstance(value, list) or len(value) > MAX_ATOMS or (length is not None and len(value) != length):
        raise BadEntry(f"{what} is not a list of {length if length is not None else f'at most {MAX_ATOMS}'} items")
    return value


def checked_isomer(raw: Any, expected: StartingGeometry | None = None) -> OptimisedIsomer:
    """``raw`` (an optimised isomer as JSON) if every field has its type, size and meaning; else BadEntry.

    With ``expected`` (the structure the calculation started from), the atoms,
    their sites and the names must be that structure's.
    """
    if not isinstance(raw, dict):
        raise BadEntry("the isomer is not an object")
    symbols = [_text(s, "an atom symbol") for s in _list(raw.get("symbols"), "symbols")]
    if len(symbols) < 2:
        raise BadEntry("fewer than two atoms")
    positions = _list(raw.get("positions"), "positions", len(symbols))
    coordinates = [[_number(c, "a coordinate", MAX_COORDINATE) for c in _list(p, "a position", 3)] for p in positions]
    sites = [_text(s, "a ligand site") for s in _list(raw.get("ligand_sites"), "ligand sites", len(symbols) - 1)]
    centre = coordinates[0]
    if any(math.dist(p, centre) < MIN_BOND for p in coordinates[1:]):
        raise BadEntry(f"a ligand within {MIN_BOND} angstrom of the centre")
    isomer = OptimisedIsomer(
        species=_text(raw.get("species"), "the species"),
        isomer=_text(raw.get("isomer"), "the isomer"),
        rank=_integer(raw.get("rank"), "the rank", 1, 10_000),
        level=_text(raw.get("level"), "the level"),
        symbols=tuple(symbols),
        positions=tuple(tuple(p) for p in coordinates),  # type: ignore[misc]
        ligand_sites=tuple(sites),
        energy_hartree=_number(raw.get("energy_hartree"), "the energy", MAX_ENERGY),
        converged=raw.get("converged") is True,
        steps=_integer(raw.get("steps"), "the step count", 0, 1_000_000),
    )
    if not isinstance(raw.get("converged"), bool):
        raise BadEntry("converged is not true or false")
    if expected is not None and (
        (isomer.species, isomer.isomer, isomer.symbols, isomer.ligand_sites)
        != (expected.species, expected.isomer, expected.symbols, expected.ligand_sites)
    ):
        raise BadEntry("the atoms or sites differ from the structure the calculation starts from")
    return isomer


def parse_entry(data: bytes, key: list[Any], expected: StartingGeometry | None = None) -> OptimisedIsomer:
    """A stored entry's isomer, checked (BadEntry for anything else)."""
    try:
        payload = bounded_json(data, MAX_NESTING)
    except ValueError as error:
        raise BadEntry(str(error)) from error
    if not isinstance(payload, dict) or payload.get("key") != key:
        raise BadEntry("not an entry for this species, isomer and level")
    return checked_isomer(payload.get("isomer"), expected)


def load(species: str, isomer: str, level: str, expected: StartingGeometry | None = None) -> OptimisedIsomer | None:
    """The stored result, or None when absent or not usable (then it is simply recomputed)."""
    data = read_cache_entry(cache_path(species, isomer, level), MAX_ENTRY_BYTES)
    if data is None:
        return None
    try:
        found = parse_entry(data, [FORMAT, species, isomer, level], expected)
    except BadEntry:
        return None
    return found if found.level == level else None


def store(result: OptimisedIsomer) -> None:
    """Keep a converged result; a cache that cannot be written is not an error."""
    path = cache_path(result.species, result.isomer, result.level)
    payload = {"key": [FORMAT, result.species, result.isomer, result.level], "isomer": isomer_to_dict(result)}
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        handle, temporary = tempfile.mkstemp(dir=path.parent, suffix=".tmp")
        with os.fdopen(handle, "w", encoding="utf-8") as file:
            json.dump(payload, file)
        os.replace(temporary, path)
    except OSError:
        pass

