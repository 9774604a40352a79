"""How hard the reliability tests push: a bounded subset by default, longer runs with NOTELSP_FUZZ=1.

Every test records what it tried with :func:`tried`; the totals are printed at
the end of the run (see conftest.py) and copied into RESULTS.md.
"""

from __future__ import annotations

import os
from collections import Counter

FUZZ = os.environ.get("NOTELSP_FUZZ", "") not in ("", "0")
TRIED: Counter[str] = Counter()


def scaled(ci: int, fuzz: int) -> int:
    """``ci`` examples in the normal run, ``fuzz`` under ``make fuzz``."""
    return fuzz if FUZZ else ci


def tried(what: str, count: int = 1) -> None:
    TRIED[what] += count
