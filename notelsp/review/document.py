"""Review a whole document: scan it, analyse each species, run the rules.

Pure: text in, a :class:`DocumentReview` out.  The findings of one annotation
depend only on its own text and the settings, so they are kept by that text
(position-free) and shifted into place, in a :class:`ReviewMemory` that its
owner (the analysis host, ``notelsp.review.host``) passes in; without one a
review starts from nothing.  A species is analysed once per process by the
analyser's own cache (keyed by the formula's value).
"""

from __future__ import annotations

from bisect import bisect_left, bisect_right
from dataclasses import dataclass
from functools import cache, cached_property
from collections.abc import Iterable, Iterator, Mapping
from typing import TYPE_CHECKING, Callable, Literal, NamedTuple

from ..notation import scan
from ..notation.scanner import scan_pieces, scan_pieces_around
from ..notation.markdown import BlockMemory
from ..notation.model import Annotation, Claim, Formula, Found, ScannedDocument, Span, annotation_of
from ..positions import LineIndex
from .findings import Finding
from .settings import Settings
from .target import TARGET_RULES, focus

if TYPE_CHECKING:  # only the types: the review reads computed results, it never computes
    from ..chem.analysis import SpeciesAnalysis
    from ..compute.result import ComputedSpecies
    from .rules import Rule, RuleContext

DocumentKind = Literal["markdown", "text"]


@dataclass(frozen=True)
class DocumentReview:
    """One reviewed text: what the scanner found in it and the findings, in document order."""

    text: str
    scanned: ScannedDocument
    findings: tuple[Finding, ...]
    stopped_at: int | None = None  # where a review given a time budget stopped; None: the whole note

    @cached_property
    def line_index(self) -> LineIndex:
        return LineIndex(self.text)

    @property
    def annotations(self) -> tuple[Annotation, ...]:
        return self.scanned.annotations

    def analyses_of(self, annotation: Annotation) -> tuple[SpeciesAnalysis, ...]:
        return analyses_of(annotation)

    @cached_property
    def _finding_starts(self) -> list[int]:
        return [finding.span.start for finding in self.findings]

    @cached_property
    def _longest_finding(self) -> int:
        return max((finding.span.end - finding.span.start for finding in self.findings), default=0)

    def annotation_at(self, offset: int) -> Annotation | None:
        """The first annotation (in document order) whose span holds ``offset``, ends included."""
        found = self.scanned.found
        # Annotations are sorted by start and do not overlap: only the last two starting at or before
        # ``offset`` can hold it, and of those the earlier wins when both touch it.
        last = bisect_right(self.scanned.starts, offset) - 1
        for index in range(max(last - 1, 0), last + 1):
            if found[index][0] <= offset <= found[index][1]:
                return self.scanned.annotation(index)  # only this one is made, not all of them
        return None

    def findings_in(self, span: Span) -> tuple[Finding, ...]:
        """Findings whose range overlaps ``span`` (touching counts, so empty ranges are found)."""
        # Findings are sorted by start; none is longer than the longest, which bounds where to look.
        first = bisect_left(self._finding_starts, span.start - self._longest_finding)
        stop = bisect_right(self._finding_starts, span.end)
        return tuple(f for f in self.findings[first:stop] if f.span.start <= span.end and span.start <= f.span.end)


def kind_of_path(path: str) -> DocumentKind:
    return "text" if path.lower().endswith(".txt") else "markdown"


class _Chemistry(NamedTuple):
    """What a review calls of the analyser and the rules, typed as they are."""

    analyse: Callable[[Formula], SpeciesAnalysis]
    reviewed_length: Callable[[str], int]  # how much of a note is reviewed (the rest: note-too-large)
    rules_for: Callable[[Claim | None], tuple[Rule, ...]]
    whole_note_findings: Callable[[str, int, Settings], list[Finding]]
    context: type[RuleContext]


