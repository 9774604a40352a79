"""What a CI gate needs from `notelsp check`: totals, exit statuses, standard input,
lists of paths, cautions once per run, unreadable files inside the report, compact JSON."""

import json
import re
import subprocess
import sys
from pathlib import Path

import pytest

from .conftest import run_notelsp

FINDING = re.compile(r"^.+:\d+:\d+: (error|warning|information|hint)\[[a-z0-9-]+\] .+$")
# The last line of text output: "2 files, 3 annotations: 1 error, 1 warning" (or "no findings").
TOTALS = re.compile(r"^(\d+) files?, (\d+) annotations?: (.+)$")


def _run_with_input(*args: str, data: bytes, cwd: Path | None = None) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "notelsp", *args], input=data, capture_output=True, cwd=cwd, timeout=120)


@pytest.fixture
def mixed(tmp_path: Path) -> Path:
    """Three notes: one error, one warning only, one clean; five annotations written in all."""
    (tmp_path / "error.md").write_text("{ClF3: trigonal planar} and {H2O: bent}\n", encoding="utf-8")
    # NH3's H-N-H angle is about 107 degrees (common practice, no source): 120 is implausible (a warning)
    (tmp_path / "warning.md").write_text("Ammonia {NH3: H-N-H 120°}\n", encoding="utf-8")
    (tmp_path / "clean.md").write_text("{CH4: tetrahedral} and {H2O: bent}\n", encoding="utf-8")
    return tmp_path


def test_text_ends_with_totals_that_match_the_lines_above(mixed):
    result = run_notelsp("check", str(mixed))
    assert result.returncode == 1, result.stderr
    lines = result.stdout.splitlines()
    totals = TOTALS.match(lines[-1])
    assert totals, lines[-1]
    assert totals[1] == "3" and totals[2] == "5"  # three files and five {...} groups, written above
    severities = [FINDING.match(line)[1] for line in lines if FINDING.match(line)]
    for severity in ("error", "warning"):
        count = severities.count(severity)
        assert count and f"{count} {severity}" in totals[3]


def test_json_totals_count_what_the_report_lists(mixed):
    result = run_notelsp("check", "--format", "json", str(mixed))
    report = json.loads(result.stdout)
    listed = [f["severity"] for entry in report["files"] for f in entry["findings"]]
    totals = report["totals"]
    assert totals["files"] == len(report["files"]) == 3
    assert totals["annotations"] == 5
    assert totals["unreadable"] == 0 and report["unreadable"] == []
    assert totals["findings"] == {severity: listed.count(severity) for severity in ("error", "warning", "information", "hint")}


def test_fail_level_decides_the_exit_status(mixed):
    note = str(mixed / "warning.md")
    assert run_notelsp("check", note).returncode == 0  # a warning does not fail by default
    assert run_notelsp("check", "--fail-level", "warning", note).returncode == 1
    assert run_notelsp("check", "--fail-level", "hint", str(mixed / "clean.md")).returncode == 0
    assert run_notelsp("check", "--fail-level", "fatal", note).returncode == 2


def test_nothing_reviewed_is_a_warning_with_its_own_status(tmp_path):
    (tmp_path / "empty").mkdir()
    result = run_notelsp("check", str(tmp_path / "empty"))
    assert result.returncode == 3
    assert "no notes were reviewed" in result.stderr
    assert TOTALS.match(result.stdout.splitlines()[-1])[1] == "0"


def test_unreadable_files_are_in_the_json_report(mixed):
    (mixed / "binary.md").write_bytes(b"ok\n\xff\xfe")
    result = run_notelsp("check", "--format", "json", str(mixed))
    assert result.returncode == 2
    report = json.loads(result.stdout)
    (entry,) = report["unreadable"]
    assert Path(entry["path"]).name == "binary.md" and "UTF-8" in entry["reason"]
    assert report["totals"]["unreadable"] == 1 and report["totals"]["files"] == 3


def test_standard_input_is_a_note_named_as_asked():
    note = "Xenon difluoride {XeF2: bent}\n".encode()
    result = _run_with_input("check", "-", data=note)
    assert result.returncode == 1
    assert result.stdout.decode().startswith("<stdin>:1:")
    named = _run_with_input("check", "--format", "json", "--stdin-name", "runs/day1.md", "-", data=note)
    (entry,) = json.loads(named.stdout)["files"]
    assert entry["path"] == "runs/day1.md" and entry["findings"][0]["code"] == "wrong-shape"


