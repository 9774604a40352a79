import os
import subprocess
import sys
from pathlib import Path

import pytest

from notelsp.cli import COMPUTE_VARIABLE

# The command line's tests are rules-only unless a test asks (tests/cli/test_computed.py): computing starts
# worker processes and changes findings. tests/conftest.py sets the same switch for the whole suite.
os.environ[COMPUTE_VARIABLE] = "off"


def run_notelsp(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess:
    """Run the installed command line in a child process, as a user would."""
    return subprocess.run(
        [sys.executable, "-m", "notelsp", *args],
        capture_output=True,
        text=True,
        encoding="utf-8",
        cwd=cwd,
        timeout=120,
    )


@pytest.fixture
def notes(tmp_path: Path) -> Path:
    (tmp_path / "wrong.md").write_text("# Run 7\n\nThe trifluoride {ClF3: trigonal planar} was weighed.\n", encoding="utf-8")
    (tmp_path / "fine.md").write_text("Water {H2O: bent, 2 lone pairs} as reference.\n", encoding="utf-8")
    return tmp_path
