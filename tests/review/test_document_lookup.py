"""Looking up annotations and findings by position agrees with a plain scan of every one."""

from hypothesis import given, settings
from hypothesis import strategies as st

from notelsp.notation.model import Span
from notelsp.review.document import review_text

# Annotations right and wrong, touching and apart (common practice, no source).
PIECES = ["{ClF3: trigonal planar}", "{H2O: bent}", "{NH3: H-N-H 120°}", "{XeF4: tetrahedral}", " ", "x", "\n", "{SF4}"]


@settings(max_examples=40, deadline=None)
@given(st.lists(st.sampled_from(PIECES), min_size=1, max_size=12))
def test_lookups_match_a_scan_of_every_annotation_and_finding(pieces):
    text = "".join(pieces)
    review = review_text(text, "markdown")
    for offset in range(len(text) + 1):
        expected = next((a for a in review.annotations if a.span.start <= offset <= a.span.end), None)
        assert review.annotation_at(offset) is expected
    for start in range(len(text) + 1):
        for end in (start, min(start + 3, len(text))):
            span = Span(start, end)
            expected = tuple(f for f in review.findings if f.span.start <= span.end and span.start <= f.span.end)
            assert review.findings_in(span) == expected

