"""Package versions read without importlib.metadata agree with importlib.metadata."""

from __future__ import annotations

from importlib import metadata

import pytest

from notelsp.compute import species_cache
from notelsp.compute.method import installed_version, versions


@pytest.mark.parametrize("package", ["tblite", "ase", *species_cache.BUILDERS, "numpy", "markdown-it-py",
                                     "no-such-package-here"])
def test_an_installed_version_is_the_one_importlib_metadata_reads(package):
    try:
        expected = metadata.version(package)
    except metadata.PackageNotFoundError:
        expected = None
    assert installed_version(package) == expected


def test_the_versions_in_every_key_are_those_of_tblite_and_ase():
    assert versions() == (("tblite", metadata.version("tblite")), ("ase", metadata.version("ase")))
