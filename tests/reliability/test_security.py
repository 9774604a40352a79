"""Security: nothing in a note or a ``.notelsp.toml`` is executed, imported or fetched; config
values are validated with clear errors; work per request is bounded.

Execution, imports, processes, network and file access are observed with
Python's audit hooks (PEP 578 event names, docs.python.org "Audit events
table", from memory) while notes full of code-like text are reviewed.
"""

from __future__ import annotations

import sys
import threading
from itertools import cycle

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import notelsp.chem.isomers as isomers
from notelsp.chem import analyse
from notelsp.notation import parse_formula
from notelsp.notation.transform import MAX_BODY_CHARS, MAX_COUNT, MAX_FORMULA_CHARS
from notelsp.review.document import review_text
from notelsp.review.settings import Settings, settings_from_toml

from .scale import scaled, tried

WATCHED = ("exec", "compile", "import", "os.system", "os.exec", "os.posix_spawn", "os.spawn", "subprocess.Popen",
           "socket.connect", "socket.getaddrinfo", "socket.gethostbyname", "urllib.Request", "open", "ctypes.dlopen",
           "pickle.find_class", "marshal.loads")
_recording: dict[int, list] = {}


def _hook(event: str, args: tuple) -> None:
    log = _recording.get(threading.get_ident())
    if log is not None and event.startswith(WATCHED):
        log.append((event, repr(args)[:120]))


sys.addaudithook(_hook)  # cannot be removed; it records only inside _observed() on this thread

HOSTILE = [
    "{__import__('os').system('touch pwned'): bent}",
    "{Xe: eval(open('/etc/passwd').read())}",
    "{Os: import antigravity}", "{S: exec('print(1)')}", "{I: !!python/object:os.system}",
    "{N: $(rm -rf /)}", "{C: `id`}", "{P: http://example.com/payload.py}", "{B: file:///etc/shadow}",
    "{Cl: ${jndi:ldap://example.com/a}}", "{H2O: {{7*7}}}", "{Sb: %s%s%n}", "{Pb: ../../../../etc/passwd}",
    "```bonding\n__import__('subprocess').call(['id'])\nos: system\n```\n",
    "[link](http://example.com/x.md) <script>fetch('http://example.com')</script> {ClF3: t-shaped}",
]


class _observed:
    def __enter__(self):
        _recording[threading.get_ident()] = self.events = []
        return self

    def __exit__(self, *exc):
        del _recording[threading.get_ident()]


def _warm() -> None:
    review_text("{ClF3: t-shaped} {SF4: seesaw, 2 isomers, C2v, polar} {PCl3F2: F axial} {NH3: H-N-H 107°}")


@pytest.mark.parametrize("note", HOSTILE)
def test_hostile_note_text_is_only_ever_read(note, tmp_path, monkeypatch):
    _warm()
    monkeypatch.chdir(tmp_path)
    with _observed() as seen:
        for kind in ("markdown", "text"):
            review_text(note, kind)
    tried("hostile notes reviewed under audit hooks", 2)
    assert seen.events == []
    assert list(tmp_path.iterdir()) == []


@settings(max_examples=scaled(60, 1000), deadline=None)
@given(st.lists(st.sampled_from(HOSTILE + ["{", "}", ":", "sp3", "ClF3", "\n", "os", "sys"]), max_size=12).map("".join))
def test_generated_hostile_text_triggers_no_audited_action(note):
    _warm()
    with _observed() as seen:
        review_text(note)
    tried("hostile notes reviewed under audit hooks")
    assert seen.events == []


BAD_CONFIGS = {
    'review = "__import__(\'os\')"': "[review] must be a table",
    "[review]\nangle_tolerance = 1e400": "angle_tolerance must be a number of degrees from 0 to 45",
    "[review]\nangle_tolerance = nan": "angle_tolerance must be a number of degrees from 0 to 45",
    "[review]\nangle_tolerance = -1": "angle_tolerance must be a number of degrees from 0 to 45",
    "[review]\nangle_tolerance = \"os.system('x')\"": "angle_tolerance must be a number of degrees from 0 to 45",
    "[review]\ninlay_hints = \"yes\"": "inlay_hints must be true or false",
    "[review]\ndisabled = \"wrong-shape\"": "disabled must be a list of rule codes",
    "[review]\ndisabled = [\"no-such-rule\"]": "disabled names unknown rules: no-such-rule",
    "[review]\nseverity = {wrong-shape = \"fatal\"}": "severity of wrong-shape must be error, warning, information or hint",
    "[review]\nseverity = {\"__class__\" = \"error\"}": "severity names an unknown rule: __class__",
    "[review]\nfiles = []": "files must be a non-empty list of glob patterns",
    "[review]\nplugin = \"evil.module\"": "unknown setting 'plugin'",
    "[plugins]\nload = [\"os\"]": "unknown table or key 'plugins'",
    "[review\nangle_tolerance = 3": ".notelsp.toml is not valid TOML",
}


@pytest.mark.parametrize("config", sorted(BAD_CONFIGS))
def test_bad_config_values_get_clear_errors_and_defaults(config):
    with _observed() as seen:
        values, problems = settings_from_toml(config)
    tried("bad .notelsp.toml texts validated")
    assert any(BAD_CONFIGS[config] in problem for problem in problems), problems
    assert values.angle_tolerance == Settings().angle_tolerance and values.globs == Settings().globs
    assert [e for e in seen.events if e[0] != "compile"] == []  # tomllib may compile a regex; nothing else


