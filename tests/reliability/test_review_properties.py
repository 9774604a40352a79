"""review_text over arbitrary and near-miss text: nothing raises, every range lies inside
the document (as offsets and as LSP positions), and the result is deterministic."""

from __future__ import annotations

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from notelsp.review.document import review_text
from notelsp.server.positions import UTF8, UTF16, line_index, units_of

from .afresh import clear_memoised_parses
from .scale import scaled, tried

# Pieces that sit close to real annotations, so generated text often nearly parses
# (common practice, no source: chosen from the README's notation tables).
NEAR_MISSES = [
    "{", "}", "{{", "}}", "[", "]", "(", ")", ":", ";", ",", "@", " vs ", "^", "+", "-", "2-", "^2-",
    "ClF3", "SF4", "PCl3F2", "XeF4", "NH₄⁺", "SO₄²⁻", "Si(OH)4", "HOCl @O", "[ICl4]-", "C2F6 vs C2H6",
    "t-shaped", "trigonal planar", "seesaw", "sp3", "sp³d", "sp^2.4", "F axial", "lone pairs equatorial",
    "polar", "nonpolar", "C2v", "D3h", "2 isomers", "H-N-H 107°", "F-C-F < H-C-H", "i = 1.41",
    "s-character 25%", "one lone pair", "C-C shorter", "~90°", "104-106°",
    "`", "```", "```bonding\n", "\n```\n", "$", "$$", "<b>", "](", "#", "\\frac", "_", "\n", "\r\n", "\r",
    "\u0301", "\N{TEST TUBE}", "氟", "₃", "⁻", "\x00", "\ufeff", "\u200b", "\ud7ff",
]
near_miss_text = st.lists(st.one_of(st.sampled_from(NEAR_MISSES), st.text(max_size=6)), max_size=40).map("".join)
any_text = st.one_of(st.text(max_size=400), near_miss_text)
kinds = st.sampled_from(["markdown", "text"])
SETTINGS = settings(max_examples=scaled(150, 3000), deadline=None, suppress_health_check=[HealthCheck.too_slow])


def _assert_inside(text: str, review) -> None:
    length = len(text)
    for finding in review.findings:
        assert 0 <= finding.span.start <= finding.span.end <= length, finding
        for fix in finding.fixes:
            assert 0 <= fix.span.start <= fix.span.end <= length, fix
    for annotation in review.annotations:
        assert 0 <= annotation.span.start <= annotation.span.end <= length, annotation
    independent = length <= 20_000  # the unit count below is quadratic: only on short texts
    for encoding in (UTF16, UTF8):
        index = line_index(text, encoding)
        for finding in review.findings:
            for position in (index.position(finding.span.start), index.position(finding.span.end)):
                assert 0 <= position.line < len(index.starts)
                if independent:
                    start = index.starts[position.line]
                    line_units = sum(units_of(c, encoding) for c in text[start : index._line_end(position.line)])
                    assert 0 <= position.character <= line_units
            # the LSP range maps back to the same offsets (no finding ends inside a line break)
            assert index.span(index.range(finding.span)) == finding.span


def _fresh_review(text: str, kind: str):
    clear_memoised_parses()  # and no host's memory: this really is a review from scratch
    return review_text(text, kind)


@SETTINGS
@given(any_text, kinds)
def test_review_of_any_text_stays_inside_and_repeats(text, kind):
    tried("notes reviewed (arbitrary and near-miss text)")
    first = review_text(text, kind)
    _assert_inside(text, first)
    assert _fresh_review(text, kind).findings == first.findings


@settings(max_examples=scaled(40, 600), deadline=None)
@given(st.integers(min_value=1, max_value=scaled(3_000, 50_000)), st.sampled_from(["{", "(", "[", "{(", "(("]), kinds)
def test_deep_nesting(depth, opener, kind):
    closer = opener[::-1].translate(str.maketrans("{([", "})]"))
    text = f"start {opener * depth}SF4: seesaw{closer * depth} end {{PCl3{'(' * depth}F)2: F axial}}"
    tried("notes reviewed (deep nesting)")
    _assert_inside(text, review_text(text, kind))


@settings(max_examples=scaled(60, 1000), deadline=None)
@given(st.integers(min_value=0, max_value=10**40), st.integers(min_value=0, max_value=10**40), kinds)
def test_huge_counts_and_charges(count, charge, kind):
    text = (f"{{Xe{count}F2: linear}} {{SO4^{charge}-: tetrahedral}} {{NH4 {charge}+}} "
            f"{{NH3: H-N-H {count}°, {count} lone pairs, {count} isomers, i = {count}.{charge}}}")
    tried("notes reviewed (huge counts and charges)")
    review = review_text(text, kind)
    _assert_inside(text, review)
    if count > 99:  # the notation's limit: reported, never analysed
        assert any(f.code == "formula-too-large" for f in review.findings)


def test_megabyte_single_lines():
    unit = "x {ClF3: trigonal planar} {{a, b}} {NH3: H-N-H 1",
    line = ("".join(unit) * (1_000_000 // len(unit[0]) + 1))[:1_000_000]
    for text, kind in ((line, "markdown"), (line, "text"), ("{" * 1_000_000, "markdown"),
                       ("{ClF3:" + " t-shaped" * 110_000 + "}", "markdown"), ("é\u0301" * 500_000, "text")):
        tried("notes reviewed (1 MB single lines)")
        review = review_text(text, kind)
        _assert_inside(text, review)
    assert any(f.code == "wrong-shape" for f in review_text(line, "markdown").findings)
