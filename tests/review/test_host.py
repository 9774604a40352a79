"""The analysis host: documents in by open, exact edits and close; immutable snapshots out.

Each review through a host is compared with a review of the same text made from scratch (no memory),
so what the host reuses can never change a finding; what it reuses is observed by counting the
reviews of single annotations and by the identity of the findings it hands out, never by timing.
"""

from __future__ import annotations

import dataclasses
import random

import pytest

from notelsp.notation import markdown
from notelsp.notation.model import Span
from notelsp.review import document
from notelsp.review.document import review_text
from notelsp.review.findings import Finding, Severity
from notelsp.review.host import AnalysisHost
from notelsp.review.settings import Settings

# ClF3 is T-shaped and SF4 a seesaw by VSEPR (from memory: any inorganic chemistry text); the claims
# below are right and wrong on purpose so that every paragraph has findings to reuse or not.
NOTE = (
    "# Halides\n\n"
    "First {ClF3: trigonal planar} in the morning.\n\n"
    "Then {SF4: tetrahedral} after lunch.\n\n"
    "```bonding\nXeF4: square planar\n```\n\n"
    "Last {ClF3: T-shaped} and {SF4: seesaw}.\n"
)


def _fresh(text: str, settings: Settings | None = None) -> tuple[Finding, ...]:
    return review_text(text, "markdown", settings).findings  # no memory: from scratch


@pytest.fixture
def counted(monkeypatch) -> list[str]:
    """The annotation texts reviewed by the rules (each review of one annotation, as it happens)."""
    reviewed: list[str] = []
    real = document._review_relative

    def counting(annotation, settings, computed=()):
        reviewed.append(annotation.parsed.formulas[0].text if annotation.parsed.formulas else "")
        return real(annotation, settings, computed)

    monkeypatch.setattr(document, "_review_relative", counting)
    return reviewed


def test_open_apply_change_and_close():
    host = AnalysisHost()
    host.open("note", 1, NOTE, "markdown")
    assert host.document("note").text == NOTE and host.document("note").version == 1
    assert host.findings("note") == _fresh(NOTE)
    first = NOTE.index("trigonal planar")
    host.apply_change("note", 2, [(first, first + len("trigonal planar"), "T-shaped"), (0, 0, "Notes\n")])
    edited = "Notes\n" + NOTE.replace("trigonal planar", "T-shaped", 1)
    assert host.document("note").text == edited and host.document("note").version == 2
    assert host.findings("note") == _fresh(edited)
    host.close("note")
    assert host.document("note") is None and host.review("note") is None and host.findings("note") == ()
    assert host.uris() == ()


def test_an_edit_outside_the_text_is_refused_and_changes_nothing():
    host = AnalysisHost()
    host.open("note", 1, NOTE, "markdown")
    with pytest.raises(ValueError):
        host.apply_change("note", 2, [(len(NOTE) + 1, len(NOTE) + 2, "x")])
    assert host.document("note").text == NOTE and host.document("note").version == 1


def test_random_edits_give_the_review_of_the_edited_text():
    rng = random.Random(17)
    pieces = ["{ClF3: bent}", "{SF4: seesaw}", " text ", "\n", "\n\n", "# {PCl5: linear}\n", "`{ClF3: bent}`",
              "```bonding\nSF6: octahedral\n```\n", "[a]: /u\n", "$$\n"]
    host = AnalysisHost()
    text = "".join(rng.choices(pieces, k=40))
    host.open("note", 0, text, "markdown")
    for version in range(1, 60):
        edits = []
        for _ in range(rng.randint(1, 3)):  # several edits in one change, each on the text the last left
            start = rng.randint(0, len(text))
            end = min(len(text), start + rng.randint(0, 10))
            new = rng.choice(pieces)
            edits.append((start, end, new))
            text = text[:start] + new + text[end:]
        host.apply_change("note", version, edits)
        assert host.document("note").text == text
        assert host.findings("note") == _fresh(text)


