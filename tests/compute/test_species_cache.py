"""The species index: a species cached whole, read back equal, and refused whenever anything is off."""

from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest

from notelsp.chem import analyse
from notelsp.compute import GeometryPool, cache, species_cache, worker
from notelsp.compute.geometry import failure, start_structures
from notelsp.compute.method import METHOD, Limits, versions
from notelsp.compute.result import ComputedSpecies, geometry_from_dict, geometry_to_dict
from notelsp.notation import parse_formula


def fake_species(text: str = "PCl3F2", became: dict[int, str] | None = None) -> ComputedSpecies:
    """A plausible species without computing: each start marked converged, each structure stored."""
    structures = []
    for index, start in enumerate(start_structures(analyse(parse_formula(text)))):
        raw = geometry_to_dict(failure(start, "x"))
        raw.update(failed=None, converged=True, energy_ev=-100.0 - index, steps=3, wall_time_s=0.1)
        geometry = geometry_from_dict(raw)
        cache.store(geometry)
        if became and index in became:
            from dataclasses import replace

            geometry = replace(geometry, became=became[index])
        structures.append(geometry)
    from notelsp.compute.result import ordered

    return ComputedSpecies(structures[0].species, structures[0].charge, METHOD, versions(), ordered(structures))


def species_file(text: str):
    return species_cache.species_path(species_cache.species_key(text, None, Limits()))


def test_a_species_comes_back_equal_with_its_isomers_in_order():
    stored = fake_species("PCl3F2", became={1: "two Cl axial"})
    species_cache.store("PCl3F2", None, Limits(), stored)
    found = species_cache.load("PCl3F2")
    assert found is not None and found.cached == len(stored.structures) > 1
    assert found.structures == stored.structures and found.notes == stored.notes
    assert found.relative_energies_kj_mol() == stored.relative_energies_kj_mol()


def test_the_key_holds_the_text_the_spin_the_bounds_and_the_code(monkeypatch):
    species_cache.store("NH3", None, Limits(), fake_species("NH3"))
    assert species_cache.load("NH3") is not None
    assert species_cache.load("NH3", unpaired=2) is None
    assert species_cache.load("NH3", limits=Limits(fmax_ev_per_a=0.05)) is None
    assert species_cache.load("NH₃") is None  # another text is another key (the review keys by text)
    monkeypatch.setattr(species_cache, "code_fingerprint", lambda: "another build of the chemistry")
    assert species_cache.load("NH3") is None


def test_a_species_with_a_failed_structure_is_not_indexed():
    stored = fake_species("NH3")
    broken = ComputedSpecies(stored.species, stored.charge, METHOD, versions(),
                             (failure(start_structures(analyse(parse_formula("NH3")))[0], "ran out of time"),))
    species_cache.store("NH3", None, Limits(), broken)
    assert not species_file("NH3").exists()


@pytest.mark.parametrize("group, unavailable", [("D3d", None), (None, "the point group depends on the stereoisomer")])
def test_the_point_group_of_a_molecule_model_comes_back_with_it(group, unavailable):
    from dataclasses import replace

    stored = replace(fake_species("NH3"), model_point_group=group, model_unavailable=unavailable)
    species_cache.store("NH3", None, Limits(), stored)
    found = species_cache.load("NH3")
    assert (found.model_point_group, found.model_unavailable) == (group, unavailable)


def test_a_skipped_species_is_indexed_with_its_reason():
    skipped = ComputedSpecies("C(OH)4", 0, METHOD, versions(), (), "ligands that are groups are not built yet")
    species_cache.store("C(OH)4", None, Limits(), skipped)
    assert species_cache.load("C(OH)4") == skipped


def test_a_missing_or_changed_structure_entry_is_a_miss():
    stored = fake_species("NH3")
    species_cache.store("NH3", None, Limits(), stored)
    (entry,) = [p for p in cache.cache_root().iterdir() if not p.name.startswith("species-")]
    payload = json.loads(entry.read_text())
    payload["geometry"]["positions"][1][0] += 0.5  # still a valid geometry, and its key still matches
    entry.write_text(json.dumps(payload))
    assert species_cache.load("NH3").structures[0].positions[1] != stored.structures[0].positions[1]
    payload["geometry"]["start"][1][0] += 0.5  # the start no longer hashes to the file's name
    entry.write_text(json.dumps(payload))
    assert species_cache.load("NH3") is None
    entry.unlink()
    assert species_cache.load("NH3") is None


