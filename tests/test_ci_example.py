"""The commit and CI examples in docs/ci.md: read with PyYAML, and the workflow's check command run on a note.

ClF3 claimed trigonal planar is a wrong-shape error (VSEPR: t-shaped, from memory).
"""

from __future__ import annotations

import json
import os
import re
import subprocess
import sys
from pathlib import Path

import yaml

ROOT = Path(__file__).resolve().parents[1]
DOC = ROOT / "docs" / "ci.md"


def yaml_blocks() -> list:
    text = DOC.read_text(encoding="utf-8")
    return [yaml.safe_load(block) for block in re.findall(r"```yaml\n(.*?)```", text, flags=re.S)]


def workflow() -> dict:
    (found,) = [block for block in yaml_blocks() if "jobs" in block]
    return found


def test_pre_commit_example_names_the_hook_this_repository_defines():
    hooks = yaml.safe_load((ROOT / ".pre-commit-hooks.yaml").read_text(encoding="utf-8"))
    (config,) = [block for block in yaml_blocks() if "repos" in block]
    assert {hook["id"] for repo in config["repos"] for hook in repo["hooks"]} <= {hook["id"] for hook in hooks}


def test_workflow_uploads_what_its_check_writes(tmp_path):
    steps = [step for job in workflow()["jobs"].values() for step in job["steps"]]
    (check,) = [step for step in steps if step.get("run", "").startswith("notelsp check")]
    (upload,) = [step for step in steps if step.get("uses", "").startswith("github/codeql-action/upload-sarif")]
    assert check["run"].endswith(f"> {upload['with']['sarif_file']}")
    assert workflow()["permissions"]["security-events"] == "write"  # upload-sarif needs it (common practice, no source)

    (tmp_path / "notes").mkdir()
    (tmp_path / "notes" / "run7.md").write_text("# Run 7\n\nChlorine trifluoride {ClF3: trigonal planar}.\n")
    env = dict(os.environ, PATH=f"{Path(sys.executable).parent}{os.pathsep}{os.environ.get('PATH', '')}")
    result = subprocess.run(check["run"], shell=True, cwd=tmp_path, env=env, capture_output=True, text=True,
                            timeout=300, check=False)
    assert result.returncode == 1, result.stderr  # an error-level finding fails the step
    log = json.loads((tmp_path / upload["with"]["sarif_file"]).read_text(encoding="utf-8"))
    assert log["version"] == "2.1.0"
    assert [r["ruleId"] for r in log["runs"][0]["results"]] == ["wrong-shape"]
