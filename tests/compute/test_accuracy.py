"""How far GFN2-xTB angles at a centre are from reference geometries: the measured uncertainty.

Two references:

- ASE's G2 set (``ase.collections.g2``; Curtiss et al., J. Chem. Phys. 106,
  1063 (1997)): every G2 molecule with one atom bonded to all the others that
  the notation reads with that atom as its centre; every angle at the centre.
- Experimental gas-phase angles of main-group species, each with its source
  beside it (angles fixed by symmetry alone, such as CH4's, are left out:
  they would only flatter the figures).

The test prints mean and 95th-percentile absolute errors and fails if
``ANGLE_UNCERTAINTY_DEG`` (the tolerance claims will be judged with) is
below either 95th percentile.  A trends test checks the orders chemists
quote.  Marked slow: about 70 structures are optimised.
"""

from __future__ import annotations

import itertools
from collections import Counter

import numpy as np
import pytest
from ase.collections import g2
from ase.data import covalent_radii

from notelsp.chem import analyse
from notelsp.compute import ANGLE_UNCERTAINTY_DEG
from notelsp.compute.pool import Request
from notelsp.notation import parse_formula

pytestmark = pytest.mark.slow

G2_SOURCE = "ASE G2 set (Curtiss et al., J. Chem. Phys. 106, 1063 (1997))"
# G2 names that carry their spin state: singlet (s1A1d) and triplet (s3B1d) methylene and silylene
G2_SPIN = {"s1A1d": 0, "s3B1d": 2}

CRC = "CRC Handbook of Chemistry and Physics, 'Structure of free molecules in the gas phase' (from memory)"
HERZBERG = "Herzberg, Electronic Spectra of Polyatomic Molecules (1966) (from memory)"
# (formula, ligand pair, sites (None: any pair of that kind, all equivalent), degrees, source)
EXPERIMENT = [
    ("H2O", ("H", "H"), None, 104.5, CRC),
    ("NH3", ("H", "H"), None, 106.7, CRC),
    ("PH3", ("H", "H"), None, 93.3, CRC),
    ("AsH3", ("H", "H"), None, 92.1, CRC),
    ("H2S", ("H", "H"), None, 92.1, CRC),
    ("H2Se", ("H", "H"), None, 90.6, CRC),
    ("NF3", ("F", "F"), None, 102.2, CRC),
    ("PF3", ("F", "F"), None, 97.8, CRC),
    ("NCl3", ("Cl", "Cl"), None, 107.1, CRC),
    ("PCl3", ("Cl", "Cl"), None, 100.3, CRC),
    ("OF2", ("F", "F"), None, 103.1, CRC),
    ("Cl2O", ("Cl", "Cl"), None, 110.9, CRC),
    ("SCl2", ("Cl", "Cl"), None, 102.7, CRC),
    ("SO2", ("O", "O"), None, 119.3, CRC),
    ("O3", ("O", "O"), None, 116.8, CRC),
    ("NO2", ("O", "O"), None, 134.1, CRC),
    ("ClO2", ("O", "O"), None, 117.4, CRC),
    ("CH2O", ("H", "H"), None, 116.5, CRC),
    ("CF2O", ("F", "F"), None, 107.7, CRC),
    ("COCl2", ("Cl", "Cl"), None, 111.8, CRC),
    ("NOCl", ("O", "Cl"), None, 113.3, CRC),
    ("HOCl", ("H", "Cl"), None, 102.5, CRC),
    ("SOCl2", ("Cl", "Cl"), None, 96.2, CRC),
    ("SF4", ("F", "F"), ("axial", "axial"), 173.1, CRC),
    ("SF4", ("F", "F"), ("equatorial", "equatorial"), 101.6, CRC),
    ("ClF3", ("F", "F"), ("axial", "equatorial"), 87.5, CRC),
    ("BrF3", ("F", "F"), ("axial", "equatorial"), 86.2, CRC),
    ("NH2", ("H", "H"), None, 103.4, HERZBERG),
    ("PH2", ("H", "H"), None, 91.7, HERZBERG),
    ("CH2", ("H", "H"), None, 133.9, "Jensen and Bunker, J. Chem. Phys. 89, 1327 (1988), triplet (from memory)"),
    ("SiH2", ("H", "H"), None, 92.1, "Dubois, Can. J. Phys. 46, 2485 (1968), singlet (from memory)"),
]
EXPERIMENT_SPIN = {"SiH2": 0}  # the singlet is silylene's ground state (Dubois 1968, from memory)


