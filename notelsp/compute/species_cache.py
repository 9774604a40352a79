"""Whole computed species on disk: a small index from a species as written to its structures' entries.

A check run that finds every structure in the cache still had to analyse each
species and build its starting structures (isomers, point groups, a molecule's
3D model) only to learn the entries' names.  This index skips that: one small
JSON file per species (``species-<hash>.json`` beside the structure entries of
``cache.py``) keyed by the text as written, the spin asked for, the bounds
that change a result, the method and package versions, and a fingerprint of
the files of notelsp's code that reads, analyses, builds and computes a species
(so after any change there the species misses, and is rebuilt and checked the
slow way, its structures still read from their own entries).  It
lists which structure entries make the species up, which isomer an
optimisation carried one into, and the species' notes or skip reason.

Reading it imports neither the chemistry, numpy, RDKit, tblite nor ASE.  Every
file is read the way ``cache.py`` reads entries (a regular file of bounded
size, no link followed, bounded JSON nesting, never pickle, never executed)
and checked field by field; each structure entry it names must be the entry
for the structure stored in it (its key re-derived from its own start, and
the file name the hash of that key).  Anything off is a miss: the species is
built and looked up entry by entry as before, and the index rewritten.  Only
species whose every structure succeeded are indexed (failures are recomputed).
"""

from __future__ import annotations

import hashlib
import json
import re
import sys
from dataclasses import replace
from functools import lru_cache
from pathlib import Path
from typing import Any

from ..notefiles import bounded_json, read_cache_entry
from ..user_cache import file_stamps
from . import cache
from .method import METHOD, Limits, installed_version, versions
from .result import BadResult, ComputedGeometry, ComputedSpecies, geometry_from_dict, ordered

FORMAT = 2  # bump when a species file changes shape or meaning
PREFIX = "species-"
MAX_FILE_BYTES = 16 * 1024  # a species of 12 isomers with long notes is under 4 kB
MAX_NESTING = 5  # file -> species -> structures -> one structure: 4 levels are used
MAX_STRUCTURES = 64
MAX_TEXT = 400
MAX_REASON = 2000  # why a molecule has no point group: several stereoisomers' groups, each named
# Packages whose data or code decide a starting structure, beside tblite and ASE (in every key).
BUILDERS = ("mendeleev", "rdkit", "lark")
# notelsp's own code a species' structures follow from (the notation reads it, chem analyses it,
# compute builds and optimises it); the review, formats, server and command line are left out.
BUILDING_CODE = ("notation", "chem", "compute", "elements.py", "positions.py", "grammar")
_DIGEST = re.compile(r"[0-9a-f]{32}")
_POINT_GROUP = re.compile(r"[A-Za-z0-9∞*]{1,8}")  # a Schoenflies symbol as chem.point_group writes it


@lru_cache(maxsize=1)
def code_fingerprint() -> str:
    """Size and modification time of every file of the code that reads, analyses, builds and computes a
    species (``BUILDING_CODE``) and of the grammar, the Python version and the packages that build
    structures: what a species' structures follow from."""
    package = Path(__file__).resolve().parents[1]
    parts = tuple(f"{package.name}/{part}{'/' if '.' not in part else ' '}" for part in BUILDING_CODE)
    seen = [stamp for stamp in file_stamps(package) if stamp.startswith((*parts, "grammar/"))]
    seen.append(sys.version)
    seen.extend(f"{name} {installed_version(name) or 'missing'}" for name in BUILDERS)
    return hashlib.sha256("\n".join(seen).encode()).hexdigest()


def species_key(text: str, unpaired: int | None, limits: Limits) -> list[Any]:
    """Everything a computed species depends on, as JSON (the structures' own keys hold the rest)."""
    return [FORMAT, cache.FORMAT, METHOD, [list(v) for v in versions()], text, unpaired,
            [limits.max_atoms, limits.max_isomers, limits.max_steps, limits.fmax_ev_per_a, limits.max_step_a,
             limits.wall_time_s], code_fingerprint()]


def species_path(key: list[Any]) -> Path:
    digest = hashlib.sha256(json.dumps(key).encode()).hexdigest()[:32]
    return cache.cache_root() / f"{PREFIX}{digest}.json"


def load(text: str, unpaired: int | None = None, limits: Limits = Limits()) -> ComputedSpecies | None:
    """The indexed species ``text``, every structure read from its entry; None when absent or unusable."""
    key = species_key(text, unpaired, limits)
    data = read_cache_entry(species_path(key), MAX_FILE_BYTES)
    if data is None:
        return None
    try:
        return parse(data, key)
    except BadResult:
        return None


def load_many(texts: list[str], limits: Limits = Limits()) -> dict[str, ComputedSpecies]:
    """Each of ``texts`` found in the index (the rest left out), at the default spin state."""
    found = {}
    for text in texts:
        species = load(text, None, limits)
        if species is not None:
            found[text] = species
    return found


