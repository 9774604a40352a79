"""The README's rule list is the one the code registers (regenerate it from `notelsp rules`)."""

from pathlib import Path

from notelsp.review.describe import rules_markdown

README = Path(__file__).resolve().parent.parent / "README.md"


def test_readme_rule_list_matches_the_registered_rules():
    text = README.read_text(encoding="utf-8")
    block = text.split("<!-- rules:start -->", 1)[1].split("<!-- rules:end -->", 1)[0]
    assert block.strip() == rules_markdown().strip(), "run: python -m notelsp rules, and paste between the markers"
