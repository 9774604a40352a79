"""Computed-geometry figures: computed_species_per_s and cached_lookup_us.

computed_species_per_s: 20 distinct species (4 of them mixed halides with
several isomers) optimised with GFN2-xTB by a pool of one worker per core,
nothing cached; the workers are started (and have loaded tblite) before the
clock starts, and compute_worker_start_s says what that took.
computed_structures_per_s counts every isomer optimised.
cached_lookup_us: mean time to read, parse and check one stored structure
from a warm disk cache (the file system's cache warm too).

Runs in a temporary cache folder; the user's own cache is not touched.
"""

from __future__ import annotations

import os
import tempfile
import time

SPECIES = ["NH3", "H2O", "PH3", "H2S", "CH4", "SiH4", "CF4", "NF3", "PF3", "OF2",
           "SO2", "ClF3", "BF3", "SF4", "SF6", "PF5", "XeF4", "PCl3F2", "SOF4", "PCl2F3"]


def measure() -> dict[str, str]:
    from notelsp.compute import GeometryPool, cache
    from notelsp.compute.geometry import start_structures
    from notelsp.compute.pool import Request
    from notelsp.chem import analyse
    from notelsp.notation import parse_formula

    figures: dict[str, str] = {}
    with tempfile.TemporaryDirectory() as folder:
        previous = {name: os.environ.get(name) for name in ("XDG_CACHE_HOME", "NOTELSP_CACHE_DIR")}
        os.environ["XDG_CACHE_HOME"] = folder
        os.environ.pop("NOTELSP_CACHE_DIR", None)
        try:
            with GeometryPool(use_cache=False) as pool:
                start = time.perf_counter()
                pool.compute([Request("H2O")] * pool.workers)  # one job per worker: every worker starts
                figures["compute_worker_start_s"] = f"{time.perf_counter() - start:.1f}"
                start = time.perf_counter()
                found = pool.compute(SPECIES)
                elapsed = time.perf_counter() - start
            failed = [r.species for r in found if r.failed]
            structures = sum(len(r.structures) for r in found)
            figures["compute_workers"] = str(pool.workers)
            figures["computed_species_per_s"] = f"{len(SPECIES) / elapsed:.2f}"
            figures["computed_structures_per_s"] = f"{structures / elapsed:.2f}"
            figures["computed_failed"] = str(len(failed))
            for result in found:
                for geometry in result.structures:
                    cache.store(geometry)
            starts = [s for text in SPECIES for s in start_structures(analyse(parse_formula(text)))]
            for structure in starts:
                cache.load(structure)  # warm: the files are in the page cache
            rounds = 20
            start = time.perf_counter()
            for _ in range(rounds):
                for structure in starts:
                    cache.load(structure)
            figures["cached_lookup_us"] = f"{(time.perf_counter() - start) / (rounds * len(starts)) * 1e6:.0f}"
        finally:
            for name, value in previous.items():
                if value is None:
                    os.environ.pop(name, None)
                else:
                    os.environ[name] = value
    return figures


def main() -> None:
    for name, value in measure().items():
        print(f"{name}: {value}", flush=True)


if __name__ == "__main__":
    main()
