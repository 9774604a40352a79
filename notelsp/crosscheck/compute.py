"""The calculation itself: a PySCF SCF with a geomeTRIC optimisation.

Imported only inside the worker process, so the server and the CLI never load
PySCF.
"""

from __future__ import annotations

from collections.abc import Callable

from .protocol import Job, OptimisedIsomer

BOHR_IN_ANGSTROM = 0.52917721092  # CODATA 2010, as PySCF uses


def _method(mol, job: Job):
    from pyscf import dft, scf

    restricted = job.geometry.spin == 0
    if job.level.is_hartree_fock:
        return scf.RHF(mol) if restricted else scf.UHF(mol)
    method = dft.RKS(mol) if restricted else dft.UKS(mol)
    method.xc = job.level.method.lower()
    return method


def optimise(job: Job, on_step: Callable[[int, float], None]) -> OptimisedIsomer:
    """Optimise the job's starting structure; ``on_step(step, energy)`` after each gradient."""
    from pyscf import gto
    from pyscf.geomopt.geometric_solver import kernel

    geometry = job.geometry
    mol = gto.M(
        atom=[(s, p) for s, p in zip(geometry.symbols, geometry.positions)],
        basis=job.level.basis.lower(),
        charge=geometry.charge,
        spin=geometry.spin,
        unit="Angstrom",
        verbose=0,
    )
    steps: list[float] = []

    def step(env: dict) -> None:
        steps.append(float(env["energy"]))
        on_step(len(steps), steps[-1])

    converged, optimised = kernel(_method(mol, job), callback=step, maxsteps=job.max_steps)
    coordinates = optimised.atom_coords() * BOHR_IN_ANGSTROM
    return OptimisedIsomer(
        species=geometry.species,
        isomer=geometry.isomer,
        rank=geometry.rank,
        level=job.level.label,
        symbols=geometry.symbols,
        positions=tuple(tuple(float(c) for c in row) for row in coordinates),
        ligand_sites=geometry.ligand_sites,
        energy_hartree=steps[-1] if steps else float("nan"),
        converged=bool(converged),
        steps=len(steps),
    )