@cache
def _chemistry() -> _Chemistry:
    """The analyser and the rules, imported once on first use (numpy and the isomer tables
    are not needed to start a server, only to review)."""
    from .. import chem
    from . import rules

    return _Chemistry(chem.analyse, rules.notation.reviewed_length, rules.rules_for, rules.whole_note_findings,
                      rules.RuleContext)


def analyses_of(annotation: Annotation) -> tuple[SpeciesAnalysis, ...]:
    analyse = _chemistry().analyse
    return tuple(analyse(formula) for formula in annotation.formulas)


def species_to_compute(scanned: ScannedDocument | DocumentReview) -> tuple[str, ...]:
    """Every species the annotations name, as written (``Formula.written``), each once, in document order.

    These are the keys of ``review_text``'s ``computed``: compute each (``GeometryPool.compute``
    takes the text as it is) and pass the results keyed by the same text.
    """
    found = scanned.scanned.found if isinstance(scanned, DocumentReview) else scanned.found
    seen: dict[str, None] = {}
    for entry in found:
        for formula in entry[4].formulas:
            seen.setdefault(formula.written, None)
    return tuple(seen)


Computed = Mapping[str, "ComputedSpecies"]


def review_text(
    text: str,
    kind: DocumentKind = "markdown",
    settings: Settings | None = None,
    more_time: Callable[[int], bool] | None = None,
    computed: Computed | None = None,
    memory: ReviewMemory | None = None,
) -> DocumentReview:
    """Every finding of ``text``.

    ``computed`` holds computed geometries (``notelsp.compute.ComputedSpecies``) keyed by the
    species as written in the annotations (``Formula.written``; :func:`species_to_compute` lists
    them).  Claims about species found there are also judged against the calculation; a species
    missing from it is judged by the rules alone.  The review never computes: results are an
    input, and the findings stay a function of the arguments (caches key on them).

    With ``more_time`` the review may stop early: it is asked before each further line
    holding annotations, with the offset of that line's start, and when it answers False
    the review ends there (``DocumentReview.stopped_at``).  Everything above is complete, and the
    whole-note rule ``review-continues`` marks the first line left out.  Whoever asks
    keeps the clock: the review itself stays a function of its arguments and the answers.

    ``memory``: what earlier reviews left to reuse (see :class:`ReviewMemory`); its owner is the
    analysis host.  Without it nothing is reused from, or kept for, another call.
    """
    settings = settings or Settings()
    computed = computed or {}
    memory = memory or ReviewMemory()
    key = (text, kind, settings, _computed_key(computed))
    finished = memory.finished.get(key)
    if finished is not None:
        return finished
    rules = _chemistry()
    reviewed = rules.reviewed_length(text)
    scanned_text = text if reviewed == len(text) else text[:reviewed]
    reviews, placed = memory.reviews_for(settings)
    findings: list[Finding] = []
    stopped_at = None
    if more_time is None:
        scanned = scan(scanned_text, kind, memory.blocks)
        _review_found(scanned.found, text, settings, reviews, placed, findings, computed)
    else:
        found: list[Found] = []
        for piece in scan_pieces(scanned_text, kind, memory.blocks):
            if found:
                line_start = text.rfind("\n", 0, piece[0][0]) + 1
                # Stop only where nothing reviewed lies on the line: at its start.
                if line_start >= found[-1][1] and not more_time(line_start):
                    stopped_at = reviewed = line_start
                    break
            _review_found(piece, text, settings, reviews, placed, findings, computed)
            found.extend(piece)
        scanned = ScannedDocument(tuple(found))
    # Each annotation's findings are sorted and lie inside it, and annotations neither overlap
    # nor touch: in document order the findings are sorted already.
    whole_note = rules.whole_note_findings(text, reviewed, settings)
    if whole_note:
        findings.extend(whole_note)
        findings.sort(key=_ORDER)
    review = DocumentReview(text, scanned, tuple(findings), stopped_at)
    if stopped_at is None:
        memory.keep_finished(key, review)
    return review


