"""A small formula builder for the chemistry tests (independent of the notation parser)."""

from __future__ import annotations

import re

import pytest

from notelsp.notation.model import Atom, Formula, Group, Span

_TOKEN = re.compile(r"([A-Z][a-z]?)(\d*)|\((.*?)\)(\d*)")


def _parts(text: str) -> tuple:
    parts = []
    for match in _TOKEN.finditer(text):
        span = Span(match.start(), match.end())
        if match.group(1):
            parts.append(Atom(match.group(1), int(match.group(2) or 1), span))
        else:
            parts.append(Group(_parts(match.group(3)), int(match.group(4) or 1), span))
    return tuple(parts)


def make_formula(text: str, charge: int = 0, centre: str | None = None) -> Formula:
    """``make_formula("SO4", -2)``; groups in parentheses attach by their first atom."""
    return Formula(text, _parts(text), charge, Span(0, len(text)), centre)


@pytest.fixture
def formula():
    return make_formula
