"""Analysis -> plain dict, for ``notelsp explain --format json`` (JSON-serialisable)."""

from __future__ import annotations

from dataclasses import asdict
from typing import Any

from .analysis import CentreAnalysis, SpeciesAnalysis
from .coulson import CoulsonAnalysis


def analysis_to_dict(analysis: SpeciesAnalysis) -> dict[str, Any]:
    """The species, with its first centre's fields at the top level and every centre under ``centres``."""
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
    return top


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
