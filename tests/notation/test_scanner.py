"""The scanner: which brace groups are annotations, bonding blocks, text mode, exact offsets, caching."""

import pytest

from notelsp.notation import scan
from notelsp.notation.markdown import markdown_structure
from notelsp.notation.model import PlacementClaim, ShapeClaim
from notelsp.notation.transform import parse_body


def written(text, span):
    return text[span.start : span.end]


def groups(text, kind="markdown"):
    return [written(text, a.span) for a in scan(text, kind).annotations]


def test_inline_annotation_offsets_are_exact():
    text = "ClF3 first: {ClF3: t-shaped, lone pairs equatorial} then {PH3: sp3}."
    first, second = scan(text, "markdown").annotations
    assert written(text, first.span) == "{ClF3: t-shaped, lone pairs equatorial}"
    assert written(text, first.body) == "ClF3: t-shaped, lone pairs equatorial"
    assert written(text, first.formula.span) == "ClF3"
    assert [written(text, c.span) for c in first.claims] == ["t-shaped", "lone pairs equatorial"]
    assert isinstance(first.claims[0], ShapeClaim) and isinstance(first.claims[1], PlacementClaim)
    assert written(text, second.claims[0].span) == "sp3"
    assert first.form == "inline"


def test_unicode_before_an_annotation_keeps_code_point_offsets():
    text = "Δ≈ 𝛼 — {SO₄²⁻: tetrahedral} ✓"
    (annotation,) = scan(text, "markdown").annotations
    assert written(text, annotation.formula.span) == "SO₄²⁻"
    assert written(text, annotation.claims[0].span) == "tetrahedral"


def test_hover_only_and_comparison():
    text = "{ClF3} and {C2H6 vs C2H4: C-C longer}"
    hover, comparison = scan(text, "text").annotations
    assert hover.claims == () and hover.formula.text == "ClF3"
    assert comparison.is_comparison and [f.text for f in comparison.formulas] == ["C2H6", "C2H4"]


@pytest.mark.parametrize(
    "text",
    ["{a, b}", '{"k": 1}', r"\frac{a}{b}", "{#id .class}", "x^{2}", "{Hello}", "{Total}", "{X: y}", "{1: 2}", "{ }"],
)
@pytest.mark.parametrize("kind", ["markdown", "text"])
def test_other_brace_groups_are_left_alone(text, kind):
    document = scan(text, kind)
    assert document.annotations == ()


def test_errors_inside_an_annotation_have_exact_ranges():
    text = "see {CL3: tetrahedrel; flourine axial}"
    (annotation,) = scan(text, "markdown").annotations
    assert [(e.code, written(text, e.span)) for e in annotation.errors] == [
        ("unknown-element", "CL"),
        ("unknown-claim", "tetrahedrel"),
        ("unknown-element", "flourine"),
    ]


def test_bonding_block_lines_with_comments():
    text = "Intro\n\n```bonding\n# shapes I expect\nNH3: trigonal pyramidal  # from class notes\n\nH2O: bent, sp3\nClF3\n```\n"
    annotations = scan(text, "markdown").annotations
    assert [a.form for a in annotations] == ["block"] * 3
    assert [written(text, a.body) for a in annotations] == ["NH3: trigonal pyramidal", "H2O: bent, sp3", "ClF3"]
    assert written(text, annotations[0].span) == "NH3: trigonal pyramidal  # from class notes"
    assert written(text, annotations[1].claims[1].span) == "sp3"


def test_every_line_of_a_bonding_block_is_an_annotation():
    text = "~~~bonding\nnot a formula: x\n~~~\n"
    (annotation,) = scan(text, "markdown").annotations
    assert annotation.errors and annotation.errors[0].code == "malformed-formula"


def test_text_mode_has_no_markdown_structure():
    text = "`{NH3: bent}` and $x {SF4: seesaw}$\n```bonding\nH2O: bent\n```\n"
    assert groups(text, "text") == ["{NH3: bent}", "{SF4: seesaw}"]
    assert groups(text, "markdown") == ["H2O: bent"]


def test_crlf_documents_keep_offsets():
    text = "a\r\nb {CH4: tetrahedral}\r\n\r\n```bonding\r\nNH3: bent\r\n```\r\n"
    assert groups(text) == ["{CH4: tetrahedral}", "NH3: bent"]


def test_annotation_body_bound():
    text = "{ClF3: " + "bent, " * 400 + "}"
    (annotation,) = scan(text, "text").annotations
    assert [e.code for e in annotation.errors] == ["formula-too-large"]
    assert annotation.errors[0].span.end <= annotation.body.end


def test_a_megabyte_line_is_scanned_without_parsing_it():
    text = "{ClF3: " + "x" * 1_000_000 + "}"
    (annotation,) = scan(text, "text").annotations
    assert annotation.errors[0].code == "formula-too-large"


def test_rescan_after_an_edit_reparses_only_the_changed_annotation():
    lines = [f"Line {n}: {{PCl{n % 5 + 1}F{n % 3 + 1}: trigonal bipyramidal, F axial}}" for n in range(40)]
    text = "\n\n".join(lines)
    scan(text, "markdown")
    before = parse_body.cache_info()
    edited = text.replace("Line 7: {PCl3F2: trigonal bipyramidal", "Line 7: {PCl3F2: seesaw")
    document = scan(edited, "markdown")
    after = parse_body.cache_info()
    assert after.misses - before.misses == 1
    assert len(document.annotations) == 40
    changed = document.annotations[7]
    assert written(edited, changed.claims[0].span) == "seesaw"


def test_no_annotation_spans_two_lines_of_a_paragraph():
    text = "Opened {ClF3:\nt-shaped} here, then {PH3: sp3}\nand {XeF4\n} again {SF4: seesaw}.\n"
    assert groups(text) == ["{PH3: sp3}", "{SF4: seesaw}"]


def test_a_long_paragraph_is_scanned_in_pieces_with_nothing_lost():
    # Past 2,048 characters a paragraph is split between lines.  Here every other line break
    # lies inside a code span, and a code span cut by a split still hides both its halves.
    pairs = [(f"Run {n} {{ClF3: t-shaped}} then `{{SF4: linear}}", "{XeF4: tetrahedral}` and {BF3: sp2}.") for n in range(80)]
    text = "\n".join(line for pair in pairs for line in pair) + "\n"
    segments = markdown_structure(text).segments
    assert len(segments) > 1
    assert any(s.skips and s.skips[-1][1] == len(s.text) for s in segments[:-1])  # a split inside a span
    assert groups(text) == ["{ClF3: t-shaped}", "{BF3: sp2}"] * 80
