"""The claim words, read off the grammar's own terminals once.

``grammar/notation.lark`` is the one list of claim words: a word added to a
terminal there is known here too (near-miss suggestions, completion) with no
second list to update.  Each word terminal's regular expression is expanded to
the finite set of spellings it matches: a separator class such as ``[ -]+`` is
read as one space, an optional part both with and without it, a class of
letters (``hybridi[sz]ed``) as each of its letters, and lookaheads, which only
mark where a word ends, as nothing.  Letters are case-folded (the terminals
are case-insensitive).

What cannot come from the grammar stays where it is decided: the textbook
hybridization labels (``HYBRID_LABELS``: the grammar lexes any ``sp…`` so that
a slip such as ``sp4d`` can be answered with the nearest label), and the
spellings a shape is normalised to (``SHAPE_ALIASES``).
"""

from __future__ import annotations

import re
from functools import cache, lru_cache

try:  # the parser of Python's own re module, where the pattern structure is kept
    import re._parser as _sre_parse  # Python >= 3.11
    from re._constants import (
        ANY, ASSERT, ASSERT_NOT, AT, BRANCH, CATEGORY, IN, LITERAL, MAX_REPEAT, MIN_REPEAT, NEGATE, RANGE, SUBPATTERN,
    )
except ImportError:  # pragma: no cover - Python 3.10
    import sre_parse as _sre_parse  # type: ignore[no-redef]
    from sre_constants import (  # type: ignore[no-redef]
        ANY, ASSERT, ASSERT_NOT, AT, BRANCH, CATEGORY, IN, LITERAL, MAX_REPEAT, MIN_REPEAT, NEGATE, RANGE, SUBPATTERN,
    )

from .grammar import parser

# Spellings of one shape that name another: the canonical name is what a ShapeClaim holds.
SHAPE_ALIASES = {"angular": "bent", "v-shaped": "bent", "vshaped": "bent", "see-saw": "seesaw", "tshaped": "t-shaped",
                 "sawhorse": "seesaw", "saw-horse": "seesaw"}
# The textbook hybridization labels; any other sp… the grammar lexes is an unknown label.
HYBRID_LABELS = ("sp", "sp2", "sp3", "sp3d", "sp3d2", "sp3d3")

# Terminals of the claim grammar that are not words: symbols, names, numbers and marks.
_NOT_WORDS = frozenset({"NAME", "SYMBOL", "ATOM_NAME", "GROUP_NAME", "POINT_GROUP", "COUPLING", "AXE", "HYBRID_FRACTION"})
_MAX_SPELLINGS = 4096  # far above any word terminal's; a pattern past it is not a list of words


class _NotAWordList(ValueError):
    """The pattern matches too many strings (or a kind of string) to be a list of words."""


def _letters(items) -> list[str]:
    """The letters a character class admits, or [" "] when it admits no letter (a separator class)."""
    found: list[str] = []
    for op, value in items:
        if op is LITERAL:
            found.append(chr(value))
        elif op is RANGE:
            found.extend(chr(code) for code in range(value[0], value[1] + 1))
        elif op is NEGATE or op is CATEGORY:
            return [" "]  # [^...] or \d, \s: a separator, never part of a word here
    letters = [char for char in found if char.isalpha()]
    if letters and len(letters) != len(found):
        raise _NotAWordList("a class mixing letters and other characters")
    return sorted(set(letters)) if letters else [" "]


def _expand(parsed) -> list[str]:
    spellings = [""]
    for op, value in parsed:
        if op is LITERAL:
            choices = [chr(value)]
        elif op is IN:
            choices = _letters(value)
        elif op is SUBPATTERN:
            choices = _expand(value[-1])
        elif op is BRANCH:
            choices = [spelling for branch in value[1] for spelling in _expand(branch)]
        elif op in (MAX_REPEAT, MIN_REPEAT):
            low, _high, inner = value
            once = _expand(inner)
            choices = ([""] if low == 0 else []) + once  # unbounded repeats of a separator are one separator
        elif op in (ASSERT, ASSERT_NOT, AT):
            continue  # where a word ends, not what it spells
        elif op is ANY:
            raise _NotAWordList("a wildcard")
        else:
            raise _NotAWordList(f"the pattern element {op}")
        spellings = [before + choice for before in spellings for choice in choices]
        if len(spellings) > _MAX_SPELLINGS:
            raise _NotAWordList("too many spellings")
    return spellings


def spellings(pattern: str, flags: str = "") -> tuple[str, ...]:
    """Every spelling ``pattern`` matches, separators as single spaces, case-folded when ``flags`` has ``i``."""
    found = []
    for spelling in _expand(_sre_parse.parse(pattern)):
        spelling = " ".join(spelling.split())
        spelling = spelling.lower() if "i" in flags else spelling
        if spelling not in found:
            found.append(spelling)
    return tuple(found)


def _claim_terminals() -> list[str]:
    """The names of the terminals the ``claim`` start symbol can reach, in the grammar's order."""
    rules = parser().rules
    reached, waiting, terminals = {"claim"}, ["claim"], set()
    while waiting:
        origin = waiting.pop()
        for rule in rules:
            if rule.origin.name != origin:
                continue
            for symbol in rule.expansion:
                if symbol.is_term:
                    terminals.add(symbol.name)
                elif symbol.name not in reached:
                    reached.add(symbol.name)
                    waiting.append(symbol.name)
    return [t.name for t in parser().terminals if t.name in terminals]


@lru_cache(maxsize=64)  # keyed by terminal name: the grammar has a few dozen
def terminal_spellings(name: str) -> tuple[str, ...]:
    """Every spelling of the grammar's terminal ``name`` (a word terminal such as ``SHAPE`` or ``SITE``)."""
    (terminal,) = [t for t in parser().terminals if t.name == name]
    pattern = terminal.pattern
    if pattern.type == "str":
        return (pattern.value.lower() if "i" in pattern.flags else pattern.value,)
    return spellings(pattern.value, "".join(pattern.flags))


@cache
def claim_words() -> frozenset[str]:
    """Every word the claim grammar knows, case-folded: what near-miss suggestions choose from."""
    words: set[str] = set()
    for name in _claim_terminals():
        if name in _NOT_WORDS:
            continue
        try:
            found = terminal_spellings(name)
        except _NotAWordList:
            continue
        words.update(word.lower() for spelling in found for word in re.findall(r"[^\W\d_]+", spelling))
    return frozenset(words)


def canonical_shape(written: str) -> str:
    """The shape name a ShapeClaim holds for ``written``: lowercase, hyphenated, aliases resolved."""
    name = re.sub(r"[ -]+", "-", written.strip().lower())
    return SHAPE_ALIASES.get(name, name)


@cache
def shape_names() -> tuple[str, ...]:
    """Every shape the notation names (``SHAPE``), canonical and in the grammar's order."""
    names: list[str] = []
    for spelling in terminal_spellings("SHAPE"):
        name = canonical_shape(spelling)
        if name not in names:
            names.append(name)
    return tuple(names)


@cache
def site_words() -> tuple[str, ...]:
    """The placement sites (``SITE``): axial, equatorial, cis, fac, ..."""
    return terminal_spellings("SITE")
