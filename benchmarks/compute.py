"""Computed-geometry figures: a 200-species note through ``notelsp check``, and the pool itself.

note200_*: a note naming 200 distinct species (single-centre AXn molecules
and ions, mixed halides with several isomers, radicals, condensed formulas
and SMILES; one annotation each, with a claim) is checked by the real
command line, ``notelsp check NOTE --format json``, in a subprocess with a
fresh, empty cache folder (``NOTELSP_CACHE_DIR``): note200_cold_s computes
every species (one worker per core), note200_warm_s runs the same command
again and answers from the disk cache, note200_rules_only_s is the same note
with ``--rules-only``; the ``*_cpu_s`` figures are the CPU time of each run's
whole process tree (workers included).  Both reports must parse as JSON and the warm one must
list exactly the cold one's findings (the benchmark stops otherwise).
note200_failed counts the species with no usable computed geometry, and
note200_failed_species names each with its reason: a calculation that failed
(its ``calculation-failed`` finding) or a species the calculation does not
build (none of these 200 should be one).  note200_warm_indexed counts the
species the species index (``notelsp.compute.species_cache``) answers after
the warm run: 200 unless notelsp's chemistry code changed between the runs.

computed_species_per_s: 20 distinct species (4 of them mixed halides with
several isomers) optimised with GFN2-xTB by a pool of one worker per core,
nothing cached; the workers are started (and have loaded tblite) before the
clock starts, and compute_worker_start_s says what that took.
computed_structures_per_s counts every isomer optimised.
cached_lookup_us: mean time to read, parse and check one stored structure
from a warm disk cache (the file system's cache warm too).

Everything runs in temporary cache folders; the user's own cache is not touched.
"""

from __future__ import annotations

import json
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent

SPECIES = ["NH3", "H2O", "PH3", "H2S", "CH4", "SiH4", "CF4", "NF3", "PF3", "OF2",
           "SO2", "ClF3", "BF3", "SF4", "SF6", "PF5", "XeF4", "PCl3F2", "SOF4", "PCl2F3"]

