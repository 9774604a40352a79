"""The method, its versions, its measured uncertainty and the bounds of one calculation."""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from importlib import metadata

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
    found = []
    for package in ("tblite", "ase"):
        try:
            found.append((package, metadata.version(package)))
        except metadata.PackageNotFoundError:
            found.append((package, "missing"))
    return tuple(found)


def missing_packages() -> tuple[str, ...]:
    return tuple(package for package, version in versions() if version == "missing")
