"""Jupyter notebooks on the command line: each Markdown cell is reviewed as a note.

The notebooks are written with ``nbformat`` (Jupyter's own writer), so the
file layout is the real one.  Chemistry: ClF3 has 3 bonds + 2 lone pairs on
Cl, so VSEPR predicts t-shaped (standard VSEPR, from memory).
"""

import json
import subprocess
import sys
from pathlib import Path

import jsonschema
import nbformat
from nbformat import v4

from .conftest import run_notelsp

SCHEMA = Path(__file__).parent.parent / "data" / "sarif-2.1.0-rtm.5.json"
CELL = "# Run 7\n\nThe trifluoride {ClF3: trigonal planar} fumes in air.\n"
CLAIM = "trigonal planar"
CODE = "shapes = {'ClF3': 'x'}\n# {ClF3: linear}\n"  # would be a finding if code cells were read


def where(text: str, needle: str) -> tuple[int, int]:
    """1-based line and column (code points) of ``needle`` in ``text``."""
    offset = text.index(needle)
    return text.count("\n", 0, offset) + 1, offset - (text.rfind("\n", 0, offset) + 1) + 1


def write_notebook(path: Path, *cells) -> Path:
    nbformat.write(v4.new_notebook(cells=list(cells)), str(path))
    return path


def run7(folder: Path) -> Path:
    return write_notebook(folder / "run7.ipynb", v4.new_code_cell(CODE), v4.new_markdown_cell(CELL),
                          v4.new_markdown_cell("Water {H2O: bent} as reference.\n"))


def test_text_names_the_cell_and_counts_lines_within_it(tmp_path):
    run7(tmp_path)
    result = run_notelsp("check", "run7.ipynb", cwd=tmp_path)
    assert result.returncode == 1, result.stderr
    line, column = where(CELL, CLAIM)
    findings = [row for row in result.stdout.splitlines() if "[" in row and not row.startswith(" ")]
    assert findings == [f"run7.ipynb#cell=2:{line}:{column}: error[wrong-shape] "
                        + findings[0].split("error[wrong-shape] ", 1)[1]]  # one finding: the code cell is not read
    assert "trigonal planar" in findings[0]


def test_json_gives_the_cell_beside_line_and_column(tmp_path):
    run7(tmp_path)
    (tmp_path / "note.md").write_text("{SF4: seesaw}\n", encoding="utf-8")
    result = run_notelsp("check", "--format", "json", ".", cwd=tmp_path)  # found in a folder too
    assert result.returncode == 1, result.stderr
    report = json.loads(result.stdout)
    entries = {entry["path"]: entry for entry in report["files"]}
    assert sorted(entries) == ["note.md", "run7.ipynb"]  # one entry for the notebook, not one per cell
    (finding,) = entries["run7.ipynb"]["findings"]
    line, column = where(CELL, CLAIM)
    assert (finding["cell"], finding["line"], finding["column"]) == (2, line, column)
    assert finding["end_column"] == column + len(CLAIM)
    assert finding["claim"] == CLAIM
    assert report["totals"]["files"] == 2
    assert all(f["cell"] is None for f in entries["note.md"]["findings"])


def test_sarif_is_schema_valid_and_names_the_cell_without_file_edits(tmp_path):
    run7(tmp_path)
    result = run_notelsp("check", "--format", "sarif", "run7.ipynb", cwd=tmp_path)
    assert result.returncode == 1, result.stderr
    log = json.loads(result.stdout)
    jsonschema.validate(log, json.loads(SCHEMA.read_text(encoding="utf-8")))
    run = log["runs"][0]
    assert len(run["artifacts"]) == 1
    assert "sourceLanguage" not in run["artifacts"][0]  # the file is JSON; only its cells are Markdown
    (entry,) = run["results"]
    location = entry["locations"][0]
    line, column = where(CELL, CLAIM)
    assert location["physicalLocation"]["region"]["startLine"] == line
    assert location["physicalLocation"]["region"]["startColumn"] == column
    assert location["physicalLocation"]["artifactLocation"]["index"] == 0
    assert location["logicalLocations"][0]["name"] == "cell 2"
    assert location["properties"]["cell"] == 2
    # a replacement would address the notebook's JSON, not the cell: none is offered
    assert "fixes" not in entry


def test_a_file_that_is_not_a_notebook_is_unreadable_and_the_rest_is_checked(tmp_path):
    (tmp_path / "broken.ipynb").write_text('{"cells": [', encoding="utf-8")
    (tmp_path / "deep.ipynb").write_text("[" * 100_000 + "]" * 100_000, encoding="utf-8")
    run7(tmp_path)
    result = run_notelsp("check", "--format", "json", "broken.ipynb", "deep.ipynb", "run7.ipynb", cwd=tmp_path)
    assert result.returncode == 2, result.stderr
    report = json.loads(result.stdout)
    reasons = {u["path"]: u["reason"] for u in report["unreadable"]}
    assert reasons["broken.ipynb"].startswith("not valid JSON")
    assert "nested too deeply" in reasons["deep.ipynb"]
    assert [entry["path"] for entry in report["files"]] == ["run7.ipynb"]
    assert "Traceback" not in result.stderr


def test_notebook_without_markdown_cells_is_listed_with_nothing_found(tmp_path):
    write_notebook(tmp_path / "code.ipynb", v4.new_code_cell("x = {'ClF3': 'linear'}"))
    result = run_notelsp("check", "--format", "json", "code.ipynb", cwd=tmp_path)
    assert result.returncode == 0, result.stderr
    report = json.loads(result.stdout)
    assert report["files"] == [{"path": "code.ipynb", "findings": [], "cautions": []}]


def test_a_notebook_on_standard_input_is_read_by_its_given_name(tmp_path):
    text = nbformat.writes(v4.new_notebook(cells=[v4.new_code_cell(CODE), v4.new_markdown_cell(CELL)]))
    result = subprocess.run([sys.executable, "-m", "notelsp", "check", "-", "--stdin-name", "run7.ipynb"],
                            input=text, capture_output=True, text=True, encoding="utf-8", cwd=tmp_path, timeout=120)
    assert result.returncode == 1, result.stderr
    line, column = where(CELL, CLAIM)
    assert result.stdout.startswith(f"run7.ipynb#cell=2:{line}:{column}: error[wrong-shape] ")
