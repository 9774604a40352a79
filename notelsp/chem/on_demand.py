"""The parts of a centre's analysis worked out on first use: its isomers and its Coulson indices.

Both need numpy (point groups, a least-squares fit) and only a few kinds of claim read them, so
an analysis keeps what they are computed from, and each is computed the first time it is asked
for and then kept.  Two handles are equal when what they compute from is equal, so analyses
compare as they would if everything had been computed at once.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from . import coulson as coulson_module
from . import isomers as isomer_module
from .model import Ligand


@dataclass(frozen=True, slots=True)
class IsomerRequest:
    """What :func:`isomers.isomers_for` is called with; ``isomers_for`` will not refuse it."""

    electron_geometry: str
    ligands: tuple[Ligand, ...]
    lone_pair_sites: int  # lone pairs and an odd electron, each on a site of its own
    centre_electronegativity: float | None


@dataclass(frozen=True, slots=True)
class CoulsonRequest:
    """What :func:`coulson.solve_hybrids` is called with (its mappings as item tuples, in their order)."""

    bond_counts: tuple[tuple[str, int], ...]
    pair_angles: tuple[tuple[tuple[str, str], float], ...]
    nonbonding_domains: int
    angle_source: str


@dataclass(frozen=True, slots=True)
class OnDemand:
    """A centre's isomers and Coulson analysis, each computed on first use and then kept.

    ``isomer_request`` is None when no isomers are listed (the analysis says why);
    ``coulson_request`` is None where s and p hybrids cannot describe the centre.
    """

    isomer_request: IsomerRequest | None
    coulson_request: CoulsonRequest | None
    # The results once computed, wrapped in a 1-tuple so that a result of None is told apart from
    # "not yet"; not compared: they follow from the requests.
    _isomers_kept: tuple[tuple[isomer_module.Isomer, ...]] | None = field(
        default=None, init=False, compare=False, repr=False)
    _coulson_kept: tuple[coulson_module.CoulsonAnalysis] | None = field(
        default=None, init=False, compare=False, repr=False)

    def isomers(self) -> tuple[isomer_module.Isomer, ...]:
        if self._isomers_kept is None:
            request = self.isomer_request
            found = () if request is None else isomer_module.isomers_for(
                request.electron_geometry, request.ligands, request.lone_pair_sites,
                centre_electronegativity=request.centre_electronegativity)
            object.__setattr__(self, "_isomers_kept", (found,))  # a cache of a pure result: still equal
        return self._isomers_kept[0]  # type: ignore[index]

    def coulson(self) -> coulson_module.CoulsonAnalysis | None:
        if self.coulson_request is None:
            return None
        if self._coulson_kept is None:
            request = self.coulson_request
            solved = coulson_module.solve_hybrids(dict(request.bond_counts), dict(request.pair_angles),
                                                  request.nonbonding_domains, request.angle_source)
            object.__setattr__(self, "_coulson_kept", (solved,))
        return self._coulson_kept[0]  # type: ignore[index]
