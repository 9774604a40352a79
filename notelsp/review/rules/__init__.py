"""The rule registry.

A rule is a function decorated with :func:`rule`.  Its docstring is its
documentation: the first line a title, the rest a short explanation of the
chemistry, shown in hover and in the README's rule list.  A rule receives a
:class:`RuleContext` for one claim (or, with ``claims=()``, for the whole
annotation) and yields findings made with :meth:`RuleContext.finding`.

Rule modules are imported at the bottom of this file so that registering
happens once, in one place.
"""

from __future__ import annotations

import functools
import inspect
from collections.abc import Callable, Iterable, Iterator
from dataclasses import dataclass
from typing import TYPE_CHECKING, TypeVar, cast

from ...notation.model import Annotation, Claim, Span
from ..findings import Finding, Fix, Severity

if TYPE_CHECKING:  # types only: the rules never load the compute package (the edge's), nor add to start-up
    from ...chem.analysis import SpeciesAnalysis
    from ...chem.exceptions import KnownException
    from ...compute.result import ComputedSpecies
    from ..calculated import Calculation
    from ..settings import Settings

Check = Callable[["RuleContext"], Iterable[Finding]]  # a rule about one annotation (or one claim of it)
NoteCheck = Callable[["DocumentContext"], Iterable[Finding]]  # a whole-note rule
AnyCheck = TypeVar("AnyCheck", Check, NoteCheck)


@dataclass(frozen=True, slots=True)
class Rule:
    """One named rule: its code, doc, default severity, the claims it checks and the check itself."""

    code: str
    title: str
    doc: str
    severity: Severity
    claims: tuple[type[Claim], ...]  # claim types it checks; () means once per annotation
    check: Check | NoteCheck  # a NoteCheck exactly when ``whole_note``
    whole_note: bool = False  # checks the note itself (a DocumentContext), not an annotation
    judges_geometry: bool = False  # compares a claim with the predicted geometry: capped where the model is unsure
    # Its findings are made outside the review (the PySCF cross-check): registered so that settings,
    # the README and SARIF know the code; the review never runs its check.
    reported_outside: bool = False

    def run(self, context: RuleContext) -> Iterable[Finding]:
        """The findings of this (annotation) rule in ``context``."""
        assert not self.whole_note, self.code
        return cast(Check, self.check)(context)

    def run_on_note(self, context: DocumentContext) -> Iterable[Finding]:
        """The findings of this whole-note rule in ``context``."""
        assert self.whole_note, self.code
        return cast(NoteCheck, self.check)(context)


RULES: dict[str, Rule] = {}


def rule(
    code: str, *, severity: Severity, claims: tuple[type[Claim], ...] = (), whole_note: bool = False,
    judges_geometry: bool = False, reported_outside: bool = False,
) -> Callable[[AnyCheck], AnyCheck]:
    """Register ``check`` as the rule ``code`` (``whole_note``: it is given a :class:`DocumentContext`).

    ``judges_geometry``: the rule compares a claim with the predicted shape or angles, so where the
    species is a known exception to plain VSEPR its findings are capped (see :meth:`RuleContext.finding`).
    ``reported_outside``: the findings come from outside the review (the cross-check); ``check`` only
    documents the rule and is never run.
    """

    def register(check: AnyCheck) -> AnyCheck:
        if code in RULES:
            raise ValueError(f"rule {code!r} registered twice")
        doc = inspect.cleandoc(check.__doc__ or "")
        title, _, explanation = doc.partition("\n")
        if not title:
            raise ValueError(f"rule {code!r} has no docstring")
        RULES[code] = Rule(code, title.strip(), explanation.strip(), severity, claims, check, whole_note,
                           judges_geometry, reported_outside)
        return check

    return register


