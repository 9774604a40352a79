"""The method, its versions, its measured uncertainty and the bounds of one calculation."""

from __future__ import annotations

import os
import re
import sys
from dataclasses import dataclass
from functools import lru_cache

METHOD = "GFN2-xTB"  # Bannwarth, Ehlert and Grimme, J. Chem. Theory Comput. 15, 1652 (2019)

# Half-width, in degrees, within which a computed bond angle at a centre stands for the real one.
# It is at least the 95th-percentile error of GFN2-xTB angles measured against ASE's G2 geometries
# and against experimental gas-phase angles (tests/compute/test_accuracy.py measures both and
# fails if this falls below either).
ANGLE_UNCERTAINTY_DEG = 6.0


@dataclass(frozen=True, slots=True)
class Limits:
    """Bounds of one structure's calculation; past any of them the result is a failure with the reason."""

    max_atoms: int = 40
    wall_time_s: float = 20.0  # one structure (one isomer): its whole optimisation
    max_steps: int = 300  # optimiser steps
    fmax_ev_per_a: float = 0.01  # convergence: the largest force on any atom
    max_step_a: float = 0.2  # the optimiser's step cap
    memory_bytes: int = 2 << 30  # address space of a worker process
    max_isomers: int = 12  # structures per species (one per enantiomer pair)
    # A worker process is replaced after this many structures.  A worker's resident memory stayed at
    # 142-144 MB over 254 structures (the 200 species of benchmarks/compute.py), while every start
    # costs 3-10 s of importing tblite, ASE and numpy: a bound against a leak, not routine.
    tasks_per_worker: int = 1000


@lru_cache(maxsize=1)
def versions() -> tuple[tuple[str, str], ...]:
    """(package, version) of what computes: part of every cache key and of every result."""
    return tuple((package, installed_version(package) or "missing") for package in ("tblite", "ase"))


@lru_cache(maxsize=32)  # a handful of packages are asked about
def installed_version(package: str) -> str | None:
    """The installed version of ``package``, None when it is not installed.

    Read from the name of its ``NAME-VERSION.dist-info`` folder, the first along ``sys.path`` as
    importlib.metadata takes it, without importing importlib.metadata (about 40 ms, most of what a
    check answered from the cache spends on the calculation); importlib.metadata answers wherever
    the folder is not plain (an egg, a zip, two versions side by side).
    """
    wanted = re.sub(r"[-_.]+", "_", package).lower()
    for entry in sys.path:
        found = _installed_in(os.path.abspath(entry or "."))
        if wanted in found:
            version = found[wanted]
            return version if version is not None else _from_metadata(package)
    return None if _only_plain_folders() else _from_metadata(package)


@lru_cache(maxsize=64)  # one entry per folder of sys.path
def _installed_in(folder: str) -> dict[str, str | None]:
    """Distribution name -> version in one folder of sys.path (None: ask importlib.metadata)."""
    found: dict[str, str | None] = {}
    try:
        names = os.listdir(folder)
    except OSError:
        return found
    for name in names:
        for suffix in (".dist-info", ".egg-info"):
            if name.lower().endswith(suffix):
                distribution, _, version = name[: -len(suffix)].partition("-")
                key = re.sub(r"[-_.]+", "_", distribution).lower()
                plain = suffix == ".dist-info" and version and key not in found
                found[key] = version if plain else None
    return found


def _only_plain_folders() -> bool:
    return all(os.path.isdir(entry or ".") or not os.path.exists(entry) for entry in sys.path)


def _from_metadata(package: str) -> str | None:
    from importlib import metadata

    try:
        return metadata.version(package)
    except metadata.PackageNotFoundError:
        return None


def missing_packages() -> tuple[str, ...]:
    return tuple(package for package, version in versions() if version == "missing")
