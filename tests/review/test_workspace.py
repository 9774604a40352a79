"""Which files the server reviews (``files`` globs of .notelsp.toml)."""

from notelsp.review.settings import Settings
from notelsp.review.workspace import is_reviewed


def test_default_globs_take_notes_at_any_depth():
    settings = Settings()
    assert is_reviewed("notes.md", settings)
    assert is_reviewed("lab/2024/week1.markdown", settings)
    assert is_reviewed("lab/plain.txt", settings)


def test_unknown_file_types_are_not_reviewed():
    settings = Settings()
    assert not is_reviewed("analysis.py", settings)
    assert not is_reviewed("data/results.csv", settings)
    assert not is_reviewed("README.rst", settings)


def test_files_globs_narrow_the_selection():
    settings = Settings(globs=("lab/**/*.md",))
    assert is_reviewed("lab/a.md", settings)
    assert is_reviewed("lab/x/y/b.md", settings)
    assert not is_reviewed("other/a.md", settings)
    assert not is_reviewed("lab/a.txt", settings)
