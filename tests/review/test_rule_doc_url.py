"""Each rule's documentation address points at its heading in the README.

The anchors are checked against markdown-it-py's anchors plugin, whose slugs follow GitHub's
heading ids (a general-purpose library, not ours).
"""

from __future__ import annotations

from pathlib import Path

from markdown_it import MarkdownIt
from mdit_py_plugins.anchors import anchors_plugin

from notelsp.review.describe import RULES_DOC_URL, rule_doc_anchor, rule_doc_url, rules_markdown
from notelsp.review.rules import RULES

README = Path(__file__).resolve().parents[2] / "README.md"


def heading_ids(markdown: str) -> set[str]:
    parser = MarkdownIt("commonmark").use(anchors_plugin, min_level=1, max_level=6)
    return {token.attrs["id"] for token in parser.parse(markdown) if token.type == "heading_open" and "id" in token.attrs}


def test_every_rule_anchor_is_a_heading_of_the_readme():
    ids = heading_ids(README.read_text(encoding="utf-8"))
    generated = heading_ids(rules_markdown())
    for code in RULES:
        anchor = rule_doc_anchor(code)
        assert anchor in generated, code
        assert anchor in ids, f"{code}: README rule list out of date? run tools/update_readme.py"


def test_url_is_the_one_base_and_the_anchor():
    for code in RULES:
        assert rule_doc_url(code) == f"{RULES_DOC_URL}#{rule_doc_anchor(code)}"
    assert rule_doc_url("no-such-rule") is None
