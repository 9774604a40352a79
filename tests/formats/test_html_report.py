"""The reviewer's page: valid HTML (html5lib, a WHATWG parser), self-contained, one caution, every species."""

from __future__ import annotations

import io
import re

import html5lib
import pytest

from notelsp.formats import ReviewedFile
from notelsp.formats.html_report import CAUTION, write_html
from notelsp.review.document import review_text

NOTE = """# Bench week 12 (fictional lab)

The iodine fluoride {IF5: square pyramidal} and {PCl3F2: F equatorial, F-P-F 120°} came in.
{ClF3: T-shaped, F-Cl-F 87.5°} fumes; {XeF6: octahedral}; {Fe(CO)5}; {NH3: H-N-H 107°}.
"""


@pytest.fixture(scope="module")
def page() -> str:
    out = io.StringIO()
    write_html([ReviewedFile("week12.md", review_text(NOTE, "markdown"))], out, title="Week 12")
    return out.getvalue()


def test_page_parses_without_errors(page):
    parser = html5lib.HTMLParser(strict=True, namespaceHTMLElements=False)
    parser.parse(page)  # strict: raises on the first parse error
    assert not parser.errors


def test_page_is_self_contained(page):
    assert not re.search(r'(?:src|href)\s*=\s*"(?:https?:)?//', page)
    assert "<link" not in page and "@import" not in page and "url(" not in page


def test_caution_appears_once(page):
    assert page.count(CAUTION) == 1


def test_every_species_is_drawn_or_says_why_not(page):
    for formula in ("IF5", "PCl3F2", "ClF3", "NH3"):
        assert f"<h3>{formula}</h3><div class=\"species\"><figure><svg" in page
    assert "<h3>XeF6</h3><p>Not drawn:" in page
    assert "<h3>Fe(CO)5</h3><p>Not drawn:" in page and "transition-metal" in page


def test_isomers_side_by_side_with_point_group_and_polarity(page):
    section = page.split("<h3>PCl3F2</h3>", 1)[1].split("<h3>", 1)[0]
    assert section.count("<figure>") == 3
    assert "both F axial · D3h · nonpolar · expected" in section


def test_every_drawing_has_a_text_alternative(page):
    svgs = re.findall(r"<svg [^>]*>", page)
    assert svgs and all('aria-label="' in tag and 'role="img"' in tag for tag in svgs)


def test_findings_are_listed_with_their_annotation(page):
    assert "misplaced-ligand" in page and "{PCl3F2: F equatorial, F-P-F 120°}" in page
