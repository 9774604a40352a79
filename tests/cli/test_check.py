"""`notelsp check` in a child process: formats, exit statuses, file discovery."""

import json
import os
import re
import subprocess
import sys

import pytest

from .conftest import run_notelsp

LINE = re.compile(r"^(?P<path>[^:]+):(?P<line>\d+):(?P<col>\d+): (?P<severity>error|warning|information|hint)\[(?P<code>[a-z0-9-]+)\] (?P<message>.+)$")


def test_wrong_claim_is_reported_with_position_and_exit_1(notes):
    result = run_notelsp("check", str(notes / "wrong.md"))
    assert result.returncode == 1, result.stderr
    findings = [LINE.match(line) for line in result.stdout.splitlines() if LINE.match(line)]
    assert findings, result.stdout
    first = findings[0]
    assert first["code"] == "wrong-shape" and first["severity"] == "error"
    # "trigonal planar" starts on line 3, column 33 (1-based, code points)
    assert (first["line"], first["col"]) == ("3", str("The trifluoride {ClF3: ".__len__() + 1))
    assert "T-shaped" in first["message"]
    assert "fix:" in result.stdout


def test_clean_note_exits_0(notes):
    result = run_notelsp("check", str(notes / "fine.md"))
    assert result.returncode == 0, result.stdout + result.stderr
    assert "no findings" in result.stdout


def test_missing_file_is_a_usage_error_without_traceback(tmp_path):
    result = run_notelsp("check", str(tmp_path / "absent.md"))
    assert result.returncode == 2
    assert "no such file" in result.stderr
    assert "Traceback" not in result.stderr


def test_unreadable_file_is_reported_and_others_still_checked(notes):
    (notes / "binary.md").write_bytes(b"\xff\xfe\x00 not text")
    result = run_notelsp("check", str(notes))
    assert result.returncode == 2
    assert "not UTF-8" in result.stderr and "Traceback" not in result.stderr
    assert "wrong-shape" in result.stdout


def test_bad_arguments_exit_2():
    assert run_notelsp("check").returncode == 2
    assert run_notelsp("check", "--format", "xml", "a.md").returncode == 2


def test_folders_are_recursed_skipping_hidden_and_vcs(notes):
    (notes / "sub").mkdir()
    (notes / "sub" / "deep.txt").write_text("{XeF2: bent}\n", encoding="utf-8")
    for skipped in (".git", ".hidden"):
        (notes / skipped).mkdir()
        (notes / skipped / "x.md").write_text("{XeF2: bent}\n", encoding="utf-8")
    (notes / "image.png").write_bytes(b"\x89PNG")
    result = run_notelsp("check", "--format", "json", str(notes))
    paths = sorted(f["path"].replace("\\", "/").rsplit("/", 2)[-1] for f in json.loads(result.stdout)["files"])
    assert paths == ["deep.txt", "fine.md", "wrong.md"]


def test_json_report_shape_and_code_point_columns(tmp_path):
    note = tmp_path / "u.md"
    note.write_text("🧪 Ünïcode {ClF3: trigonal planar}\n", encoding="utf-8")
    result = run_notelsp("check", "--format", "json", str(note))
    assert result.returncode == 1
    report = json.loads(result.stdout)
    (entry,) = report["files"]
    finding = next(f for f in entry["findings"] if f["code"] == "wrong-shape")
    assert set(finding) >= {"line", "column", "end_line", "end_column", "severity", "code", "message", "formula", "claim", "fixes"}
    # columns count code points: the emoji is one column
    assert finding["column"] == len("🧪 Ünïcode {ClF3: ") + 1
    assert finding["end_column"] == finding["column"] + len("trigonal planar")
    assert finding["formula"] == "ClF3" and finding["claim"] == "trigonal planar"
    assert {"title", "replacement"} <= set(finding["fixes"][0])
    assert finding["fixes"][0]["replacement"] == "T-shaped"


def test_settings_file_disables_a_rule_and_reports_bad_values(notes):
    (notes / ".notelsp.toml").write_text('[review]\ndisabled = ["wrong-shape"]\nangle_tolerance = "wide"\n', encoding="utf-8")
    result = run_notelsp("check", str(notes / "wrong.md"))
    assert "wrong-shape" not in result.stdout
    assert "angle_tolerance" in result.stderr and "Traceback" not in result.stderr


def test_demo_runs_and_exits_0():
    result = run_notelsp("demo")
    assert result.returncode == 0, result.stderr
    assert "notebook.md" in result.stdout and "error[" in result.stdout
    assert "safety data sheet" in result.stdout


ODD_NAME = b"odd\xffname\nx.md"  # a byte that is not UTF-8, and a newline: both allowed in POSIX file names


def _strict_run(*args: str, cwd) -> subprocess.CompletedProcess:
    """The command with a strict UTF-8 output stream: anything not valid UTF-8 would fail it."""
    environment = {**os.environ, "PYTHONIOENCODING": "utf-8:strict"}
    return subprocess.run([sys.executable, "-m", "notelsp", *args], capture_output=True, cwd=cwd, env=environment,
                          timeout=120)


@pytest.fixture
def odd_note(tmp_path):
    if sys.platform in ("win32", "darwin"):
        pytest.skip("this file system does not keep a name of arbitrary bytes")
    (tmp_path / os.fsdecode(ODD_NAME)).write_text("{XeF2: bent} {ClF3: trigonal planar}\n", encoding="utf-8")
    return tmp_path


def test_odd_file_name_gives_valid_utf8_one_line_per_finding(odd_note):
    result = _strict_run("check", ".", cwd=odd_note)
    assert result.returncode == 1, result.stderr
    text = result.stdout.decode("utf-8")  # strict: raises if any byte is not UTF-8
    findings = [line for line in text.splitlines() if LINE.match(line)]
    assert len(findings) == 2  # two findings, two lines: the newline in the name did not split one
    assert all(line.removeprefix("./").startswith("odd\\xffname\\nx.md:1:") for line in findings), findings


def test_odd_file_name_in_json_is_escaped_and_valid(odd_note):
    result = _strict_run("check", "--format", "json", ".", cwd=odd_note)
    report = json.loads(result.stdout.decode("utf-8"))
    (entry,) = report["files"]
    # the undecodable byte as text; the newline is a JSON escape, as any control character is
    assert entry["path"].removeprefix("./") == "odd\\xffname\nx.md"
    assert result.stdout.count(b"\n") == 1
    assert len(entry["findings"]) == 2


def test_control_characters_in_a_claim_are_escaped_for_the_terminal(tmp_path):
    # An ESC sequence (ECMA-48 CSI "ESC [ 2 J" clears the screen) written inside a claim.
    (tmp_path / "esc.md").write_text("{XeF2: \x1b[2Jbent}\n", encoding="utf-8")
    result = run_notelsp("check", str(tmp_path / "esc.md"))
    assert "\x1b" not in result.stdout and "\x1b" not in result.stderr
    assert "\\x1b" in result.stdout, result.stdout
