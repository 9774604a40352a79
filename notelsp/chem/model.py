"""Shared chemical value types passed between the analyser, the isomer
enumerator and the review layer."""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True, slots=True)
class Ligand:
    """One atom or group bonded to a centre.

    ``symbol`` is the attaching atom ("O" for OH), ``label`` what the note
    wrote ("OH"), ``bond_order`` 1, 2 or 3 as the electron count implies.
    """

    symbol: str
    label: str
    bond_order: int
    electronegativity: float | None


@dataclass(frozen=True, slots=True)
class Conjugation:
    """A lone pair that a molecule graph shows beside a π system (amide, aniline, enol, ester, pyrrole ring)."""

    kind: str  # "amide-type", "aromatic ring", ...: what a chemist calls the arrangement
    reason: str  # one sentence naming the atoms: why the centre is planar
    firmly_planar: bool  # True where the planar form is well established (amides, aromatic ring atoms)


LONE_PAIR = "lone-pair"  # the label of a lone-pair site in isomers and placement claims
