"""What the parent sends the worker and what comes back, as JSON lines.

The parent writes one job (a JSON object) to the worker's stdin.  The worker
writes one JSON object per line to stdout: ``{"event": "step", ...}`` after
every optimisation step, then exactly one ``{"event": "done", ...}`` or
``{"event": "error", ...}``.
"""

from __future__ import annotations

import json
from dataclasses import asdict, dataclass
from typing import Any

from .levels import LevelOfTheory
from .start import StartingGeometry

Vector = tuple[float, float, float]


@dataclass(frozen=True, slots=True)
class Job:
    geometry: StartingGeometry
    level: LevelOfTheory
    max_steps: int


@dataclass(frozen=True, slots=True)
class OptimisedIsomer:
    species: str
    isomer: str
    rank: int
    level: str  # the level's label, "HF/3-21G"
    symbols: tuple[str, ...]
    positions: tuple[Vector, ...]  # angstrom, centre first
    ligand_sites: tuple[str, ...]
    energy_hartree: float
    converged: bool
    steps: int


def job_to_json(job: Job) -> str:
    return json.dumps(asdict(job))


def job_from_json(text: str) -> Job:
    raw = json.loads(text)
    geometry = raw["geometry"]
    return Job(
        StartingGeometry(
            species=geometry["species"],
            isomer=geometry["isomer"],
            rank=int(geometry["rank"]),
            symbols=tuple(geometry["symbols"]),
            positions=tuple(tuple(p) for p in geometry["positions"]),
            ligand_sites=tuple(geometry["ligand_sites"]),
            charge=int(geometry["charge"]),
            spin=int(geometry["spin"]),
        ),
        LevelOfTheory(**raw["level"]),
        int(raw["max_steps"]),
    )


def isomer_to_dict(isomer: OptimisedIsomer) -> dict[str, Any]:
    return asdict(isomer)


def isomer_from_dict(raw: dict[str, Any]) -> OptimisedIsomer:
    return OptimisedIsomer(
        species=raw["species"],
        isomer=raw["isomer"],
        rank=int(raw["rank"]),
        level=raw["level"],
        symbols=tuple(raw["symbols"]),
        positions=tuple(tuple(float(c) for c in p) for p in raw["positions"]),
        ligand_sites=tuple(raw["ligand_sites"]),
        energy_hartree=float(raw["energy_hartree"]),
        converged=bool(raw["converged"]),
        steps=int(raw["steps"]),
    )
