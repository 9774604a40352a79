"""Analysis -> plain dict, for ``notelsp explain --format json`` (JSON-serialisable)."""

from __future__ import annotations

from dataclasses import asdict
from typing import Any

from ..notation.model import Formula
from .analysis import CentreAnalysis, SpeciesAnalysis
from .condensed import read_condensed
from .coulson import CoulsonAnalysis


def analysis_to_dict(analysis: SpeciesAnalysis, formula: Formula | None = None) -> dict[str, Any]:
    """The species, with its first centre's fields at the top level, every centre under ``centres``, and
    the whole molecule (atoms by name, bonds, point group, polarity) under ``molecule``.

    ``formula``: the species as parsed; for a single-centre species it lets the molecule's atoms be named.
    """
    centres = [centre_to_dict(c) for c in analysis.centres]
    top: dict[str, Any] = {
        "formula": analysis.formula,
        "charge": analysis.charge,
        "outside_model": analysis.outside_model,
        "cautions": list(analysis.cautions),
    }
    if centres:
        first = dict(centres[0])
        first.pop("charge")
        top.update(first)
        top["centre_charge"] = centres[0]["charge"]
    else:
        for key in ("central", "valence_electrons", "steric_number", "bonded_atoms", "lone_pairs",
                    "electron_geometry", "shape", "hybridization", "drago", "coulson", "bent"):
            top[key] = None
        top["ideal_angles"] = []
        top["isomers"] = []
    top["centres"] = centres
    top["molecule"] = molecule_to_dict(analysis, formula)
    return top


def molecule_to_dict(analysis: SpeciesAnalysis, formula: Formula | None = None) -> dict[str, Any] | None:
    """Every atom (centres with their VSEPR answers, terminal atoms with ``steric_number`` None), every bond
    with its order, and the whole molecule's point group and polarity; None where no molecule is known."""
    from .molecule_analysis import analyse_molecule

    whole = analysis.molecule
    if whole is None and formula is not None and analysis.outside_model is None and len(analysis.centres) == 1:
        # a single-centre species: name its atoms through the molecule graph of the same formula, when
        # that graph has the same centre with the same shape (H2SO4's OH oxygens are centres there too)
        reading = read_condensed(formula)
        own = analysis.centres[0]
        if reading.molecule is not None:
            candidate = analyse_molecule(reading.molecule)
            if any(c.element == own.central and c.analysis is not None and c.analysis.shape == own.shape
                   for c in candidate.centres):
                whole = candidate
    if whole is None:
        return None
    molecule = whole.molecule
    by_label = {c.label: c for c in whole.centres}
    atoms = []
    for index, atom in enumerate(molecule.atoms):
        centre = by_label.get(atom.label)
        found = centre.analysis if centre is not None else None
        nonbonding = molecule.nonbonding_electrons(index)
        atoms.append({
            "label": atom.label,
            "element": atom.element,
            "charge": atom.charge,
            "neighbours": [molecule.atoms[j].label for j in molecule.neighbours(index)],
            "lone_pairs": found.lone_pairs if found else (max(0, nonbonding - atom.unpaired) // 2
                                                          if nonbonding is not None else None),
            "steric_number": found.steric_number if found else None,
            "electron_geometry": found.electron_geometry if found else None,
            "shape": found.shape if found else None,
            "hybridization": found.hybridization if found else None,
        })
    bonds = [{"atoms": [molecule.atoms[b.first].label, molecule.atoms[b.second].label], "order": b.order,
              "delocalised": b.delocalised} for b in molecule.bonds]
    point_group, polar, note = _symmetry(analysis, whole)
    data: dict[str, Any] = {"atoms": atoms, "bonds": bonds, "point_group": point_group, "polar": polar}
    if note:
        data["point_group_note"] = note
    return data


def _symmetry(analysis: SpeciesAnalysis, whole: Any) -> tuple[str | None, bool | None, str | None]:
    """The whole molecule's point group and polarity: the expected isomer's for one centre (lone pairs
    count), the 3D model's for several."""
    if len(whole.centres) == 1 and analysis.centres:
        from .isomers import expected

        best = expected(analysis.centres[0].isomers)
        if best and len({(i.point_group, i.polar) for i in best}) == 1:
            return best[0].point_group, best[0].polar, None
        return None, None, analysis.centres[0].isomers_withheld or "the expected isomers differ in symmetry"
    from .molecule_geometry import whole_molecule_symmetry

    found = whole_molecule_symmetry(whole.molecule)
    if isinstance(found, str):
        return None, None, found
    return found[0], found[1], None


def centre_to_dict(centre: CentreAnalysis) -> dict[str, Any]:
    return {
        "central": centre.central,
        "charge": centre.charge,
        "valence_electrons": centre.valence_electrons,
        "steric_number": centre.steric_number,
        "bonded_atoms": centre.bonded_atoms,
        "lone_pairs": centre.lone_pairs,
        "odd_electrons": centre.odd_electrons,
        "ligands": [asdict(l) for l in centre.ligands],
        "electron_geometry": centre.electron_geometry,
        "shape": centre.shape,
        "hybridization": centre.hybridization,
        "ideal_angles": list(centre.ideal_angles),
        "angle_ranges": [
            {"ligands": list(r.ligands), "relation": r.relation, "ideal": r.ideal, "low": r.low, "high": r.high,
             "direction": r.direction, "estimate": r.estimate, "reason": r.reason}
            for r in centre.angle_ranges
        ],
        "coulson": coulson_to_dict(centre.coulson),
        "drago": {
            "applies": centre.drago.applies,
            "conditions": [{"name": c.name, "holds": c.holds, "why": c.why} for c in centre.drago.conditions],
        },
        "bent": {
            "angle_orders": [
                {"larger": "-".join(o.larger), "smaller": "-".join(o.smaller), "confidence": o.confidence,
                 "reason": o.reason, "steric_override": o.steric_override}
                for o in centre.bent.angle_orders
            ],
            "axial_preference": list(centre.bent.axial_preference),
            "s_rich": list(centre.bent.s_rich),
            "notes": list(centre.bent.notes),
        },
        "isomers": [_isomer_to_dict(i) for i in centre.isomers],
        "notes": list(centre.notes),
    }


def coulson_to_dict(coulson: CoulsonAnalysis | None) -> dict[str, Any] | None:
    if coulson is None:
        return None
    return {
        "bonds": [{"ligand": b.ligand, "index": b.index, "label": b.label, "s_character": b.s_character}
                  for b in coulson.bonds],
        "lone_pair_s_character": coulson.lone_pair_s_character,
        "per_lone_pair_s_character": coulson.per_lone_pair_s_character,
        "angles_used": [{"between": [a, b], "degrees": d} for a, b, d in coulson.angles_used],
        "angle_source": coulson.angle_source,
        "consistent": coulson.consistent,
    }


def _isomer_to_dict(isomer: Any) -> dict[str, Any]:
    data = asdict(isomer)
    data["sites"] = [dict(site, vector=list(site["vector"])) for site in data["sites"]]
    return data