# 200 distinct species, grouped by the claim each carries (one annotation per species).
NOTE_SPECIES: tuple[tuple[str, tuple[str, ...]], ...] = (
    ("tetrahedral, no lone pairs", (
        "CH4", "SiH4", "GeH4", "CF4", "CCl4", "SiF4", "SiCl4", "GeF4", "GeCl4", "SnCl4", "NH4+", "BF4-",
        "AlCl4-", "BH4-", "AlH4-", "PCl4+", "SO4^2-", "PO4^3-", "ClO4-", "IO4-", "XeO4", "CH3F", "CH3Cl",
        "CH2Cl2", "CHCl3", "CH2F2", "CHF3", "CH3Br", "CH3I", "CF3Cl", "CF2Cl2", "CFCl3", "SiH3Cl",
        "SiHCl3", "SiF3Cl", "POCl3", "POF3", "PSCl3", "SO2Cl2", "SO2F2")),
    ("trigonal pyramidal, one lone pair", (
        "NH3", "PH3", "AsH3", "NF3", "NCl3", "PF3", "PCl3", "PBr3", "AsF3", "AsCl3", "SbCl3", "H3O+",
        "SO3^2-", "ClO3-", "BrO3-", "IO3-", "XeO3", "CH3-", "SnCl3-", "GeCl3-", "PF2Cl", "NF2Cl", "SOCl2",
        "SOF2", "SF3+")),
    ("bent, angle 105°", (
        "H2O", "H2S", "H2Se", "OF2", "OCl2", "SCl2", "SF2", "NH2-", "PH2-", "H2F+", "ClO2-", "ClF2+",
        "BrF2+", "ICl2+", "NH2")),
    ("bent, angle 118°", (
        "SO2", "NO2-", "SnCl2", "PbCl2", "GeCl2", "CCl2", "CF2", "SiH2", "CH2", "ClO2", "NO2", "NOCl",
        "NOF")),
    ("trigonal planar, angle 120°", (
        "BF3", "BCl3", "BBr3", "AlCl3", "BH3", "AlH3", "SO3", "NO3-", "CO3^2-", "CH3+", "COCl2", "COF2",
        "NO2F", "NO2Cl", "BF2Cl", "CH3", "SiH3", "CF3", "CCl3")),
    ("linear, angle 180°", ("BeH2", "BeCl2", "CO2", "CS2", "NO2+", "XeF2", "KrF2", "ICl2-", "I3-", "ClF2-")),
    ("T-shaped, two lone pairs equatorial", ("ClF3", "BrF3", "IF3", "ICl3", "XeF3+", "XeOF2")),
    ("seesaw, one lone pair", ("SF4", "SeF4", "TeF4", "SCl4", "TeCl4", "SbCl4-", "ClF4+", "SF3Cl", "XeO2F2")),
    ("square planar", ("XeF4", "ICl4-", "BrF4-", "ClF4-")),
    ("square pyramidal", ("ClF5", "BrF5", "IF5", "XeOF4", "XeF5+")),
    ("trigonal bipyramidal, F axial", (
        "PF5", "PCl5", "AsF5", "SbF5", "SbCl5", "PCl3F2", "PCl2F3", "PClF4", "PBrF4", "SOF4")),
    ("octahedral, sp3d2", (
        "SF6", "TeF6", "PF6-", "PCl6-", "SiF6^2-", "AsF6-", "SbF6-", "BrF6+", "IF6+", "SF5Cl", "SF4Cl2",
        "IOF5", "IO6^5-")),
    ("pentagonal planar", ("XeF5-",)),
    ("pentagonal bipyramidal", ("IF7",)),
    ("distorted octahedral", ("XeF6",)),
    ("polar", (
        "CH3OH", "CH3COOH", "N2H4", "H2O2", "CH3CN", "HCOOH", "CH3CHO", "CH3NH2", "CH3OCH3", "CH2=CHCl",
        "CH3CH2OH", "(CH3)2CO", "NH2OH", "HNO2", "HCN", "CH2O", 'smiles "CC(=O)N"', 'smiles "c1ccncc1"',
        'smiles "OCCO"', 'smiles "C=CC#N"')),
    ("nonpolar", ("C2H4", "C2H6", "C2H2", "C6H6", 'smiles "C1CC1"', 'smiles "CC#CC"', 'smiles "C=C=C"')),
    ("1 unpaired electron", ("CH3CH2",)),
)


def note_text() -> str:
    lines = ["# Two hundred species", "", "```bonding"]
    lines += [f"{species}: {claim}" for claim, group in NOTE_SPECIES for species in group]
    return "\n".join([*lines, "```", ""])


def _check(note: Path, cache: str, *extra: str) -> tuple[float, float, dict]:
    """Wall time, CPU time (the process and its workers) and parsed JSON report of one ``notelsp check``."""
    environment = {key: value for key, value in os.environ.items()
                   if key not in ("XDG_CACHE_HOME", "NOTELSP_COMPUTE", "NOTELSP_WORKERS")}
    environment["NOTELSP_CACHE_DIR"] = cache
    environment["NOTELSP_REPORT_CACHE"] = "off"  # the warm figure measures the geometry cache, not kept reports
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    done = subprocess.run([sys.executable, "-m", "notelsp", "check", str(note), "--format", "json", *extra],
                          cwd=ROOT, env=environment, capture_output=True, text=True, timeout=1800)
    elapsed = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = after.ru_utime + after.ru_stime - before.ru_utime - before.ru_stime
    if done.returncode not in (0, 1):
        raise RuntimeError(f"notelsp check exited {done.returncode}: {done.stderr[-2000:]}")
    return elapsed, cpu, json.loads(done.stdout)


