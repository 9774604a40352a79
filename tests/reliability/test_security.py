"""Security: nothing in a note or a ``.notelsp.toml`` is executed, imported or fetched; config
values are validated with clear errors; work per request is bounded.

Execution, imports, processes, network and file access are observed with
Python's audit hooks (PEP 578 event names, docs.python.org "Audit events
table", from memory) while notes full of code-like text are reviewed.
"""

from __future__ import annotations

import sys
import threading

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import notelsp.chem.isomers as isomers
from notelsp.chem import analyse
from notelsp.chem.polyhedra import polyhedron
from notelsp.notation import parse_formula
from notelsp.notation.transform import MAX_BODY_CHARS
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


def test_isomer_enumeration_is_bounded_by_construction():
    """The largest polyhedron's assignments stay under the refusal limit, so no request can explode."""
    largest = max(len(polyhedron(geometry).sites) for geometry in isomers.ELECTRON_GEOMETRIES)
    worst = 1
    for n in range(2, largest + 1):
        worst *= n
    assert worst <= isomers.MAX_ARRANGEMENTS


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
