"""Reading ``.notelsp.toml``: every problem named with its line and key; hostile files refused before tomllib."""

import json
import tomllib

from hypothesis import given, settings
from hypothesis import strategies as st

from notelsp.review.findings import Severity
from notelsp.review.settings import MAX_NESTING, MAX_SETTINGS_CHARS, Settings, settings_from_mapping, settings_from_toml

GOOD = """\
[review]
angle_tolerance = 3
disabled = ["outside-model"]
files = ["lab/**/*.md"]

[review.severity]
implausible-angle = "error"
"""


def test_a_good_file_is_read_without_problems():
    values, problems = settings_from_toml(GOOD)
    assert problems == []
    assert values.angle_tolerance == 3.0 and values.globs == ("lab/**/*.md",)
    assert values.disabled == frozenset({"outside-model"})
    assert dict(values.severities) == {"implausible-angle": Severity.ERROR}


def test_a_leading_byte_order_mark_is_accepted():
    # Some Windows editors start UTF-8 files with U+FEFF (Unicode Standard, section 23.8; common practice)
    values, problems = settings_from_toml("\ufeff" + GOOD)
    assert problems == [] and values.angle_tolerance == 3.0


def test_a_bad_value_is_named_with_its_line_and_key():
    text = '# team settings\n\n[review]\nangle_tolerance = "five"\ninlay_hints = true\n'
    values, (problem,) = settings_from_toml(text)
    assert problem.line == 4
    assert problem.located(".notelsp.toml") == (
        '.notelsp.toml:4: review.angle_tolerance must be a number of degrees from 0 to 45, not "five"')
    assert values.angle_tolerance == Settings().angle_tolerance  # the default stays in what is returned


def test_keys_written_as_tables_dotted_keys_and_inline_tables_are_all_found():
    text = ('[review]\nseverity.wrong-shape = "fatal"\n'
            'files = []\n'
            '[extra]\n')
    _, problems = settings_from_toml(text)
    by_line = {p.line: str(p) for p in problems}
    assert set(by_line) == {2, 3, 4}, problems
    assert "wrong-shape" in by_line[2] and "files" in by_line[3]
    assert "unknown table or key 'extra'" in by_line[4]
    _, (table,) = settings_from_toml('[review]\n[review.severity]\n"implausible-angle" = "loud"\n')
    assert table.line == 3 and "implausible-angle" in table
    _, (inline,) = settings_from_toml('[review]\n\nseverity = { wrong-shape = "fatal" }\n')
    assert inline.line == 3


def test_unknown_keys_in_review_are_named():
    _, (problem,) = settings_from_toml("[review]\nangle_tolerence = 3\n")
    assert problem.line == 2 and "unknown setting 'angle_tolerence' in [review]" in problem


def test_invalid_toml_gives_the_line_tomllib_reports():
    _, (problem,) = settings_from_toml('[review]\nangle_tolerance = 3\nfiles = ["a"\n')
    assert problem.line is not None and problem.line >= 3
    assert "not valid TOML" in problem and "(at line" not in problem


def test_deeply_nested_arrays_are_refused_before_tomllib():
    # 500 nested arrays in about 1 KB: tomllib recurses once per level (CPython 3.11 recursion limit 1000)
    text = "[review]\nfiles = " + "[" * 500 + "]" * 500 + "\n"
    values, (problem,) = settings_from_toml(text)
    assert problem.line == 2 and f"nested more than {MAX_NESTING} deep" in problem
    assert values == Settings()


def test_deeply_nested_inline_tables_are_refused_before_tomllib():
    text = "[review]\nx = " + "{a = " * 331 + "1" + "}" * 331 + "\n"
    _, (problem,) = settings_from_toml(text)
    assert problem.line == 2 and "nested" in problem


def test_brackets_inside_strings_and_comments_are_not_nesting():
    text = ('[review]\n# [[[[[[[[[[[[[[[[[[[[[[[[[[\n'
            'files = ["[[[[[[[[[[[[[[[[[[[[a].md", \'{{{{{{{{{{{{{{{{{{{\', """\n[[[[[[[[[[[[[[[[[[[[[\\"""]"""]\n')
    values, problems = settings_from_toml(text)
    assert problems == [], problems
    assert len(values.globs) == 3


def test_an_oversized_file_is_refused():
    values, (problem,) = settings_from_toml("[review]\n" + "# padding\n" * (MAX_SETTINGS_CHARS // 10 + 1))
    assert "larger than" in problem and values == Settings()


def test_editor_values_are_still_read_from_a_mapping():
    values, problems = settings_from_mapping({"angle_tolerance": 2, "inlay_hints": "no"})
    assert values.angle_tolerance == 2.0
    assert problems == ['inlay_hints must be true or false, not "no"']


def test_a_deep_editor_value_is_shown_shortened():
    deep: list = []
    for _ in range(2_000):
        deep = [deep]
    _, (problem,) = settings_from_mapping({"files": deep})
    assert problem.startswith("files must be a non-empty list of glob patterns") and len(problem) < 200


def _toml_string(leaf: str, form: str) -> str:
    # json.dumps writes a string TOML reads the same way (TOML 1.0 basic strings take JSON's escapes)
    if form == "literal" and "'" not in leaf and "\n" not in leaf:
        return f"'{leaf}'"
    if form == "multi-line literal" and "\'\'\'" not in leaf and not leaf.endswith("'"):
        return f"\'\'\'{leaf}\'\'\'"
    if form == "multi-line basic":
        return '"""' + json.dumps(leaf)[1:-1] + '"""'
    return json.dumps(leaf)


@settings(max_examples=300, deadline=None)
@given(st.integers(min_value=1, max_value=40), st.text(alphabet="ab[]{}'\"\\#\n=", max_size=12),
       st.sampled_from(["basic", "literal", "multi-line literal", "multi-line basic"]))
def test_the_depth_limit_matches_what_tomllib_reads(depth, leaf, form):
    text = f"[review]\nx = {'[' * depth}{_toml_string(leaf, form)}{']' * depth}\n"
    assert tomllib.loads(text)["review"]["x"] is not None  # the reference reads it
    _, problems = settings_from_toml(text)
    too_deep = [p for p in problems if "nested more than" in p]
    assert bool(too_deep) is (depth > MAX_NESTING)  # the strings, whatever they hold, are not counted
