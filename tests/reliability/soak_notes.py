"""The notes a soak session types: a small seed note and an annotation text per number, never repeated.

Shared by tests/reliability/test_soak.py and benchmarks/soak.py, so the figure and the test drive
the same session.
"""

from __future__ import annotations

import string

FORMULAS = ("ClF3", "SF4", "H2O", "NH3", "XeF4", "PCl5", "BF3", "CH4", "SF6", "IF5", "PCl3F2", "BrF5")
SHAPES = ("bent", "linear", "tetrahedral", "t-shaped", "seesaw", "octahedral", "trigonal planar")
SEED = "# Day of notes\n\nFirst {ClF3: t-shaped}.\n\nTyped here\n\nLast {SF4: seesaw}.\n"
EDITED_LINE = 4  # "Typed here": each edit replaces this line


def _word(number: int) -> str:
    """A distinct letters-only word per number (an unknown claim word: looked up, suggested, never kept)."""
    letters = ""
    number += 26 * 26
    while number:
        number, digit = divmod(number, 26)
        letters += string.ascii_lowercase[digit]
    return letters


def new_annotation(number: int) -> str:
    """An annotation text no earlier number gives: claims right and wrong, angles, unknown words."""
    formula = FORMULAS[number % len(FORMULAS)]
    kind = number % 3
    if kind == 0:
        return f"{{{formula}: {SHAPES[number % len(SHAPES)]}, angle {90 + number % 60}.{number // 60}°}}"
    if kind == 1:
        return f"{{{formula}: {_word(number)}}}"
    return f"{{{formula}: F-X-F {100 + number % 70}.{number // 70}°, {number % 3} lone pairs}}"
