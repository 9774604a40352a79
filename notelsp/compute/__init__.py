"""Computed geometries: every single-centre species optimised with GFN2-xTB.

The analysis predicts; this package computes.  A species' starting structure
comes from the analysis (the centre at the origin, each ligand at its
predicted bond length along its site's unit vector), is optimised with
tblite's GFN2-xTB in a worker process, and the result (angles, lengths,
energy) is kept in a disk cache.  Like the cross-check it lives at the edge:
it runs processes and writes files; nothing below it imports it.
"""

from typing import TYPE_CHECKING, Any

from .method import ANGLE_UNCERTAINTY_DEG, METHOD, Limits, versions
from .result import Angle, Bond, ComputedGeometry, ComputedSpecies

if TYPE_CHECKING:
    from .pool import GeometryPool, Request, compute_species


def __getattr__(name: str) -> Any:
    # The pool brings the chemistry (and numpy) with it: loaded only when asked for, so reading
    # results or the species index (species_cache) stays light.
    if name in ("GeometryPool", "Request", "compute_species"):
        from . import pool

        return getattr(pool, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


__all__ = [
    "ANGLE_UNCERTAINTY_DEG",
    "METHOD",
    "Angle",
    "Bond",
    "ComputedGeometry",
    "ComputedSpecies",
    "GeometryPool",
    "Limits",
    "Request",
    "compute_species",
    "versions",
]