@settings(max_examples=scaled(80, 2000), deadline=None)
@given(st.dictionaries(st.sampled_from(["angle_tolerance", "inlay_hints", "disabled", "severity", "files",
                                        "cross_check_automatic", "x"]),
                       st.recursive(st.none() | st.booleans() | st.floats() | st.integers() | st.text(max_size=8),
                                    lambda inner: st.lists(inner, max_size=3) | st.dictionaries(st.text(max_size=5), inner, max_size=3),
                                    max_leaves=6), max_size=5))
def test_any_config_mapping_is_validated(values):
    from notelsp.review.settings import settings_from_mapping

    tried("generated configuration mappings validated")
    settings_, problems = settings_from_mapping({k: v for k, v in values.items() if v is not None})
    assert 0 <= settings_.angle_tolerance <= 45
    assert all(isinstance(problem, str) and problem for problem in problems)


def test_an_oversized_annotation_gets_a_diagnostic_not_a_parse():
    body = "ClF3: " + ", ".join(["t-shaped"] * (MAX_BODY_CHARS // 8))
    review = review_text("{" + body + "}")
    tried("oversized annotations refused")
    assert [f.code for f in review.findings] == ["formula-too-large"]


# The largest formulas and bodies the notation accepts, with the worst cases for the isomer enumeration:
# iodine with five different ligands and a pair on a pentagonal bipyramid (7!/2! = 2520 arrangements,
# the most that are enumerated) and with seven different ligands (7! = 5040, refused).  Counts by hand
# (common practice, no source); chains of MAX_COUNT atoms pad the formulas to MAX_FORMULA_CHARS.
LARGEST_ENUMERATED = "IF2ClBr(OC99H99)(C2H4CH2CH2CH2CH2CH2CH2CH2CH2CH2CH2CH2CH2C99H99)"
LARGEST_REFUSED = "IFClBr(SC99H99)(OC99H99)(C99H99)(NCH2CH2CH2CH2CH2C2H4C2H4C99H99)"
EVERY_KIND_OF_CLAIM = ["F axial", "polar", "C1", "252 isomers", "pentagonal bipyramidal", "sp3d3", "1 lone pair",
                       "F-I-Cl 90°", "F-I-F < Cl-I-Cl", "I-F longer", "lone pair axial", "nonpolar"]


def _largest_body(first: str, second: str) -> str:
    """``first vs second: claims...`` padded to exactly MAX_BODY_CHARS."""
    body = f"{first} vs {second}: "
    for claim in cycle(EVERY_KIND_OF_CLAIM):
        if len(body) + len(claim) + len(", ") > MAX_BODY_CHARS:
            return body.ljust(MAX_BODY_CHARS)
        body += claim + ", "


def test_the_largest_formulas_are_the_ones_accepted():
    for formula in (LARGEST_ENUMERATED, LARGEST_REFUSED):
        assert len(formula) == MAX_FORMULA_CHARS and f"C{MAX_COUNT}H{MAX_COUNT}" in formula
        assert parse_formula(formula).text == formula
    assert len(_largest_body(LARGEST_ENUMERATED, LARGEST_REFUSED)) == MAX_BODY_CHARS


@pytest.mark.timeout(120)  # a hang guard only: nothing here is timed
@pytest.mark.parametrize("form", ["inline", "block"])
@pytest.mark.parametrize("first, second", [(LARGEST_ENUMERATED, LARGEST_REFUSED), (LARGEST_REFUSED, LARGEST_ENUMERATED)])
def test_the_largest_annotation_with_the_worst_species_is_reviewed_in_place(form, first, second):
    body = _largest_body(first, second)
    note = f"# Worst case\n\n{{{body}}}\n" if form == "inline" else f"# Worst case\n\n```bonding\n{body}\n```\n"
    review = review_text(note)
    tried("largest annotations with the worst isomer cases reviewed")
    (annotation,) = review.annotations
    assert annotation.errors == () and annotation.form == form
    assert review.findings and "formula-too-large" not in {f.code for f in review.findings}
    for finding in review.findings:
        assert annotation.span.start <= finding.span.start <= finding.span.end <= annotation.span.end <= len(note)
        assert all(annotation.span.start <= fix.span.start <= fix.span.end <= annotation.span.end for fix in finding.fixes)
    refused = [f for f in review.findings if f.code == "isomers-not-enumerated"]
    assert len(refused) == 1 and note[refused[0].span.start:refused[0].span.end] == LARGEST_REFUSED
    if first == LARGEST_ENUMERATED:  # its isomers were listed, so the placement claims were judged
        assert "misplaced-ligand" in {f.code for f in review.findings}
    else:  # the refused species comes first: nothing is judged against isomers it does not have
        assert not {"misplaced-ligand", "wrong-polarity", "wrong-point-group", "wrong-isomer-count"} & {f.code for f in review.findings}


def test_an_enumeration_over_the_limit_is_refused_with_a_note(monkeypatch):
    # Analyse before lowering the limit: the analysis is cached per process and must not
    # remember a refused enumeration for later tests.
    ligands = analyse(parse_formula("SF2Cl2Br2")).centres[0].ligands
    isomers._isomers.cache_clear()
    monkeypatch.setattr(isomers, "MAX_ARRANGEMENTS", 10)
    try:
        with pytest.raises(isomers.IsomerLimitExceeded):
            isomers.isomers_for("octahedral", ligands, 0)
    finally:
        isomers._isomers.cache_clear()


def test_the_audit_hook_sees_what_it_watches(tmp_path):
    """A positive control: the observation above would notice a file opened or code compiled."""
    with _observed() as seen:
        (tmp_path / "x").write_text("x")
        compile("1", "<control>", "eval")
    assert {"open", "compile"} <= {event for event, _ in seen.events}
