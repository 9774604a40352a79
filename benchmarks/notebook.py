"""A large synthetic notebook for the benchmarks, made from a fixed seed.

10,000 lines of Markdown with 2,000 annotations: inline and block forms,
right and wrong claims, code spans, fenced code and math that must be skipped.
The content is invented for measuring speed only.
"""

from __future__ import annotations

import random

SPECIES_CLAIMS = [
    ("H2O", ["bent", "sp3", "2 lone pairs", "H-O-H 104.5°", "linear", "polar"]),
    ("NH3", ["trigonal pyramidal", "H-N-H 107°", "H-N-H 120°", "sp3", "1 lone pair"]),
    ("PH3", ["sp3", "unhybridized", "H-P-H 93.5°", "trigonal pyramidal"]),
    ("ClF3", ["t-shaped", "trigonal planar", "lone pairs equatorial", "polar"]),
    ("BrF5", ["square pyramidal", "octahedral", "sp3d2"]),
    ("XeF4", ["square planar", "tetrahedral", "nonpolar"]),
    ("SF4", ["seesaw", "lone pair equatorial", "lone pair axial"]),
    ("PCl3F2", ["F axial", "F equatorial", "trigonal bipyramidal", "nonpolar"]),
    ("SO4^2-", ["tetrahedral", "sp3"]),
    ("CH2F2", ["F-C-F < H-C-H", "tetrahedral", "polar"]),
    ("CO2", ["linear", "bent", "nonpolar"]),
    ("BF3", ["trigonal planar", "sp2", "nonpolar"]),
    ("IF7", ["pentagonal bipyramidal", "sp3d3"]),
    ("SF2Cl2", ["seesaw", "F axial"]),
    ("XeO2F2", ["seesaw", "O equatorial"]),
    ("NO2", ["bent", "O-N-O 134°"]),
    ("SiH4", ["tetrahedral", "sp3", "H-Si-H 109.5°"]),
    ("H2S", ["bent", "sp3", "H-S-H 92°"]),
    ("ICl4-", ["square planar", "tetrahedral"]),
    ("SF6", ["octahedral", "octahedrl"]),
]

PROSE = [
    "The sample was dried under vacuum overnight before weighing.",
    "Yield was lower than the previous run; see the balance log.",
    "Spectra were recorded at room temperature in deuterated solvent.",
    "The reaction mixture turned pale yellow after twenty minutes.",
    "Filtered through a short plug and washed with cold solvent.",
]


def make_notebook(lines: int = 10_000, annotations: int = 2_000, seed: int = 48) -> str:
    rng = random.Random(seed)
    out: list[str] = []
    placed = 0

    def annotation() -> str:
        formula, claims = rng.choice(SPECIES_CLAIMS)
        chosen = rng.sample(claims, k=rng.randint(1, min(3, len(claims))))
        return f"{formula}: {', '.join(chosen)}"

    while len(out) < lines:
        roll = rng.random()
        remaining_lines = lines - len(out)
        if roll < 0.05 and remaining_lines > 8:
            out.append(f"## Run {len(out)}")
        elif roll < 0.10 and remaining_lines > 8 and placed + 4 <= annotations:
            body = [annotation() for _ in range(4)]
            out.extend(["```bonding", "# batch of the day", *body, "```"])
            placed += 4
        elif roll < 0.13 and remaining_lines > 8:
            out.extend(["```python", "spec = {'ClF3': 'linear'}  # not a claim", "```"])
        elif roll < 0.16:
            out.append("Inline code `{SF4: linear}` and math $\\{x : x > 0\\}$ are skipped.")
        else:
            sentence = rng.choice(PROSE)
            if placed < annotations and rng.random() < 0.30:
                sentence += f" Checked {{{annotation()}}} here."
                placed += 1
            out.append(sentence)
    return "\n".join(out[:lines]) + "\n"