def review_around(text: str, kind: DocumentKind, settings: Settings, span: Span,
                  computed: Computed | None = None, memory: ReviewMemory | None = None) -> DocumentReview:
    """The review of only the annotations ``span`` touches (for hover and code actions).

    The complete review when one of this text is at hand; otherwise only the pieces
    (segments, bonding-block lines) holding the span are scanned and reviewed, so asking
    about one annotation never waits for a whole large note.  ``computed``: as for
    :func:`review_text`, and so is ``memory``.
    """
    computed = computed or {}
    memory = memory or ReviewMemory()
    finished = memory.finished.get((text, kind, settings, _computed_key(computed)))
    if finished is not None:
        return finished
    rules = _chemistry()
    scanned_text = text[: rules.reviewed_length(text)]
    reviews, placed = memory.reviews_for(settings)
    found: list[Found] = []
    for piece in scan_pieces_around(scanned_text, kind, span.start, span.end, memory.blocks):
        found.extend(f for f in piece if f[0] <= span.end and span.start <= f[1])
    findings: list[Finding] = []
    _review_found(found, text, settings, reviews, placed, findings, computed)
    return DocumentReview(text, ScannedDocument(tuple(found)), tuple(findings), None)


class _Same:
    """A computed result in a cache key, compared by identity: hashing a result by content walks every
    coordinate (tens of microseconds for a species with isomers).  The key holds the result, so while the
    entry lives no other object can take its id; an equal result computed again is merely a cache miss."""

    __slots__ = ("value",)

    def __init__(self, value: object) -> None:
        self.value = value

    def __hash__(self) -> int:
        return id(self.value)

    def __eq__(self, other: object) -> bool:
        return isinstance(other, _Same) and other.value is self.value


def _computed_key(computed: Computed) -> tuple:
    """``computed`` as a hashable value (see _Same)."""
    return tuple(sorted((name, _Same(result)) for name, result in computed.items())) if computed else ()


def _review_found(found_in_order: Iterable[Found], text: str, settings: Settings, reviews: "Relative", placed: "Placed",
                  findings: list[Finding], computed: Computed) -> None:
    """Append the placed findings of each annotation (in document order) to ``findings``."""
    for found in found_in_order:
        start, end, _, _, parsed, form = found
        source = text[start:end]
        # An annotation's findings depend on its text, form and settings, and on the computed
        # results of its own species: those join the cache key (nothing when none is computed).
        results = tuple(computed.get(f.written) for f in parsed.formulas) if computed else ()
        own = tuple(None if r is None else _Same(r) for r in results) if any(results) else ()
        relative = reviews.get((source, form, own))
        if relative is None:
            if len(reviews) >= _REVIEWS_LIMIT:  # full: the oldest goes (see _evict_oldest)
                _evict_oldest(reviews)
            relative = reviews[(source, form, own)] = _review_relative(_relative_annotation(found), settings,
                                                                       results if own else ())
        if relative:  # most annotations have no findings: nothing to place
            key = (source, form, start, own)
            here = placed.get(key)
            if here is None:
                if len(placed) >= _REVIEWS_LIMIT:
                    _evict_oldest(placed)
                here = placed[key] = tuple([finding.shifted(start) for finding in relative])
            findings.extend(here)


def _evict_oldest(cache: dict) -> None:
    """Drop the entry put in first.  Dropping one at a time rather than emptying a full cache keeps
    memory level in a long session: emptying frees tens of thousands of objects at once, and the refill
    that follows takes fresh memory while the freed blocks sit scattered among live ones."""
    try:
        del cache[next(iter(cache))]
    except (StopIteration, KeyError, RuntimeError):  # emptied or changed by another thread meanwhile
        pass


def _ORDER(finding: Finding) -> tuple[int, int, str]:
    return finding.span.start, finding.span.end, finding.code


