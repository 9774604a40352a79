"""Real calculations of small species (PySCF + geomeTRIC in the worker process).

Reference geometries: ASE's G2 set (ase.build.molecule; Curtiss et al.,
J. Chem. Phys. 1997), H-O-H 104.0 deg and H-P-H 94.6 deg.  Hartree-Fock in
a small basis is expected within a few degrees of them (from memory:
HF/STO-3G gives water about 100 deg).  What must come out is Drago's
behaviour: PH3's angle near 90-95 deg, well below water's.
"""

import asyncio
import math

import numpy as np
import pytest
from ase.build import molecule

from notelsp.crosscheck import runner
from notelsp.crosscheck.levels import DEFAULT_LEVEL, Limits, parse_level
from notelsp.crosscheck.measure import angles_between, bond_angles
from notelsp.crosscheck.runner import cross_check
from notelsp.notation import parse_formula


def g2_angle(name: str) -> float:
    """The X-A-H angle of an ASE G2 molecule with one heavy atom."""
    mol = molecule(name)
    symbols, positions = mol.get_chemical_symbols(), mol.positions
    centre = next(i for i, s in enumerate(symbols) if s != "H")
    a, b = [positions[i] - positions[centre] for i, s in enumerate(symbols) if s == "H"][:2]
    return math.degrees(math.acos(np.dot(a, b) / np.linalg.norm(a) / np.linalg.norm(b)))


def computed_hah(text: str, level: str, seen: list) -> float:
    result = asyncio.run(cross_check(parse_formula(text), parse_level(level), on_progress=seen.append))
    assert result.status == "done", result.message
    (isomer,) = result.isomers
    assert isomer.converged and isomer.level == level.upper()
    central = isomer.symbols[0]
    return angles_between(bond_angles(isomer.symbols, isomer.positions, isomer.ligand_sites), ("H", central, "H"))[0]


@pytest.mark.parametrize("level", ["HF/STO-3G", "HF/3-21G"])
def test_drago_behaviour_reproduced(level):
    seen: list = []
    water = computed_hah("H2O", level, seen)
    phosphine = computed_hah("PH3", level, seen)
    assert abs(water - g2_angle("H2O")) < 6
    assert abs(phosphine - g2_angle("PH3")) < 4
    assert 90 <= phosphine <= 97
    assert water - phosphine > 5
    steps = [p for p in seen if p.step > 0]
    assert steps and all(p.energy_hartree < 0 for p in steps)
    assert seen[0].step == 0 and "starting" in seen[0].message


def test_second_run_comes_from_the_disk_cache(private_cache, monkeypatch):
    first = asyncio.run(cross_check(parse_formula("H2O"), parse_level("HF/STO-3G")))
    assert first.cached == 0 and list(private_cache.rglob("*.json"))

    async def no_worker(*args, **kwargs):
        raise AssertionError("the cached result should have been used")

    monkeypatch.setattr(runner, "_run_worker", no_worker)
    seen: list = []
    second = asyncio.run(cross_check(parse_formula("H2O"), parse_level("HF/STO-3G"), on_progress=seen.append))
    assert second.cached == 1 and second.isomers == first.isomers
    assert [p.cached for p in seen] == [True]
    # another level is another key
    assert runner.cache.load("H2O", "", "HF/3-21G") is None


def test_wall_time_bound_stops_the_worker():
    result = asyncio.run(cross_check(parse_formula("PF4Cl"), limits=Limits(wall_time_s=0.5)))
    assert result.status == "timeout"
    assert "wall-time bound 0 s" in result.message or "wall-time bound 1 s" in result.message
    assert "PF4Cl" in result.message and DEFAULT_LEVEL.label in result.message


def test_cancelling_kills_the_worker(monkeypatch):
    started = []
    real = asyncio.create_subprocess_exec

    async def spy(*args, **kwargs):
        process = await real(*args, **kwargs)
        started.append(process)
        return process

    monkeypatch.setattr(runner.asyncio, "create_subprocess_exec", spy)

    async def scenario():
        task = asyncio.create_task(cross_check(parse_formula("PF4Cl")))
        while not started:
            await asyncio.sleep(0.05)
        task.cancel()
        with pytest.raises(asyncio.CancelledError):
            await task
        return started[0]

    process = asyncio.run(scenario())
    assert process.returncode is not None  # killed and reaped, not left running


def test_atom_bound_is_reported_before_any_calculation():
    result = asyncio.run(cross_check(parse_formula("PH3"), limits=Limits(max_atoms=3)))
    assert result.status == "unsupported" and "bounded to 3" in result.message
