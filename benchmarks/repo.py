"""``repo_ratio``: ``notelsp check DIR --format json --rules-only`` over generated notes ÷ a regex floor.

A notes repository: 3,000 notes of 100 Markdown lines, about 20 annotations
each, whose annotation texts are nearly all distinct (formulas, claims and
angle values vary), so per-text caches help little and the figure measures
reviewing, not remembering. The content is invented for measuring speed only.

The check runs as a process of its own under a small wrapper process, which
reports the rusage of its children: CPU time (user + system) of the whole
process tree, workers included, and the peak resident memory of the largest
process in it (``ru_maxrss``). The floor is one ``re.finditer`` pass for brace
groups over every file, each read from disk, as a process of its own under
the same wrapper (so it pays a Python start too), best of four runs around
the check.
``repo_rss_mb_1000`` is the peak at 1,000 notes (its first third), beside it:
reports keep no review once its file is written, so what still grows is the
review layer's caches of distinct texts, each capped, until they are full.

``repo_ratio`` is the first check, with the report cache (``notelsp/report_cache.py``)
empty: a cache folder of the benchmark's own, fresh, so every note is reviewed.
``repo_ratio_unchanged`` and ``repo_rss_mb_unchanged`` are the same command run
again over the unchanged notes, each answered from the report kept for it, CPU
divided by the same floor.
"""

from __future__ import annotations

import json
import os
import random
import re
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

NOTES = 3_000
LINES = 100
ANNOTATIONS = 20

# (formula, claims) pairs; "{n}" in a claim takes a varied number, so texts rarely repeat.
SPECIES = [
    ("H2O", ["bent", "sp3", "2 lone pairs", "H-O-H {a}°", "linear", "polar"]),
    ("NH3", ["trigonal pyramidal", "H-N-H {a}°", "sp3", "1 lone pair"]),
    ("PH3", ["sp3", "unhybridized", "H-P-H {a}°", "trigonal pyramidal"]),
    ("H2S", ["bent", "H-S-H {a}°", "sp3"]),
    ("ClF3", ["t-shaped", "trigonal planar", "lone pairs equatorial", "polar"]),
    ("BrF3", ["t-shaped", "trigonal planar", "polar"]),
    ("BrF5", ["square pyramidal", "octahedral", "sp3d2"]),
    ("IF5", ["square pyramidal", "nonpolar"]),
    ("XeF2", ["linear", "bent", "3 lone pairs"]),
    ("XeF4", ["square planar", "tetrahedral", "nonpolar"]),
    ("SF4", ["seesaw", "lone pair equatorial", "lone pair axial", "F-S-F {b}°"]),
    ("SeF4", ["seesaw", "lone pair equatorial"]),
    ("PCl3F2", ["F axial", "F equatorial", "trigonal bipyramidal", "nonpolar"]),
    ("PCl2F3", ["F axial", "trigonal bipyramidal"]),
    ("SO4^2-", ["tetrahedral", "sp3"]),
    ("PO4^3-", ["tetrahedral", "O-P-O {c}°"]),
    ("CH2F2", ["F-C-F < H-C-H", "tetrahedral", "polar"]),
    ("CH2Cl2", ["tetrahedral", "polar", "H-C-H {c}°"]),
    ("CHCl3", ["tetrahedral", "polar"]),
    ("CO2", ["linear", "bent", "nonpolar", "O-C-O {d}°"]),
    ("BF3", ["trigonal planar", "sp2", "nonpolar", "F-B-F {e}°"]),
    ("BCl3", ["trigonal planar", "sp2"]),
    ("IF7", ["pentagonal bipyramidal", "sp3d3"]),
    ("SF2Cl2", ["seesaw", "F axial"]),
    ("XeO2F2", ["seesaw", "O equatorial"]),
    ("NO2", ["bent", "O-N-O {f}°"]),
    ("SiH4", ["tetrahedral", "sp3", "H-Si-H {c}°"]),
    ("GeH4", ["tetrahedral", "sp3"]),
    ("ICl4-", ["square planar", "tetrahedral"]),
    ("ICl2-", ["linear", "bent"]),
    ("SF6", ["octahedral", "octahedrl"]),
    ("PCl5", ["trigonal bipyramidal", "square pyramidal"]),
    ("NH4+", ["tetrahedral", "H-N-H {c}°"]),
    ("H3O+", ["trigonal pyramidal", "H-O-H {a}°"]),
    ("CH4", ["tetrahedral", "sp3", "H-C-H {c}°"]),
    ("CCl4", ["tetrahedral", "nonpolar"]),
    ("SO2", ["bent", "O-S-O {f}°"]),
    ("SO3", ["trigonal planar", "nonpolar"]),
    ("ClO3-", ["trigonal pyramidal", "sp3"]),
    ("XeF6", ["distorted octahedral", "octahedral"]),
]

