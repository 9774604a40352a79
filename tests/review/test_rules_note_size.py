"""note-too-large: a note beyond the reviewed size is checked up to a line break near the limit and
says so once, at the first line left unchecked; nothing past the cut is reported.

The shapes are the textbook VSEPR results (common practice, no source).
"""

from __future__ import annotations

import pytest

import notelsp.review.rules.notation as notation_rules
from notelsp.review.document import review_text
from notelsp.review.rules import RULES
from notelsp.review.settings import Settings

CODE = "note-too-large"
LINE = "Batch 7 gave {SF4: tetrahedral} as a pale gas.\n"  # one wrong-shape finding per line


@pytest.fixture
def limit_of_500(monkeypatch):
    monkeypatch.setattr(notation_rules, "MAX_REVIEWED_CHARS", 500)


def test_a_note_inside_the_limit_gets_no_diagnostic():
    assert not [f for f in review_text(LINE * 10).findings if f.code == CODE]


def test_a_larger_note_is_reviewed_up_to_a_line_break_and_says_so(limit_of_500):
    note = LINE * 40
    review = review_text(note)
    (finding,) = [f for f in review.findings if f.code == CODE]
    cut = (500 // len(LINE)) * len(LINE)  # the last line break within the limit
    assert finding.span.start == cut and finding.span.end == cut + len(LINE) - 1  # the first unchecked line
    assert finding.severity is RULES[CODE].severity
    assert f"note of {len(note):,} characters: the first {cut:,} were reviewed" in finding.message
    shapes = [f for f in review.findings if f.code == "wrong-shape"]
    assert len(shapes) == 500 // len(LINE)  # every line before the cut, none after
    assert all(f.span.end <= cut for f in shapes)
    assert all(0 <= f.span.start <= f.span.end <= len(note) for f in review.findings)


def test_a_note_of_one_long_line_is_cut_at_the_limit(limit_of_500):
    note = "x" * 2_000
    (finding,) = review_text(note).findings
    assert (finding.code, finding.span.start, finding.span.end) == (CODE, 500, 2_000)


def test_the_rule_can_be_switched_off(limit_of_500):
    settings = Settings(disabled=frozenset({CODE}))
    assert not [f for f in review_text(LINE * 40, settings=settings).findings if f.code == CODE]


def test_the_real_limit_keeps_the_beginning_of_a_several_megabyte_note():
    filler = "Plain prose about the glovebox and the weather, nothing to check here.\n"
    note = LINE + filler * (notation_rules.MAX_REVIEWED_CHARS // len(filler) + 10) + LINE
    codes = [f.code for f in review_text(note).findings]
    assert codes == ["wrong-shape", CODE]  # the first line reviewed, the last (past the cut) not