def g2_species() -> list[tuple[str, str]]:
    """(G2 name, formula text) for every G2 molecule with one centre the notation reads as that centre."""
    found = []
    for name in g2.names:
        atoms = g2[name]
        symbols = atoms.get_chemical_symbols()
        if len(atoms) < 3:
            continue
        centres = [i for i in range(len(atoms)) if all(
            atoms.get_distance(i, j) < 1.25 * (covalent_radii[atoms.numbers[i]] + covalent_radii[atoms.numbers[j]])
            for j in range(len(atoms)) if j != i)]
        if len(centres) != 1:
            continue
        centre = centres[0]
        others = Counter(s for j, s in enumerate(symbols) if j != centre)
        text = symbols[centre] + "".join(f"{s}{n if n > 1 else ''}" for s, n in sorted(others.items()))
        analysis = analyse(parse_formula(text))
        if analysis.outside_model or len(analysis.centres) != 1 or analysis.centres[0].central != symbols[centre]:
            continue
        found.append((name, text))
    return found


def g2_angles(name: str) -> dict[tuple[str, str], list[float]]:
    """(symbol, symbol) sorted -> every angle at the centre, sorted (the atom bonded to all others)."""
    atoms = g2[name]
    symbols = atoms.get_chemical_symbols()
    centre = max(range(len(atoms)), key=lambda i: sum(
        atoms.get_distance(i, j) < 1.25 * (covalent_radii[atoms.numbers[i]] + covalent_radii[atoms.numbers[j]])
        for j in range(len(atoms)) if j != i))
    out: dict[tuple[str, str], list[float]] = {}
    for j, k in itertools.combinations([i for i in range(len(atoms)) if i != centre], 2):
        out.setdefault(tuple(sorted((symbols[j], symbols[k]))), []).append(float(atoms.get_angle(j, centre, k)))
    return {pair: sorted(values) for pair, values in out.items()}


def computed_angles(geometry) -> dict[tuple[str, str], list[float]]:
    out: dict[tuple[str, str], list[float]] = {}
    for angle in geometry.angles:
        pair = tuple(sorted((geometry.symbols[angle.first], geometry.symbols[angle.second])))
        out.setdefault(pair, []).append(angle.degrees)
    return {pair: sorted(values) for pair, values in out.items()}


def summary(errors: list[float]) -> tuple[float, float, float]:
    values = np.abs(np.array(errors))
    return float(values.mean()), float(np.percentile(values, 95)), float(values.max())


@pytest.fixture(scope="module")
def g2_results(pool):
    species = g2_species()
    requests = []
    for name, text in species:
        suffix = name.rpartition("_")[2]
        requests.append(Request(text, G2_SPIN.get(suffix)))
    return species, pool.compute(requests)


@pytest.fixture(scope="module")
def experiment_results(pool):
    names = sorted({formula for formula, *_ in EXPERIMENT} | {"CF3", "CH3"})
    found = pool.compute([Request(n, EXPERIMENT_SPIN.get(n)) for n in names])
    return dict(zip(names, found))