@dataclass(frozen=True, slots=True)
class RuleContext:
    """What a rule sees: one annotation, one claim of it, and the analyses."""

    rule: Rule
    annotation: Annotation
    claim: Claim | None
    analyses: tuple[SpeciesAnalysis, ...]  # one per formula of the annotation
    settings: Settings
    # One computed result (or None: not computed) per formula; () when none is.
    # An input like the text: rules read it, nothing here computes.
    computed: tuple[ComputedSpecies | None, ...] = ()
    # The label of the centre of a molecule the claim is about (target.Focus.centre), None otherwise.
    centre: str | None = None

    @property
    def analysis(self) -> SpeciesAnalysis | None:
        """The analysis of the annotation's first formula; None when it has none."""
        return self.analyses[0] if self.analyses else None

    @property
    def species(self) -> str:
        """The first species as messages name it ("CH3COOH (C2)" for a centre of a molecule), "" when none."""
        analysis = self.analysis
        return analysis.formula if analysis is not None else ""

    def computed_of(self, index: int = 0) -> ComputedSpecies | None:
        """The computed result of the annotation's ``index``-th formula, None where there is none."""
        return self.computed[index] if index < len(self.computed) else None

    def calculation(self, index: int = 0) -> Calculation | None:
        """The usable computed structure of the ``index``-th formula, or None."""
        from ..calculated import calculation

        return calculation(self.computed_of(index), self.centre if index == 0 else None)

    def finding(
        self,
        message: str,
        *,
        fixes: Iterable[Fix] = (),
        span: Span | None = None,
        at_most: Severity | None = None,
    ) -> Finding:
        """A finding of this rule; ``at_most`` caps its severity (where rules and a calculation disagree)."""
        claim = self.claim
        where = span or (claim.span if claim else self.annotation.span)
        formula = self.annotation.formula
        severity = self.settings.severity_of(self.rule)
        if at_most is not None:
            severity = _milder(severity, at_most)
        doubt = self.doubt() if self.rule.judges_geometry else None
        if doubt is not None:
            # Trust: where the model only knows what "usually" happens, a contrary claim is at most a
            # warning; where it cannot decide, information with the reason and no rewriting fix.
            confidence, why = doubt
            if confidence == "uncertain":
                severity, fixes = _milder(severity, Severity.INFORMATION), ()
                message = f"{message} (uncertain: {why})"
            else:
                severity = _milder(severity, Severity.WARNING)
                message = f"{message} (usually so: {why})"
        return Finding(
            code=self.rule.code,
            severity=severity,
            message=message,
            span=where,
            formula=" vs ".join(f.text for f in self.annotation.formulas) if formula else "",
            claim=claim.text if claim else None,
            fixes=tuple(fixes),
        )

    @property
    def exception(self) -> KnownException | None:
        """The known exception to plain VSEPR of the species' first centre, if any."""
        analysis = self.analysis
        if analysis is None or analysis.outside_model is not None or not analysis.centres:
            return None
        return analysis.centres[0].exception

    def doubt(self) -> tuple[str, str] | None:
        """("usual" or "uncertain", why) where the prediction is less than firm, else None."""
        from ...chem.ions import likely_ion

        formula = self.annotation.formula
        if formula is not None:
            ion = likely_ion(formula.composition(), formula.charge)
            if ion is not None:
                return "uncertain", f"{formula.text} is probably the {ion[1]} ion with its charge left out"
        exception = self.exception
        if exception is None:
            return None
        return exception.confidence, exception.reason if exception.confidence == "uncertain" else exception.name

    def replace_claim(self, replacement: str, title: str | None = None) -> Fix:
        """A fix that rewrites just this claim."""
        assert self.claim is not None
        return Fix(title or f"Replace with '{replacement}'", self.claim.span, replacement)


_SEVERITY_ORDER = (Severity.ERROR, Severity.WARNING, Severity.INFORMATION, Severity.HINT)


def _milder(configured: Severity, cap: Severity) -> Severity:
    """The milder of a configured severity and a cap (a rule set to hint stays a hint)."""
    return max(configured, cap, key=_SEVERITY_ORDER.index)


@dataclass(frozen=True, slots=True)
class DocumentContext:
    """What a whole-note rule sees: the text, how much of it was reviewed, the settings."""

    rule: Rule
    text: str
    reviewed_chars: int
    settings: Settings

    def finding(self, message: str, span: Span) -> Finding:
        return Finding(self.rule.code, self.settings.severity_of(self.rule), message, span, "")


def whole_note_findings(text: str, reviewed_chars: int, settings: Settings) -> list[Finding]:
    found: list[Finding] = []
    for candidate in RULES.values():
        if candidate.whole_note and not candidate.reported_outside and settings.enabled(candidate.code):
            found.extend(candidate.run_on_note(DocumentContext(candidate, text, reviewed_chars, settings)))
    return found


def rules_for(claim: Claim | None) -> tuple[Rule, ...]:
    """The rules that judge ``claim`` (None: the annotation as a whole), in registration order."""
    # mypy does not see a class as Hashable (it reads the instances' __hash__); it is
    return _rules_for_kind(None if claim is None else type(claim), len(RULES))  # type: ignore[arg-type]


@functools.lru_cache(maxsize=256)
def _rules_for_kind(kind: type[Claim] | None, registered: int) -> tuple[Rule, ...]:
    # asked once per claim of every annotation: the answer depends only on the claim's class
    # (and on the registry, which only grows, hence its size in the key)
    return tuple(candidate for candidate in RULES.values()
                 if not (candidate.whole_note or candidate.reported_outside)
                 and (not candidate.claims if kind is None else issubclass(kind, candidate.claims)))


# Registering happens on import; every rule module is listed here.
from . import notation  # noqa: E402,F401
from . import placement  # noqa: E402,F401
from . import vsepr, angles, hybrid, measured  # noqa: E402,F401
from . import atoms  # noqa: E402,F401
from . import computed  # noqa: E402,F401
from . import crosscheck  # noqa: E402,F401
