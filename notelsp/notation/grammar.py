"""The notation grammar: loaded once, lazily, and parsed with LALR.

The grammar ships as package data of ``notelsp.grammar``; in an editable
install that package may not be importable, so the top-level ``grammar/``
folder next to the package is the fallback.
"""

from __future__ import annotations

from functools import cache
from pathlib import Path

from lark import Lark

GRAMMAR_FILE = "notation.lark"
START_SYMBOLS = ("formula_spec", "claim")


def grammar_text() -> str:
    try:
        from importlib.resources import files

        return files("notelsp.grammar").joinpath(GRAMMAR_FILE).read_text(encoding="utf-8")
    except (ModuleNotFoundError, FileNotFoundError):
        return (Path(__file__).resolve().parents[2] / "grammar" / GRAMMAR_FILE).read_text(encoding="utf-8")


@cache
def parser() -> Lark:
    """The one LALR parser for both start symbols (built on first use)."""
    return Lark(grammar_text(), parser="lalr", lexer="contextual", start=list(START_SYMBOLS))


# Every word the claim grammar knows, for suggestions on unknown words.
CLAIM_WORDS = frozenset(
    """
    linear bent angular v shaped see saw seesaw t trigonal planar pyramidal bipyramidal
    tetrahedral octahedral square pentagonal electron domain pair geometry
    sp d unhybridized unhybridised hybridized hybridised no hybridization hybridisation pure p
    polar nonpolar non apolar zero dipole moment
    axial equatorial apical basal cis trans fac mer lone pairs isomer isomers
    a an one single two three four five six both all bond angle index i s character
    point group shorter longer equal deg degree degrees in
    """.split()
)

# Whole claims as commonly written, the targets of "did you mean" for one-word slips.
CLAIM_PHRASES = (
    "linear", "bent", "trigonal planar", "trigonal pyramidal", "tetrahedral", "seesaw",
    "t-shaped", "trigonal bipyramidal", "square pyramidal", "square planar", "octahedral",
    "pentagonal bipyramidal", "pentagonal planar", "pentagonal pyramidal",
    "sp", "sp2", "sp3", "sp3d", "sp3d2", "sp3d3", "unhybridized",
    "polar", "nonpolar", "axial", "equatorial", "apical", "basal", "cis", "trans", "fac", "mer",
)
