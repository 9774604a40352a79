"""A rules-only check of a one-annotation note imports none of the heavy packages it has no use for.

What a command imports is most of its start-up time (``benchmarks/cli_start.py`` measures it); this
holds the line without timing anything: numpy is needed only for isomers and Coulson fits, RDKit
only for SMILES, tblite and ASE only in the geometry workers, pygls and lsprotocol only by ``serve``.
"""

from __future__ import annotations

import os
import subprocess
import sys
import textwrap

HEAVY = ("numpy", "rdkit", "tblite", "ase", "pygls", "lsprotocol", "mendeleev", "pandas", "sqlalchemy")
# Lighter, but each a few milliseconds of a check that has no use for them: other report formats, the
# server, the geometry and cross-check code, notebooks, settings files (none here), worker pools, and
# what only a mistake in a note needs (difflib's suggestions) or only JSON and SARIF reports (json).
NOT_FOR_A_TEXT_REPORT = (
    "json", "difflib", "tomllib", "multiprocessing", "concurrent.futures", "importlib.metadata",
    "importlib.resources", "subprocess", "asyncio", "notelsp.formats.json_report", "notelsp.formats.sarif",
    "notelsp.formats.html_report", "notelsp.formats.drawing", "notelsp.server", "notelsp.compute",
    "notelsp.crosscheck", "notelsp.notation.notebook", "notelsp.review.describe", "notelsp.chem.smiles",
    "notelsp.chem.molecule",  # the graph of a condensed formula or a SMILES; ClF3 is neither
    "sqlite3",  # element data comes from the user's cache once a first process has read the database
)


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


def test_a_text_report_of_one_note_loads_only_what_it_uses(tmp_path):
    (tmp_path / "one.md").write_text("# Fluorides\n\nChlorine trifluoride is {ClF3: T-shaped}.\n", encoding="utf-8")
    script = textwrap.dedent(f"""
        import contextlib, io, sys
        from notelsp.cli import main
        with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(io.StringIO()):
            status = main(["check", "--rules-only", "one.md"])
        print(status, sorted(name for name in {NOT_FOR_A_TEXT_REPORT!r} if name in sys.modules))
    """)
    environment = {**os.environ, "XDG_CACHE_HOME": str(tmp_path / "cache")}  # a cache of this test's own
    subprocess.run([sys.executable, "-c", script], cwd=tmp_path, env=environment, capture_output=True, check=True)
    done = subprocess.run([sys.executable, "-c", script], cwd=tmp_path, env=environment, capture_output=True,
                          text=True, check=True)  # the second check: what every check after the first loads
    status, imported = done.stdout.split(maxsplit=1)
    assert (status, imported.strip()) == ("0", "[]")  # T-shaped is right for ClF3 (common practice, no source)


def test_a_mistake_still_gets_its_suggestion(tmp_path):
    # difflib is loaded on demand now: the suggestion for a misspelt shape must still be made
    (tmp_path / "one.md").write_text("{ClF3: T-shapd}\n", encoding="utf-8")
    done = subprocess.run([sys.executable, "-m", "notelsp", "check", "--rules-only", "one.md"], cwd=tmp_path,
                          capture_output=True, text=True)
    assert "did you mean 'T-shaped'?" in done.stdout, done.stdout  # the one-letter fix (common practice, no source)


def test_check_leaves_the_collector_as_it_found_it(tmp_path):
    # main() collects less often while a run lasts; a caller in the same process gets its own settings back
    import gc

    from notelsp.cli import main

    (tmp_path / "one.md").write_text("{ClF3: T-shaped}\n", encoding="utf-8")
    before = gc.get_threshold()
    gc.set_threshold(700, 10, 10)
    try:
        assert main(["check", "--rules-only", str(tmp_path / "one.md")]) == 0
        assert gc.get_threshold() == (700, 10, 10)
    finally:
        gc.set_threshold(*before)