# Angle ranges per placeholder; one decimal place, so values repeat seldom.
NUMBERS = {"a": (85.0, 125.0), "b": (80.0, 180.0), "c": (100.0, 115.0), "d": (160.0, 180.0),
           "e": (110.0, 125.0), "f": (110.0, 140.0), "l": (95.0, 240.0), "m": (0.95, 2.40)}

PROSE = [
    "The sample was dried under vacuum overnight before weighing.",
    "Yield was lower than the previous run; see the balance log.",
    "Spectra were recorded at room temperature in deuterated solvent.",
    "The reaction mixture turned pale yellow after twenty minutes.",
    "Filtered through a short plug and washed with cold solvent.",
    "Inline code `{SF4: linear}` is skipped, as is math $\\{x : x > 0\\}$.",
]


def _claim(rng: random.Random, template: str) -> str:
    for key, (low, high) in NUMBERS.items():
        if "{" + key + "}" in template:
            return template.replace("{" + key + "}", f"{rng.uniform(low, high):.1f}")
    return template


# Claims any species can carry, each with a measured-looking number.
MEASURED = ["bond angle {b}°", "bond length {l} pm", "bond length {m} Å"]


def _annotation(rng: random.Random) -> str:
    formula, claims = rng.choice(SPECIES)
    chosen = rng.sample(claims, k=rng.randint(1, min(3, len(claims))))
    if rng.random() < 0.7:  # most annotations carry a number, so their texts are distinct
        chosen.append(rng.choice(MEASURED))
    return f"{formula}: {', '.join(_claim(rng, claim) for claim in chosen)}"


def make_note(rng: random.Random, number: int, lines: int = LINES, annotations: int = ANNOTATIONS) -> str:
    out = [f"# Run {number}", ""]
    placed = 0
    while len(out) < lines:
        remaining = lines - len(out)
        roll = rng.random()
        if roll < 0.06 and remaining > 6 and placed + 3 <= annotations:
            out.extend(["```bonding", *(_annotation(rng) for _ in range(3)), "```"])
            placed += 3
        elif roll < 0.10:
            out.append(f"## Step {len(out)}")
        else:
            sentence = rng.choice(PROSE)
            # enough chances that about ``annotations`` are placed in the note's lines
            if placed < annotations and rng.random() < annotations / (lines * 0.8):
                sentence += f" Checked {{{_annotation(rng)}}} here."
                placed += 1
            out.append(sentence)
    return "\n".join(out[:lines]) + "\n"


def make_repo(folder: Path, notes: int, seed: int = 3000) -> list[Path]:
    rng = random.Random(seed)
    paths = []
    for number in range(notes):
        sub = folder / f"week{number // 100:02d}"
        sub.mkdir(parents=True, exist_ok=True)
        path = sub / f"run{number:04d}.md"
        path.write_text(make_note(rng, number), encoding="utf-8")
        paths.append(path)
    return paths


# The floor: a Python process that walks the folder, reads and decodes each note and finds its
# brace groups with one regular expression: what any checker of these files has to pay.
FLOOR_SCRIPT = """
import os, re, sys
brace = re.compile(r"\\{[^{}\\n]*\\}")
found = 0
for folder, _, names in os.walk(sys.argv[1]):
    for name in names:
        if name.endswith(".md"):
            with open(os.path.join(folder, name), "rb") as handle:
                found += sum(1 for _ in brace.finditer(handle.read().decode("utf-8")))
print(found)
"""


