"""A non-editable install works from any folder, grammar included."""

import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def test_wheel_carries_the_grammar_and_runs_from_elsewhere(tmp_path):
    wheels = tmp_path / "wheels"
    subprocess.run(
        [sys.executable, "-m", "pip", "wheel", "--no-deps", "--no-build-isolation", "-q", "-w", str(wheels), str(ROOT)],
        check=True,
        capture_output=True,
        timeout=300,
    )
    (wheel,) = wheels.glob("notelsp-*.whl")
    target = tmp_path / "site"
    subprocess.run(
        [sys.executable, "-m", "pip", "install", "--no-deps", "-q", "--target", str(target), str(wheel)],
        check=True,
        capture_output=True,
        timeout=300,
    )
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    probe = (
        "import notelsp, importlib.resources as r;"
        "print(notelsp.__file__);"
        "print(sorted(p.name for p in r.files('notelsp.grammar').iterdir() if p.name.endswith('.lark')));"
        "from notelsp.review.document import review_text;"
        "print([f.code for f in review_text('{ClF3: trigonal planar}', 'markdown').findings])"
    )
    result = subprocess.run(
        [sys.executable, "-c", probe],
        cwd=elsewhere,
        env={"PYTHONPATH": str(target), "PATH": "/usr/bin:/bin"},
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert result.returncode == 0, result.stderr
    module_file, grammars, codes = result.stdout.splitlines()
    assert module_file.startswith(str(target))
    assert "notation.lark" in grammars
    assert "wrong-shape" in codes