def _findings(report: dict) -> list:
    return [finding for file in report["files"] for finding in file["findings"]]


def _indexed(species: list[str], cache: str) -> tuple[int, float]:
    """How many species the species index answers now (fewer than all when notelsp's chemistry code
    changed between the runs, in a working tree being edited: then the warm run took the full path),
    and the seconds that lookup of all of them took (files warm in the page cache, modules imported)."""
    try:
        from notelsp.compute import species_cache
    except ImportError:  # a release from before the index
        return 0, float("nan")
    from notelsp.notation import parse_formula

    previous = os.environ.get("NOTELSP_CACHE_DIR")
    os.environ["NOTELSP_CACHE_DIR"] = cache
    try:
        written = [parse_formula(text).written for text in species]
        species_cache.load_many(written[:1])  # the versions and code fingerprint, once per process
        start = time.perf_counter()
        found = species_cache.load_many(written)
        return len(found), time.perf_counter() - start
    finally:
        if previous is None:
            os.environ.pop("NOTELSP_CACHE_DIR", None)
        else:
            os.environ["NOTELSP_CACHE_DIR"] = previous


def measure_note() -> dict[str, str]:
    from notelsp.chem import analyse
    from notelsp.compute.geometry import Skipped, start_structures
    from notelsp.notation import parse_formula

    species = [s for _, group in NOTE_SPECIES for s in group]
    assert len(species) == len(set(species)) == 200, "the note must name 200 distinct species"
    figures: dict[str, str] = {"note200_species": str(len(species))}
    with tempfile.TemporaryDirectory() as folder:
        note = Path(folder) / "two-hundred.md"
        note.write_text(note_text(), encoding="utf-8")
        cache = str(Path(folder) / "cache")
        cold_s, cold_cpu, cold = _check(note, cache)
        warm_s, warm_cpu, warm = _check(note, cache)
        indexed, lookup_s = _indexed(species, cache)
        rules_s, rules_cpu, _ = _check(note, cache, "--rules-only")
    if _findings(warm) != _findings(cold):
        raise RuntimeError("the warm check's findings differ from the cold check's")
    failed = {f["formula"]: f["message"].split(": ", 1)[-1] for f in _findings(cold)
              if f["code"] == "calculation-failed"}
    for text in species:  # species the calculation does not build are not reported by check
        built = start_structures(analyse(parse_formula(text)))
        if isinstance(built, Skipped):
            failed[text] = f"not built: {built.reason}"
    figures["note200_cold_s"] = f"{cold_s:.1f}"
    figures["note200_warm_s"] = f"{warm_s:.2f}"
    figures["note200_rules_only_s"] = f"{rules_s:.2f}"
    # CPU seconds of the whole process tree: steadier than wall time on a machine shared with other work
    figures["note200_cold_cpu_s"] = f"{cold_cpu:.1f}"
    figures["note200_warm_cpu_s"] = f"{warm_cpu:.2f}"
    figures["note200_rules_only_cpu_s"] = f"{rules_cpu:.2f}"
    figures["note200_warm_indexed"] = str(indexed)
    # what the computed geometries cost a warm check: reading all 200 from the cache, and the whole
    # check's time beyond the rules-only check of the same note (the rest is the review itself)
    figures["note200_warm_lookup_s"] = f"{lookup_s:.3f}"
    figures["note200_warm_over_rules_only_s"] = f"{warm_s - rules_s:.2f}"
    figures["note200_findings"] = str(len(_findings(cold)))
    figures["note200_failed"] = str(len(failed))
    figures["note200_failed_species"] = "; ".join(f"{name} ({why})" for name, why in failed.items()) or "none"
    return figures


def measure_pool() -> dict[str, str]:
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


def measure() -> dict[str, str]:
    return {**measure_note(), **measure_pool()}


def main() -> None:
    for name, value in measure().items():
        print(f"{name}: {value}", flush=True)


if __name__ == "__main__":
    main()
