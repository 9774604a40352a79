"""The review page in a real browser: headless Chromium (Debian's package) loads it offline.

It must run its script with no console error, show every drawing, and render something
(a screenshot that is not blank).  With NOTELSP_SCREENSHOT set, the screenshot is kept
there (README's picture is taken this way).  Skips, saying why, without Chromium.
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

pytestmark = pytest.mark.client

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync"]


@pytest.fixture(scope="module")
def page(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("report")
    target = folder / "review.html"
    demo = Path(__file__).resolve().parents[2] / "notelsp" / "demo"
    result = subprocess.run([sys.executable, "-m", "notelsp", "report", ".", "-o", str(target)],
                            cwd=demo, capture_output=True, text=True, timeout=120)  # short relative paths
    assert result.returncode in (0, 1), result.stderr  # 1: the demo notes hold findings on purpose
    return target


def _chromium(tmp_path: Path, *arguments: str) -> subprocess.CompletedProcess:
    if CHROMIUM is None:
        pytest.skip("Chromium is not installed (make test installs Debian's chromium when it can)")
    profile = tmp_path / "profile"
    return subprocess.run([CHROMIUM, *FLAGS, f"--user-data-dir={profile}", *arguments], capture_output=True,
                          text=True, timeout=120)


def test_page_runs_its_script_without_console_errors_and_keeps_every_drawing(page, tmp_path):
    result = _chromium(tmp_path, "--enable-logging=stderr", "--v=0", "--dump-dom", page.as_uri())
    assert 'data-drawings-ready="yes"' in result.stdout, result.stderr[-2000:]
    console = [line for line in result.stderr.splitlines() if "CONSOLE" in line or "Uncaught" in line]
    assert not console, console
    drawn_in_file = len(re.findall(r"<svg ", page.read_text(encoding="utf-8")))
    assert drawn_in_file > 0 and result.stdout.count("<svg ") == drawn_in_file


# A short note of a fictional lab, so that the drawings fit the picture README shows
BENCH_NOTE = """# Halide bench, week 12

Fluorination runs: {PCl3F2: F axial, F-P-F 180°}, {ClF3: T-shaped, F-Cl-F 87.5°},
{SF4: seesaw, lone pair equatorial}, {XeF4: square planar} and the amine {NH3: H-N-H 107°}.
"""


def test_screenshot_is_not_blank(tmp_path):
    from PIL import Image

    note = tmp_path / "week12.md"
    note.write_text(BENCH_NOTE, encoding="utf-8")
    page = tmp_path / "week12.html"
    subprocess.run([sys.executable, "-m", "notelsp", "report", note.name, "-o", str(page)], cwd=tmp_path,
                   capture_output=True, text=True, timeout=120, check=True)
    shot = tmp_path / "review.png"
    result = _chromium(tmp_path, "--window-size=1000,1800", "--hide-scrollbars", f"--screenshot={shot}", page.as_uri())
    assert shot.exists(), result.stderr[-2000:]
    image = Image.open(shot).convert("RGB")
    colours = image.getcolors(maxcolors=1_000_000) or []
    assert len(colours) > 50  # text, palette discs and lobes, not a blank page
    keep = os.environ.get("NOTELSP_SCREENSHOT")
    if keep:
        small = image.crop((0, 0, 1000, 1800)).resize((600, 1080))
        small.quantize(colors=255).save(keep, optimize=True)  # a small picture for the README