@pytest.mark.parametrize("mangle", [
    lambda p: p.write_bytes(b"\xff\xfe not utf-8"),
    lambda p: p.write_text("{" * 10_000),
    lambda p: p.write_text("[" * 3 + "]" * 3),
    lambda p: p.write_text(json.dumps({"key": "x", "species": {}})),
    lambda p: p.write_text(" " * (species_cache.MAX_FILE_BYTES + 1)),
    lambda p: _edit(p, lambda d: d["species"]["structures"][0].update(entry="../../../etc/passwd")),
    lambda p: _edit(p, lambda d: d["species"]["structures"][0].update(entry="0" * 32)),
    lambda p: _edit(p, lambda d: d["species"].update(species="PH3")),
    lambda p: _edit(p, lambda d: d["species"].update(charge=True)),
    lambda p: _edit(p, lambda d: d["species"].update(skipped="both a reason and structures")),
    lambda p: _edit(p, lambda d: d["species"]["structures"][0].update(extra=1)),
    lambda p: _edit(p, lambda d: d["species"].update(structures=[d["species"]["structures"][0]] * 65)),
    lambda p: _edit(p, lambda d: d["species"].update(notes="not a list")),
    lambda p: _edit(p, lambda d: d["species"].update(model={"point_group": "C2v; rm -rf"})),
    lambda p: _edit(p, lambda d: d["species"].update(model={"point_group": "C2v", "unavailable": "both"})),
    lambda p: _edit(p, lambda d: d["species"].update(model={"unavailable": 12})),
    lambda p: _edit(p, lambda d: d["species"].update(model=["C2v", True])),
])
def test_a_corrupt_or_hostile_index_file_is_a_miss_never_an_error(mangle):
    species_cache.store("NH3", None, Limits(), fake_species("NH3"))
    mangle(species_file("NH3"))
    assert species_cache.load("NH3") is None


def _edit(path, change) -> None:
    data = json.loads(path.read_text())
    change(data)
    path.write_text(json.dumps(data))


@pytest.mark.skipif(not hasattr(os, "symlink"), reason="no symbolic links here")
def test_a_link_in_place_of_an_index_file_is_not_followed(tmp_path):
    species_cache.store("NH3", None, Limits(), fake_species("NH3"))
    path = species_file("NH3")
    target = tmp_path / "elsewhere.json"
    target.write_bytes(path.read_bytes())
    path.unlink()
    path.symlink_to(target)
    assert species_cache.load("NH3") is None


def test_the_pool_answers_an_indexed_species_without_building_or_starting_workers(monkeypatch):
    import notelsp.compute.pool as pool_module

    stored = fake_species("SF4")
    species_cache.store("SF4", None, Limits(), stored)

    def no_building(*args):
        raise AssertionError("an indexed species was built again")

    monkeypatch.setattr(pool_module, "_structures", no_building)
    heard = []
    with GeometryPool() as pool:
        (found,) = pool.compute(["SF4"], on_species=heard.append)
        assert pool._executor is None  # no worker process was started
    assert found.structures == stored.structures and heard == [found]


def test_the_pool_indexes_a_species_whose_structures_all_came_from_their_entries():
    stored = fake_species("ClF3")
    with GeometryPool() as pool:
        (found,) = pool.compute(["ClF3"])
        assert pool._executor is None
    assert found.cached == len(stored.structures)
    assert species_cache.load("ClF3").structures == found.structures


def test_reading_the_index_loads_no_chemistry_numpy_or_calculator(private_cache):
    species_cache.store("NH3", None, Limits(), fake_species("NH3"))
    code = ("import sys\n"
            "from notelsp.compute import species_cache\n"
            "assert species_cache.load('NH3') is not None\n"
            "print(sorted(m for m in sys.modules if m.split('.')[0] in ('numpy', 'rdkit', 'tblite', 'ase')"
            " or m.startswith('notelsp.chem')))\n")
    env = {**os.environ, "XDG_CACHE_HOME": str(private_cache.parent.parent)}
    env.pop("NOTELSP_CACHE_DIR", None)
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env, timeout=120)
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "[]"


@pytest.mark.parametrize("written", ['smiles "CO"', "HOCl @O", "SO4^2-", "[ICl4]-", "NH₄⁺", "CH3COOH"])
def test_a_species_is_asked_for_as_it_was_written(written):
    formula = parse_formula(written)
    again = parse_formula(formula.written)
    assert (again.text, again.centre, again.charge, again.smiles) == (
        formula.text, formula.centre, formula.charge, formula.smiles)


def test_a_worker_that_cannot_load_answers_as_geometry_failure_does():
    (start,) = start_structures(analyse(parse_formula("NH3")))
    assert geometry_from_dict(worker._failure(start.to_dict(), "why")) == failure(start, "why")


def _touched_fingerprint(path) -> str:
    """The species fingerprint with ``path``'s modification time moved on by 1 ns (restored after)."""
    from notelsp.user_cache import file_stamps

    status = path.stat()
    try:
        os.utime(path, ns=(status.st_atime_ns, status.st_mtime_ns + 1))
        species_cache.code_fingerprint.cache_clear()
        file_stamps.cache_clear()
        return species_cache.code_fingerprint()
    finally:
        os.utime(path, ns=(status.st_atime_ns, status.st_mtime_ns))
        species_cache.code_fingerprint.cache_clear()
        file_stamps.cache_clear()


def test_the_fingerprint_follows_the_chemistry_and_not_the_review():
    from pathlib import Path

    import notelsp

    package = Path(notelsp.__file__).resolve().parent
    before = species_cache.code_fingerprint()
    assert _touched_fingerprint(package / "chem" / "vsepr.py") != before  # builds structures
    assert _touched_fingerprint(package / "review" / "settings.py") == before  # only judges them
    assert species_cache.code_fingerprint() == before
