"""Rewrite the rule list in README.md from the registered rules."""

from pathlib import Path

from notelsp.review.describe import rules_markdown

README = Path(__file__).resolve().parent.parent / "README.md"
START, END = "<!-- rules:start -->", "<!-- rules:end -->"

text = README.read_text(encoding="utf-8")
head, rest = text.split(START, 1)
_, tail = rest.split(END, 1)
README.write_text(f"{head}{START}\n{rules_markdown()}\n{END}{tail}", encoding="utf-8")
