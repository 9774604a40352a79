"""Every fix, applied, removes its finding and changes nothing else.

One Markdown note triggers every rule that offers fixes (inline annotations,
a ``bonding`` block, and a code block that must stay untouched).  The
expected corrections are the standard VSEPR/Bent results (common practice,
no source); the rule tests check each against its source.
"""

from __future__ import annotations

import pytest

from notelsp.review.findings import Finding
from notelsp.review.rules import RULES

from .helpers import review

NOTE = """\
# Week 3: bonding

Interhalogens: {ClF3: trigonal planar, lone pairs axial} and {CLF5: square pyramidal}.
Water {H2O: electron geometry trigonal planar, s-character 33%} and methane {CH4: sp2, i = 2}.
Ammonia {NH3: 2 lone pairs, H-N-H 120°} is not {NH3: trigonal pyramid}.

```python
note = "{ClF3: trigonal planar}"  # code is never read
```

Fluorides: {PCl3F2: F equatorial, 2 isomers}, {SF2Cl2: nonpolar}, {SF4: D2d}, {H2O: H-O-H 104°, sp^2.5}.
Bent's rule: {CH2F2: F-C-F > H-C-H} and {CF4 vs CH3F: C-F longer}.
Counting: {ClF3: AX3E}, {NO2: diamagnetic} and a salt of {ClO4}; lower case: {sf4: seesaw}.
Atoms by name: {NH3: H1 is sp3}, {CH3OH: O1 bent} and {smiles "CC#N": N has 2 lone pairs}.

```bonding
XeF4: tetrahedral   # from a hand sketch
SF6: electron geometry trigonal bipyramidal
```
"""

FIXABLE = {
    "unknown-claim", "unknown-element",
    "wrong-shape", "wrong-electron-geometry", "wrong-hybridization", "wrong-lone-pairs",
    "implausible-angle", "angle-order-against-bent", "bond-length-against-bent",
    "index-angle-mismatch", "s-character-mismatch",
    "misplaced-ligand", "wrong-polarity", "wrong-point-group", "wrong-isomer-count",
    "wrong-axe-class", "wrong-unpaired-electrons", "charge-missing", "annotation-not-read", "unknown-atom",
    "terminal-atom",
}
# no correct replacement exists for these: the writer must say what was meant
WITHOUT_FIXES = {"malformed-formula", "malformed-claim", "impossible-count", "formula-too-large", "outside-model",
                 "isomers-not-enumerated", "note-too-large", "review-continues",
                 # which of several centres a claim means is the writer's to say
                 "centre-not-named",
                 # predictions too rough to write a value for the writer, and a hint about a spelling
                 "implausible-bond-length", "coupling-against-s-character", "outer-d-convention",
                 # judged against a computed geometry, only where the rules let the claim pass: the writer decides
                 "angle-against-calculation", "angle-order-against-calculation", "placement-against-calculation",
                 "calculation-failed",
                 # reported by the PySCF cross-check, outside the review: a calculation states, the writer decides
                 "computed-structure", "computed-isomers", "computed-angle", "computed-placement",
                 "cross-check-not-run"}

ORIGINAL = review(NOTE)


def _key(finding: Finding, delta: int = 0, after: int | None = None) -> tuple:
    """A finding without its identity, shifted by ``delta`` when it lies after ``after``."""
    shift = delta if after is not None and finding.span.start >= after else 0
    return (finding.code, finding.message, finding.span.start + shift, finding.span.end + shift,
            tuple((f.span.start + shift, f.span.end + shift, f.replacement) for f in finding.fixes))


def test_every_rule_is_either_fixable_or_known_to_have_no_fix():
    assert FIXABLE | WITHOUT_FIXES == set(RULES) and not FIXABLE & WITHOUT_FIXES


def test_the_note_triggers_every_fixable_rule_and_each_finding_has_a_fix():
    assert {f.code for f in ORIGINAL.findings} == FIXABLE
    assert all(f.fixes for f in ORIGINAL.findings)
    for finding in ORIGINAL.findings:
        for fix in finding.fixes:
            assert fix.span == finding.span  # fixes replace exactly the claim


@pytest.mark.parametrize("index", range(len(ORIGINAL.findings)),
                         ids=[f"{f.code}:{NOTE[f.span.start:f.span.end]}" for f in ORIGINAL.findings])
def test_applying_a_fix_removes_exactly_its_finding(index):
    finding = ORIGINAL.findings[index]
    for fix in finding.fixes:
        text = NOTE[: fix.span.start] + fix.replacement + NOTE[fix.span.end:]
        delta = len(fix.replacement) - (fix.span.end - fix.span.start)
        # nothing outside the fix's range changed
        assert text[: fix.span.start] == NOTE[: fix.span.start]
        assert text[fix.span.start + len(fix.replacement):] == NOTE[fix.span.end:]
        again = review(text)
        others = [_key(f, delta, fix.span.end) for f in ORIGINAL.findings if f is not finding]
        assert sorted(_key(f) for f in again.findings) == sorted(others)
        assert len(again.annotations) == len(ORIGINAL.annotations)


def test_applying_every_fix_leaves_a_clean_note():
    text = NOTE
    fixes = sorted((f.fixes[0] for f in ORIGINAL.findings), key=lambda fix: fix.span.start, reverse=True)
    for fix in fixes:  # from the end, so earlier offsets stay valid
        text = text[: fix.span.start] + fix.replacement + text[fix.span.end:]
    assert not review(text).findings
    assert '"{ClF3: trigonal planar}"' in text  # the code block was not touched
