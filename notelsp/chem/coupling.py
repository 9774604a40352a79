"""One-bond 13C-1H coupling constants and the s-character of the C-H bond.

The Muller-Pritchard relation: the coupling is proportional to the s-character
of the carbon hybrid in the C-H bond, 1J(C,H) ≈ 500 Hz × s (methane, sp3,
25 %: 125 Hz; ethylene, sp2: about 160 Hz; acetylene, sp: about 250 Hz).
Source: N. Muller and D. E. Pritchard, J. Chem. Phys. 31, 768 (1959).

The relation holds for hydrocarbons; electronegative substituents on the carbon
raise the coupling far beyond what the s-character alone gives (CHCl3 209 Hz,
from memory), so there it is only a rough guide.
"""

from __future__ import annotations

MULLER_PRITCHARD_HZ = 500.0
# Hz allowed between a coupling and the s-character it is compared with: above the largest
# deviation of the relation over the hydrocarbons in tests/chem/test_coupling.py (published values).
TOLERANCE_HZ = 20.0
ELECTRONEGATIVE_SUBSTITUENTS = frozenset({"N", "O", "F", "Cl", "Br", "I", "S"})


def coupling_from_s_character(fraction: float) -> float:
    """1J(C,H) in Hz for a C-H bond whose carbon hybrid has this s-character (0..1)."""
    return MULLER_PRITCHARD_HZ * fraction


def s_character_from_coupling(hertz: float) -> float:
    """The s-character (0..1) of the carbon hybrid that a 1J(C,H) implies."""
    return hertz / MULLER_PRITCHARD_HZ
