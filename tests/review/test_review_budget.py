"""A review given a time budget stops at a line's start, and what it gives is exactly the start of the
whole review; the budget is a question the caller answers (here a count, in the server a clock)."""

from __future__ import annotations

import pytest

from notelsp.notation.model import Span
from notelsp.review.document import review_around, review_text
from notelsp.review.host import AnalysisHost
from notelsp.review.settings import Settings

# Wrong and right claims, inline and in bonding blocks, several annotations to a line (VSEPR shapes:
# ClF3 T-shaped, SF4 seesaw, XeF4 square planar; common practice, no source).
NOTE = "".join(
    f"Run {n}: {{ClF3: trigonal planar, angle {90 + n}°}} and {{SF4: seesaw}}\n\n"
    f"```bonding\nXeF4: tetrahedral   # run {n}\n```\n\n"
    for n in range(40)
)


def _answers(count: int):
    """A budget that allows ``count`` questions, then says stop."""
    asked = [0]

    def more_time(line_start: int) -> bool:
        asked[0] += 1
        return asked[0] <= count

    return more_time


@pytest.mark.parametrize("allowed", [0, 1, 5, 30])
def test_a_stopped_review_is_the_whole_reviews_beginning_and_says_where_it_stopped(allowed):
    whole = review_text(NOTE)
    part = review_text(NOTE, more_time=_answers(allowed))
    assert part.stopped_at is not None
    assert part.stopped_at == 0 or NOTE[part.stopped_at - 1] == "\n"  # at a line's start
    *reviewed, mark = part.findings
    assert mark.code == "review-continues" and mark.span.start == part.stopped_at
    assert mark.severity.value == "information" and not mark.fixes
    assert reviewed == [f for f in whole.findings if f.span.start < part.stopped_at]
    assert reviewed  # the first line with annotations is always reviewed
    assert all(a.span.end <= part.stopped_at for a in part.annotations)


def test_a_review_with_time_to_spare_is_the_whole_review():
    whole = review_text(NOTE)
    assert review_text(NOTE, more_time=lambda line_start: True) == whole


def test_the_whole_review_after_a_stopped_one_has_no_mark():
    host = AnalysisHost()  # what the stopped review left is reused
    host.review_text(NOTE, more_time=_answers(3))
    whole = host.review_text(NOTE)
    assert whole.stopped_at is None
    assert "review-continues" not in {f.code for f in whole.findings}


def test_a_review_is_never_stopped_between_annotations_of_one_line():
    line = "".join(f"{{ClF3: trigonal planar, angle {90 + n}°}} " for n in range(30)) + "\n"
    part = review_text(line * 3, more_time=_answers(0))
    assert part.stopped_at == len(line)  # the whole first line, then stop
    assert len(part.annotations) == 30


def test_the_review_is_asked_with_each_further_line_start_and_goes_on_while_told_to():
    asked: list[int] = []
    whole = review_text(NOTE, more_time=lambda line_start: asked.append(line_start) or True)
    assert whole.stopped_at is None
    assert asked == sorted(set(asked)) and all(NOTE[start - 1] == "\n" for start in asked)
    # A caller that lets it run to a given line (as the server does past its last stop) gets at least that far.
    middle = asked[len(asked) // 2]
    part = review_text(NOTE, more_time=lambda line_start: line_start <= middle)
    assert part.stopped_at is not None and part.stopped_at > middle


def test_around_a_position_only_the_annotations_there_are_reviewed():
    whole = review_text(NOTE)
    target = whole.annotations[41]  # somewhere in the middle
    settings = Settings()
    near = review_around(NOTE, "markdown", settings, Span(target.span.start + 2, target.span.start + 2))
    assert [a.span for a in near.annotations] == [target.span]
    assert near.findings == tuple(f for f in whole.findings if target.span.start <= f.span.start < target.span.end)
    # With the complete review at hand (in the same memory), that is what is given.
    host = AnalysisHost()
    host.review_text(NOTE, settings=settings)
    assert review_around(NOTE, "markdown", settings, target.span, memory=host.memory).findings == whole.findings