_FINISHED_LIMIT = 8
_REVIEWS_LIMIT = 20_000
_SETTINGS_LIMIT = 8  # settings change rarely; a few sets are plenty
# Keys end with the annotation's computed results (one per formula, None where not computed; ()
# when none is), so a review with computed results never reuses findings made without them.
Relative = dict[tuple[str, str, tuple], tuple[Finding, ...]]
Placed = dict[tuple[str, str, int, tuple], tuple[Finding, ...]]


class ReviewMemory:
    """What one owner's reviews leave for the next: the analysis host holds one (``notelsp.review.host``).

    - ``finished``: the last few complete reviews, oldest first; a review finished in slices
      (see ``more_time``) is found here by whoever asks next (hover, actions, pulled diagnostics).
    - per settings, the findings of each annotation text (offsets from the annotation's start;
      they depend only on its text, its form, the settings and its computed results) and the
      same findings placed at an offset: after an edit, the annotations before it are where
      they were, and their findings are taken as they are.
    - ``blocks``: the Markdown blocks of the last few documents (re-parsing around an edit).

    Every part is capped, the oldest entry going first (a server runs for days).
    """

    def __init__(self) -> None:
        self.finished: dict[tuple[str, str, Settings, tuple], DocumentReview] = {}
        self.reviews: dict[Settings, tuple[Relative, Placed]] = {}
        self.blocks = BlockMemory()

    def keep_finished(self, key: tuple, review: DocumentReview) -> None:
        self.finished[key] = review
        if len(self.finished) > _FINISHED_LIMIT:
            _evict_oldest(self.finished)

    def reviews_for(self, settings: Settings) -> tuple[Relative, Placed]:
        """The caches for ``settings``, each capped at _REVIEWS_LIMIT entries, the oldest going first (edits
        leave findings at old offsets behind, and a long session types ever new annotations)."""
        reviews = self.reviews.get(settings)
        if reviews is None:
            if len(self.reviews) >= _SETTINGS_LIMIT:
                self.reviews.clear()
            reviews = self.reviews[settings] = ({}, {})
        return reviews

    def forget_placed(self) -> None:
        """Drop only what is kept at positions (placed findings, complete reviews, remembered documents)."""
        for _, placed in list(self.reviews.values()):
            placed.clear()
        self.finished.clear()
        self.blocks = BlockMemory()


def _relative_annotation(found: Found) -> Annotation:
    """The annotation with offsets counted from its own start (as if it were the whole text)."""
    start, end, body_start, body_end, parsed, form = found
    return annotation_of((0, end - start, body_start - start, body_end - start, parsed, form))


def _review_relative(annotation: Annotation, settings: Settings,
                     computed: tuple["ComputedSpecies | None", ...] = ()) -> tuple[Finding, ...]:
    """Run every enabled rule on one annotation (placed as if it were the whole text).

    ``computed``: one computed result (or None) per formula of the annotation, or () for none.
    """
    rules = _chemistry()
    analyses = analyses_of(annotation)
    found: list[Finding] = []
    for claim in (None, *annotation.claims):
        # the rules judge the claim against the one centre it is about (see target.py); where that
        # cannot be settled only the rules that say so run
        target = focus(analyses, claim)
        for rule in rules.rules_for(claim):
            if not settings.enabled(rule.code):
                continue
            if rule.code in TARGET_RULES:
                if target.problem is not None:  # they report only a claim that cannot be placed
                    found.extend(rule.run(rules.context(rule, annotation, claim, analyses, settings, computed)))
            elif target.problem is None:
                judged = rule.run(rules.context(rule, annotation, target.claim, target.analyses, settings,
                                                computed, target.centre))
                # a fix would write the claim back with the names the rules use (H-C-H for H-C1-H): none then
                found.extend(f._replace(fixes=()) if target.translated else f for f in judged)
    return tuple(sorted(found, key=_ORDER))