def parse(data: bytes, key: list[Any]) -> ComputedSpecies:
    """The species a file describes, if it is well formed, is for ``key`` and every entry it names checks out."""
    try:
        payload = bounded_json(data, MAX_NESTING)
    except ValueError as error:
        raise BadResult(str(error)) from error
    if not isinstance(payload, dict) or payload.get("key") != key:
        raise BadResult("not the index of this species, method, versions and code")
    raw = payload.get("species")
    if not isinstance(raw, dict):
        raise BadResult("no species")
    name = _text(raw.get("species"))
    charge = raw.get("charge")
    if not isinstance(charge, int) or isinstance(charge, bool) or not -20 <= charge <= 20:
        raise BadResult("the charge is not a small integer")
    skipped = raw.get("skipped")
    if skipped is not None:
        skipped = _text(skipped)
    notes = _list(raw.get("notes"), 16)
    listed = _list(raw.get("structures"), MAX_STRUCTURES)
    if (skipped is None) == (not listed):
        raise BadResult("a species has structures or a reason for none, not both")
    structures = []
    for item in listed:
        if not isinstance(item, dict) or set(item) != {"entry", "became"}:
            raise BadResult("a structure is not an entry and what it became")
        became = item["became"]
        geometry = _entry(_text(item["entry"]))
        if geometry.species != name or geometry.charge != charge:
            raise BadResult("an entry of another species")
        structures.append(geometry if became is None else replace(geometry, became=_text(became)))
    group, unavailable = _model(raw.get("model"))
    return ComputedSpecies(name, charge, METHOD, versions(), ordered(structures), skipped,
                           tuple(_text(n) for n in notes), len(structures), group, unavailable)


def _model(value: Any) -> tuple[str | None, str | None]:
    """(point group, why none) of the species' 3D model, from ``{"point_group": ...}``,
    ``{"unavailable": ...}`` or null."""
    if value is None:
        return None, None
    if isinstance(value, dict) and set(value) == {"point_group"}:
        group = _text(value["point_group"])
        if not _POINT_GROUP.fullmatch(group):
            raise BadResult("not a point group")
        return group, None
    if isinstance(value, dict) and set(value) == {"unavailable"}:
        reason = value["unavailable"]
        if not isinstance(reason, str) or len(reason) > MAX_REASON:
            raise BadResult(f"the reason is not a string of at most {MAX_REASON} characters")
        return None, reason
    raise BadResult("the model is not a point group or a reason for none")


def _entry(digest: str) -> ComputedGeometry:
    if not _DIGEST.fullmatch(digest):
        raise BadResult("not an entry's name")
    data = read_cache_entry(cache.cache_root() / f"{digest}.json", cache.MAX_ENTRY_BYTES)
    if data is None:
        raise BadResult("an entry is missing")
    try:
        payload = bounded_json(data, cache.MAX_NESTING)
    except ValueError as error:
        raise BadResult(str(error)) from error
    if not isinstance(payload, dict):
        raise BadResult("an entry is not an object")
    geometry = geometry_from_dict(payload.get("geometry"))
    key = cache.geometry_key(geometry)
    if payload.get("key") != key or cache.key_digest(key) != digest:
        raise BadResult("an entry is not the one for the structure stored in it")
    if geometry.failed is not None or (geometry.method, geometry.versions) != (METHOD, versions()):
        raise BadResult("a failed entry, or one of another method or versions")
    return geometry


def _text(value: Any) -> str:
    if not isinstance(value, str) or len(value) > MAX_TEXT:
        raise BadResult("not a short string")
    return value


def _list(value: Any, most: int) -> list:
    if not isinstance(value, list) or len(value) > most:
        raise BadResult(f"not a list of at most {most} items")
    return value


def store(text: str, unpaired: int | None, limits: Limits, species: ComputedSpecies) -> None:
    """Index a species whose every structure succeeded and is stored; a file that cannot be written is no error."""
    if species.method != METHOD or species.versions != versions():
        return
    if any(s.failed is not None for s in species.structures) or (species.skipped is None) == (not species.structures):
        return
    digests = [cache.key_digest(cache.geometry_key(s)) for s in species.structures]
    if not all(cache.entry_file(digest).is_file() for digest in digests):
        return  # a structure entry was not written (a full disk): nothing to point at
    listed = [{"entry": digest, "became": s.became} for digest, s in zip(digests, species.structures)]
    key = species_key(text, unpaired, limits)
    payload = {"key": key, "species": {"species": species.species, "charge": species.charge,
                                       "skipped": species.skipped, "notes": list(species.notes),
                                       "structures": listed, "model": _model_dict(species)}}
    cache.write_entry(species_path(key), payload)


def _model_dict(species: ComputedSpecies) -> dict[str, str] | None:
    if species.model_point_group is not None:
        return {"point_group": species.model_point_group}
    if species.model_unavailable is not None and len(species.model_unavailable) <= MAX_REASON:
        return {"unavailable": species.model_unavailable}
    return None
