"""Real GFN2-xTB results, stored, for the tests of judging claims against a calculation.

The review never computes: its tests hand it ``ComputedSpecies`` values.  These are
not written by hand: ``python -m tests.review.computed_fixture`` computes every species
below with the project's own pool (tblite + ASE) and writes their JSON form to
``data/computed_species.json``; the tests read them back through the same checked reader
the disk cache uses (``geometry_from_dict``), which measures angles again from the positions.
"""

from __future__ import annotations

import json
from dataclasses import replace
from functools import cache
from pathlib import Path

from notelsp.compute.result import ComputedSpecies, geometry_from_dict, geometry_to_dict

FIXTURE = Path(__file__).parent / "data" / "computed_species.json"

SPECIES = ("NF3", "NH3", "H2O", "PF3", "PH3", "NCl3", "OF2", "Cl2O", "CH3", "CF3", "CH2F2", "CH2Cl2", "PCl3F2", "SF4", "CH2")
# NH3 stopped after two optimiser steps: a real unconverged run, for the failure finding
UNCONVERGED = ("NH3", 2)


def _species_to_dict(species: ComputedSpecies) -> dict:
    return {
        "species": species.species, "charge": species.charge, "method": species.method,
        "versions": [list(v) for v in species.versions], "skipped": species.skipped, "notes": list(species.notes),
        "structures": [dict(geometry_to_dict(s), became=s.became) for s in species.structures],
    }


def _species_from_dict(raw: dict) -> ComputedSpecies:
    structures = tuple(replace(geometry_from_dict({k: v for k, v in s.items() if k != "became"}), became=s["became"])
                       for s in raw["structures"])
    return ComputedSpecies(raw["species"], raw["charge"], raw["method"], tuple(tuple(v) for v in raw["versions"]),
                           structures, raw["skipped"], tuple(raw["notes"]))


@cache
def stored() -> dict[str, ComputedSpecies]:
    """The stored results by name: each species as written, and "NH3 unconverged"."""
    raw = json.loads(FIXTURE.read_text(encoding="utf-8"))
    return {name: _species_from_dict(entry) for name, entry in raw.items()}


def main() -> None:
    from notelsp.compute import GeometryPool, Limits

    with GeometryPool(use_cache=False) as pool:
        results = dict(zip(SPECIES, pool.compute(list(SPECIES))))
    with GeometryPool(Limits(max_steps=UNCONVERGED[1]), use_cache=False) as pool:
        results[f"{UNCONVERGED[0]} unconverged"] = pool.compute([UNCONVERGED[0]])[0]
    FIXTURE.write_text(json.dumps({k: _species_to_dict(v) for k, v in results.items()}, indent=1) + "\n",
                       encoding="utf-8")
    for name, result in results.items():
        print(name, result.failed or [(a.labels, round(a.degrees, 1)) for a in result.lowest.angles][:3])


if __name__ == "__main__":
    main()
