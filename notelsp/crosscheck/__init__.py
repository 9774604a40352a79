"""Optional quantum-chemistry cross-check of an annotated species.

Optimises each isomer at a small, stated level of theory (PySCF with
geomeTRIC, the ``qc`` extra) in a worker process and sets the computed
angles, bond lengths and isomer energy gaps beside the claims.  Entry points:

- :func:`notelsp.crosscheck.runner.cross_check` (async; progress callback, cancellable)
- :func:`notelsp.crosscheck.report.cross_check_findings` / ``cross_check_markdown`` (pure)
- :func:`notelsp.crosscheck.cli.cross_check_paths` (``notelsp check --cross-check``)

This package does I/O (worker process, disk cache); the analysis layers do not.
"""

from .availability import INSTALL_HINT, missing_extra
from .levels import DEFAULT_LEVEL, LevelOfTheory, Limits, parse_level

__all__ = ["DEFAULT_LEVEL", "INSTALL_HINT", "LevelOfTheory", "Limits", "missing_extra", "parse_level"]
