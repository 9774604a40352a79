"""The chemistry: formula -> centres, VSEPR, Coulson, Drago, Bent, isomers.

Entry point :func:`analyse`; it does no I/O and never raises for a chemical
reason (what the model cannot treat is reported as ``outside_model``).
"""

from .analysis import CentreAnalysis, PairRange, SpeciesAnalysis, analyse

__all__ = ["CentreAnalysis", "PairRange", "SpeciesAnalysis", "analyse"]