def test_g2_angle_errors_are_within_the_stated_uncertainty(g2_results):
    species, results = g2_results
    errors, rows, unread, skipped = [], [], [], []
    for (name, text), result in zip(species, results):
        if result.skipped:  # a species the builder cannot place yet (a group ligand): not a failure of the method
            skipped.append(f"{name}: {result.skipped}")
            continue
        lowest = result.lowest
        if lowest is None:
            unread.append(f"{name}: {result.failed}")
            continue
        reference, computed = g2_angles(name), computed_angles(lowest)
        if {p: len(v) for p, v in reference.items()} != {p: len(v) for p, v in computed.items()}:
            unread.append(f"{name}: the atoms differ")
            continue
        for pair, values in reference.items():
            for ref, got in zip(values, computed[pair]):
                errors.append(got - ref)
                rows.append((name, pair, ref, got))
    mean, p95, worst = summary(errors)
    print(f"\nGFN2-xTB vs {G2_SOURCE}: {len(errors)} angles of {len(species) - len(unread) - len(skipped)} species; "
          f"mean |error| {mean:.2f}°, 95th percentile {p95:.2f}°, worst {worst:.2f}°")
    for name, pair, ref, got in sorted(rows, key=lambda r: -abs(r[3] - r[2]))[:8]:
        print(f"  {name:12s} {pair[0]}-X-{pair[1]}: G2 {ref:6.1f}°, computed {got:6.1f}°")
    for line in unread + skipped:
        print(f"  not compared: {line}")
    assert len(species) - len(skipped) >= 40 and len(errors) >= 100 and not unread
    assert ANGLE_UNCERTAINTY_DEG >= p95


def experimental_errors(results) -> list[tuple[str, str, float, float]]:
    rows = []
    for formula, (a, b), sites, degrees, _source in EXPERIMENT:
        lowest = results[formula].lowest
        assert lowest is not None, results[formula].failed
        chosen = [angle.degrees for angle in lowest.angles
                  if {angle.labels[0], angle.labels[2]} == {a, b}
                  and (sites is None or sorted((lowest.sites[angle.first - 1], lowest.sites[angle.second - 1]))
                       == sorted(sites))]
        assert chosen, (formula, a, b, sites)
        rows.append((formula, f"{a}-X-{b}" + (f" ({'-'.join(sites)})" if sites else ""), degrees,
                     float(np.mean(chosen))))
    return rows


def test_experimental_angle_errors_are_within_the_stated_uncertainty(experiment_results):
    rows = experimental_errors(experiment_results)
    mean, p95, worst = summary([got - ref for _, _, ref, got in rows])
    print(f"\nGFN2-xTB vs {len(rows)} experimental gas-phase angles ({len({r[0] for r in rows})} species): "
          f"mean |error| {mean:.2f}°, 95th percentile {p95:.2f}°, worst {worst:.2f}°")
    for formula, which, ref, got in rows:
        print(f"  {formula:6s} {which:28s} experiment {ref:6.1f}°, computed {got:6.1f}°, error {got - ref:+5.1f}°")
    assert len(rows) >= 20
    assert ANGLE_UNCERTAINTY_DEG >= p95


def mean_angle(results, formula: str, a: str, b: str) -> float:
    return float(np.mean(results[formula].lowest.angles_between(a, b)))


def test_computed_trends_follow_experiment(experiment_results):
    r = experiment_results
    # NF3 102.2° < NH3 106.7°; OF2 103.1° < H2O 104.5°; Cl2O 110.9° > OF2 103.1°; PF3 97.8° > PH3 93.3°
    # (CRC Handbook, from memory: the values of EXPERIMENT above)
    assert mean_angle(r, "NF3", "F", "F") < mean_angle(r, "NH3", "H", "H")
    assert mean_angle(r, "OF2", "F", "F") < mean_angle(r, "H2O", "H", "H")
    assert mean_angle(r, "Cl2O", "Cl", "Cl") > mean_angle(r, "OF2", "F", "F")
    assert mean_angle(r, "PF3", "F", "F") > mean_angle(r, "PH3", "H", "H")
    # CH3 is planar, CF3 pyramidal (F-C-F about 111°): Yamada and Hirota, J. Chem. Phys. 78, 669 (1983) for CH3;
    # Yamada and Hirota, J. Chem. Phys. 80, 4694 (1984) for CF3 (both from memory)
    assert sum(r["CH3"].lowest.angles_between("H", "H")) == pytest.approx(360.0, abs=ANGLE_UNCERTAINTY_DEG)
    cf3 = r["CF3"].lowest.angles_between("F", "F")
    assert max(cf3) < 120.0 - ANGLE_UNCERTAINTY_DEG
