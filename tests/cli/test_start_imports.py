"""A rules-only check of a one-annotation note imports none of the heavy packages it has no use for.

What a command imports is most of its start-up time (``benchmarks/cli_start.py`` measures it); this
holds the line without timing anything: numpy is needed only for isomers and Coulson fits, RDKit
only for SMILES, tblite and ASE only in the geometry workers, pygls and lsprotocol only by ``serve``.
"""

from __future__ import annotations

import subprocess
import sys
import textwrap

HEAVY = ("numpy", "rdkit", "tblite", "ase", "pygls", "lsprotocol", "mendeleev", "pandas", "sqlalchemy")


def _imported_by_check(tmp_path, note: str) -> list[str]:
    (tmp_path / "one.md").write_text(note, encoding="utf-8")
    script = textwrap.dedent(f"""
        import contextlib, io, sys
        from notelsp.cli import main
        with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(io.StringIO()):
            status = main(["check", "--rules-only", "one.md"])
        print(status, sorted(name for name in {HEAVY!r} if name in sys.modules))
    """)
    done = subprocess.run([sys.executable, "-c", script], cwd=tmp_path, capture_output=True, text=True, check=True)
    return done.stdout.split(maxsplit=1)


def test_a_shape_claim_is_checked_without_the_heavy_packages(tmp_path):
    status, imported = _imported_by_check(tmp_path, "# Fluorides\n\nChlorine trifluoride is {ClF3: T-shaped}.\n")
    assert (status, imported.strip()) == ("0", "[]")  # T-shaped is right for ClF3 (common practice, no source)


def test_an_isomer_claim_loads_numpy_for_its_isomers_only(tmp_path):
    status, imported = _imported_by_check(tmp_path, "{PCl3F2: trigonal bipyramidal, F axial}\n")
    # F axial is the expected PCl3F2 isomer (Bent's rule, apicophilicity; common practice, no source)
    assert (status, imported.strip()) == ("0", "['numpy']")
