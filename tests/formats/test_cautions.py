"""Cautions read from the scanner's parses are the ones the annotations' analyses carry."""

from notelsp.formats import CheckedRun, ReviewedFile
from notelsp.review.document import review_text

# Hazardous (chem/hazards.py: ClF3 and XeF2 listed, As a toxic element, BrF a binary halogen
# fluoride; from memory) and harmless species, repeated, in code (skipped) and in a comparison.
NOTE = """# Fluorides

{ClF3: t-shaped} then {H2O: bent} and {ClF3: t-shaped} again.
{AsH3: trigonal pyramidal} {XeF2: linear} {BrF: linear} {CH4: tetrahedral}
`{HCN: linear}` is code, not an annotation.
{NH3 vs PH3: H-N-H > H-P-H}
"""


def _from_annotations(review) -> list[tuple[str, str]]:
    """The reference: every placed annotation, every analysis, every caution, once each."""
    seen: dict[tuple[str, str], None] = {}
    for annotation in review.annotations:
        for analysis in review.analyses_of(annotation):
            for caution in analysis.cautions:
                seen.setdefault((analysis.formula, caution), None)
    return list(seen)


def test_cautions_from_parses_match_the_annotations():
    review = review_text(NOTE * 3)
    reviewed = ReviewedFile("n.md", review)
    expected = _from_annotations(review)
    assert reviewed.cautions() == expected
    assert [formula for formula, _ in expected] == ["ClF3", "AsH3", "XeF2", "BrF", "NH3", "PH3"]


def test_run_summary_counts_files_once_each():
    files = [ReviewedFile(f"{n}.md", review_text(text)) for n, text in enumerate([NOTE, NOTE, "{H2O: bent}\n"])]
    summary = CheckedRun(files).caution_summary()
    assert [(formula, n) for formula, _, n in summary] == [
        ("ClF3", 2), ("AsH3", 2), ("XeF2", 2), ("BrF", 2), ("NH3", 2), ("PH3", 2)
    ]