def regex_floor_s(folder: str, cwd: str, env: dict[str, str]) -> float:
    """CPU time (user + system) of the floor process over ``folder``."""
    return _child_usage([sys.executable, "-c", FLOOR_SCRIPT, folder], cwd, env)["cpu_s"]


def notelsp_command() -> list[str]:
    script = Path(sys.executable).parent / "notelsp"
    return [str(script)] if script.exists() else [sys.executable, "-m", "notelsp"]


def _child_usage(command: list[str], cwd: str, env: dict[str, str] | None = None) -> dict:
    """Run ``command`` under a fresh wrapper process, whose children's rusage is the command's alone."""
    wrapper = (
        "import json, resource, subprocess, sys\n"
        "subprocess.run(sys.argv[1:], stdout=subprocess.DEVNULL, check=False)\n"
        "u = resource.getrusage(resource.RUSAGE_CHILDREN)\n"
        "print(json.dumps({'cpu_s': u.ru_utime + u.ru_stime, 'maxrss_kb': u.ru_maxrss}))\n"
    )
    start = time.perf_counter()
    done = subprocess.run([sys.executable, "-c", wrapper, *command], cwd=cwd, env=env, capture_output=True,
                          text=True, check=True, timeout=600)
    usage = json.loads(done.stdout)
    usage["wall_s"] = time.perf_counter() - start
    return usage


def measure(notes: int = NOTES, small: int = 1_000) -> dict[str, str]:
    env = {k: v for k, v in os.environ.items() if k not in ("PYTHONDONTWRITEBYTECODE", "NOTELSP_REPORT_CACHE")}
    with tempfile.TemporaryDirectory() as folder:
        env["PYTHONPYCACHEPREFIX"] = str(Path(folder, "bytecode"))
        env["NOTELSP_CACHE_DIR"] = str(Path(folder, "cache"))  # the kept reports: this run's own, empty
        repo = Path(folder, "repo")
        paths = make_repo(repo, notes)
        # the rules' review only: GFN2-xTB geometries have figures of their own (compute.py)
        check = [*notelsp_command(), "check", "repo", "--format", "json", "--rules-only"]
        # bytecode, parser cache; --review-all keeps no report, so the first check below starts from none
        _child_usage([*notelsp_command(), "check", str(paths[0]), "--rules-only", "--review-all"], folder, env)
        floors = [regex_floor_s("repo", folder, env) for _ in range(3)]
        usage = _child_usage(check, folder, env)
        unchanged = _child_usage(check, folder, env)  # every note's report kept by the first
        floor = min(*floors, regex_floor_s("repo", folder, env))  # best of four, on both sides of the check
        small_repo = Path(folder, "small")
        small_repo.mkdir()
        for path in paths[:small]:
            target = small_repo / path.relative_to(repo)
            target.parent.mkdir(exist_ok=True)
            target.write_bytes(path.read_bytes())
        small_usage = _child_usage([*notelsp_command(), "check", "small", "--format", "json", "--rules-only"],
                                   folder, env)
    return {
        "repo_notes": str(notes),
        "repo_check_cpu_s": f"{usage['cpu_s']:.2f}",
        "repo_check_wall_s": f"{usage['wall_s']:.2f}",
        "repo_floor_s": f"{floor:.3f}",
        "repo_ratio": f"{usage['cpu_s'] / floor:.1f}",
        "repo_rss_mb": f"{usage['maxrss_kb'] / 1024:.0f}",
        "repo_check_cpu_s_unchanged": f"{unchanged['cpu_s']:.2f}",
        "repo_ratio_unchanged": f"{unchanged['cpu_s'] / floor:.1f}",
        "repo_rss_mb_unchanged": f"{unchanged['maxrss_kb'] / 1024:.0f}",
        f"repo_rss_mb_{small}": f"{small_usage['maxrss_kb'] / 1024:.0f}",
    }


def main() -> None:
    notes = int(sys.argv[1]) if len(sys.argv) > 1 else NOTES
    for name, value in measure(notes).items():
        print(f"{name}: {value}", flush=True)


if __name__ == "__main__":
    main()
