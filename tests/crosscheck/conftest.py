"""Shared fixtures for the cross-check tests: a private disk cache per test."""

from __future__ import annotations

import pytest


@pytest.fixture(autouse=True)
def private_cache(tmp_path, monkeypatch):
    """Every test gets an empty cache folder, so results never leak between tests."""
    folder = tmp_path / "cache"
    monkeypatch.setenv("NOTELSP_CACHE_DIR", str(folder))
    return folder


@pytest.fixture
def without_qc_extra(monkeypatch):
    """Make pyscf look uninstalled in this process (an entry of None blocks the import)."""
    import sys

    monkeypatch.setitem(sys.modules, "pyscf", None)
