"""Package discovery; everything else about the build is in pyproject.toml.

Every package below notelsp/ is found, never listed, so a new subpackage ships
without anyone remembering to add it. The notation grammar lives at the top
level in grammar/ and ships as ``notelsp.grammar`` (``package-dir`` in
pyproject.toml); no finder discovers a package outside its folder, so that one
is named here. tests/test_packaging.py checks that the wheel holds every file.
"""

from pathlib import Path

from setuptools import find_packages, setup

HERE = Path(__file__).resolve().parent

setup(packages=[*find_packages(where=str(HERE), include=["notelsp", "notelsp.*"]), "notelsp.grammar"])