def test_stdin_name_suffix_chooses_plain_text_over_markdown():
    # In Markdown a code span hides the annotation (CommonMark); in plain text nothing is hidden.
    note = "`{XeF2: bent}`\n".encode()
    as_markdown = json.loads(_run_with_input("check", "--format", "json", "-", data=note).stdout)
    as_text = json.loads(_run_with_input("check", "--format", "json", "--stdin-name", "n.txt", "-", data=note).stdout)
    assert as_markdown["totals"]["annotations"] == 0
    assert as_text["totals"]["annotations"] == 1


def test_files_from_reads_nul_separated_paths(mixed):
    odd = mixed / "line\nbreak.md"  # a newline is allowed in a file name: why the list is NUL-separated
    odd.write_text("{XeF2: bent}\n", encoding="utf-8")
    listing = b"\0".join(bytes(p) for p in (odd, mixed / "clean.md")) + b"\0"
    from_stdin = _run_with_input("check", "--format", "json", "--files-from", "-", data=listing)
    (mixed / "list").write_bytes(listing)
    from_file = run_notelsp("check", "--format", "json", "--files-from", str(mixed / "list"))
    for result in (json.loads(from_stdin.stdout), json.loads(from_file.stdout)):
        assert [Path(entry["path"]).name for entry in result["files"]] == ["line\nbreak.md", "clean.md"]
    assert run_notelsp("check").returncode == 2  # nothing named at all is a usage error
    both = _run_with_input("check", "--files-from", "-", "-", data=listing)
    assert both.returncode == 2 and b"standard input" in both.stderr


def test_cautions_are_summarised_once_per_run(tmp_path):
    for index in range(5):  # ClF3 and XeF2 are hazardous (chem/hazards.py lists both; from memory)
        (tmp_path / f"n{index}.md").write_text("{ClF3: t-shaped} {XeF2: linear}\n", encoding="utf-8")
    summary = run_notelsp("check", str(tmp_path)).stdout
    caution_lines = [line for line in summary.splitlines() if "caution" in line]
    assert len(caution_lines) == 1 and "ClF3" in caution_lines[0] and "XeF2" in caution_lines[0]
    assert "safety data sheet" in caution_lines[0]
    per_file = run_notelsp("check", "--cautions", "per-file", str(tmp_path)).stdout
    assert sum("caution" in line for line in per_file.splitlines()) == 5
    left_out = run_notelsp("check", "--cautions", "none", str(tmp_path)).stdout.splitlines()
    assert not any("ClF3" in line for line in left_out)
    (pointer,) = [line for line in left_out if "caution" in line]  # one line says they were left out
    assert "left out" in pointer and "not safety data" in pointer


def test_json_cautions_per_file_and_for_the_run(tmp_path):
    for index in range(3):
        (tmp_path / f"n{index}.md").write_text("{ClF3: t-shaped}\n", encoding="utf-8")
    report = json.loads(run_notelsp("check", "--format", "json", str(tmp_path)).stdout)
    assert all([c["formula"] for c in entry["cautions"]] == ["ClF3"] for entry in report["files"])
    (summary,) = report["cautions"]
    assert summary["formula"] == "ClF3" and summary["files"] == 3 and report["cautions_left_out"] is False
    left_out = json.loads(run_notelsp("check", "--format", "json", "--cautions", "none", str(tmp_path)).stdout)
    assert left_out["cautions"] == [] and left_out["cautions_left_out"] is True
    assert all(entry["cautions"] == [] for entry in left_out["files"])


def test_json_is_compact_unless_indented(mixed):
    compact = run_notelsp("check", "--format", "json", str(mixed)).stdout
    indented = run_notelsp("check", "--format", "json", "--indent", "2", str(mixed)).stdout
    assert compact.count("\n") == 1 and indented.count("\n") > 10
    assert json.loads(compact) == json.loads(indented)


def test_bad_option_values_are_usage_errors(mixed):
    note = str(mixed / "clean.md")
    for bad in (["--indent", "-1"], ["--source-root", str(mixed / "absent")], ["--cautions", "loud"], ["-", "-"]):
        result = run_notelsp("check", *bad, note)
        assert result.returncode == 2 and "Traceback" not in result.stderr, bad
