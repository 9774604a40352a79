"""Drawings show exactly the analysis's geometry: angles measured back from the model's coordinates.

Ideal polyhedron angles (90, 109.47, 120, 180 degrees) are common practice, no source.
"""

from __future__ import annotations

import itertools
import math
import xml.etree.ElementTree as ET

import pytest

from notelsp.chem import analyse
from notelsp.formats.drawing import PALETTE, models_of, svg
from notelsp.notation import parse_formula

SPECIES = ["NH3", "H2O", "ClF3", "SF4", "PCl3F2", "XeF4", "IF5", "SF6", "IF7", "BF3", "CO2", "CH4", "SF2Cl2"]


def models(formula: str, mentioned=()):
    return models_of(analyse(parse_formula(formula)), mentioned)


@pytest.mark.parametrize("formula", SPECIES)
def test_every_drawn_angle_is_the_isomers_angle(formula):
    analysis = analyse(parse_formula(formula))
    centre = analysis.centres[0]
    drawn = models(formula)
    assert drawn
    isomers = sorted(centre.isomers, key=lambda isomer: isomer.rank)
    for model in drawn:
        isomer = next(i for i in isomers if model.caption.startswith(i.name))
        for (i, a), (j, b) in itertools.combinations(enumerate(isomer.sites, start=1), 2):
            expected = math.degrees(math.acos(max(-1.0, min(1.0, sum(x * y for x, y in zip(a.vector, b.vector))))))
            assert abs(model.angle_between(i, j) - expected) < 0.5


def test_the_expected_isomer_comes_first_and_mixed_ligands_show_their_isomers():
    drawn = models("PCl3F2")
    assert drawn[0].caption.startswith("both F axial") and "expected" in drawn[0].caption
    assert len(drawn) == 3


def test_a_mentioned_angle_is_marked_with_its_ideal_value():
    (model,) = models("NH3", (("H", "N", "H"),))
    ((i, j, value),) = model.angles
    assert abs(value - 109.47) < 0.5 and abs(model.angle_between(i, j) - value) < 0.01


def test_svg_is_well_formed_and_carries_its_text_alternative():
    model = models("ClF3")[0]
    root = ET.fromstring(svg(model))
    namespace = "{http://www.w3.org/2000/svg}"
    assert root.get("role") == "img" and root.get("aria-label") == model.description
    assert root.find(f"{namespace}title").text == model.description
    assert "T-shaped" in model.description and "lone pairs equatorial" in model.description
    symbols = [t.text for t in root.iter(f"{namespace}text")]
    assert symbols.count("F") == 3 and "Cl" in symbols  # colour is never the only cue
    assert len(root.findall(f"{namespace}ellipse")) == 2  # two lone-pair lobes


def test_bond_orders_are_drawn_as_that_many_lines():
    (model,) = models("CO2")
    root = ET.fromstring(svg(model))
    assert len(root.findall("{http://www.w3.org/2000/svg}line")) == 4  # two double bonds


def test_palette_colours_are_distinct():
    fills = [fill for fill, _ in PALETTE.values()]
    assert len(set(fills)) == len(fills)


@pytest.mark.parametrize("formula", ["Fe(CO)5", "XeF6"])
def test_nothing_is_drawn_without_a_fixed_arrangement(formula):
    assert models(formula) == []
