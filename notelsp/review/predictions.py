"""What the analysis predicts, as short text for editors: inlay hints,
document symbols and the "add the predicted description" fix.

Pure; reads a ``SpeciesAnalysis`` from ``notelsp.chem`` and writes nothing
of its own chemistry.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from ..notation.model import Annotation, Span
from .findings import Fix

if TYPE_CHECKING:
    from ..chem.analysis import SpeciesAnalysis


def predicted_shape(analysis: SpeciesAnalysis | None) -> str | None:
    """The VSEPR shape name of the species' first centre, or None outside the model."""
    if analysis is None or analysis.outside_model:
        return None
    centres = analysis.centres
    if not centres or centres[0].shape is None:
        return None
    shape = centres[0].shape
    return shape


def written_shape(shape: str) -> str:
    """A shape as chemists spell it ("trigonal-pyramidal" -> "trigonal pyramidal", "t-shaped" -> "T-shaped").

    The one spelling people see, in messages, fixes, hover, hints and drawings; JSON keeps the
    machine name ("t-shaped").
    """
    return "T-shaped" if shape == "t-shaped" else shape.replace("-", " ")


def predicted_description_fix(annotation: Annotation, analysis: SpeciesAnalysis | None) -> Fix | None:
    """For a bare ``{FORMULA}``: insert ``: <predicted shape>`` after the formula."""
    formula = annotation.formula
    if annotation.claims or annotation.errors or formula is None or annotation.is_comparison:
        return None
    shape = predicted_shape(analysis)
    if shape is None:
        return None
    words = written_shape(shape)
    end = annotation.body.end
    return Fix(f"Add the predicted description: {words}", Span(end, end), f": {words}")
