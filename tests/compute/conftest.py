"""Shared fixtures for the computed-geometry tests: a private cache folder and one pool of workers."""

from __future__ import annotations

import pytest

from notelsp.compute import GeometryPool


@pytest.fixture(autouse=True)
def private_cache(tmp_path, monkeypatch):
    """Every test gets an empty cache folder, so results never leak between tests."""
    folder = tmp_path / "xdg-cache"
    monkeypatch.delenv("NOTELSP_CACHE_DIR", raising=False)
    monkeypatch.setenv("XDG_CACHE_HOME", str(folder))
    return folder / "notelsp" / "computed"


@pytest.fixture(scope="session")
def pool():
    """Worker processes shared by the tests (each worker imports tblite once); no cache, so every test computes."""
    with GeometryPool(use_cache=False) as shared:
        yield shared