def test_the_edit_is_taken_from_its_range_not_found_by_comparing_texts(monkeypatch):
    host = AnalysisHost()
    host.open("note", 1, NOTE, "markdown")
    host.review("note")

    def compared(*_):
        raise AssertionError("the texts were compared although the edit's range was known")

    monkeypatch.setattr(markdown, "_closest", compared)
    at = NOTE.index("after lunch")
    host.apply_change("note", 2, [(at, at + len("after"), "before")])
    assert host.findings("note") == _fresh(NOTE.replace("after lunch", "before lunch"))


def test_an_edit_reviews_again_only_the_annotation_it_touches(counted):
    host = AnalysisHost()
    host.open("note", 1, NOTE, "markdown")
    before = host.snapshot("note")
    assert len(counted) == 5  # each annotation text once
    counted.clear()
    at = NOTE.index("{SF4: tetrahedral}") + len("{SF4: ")
    host.apply_change("note", 2, [(at, at + len("tetrahedral"), "octahedral")])
    after = host.snapshot("note")
    assert counted == ["SF4"]  # only the edited annotation went through the rules again
    # The findings before the edit are the very objects handed out before: reused, not made again.
    first_before = [f for f in before.findings if f.span.end < at]
    first_after = [f for f in after.findings if f.span.end < at]
    assert first_before and all(a is b for a, b in zip(first_before, first_after, strict=True))
    assert after.findings == _fresh(host.document("note").text)


def test_an_unchanged_text_is_not_reviewed_again(counted):
    host = AnalysisHost()
    host.open("note", 1, NOTE, "markdown")
    review = host.review("note")
    counted.clear()
    assert host.review("note") is review and counted == []


def test_a_snapshot_never_changes():
    host = AnalysisHost()
    host.open("note", 1, NOTE, "markdown")
    snapshot = host.snapshot("note")
    findings = snapshot.findings
    with pytest.raises(dataclasses.FrozenInstanceError):
        snapshot.review = None  # type: ignore[misc]
    with pytest.raises(dataclasses.FrozenInstanceError):
        snapshot.document.text = ""  # type: ignore[misc]
    host.apply_change("note", 2, [(0, len(NOTE), "{SF4: linear}\n")])
    host.set_settings("note", Settings(disabled=frozenset({"wrong-shape"})))
    host.review("note")
    assert snapshot.document.text == NOTE and snapshot.document.version == 1
    assert snapshot.findings == findings == _fresh(NOTE)


def test_two_hosts_share_nothing(counted):
    one, other = AnalysisHost(), AnalysisHost()
    one.open("note", 1, NOTE, "markdown")
    one.review("note")
    counted.clear()
    assert other.document("note") is None and other.review("note") is None
    other.open("note", 1, NOTE, "markdown")
    assert other.findings("note") == one.findings("note")
    assert len(counted) == 5  # the other host reviewed every annotation itself
    assert one.memory is not other.memory and one.memory.blocks is not other.memory.blocks


def test_settings_and_cross_check_findings_are_inputs():
    host = AnalysisHost()
    host.open("note", 1, NOTE, "markdown")
    off = Settings(disabled=frozenset({"wrong-shape"}))
    host.set_settings("note", off)
    assert host.findings("note") == _fresh(NOTE, off)
    annotation = "{SF4: seesaw}"
    checked = Finding("cross-check-test", Severity.INFORMATION, "checked", Span(1, 4), "SF4")
    host.set_checked("note", {annotation: (checked,)})
    start = NOTE.index(annotation)
    assert host.snapshot("note").checked == (checked.shifted(start),)
    assert host.findings("note")[-1] == checked.shifted(start)  # after the review's own
    host.apply_change("note", 2, [(start + 1, start + 4, "SF6")])  # the annotation edited: its check is gone
    assert host.snapshot("note").checked == ()


def test_annotation_at_reviews_only_around_the_offset(counted):
    host = AnalysisHost()
    host.open("note", 1, NOTE, "markdown")
    at = NOTE.index("SF4: tetrahedral")
    annotation = host.annotation_at("note", at)
    assert annotation is not None and NOTE[annotation.span.start : annotation.span.end] == "{SF4: tetrahedral}"
    assert counted == ["SF4"]
    assert host.annotation_at("note", 0) is None  # the heading holds none
