"""Which files are notes, and which ``files`` patterns select them (shared by the command line and the server)."""

import fnmatch

import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

from notelsp.review.document import kind_of_path
from notelsp.review.settings import Settings
from notelsp.review.workspace import NOTE_KINDS, glob_matches, is_hidden, is_reviewed, is_selected, note_kind


def test_default_settings_take_every_note_type_at_any_depth():
    settings = Settings()
    for path in ("notes.md", "lab/2024/week1.markdown", "lab/plain.txt", "q/report.qmd", "r/analysis.Rmd",
                 "site/page.mdx", "UPPER.MD"):
        assert is_reviewed(path, settings), path


def test_note_kinds_by_suffix():
    # Quarto, R Markdown and MDX files are Markdown with extras (common practice, no source)
    assert [note_kind(p) for p in ("a.md", "a.markdown", "a.qmd", "a.Rmd", "a.rmd", "a.mdx")] == ["markdown"] * 6
    assert note_kind("a.txt") == "text" and note_kind("dir.x/a.TXT") == "text"
    assert note_kind("run.ipynb") == "notebook"
    assert [note_kind(p) for p in ("a.py", "a.csv", "README.rst", ".md", "md", "a.md/b")] == [None] * 6


def test_the_review_reads_each_note_kind_as_its_kind():
    for suffix, kind in NOTE_KINDS.items():
        if kind != "notebook":  # a notebook's cells are read as Markdown, one by one
            assert kind_of_path("x" + suffix) == kind_of_path("x" + suffix.upper()) == kind, suffix


def test_unknown_file_types_and_notebooks_are_not_reviewed_as_open_documents():
    settings = Settings()
    assert not is_reviewed("analysis.py", settings)
    assert not is_reviewed("data/results.csv", settings)
    assert not is_reviewed("README.rst", settings)
    assert not is_reviewed("run.ipynb", settings)  # JSON; only its Markdown cells are notes


def test_hidden_and_version_control_folders_are_not_reviewed():
    settings = Settings()
    assert is_hidden(".git/notes.md") and not is_reviewed(".git/notes.md", settings)
    assert not is_reviewed("lab/.drafts/a.md", settings) and not is_reviewed("node_modules/x/a.md", settings)
    assert not is_reviewed(".a.md", settings)
    assert not is_hidden("lab/a.md") and not is_hidden("CVS")  # a file called CVS is not a folder


def test_files_globs_narrow_the_selection():
    settings = Settings(globs=("lab/**/*.md",))
    assert is_reviewed("lab/a.md", settings)
    assert is_reviewed("lab/x/y/b.md", settings)
    assert not is_reviewed("other/a.md", settings)
    assert not is_reviewed("lab/a.txt", settings)


# The pattern format of gitignore(5), "PATTERN FORMAT" (git-scm.com/docs/gitignore): its own examples.
GITIGNORE_EXAMPLES = [
    ("*.md", "a.md", True), ("*.md", "x/y/a.md", True),  # no slash: any depth
    ("doc/frotz/", "doc/frotz/a.md", True), ("doc/frotz/", "a/doc/frotz/b.md", False),  # anchored
    ("frotz/", "frotz/a.md", True), ("frotz/", "a/frotz/b.md", True), ("frotz/", "frotz", False),  # folders only
    ("/bar", "bar", True), ("/bar", "a/bar", False),
    ("**/foo", "foo", True), ("**/foo", "a/b/foo", True),
    ("**/foo/bar", "x/foo/bar", True), ("**/foo/bar", "foo/bar", True),
    ("abc/**", "abc/x/y.md", True), ("abc/**", "abc", False),
    ("a/**/b", "a/b", True), ("a/**/b", "a/x/b", True), ("a/**/b", "a/x/y/b", True), ("a/**/b", "a/xb", False),
    ("foo/*", "foo/test.json", True), ("foo/*", "foo/bar/hello.c", True),  # the folder foo/bar is matched
    ("2026-q*/**/*.md", "2026-q1/a/b.md", True), ("2026-q*/**/*.md", "2026-q1/b.md", True),
    ("2026-q*/**/*.md", "x/2026-q1/b.md", False),
    ("week?.md", "week1.md", True), ("week?.md", "week12.md", False), ("a?b", "a/b", False),
    ("run[0-9].md", "run7.md", True), ("run[!0-9].md", "run7.md", False), ("run[!0-9].md", "runx.md", True),
]


@pytest.mark.parametrize("pattern, path, expected", GITIGNORE_EXAMPLES)
def test_patterns_follow_the_gitignore_format(pattern, path, expected):
    assert glob_matches(pattern, path) is expected


def test_a_pattern_of_only_slashes_matches_nothing():
    assert not glob_matches("/", "a.md") and not is_selected("a.md", ("//",))


def test_many_globstars_against_a_deep_path_are_answered():
    # A backtracking matcher tries every way of sharing 24 folders among 12 "**/" (about 10^9);
    # the automaton looks at each (pattern step, path character) pair once.
    pattern = "**/" * 12 + "x.md"
    deep = "/".join(["d"] * 24)
    assert glob_matches(pattern, deep + "/x.md")
    assert not glob_matches(pattern, deep + "/y.md")
    assert not glob_matches("**/" * 40 + "a/" * 30 + "x.md", "a/" * 29 + "x.md")


def reference_match(pattern: str, path: str) -> bool:
    """The same rules written plainly: segments, fnmatch within a segment, recursion for "**"."""
    folders_only = pattern.endswith("/")
    pattern = pattern.rstrip("/")
    pattern = pattern.lstrip("/") if "/" in pattern else "**/" + pattern
    if not pattern:
        return False
    wanted = pattern.split("/")
    parts = path.split("/")

    def matches(pi: int, si: int, names: list[str]) -> bool:
        if pi == len(wanted):
            return si == len(names)
        if wanted[pi] == "**":
            if pi == len(wanted) - 1:  # a final "**": one or more names
                return si < len(names)
            return any(matches(pi + 1, k, names) for k in range(si, len(names) + 1))
        return si < len(names) and fnmatch.fnmatchcase(names[si], wanted[pi]) and matches(pi + 1, si + 1, names)

    lengths = range(1, len(parts)) if folders_only else range(1, len(parts) + 1)
    return any(matches(0, 0, parts[:length]) for length in lengths)


_PATTERN = st.text(alphabet="ab.*?/[]!-", max_size=12)
_PATH = st.lists(st.text(alphabet="ab.-[]!", min_size=1, max_size=4), min_size=1, max_size=5).map("/".join)


@settings(max_examples=1000, deadline=None)
@given(_PATTERN, _PATH)
@example("**/a", "a")
@example("a/**", "a")
@example("**", "a/b")
@example("[!]a]", "b")
@example("*/", "a")
@example("[a/]b", "[a/]b")
def test_the_matcher_agrees_with_the_plain_rules(pattern, path):
    assert glob_matches(pattern, path) is reference_match(pattern, path)
